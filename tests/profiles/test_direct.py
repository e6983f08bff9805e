"""Direct position-space solver (contourkit.direct) on tanh flows with quartic dispersion.

Scenario (our own choice of values): kappa = 0.05, Lambda = 2.5 (kappa/Lambda =
0.02), v = -1 + D tanh(kappa x / D) with D = 0.5.
"""
import math

import numpy as np
import pytest

from contourkit import errors
from contourkit.catalogue import nondispersive_flow, quartic_flow
from contourkit.profiles.cutoff import omega_max
from contourkit.direct import scatter

KAPPA, LAMBDA, D = 0.05, 2.5, 0.5


@pytest.fixture(scope="module")
def sup():
    return quartic_flow(kappa=KAPPA, Lambda=LAMBDA, branch="superluminal", D=D)


@pytest.fixture(scope="module")
def sub():
    return quartic_flow(kappa=KAPPA, Lambda=LAMBDA, branch="subluminal", D=D)


def _finite(res):
    # effective_temperature is None where there is no Hawking channel (above a cut-off)
    vals = [res.thermal_ratio, res.occupation, res.unitarity_residual, res.error_estimate, abs(res.alpha),
            abs(res.beta)] + ([res.effective_temperature] if res.hawking_channel else [])
    return all(math.isfinite(v) for v in vals) and np.all(np.isfinite(res.S))


@pytest.mark.parametrize("branch", ["superluminal", "subluminal"])
@pytest.mark.parametrize("wk", [0.1, 0.5, 1.0, 2.0, 3.0])
def test_unitarity(branch, wk, sup, sub):
    # conservation of the norm: no source needed (DESIGN.md, check values)
    m = sup if branch == "superluminal" else sub
    res = scatter(m, wk * KAPPA)
    assert res.method == "direct" and res.success
    assert res.unitarity_residual <= 1e-8
    assert res.S.shape == (3, 3) and _finite(res)


@pytest.mark.parametrize("wk", [0.2, 0.5, 1.0, 1.5, 2.0])
def test_hawking_temperature_superluminal(wk, sup):
    # T_eff -> kappa/(2 pi) for kappa/Lambda -> 0: Corley and Jacobson 1996; Macher and Parentani 2009.
    # The 3% tolerance is recalled from memory (their figures for kappa/Lambda ~ 0.02, D ~ 0.5).
    res = scatter(sup, wk * KAPPA)
    assert res.effective_temperature / (KAPPA / (2 * math.pi)) == pytest.approx(1.0, abs=0.03)
    # and the Planck ratio itself, exp(-2 pi omega/kappa) (Hawking 1975), to the same 3% in the exponent
    assert math.log(res.thermal_ratio) == pytest.approx(-2 * math.pi * wk, rel=0.03)


def test_hawking_temperature_subluminal(sub):
    # same sources and remembered tolerance as above, for the subluminal branch
    for wk in (0.5, 2.0):
        res = scatter(sub, wk * KAPPA)
        assert res.effective_temperature / (KAPPA / (2 * math.pi)) == pytest.approx(1.0, abs=0.03)


def test_departure_from_thermal_near_cutoff():
    # the solver is not thermal by construction: for kappa/Lambda = 0.2 the cut-off is close to kappa
    # and beta must vanish as omega -> omega_max (Macher and Parentani 2009), so T_eff falls well below T_H
    # (the values 0.92, 0.80, 0.70 at 0.9, 0.99, 0.999 omega_max are our own runs, not a published check)
    m = quartic_flow(kappa=0.5, Lambda=2.5, branch="superluminal", D=0.5)
    res = [scatter(m, f * omega_max(m)) for f in (0.9, 0.99, 0.999)]
    assert all(r.unitarity_residual <= 1e-8 for r in res)
    ratios = [r.effective_temperature / m.hawking_temperature for r in res]
    assert ratios[0] < 0.97 and ratios[1] < 0.9
    assert ratios[0] > ratios[1] > ratios[2]
    assert res[0].occupation > res[1].occupation > res[2].occupation > 0


def test_mode_counting_superluminal(sup):
    wm = omega_max(sup)
    below = scatter(sup, 0.1)
    assert sorted(md.name for md in below.in_modes) == ["ext-in+", "int-in+", "int-in-"]
    assert sorted(md.name for md in below.out_modes) == ["ext-out+", "int-out+", "int-out-"]
    assert all(md.origin == "plane wave" for md in below.modes)
    above = scatter(sup, 1.2 * wm)
    assert all(md.norm > 0 for md in above.in_modes)             # the negative-norm in-mode is absent
    assert sorted(md.name for md in above.in_modes) == ["ext-in+", "int-in+"]
    # no Hawking channel above the cut-off: thermal ratio 0, no effective temperature (None)
    assert above.thermal_ratio == 0.0 and above.effective_temperature is None
    assert above.hawking_channel is False and below.hawking_channel is True
    assert above.as_row()["temperature_ratio"] is None
    assert "cut-off" in above.message and above.unitarity_residual <= 1e-8


