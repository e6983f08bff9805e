"""Dispersive turning points of full profiles (blocking of counter-current waves).

Sources: the blocking frequency omega = max_k k (sqrt(1 - k^2/Lambda^2) - |v|) of the
counter-propagating branch of (omega - v k)^2 = k^2 (1 - k^2/Lambda^2) (common practice);
the turning point as a double root D = dD/dk = 0 (common practice); the Airy form at a
simple turning point (DLMF 9.7).
"""
import warnings

import numpy as np
import pytest
import sympy as sp

import contourkit as ck
from contourkit.errors import CoalescenceWarning

w, k, x = sp.symbols("omega k x")


def _model(L=5):
    v = -sp.Rational(71, 200) - sp.Rational(9, 200) * sp.tanh(x / L)
    return ck.HorizonModel.from_dispersion((w - v * k) ** 2 - k ** 2 + k ** 4, omega=w, k=k, x=x, horizon="none",
                                           window=(-50 * L, 50 * L)), v


def test_blocking_point_of_a_counter_current():
    m, v = _model()
    om = 0.27
    tps = m.turning_points(om)
    assert len(tps) == 1
    tp = tps[0]
    assert tp.residual < 1e-30 and tp.success
    # independent check: at x_t the maximum of the counter-propagating branch equals omega
    u = -float(v.subs(x, tp.x))
    ks = np.linspace(0.0, 1.0, 2_000_001)
    branch = ks * (np.sqrt(1 - ks ** 2) - u)
    assert abs(branch.max() - om) < 1e-9
    assert abs(ks[np.argmax(branch)] - tp.k) < 1e-5
    # the two merging modes: the blocked in-mode and its reflected partner, both positive norm,
    # real on the weak-current side (x -> -infinity)
    assert tp.real_side == "-x"
    assert sorted(md.direction for md in tp.modes) == ["in", "out"] and all(md.norm == 1 for md in tp.modes)
    # local Airy form: D_x and D_kk of the same sign would leave no real side; they differ here
    assert tp.dD_dx * tp.d2D_dk2 != 0


def test_kspace_equation_at_the_turning_point_has_a_double_saddle():
    m, _ = _model()
    tp = m.turning_points(0.27)[0]
    eq = m.mode_equation(0.27, at=tp.x)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", CoalescenceWarning)
        s = np.sort_complex(eq.fourier().saddles(0.0))
    near = s[np.argsort(np.abs(s - tp.k))[:2]]
    assert np.all(np.abs(near - tp.k) < 1e-6)


def test_black_hole_interior_turning_point():
    # the dispersive partner pair of a superluminal black hole turns at x < 0 (NOTES-scattering.md, sec. 3)
    m = ck.catalogue.quartic_flow(kappa=0.05, Lambda=2.5, D=0.5)
    tps = m.turning_points(0.05)
    assert len(tps) == 1 and tps[0].x < 0 and tps[0].k < 0 and tps[0].real_side == "-x"


def test_turning_points_bad_omega():
    m, _ = _model()
    with pytest.raises(ck.InputError):
        m.turning_points(-1.0)
