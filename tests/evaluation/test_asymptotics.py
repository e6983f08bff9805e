"""Tests of contourkit.evaluation.asymptotics: saddle-point and branch-point (Watson) expansions.

Sources: NIST DLMF 9.5.4, 9.7.1-9.7.2, 9.7.5-9.7.6, Table 9.7.1 (Airy); 10.9.9, 10.17.1,
10.17.5 (Hankel); 6.2.2 (exponential integral).  Reference values: scipy.special, mpmath.
"""
import math

import mpmath
import numpy as np
import pytest
import sympy as sp
from scipy.special import airy, exp1, hankel1

import contourkit as ck
from contourkit.evaluation import asymptotics as A
from contourkit.errors import ContourkitError, InputError

k, t = sp.symbols("k t")
z = sp.Symbol("z", positive=True)
X = sp.Symbol("x")
y = sp.Function("y")


def u_closed(n):
    """DLMF 9.7.1: u_k = (2k+1)(2k+3)...(6k-1) / (216^k k!)."""
    return sp.Mul(*range(2 * n + 1, 6 * n, 2)) / (sp.Integer(216) ** n * sp.factorial(n))


def v_closed(n):
    """DLMF 9.7.2: v_k = (6k+1)/(1-6k) u_k."""
    return sp.Rational(6 * n + 1, 1 - 6 * n) * u_closed(n)


def test_airy_u_v_exact():
    """Airy coefficients u_k, v_k (k <= 5) as exact rationals (DLMF 9.7.1-9.7.2, 9.7.5-9.7.6).

    Ai(z) = (1/2pi) int exp(p(k)) dk with p = i(k^3/3 + k z) (DLMF 9.5.4); for z > 0 the real
    axis deforms through the saddle k0 = i sqrt(z), where p(k0) = -zeta, zeta = (2/3) z^(3/2),
    and P_2 = p''(k0)/2 = -sqrt(z), so r = z^(-1/4) > 0 (path left to right).  With lam = 1 the
    machinery gives Ai(z) ~ (1/2pi) e^(-zeta) sum_s c_s; DLMF 9.7.5 reads
    Ai(z) ~ e^(-zeta) / (2 sqrt(pi) z^(1/4)) sum_s (-1)^s u_s zeta^(-s), hence
    c_0 = sqrt(pi) z^(-1/4) and u_s = (-1)^s zeta^s c_s / c_0.
    For Ai'(z) the amplitude is q = i k (d/dx -> i k); DLMF 9.7.6,
    Ai'(z) ~ -z^(1/4) e^(-zeta) / (2 sqrt(pi)) sum (-1)^s v_s zeta^(-s), gives
    c'_0 = -sqrt(pi) z^(1/4) and v_s = (-1)^s zeta^s c'_s / c'_0.
    """
    p = sp.I * (k ** 3 / 3 + k * z)
    t0 = sp.I * sp.sqrt(z)
    zeta = sp.Rational(2, 3) * z ** sp.Rational(3, 2)
    c = A.saddle_coefficients(p, 1, k, t0, 5)
    d = A.saddle_coefficients(p, sp.I * k, k, t0, 5)
    assert sp.simplify(c[0] - sp.sqrt(sp.pi) * z ** sp.Rational(-1, 4)) == 0
    assert sp.simplify(d[0] + sp.sqrt(sp.pi) * z ** sp.Rational(1, 4)) == 0
    u = [sp.simplify((-1) ** s * zeta ** s * c[s] / c[0]) for s in range(6)]
    v = [sp.simplify((-1) ** s * zeta ** s * d[s] / d[0]) for s in range(6)]
    for s in range(6):
        assert u[s].is_Rational and v[s].is_Rational
        assert u[s] == u_closed(s) and v[s] == v_closed(s)
    # DLMF Table 9.7.1
    assert (u[1], u[2], v[1]) == (sp.Rational(5, 72), sp.Rational(385, 10368), sp.Rational(-7, 72))


def test_airy_scaled_form_same_coefficients():
    """The scaled integral (k = sqrt(z) t, lam = z^(3/2) = 3 zeta / 2) gives u_s = (-2/3)^s c_s/c_0
    (DLMF 9.7.1, 9.7.5)."""
    c = A.saddle_coefficients(sp.I * (t ** 3 / 3 + t), 1, t, sp.I, 5)
    assert [sp.Rational(-2, 3) ** s * c[s] / c[0] for s in range(6)] == [u_closed(s) for s in range(6)]


