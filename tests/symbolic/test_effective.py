"""The exact normal form of a model's long-wavelength equation (contourkit.symbolic.effective).

Sources: the Liouville transformation, F. W. J. Olver, Asymptotics and Special
Functions (1974), ch. 6 (each step is checked here by substituting back, not
taken from the book); the acoustic wave equation of a flow, W. G. Unruh, Phys.
Rev. Lett. 46 (1981) 1351; the tortoise coordinate dx*/dx = c/(c^2 - v^2) of a
flow is common practice (e.g. M. Visser, Class. Quantum Grav. 15 (1998) 1767).
"""
import mpmath
import numpy as np
import pytest
import sympy as sp
from scipy.integrate import quad, solve_ivp

import contourkit as ck
from contourkit.errors import ModelError
from contourkit.symbolic.effective import effective_form, long_wavelength, normal_form

w, k, x, v, c = sp.symbols("omega k x v c")
X = sp.Symbol("x")


def flow(vx, cx=1, kp=0, Lam=None):
    """(omega - v k)^2 - c^2 (k^2 + kp^2) [- k^4/Lambda^2] with profiles v(x), c(x)."""
    D = (w - v * k) ** 2 - c ** 2 * (k ** 2 + kp ** 2)
    if Lam is not None:
        D -= k ** 4 / Lam ** 2
    return ck.HorizonModel.from_dispersion(D, omega=w, k=k, x=x, profiles={v: vx, c: cx}, horizon=0.0)


V_TANH = -1 + sp.Rational(1, 2) * sp.tanh(X / 10)
C_TANH = 1 + sp.Rational(4, 5) * sp.tanh(X / 40)
POINTS = (0.5, 3.0, 17.0, 60.0)


def vanishes(exprs, extra=(), *, dps=50, points=POINTS, omegas=(0.01, 0.3), tol=1e-40):
    """Every expression is zero to rounding at `dps` digits (mpmath) at several x and omega.

    sympy's simplify() takes minutes on these profiles; a rational identity in tanh(x/L) that
    holds to 1e-40 at several points at 50 digits is exact to rounding (common practice).
    """
    syms = [X, w] + [s for s, _ in extra]
    f = sp.lambdify(syms, list(exprs), "mpmath")
    with mpmath.workdps(dps):
        for xv in points:
            for om in omegas:
                vals = f(mpmath.mpf(xv), mpmath.mpf(om), *[mpmath.mpf(val) for _, val in extra])
                if max(abs(vv) for vv in vals) > tol:
                    return False
    return True


def test_constant_sound_speed_gives_zero_potential():
    # conformal invariance of 1+1 flows: V = 0 identically (Unruh 1981; common practice)
    for m in (ck.catalogue.nondispersive_flow(kappa=0.05, D=0.5),
              ck.catalogue.quartic_flow(kappa=0.05, Lambda=2.5, D=0.5),
              ck.catalogue.nondispersive_flow(kappa=0.05)):
        form = effective_form(m)
        assert sp.simplify(form.potential) == 0


def test_flow_coefficients_match_the_hand_derivation():
    # NOTES-greybody section 1: S' = -v/Delta, dx*/dx = c/Delta, f = sqrt(c), Delta = c^2 - v^2
    form = effective_form(flow(V_TANH, C_TANH))
    Delta = C_TANH ** 2 - V_TANH ** 2
    u = sp.sqrt(C_TANH)
    star = lambda e: sp.diff(e, X) * Delta / C_TANH
    assert vanishes([form.phase_derivative + V_TANH / Delta, form.tortoise_derivative - C_TANH / Delta,
                     form.rescaling ** 2 - C_TANH, form.potential - star(star(u)) / u])
    assert form.dropped == []


def test_transverse_wavenumber_gives_the_mass_term():
    # V = k_perp^2 (c^2 - v^2) + (sqrt c)_**/sqrt c  (mass-like term m^2 = c^2 k_perp^2)
    q = sp.Symbol("q")
    m = flow(V_TANH, C_TANH)
    form = effective_form(m, k_perp=q)
    plain = effective_form(m)
    assert vanishes([form.potential - plain.potential - q ** 2 * (C_TANH ** 2 - V_TANH ** 2)], [(q, 0.03)])
    # the same as a model whose dispersion relation holds the transverse term itself
    inside = effective_form(flow(V_TANH, C_TANH, kp=sp.Rational(1, 100)))
    numeric = effective_form(m, k_perp=0.01)
    assert vanishes([inside.potential - numeric.potential])
    assert not vanishes([inside.potential - plain.potential])      # the check can fail


def test_back_substitution_is_an_identity_for_flows():
    # phi = exp(i omega S) psi(x*(x)) / f with psi_** = (V - omega^2) psi gives L0 phi = 0 exactly
    q = sp.Symbol("q")
    for m in (flow(V_TANH, C_TANH), ck.catalogue.quartic_flow(kappa=0.05, Lambda=2.5, D=0.5)):
        form = effective_form(m, k_perp=q)
        c0, c1 = form.back_substitution()
        assert vanishes([c0, c1], [(q, 0.03)])
    # a wrong potential is caught (the check can fail)
    form.potential = form.potential + sp.Rational(1, 10 ** 6)
    assert not vanishes(form.back_substitution(), [(q, 0.03)])
    # sympy's own simplification confirms the identity for the constant-c flow with k_perp
    c0, c1 = effective_form(ck.catalogue.nondispersive_flow(kappa=0.05, D=0.5), k_perp=q).back_substitution()
    assert sp.simplify(c0) == 0 and sp.simplify(c1) == 0


