"""Transmission through 1D potentials in the tortoise coordinate.

Checks against closed forms: Landau and Lifshitz, Quantum Mechanics (3rd ed.),
section 25, problem 4 (Poschl-Teller barrier U0/cosh^2(a x)) and problem 2
(smooth step U0/(1 + exp(-alpha x))); conservation |R|^2 + Gamma = 1 wherever
both ends are open.
"""
import math

import mpmath
import numpy as np
import pytest
import sympy as sp

import contourkit.greybody as gb
from contourkit.errors import InputError

x = sp.Symbol("x", real=True)


def pt_barrier_exact(U0, a, k, dps=40):
    """Landau and Lifshitz, QM section 25 problem 4 (k = omega)."""
    with mpmath.workdps(dps):
        U0, a, k = mpmath.mpf(U0), mpmath.mpf(a), mpmath.mpf(k)
        s = mpmath.sinh(mpmath.pi * k / a) ** 2
        d = 1 - 4 * U0 / a ** 2
        c = mpmath.cos(mpmath.pi / 2 * mpmath.sqrt(d)) ** 2 if d > 0 else \
            mpmath.cosh(mpmath.pi / 2 * mpmath.sqrt(-d)) ** 2
        return s / (s + c)


# three (U0, a) pairs: 4 U0 < a^2, 4 U0 > a^2 (twice)
@pytest.mark.parametrize("U0,a", [(0.1, 1.0), (1.0, 1.0), (3.0, 0.7)])
def test_poschl_teller_barrier_formula(U0, a):
    pot = gb.potential(U0 / sp.cosh(a * x) ** 2, x)
    omegas = np.array([0.05, 0.3, 0.8, 1.5, 3.0]) * a
    res = pot.transmission(omegas)
    for w, g, r in zip(omegas, res.transmission, res.reflection):
        ex = float(pt_barrier_exact(U0, a, w))
        assert abs(g - ex) <= 1e-10 * max(ex, 1e-300) + 1e-14      # L&L 25.4
        assert abs(r - (1 - ex)) <= 1e-10
    assert np.all(res.residual < 1e-12)                               # |R|^2 + Gamma = 1
    assert np.all(res.success)
    assert np.all(res.error <= 1e-10 * res.transmission + 1e-15)


def test_barrier_top_and_symmetry():
    U0, a = 2.0, 1.0
    pot = gb.potential(U0 / sp.cosh(a * x) ** 2, x)
    w = math.sqrt(U0)                     # omega^2 at the top of the barrier
    res = pot.transmission(w)
    assert abs(res.transmission - float(pt_barrier_exact(U0, a, w))) < 1e-10
    # Gamma depends on omega^2 only (real potential): omega -> -omega
    assert abs(pot.transmission(-w).transmission - res.transmission) < 1e-13


def test_exponentially_small_double_precision():
    # Gamma ~ 1e-31: no cancellation, so double precision keeps its relative accuracy
    pot = gb.potential(150 / sp.cosh(x) ** 2, x)
    res = pot.transmission(1.0)
    ex = pt_barrier_exact(150, 1, 1.0)
    assert 1e-32 < res.transmission < 1e-30
    assert abs(res.transmission / float(ex) - 1) < 1e-10                # L&L 25.4
    assert abs(res.log_transmission - float(mpmath.log(ex))) < 1e-9
    assert res.residual < 1e-12


@pytest.mark.slow
def test_exponentially_small_mpmath():
    pot = gb.potential(150 / sp.cosh(x) ** 2, x)
    res = pot.transmission(1.0, dps=30)
    ex = pt_barrier_exact(150, 1, 1.0)
    assert res.dps == 30
    assert isinstance(res.transmission, mpmath.mpf)
    with mpmath.workdps(30):
        assert abs(res.transmission / ex - 1) < 1e-12                   # L&L 25.4, relative
        assert abs(res.reflection + res.transmission - 1) < 1e-25
    assert res.relative_error < 1e-12 and res.success


def test_smooth_step_and_evanescent_end():
    # 1 + tanh x = U0/(1 + exp(-alpha x)), U0 = 2, alpha = 2 (L&L section 25 problem 2):
    # R = [sinh(pi (k1 - k2)/alpha) / sinh(pi (k1 + k2)/alpha)]^2
    pot = gb.potential(1 + sp.tanh(x), x)
    assert pot.limits == (0.0, 2.0)
    for w in (1.5, 2.0, 3.0):
        k1, k2 = w, math.sqrt(w * w - 2)
        R = (math.sinh(math.pi * (k1 - k2) / 2) / math.sinh(math.pi * (k1 + k2) / 2)) ** 2
        res = pot.transmission(w)
        assert abs(res.reflection - R) < 1e-11
        assert res.residual < 1e-12
        assert abs(res.k_right - k2) < 1e-14
    # below the threshold of the right end: evanescent, Gamma = 0 exactly, |R| = 1
    res = pot.transmission(1.2)
    assert res.transmission == 0.0 and res.success
    assert abs(res.reflection - 1) < 1e-12
    assert "evanescent" in res.message
    assert res.k_right.imag > 0
    # exactly at the threshold: the limit Gamma = 0
    assert pot.transmission(math.sqrt(2.0) * (1 + 1e-17)).transmission < 1e-6


def test_low_and_zero_frequency():
    pot = gb.potential(1 / sp.cosh(x) ** 2, x)
    res = pot.transmission([0.0, 1e-8, 1e-4, 1e-2])
    g = res.transmission
    assert np.all(np.isfinite(g)) and g[0] == 0.0
    for w, gi in zip([1e-8, 1e-4, 1e-2], g[1:]):
        assert abs(gi / float(pt_barrier_exact(1, 1, w)) - 1) < 1e-9     # L&L 25.4
    assert "omega = 0" in res.message[0]


def test_zero_energy_resonance_impedance():
    # V = u''/u with u = sqrt(c), c from 1 to 2: psi = u solves omega = 0 and is bounded, so
    # Gamma(0) = 4 c1 c2/(c1 + c2)^2 (normal-incidence transmission of a string with tension
    # c^2 and unit density, impedance Z = c; Kinsler and Frey, Fundamentals of Acoustics).
    c = sp.Rational(3, 2) + sp.tanh(x) / 2
    u = sp.sqrt(c)
    pot = gb.potential(sp.simplify(sp.diff(u, x, 2) / u), x)
    res = pot.transmission([0.0, 1e-4])
    assert abs(res.transmission[0] - 8 / 9) < 1e-9
    assert abs(res.transmission[1] - 8 / 9) < 1e-5
    assert "resonance" in res.message[0]


def test_one_call_form_and_arrays():
    g = gb.transmission(sp.Symbol("U") / sp.cosh(x) ** 2, x, [0.5, 1.0], parameters={"U": 1})
    assert g.transmission.shape == (2,)
    assert abs(g.transmission[1] - float(pt_barrier_exact(1, 1, 1.0))) < 1e-10
    assert len(repr(g).splitlines()) <= 3


@pytest.mark.parametrize("bad", [float("nan"), float("inf"), 1 + 1j, [1.0, float("nan")], "1.0", True])
def test_bad_omega(bad):
    pot = gb.potential(1 / sp.cosh(x) ** 2, x)
    with pytest.raises(InputError):
        pot.transmission(bad)


def test_bad_options():
    pot = gb.potential(1 / sp.cosh(x) ** 2, x)
    with pytest.raises(InputError):
        pot.transmission(1.0, rtol=0)
    with pytest.raises(InputError):
        pot.transmission(1.0, dps=5)
