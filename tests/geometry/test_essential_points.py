"""Bases where B has a multiple zero: an essential singular point of f, into which contours can run.

At a zero of B of order p + 1 the solution is f ~ (k - k_j)^nu exp(sum_m c_m (k - k_j)^-m): the
loop around k_j cannot be shrunk, and f vanishes as k -> k_j in the p sectors where
c_p (k - k_j)^-p has a negative real part (``Singularity.valleys``).  A half-line out of each of
them is a solution of its own; with them ``basis()`` gives as many contours as the order.

Sources: x y'' + b y' + y = 0 is solved by x^((1-b)/2) C_(1-b)(2 sqrt x) for x > 0, and by
t^((1-b)/2) I_(1-b)(2 sqrt t), K_(1-b)(2 sqrt t) with t = -x for x < 0 (DLMF 10.13, from memory;
the test checks that these references solve the equation, with mpmath.diff); reference values
mpmath.besselj, bessely, besseli, besselk.  Abel's identity for the Wronskian (DLMF 1.13.5, equation number
from memory): with no y'' term in x y''' + y = 0 the Wronskian of any three solutions is constant.
"""
import math

import mpmath
import numpy as np
import pytest
import sympy as sp

import contourkit as ck

hypothesis = pytest.importorskip("hypothesis")
from hypothesis import HealthCheck, Phase, assume, given, settings, strategies as st  # noqa: E402

X = sp.Symbol("x")
Y = sp.Function("y")


def _rep(b):
    return ck.ModeEquation.from_ode(X * Y(X).diff(X, 2) + b * Y(X).diff(X) + Y(X), Y, X).fourier()


def _span_error(V, ref):
    """Largest relative misfit of ref by a combination of the columns of V (columns scaled)."""
    A = V / np.abs(ref)[:, None]
    cn = np.linalg.norm(A, axis=0)
    coef = np.linalg.lstsq(A / cn, ref / np.abs(ref), rcond=None)[0] / cn
    return float(np.max(np.abs(V @ coef - ref) / np.abs(ref)))


def _references(b, side):
    nu = mpmath.mpf(1 - b)
    if side > 0:
        return [lambda t: t ** (nu / 2) * mpmath.besselj(nu, 2 * mpmath.sqrt(t)),
                lambda t: t ** (nu / 2) * mpmath.bessely(nu, 2 * mpmath.sqrt(t))]
    return [lambda t: (-t) ** (nu / 2) * mpmath.besseli(nu, 2 * mpmath.sqrt(-t)),
            lambda t: (-t) ** (nu / 2) * mpmath.besselk(nu, 2 * mpmath.sqrt(-t))]


@pytest.mark.parametrize("b", [0, sp.Rational(3, 10), sp.Float("1.7"), -1])
@pytest.mark.parametrize("side", [1, -1])
def test_basis_spans_bessel_solutions(b, side):
    rep = _rep(b)
    (s,) = rep.singularities
    assert s.kind == "essential" and len(s.valleys) == 1
    # exp(i/k) vanishes as k -> 0 from below the real axis
    assert abs(s.valleys[0].center + math.pi / 2) < 1e-12 and abs(s.valleys[0].halfwidth - math.pi / 2) < 1e-12
    cs = rep.basis(x=float(side))
    assert len(cs) == 2 and any(t[1] == "half" for c in cs for t in c.terms)
    xs = side * np.linspace(0.5, 12.0, 10)
    V = np.array([[complex(rep.evaluate(c, float(x))) for c in cs] for x in xs])
    for fn in _references(float(b), side):
        # the reference solves the equation (mpmath.diff), then the basis spans it
        for x0 in (mpmath.mpf(xs[0]), mpmath.mpf(xs[-1])):
            assert abs(x0 * mpmath.diff(fn, x0, 2) + float(b) * mpmath.diff(fn, x0) + fn(x0)) < 1e-12 * abs(fn(x0))
        ref = np.array([complex(fn(mpmath.mpf(x))) for x in xs])
        assert _span_error(V, ref) < 1e-9


_Q = st.builds(lambda r, i: sp.Rational(r, 10) + sp.I * sp.Rational(i, 10), st.integers(-20, 20), st.integers(-20, 20))


@st.composite
def equations_with_a_multiple_zero(draw):
    """sum_n (a_n + b_n x) y^(n), order 2..4, with B(k) = sum_n b_n (i k)^n having a zero of
    order 2 or 3 at k0 (exact rationals: a double zero given in floats splits into two close ones)."""
    n = draw(st.integers(2, 4))
    mult = draw(st.integers(2, min(n, 3)))
    kk = sp.Symbol("kk")
    P = (kk - draw(_Q) / 2) ** mult
    for _ in range(draw(st.integers(0, n - mult))):
        P *= kk - draw(_Q)
    cs = sp.Poly(sp.expand(P), kk).all_coeffs()[::-1]
    b = [sp.expand(cs[m] / sp.I ** m) if m < len(cs) else sp.Integer(0) for m in range(n + 1)]
    a = [draw(_Q) for _ in range(n + 1)]
    if abs(complex(a[n])) < 0.3:
        a[n] += 1
    return a, b