def test_back_substitution_dielectric_front_to_rounding():
    # the dielectric front's long-wavelength coefficients are long polynomials: the identity is
    # checked at 40 digits at several points of the exterior; rounding level 1e-30 relative
    m = ck.catalogue.dielectric_front()
    form = effective_form(m)
    c0, c1 = form.back_substitution()
    # coefficients are of order 10..100 (A, C ~ prod w_j^2 n^2): 1e-38 is rounding at 50 digits
    assert vanishes([c0, c1], tol=1e-38)


def test_each_step_removes_what_it_should():
    # step 1 (phase) leaves no omega-linear term; steps 2-3 leave no first derivative in x*
    m = flow(V_TANH, C_TANH, kp=sp.Rational(1, 50))
    form = effective_form(m)
    chi = sp.Function("chi")(X)
    S = sp.Function("S")(X)
    expr = sp.expand(form.operator(sp.exp(sp.I * w * S) * chi) * sp.exp(-sp.I * w * S))
    Sp = form.phase_derivative
    subs = {sp.Derivative(S, (X, 2)): sp.diff(Sp, X), sp.Derivative(S, X): Sp}
    lin = expr.coeff(w, 1).subs(subs)
    d1, d0 = sp.symbols("d1 d0")      # chi' and chi as plain symbols
    lin = lin.subs(sp.Derivative(chi, X), d1).subs(chi, d0)
    assert vanishes([lin.coeff(d1), lin.coeff(d0)])
    # omega^2 coefficient over the chi'' coefficient C is (dx*/dx)^2 (the tortoise coordinate)
    W = expr.coeff(w, 2).subs(subs) / chi
    assert vanishes([W / form.C - form.tortoise_derivative ** 2])


def test_closed_form_tortoise_of_a_linear_flow():
    # v = -1 + kappa x, c = 1: x* = ln(x / (2 - kappa x)) / (2 kappa) up to a constant
    kap = sp.Rational(1, 20)
    form = effective_form(ck.catalogue.nondispersive_flow(kappa=0.05))
    assert form.tortoise is not None
    ref = sp.log(X / (2 - kap * X)) / (2 * kap)
    assert sp.simplify(sp.diff(form.tortoise - ref, X)) == 0


def test_normal_form_solution_maps_back_onto_the_original_equation_numerically():
    # integrate psi in x (dpsi/dx = x*' p, dp/dx = x*' (V - omega^2) psi) and, independently, the
    # original long-wavelength ODE in phi; map psi back, phi = exp(i omega S) psi / f: agreement to 1e-9
    m = flow(V_TANH, C_TANH, kp=sp.Rational(1, 50))
    form = effective_form(m)
    om = 0.07
    lam = lambda e: sp.lambdify(X, e, "numpy")
    xs1, V, Sp, f = (lam(form.tortoise_derivative), lam(form.potential), lam(form.phase_derivative),
                     lam(form.rescaling))
    fp = lam(sp.diff(form.rescaling, X))
    b = -sp.I * form.beta
    C, Cp, bb, bp, a, A = (lam(e) for e in (form.C, sp.diff(form.C, X), b, sp.diff(b, X), form.a, form.A))

    def normal(t, y):
        return [xs1(t) * y[1], xs1(t) * (V(t) - om ** 2) * y[0]]

    def original(t, y):
        return [y[1], -(Cp(t) * y[1] + om * bb(t) * y[1] + (om * bp(t) / 2 + a(t) + A(t) * om ** 2) * y[0]) / C(t)]

    x1, x2 = 2.0, 60.0
    psi0, p0 = 1.0 + 0.3j, 0.2 - 0.5j
    sol = solve_ivp(normal, (x1, x2), [psi0, p0], method="DOP853", rtol=1e-12, atol=1e-14)
    S12 = quad(Sp, x1, x2, epsabs=1e-14, epsrel=1e-13)[0]

    def phi_state(xv, psi, p, S):
        ph = np.exp(1j * om * S)
        dpsi = xs1(xv) * p
        return [ph * psi / f(xv), ph * (1j * om * Sp(xv) * psi / f(xv) + dpsi / f(xv) - fp(xv) * psi / f(xv) ** 2)]

    start = phi_state(x1, psi0, p0, 0.0)
    sol2 = solve_ivp(original, (x1, x2), start, method="DOP853", rtol=1e-12, atol=1e-14)
    mapped = phi_state(x2, sol.y[0, -1], sol.y[1, -1], S12)
    assert abs(sol2.y[0, -1] - mapped[0]) < 1e-9 * abs(mapped[0])
    assert abs(sol2.y[1, -1] - mapped[1]) < 1e-9 * abs(mapped[1])


def test_no_flow_step_has_impedance_c():
    # without flow: dx*/dx = 1/c, f^2 = c (impedance Z = c, tension c^2, density 1)
    cx = 2 + sp.tanh(X)
    form = normal_form(1, 0, cx ** 2, 0, X)
    assert sp.simplify(form.tortoise_derivative - 1 / cx) == 0
    assert sp.simplify(form.rescaling ** 2 - cx) == 0


def test_refusals():
    # a term of degree one (k alone, omega alone) has no wave equation as its limit
    m = ck.catalogue.nondispersive_flow(kappa=0.05, D=0.5)
    m.g = [m.g[0], m.g[1] + sp.Rational(1, 1000), m.g[2]]
    with pytest.raises(ModelError, match="degree one"):
        long_wavelength(m)
    m.g = [m.g[0] + w / 1000, m.g[1] - sp.Rational(1, 1000), m.g[2]]
    with pytest.raises(ModelError, match="degree one"):
        long_wavelength(m)
    with pytest.raises(ck.InputError, match="k_perp"):
        effective_form(ck.catalogue.nondispersive_flow(), k_perp="a lot")
    with pytest.raises(ck.InputError, match="k_perp"):
        effective_form(ck.catalogue.nondispersive_flow(), k_perp=1j)
