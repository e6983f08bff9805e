"""Quasinormal modes: Schwarzschild (Leaver 1985) and the Poschl-Teller barrier."""
import math

import numpy as np
import pytest
import sympy as sp

import contourkit.greybody as gb
from contourkit.errors import InputError

r, M = sp.symbols("r M", positive=True)
x = sp.Symbol("x", real=True)
F = 1 - 2 * M / r


# E. W. Leaver, Proc. R. Soc. Lond. A 402 (1985) 285, n = 0, M = 1 (as quoted in the issue)
LEAVER = [((0, 0), 0.110455 - 0.104896j), ((1, 0), 0.292936 - 0.097660j),
          ((2, 0), 0.483644 - 0.096759j), ((2, 2), 0.373672 - 0.088962j)]


@pytest.mark.parametrize("ls,ref", LEAVER)
def test_schwarzschild_fundamental(ls, ref):
    l, s = ls
    pot = gb.radial(F, r, l, spin=s, parameters={"M": 1})
    modes = pot.quasinormal_modes(n_max=2)
    assert [m.overtone for m in modes] == [0, 1, 2]           # n = 0, 1, 2 come out
    m0 = modes[0]
    assert abs(m0.omega - ref) < 1e-6                          # Leaver 1985 (6 decimals)
    assert m0.residual < 1e-10 and m0.error < 1e-10
    assert m0.omega.imag < 0
    ims = [abs(m.omega.imag) for m in modes]
    assert ims == sorted(ims)
    # the polished root and the spectral eigenvalue are independent estimates
    assert abs(m0.spectral_estimate - m0.omega) < 1e-5


def test_schwarzschild_overtone():
    # gravitational l = 2, n = 1: 0.346711 - 0.273915 i (Leaver 1985, from memory)
    pot = gb.radial(F, r, 2, spin=2, parameters={"M": 1})
    modes = pot.quasinormal_modes(n_max=2)
    assert abs(modes[1].omega - (0.346711 - 0.273915j)) < 1e-5
    # n = 2: 0.301053 - 0.478277 i (Leaver 1985, from memory; looser, 1e-5)
    assert abs(modes[2].omega - (0.301053 - 0.478277j)) < 1e-5
    assert len(repr(modes[0]).splitlines()) <= 3


@pytest.mark.parametrize("U0,a", [(1.0, 1.0), (3.0, 2.0), (0.1, 1.0)])
def test_poschl_teller_barrier_qnm(U0, a):
    # omega = +-sqrt(U0 - a^2/4) - i a (n + 1/2) (common practice, from memory); for 4 U0 < a^2
    # the square root is imaginary and the modes lie on the negative imaginary axis.
    pot = gb.potential(U0 / sp.cosh(a * x) ** 2, x)
    modes = pot.quasinormal_modes(n_max=2)
    b = np.sqrt(complex(U0 - a * a / 4))
    exact = sorted({complex(round((s * b).real, 12), (s * b).imag) - 1j * a * (n + 0.5)
                    for n in range(4) for s in (1, -1)}, key=lambda z: abs(z.imag))
    exact = [z for z in exact if z.real >= -1e-12][:3]
    assert len(modes) == 3
    for m, z in zip(modes, exact):
        assert abs(m.omega - z) < 1e-8
        assert m.error < 1e-7
        assert abs(m.omega - z) <= max(10 * m.error, 1e-12)   # the error estimate is honest


def test_region_without_mode():
    pot = gb.radial(F, r, 1, parameters={"M": 1})
    modes = pot.quasinormal_modes(region=(1.0, 2.0, -0.05, -0.01))
    assert len(modes) == 0 and isinstance(modes, list)
    assert "no quasinormal mode" in modes.message
    # a region around the fundamental mode finds it
    modes = pot.quasinormal_modes(region=(0.25, 0.35, -0.15, -0.05))
    assert len(modes) == 1 and abs(modes[0].omega - (0.292936 - 0.097660j)) < 1e-6


def test_refusals():
    # different limits: no common branch of the wave numbers
    with pytest.raises(InputError):
        gb.potential(1 + sp.tanh(x), x).quasinormal_modes()
    # a power-law tail in the tortoise coordinate (two ends at infinity) is refused
    with pytest.raises(InputError):
        gb.potential(2 / (1 + x ** 2), x).quasinormal_modes()
    pot = gb.potential(1 / sp.cosh(x) ** 2, x)
    for bad in (dict(n_max=-1), dict(n_max=1.5), dict(region=(1, 0, 0, 1)), dict(region="box")):
        with pytest.raises(InputError):
            pot.quasinormal_modes(**bad)


def test_horizon_with_exponential_tail():
    # dx/dx* = tanh y (horizon at y = 0), V = 2 tanh^2 y / cosh^2 y: with sinh y = exp(x*) this
    # is V = (1/2) / cosh^2(x*), the Poschl-Teller barrier U0 = 1/2, a = 1, fundamental mode
    # 1/2 - i/2 (common practice, from memory). Exercises the horizon end with a non-rational
    # D and an exponentially decaying far tail (the route of a model-derived potential).
    y = sp.Symbol("y", real=True)
    pot = gb.TortoisePotential(2 * sp.tanh(y) ** 2 / sp.cosh(y) ** 2, y, 1 / sp.tanh(y), horizon=0)
    modes = pot.quasinormal_modes(n_max=0)
    assert abs(modes[0].omega - (0.5 - 0.5j)) < 1e-8
    assert modes[0].residual < 1e-10
    # the same potential's transmission equals the Poschl-Teller formula (L&L 25.4)
    from .test_transmission import pt_barrier_exact
    g = pot.transmission(0.7).transmission
    assert abs(g - float(pt_barrier_exact(0.5, 1.0, 0.7))) < 1e-10
