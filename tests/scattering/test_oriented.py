"""White holes and mirror images: the near-horizon S-matrix in every orientation.

Sources: Hawking 1975, Unruh 1976/1981 (non-dispersive thermal ratio
exp(-2 pi omega/kappa)); J. Macher and R. Parentani, Phys. Rev. D 79 (2009)
124008 (white-hole flows as time reverses of black-hole flows, from memory).
Time reversal and parity as exact symmetries of the stationary mode equation:
common practice.
"""
import math

import numpy as np
import pytest
import sympy as sp

import contourkit as ck
from contourkit.scattering.oriented import time_reverse_S

w, k, x = sp.symbols("omega k x")


@pytest.mark.parametrize("omega", [0.01, 0.05, 0.2])
def test_nondispersive_white_hole_is_thermal(omega):
    # Hawking 1975; Unruh 1976: |beta/alpha|^2 = exp(-2 pi omega/kappa), whatever the orientation
    for m in (ck.catalogue.nondispersive_flow(kappa=0.05, hole="white"),
              ck.HorizonModel.from_dispersion((w - (1 - sp.Rational(1, 20) * x) * k) ** 2 - k ** 2,
                                              omega=w, k=k, x=x, horizon=0.0)):
        res = m.scatter(omega)
        assert res.convention.hole == "white"
        assert abs(res.thermal_ratio / math.exp(-2 * math.pi * omega / 0.05) - 1) < 1e-12
        assert res.unitarity_residual < 1e-12


def _quartic(v, s, Lam=sp.Rational(5, 2)):
    return ck.HorizonModel.from_dispersion((w - v * k) ** 2 - k ** 2 - s * k ** 4 / Lam ** 2,
                                           omega=w, k=k, x=x, horizon=0.0)


def _match(a, b, kmap):
    """Index in b of each mode of a, matched by side, direction, norm and mapped wavenumber."""
    out = []
    for m in a:
        c = [i for i, n in enumerate(b) if (n.side, n.direction, n.norm) == (m.side, m.direction, m.norm)]
        out.append(min(c, key=lambda i: abs(b[i].k - kmap(m.k))))
    assert sorted(out) == list(range(len(b)))
    return out


@pytest.mark.parametrize("branch, s", [("superluminal", 1), ("subluminal", -1)])
def test_mirror_image_flowing_towards_plus_x(branch, s):
    # parity x -> -x maps the catalogue black hole v = -1 + kappa x onto v = 1 + kappa x (common practice)
    ref = ck.catalogue.quartic_flow(kappa=0.05, Lambda=2.5, branch=branch).scatter(0.05)
    mir = _quartic(1 + sp.Rational(1, 20) * x, s)
    assert mir.orientation.hole == "black" and mir.orientation.flow == "+x"
    res = mir.scatter(0.05)
    ri = _match(ref.in_modes, res.in_modes, lambda q: -q)
    ro = _match(ref.out_modes, res.out_modes, lambda q: -q)
    assert np.max(np.abs(res.S[np.ix_(ro, ri)] - ref.S)) < 1e-10
    assert abs(res.thermal_ratio - ref.thermal_ratio) < 1e-10 * ref.thermal_ratio
    # the user's wavenumbers solve the user's linearised dispersion relation (symmetric coefficient
    # v^2 - 1 truncated to 2 kappa x) near the horizon, whose exterior is x < 0 here
    kap = sp.Rational(1, 20)
    for m in res.modes:
        nh = m.data.get("near_horizon")
        if nh is not None:
            D = w ** 2 - 2 * w * (1 + kap * x) * k + 2 * kap * x * k ** 2 - s * k ** 4 / sp.Rational(25, 4)
            D = D.subs({w: 0.05, x: nh["x"], k: nh["k"].real})
            assert abs(complex(D)) < 1e-8
            assert (nh["x"] < 0) == (m.side == "exterior")


@pytest.mark.parametrize("branch", ["superluminal", "subluminal"])
def test_white_hole_contour_is_time_reversed_black_hole(branch):
    # S_white = eta_in S_black^T eta_out (derivation in contourkit.scattering.oriented)
    b = ck.catalogue.quartic_flow(kappa=0.05, Lambda=2.5, branch=branch).scatter(0.05)
    wh = ck.catalogue.quartic_flow(kappa=0.05, Lambda=2.5, branch=branch, hole="white").scatter(0.05)
    assert wh.convention.hole == "white" and wh.convention.subsonic_side == "-x"
    T = time_reverse_S(b.S, [m.norm for m in b.in_modes], [m.norm for m in b.out_modes])
    assert np.max(np.abs(wh.S - T)) < 1e-12
    eta_o = np.diag([m.norm for m in wh.out_modes])
    eta_i = np.diag([m.norm for m in wh.in_modes])
    assert np.max(np.abs(wh.S.conj().T @ eta_o @ wh.S - eta_i)) < 1e-10      # pseudo-unitarity
    assert abs(wh.thermal_ratio / b.thermal_ratio - 1) < 1e-12
    # the Hawking channel of a white hole is the long-wavelength in-mode on the subsonic side
    h = wh.in_modes[wh.hawking_index]
    assert h.side == "exterior" and h.direction == "in"
