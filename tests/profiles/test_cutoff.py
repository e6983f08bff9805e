"""Cut-off frequencies of the quartic flow in uniform regions (contourkit.profiles.cutoff).

Derivation of the check values (superluminal).  In a uniform region with the
fluid moving towards -x at speed u (v = -u) the dispersion relation is
``(omega + u k)^2 = k^2 (1 + k^2/Lambda^2)``, with the comoving (rest-frame)
frequency ``Omega = omega + u k`` whose sign is the norm sign (dD/domega =
2 Omega).  On the negative-norm branch ``Omega = -|k| sqrt(1 + k^2/Lambda^2)``
with k = -q Lambda < 0 (q > 0) the lab frequency is

    omega(q) = u q Lambda - q Lambda sqrt(1 + q^2) = Lambda q (u - sqrt(1 + q^2)),

positive for u > 1 and 0 < q < sqrt(u^2 - 1), zero at both ends, so it has a
maximum: the cut-off.  With s = sqrt(1 + q^2), d omega/dq = 0 reads
``u - s - q^2/s = 0``, i.e. ``u s = 1 + 2 q^2 = 2 s^2 - 1``, so
``2 s^2 - u s - 1 = 0`` and ``s = (u + sqrt(u^2 + 8))/4``; then

    omega_max = Lambda (u - s) sqrt(s^2 - 1).

Numerically (checked independently by maximising omega(q) in the test):
u = 1.2 gives 0.0494999 Lambda and u = 2 gives 0.589980 Lambda.

Subluminal analogue, in the subsonic exterior (u < 1):
``(omega + u k)^2 = k^2 (1 - k^2/Lambda^2)``; on the positive-norm branch
with k = q Lambda > 0, ``omega = Lambda q (sqrt(1 - q^2) - u)``; with
s = sqrt(1 - q^2) the extremum condition ``s - q^2/s - u = 0`` gives the same
quadratic ``2 s^2 - u s - 1 = 0``, hence

    omega_max = Lambda (s - u) sqrt(1 - s^2),   s = (u + sqrt(u^2 + 8))/4.

The tanh profile v = -1 + D tanh(kappa x / D) has u = 1 + D in the interior
and u = 1 - D in the exterior.  u = 2 is checked on a uniform region directly
(the tanh profiles with D = 1 and D = 1.5 are checked in tests/test_catalogue.py).
"""
import math

import pytest
from scipy.optimize import minimize_scalar

from contourkit.catalogue import nondispersive_flow, quartic_flow
from contourkit.profiles.cutoff import (cutoff_summary, cutoffs, mode_counts, omega_max, omega_max_uniform,
                               quartic_dispersion)
from contourkit.profiles.planewaves import asymptotic_modes


def closed_form_super(u, Lam):
    s = (u + math.sqrt(u * u + 8)) / 4
    return Lam * (u - s) * math.sqrt(s * s - 1)


def closed_form_sub(u, Lam):
    s = (u + math.sqrt(u * u + 8)) / 4
    return Lam * (s - u) * math.sqrt(1 - s * s)


def test_reference_values_of_the_closed_form():
    # reference values quoted in the brief (numerically checked there), see the module docstring
    assert closed_form_super(1.2, 1.0) == pytest.approx(0.0494999, abs=1e-7)
    assert closed_form_super(2.0, 1.0) == pytest.approx(0.589980, abs=1e-6)


@pytest.mark.parametrize("u", [1.2, 2.0])       # D = 0.2 and D = 1 (uniform region only)
@pytest.mark.parametrize("Lam", [1.0, 2.5])
def test_superluminal_uniform_region(u, Lam):
    # closed form derived in the module docstring
    got = omega_max_uniform(u, Lam, "superluminal")
    assert got == pytest.approx(closed_form_super(u, Lam), rel=1e-12)
    # independent check: maximise omega(q) on the negative-norm branch numerically
    f = lambda q: -Lam * q * (u - math.sqrt(1 + q * q))
    opt = minimize_scalar(f, bounds=(1e-9, math.sqrt(u * u - 1)), method="bounded",
                          options={"xatol": 1e-12})
    assert got == pytest.approx(-opt.fun, rel=1e-9)
    # the merging pair is the negative-norm one, at k = -Lambda sqrt(s^2 - 1)
    c = cutoffs(quartic_dispersion(u, Lam, "superluminal"))[0]
    s = (u + math.sqrt(u * u + 8)) / 4
    assert c.norm == -1
    assert c.k == pytest.approx(-Lam * math.sqrt(s * s - 1), rel=1e-10)


