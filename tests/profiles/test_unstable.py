"""Unstable modes of a horizon pair (contourkit.profiles.unstable): the black-hole laser.

Scenario (our own choice of values): horizon_pair(kappa=0.25, Lambda=1, D=0.5, L),
v = -1 + D tanh(kappa (x - L)/D) tanh(kappa (x + L)/D), superluminal quartic dispersion.

Sources: the number of unstable modes is zero for a short cavity and grows in steps as L grows
(S. Corley, T. Jacobson, Phys. Rev. D 59 (1999) 124011; A. Coutant, R. Parentani, Phys. Rev. D 81
(2010) 084042; from memory).  The count of zeros in the upper half plane (modes on the imaginary
axis once, oscillating ones twice with their mirrors -conj(omega)) equals the number n(H) of
negative directions of the conserved energy, by the Hamiltonian-Krein index theorem
k_r + 2 k_c + 2 k_i^- = n(H) (T. Kapitula, P. G. Kevrekidis, B. Sandstede, Physica D 195 (2004)
263; from memory) with no neutral negative-energy mode on the real axis (k_i^- = 0, our
assumption, true where no mode sits on the real axis).  For the Lagrangian
1/2 |(d_t + v d_x) phi|^2 - 1/2 |d_x phi|^2 - 1/2 |d_x^2 phi|^2/Lambda^2 the energy is
1/2 (pi - v phi')^2 + 1/2 (1 - v^2) phi'^2 + 1/2 phi''^2/Lambda^2, so n(H) is the number of negative
eigenvalues of -d^2/dx^2 + Lambda^2 (1 - v^2) (computed below with scipy, no toolkit code).
"""
import math
import warnings

import numpy as np
import pytest
import scipy.linalg as sl

from contourkit import errors
from contourkit.catalogue import horizon_pair, nondispersive_flow, quartic_flow
from contourkit.direct import scatter
from contourkit.profiles.unstable import cavity_cutoff, unstable_modes

KAPPA, LAMBDA, D = 0.25, 1.0, 0.5

_cache = {}


def _pair(L):
    if ("model", L) not in _cache:
        _cache["model", L] = horizon_pair(kappa=KAPPA, Lambda=LAMBDA, D=D, L=L)
    return _cache["model", L]


def _modes(L):
    if ("modes", L) not in _cache:
        _cache["modes", L] = unstable_modes(_pair(L))
    return _cache["modes", L]


def negative_energy_count(L, h=0.01, pad=60.0):
    """Negative eigenvalues of -psi'' + Lambda^2 (1 - v^2) psi (second-order differences, scipy)."""
    x = np.arange(-L - pad, L + pad, h)
    v = -1 + D * np.tanh(KAPPA * (x - L) / D) * np.tanh(KAPPA * (x + L) / D)
    diag = 2 / h ** 2 + LAMBDA ** 2 * (1 - v ** 2)
    w = sl.eigvalsh_tridiagonal(diag, -np.ones(len(x) - 1) / h ** 2, select="v", select_range=(-100.0, 0.0))
    return len(w)


# L values away from the thresholds (where a new mode is born at omega = 0 with zero growth rate)
CASES = [(1.0, 0), (2.5, 1), pytest.param(6.5, 2, marks=pytest.mark.slow),
         pytest.param(8.5, 3, marks=pytest.mark.slow)]


@pytest.mark.parametrize("L, listed", CASES)
def test_mode_count_grows_in_steps(L, listed):
    found = _modes(L)
    # zero for a short cavity, then one more mode each step in L (Corley-Jacobson 1999,
    # Coutant-Parentani 2010, from memory); the values 0, 1, 2, 3 are this scenario's
    assert len(found) == listed
    assert found.success and found.count == len(found) + found.mirrors
    # every counted zero is a mode of the full equation: residual of L_omega phi = 0 between the nodes
    for md in found:
        assert md.residual <= 1e-8
        assert md.error_estimate <= 1e-8 * found.box[1]
        assert md.growth_rate > 0 and md.omega.real >= -1e-10
        # the cavity traps only below its cut-off (Coutant-Parentani 2010, from memory)
        assert md.omega.real < _pair(L).cavity_omega_max
    # Hamiltonian-Krein count (Kapitula-Kevrekidis-Sandstede 2004, from memory; see module docstring)
    assert found.multiplicity == negative_energy_count(L)


def test_steps_are_monotone_and_zero_first():
    counts = [len(_modes(L)) for L, _ in [(1.0, 0), (2.5, 1)]]
    assert counts[0] == 0 and counts[1] >= 1
    assert "no unstable mode" in _modes(1.0).message and _modes(1.0).dominant is None
    # the public entry of DESIGN.md
    import contourkit as ck
    assert len(ck.direct.unstable_modes(_pair(1.0))) == 0


def test_threshold_at_negative_energy_onset():
    # the first mode is born at omega = 0 where -psi'' + Lambda^2 (1 - v^2) psi gets its first
    # bound state below zero (scipy bisection); just above, one slow non-oscillating mode
    from scipy.optimize import brentq

    def lowest(L, h=0.01, pad=60.0):
        x = np.arange(-L - pad, L + pad, h)
        v = -1 + D * np.tanh(KAPPA * (x - L) / D) * np.tanh(KAPPA * (x + L) / D)
        diag = 2 / h ** 2 + LAMBDA ** 2 * (1 - v ** 2)
        return sl.eigvalsh_tridiagonal(diag, -np.ones(len(x) - 1) / h ** 2, select="i", select_range=(0, 0))[0]
    L1 = brentq(lowest, 1.0, 2.0, xtol=1e-5)
    below = unstable_modes(_pair(round(L1 - 0.05, 3)))
    above = unstable_modes(_pair(round(L1 + 0.05, 3)))
    assert len(below) == 0 and len(above) == 1
    md = above[0]
    assert not md.oscillating and md.residual <= 1e-8
    assert 0 < md.growth_rate < 0.01          # slow just above the threshold