def test_hankel_a_k_exact_generic():
    """a_k(0) of DLMF 10.17.1 (k <= 5) from the loop of exp(i k x) (k^2-1)^(-1/2) round k = 1.

    With (k^2-1)^(-1/2) = (k-1)^(-1/2) h(k), h = (k+1)^(-1/2), nu = -1/2, x > 0 (legs along
    1 + i s/x, theta = pi/2) the terms are exp(i x) C_n x^(-n-1/2) with
    C_n = w h_n Gamma(n+1/2) i^(n+1/2); DLMF 10.17.5, H0(1) ~ sqrt(2/(pi x)) e^(i(x - pi/4))
    sum i^n a_n(0) x^(-n), so a_n(0) = C_n / (i^n C_0).
    """
    C = A.branch_point_coefficients((k + 1) ** sp.Rational(-1, 2), k, 1, sp.Rational(-1, 2), 5)
    a = [sp.nsimplify(sp.expand(sp.simplify(C[n] / (sp.I ** n * C[0])))) for n in range(6)]
    closed = [sp.Mul(*[-(2 * j - 1) ** 2 for j in range(1, n + 1)]) / (sp.factorial(n) * 8 ** n) for n in range(6)]
    assert a == closed
    assert a[1] == sp.Rational(-1, 8) and a[2] == sp.Rational(9, 128)


def test_hankel_a_k_exact_from_rep(bessel_rep):
    """Same a_k(0) (DLMF 10.17.1) from the Bessel ODE's k-space representation (DLMF 10.9.9:
    H0(1)(x) = (2/(i pi)) int_1^(1+i oo) e^(i k x) (k^2-1)^(-1/2) dk), and the prefactor
    (2/(i pi)) C_0 = sqrt(2/pi) e^(-i pi/4) of DLMF 10.17.5."""
    res = A.branch_point_contribution(bessel_rep, 10.0, 1, 5, kind="half_line")
    C = res.coefficients
    a = [sp.nsimplify(sp.expand(sp.simplify(C[n] / (sp.I ** n * C[0])))) for n in range(6)]
    closed = [sp.Mul(*[-(2 * j - 1) ** 2 for j in range(1, n + 1)]) / (sp.factorial(n) * 8 ** n) for n in range(6)]
    assert a == closed
    lead = 2 / (sp.I * sp.pi) * C[0]
    assert sp.simplify(lead - sp.sqrt(2 / sp.pi) * sp.exp(-sp.I * sp.pi / 4)) == 0


def _bracket(approx, true, est):
    err = abs(approx - true)
    assert err <= est, (err, est)
    assert est <= 100 * err, (err, est)       # honest: not wildly pessimistic


@pytest.mark.parametrize("x", [5.0, 10.0, 20.0])
@pytest.mark.parametrize("order", [1, 3, 5])
def test_airy_numeric_bracket(airy_rep, x, order):
    """Truncated series +- error estimate brackets Ai(x) (scipy.special.airy; DLMF 9.5.4, 9.7.5)."""
    res = A.saddle_contribution(airy_rep, x, 1j * math.sqrt(x), order)
    assert res.success and len(res.terms) == order + 1 and res.order == order
    _bracket(res.value.real / (2 * math.pi), airy(x)[0], res.error_estimate / (2 * math.pi))
    gen = A.saddle_series(sp.I * (k ** 3 / 3 + sp.Rational(repr(x)) * k), 1, k, 1j * math.sqrt(x), order)
    assert abs(gen.value - res.value) <= 1e-14 * abs(res.value)


@pytest.mark.parametrize("x", [5.0, 20.0])
def test_airy_derivative_bracket(airy_rep, x):
    """Ai'(x) from the amplitude i k (scipy.special.airy; DLMF 9.7.6)."""
    res = A.saddle_contribution(airy_rep, x, 1j * math.sqrt(x), 3, derivative=1)
    _bracket(res.value.real / (2 * math.pi), airy(x)[1], res.error_estimate / (2 * math.pi))


def test_airy_high_precision(airy_rep):
    """At dps = 40 and order 12 the series at x = 20 agrees with mpmath.airyai within its estimate."""
    res = A.saddle_contribution(airy_rep, 20.0, 1j * math.sqrt(20.0), 12, dps=40)
    with mpmath.workdps(40):
        err = abs(res.value / (2 * mpmath.pi) - mpmath.airyai(20))
        est = res.error_estimate / (2 * mpmath.pi)
    assert isinstance(res.value, mpmath.mpc)
    assert err <= est <= 100 * err


@pytest.mark.parametrize("x", [10.0, 50.0])
@pytest.mark.parametrize("order", [1, 3, 5])
def test_hankel_numeric_bracket(bessel_rep, x, order):
    """H0(1)(x) = (2/(i pi)) x half line at k = 1 (DLMF 10.9.9, 10.17.5; scipy.special.hankel1)."""
    res = A.branch_point_contribution(bessel_rep, x, 1, order, kind="half_line")
    f = 2 / (1j * math.pi)
    _bracket(f * res.value, hankel1(0, x), abs(f) * res.error_estimate)
    gen = A.branch_point_series((k + 1) ** sp.Rational(-1, 2), k, 1, sp.Rational(-1, 2), x, order, kind="half_line")
    assert abs(gen.value - res.value) <= 1e-14 * abs(res.value)


