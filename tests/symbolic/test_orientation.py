"""Orientation of sonic horizons and the refusals of bad horizons (symbolic layer)."""
import pytest
import sympy as sp

import contourkit as ck
from contourkit.symbolic.orientation import Orientation, transform_coefficients

w, k, x = sp.symbols("omega k x")
KAP = sp.Rational(1, 20)


def _model(v, **kw):
    return ck.HorizonModel.from_dispersion((w - v * k) ** 2 - k ** 2, omega=w, k=k, x=x, horizon=0.0, **kw)


@pytest.mark.parametrize("v, hole, flow, subsonic, upstream", [
    (-1 + KAP * x, "black", "-x", "+x", "+x"),
    (1 + KAP * x, "black", "+x", "-x", "-x"),
    (-1 - KAP * x, "white", "-x", "-x", "+x"),
    (1 - KAP * x, "white", "+x", "+x", "-x"),
])
def test_orientation_of_the_four_linear_flows(v, hole, flow, subsonic, upstream):
    # common practice (Unruh 1981): subsonic where |v| < c; a black hole flows from subsonic into supersonic
    m = _model(v)
    o = m.orientation
    assert (o.hole, o.flow, o.subsonic_side, o.upstream_side) == (hole, flow, subsonic, upstream)
    assert m.kappa == pytest.approx(0.05, rel=1e-15)
    # the subsonic side really has |v| < 1 (check on the profile itself)
    xs = 1.0 if subsonic == "+x" else -1.0
    assert abs(float(v.subs(x, xs))) < 1
    # the canonical model is a black hole flowing to -x with the same kappa
    c = m.canonical_model()
    assert c.orientation.canonical and c.kappa == pytest.approx(m.kappa, rel=1e-15)


def test_transform_is_an_involution():
    g = [x ** 2 + 3 * x, 2 * x, sp.Integer(5), x]
    for t in [(1, -1), (-1, 1), (-1, -1)]:
        assert transform_coefficients(transform_coefficients(g, x, t), x, t) == [sp.expand(e) for e in g]


def test_varying_sound_speed_kappa_is_a_plus_b():
    # kappa = d(c - |v|)/dx at the sonic point for v = -1 + a x, c = 1 + b x (common practice)
    a, b = sp.Rational(1, 20), sp.Rational(1, 20)
    m = ck.HorizonModel.from_dispersion((w - (-1 + a * x) * k) ** 2 - (1 + b * x) ** 2 * k ** 2,
                                        omega=w, k=k, x=x, window=(-5, 5))
    assert m.horizon == pytest.approx(0.0, abs=1e-15)
    assert m.kappa == pytest.approx(float(a + b), rel=1e-14)
    assert m.orientation.hole == "black"


def test_degenerate_sonic_point_is_refused():
    v = -1 + sp.Rational(1, 2) * sp.tanh(x ** 3)        # crosses -1 at x = 0 with zero gradient
    with pytest.raises(ck.HorizonError, match="degenerate.*non-zero gradient"):
        ck.HorizonModel.from_dispersion((w - v * k) ** 2 - k ** 2, omega=w, k=k, x=x)


def test_touching_without_crossing_is_refused():
    v = -1 + sp.Rational(1, 2) * sp.tanh(x ** 2)        # |v| reaches 1 at x = 0 and turns back
    with pytest.raises(ck.HorizonError, match="touches the wave speed without crossing") as e:
        ck.HorizonModel.from_dispersion((w - v * k) ** 2 - k ** 2, omega=w, k=k, x=x)
    assert "reflect" not in str(e.value)


def test_white_hole_is_accepted_and_the_old_advice_is_gone():
    m = _model(-1 - KAP * x)
    assert m.orientation.hole == "white"
    import inspect
    from contourkit.symbolic import horizon
    assert "x -> -x)" not in inspect.getsource(horizon).replace("(``x -> -x``", "")


def test_dispersion_without_omega_names_the_problem():
    with pytest.raises(ck.HorizonError) as e:
        ck.HorizonModel.from_dispersion(k ** 2 - x, omega=w, k=k, x=x)
    msg = str(e.value)
    assert "does not contain the frequency omega" in msg and "ModeEquation.from_ode" in msg
    assert "np.float64" not in msg and "array(" not in msg


def test_gap_term_names_the_problem():
    with pytest.raises(ck.HorizonError, match="neither omega nor k"):
        ck.HorizonModel.from_dispersion(w ** 2 - k ** 2 - x, omega=w, k=k, x=x)


def test_horizonless_model():
    v = -sp.Rational(1, 2) - sp.Rational(1, 10) * sp.tanh(x)
    with pytest.raises(ck.HorizonError, match="horizon='none'"):
        ck.HorizonModel.from_dispersion((w - v * k) ** 2 - k ** 2, omega=w, k=k, x=x)
    m = ck.HorizonModel.from_dispersion((w - v * k) ** 2 - k ** 2, omega=w, k=k, x=x, horizon="none")
    assert m.horizonless and m.kappa is None and m.orientation.hole == "none" and m.orientation.flow == "-x"
    with pytest.raises(ck.HorizonError, match="horizonless"):
        m.mode_equation(0.1)
    with pytest.raises(ck.ScatteringError, match="horizonless"):
        ck.scattering.smatrix.scatter(m, 0.1)        # no near-horizon S-matrix
    with pytest.raises(ck.ScatteringError, match="0 dispersive turning points"):
        m.scatter(0.1)                               # non-dispersive: no turning point either


def test_orientation_from_signs():
    o = Orientation.from_signs(slope=0.1, flow=1)
    assert o.hole == "black" and o.parity and not o.time_reversed
