"""The potential object: construction, limits, refusals, plotting, the general constructor."""
import doctest
import math

import matplotlib
matplotlib.use("Agg")
import numpy as np
import pytest
import sympy as sp

import contourkit.greybody as gb
from contourkit.errors import ContourkitError, InputError

x = sp.Symbol("x", real=True)
y = sp.Symbol("y", real=True)
r, M = sp.symbols("r M", positive=True)


def test_fields_and_limits():
    pot = gb.potential(sp.Rational(1, 3) + 2 / sp.cosh(x) ** 2 + sp.tanh(x) / 5, x)
    assert pot.limits[0] == pytest.approx(1 / 3 - 1 / 5, abs=1e-15)
    assert pot.limits[1] == pytest.approx(1 / 3 + 1 / 5, abs=1e-15)
    assert pot.dxstar_dx == 1 and pot.horizon_xstar is None and pot.horizon is None
    assert pot.xstar == x
    v = pot.V_at(np.array([0.0, 1.0]))
    assert abs(v[0] - (1 / 3 + 2)) < 1e-14
    assert len(repr(pot).splitlines()) <= 3


def test_plot():
    fig, ax = gb.potential(1 / sp.cosh(x) ** 2, x).plot()
    assert ax.get_xlabel().startswith("tortoise")
    fig2, ax2 = gb.radial(1 - 2 * M / r, r, 1, parameters={"M": 1}).plot(ax=ax)
    assert ax2 is ax
    line = max(ax.lines, key=lambda ln: len(ln.get_xdata()))
    assert len(ax.lines) == 4          # two potentials, two zero lines
    xs, vs = np.asarray(line.get_xdata(), dtype=float), np.asarray(line.get_ydata(), dtype=float)
    # Schwarzschild l = 1: V vanishes towards the horizon (x* -> -inf) and at large x*
    assert vs[0] < 1e-3 * vs.max() and np.all(np.diff(xs) > 0)


def test_general_constructor_coordinate_change():
    # Poschl-Teller barrier written in y with x* = y + tanh y (dx*/dy = 1 + sech^2 y): the
    # transmission is a property of the equation, not of the coordinate (L&L 25.4)
    pot = gb.TortoisePotential(2 / sp.cosh(y + sp.tanh(y)) ** 2, y, 1 + 1 / sp.cosh(y) ** 2)
    ref = gb.potential(2 / sp.cosh(x) ** 2, x)
    w = np.array([0.5, 1.0, 1.5])
    a, b = pot.transmission(w), ref.transmission(w)
    assert np.all(np.abs(a.transmission - b.transmission) < 1e-12 * b.transmission + 1e-15)
    assert np.all(a.residual < 1e-12)
    assert pot.kind == "coordinate" and pot.xstar is None        # x* by quadrature
    assert abs(pot.xstar_func(np.array([1.0]))[0] - (1 + math.tanh(1.0))) < 1e-10


def test_general_constructor_with_horizon_equals_radial():
    f = 1 - 2 / r
    V = f * (6 / r ** 2 - 6 / r ** 3)
    pot = gb.TortoisePotential(V, r, 1 / f, horizon=2)
    ref = gb.radial(1 - 2 * M / r, r, 2, spin=2, parameters={"M": 1})
    assert pot.horizon_xstar == -math.inf
    a, b = pot.transmission([0.2, 0.6]), ref.transmission([0.2, 0.6])
    assert np.all(np.abs(a.transmission - b.transmission) < 1e-13)


def test_horizon_with_exponential_tail():
    # a model-like horizon: dx/dx* = tanh y (simple zero at y = 0, surface gravity 1/2),
    # V = tanh(y)^2/2 rising from 0 at the horizon to 1/2 far away
    pot = gb.TortoisePotential(sp.tanh(y) ** 2 / 2, y, 1 / sp.tanh(y), horizon=0)
    assert pot.limits == (0.0, 0.5)
    assert abs(pot.surface_gravity - 0.5) < 1e-14
    res = pot.transmission([0.5, 0.8, 2.0])
    assert res.transmission[0] == 0.0                    # below the far threshold: evanescent
    assert np.all(res.residual < 1e-12) and np.all(res.success)
    assert 0 < res.transmission[1] < res.transmission[2] < 1


@pytest.mark.parametrize("V", [x, sp.sin(x), sp.exp(x), 1 / x ** 2, x / (1 + x ** 2) + sp.sin(x)])
def test_limits_refused(V):
    with pytest.raises(InputError) as e:
        gb.potential(V, x)
    assert "limit" in str(e.value) or "finite" in str(e.value)


def test_bad_types_and_symbols():
    U = sp.Symbol("U")
    with pytest.raises(InputError) as e:
        gb.potential(U / sp.cosh(x) ** 2, x)
    assert "U" in str(e.value) and "parameters" in str(e.value)
    with pytest.raises(InputError):
        gb.potential("1/cosh(x)**2", x)
    with pytest.raises(InputError):
        gb.potential(1 / sp.cosh(x) ** 2, "x")
    with pytest.raises(InputError):
        gb.potential([1, 2], x)
    with pytest.raises(InputError):
        gb.potential(U / sp.cosh(x) ** 2, x, parameters={"U": float("nan")})
    with pytest.raises(InputError):
        gb.potential(U / sp.cosh(x) ** 2, x, parameters=[("U", 1)])
    with pytest.raises(InputError):
        gb.TortoisePotential(1 / sp.cosh(y) ** 2, y, -1)            # dx*/dy negative
    with pytest.raises(InputError):
        gb.TortoisePotential(1 / sp.cosh(y) ** 2, y, 1, horizon=float("nan"))
    assert issubclass(InputError, ContourkitError)


def test_docstring_examples_run():
    from contourkit.greybody import core, metric
    for mod in (gb, core, metric):
        fails, _ = doctest.testmod(mod, verbose=False, optionflags=doctest.ELLIPSIS)
        assert fails == 0