def test_loop_matches_contour_quadrature(bessel_rep):
    """The Watson series of the loop round k = 1 brackets rep.evaluate(Contour.loop(1), x) at x = 30
    (the exact contour value; no external source needed), and loop = (e^(2 pi i nu) - 1) half line."""
    x = 30.0
    exact = bessel_rep.evaluate(ck.Contour.loop(1), x)
    res = A.branch_point_contribution(bessel_rep, x, 1, 4)
    assert abs(res.value - exact) <= res.error_estimate
    half = A.branch_point_contribution(bessel_rep, x, 1, 4, kind="half_line")
    assert abs(res.value - (-2) * half.value) <= 1e-14 * abs(res.value)


def test_watson_exponential_integral():
    """int_0^oo e^(-x t)/(1+t) dt = e^x E1(x) (DLMF 6.2.2, equation number from memory;
    scipy.special.exp1); Watson coefficients (-1)^n n!."""
    assert A.watson_coefficients(1 / (1 + t), t, 0, 5) == [(-1) ** n * math.factorial(n) for n in range(6)]
    res = A.watson_series(1 / (1 + t), t, 0, 10.0, 4)
    _bracket(res.value.real, math.exp(10.0) * exp1(10.0), res.error_estimate)


def test_direction_flips_sign():
    """Crossing the saddle the other way negates every coefficient (orientation, no source needed)."""
    p = sp.I * (t ** 3 / 3 + t)
    c = A.saddle_coefficients(p, 1, t, sp.I, 2)
    d = A.saddle_coefficients(p, 1, t, sp.I, 2, direction=-1)
    assert [sp.simplify(a + b) for a, b in zip(c, d)] == [0, 0, 0]


def test_past_smallest_term_reports_failure(airy_rep):
    """At x = 1 (zeta = 2/3) the Airy series diverges at once: success is False with a message."""
    res = A.saddle_contribution(airy_rep, 1.0, 1j, 8)
    assert not res.success and "smallest term" in res.message


@pytest.mark.parametrize("order", [-1, 1.5, True, "3", None])
def test_bad_order(order):
    with pytest.raises(InputError, match="order"):
        A.saddle_coefficients(sp.I * (t ** 3 / 3 + t), 1, t, sp.I, order)
    with pytest.raises(InputError, match="order"):
        A.watson_coefficients(1 / (1 + t), t, 0, order)


def test_not_a_saddle(airy_rep):
    with pytest.raises(InputError, match="not a saddle point"):
        A.saddle_coefficients(sp.I * (t ** 3 / 3 + t), 1, t, 2 * sp.I, 2)
    with pytest.raises(InputError, match="not a saddle point"):
        A.saddle_series(sp.I * (t ** 3 / 3 + t), 1, t, 0.5j, 2)
    with pytest.raises(InputError, match="not a saddle point"):
        A.saddle_contribution(airy_rep, 10.0, 1.0 + 0.0j, 2)
    with pytest.raises(InputError, match="out of range"):
        A.saddle_contribution(airy_rep, 10.0, 7, 2)
    with pytest.raises(InputError, match="degenerate saddle"):
        A.saddle_coefficients(t ** 3, 1, t, 0, 2)


def test_not_a_branch_point(bessel_rep, airy_rep):
    with pytest.raises(InputError, match="not a singular point"):
        A.branch_point_contribution(bessel_rep, 10.0, 0.5, 2)
    with pytest.raises(InputError, match="not a singular point"):
        A.branch_point_contribution(airy_rep, 10.0, 0, 2)
    with pytest.raises(InputError, match="integer"):
        A.branch_point_coefficients(1 / (k + 1), k, 1, 1, 2)
    with pytest.raises(InputError, match="diverges"):
        A.branch_point_series(1, k, 1, sp.Rational(-3, 2), 10.0, 2, kind="half_line")
    with pytest.raises(InputError, match="kind"):
        A.branch_point_contribution(bessel_rep, 10.0, 1, 2, kind="circle")
    with pytest.raises(InputError, match="x = 0"):
        A.branch_point_contribution(bessel_rep, 0.0, 1, 2)
    with pytest.raises(InputError, match="not analytic"):
        A.branch_point_coefficients(1 / (k - 1), k, 1, sp.Rational(1, 2), 2)


def test_other_bad_input():
    with pytest.raises(InputError, match="lam"):
        A.saddle_series(sp.I * (t ** 3 / 3 + t), 1, t, sp.I, 2, lam=-1)
    with pytest.raises(InputError, match="dps"):
        A.saddle_series(sp.I * (t ** 3 / 3 + t), 1, t, sp.I, 2, dps=0)
    with pytest.raises(InputError, match="perpendicular"):
        A.saddle_coefficients(sp.I * (t ** 3 / 3 + t), 1, t, sp.I, 2, direction=1j)
    with pytest.raises(InputError, match="x > 0"):
        A.watson_series(1 / (1 + t), t, 0, -3.0, 2)
    assert issubclass(InputError, ContourkitError)
