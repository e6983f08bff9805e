"""The direct solver on every flow a laboratory makes: white holes, mirror images,
horizonless flows with a blocking point, varying sound speed.

Sources: J. Macher and R. Parentani, Phys. Rev. D 79 (2009) 124008 (white holes
as time reverses of black holes; tanh profiles; from memory); Hawking 1975 and
Unruh 1976 (thermal factor exp(-2 pi omega/kappa)); blocking of counter-current
waves and total reflection in slowly varying currents: common practice; the
anomalous (negative-norm) conversion at a blocking point exponentially small in
the profile's length: fact of the trade, from memory.
"""
import math

import numpy as np
import pytest
import sympy as sp

import contourkit as ck
from contourkit.scattering.oriented import time_reverse_S

w, k, x = sp.symbols("omega k x")


def _match(a, b, kmap, flip=False):
    """Index in b of each mode of a (same side and norm; direction flipped under time reversal)."""
    swap = {"in": "out", "out": "in"}
    out = []
    for m in a:
        d = swap[m.direction] if flip else m.direction
        c = [i for i, n in enumerate(b) if (n.side, n.direction, n.norm) == (m.side, d, m.norm)]
        out.append(min(c, key=lambda i: abs(b[i].k - kmap(m.k))))
    assert sorted(out) == list(range(len(b)))
    return out


@pytest.mark.slow
@pytest.mark.parametrize("branch", ["superluminal", "subluminal"])
def test_white_hole_direct_is_time_reversed_black_hole(branch):
    # S_white = eta_in S_black^T eta_out, two independent full-profile solves (time reversal:
    # common practice; Macher and Parentani 2009, from memory)
    kw = dict(kappa=0.05, Lambda=2.5, branch=branch, D=0.5)
    b = ck.direct.scatter(ck.catalogue.quartic_flow(**kw), 0.05)
    wh = ck.direct.scatter(ck.catalogue.quartic_flow(**kw, hole="white"), 0.05)
    assert wh.convention.hole == "white"
    assert b.unitarity_residual < 1e-10 and wh.unitarity_residual < 1e-10
    T = time_reverse_S(b.S, [m.norm for m in b.in_modes], [m.norm for m in b.out_modes])
    # rows of T: the black hole's in-modes (the white hole's out-modes), columns its out-modes;
    # the white hole is the mirror image of the time reverse (P T keeps k)
    ro = _match(b.in_modes, wh.out_modes, lambda q: q, flip=True)
    ci = _match(b.out_modes, wh.in_modes, lambda q: q, flip=True)
    assert np.max(np.abs(wh.S[np.ix_(ro, ci)] - T)) < 1e-8
    assert abs(wh.thermal_ratio / b.thermal_ratio - 1) < 1e-8


@pytest.mark.slow
@pytest.mark.parametrize("branch", ["superluminal", "subluminal"])
def test_white_hole_contour_agrees_with_direct(branch):
    # regime: kappa/Lambda = 0.01 and a tanh profile of width D/kappa = 10; omega/kappa in [0.2, 2]
    # (at kappa/Lambda = 0.02 the subluminal ratio at omega/kappa = 2 differs by 1.0%: the truncated
    # v^2 - 1 of the near-horizon model, measured)
    # (Macher and Parentani 2009, from memory: near-thermal white-hole ratio in this regime)
    m = ck.catalogue.quartic_flow(kappa=0.05, Lambda=5, branch=branch, D=0.5, hole="white")
    for om in (0.01, 0.05, 0.1):
        rc, rd = m.scatter(om), ck.direct.scatter(m, om)
        assert rc.convention.hole == rd.convention.hole == "white"
        assert abs(rc.thermal_ratio / rd.thermal_ratio - 1) < 1e-2
        assert rc.unitarity_residual < 1e-10 and rd.unitarity_residual < 1e-9


@pytest.mark.slow
def test_mirror_image_direct():
    # parity x -> -x (common practice): v(x) -> -v(-x) = 1 + D tanh(kappa x / D), k -> -k
    b = ck.catalogue.quartic_flow(kappa=0.05, Lambda=2.5, D=0.5)
    D, kap = sp.Rational(1, 2), sp.Rational(1, 20)
    v = 1 + D * sp.tanh(kap * x / D)
    mir = ck.HorizonModel.from_dispersion((w - v * k) ** 2 - k ** 2 - k ** 4 / sp.Rational(25, 4),
                                          omega=w, k=k, x=x, horizon=0.0)
    rb, rm = ck.direct.scatter(b, 0.05), ck.direct.scatter(mir, 0.05)
    ri = _match(rb.in_modes, rm.in_modes, lambda q: -q)
    ro = _match(rb.out_modes, rm.out_modes, lambda q: -q)
    assert np.max(np.abs(rm.S[np.ix_(ro, ri)] - rb.S)) < 1e-10
    # and the contour method on the mirror image agrees with the direct solver there
    rc = mir.scatter(0.05)
    assert abs(rc.thermal_ratio / rm.thermal_ratio - 1) < 1e-2


def _counter_current(L):
    """Subluminal waves against a current |v| from 0.31 (x -> -inf) to 0.40 (x -> +inf), Lambda = 1."""
    v = -sp.Rational(71, 200) - sp.Rational(9, 200) * sp.tanh(x / L)
    return ck.HorizonModel.from_dispersion((w - v * k) ** 2 - k ** 2 + k ** 4, omega=w, k=k, x=x,
                                           horizon="none", window=(-50 * L, 50 * L))