def test_mode_counting_subluminal(sub):
    res = scatter(sub, 0.05)
    assert sorted(md.name for md in res.in_modes) == ["ext-in+", "ext-in+", "ext-in-"]
    assert sorted(md.name for md in res.out_modes) == ["ext-out+", "int-out+", "int-out-"]
    above = scatter(sub, 1.2 * omega_max(sub))
    assert [md.side for md in above.out_modes] == ["interior", "interior"]   # no Hawking channel
    assert above.thermal_ratio == 0.0 and "cut-off" in above.message
    assert above.hawking_channel is False and above.effective_temperature is None
    assert above.unitarity_residual <= 1e-8 and _finite(above)


def test_group_velocities_and_norms(sup):
    res = scatter(sup, 0.05)
    for md in res.modes:
        towards = md.group_velocity < 0 if md.side == "exterior" else md.group_velocity > 0
        assert towards == (md.direction == "in")
        assert md.norm == (1 if md.data["dD_domega"] > 0 else -1)


@pytest.mark.parametrize("branch", ["superluminal", "subluminal"])
@pytest.mark.parametrize("wk", [0.1, 1.0])
def test_window_independence(branch, wk, sup, sub):
    # long-wavelength modes are the most sensitive to the ends (NOTES-scattering.md, section 6)
    m = sup if branch == "superluminal" else sub
    ref = scatter(m, wk * KAPPA)
    a, b = ref.extra["window"]
    for win in [(-150.0, 150.0), (1.3 * a, 0.9 * b)]:
        res = scatter(m, wk * KAPPA, window=win)
        assert np.max(np.abs(res.S - ref.S)) <= 1e-6
        assert res.thermal_ratio == pytest.approx(ref.thermal_ratio, rel=1e-6)


def test_resolution_estimate(sup):
    res = scatter(sup, 0.05, rtol=1e-10)
    assert res.extra["resolution_difference"] <= 1e-10
    # a deliberately coarse grid must say so (warning, success False) and still be roughly right
    with pytest.warns(errors.AccuracyWarning, match="resolution difference"):
        coarse = scatter(sup, 0.05, step=8.0, points=8, max_points=16)
    assert not coarse.success and coarse.extra["points"] == 16
    assert coarse.extra["resolution_difference"] > 1e-10
    assert np.max(np.abs(coarse.S - res.S)) <= 10 * coarse.extra["resolution_difference"]


@pytest.mark.parametrize("omega", [0.0, -0.1, float("nan"), float("inf"), "fast", 1j])
def test_bad_omega(omega, sup):
    with pytest.raises(errors.InputError, match="omega must be a positive"):
        scatter(sup, omega)


def test_linear_profile_refused():
    m = quartic_flow(kappa=KAPPA, Lambda=LAMBDA, branch="superluminal")       # D=None: v = -1 + kappa x
    with pytest.raises(errors.InputError, match=r"not uniform at the window ends.*tanh profile \(D=.*contour method"):
        scatter(m, 0.05)


def test_short_window_refused(sup):
    with pytest.raises(errors.InputError, match="not uniform at the window ends.*widen the window"):
        scatter(sup, 0.05, window=(-40.0, 40.0))


@pytest.mark.parametrize("window", [(10.0, 250.0), (-250.0, -5.0)])
def test_window_without_horizon(window, sup):
    with pytest.raises(errors.HorizonError, match="does not contain the horizon"):
        scatter(sup, 0.05, window=window)


@pytest.mark.parametrize("rel", [0.0, 5e-10, -5e-10])
def test_at_cutoff_refused(rel, sup):
    wm = omega_max(sup)
    with pytest.raises(errors.InputError, match="cut-off.*move omega away"):
        scatter(sup, wm * (1 + rel))


def test_nondispersive_refused():
    m = nondispersive_flow(kappa=KAPPA, D=D)
    with pytest.raises(errors.ScatteringError, match="leading coefficient.*dispersive model"):
        scatter(m, 0.05)


def test_bad_options(sup):
    with pytest.raises(errors.InputError, match="rtol"):
        scatter(sup, 0.05, rtol=0)
    with pytest.raises(errors.InputError, match="window must be"):
        scatter(sup, 0.05, window=(5.0, -5.0))
    with pytest.raises(errors.InputError, match="max_points"):
        scatter(sup, 0.05, points=16, max_points=20)


def test_blas_threads_bounded_during_the_solve_only(sup, monkeypatch):
    # the dense solves run with BLAS_THREADS threads and the setting is restored afterwards
    # (threadpoolctl reads the BLAS library's own count; common practice)
    from threadpoolctl import threadpool_info, threadpool_limits
    from contourkit.profiles import direct

    def blas():
        return [d["num_threads"] for d in threadpool_info() if d["user_api"] == "blas"]
    seen = []
    real = direct._transfer

    def spy(*a, **kw):
        seen.append(blas())
        return real(*a, **kw)
    monkeypatch.setattr(direct, "_transfer", spy)
    with threadpool_limits(limits=2, user_api="blas"):        # a known count that differs from BLAS_THREADS
        before = blas()
        res = direct.scatter(sup, 0.05)
        after = blas()
    assert before and all(n == 2 for n in before)
    assert res.unitarity_residual < 1e-8                       # pseudo-unitarity still holds
    assert seen and all(n == [direct.BLAS_THREADS] * len(before) for n in seen)
    assert after == before
