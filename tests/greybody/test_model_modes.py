"""Quasinormal modes and bound states of model-derived effective potentials (issue 16, item 1)."""
import math
from types import SimpleNamespace

import mpmath
import numpy as np
import pytest
import sympy as sp

import contourkit as ck
import contourkit.greybody as gb
from contourkit.errors import ContourkitError, InputError
from contourkit.greybody._series import taylor_coefficients
from contourkit.greybody.modelpotential import EffectivePotential

y = sp.Symbol("y", real=True)


def tanh_flow(k_perp):
    return ck.catalogue.nondispersive_flow(kappa=0.05, D=0.5).effective_potential(k_perp=k_perp)


def pt_form(U0, a=1):
    """A model-like normal form with a horizon: dx*/dy = coth y (sinh y = exp(x*), kappa = 1/2)
    and V = U0/cosh^2(a x*) written in y. C = tanh y plays the coefficient that vanishes at the
    horizon. With sinh y = exp(x*): cosh(a x*) = (sinh^a y + sinh^-a y)/2."""
    S = sp.sinh(y) ** a
    V = 4 * U0 / (S + 1 / S) ** 2
    return SimpleNamespace(x=y, potential=V, tortoise_derivative=1 / sp.tanh(y), tortoise=None,
                           horizon=0.0, C=sp.tanh(y))


def pt_qnm(U0, a, n):
    # Poschl-Teller barrier: omega = sqrt(U0 - a^2/4) - i a (n + 1/2) (common practice, from memory)
    return complex(math.sqrt(U0 - a * a / 4), -a * (n + 0.5))


# (a) the reported AttributeError ------------------------------------------------------------
@pytest.mark.parametrize("model", [ck.catalogue.nondispersive_flow(kappa=0.05, D=0.5),
                                   ck.catalogue.quartic_flow(kappa=0.05, Lambda=2.5, D=0.5)])
def test_general_constructor_accepts_model_form(model):
    # used to raise AttributeError: property '_mpc_' of 'Add' object has no setter
    pot = model.effective_potential(k_perp=0.05)
    form = pot.form
    tp = gb.TortoisePotential(form.potential, form.x, form.tortoise_derivative, horizon=form.horizon)
    assert tp.limits[0] == pytest.approx(0.0, abs=1e-20)
    assert tp.limits[1] == pytest.approx(0.0025 * 0.75, rel=1e-12)   # k_perp^2 (c^2 - v^2), v -> -1/2
    assert tp.surface_gravity == pytest.approx(0.05, rel=1e-10)
    # two independent integrators (Frobenius + collocation in x; DOP853 on splines in ln x) agree,
    # and each conserves flux, |R|^2 + Gamma = 1
    a, b = tp.transmission(0.06), pot.transmission(0.06)
    assert a.residual < 1e-10 and b.residual < 1e-8
    assert abs(a.transmission - b.transmission) < 1e-7


def test_taylor_coefficients_at_a_sympy_point():
    # tanh z = z - z^3/3 + 2 z^5/15 - 17 z^7/315 (Maclaurin series, from memory); the discrete
    # Cauchy integral (64 points, radius 0.8, poles at +-i pi/2) aliases at (0.8/(pi/2))^64 ~ 1e-19
    c = taylor_coefficients(sp.tanh(y), y, sp.Integer(0), 8, dps=30, radius=0.8,
                            func=sp.lambdify(y, sp.tanh(y), "mpmath"))
    exact = [0, 1, 0, -mpmath.mpf(1) / 3, 0, mpmath.mpf(2) / 15, 0, -mpmath.mpf(17) / 315]
    assert max(abs(ci - e) for ci, e in zip(c, exact)) < 1e-14


def test_bad_series_input_is_a_contourkit_error():
    # a callable that does not return numbers, and one that is singular on the circle
    with pytest.raises(ContourkitError, match="cannot be evaluated numerically"):
        taylor_coefficients(sp.exp(y) * sp.sin(y), y, sp.Integer(1), 8, dps=20, radius=0.5,
                            func=lambda p: sp.Symbol("q") * p)
    with pytest.raises(ContourkitError, match="not finite"):
        taylor_coefficients(sp.exp(y) * sp.sin(y), y, sp.Integer(0), 8, dps=20, radius=1.0,
                            func=lambda p: mpmath.inf)


