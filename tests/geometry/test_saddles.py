"""Engine: saddle points at x (local dispersion relation), order, classification, coalescence."""
import math
import warnings

import numpy as np
import pytest
import sympy as sp

import contourkit as ck
from contourkit.geometry.saddles import classify

X = sp.Symbol("x")
Y = sp.Function("y")


@pytest.mark.parametrize("x", [-9.0, -4.0, -0.3, 0.7, 2.5, 100.0])
def test_airy_saddles_are_local_wavenumbers(airy, x):
    """Weyl symbol of y'' - x y: (ik)^2 - x = -(k^2 + x); roots k = +-sqrt(-x)
    (the WKB wavenumbers of Ai, DLMF 9.7.9), sorted by real part then imaginary part."""
    s = airy.saddles(x)
    r = math.sqrt(abs(x))
    want = np.array([-r, r], complex) if x < 0 else np.array([-1j * r, 1j * r])
    assert s.shape == (2,)
    np.testing.assert_allclose(s, want, rtol=0, atol=1e-14 * max(1, r))
    # deterministic: same order every call, sorted by (Re, Im)
    assert np.array_equal(s, airy.saddles(x))
    keys = [(round(z.real, 12), round(z.imag, 12)) for z in s]
    assert keys == sorted(keys)
    # they are roots of the dispersion relation
    assert np.all(np.abs(s ** 2 + x) < 1e-13 * max(1.0, abs(x)))


def test_saddles_high_precision(airy):
    s = airy.saddles(-2.0, dps=40)
    assert abs(s[1] - math.sqrt(2)) < 1e-15


def test_bessel_saddles_independent_of_x(bessel):
    """x y'' + y' + x y: Weyl symbol sigma0 + x sigma1 = 0 + x (1 - k^2): saddles +-1 for
    every x, on top of the branch points (DLMF 10.9: the Hankel loops start at +-1)."""
    with pytest.warns(ck.CoalescenceWarning, match="singular point"):
        s = bessel.saddles(5.0)
    np.testing.assert_allclose(s, [-1, 1], atol=1e-14)


def test_coalescence_warning_near_airy_turning_point(airy):
    """At x = 1e-9 the saddles +-i 3.16e-5 nearly meet (the turning point of Ai)."""
    with pytest.warns(ck.CoalescenceWarning, match="nearly coincide"):
        s = airy.saddles(1e-9)
    np.testing.assert_allclose(np.abs(s), math.sqrt(1e-9), rtol=1e-12)


def test_no_warning_away_from_coalescence(airy):
    with warnings.catch_warnings():
        warnings.simplefilter("error", ck.CoalescenceWarning)
        airy.saddles(-4.0)
        airy.saddles(3.0)


def test_classify(airy):
    """x < 0: two real wavenumbers +-sqrt(-x) (oscillatory Ai); x > 0: two imaginary ones
    (growing/decaying). The separation is 2 sqrt(|x|)."""
    for x, kind in ((-4.0, "real"), (-0.01, "real"), (4.0, "complex"), (0.5, "complex")):
        info = classify(airy, x)
        assert [i.kind for i in info] == [kind, kind]
        assert all(i.nearest == pytest.approx(2 * math.sqrt(abs(x)), rel=1e-12) for i in info)


def test_classify_flow_mixed():
    """Superluminal quartic flow, omega = 0.3, kappa = 0.05, Lambda = 2.5, at x = 20:
    sigma0 + x sigma1 = omega^2 + 2 omega k - k^4/Lambda^2 - 2 kappa x k (k + omega)
                      = 0.09 - 2 k^2 - 0.16 k^4     (kappa x = 1 cancels the linear term),
    so k^2 = (-2 +- sqrt(4.0576))/0.32: two real roots +-0.2117 and two imaginary ones."""
    m = ck.catalogue.quartic_flow(kappa=0.05, Lambda=2.5, branch="superluminal")
    rep = m.mode_equation(0.3).fourier()
    info = classify(rep, 20.0)
    assert sorted(i.kind for i in info) == ["complex", "complex", "real", "real"]
    k2 = (-2 + math.sqrt(4.0576)) / 0.32
    got = sorted(i.k.real for i in info if i.kind == "real")
    np.testing.assert_allclose(got, [-math.sqrt(k2), math.sqrt(k2)], rtol=1e-12)
    imag = sorted(i.k.imag for i in info if i.kind == "complex")
    k2m = (-2 - math.sqrt(4.0576)) / 0.32
    np.testing.assert_allclose(imag, [-math.sqrt(-k2m), math.sqrt(-k2m)], rtol=1e-12)


@pytest.mark.parametrize("bad", [float("nan"), float("inf"), -float("inf"), 1 + 2j, "1.0x", None, True])
def test_saddles_refuse_bad_x(airy, bad):
    with pytest.raises(ck.InputError, match="x must be"):
        airy.saddles(bad)
