"""Numbers from the normal form: transmission through model potentials (greybody.modelpotential).

Sources named beside each check: Landau and Lifshitz, Quantum Mechanics (3rd ed.),
section 25, problems 2 (smooth step) and 4 (Poschl-Teller barrier); the
normal-incidence intensity transmission 4 Z1 Z2/(Z1 + Z2)^2 of acoustics (Kinsler,
Frey, Coppens, Sanders, Fundamentals of Acoustics, 4th ed. (2000), section 6.2);
flux conservation |R|^2 + Gamma = 1 (common practice).
"""
import math

import numpy as np
import pytest
import sympy as sp

import contourkit as ck
from contourkit.greybody.modelpotential import coefficient_potential

w, k, x, v, c = sp.symbols("omega k x v c")
X = sp.Symbol("x")


def flow(vx, cx=1, kp=0):
    D = (w - v * k) ** 2 - c ** 2 * (k ** 2 + kp ** 2)
    return ck.HorizonModel.from_dispersion(D, omega=w, k=k, x=x, profiles={v: vx, c: cx}, horizon=0.0)


V_TANH = -1 + sp.Rational(1, 2) * sp.tanh(X / 10)


def tortoise_potential(U, left, far, scale):
    """psi'' + (omega^2 - U(x)) psi = 0 with x the tortoise coordinate (A = C = 1, a = -U)."""
    return coefficient_potential(1, 0, 1, X, a=-U, left=left, far=far, scale=scale)


@pytest.mark.parametrize("U0, a", [(0.1, 1.0), (1.0, 1.0), (0.2, 2.0)])
def test_poschl_teller_against_landau_lifshitz(U0, a):
    # Landau-Lifshitz section 25 problem 4 (hbar^2/2m = 1): pairs on both sides of 4 U0 = a^2
    pot = tortoise_potential(sp.nsimplify(U0) / sp.cosh(sp.nsimplify(a) * X) ** 2, -40 / a, 40 / a, 1 / a)
    oms = np.array([0.05, 0.3, 1.0, 2.5])
    r = pot.transmission(oms)
    s = 4 * U0 / a ** 2
    for om, G in zip(oms, r.transmission):
        sh = math.sinh(math.pi * om / a) ** 2
        den = math.cos(math.pi / 2 * math.sqrt(1 - s)) ** 2 if s < 1 else math.cosh(math.pi / 2 * math.sqrt(s - 1)) ** 2
        assert abs(G - sh / (sh + den)) < 1e-8
    assert np.all(r.residual < 1e-9) and np.all(r.success)


def test_barrier_transmission_vanishes_at_low_frequency():
    # a barrier (Poschl-Teller) has Gamma ~ omega^2 as omega -> 0 (Landau-Lifshitz sec. 25 problem 4)
    pot = tortoise_potential(1 / sp.cosh(X) ** 2, -40, 40, 1.0)
    G = pot.transmission(np.array([1e-3, 1e-2])).transmission
    assert G[0] < 1e-5 and 90 < G[1] / G[0] < 110


def test_smooth_step_against_landau_lifshitz():
    # Landau-Lifshitz section 25 problem 2: U = U0/(1 + exp(-alpha x)),
    # R = [sinh(pi (k1 - k2)/alpha) / sinh(pi (k1 + k2)/alpha)]^2, Gamma = 1 - R
    U0, al = 0.5, 1.5
    pot = tortoise_potential(sp.Rational(1, 2) / (1 + sp.exp(-sp.Rational(3, 2) * X)), -40, 40, 1 / al)
    for om in (0.72, 0.75, 1.0, 2.0):
        k1, k2 = om, math.sqrt(om ** 2 - U0)
        R = (math.sinh(math.pi * (k1 - k2) / al) / math.sinh(math.pi * (k1 + k2) / al)) ** 2
        r = pot.transmission(om)
        assert abs(r.transmission - (1 - R)) < 1e-8 and abs(r.reflection - R) < 1e-8 and r.residual < 1e-9
    # below the step: total reflection, Gamma = 0 exactly (no propagating wave on the right)
    r = pot.transmission(0.5)
    assert r.transmission == 0.0 and abs(r.reflection - 1) < 1e-9


def test_constant_sound_speed_flow_transmits_everything():
    # V = 0 identically (conformal invariance): Gamma = 1, R = 0
    for m in (ck.catalogue.nondispersive_flow(kappa=0.05, D=0.5), ck.catalogue.quartic_flow(kappa=0.05, D=0.3)):
        r = m.effective_potential().transmission(np.array([0.001, 0.01, 0.05, 0.2]))
        assert np.all(np.abs(r.transmission - 1) < 1e-9) and np.all(r.reflection < 1e-9)