# (b), (d) model-potential QNMs against closed forms and against the tortoise route ----------
@pytest.mark.parametrize("U0,a,found", [(2, 1, 3), (3, 2, 2)])
def test_model_potential_qnms_poschl_teller(U0, a, found):
    # found: overtones polished (a = 2: n = 2 at omega = sqrt(2) - 5i is a converged spectral
    # candidate, but its Wronskian polishing does not converge and it is dropped, not guessed)
    pot = EffectivePotential(pt_form(U0, a), far=40.0, kappa=0.5)
    modes = pot.quasinormal_modes(n_max=2)
    assert [m.overtone for m in modes] == list(range(found))
    for m in modes:
        assert abs(m.omega - pt_qnm(U0, a, m.overtone)) < 1e-6
        assert m.residual < 1e-8 and m.error < 1e-8
    # independent route: the same V given in the tortoise coordinate (two ends at infinity,
    # spectrum on s = tanh(x*/lambda) directly)
    x = sp.Symbol("x", real=True)
    ref = gb.potential(sp.Integer(U0) / sp.cosh(a * x) ** 2, x).quasinormal_modes(n_max=2)
    assert len(ref) >= found
    for m, r in zip(modes, ref):
        assert abs(m.omega - r.omega) < 1e-6


def test_model_potential_fundamental_mode_and_error():
    # (c) a barrier with a horizon: the fundamental mode, residual <= 1e-8, and an error
    # estimate that covers the distance to the closed form
    pot = EffectivePotential(pt_form(sp.Rational(1, 2)), far=40.0, kappa=0.5)
    m = pot.quasinormal_modes(n_max=0)[0]
    assert m.residual <= 1e-8
    assert abs(m.omega - pt_qnm(0.5, 1, 0)) <= max(10 * m.error, 1e-12)
    assert abs(m.omega - (0.5 - 0.5j)) < 1e-8


def test_model_potential_bound_states():
    # well -U0/cosh^2 x*: E_n = -(1/4)(sqrt(1 + 4 U0) - (2n + 1))^2
    # (Landau and Lifshitz, QM, section 23 problem 4); U0 = 6: -4, -1
    pot = EffectivePotential(pt_form(-6), far=40.0, kappa=0.5)
    states = pot.bound_states()
    assert states.count == 2 and len(states) == 2
    for n, s in enumerate(states):
        assert abs(s.energy + 0.25 * (5 - (2 * n + 1)) ** 2) < 1e-10
        assert s.node_count == n


# (c) the tanh flow with a transverse wavenumber: what is supported ---------------------------
def test_tanh_flow_with_transverse_wavenumber():
    pot = tanh_flow(0.05)
    xs = np.linspace(1e-3, pot.far, 400)
    V = pot.V_at(xs)
    # V(x*) is a monotone step from 0 (horizon) to k_perp^2 (c^2 - v^2) (far), not a barrier
    assert np.all(np.diff(V) >= -1e-15) and V.min() >= -1e-15
    with pytest.raises(InputError, match="two thresholds"):
        pot.quasinormal_modes()
    # V is nowhere below its lower limit: no bound state (common practice)
    states = pot.bound_states()
    assert len(states) == 0 and states.count == 0


def test_flow_without_potential_has_no_modes():
    pot = tanh_flow(0)
    modes = pot.quasinormal_modes()
    assert len(modes) == 0 and "vanishes identically" in modes.message
    assert len(pot.bound_states()) == 0


# (e) a region with no mode --------------------------------------------------------------------
def test_region_without_mode():
    pot = EffectivePotential(pt_form(2), far=40.0, kappa=0.5)
    modes = pot.quasinormal_modes(region=(3.0, 4.0, -1.0, -0.1))
    assert len(modes) == 0 and "no quasinormal mode" in modes.message
    with pytest.raises(InputError):
        pot.quasinormal_modes(region=(1.0, 0.0, -1.0, 0.0))