@settings(max_examples=12, deadline=None, derandomize=True, database=None,
          phases=[Phase.explicit, Phase.generate], suppress_health_check=[HealthCheck.too_slow])
@given(equations_with_a_multiple_zero())
def test_basis_solves_random_equations_with_essential_points(eqn):
    """As tests/geometry/test_contours.py's property test: |L phi| <= 1e-9 of its largest term for
    every basis contour, column-normalised Wronskian matrix with cond < 1e9 (independent); the same
    exclusions (|Im nu| > 3: loops scaled by exp(2 pi |Im nu|) beyond double precision; zeros of B
    closer than 0.05).  84 random cases of this kind passed by hand before this test."""
    a, b = eqn
    rep = ck.ModeEquation.from_coefficients(a, b).fourier()
    kj = rep._kj
    assume(rep.essential_singularities and all(abs(nu.imag) <= 3 for nu in rep._nu))
    assume(kj.size < 2 or np.min(np.abs(kj[:, None] - kj[None, :])[~np.eye(kj.size, dtype=bool)]) >= 0.05)
    n = len(a) - 1
    basis = rep.basis()
    assert len(basis) == n
    for x in (0.4, 1.3):
        W = np.zeros((n, n), complex)
        for j, c in enumerate(basis):
            d = [complex(rep.evaluate(c, x, derivative=m)) for m in range(n + 1)]
            terms = [complex(a[m] + b[m] * x) * d[m] for m in range(n + 1)]
            size = max(abs(t) for t in terms)
            assert size > 0 and abs(sum(terms)) <= 1e-9 * size, (a, b, x, j)
            W[:, j] = d[:n]
        assert np.linalg.cond(W / np.linalg.norm(W, axis=0)) < 1e9, (a, b, x)


def test_third_order_two_sectors_wronskian_constant():
    # x y''' + y = 0: B = k^3, E = -3 log k + 1/(2 k^2): two local valleys at k = 0
    rep = ck.ModeEquation.from_ode(X * Y(X).diff(X, 3) + Y(X), Y, X).fourier()
    (s,) = rep.singularities
    assert s.kind == "essential" and len(s.valleys) == 2
    cs = rep.basis()
    assert len(cs) == 3
    xs = np.linspace(0.7, 6.0, 6)
    D = [[[complex(rep.evaluate(c, float(x), derivative=n)) for c in cs] for n in range(4)] for x in xs]
    for x, d in zip(xs, D):                       # L phi = 0 for each solution
        for i in range(3):
            assert abs(x * d[3][i] + d[0][i]) < 1e-8 * max(abs(x * d[3][i]), abs(d[0][i]), 1e-300)
    W = np.array([np.linalg.det(np.array(d[:3])) for d in D])
    assert np.all(np.abs(W) > 1e-6 * np.max(np.abs(np.array(D))) ** 3)     # independent
    assert np.max(np.abs(W - W[0])) < 1e-8 * abs(W[0])                      # Abel: W constant


def test_sector_argument_is_checked():
    rep = _rep(0)
    with pytest.raises(ck.ContourError, match="unknown sector 3"):
        rep.evaluate(ck.Contour.half_line(0, sector=3), 1.0)
    for bad in (-1, 0.5, True):
        with pytest.raises(ck.ContourError, match="sector must be a non-negative integer"):
            ck.Contour.half_line(0, sector=bad)


@pytest.mark.slow
def test_thirty_digits():
    # mpmath quadrature along the same thimbles: the solutions fitted at x = 0.5 and 2 predict x = 5
    rep = _rep(0)
    cs = rep.basis()
    xs = [mpmath.mpf("0.5"), mpmath.mpf(2), mpmath.mpf(5)]
    V = [[rep.evaluate(c, float(x), dps=30) for c in cs] for x in xs]
    with mpmath.workdps(30):
        A = mpmath.matrix([V[0], V[1]])
        for fn in _references(0, 1):
            c = mpmath.lu_solve(A, mpmath.matrix([fn(xs[0]), fn(xs[1])]))
            assert abs(V[2][0] * c[0] + V[2][1] * c[1] - fn(xs[2])) < mpmath.mpf("1e-26") * abs(fn(xs[2]))


def test_docstring_examples_run():
    import doctest

    from contourkit.geometry import contours
    fails, tried = doctest.testmod(contours, verbose=False)
    assert fails == 0 and tried >= 5