def test_transverse_wavenumber_barrier_closes_at_low_frequency():
    # V = k_perp^2 (1 - v^2): 0 at the horizon, k_perp^2 (1 - v_far^2) far out; below the threshold
    # omega_th = k_perp sqrt(1 - v_far^2) Gamma = 0, and Gamma -> 0 like the far wavenumber q above it
    # (threshold law of a step, Landau-Lifshitz section 25: Gamma ~ 4 q/k as q -> 0)
    kp = 0.01
    pot = ck.catalogue.nondispersive_flow(kappa=0.05, D=0.5).effective_potential(k_perp=kp)
    th = kp * math.sqrt(1 - 0.25)
    assert abs(pot.limits[1] - th ** 2) < 1e-15 and abs(pot.limits[0]) < 1e-20
    below = pot.transmission(np.array([0.2, 0.9]) * th)
    assert np.all(below.transmission == 0.0) and np.all(np.abs(below.reflection - 1) < 1e-9)
    oms = th * (1 + np.array([1e-6, 1e-5, 1e-4, 1e-2, 0.5]))
    r = pot.transmission(oms)
    q = np.sqrt(oms ** 2 - th ** 2)
    assert np.all(np.diff(r.transmission) > 0) and r.transmission[0] < 0.02
    ratio = r.transmission[:3] / q[:3]
    assert abs(ratio[0] / ratio[1] - 1) < 0.01 and abs(ratio[1] / ratio[2] - 1) < 0.03
    assert np.all(r.residual < 1e-9)


def test_sound_speed_step_without_flow_impedance_matching():
    # (c^2 phi')' + omega^2 phi = 0: Z = c (tension c^2, density 1); Gamma(0) = 4 c1 c2/(c1 + c2)^2
    # (Kinsler-Frey, normal incidence intensity transmission)
    c1, c2 = 1, 3
    cx = sp.Integer(c1 + c2) / 2 + sp.Integer(c2 - c1) / 2 * sp.tanh(X / 2)
    pot = coefficient_potential(1, 0, cx ** 2, X, left=-80, far=80, scale=2.0)
    ref = 4 * c1 * c2 / (c1 + c2) ** 2
    G = pot.transmission(np.array([1e-2, 1e-3, 1e-4])).transmission
    errs = np.abs(G - ref)
    assert errs[-1] < 1e-6 and errs[0] > errs[1] > errs[2]


def test_flow_with_varying_sound_speed_low_frequency_limit():
    # V = u''/u with u = sqrt(c): a bounded zero-frequency solution, so Gamma(0) is finite,
    # 4 c_H c_far/(c_H + c_far)^2 with c_H = c(horizon) = 1 and c_far = 1.8 (Z = c)
    m = flow(V_TANH, 1 + sp.Rational(4, 5) * sp.tanh(X / 40))
    pot = m.effective_potential()
    ref = 4 * 1 * 1.8 / 2.8 ** 2
    G = pot.transmission(np.array([1e-3, 1e-4, 1e-5])).transmission
    assert abs(G[-1] - ref) < 1e-5 and abs(G[0] - ref) > abs(G[-1] - ref)


@pytest.mark.slow
def test_dielectric_front_potential_kind():
    # the dielectric front's V is of the form u_**/u (no transverse term): Gamma(omega -> 0) tends to
    # 4 Z1 Z2/(Z1 + Z2)^2 with Z = f^2 = sqrt(discriminant), finite; its integral does not vanish:
    # int V dx* = int (u_*/u)^2 dx* > 0 (integration by parts, u_*/u -> 0 at both ends)
    m = ck.catalogue.dielectric_front()
    pot = m.effective_potential(far=400.0)
    f = pot.form
    Z = sp.lambdify(X, f.rescaling ** 2, "mpmath")
    Z1, Z2 = float(Z(0)), float(Z(400))
    ref = 4 * Z1 * Z2 / (Z1 + Z2) ** 2
    G = pot.transmission(np.array([1e-3, 1e-4, 1e-5])).transmission
    assert abs(G[-1] - ref) < 1e-6 * ref and G[0] > G[-1]
    g = pot._grid
    intV = np.trapezoid(g["V"] * g["h"], g["s"])
    lu = sp.lambdify(X, sp.diff(f.rescaling, X) / f.rescaling / f.tortoise_derivative, "numpy")
    intu = np.trapezoid(lu(pot.x_of_s(g["s"])) ** 2 * g["h"], g["s"])
    assert intV > 0 and abs(intV / intu - 1) < 0.01


def test_bad_frequencies_are_refused():
    pot = ck.catalogue.nondispersive_flow(kappa=0.05, D=0.5).effective_potential()
    for bad in (0.0, -1.0, float("nan"), [0.1, float("inf")], "fast", 1j, []):
        with pytest.raises(ck.InputError):
            pot.transmission(bad)
    with pytest.raises(ck.InputError, match="k_perp"):
        ck.catalogue.nondispersive_flow(kappa=0.05, D=0.5).effective_potential(k_perp=sp.Symbol("q"))
