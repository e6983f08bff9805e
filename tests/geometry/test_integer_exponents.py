"""Bases where a zero of B has a non-negative integer exponent: the loop around it vanishes, so
the solution it stands for is the half-line from the point itself (drawn as a ray from k_j;
at exponent 0, an ordinary zero of B, closed by the steepest-descent path from k_j).

Sources: Kummer's functions M and U (DLMF 13.4.1 and 13.4.4, their integral representations;
reference values mpmath.hyp1f1 and mpmath.hyperu); spherical Bessel functions (DLMF 10.49.3 and
10.49.4 give j_1 and y_1; reference values scipy.special.spherical_jn and spherical_yn);
Abel's identity for the Wronskian (DLMF 1.13.5, equation number from memory).
"""
import math

import mpmath
import numpy as np
import pytest
import scipy.special as ss
import sympy as sp

import contourkit as ck

X = sp.Symbol("x")
Y = sp.Function("y")


def _kummer(a, b):
    return ck.ModeEquation.from_ode(X * Y(X).diff(X, 2) + (b - X) * Y(X).diff(X) - a * Y(X), Y, X).fourier()


def _span_error(V, ref):
    """Largest relative misfit of ref by a combination of the columns of V (rows and columns scaled)."""
    A = V / np.abs(ref)[:, None]
    cn = np.linalg.norm(A, axis=0)
    coef = np.linalg.lstsq(A / cn, ref / np.abs(ref), rcond=None)[0] / cn
    return float(np.max(np.abs(V @ coef - ref) / np.abs(ref)))


# a - 1 and b - a - 1 are the exponents at k = 0 and k = -i: integers >= 1 (zeros of f), 0
# (ordinary zeros of B), negative (poles) and non-integers, in several combinations
KUMMER_INTEGER = [(2, sp.Rational(33, 10)), (1, sp.Rational(27, 10)), (2, 4), (1, 2), (4, 1),
                  (3, sp.Rational(11, 2)), (2, sp.Rational(-1, 2)), (sp.Float("2.0"), sp.Float("3.3"))]


@pytest.mark.parametrize("a, b", KUMMER_INTEGER)
def test_kummer_integer_a_basis_spans_M_and_U(a, b):
    rep = _kummer(a, b)
    cs = rep.basis()
    assert len(cs) == 2
    xs = np.linspace(0.5, 18.0, 12)
    V = np.array([[complex(rep.evaluate(c, float(x))) for c in cs] for x in xs])
    for fn in (mpmath.hyp1f1, mpmath.hyperu):                 # DLMF 13.4.1, 13.4.4
        ref = np.array([complex(fn(float(a), float(b), float(x))) for x in xs])
        assert _span_error(V, ref) < 1e-9
    # the array path (batch quadrature) gives the same values as one x at a time
    for c, col in zip(cs, V.T):
        va = np.asarray(rep.evaluate(c, xs), dtype=complex)
        assert np.max(np.abs(va - col) / np.abs(col)) < 1e-10


@pytest.mark.parametrize("a, b", [(2, sp.Rational(33, 10)), (1, sp.Rational(27, 10)), (3, sp.Rational(11, 2)),
                                  (1, 2)])
def test_half_line_from_integer_exponent_is_U(a, b):
    """half_line(0) = exp(i pi (b-1)/2) Gamma(a) U(a, b, z) (DLMF 13.4.4, Re a > 0; the constant as in
    tests/evaluation/test_quadrature.py), in double precision and at 30 digits."""
    rep = _kummer(a, b)
    hl = ck.Contour.half_line(0)
    for z in (0.7, 2.5, 11.0):
        with mpmath.workdps(40):
            ref = mpmath.expjpi(mpmath.mpf(b - 1) / 2) * mpmath.gamma(a) * mpmath.hyperu(a, b, z)
        v = complex(rep.evaluate(hl, z))
        assert abs(v - complex(ref)) <= 1e-12 * abs(complex(ref))
        v30 = rep.evaluate(hl, z, dps=30)
        with mpmath.workdps(40):
            assert abs(v30 - ref) <= mpmath.mpf("1e-27") * abs(ref)


def test_spherical_bessel_basis_and_wronskian():
    """z y'' + 4 y' + z y = 0 is solved by j_1(z)/z and y_1(z)/z (z^-nu J_nu with nu = 3/2; DLMF 10.49.3,
    10.49.4); the exponents at k = -+1 are nu - 1/2 = 1, so both basis contours are half-lines.
    Abel's identity: z^4 W is constant (DLMF 1.13.5)."""
    rep = ck.ModeEquation.from_ode(X * Y(X).diff(X, 2) + 4 * Y(X).diff(X) + X * Y(X), Y, X).fourier()
    assert all(s.kind == "zero" for s in rep.singularities)
    cs = rep.basis()
    assert len(cs) == 2
    xs = np.linspace(0.5, 30.0, 15)
    V = np.array([[complex(rep.evaluate(c, float(x))) for c in cs] for x in xs])
    for ref in (ss.spherical_jn(1, xs) / xs, ss.spherical_yn(1, xs) / xs):
        assert _span_error(V, ref.astype(complex)) < 1e-9
    ws = []
    for x in (0.8, 3.0, 12.0):
        p = [[complex(rep.evaluate(c, x, derivative=n)) for c in cs] for n in (0, 1)]
        w = p[0][0] * p[1][1] - p[1][0] * p[0][1]
        scale = abs(p[0][0] * p[1][1]) + abs(p[1][0] * p[0][1])
        ws.append((x ** 4 * w, x ** 4 * scale))
    for w, scale in ws:
        assert abs(w - ws[0][0]) <= 1e-10 * scale
    assert abs(ws[0][0]) > 1e-3 * ws[0][1]                  # independent (common practice)


def test_half_line_from_a_pole_is_refused():
    # exponent -4 at k = -i (Kummer a = 4, b = 1): the half-line integral diverges there
    rep = _kummer(4, 1)
    with pytest.raises(ck.ContourError, match="diverges"):
        rep.evaluate(ck.Contour.half_line(-sp.I), 1.0)
    assert math.isfinite(abs(complex(rep.evaluate(ck.Contour.loop(-sp.I), 1.0))))


@pytest.mark.parametrize("sign, refs", [
    (+1, (lambda z: ss.spherical_jn(0, z), lambda z: ss.spherical_yn(0, z))),
    (-1, (lambda z: ss.spherical_in(0, z), lambda z: ss.spherical_kn(0, z)))])
def test_only_ordinary_zeros(sign, refs):
    """z y'' + 2 y' +- z y = 0: exponent 0 at both zeros of B (k = -+1, or -+i), so f has no singular
    point and no saddle; the basis is two half-lines, each closed by the descent path from its end.
    Solutions j_0, y_0 (DLMF 10.49.3) and i_0, k_0 (DLMF 10.49.8, 10.49.12; equation numbers from
    memory); reference values scipy.special.spherical_jn/yn/in/kn."""
    rep = ck.ModeEquation.from_ode(X * Y(X).diff(X, 2) + 2 * Y(X).diff(X) + sign * X * Y(X), Y, X).fourier()
    assert rep.singularities == [] and len(rep.ordinary_zeros) == 2
    cs = rep.basis()
    xs = np.linspace(0.5, 12.0, 10)
    V = np.array([[complex(rep.evaluate(c, float(x))) for c in cs] for x in xs])
    for f in refs:
        assert _span_error(V, f(xs).astype(complex)) < 1e-9
