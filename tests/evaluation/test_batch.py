"""Array evaluation with reused steepest-descent geometry (batch.py).

References: DLMF 9.5.4 (Ai as the real-line integral), DLMF 10.9 (Hankel
loops; the constant -i pi H0(1) is derived in test_quadrature.py), values from
scipy.special.airy / hankel1.  The array path must give the same integrals
as the one-point path to the same accuracy (common practice for a fast path).
"""
import numpy as np
import pytest
import sympy as sp
from scipy.special import airy, hankel1

import contourkit as ck

X = sp.Symbol("x")
Y = sp.Function("y")


def test_airy_array_matches_scipy_and_single_points(airy_rep):
    xs = np.linspace(-30, 10, 301)
    v = airy_rep.evaluate(ck.Contour.real_axis(), xs)
    assert v.success and v.error.shape == xs.shape and np.all(v.error >= 0)
    ai, aip, bi, bip = airy(xs)
    scale = np.where(xs < 0, np.maximum(np.abs(ai), np.hypot(ai, bi)), np.abs(ai))
    assert np.max(np.abs(v / (2 * np.pi) - ai) / scale) < 1e-12
    for i in (0, 77, 150, 300):
        single = complex(airy_rep.evaluate(ck.Contour.real_axis(), float(xs[i])))
        assert abs(v[i] - single) <= 1e-12 * max(abs(single), 2 * np.pi * scale[i])
    d = airy_rep.evaluate(ck.Contour.real_axis(), xs, derivative=1) / (2 * np.pi)
    dscale = np.where(xs < 0, np.maximum(np.abs(aip), np.hypot(aip, bip)), np.abs(aip))
    assert np.max(np.abs(d - aip) / dscale) < 1e-12


def test_unsorted_array_keeps_order(airy_rep):
    xs = np.array([3.0, -7.5, 0.25, -1.0, 8.0])
    v = airy_rep.evaluate(ck.Contour.real_axis(), xs) / (2 * np.pi)
    assert np.max(np.abs(v - airy(xs)[0]) / np.maximum(np.abs(airy(xs)[0]), 1e-3)) < 1e-12


def test_bessel_loop_array():
    rep = ck.ModeEquation.from_ode(X * Y(X).diff(X, 2) + Y(X).diff(X) + X * Y(X), Y, X).fourier()
    xs = np.linspace(0.5, 200, 400)
    v = rep.evaluate(ck.Contour.loop(1), xs)
    ref = -1j * np.pi * hankel1(0, xs)
    assert np.max(np.abs(v - ref) / np.abs(ref)) < 1e-12


def test_array_bad_input(airy_rep):
    with pytest.raises(ck.InputError, match="finite"):
        airy_rep.evaluate(ck.Contour.real_axis(), np.array([0.0, np.nan]))