@pytest.mark.parametrize("u", [0.8, 0.5])       # exterior of D = 0.2 and D = 0.5
def test_subluminal_uniform_region(u):
    Lam = 2.5
    got = omega_max_uniform(u, Lam, "subluminal")
    assert got == pytest.approx(closed_form_sub(u, Lam), rel=1e-12)
    f = lambda q: -Lam * q * (math.sqrt(1 - q * q) - u)
    opt = minimize_scalar(f, bounds=(1e-9, math.sqrt(1 - u * u)), method="bounded", options={"xatol": 1e-12})
    assert got == pytest.approx(-opt.fun, rel=1e-9)
    assert cutoffs(quartic_dispersion(u, Lam, "subluminal"))[0].norm == 1


def test_no_cutoff_where_every_branch_exists():
    # superluminal in a subsonic region and subluminal... : two real roots for all omega > 0
    assert omega_max_uniform(0.5, 2.5, "superluminal") is None


@pytest.mark.parametrize("D", [0.2, 0.5])
def test_model_omega_max_superluminal(D):
    m = quartic_flow(kappa=0.05, Lambda=2.5, branch="superluminal", D=D)
    wm = omega_max(m)
    assert wm == pytest.approx(closed_form_super(1 + D, 2.5), rel=1e-12)
    below = mode_counts(m, 0.99 * wm)
    above = mode_counts(m, 1.01 * wm)
    # below: two dispersive in-modes of opposite norm from the interior, one in-mode from the exterior
    assert below["interior"]["in+"] == 1 and below["interior"]["in-"] == 1
    assert below["exterior"]["in"] == 1 and below["total"]["in"] == 3 and below["total"]["out"] == 3
    # above: no negative-norm in-mode anywhere (the branch has ceased to exist)
    assert above["total"]["in-"] == 0
    assert above["total"]["in"] == 2 and above["interior"]["growing"] == 1
    names = [md.name for md in asymptotic_modes(m, 1.01 * wm, "interior")]
    assert "int-in-" not in names and "int-growing" in names


@pytest.mark.parametrize("D", [0.2, 0.5])
def test_model_omega_max_subluminal(D):
    m = quartic_flow(kappa=0.05, Lambda=2.5, branch="subluminal", D=D)
    wm = omega_max(m)
    assert wm == pytest.approx(closed_form_sub(1 - D, 2.5), rel=1e-12)
    below, above = mode_counts(m, 0.99 * wm), mode_counts(m, 1.01 * wm)
    assert below["exterior"]["in"] == 3 and below["exterior"]["out+"] == 1
    # above: the positive-norm dispersive in-mode and the Hawking out-mode have merged and gone
    assert above["exterior"]["out"] == 0 and above["exterior"]["in+"] == 1
    assert above["exterior"]["in-"] == 1 and above["exterior"]["growing"] == 1


def test_none_without_uniform_regions_or_dispersion():
    assert omega_max(quartic_flow(kappa=0.05, Lambda=2.5, branch="superluminal")) is None   # linear profile
    assert omega_max(nondispersive_flow(kappa=0.05)) is None
    assert omega_max(nondispersive_flow(kappa=0.05, D=0.5)) is None


def test_summary_reports_the_counts():
    m = quartic_flow(kappa=0.05, Lambda=2.5, branch="superluminal", D=0.5)
    summ = cutoff_summary(m)
    assert summ["omega_max"] == pytest.approx(closed_form_super(1.5, 2.5), rel=1e-12)
    assert summ["below"]["total"]["in-"] == 1 and summ["above"]["total"]["in-"] == 0
    assert "in- mode" in summ["message"]
