"""Ascent paths that wind into branch points with a large imaginary exponent, and loops drawn as rays.

Sources: Kummer's U and the loop around 0 (DLMF 13.4.14 with Gamma(a) Gamma(1-a) = pi/sin(pi a);
reference values mpmath.hyperu, mpmath.gamma); loop = (exp(2 pi i nu) - 1) half-line for
Re nu > -1 (DLMF 5.9.2 is the Gamma-function case; the identity is common practice).
"""
import mpmath
import pytest
import sympy as sp

import contourkit as ck
from contourkit.geometry.decompose import coefficient, decompose

X = sp.Symbol("x")
Y = sp.Function("y")
w, k, x = sp.symbols("omega k x")


def _kummer(a, b):
    return ck.ModeEquation.from_ode(X * Y(X).diff(X, 2) + (b - X) * Y(X).diff(X) - a * Y(X), Y, X).fourier()


@pytest.mark.parametrize("im_a", [15, 40])
def test_loop_with_large_imaginary_exponent(im_a):
    """a = 1/2 + i Im(a): the exponent at 0 is -1/2 + i Im(a); an ascent path winds into 0 and is ended
    after one turn that provably contains the rest (paths._captured_turn).  The loop's value is
    (exp(2 pi i a) - 1) exp(i pi (b-1)/2) Gamma(a) U(a, b, z) (DLMF 13.4.14; the constant as in
    tests/evaluation/test_quadrature.py), in double precision and at 30 digits."""
    a, b = sp.Rational(1, 2) + sp.I * im_a, sp.Rational(3, 2)
    rep = _kummer(a, b)
    ac, bc = complex(a), complex(b)
    wound = 0
    for z in (0.5, 2.0, 7.0):
        with mpmath.workdps(40):
            ref = (mpmath.expjpi(2 * ac) - 1) * mpmath.expjpi((bc - 1) / 2) * mpmath.gamma(ac) * mpmath.hyperu(ac, bc, z)
        v = complex(rep.evaluate(ck.Contour.loop(0), z))
        assert abs(v - complex(ref)) <= 1e-12 * abs(complex(ref))
        v30 = rep.evaluate(ck.Contour.loop(0), z, dps=30)
        with mpmath.workdps(40):
            assert abs(v30 - ref) <= mpmath.mpf("1e-27") * abs(ref)
        g, _ = decompose(rep, ck.Contour.loop(0), z)
        wound += sum(bool(arm.wound) for t in g.thimbles for arm in (t.up_plus, t.up_minus))
    assert wound > 0                                     # the capture was exercised


def _turning_rep(L, om=0.27):
    v = -sp.Rational(71, 200) - sp.Rational(9, 200) * sp.tanh(x / L)
    m = ck.HorizonModel.from_dispersion((w - v * k) ** 2 - k ** 2 + k ** 4, omega=w, k=k, x=x, horizon="none",
                                        window=(-50 * L, 50 * L))
    tp = m.turning_points(om)[0]
    ell = abs(tp.d2D_dk2 / (2 * tp.dD_dx)) ** (1.0 / 3.0)
    return m.mode_equation(om, at=float(tp.x)).fourier(), ell


@pytest.mark.parametrize("L", [10, 80])
def test_rays_give_the_same_coefficients(L):
    """At a slowly varying turning point (Im nu ~ 10 L) the loops drawn as rays with the summed tail of
    crossings (spiral_rays=True) give the same thimble coefficients as the loops drawn as circles,
    at 40 digits (loop = (exp(2 pi i nu) - 1) half-line, common practice)."""
    rep, ell = _turning_rep(L)
    cs = rep.basis()
    series = 0
    for X0 in (ell, -ell, 2 * ell):
        with mpmath.workdps(40):
            nu = [mpmath.mpc(complex(v)) for v in rep._nu]
            e2 = lambda z: mpmath.expjpi(2 * z)  # noqa: E731
            out = []
            for rays in (False, True):
                _, co = decompose(rep, cs, X0, descent=False, exact=True, spiral_rays=rays)
                out.append({(c, i): coefficient(rep, cs[c].terms, cl, nu, e2) for c in range(len(cs))
                            for _, i, cl in co[c]})
                if rays:
                    series += sum(1 for c in co for _, _, cl in c for e in cl if len(e) > 3 and e[3][0] == "series")
            assert set(out[0]) == set(out[1])
            for key in out[0]:
                a, b = out[0][key], out[1][key]
                assert abs(a - b) <= mpmath.mpf("1e-30") * max(abs(a), abs(b))
    assert series > 0                                    # the summed tails were exercised