def _omega_max(u):
    # maximum of the counter-propagating branch omega = k (sqrt(1 - k^2) - u) (Lambda = 1)
    ks = np.linspace(0, 1, 400001)
    return float(np.max(ks * np.sqrt(1 - ks ** 2) - u * ks))


@pytest.mark.slow
def test_horizonless_blocking():
    om = 0.27
    # blocking: the counter-propagating mode exists at x -> -inf and not at x -> +inf (common practice)
    assert _omega_max(0.40) < om < _omega_max(0.31)
    out = {}
    for L in (2, 5):
        r = ck.direct.scatter(_counter_current(L), om)
        assert r.convention.hole == "none"
        assert r.unitarity_residual <= 1e-8                     # pseudo-unitarity (conservation)
        j = next(i for i, m in enumerate(r.in_modes) if m.side == "interior" and m.norm > 0)  # blocked mode
        assert 0.3 < r.in_modes[j].k.real < 0.6
        refl = [i for i, m in enumerate(r.out_modes) if m.side == "interior" and m.norm > 0 and m.k.real > 0.6]
        anom = [i for i, m in enumerate(r.out_modes) if m.norm < 0]
        assert len(refl) == 1 and len(anom) == 1
        R, beta = abs(r.S[refl[0], j]), abs(r.S[anom[0], j])
        # norm conservation of the blocked mode's column
        col = sum(m.norm * abs(r.S[i, j]) ** 2 for i, m in enumerate(r.out_modes))
        assert abs(col - 1) < 1e-8
        out[L] = (R, beta)
    # total reflection in the non-mixing limit (common practice)
    assert abs(out[5][0] - 1) < 1e-6 and abs(out[5][0] - 1) < abs(out[2][0] - 1)
    # anomalous |beta|^2 exponentially small in L (from memory): far below any power law
    assert out[5][1] ** 2 < 1e-9
    assert out[5][1] / out[2][1] < (2 / 5) ** 6


def _varying_c(a, b, s, Dv=None, Dc=None):
    Lam = sp.Rational(5, 2)
    v = -1 + a * x if Dv is None else -1 + Dv * sp.tanh(a * x / Dv)
    c = 1 + b * x if Dc is None else 1 + Dc * sp.tanh(b * x / Dc)
    return ck.HorizonModel.from_dispersion((w - v * k) ** 2 - c ** 2 * k ** 2 - s * k ** 4 / Lam ** 2,
                                           omega=w, k=k, x=x, horizon=0.0 if Dv is None else None)


@pytest.mark.parametrize("s", [1, -1])
def test_varying_sound_speed_linear(s):
    a = b = sp.Rational(1, 20)
    m = _varying_c(a, b, s)
    assert m.kappa == pytest.approx(0.1, rel=1e-14)         # kappa = a + b (common practice)
    for om in (0.02, 0.1):
        r = m.scatter(om)
        assert r.unitarity_residual <= 1e-10
        # near-thermal at kappa/Lambda = 0.04 (Unruh 1995; Corley 1998; 1e-3 from memory)
        assert abs(r.thermal_ratio / math.exp(-2 * math.pi * om / 0.1) - 1) < 1e-3


@pytest.mark.slow
@pytest.mark.parametrize("s", [1, -1])
def test_varying_sound_speed_tanh_agrees_with_direct(s):
    a = b = sp.Rational(1, 20)
    D = sp.Rational(9, 10)
    m = _varying_c(a, b, s, Dv=D, Dc=D)
    assert m.horizon == pytest.approx(0.0, abs=1e-12) and m.kappa == pytest.approx(0.1, rel=1e-12)
    for om in (0.02, 0.1, 0.2):                               # omega/kappa = 0.2, 1, 2
        rc, rd = m.scatter(om), ck.direct.scatter(m, om)
        assert rd.unitarity_residual < 1e-9
        assert abs(rc.thermal_ratio / rd.thermal_ratio - 1) < 1e-2


@pytest.mark.parametrize("s", [1, -1])
def test_sound_speed_alone_refused_near_horizon_solved_directly(s):
    """Only c(x) varies: dD/dx ~ c c' k^2 has a double zero at k = 0 (an essential singular point of
    the k-space solution), the two long-wavelength modes run into it, and on the supersonic side the
    linearised c^2 turns negative, so they have no propagating continuation there.  The contour
    method refuses with the way out; the direct solver gives the near-thermal spectrum (Hawking 1975,
    Unruh 1976; 1e-2 at kappa/Lambda = 0.02 from memory) with pseudo-unitarity."""
    b = sp.Rational(1, 20)
    m = _varying_c(0, b, s, Dc=sp.Rational(1, 2))
    assert m.kappa == pytest.approx(0.05, rel=1e-12)           # kappa = dc/dx at the horizon
    om = 0.05 / (2 * math.pi)                                  # omega = T_H
    with pytest.raises(ck.ScatteringError, match="no propagating continuation.*contourkit.direct.scatter"):
        m.scatter(om)
    for f in (0.5, 1.0, 2.0):
        rd = ck.direct.scatter(m, f * om)
        assert rd.unitarity_residual < 1e-9
        assert abs(rd.thermal_ratio / math.exp(-f) - 1) < 1e-2           # exp(-2 pi omega/kappa), omega = f T_H