def test_mirror_images_found_in_a_symmetric_box():
    # the equation is real: with omega also -conj(omega) is a mode (no source needed)
    m = _pair(3.5)
    wm = cavity_cutoff(m)
    both = unstable_modes(m, re_min=-wm)
    assert len(both) == 1 and both[0].oscillating and both.mirrors == 1 and both.count == 2
    assert both.multiplicity == negative_energy_count(3.5) == 2


def test_profile_is_a_localised_solution():
    md = _modes(2.5)[0]
    x, phi = md.profile
    assert np.max(np.abs(phi)) == pytest.approx(1.0)
    inside = np.abs(x) < _pair(2.5).L
    assert np.max(np.abs(phi[inside])) > 0.5
    # far out the profile is the slowest allowed plane wave: log|phi| has slope -Im k, with k the
    # root of (omega - v k)^2 - k^2 - k^4/Lambda^2 = 0 at v = -1 + D (numpy roots, not the toolkit)
    # of smallest |Im k| among those decaying away (Im k < 0 on the left, > 0 on the right)
    v = -1 + D
    roots = np.roots([-1 / LAMBDA ** 2, 0.0, v ** 2 - 1, -2 * md.omega * v, md.omega ** 2])
    for side, sel in (("left", x < x[0] + 10), ("right", x > x[-1] - 10)):
        allowed = [k for k in roots if (k.imag < 0 if side == "left" else k.imag > 0)]
        k = min(allowed, key=lambda q: abs(q.imag))
        slope = np.polyfit(x[sel], np.log(np.abs(phi[sel])), 1)[0]
        assert slope == pytest.approx(-k.imag, rel=1e-3)


def test_poles_of_the_continued_s_matrix():
    # the oscillating mode of L = 6.5 is a pole of scatter(model, omega) continued to complex omega:
    # |S| (omega - omega_0) tends to a finite residue
    m = _pair(6.5)
    w0 = _modes(6.5)[0].omega
    assert w0.real > 0
    s = [np.max(np.abs(scatter(m, w0 + d, rtol=1e-6).S)) * d for d in (1e-4, 1e-5)]
    assert s[1] == pytest.approx(s[0], rel=2e-2)
    far = scatter(m, complex(w0.real, -w0.imag))          # the conjugate point is regular
    assert np.max(np.abs(far.S)) < 10


def test_empty_box_returns_empty_list_with_message():
    m = _pair(2.5)
    found = unstable_modes(m, re_min=0.05, omega_max=0.1, im_min=1e-3, im_max=0.05)
    assert len(found) == 0 and found.count == 0 and found.success
    assert "no unstable mode in the box" in found.message and "im_min" in found.message


@pytest.mark.parametrize("kw, match", [
    (dict(omega_max=-1.0), "omega_max"), (dict(im_min=0.1, im_max=0.01), "im_min"),
    (dict(omega_max=float("nan")), "omega_max"), (dict(points=4), "points"), (dict(step=0), "step"),
    (dict(re_min=0.5, omega_max=0.1), "re_min"), (dict(omega_max="big"), "omega_max")])
def test_bad_options(kw, match):
    with pytest.raises(errors.InputError, match=match):
        unstable_modes(_pair(2.5), **kw)


def test_refusals():
    with pytest.raises(errors.InputError, match="HorizonModel"):
        unstable_modes("not a model")
    with pytest.raises(errors.InputError, match="not uniform"):
        unstable_modes(quartic_flow(kappa=0.05, Lambda=2.5), omega_max=0.1)     # linear profile
    with pytest.raises(errors.ScatteringError, match="leading coefficient"):
        unstable_modes(nondispersive_flow(kappa=0.05, D=0.5), omega_max=0.1)
    with pytest.raises(errors.InputError, match="not uniform at the interior window end"):
        unstable_modes(_pair(2.5), window=(-10.0, 40.0))


def test_cavity_cutoff_of_a_general_model():
    # the same flow built directly (no cavity_omega_max attribute): the largest local cut-off is that
    # of the deepest point, Lambda (u - s) sqrt(s^2 - 1), s = (u + sqrt(u^2 + 8))/4 (Macher and
    # Parentani 2009; REFERENCES.md), u = 1 + D tanh^2(kappa L/D)
    import sympy as sp
    from contourkit.symbolic.horizon import HorizonModel
    w, k, x = sp.symbols("omega k x")
    L = 2.5
    v = -1 + sp.Rational(1, 2) * sp.tanh((x - L) / 2) * sp.tanh((x + L) / 2)
    m = HorizonModel.from_dispersion((w - v * k) ** 2 - k ** 2 - k ** 4, omega=w, k=k, x=x, horizon=L)
    u = 1 + D * math.tanh(KAPPA * L / D) ** 2
    s = (u + math.sqrt(u ** 2 + 8)) / 4
    assert cavity_cutoff(m) == pytest.approx(LAMBDA * (u - s) * math.sqrt(s ** 2 - 1), rel=1e-8)
