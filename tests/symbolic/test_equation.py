"""Foundation: ModeEquation construction, horizons and kappa, self-adjoint linearisation,
and the refusals of ModeEquation.from_ode (the model-file parser is tested elsewhere)."""
import math
import warnings

import pytest
import sympy as sp

import contourkit as ck

X = sp.Symbol("x")
Y = sp.Function("y")
K = sp.Symbol("k")
W = sp.Symbol("omega")
V = sp.Symbol("v")
I = sp.I


def test_airy_coefficients_and_symbols():
    """y'' - x y = 0: a = (0, 0, 1), b = (-1, 0, 0); left symbol A + x B with A = (ik)^2,
    B = -1 (the Airy equation, DLMF 9.2.1)."""
    eq = ck.ModeEquation.from_ode(Y(X).diff(X, 2) - X * Y(X), Y, X)
    assert eq.order == 2
    assert eq.a == (0, 0, 1) and eq.b == (-1, 0, 0)
    assert sp.expand(eq.A + K ** 2) == 0 and eq.B == -1
    assert sp.expand(eq.ode(Y, X) - (Y(X).diff(X, 2) - X * Y(X))) == 0


def test_equation_form_and_parameters():
    """An Eq and a parameter dict are accepted; x y'' + y' + x y (Bessel, DLMF 10.2.1 with
    nu = 0 divided by x) gives B = 1 - k^2."""
    c = sp.Symbol("c")
    eq = ck.ModeEquation.from_ode(sp.Eq(X * Y(X).diff(X, 2) + Y(X).diff(X), -c * X * Y(X)), Y, X,
                                  parameters={c: 1})
    assert sp.expand(eq.B - (1 - K ** 2)) == 0
    assert sp.expand(eq.A - I * K) == 0


# ---------------------------------------------------------------------------- horizons
def _flow_model(profile):
    return ck.HorizonModel.from_dispersion((W - V * K) ** 2 - K ** 2, omega=W, k=K, x=X,
                                           profiles={V: profile})


def test_tanh_horizon_and_kappa():
    """v = -1 + 0.1 tanh(2 (x - 3)).  The low-frequency coefficient of k^2 at omega = 0 is
    v^2 - 1, zero where v = -1, i.e. tanh(2(x - 3)) = 0: x_H = 3 (v = +1 is out of reach).
    kappa = dv/dx at x_H = 0.1 * 2 * sech^2(0) = 0.2."""
    m = _flow_model(-1 + sp.Rational(1, 10) * sp.tanh(2 * (X - 3)))
    assert m.horizon == pytest.approx(3.0, abs=1e-12)
    assert m.kappa == pytest.approx(0.2, abs=1e-12)


def test_off_centre_tanh_horizon_and_kappa():
    """v = -1 + 0.3 tanh((x + 2)/2) + 0.1.  v = -1 <=> tanh((x + 2)/2) = -1/3, so
    x_H = -2 - 2 atanh(1/3) (v = +1 would need tanh = 19/3: no second root).
    kappa = v'(x_H) = 0.3 * 0.5 * (1 - tanh^2) = 0.15 * (1 - 1/9) = 2/15."""
    m = _flow_model(-1 + sp.Rational(3, 10) * sp.tanh((X + 2) / 2) + sp.Rational(1, 10))
    assert m.horizon == pytest.approx(-2 - 2 * math.atanh(1 / 3), abs=1e-12)
    assert m.kappa == pytest.approx(2 / 15, abs=1e-12)


def test_kappa_of_catalogue_tanh_flow():
    """quartic_flow with D: v = -1 + D tanh(kappa x / D); v(0) = -1, v'(0) = kappa."""
    m = ck.catalogue.quartic_flow(kappa=0.07, Lambda=3.0, branch="subluminal", D=0.4)
    assert m.horizon == 0.0
    assert m.kappa == pytest.approx(0.07, abs=1e-12)


# ---------------------------------------------------------------------------- self-adjointness
def _is_real_poly(expr):
    return all(sp.im(c) == 0 for c in sp.Poly(sp.expand(expr), K).all_coeffs())


@pytest.mark.parametrize("model", [
    ck.catalogue.nondispersive_flow(kappa=0.05),
    ck.catalogue.quartic_flow(kappa=0.05, Lambda=2.5, branch="superluminal"),
    ck.catalogue.quartic_flow(kappa=0.1, Lambda=1.5, branch="subluminal", D=0.5),
    ck.catalogue.quartic_flow(kappa=0.2, Lambda=4.0, branch="superluminal", D=0.3),
], ids=["nondispersive", "quartic-super", "quartic-sub-tanh", "quartic-super-tanh"])
def test_linearisation_keeps_weyl_symbol_real(model):
    """A formally self-adjoint operator has a real Weyl symbol (common practice: the Weyl
    symbol of L^dagger is the complex conjugate of that of L).  For a real dispersion
    relation the linearised near-horizon equation must keep sigma0 + x sigma1 real."""
    for omega in (0.3, 0.011):
        s0, s1 = model.mode_equation(omega).weyl_symbol
        assert _is_real_poly(s0) and _is_real_poly(s1)
        assert not sp.Poly(s1, K).is_zero


def test_truncating_the_expanded_ode_breaks_self_adjointness():
    """Negative control for the test above (so that it can fail): v = -1 + 0.2 x + 0.3 x^2.
    The operator contains i omega (2 v y' + v' y) = S_1[2 i omega v] (S_1[g] = g d + g'/2).
    Linearising g_1 = 2 i omega v keeps the y-coefficient i omega v'(0) = 0.2 i omega; truncating
    the expanded coefficient i omega v' = i omega (0.2 + 0.6 x) keeps an extra 0.6 i omega x y,
    a non-real part of sigma1: the Weyl symbol is no longer real."""
    omega = sp.Rational(3, 10)
    v = -1 + sp.Rational(1, 5) * X + sp.Rational(3, 10) * X ** 2
    # full operator (the symmetric form of (omega - v k)^2 - k^2, Weyl-quantised)
    op = (omega ** 2 * Y(X) + I * omega * (2 * v * Y(X).diff(X) + v.diff(X) * Y(X))
          - ((v ** 2 - 1) * Y(X).diff(X)).diff(X))
    from contourkit.symbolic.equation import ode_coefficients
    coeffs = [sp.expand(c) for c in ode_coefficients(op, Y, X)]
    a = [c.subs(X, 0) for c in coeffs]
    b = [sp.diff(c, X).subs(X, 0) for c in coeffs]
    wrong = ck.ModeEquation.from_coefficients(a, b)
    s0, s1 = wrong.weyl_symbol
    assert not (_is_real_poly(s0) and _is_real_poly(s1))
    m = ck.HorizonModel.from_dispersion((W - V * K) ** 2 - K ** 2, omega=W, k=K, x=X,
                                        profiles={V: v}, horizon=0.0)
    s0, s1 = m.mode_equation(omega).weyl_symbol
    assert _is_real_poly(s0) and _is_real_poly(s1)


# ---------------------------------------------------------------------------- refusals
BAD = [
    ("nonlinear", Y(X) ** 2 + Y(X).diff(X, 2), {}, r"not linear"),
    ("nonlinear-product", Y(X) * Y(X).diff(X) + X * Y(X), {}, r"not linear"),
    ("inhomogeneous", Y(X).diff(X, 2) - X * Y(X) + 1, {}, r"not homogeneous"),
    ("degree-2", Y(X).diff(X, 2) + X ** 2 * Y(X), {}, r"degree 2 in x"),
    ("non-polynomial", Y(X).diff(X, 2) + sp.sin(X) * Y(X), {}, r"not a polynomial in x.*profile"),
    ("profile-function", Y(X).diff(X, 2) + sp.Function("v")(X) * Y(X), {}, r"profile function"),
    ("no-derivative", X * Y(X), {}, r"no derivative"),
    ("constant-coefficients", Y(X).diff(X, 2) + Y(X), {}, r"constant coefficients"),
    ("symbol-without-value", Y(X).diff(X, 2) + sp.Symbol("c") * X * Y(X), {}, r"symbol\(s\) c.*parameters"),
    ("wrong-argument", Y(X).diff(X, 2) + Y(2 * X) * X, {}, r"appears in the equation"),
]


@pytest.mark.parametrize("name,expr,kw,match", BAD, ids=[b[0] for b in BAD])
def test_from_ode_refuses_bad_input(name, expr, kw, match):
    with pytest.raises(ck.ContourkitError, match=match) as info:
        ck.ModeEquation.from_ode(expr, Y, X, **kw)
    assert isinstance(info.value, ck.ModelError)
    assert len(str(info.value)) > 30          # says what to do, not just "bad"


def test_from_ode_refuses_bad_arguments():
    with pytest.raises(ck.InputError, match="sympy Symbol"):
        ck.ModeEquation.from_ode(Y(X).diff(X, 2) - X * Y(X), Y, "x")
    with pytest.raises(ck.InputError, match="undefined sympy Function"):
        ck.ModeEquation.from_ode(Y(X).diff(X, 2) - X * Y(X), sp.sin, X)
    with pytest.raises(ck.InputError, match="finite"):
        ck.ModeEquation.from_coefficients([0, 0, 1], [float("nan"), 0, 0])


def test_numpy_scalars_are_read_as_their_decimals():
    # numpy 2 gives float64 a repr of its own ('np.float64(0.05)'); the value must still be 1/20
    import numpy as np
    a = [np.float64(0.05), np.complex128(0.5 - 0.25j), np.float32(1.0)]
    b = [np.int64(-1), np.float64(0.0), 0]
    eq = ck.ModeEquation.from_coefficients(a, b)
    ref = ck.ModeEquation.from_coefficients([0.05, 0.5 - 0.25j, 1.0], [-1, 0, 0])
    assert sp.simplify(eq.A - ref.A) == 0 and sp.simplify(eq.B - ref.B) == 0
    with pytest.raises(ck.InputError, match="finite"):
        ck.ModeEquation.from_coefficients([np.float64("nan"), 0, 1], [1, 0, 0])
