"""Validity of near-horizon results against the full profile (contourkit.profiles.validity).

The reference is the direct position-space solver of the full (tanh) profile,
ck.direct.scatter, itself checked against published numbers in test_direct.py;
the thermal occupation 1/(exp(omega/T_H) - 1) and the thermal ratio
exp(-omega/T_H) are Hawking's (S. W. Hawking, Commun. Math. Phys. 43 (1975) 199;
W. G. Unruh, Phys. Rev. D 51 (1995) 2827 for dispersive flows with kappa << Lambda).
"""
import math
import warnings

import pytest

import contourkit as ck
from contourkit.catalogue import dielectric_front, quartic_flow


def _scatter(model, omega, **kw):
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        res = model.scatter(omega, **kw)
    return res, [w.category for w in caught]


# -- what was seen (issue 12): reproduced, now flagged --------------------------------------
@pytest.mark.parametrize("kappa, Lambda, omega", [(0.5, 2.5, 0.5), (1.0, 1.0, 0.1)])
def test_strongly_dispersive_tanh_flows_are_flagged(kappa, Lambda, omega):
    """kappa/Lambda = 0.2 near omega_max and kappa = Lambda: the near-horizon thermal ratio is
    far from the full profile's (seen: 7x and T_eff/T_H 0.98 against 0.74)."""
    m = quartic_flow(kappa=kappa, Lambda=Lambda, D=0.5)
    res, cats = _scatter(m, omega)
    d = ck.direct.scatter(m, omega)
    actual = abs(res.thermal_ratio - d.thermal_ratio) / d.thermal_ratio
    assert actual > 0.1                              # the reproduction: the two really differ
    assert res.validity.reliable is False
    assert ck.ValidityWarning in cats
    assert issubclass(ck.ValidityWarning, ck.ContourkitWarning)
    # the estimate is of the size of the actual deviation (common practice: within a factor 3)
    assert actual / 3 <= res.validity.thermal_ratio_error
    assert res.validity.reason and "\n" not in res.validity.reason
    # conservation still holds for the linearised model: it is exact for that model
    assert res.unitarity_residual < 1e-10


@pytest.mark.slow
@pytest.mark.parametrize("omega", [0.002, 0.003])
def test_dielectric_front_near_its_cutoff_is_flagged(omega):
    """Seen: contour thermal ratio 22% and 8x the direct solver's at omega = 0.002, 0.003."""
    m = dielectric_front()
    res, cats = _scatter(m, omega)
    assert res.hawking_channel is True and m.omega_max > omega
    d = ck.direct.scatter(m, omega)
    assert abs(res.thermal_ratio - d.thermal_ratio) / d.thermal_ratio > 0.1
    assert res.validity.reliable is False and ck.ValidityWarning in cats


def test_low_frequency_occupation_is_flagged():
    """At omega/kappa = 0.1 the linearised flow mixes the Hawking mode with v_R: |beta|^2 is 73%
    below the full profile's, while |beta/alpha|^2 agrees; the full profile's occupation is
    thermal, 1/(exp(omega/T_H) - 1) (Hawking 1975), to 1e-3 here."""
    m = quartic_flow(kappa=0.05, Lambda=2.5, D=0.5)
    w = 0.1 * m.kappa
    res, cats = _scatter(m, w)
    d = ck.direct.scatter(m, w)
    thermal = 1 / math.expm1(w / m.hawking_temperature)
    assert abs(d.occupation / thermal - 1) < 1e-3
    assert abs(res.occupation / d.occupation - 1) > 0.5
    v = res.validity
    assert v.reliable is False and ck.ValidityWarning in cats
    assert v.occupation_error > 0.5 and v.thermal_ratio_error < 1e-4
    assert "occupation" in v.reason


def test_linear_profile_has_no_validity():
    """Catalogue models with the linear profile have no full profile: validity None, no warning."""
    res, cats = _scatter(quartic_flow(kappa=0.05, Lambda=2.5), 0.05)
    assert res.validity is None and ck.ValidityWarning not in cats
    assert res.as_row()["reliable"] is None


def test_small_kappa_thermal_ratio_error_below_tolerance():
    """quartic_flow(kappa=0.05, Lambda=2.5, D=0.5), omega/kappa in [0.3, 1.5]: the estimated
    thermal-ratio error is below 1e-2, and so is the actual deviation from the direct solver.
    A spectrum of 7 frequencies uses 6 reference solves: one frequency is estimated from its
    neighbours and checked here against its own direct solve."""
    m = quartic_flow(kappa=0.05, Lambda=2.5, D=0.5)
    ws = [r * m.kappa for r in (0.3, 0.5, 0.7, 0.9, 1.1, 1.3, 1.5)]
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ck.ValidityWarning)
        spec = m.spectrum(ws, rtol=1e-10)
    methods = {r.validity.method for r in spec.results}
    assert "bracketing full-profile solves" in methods
    for res in spec.results:
        v = res.validity
        assert v.thermal_ratio_error < 1e-2
        d = ck.direct.scatter(m, res.omega)
        actual = abs(res.thermal_ratio - d.thermal_ratio) / d.thermal_ratio
        assert actual <= 3 * v.thermal_ratio_error
    assert spec.rows[0]["thermal_ratio_error"] == spec.results[0].validity.thermal_ratio_error


def test_tolerance_is_the_users():
    """validity_tol sets the threshold of reliable; None skips the estimate; bad values refused."""
    m = quartic_flow(kappa=0.05, Lambda=2.5, D=0.5)
    w = 2.0 * m.kappa        # occupation error ~exp(-2 pi) ~ 2e-3, thermal-ratio error ~1e-2
    loose, cats = _scatter(m, w, validity_tol=0.5)
    assert loose.validity.reliable is True and loose.validity.tolerance == 0.5
    assert ck.ValidityWarning not in cats
    strict, cats = _scatter(m, w, validity_tol=1e-6)
    assert strict.validity.reliable is False and ck.ValidityWarning in cats
    assert _scatter(m, w, validity_tol=None)[0].validity is None
    for bad in (0, 1, -0.1, "0.01", True):
        with pytest.raises(ck.InputError, match="validity_tol"):
            m.scatter(w, validity_tol=bad)


@pytest.mark.slow
def test_reliable_means_close_to_the_full_profile_over_a_grid():
    """Over kappa/Lambda in {0.02, 0.1, 0.3}, D in {0.3, 0.5, 0.8}, omega/kappa in {0.1, 0.5, 1, 2}:
    wherever validity.reliable is True, the actual relative difference of the thermal ratio from
    ck.direct.scatter is at most 3x thermal_ratio_error and below 1e-2.  Each (kappa, D) pair is
    one spectrum, so the estimate is the one a spectrum gives; above the cut-off both methods
    report no Hawking channel."""
    Lambda = 2.5
    n_thermal_ok = 0
    for ratio in (0.02, 0.1, 0.3):
        for D in (0.3, 0.5, 0.8):
            m = quartic_flow(kappa=ratio * Lambda, Lambda=Lambda, D=D)
            ws = [r * m.kappa for r in (0.1, 0.5, 1.0, 2.0)]
            with warnings.catch_warnings():
                warnings.simplefilter("ignore")
                spec = m.spectrum(ws, rtol=1e-10)
                for res in spec.results:
                    d = ck.direct.scatter(m, res.omega)
                    assert res.hawking_channel == d.hawking_channel
                    if not res.hawking_channel:
                        assert res.thermal_ratio == 0.0 and res.effective_temperature is None
                        continue
                    actual = abs(res.thermal_ratio - d.thermal_ratio) / d.thermal_ratio
                    assert actual <= 3 * res.validity.thermal_ratio_error + 1e-12
                    if res.validity.reliable:
                        assert actual < 1e-2
                    if res.validity.thermal_ratio_error < 1e-2:
                        # the thermal ratio alone (reliable also needs the occupation, which the
                        # linearised flows miss at omega <~ kappa): the same bound holds
                        n_thermal_ok += 1
                        assert actual < 1e-2
    assert n_thermal_ok >= 10


def test_model_file_with_tanh_profile_gets_validity_and_cutoff(tmp_path):
    """A model file of one's own (tanh profile, not from the catalogue) gets the same checks:
    a cut-off warning and no Hawking channel above omega_max (closed form of
    docs/REFERENCES: omega_max = Lambda (u - s) sqrt(s^2 - 1), s = (u + sqrt(u^2 + 8))/4,
    supersonic speed u = 1 + D), a validity estimate below it."""
    p = tmp_path / "my_flow.toml"
    p.write_text('[model]\nkind = "dispersion"\nequation = "(omega - v*k)**2 - k**2 - k**4/L**2"\n'
                 '[parameters]\nkap = 0.04\nL = 3.0\nDd = 0.4\n[profiles]\nv = "-1 + Dd*tanh(kap*x/Dd)"\n')
    m = ck.load_model(p)
    u, L = 1.4, 3.0
    s = (u + math.sqrt(u * u + 8)) / 4
    assert abs(m.omega_max / (L * (u - s) * math.sqrt(s * s - 1)) - 1) < 1e-9
    res, cats = _scatter(m, 1.2 * m.omega_max)
    assert ck.ContourkitWarning in cats
    assert res.hawking_channel is False and res.thermal_ratio == 0.0 and res.effective_temperature is None
    row = res.as_row()
    assert row["effective_temperature"] is None and row["temperature_ratio"] is None
    res, cats = _scatter(m, 1.5 * m.kappa)
    assert res.validity is not None and res.validity.thermal_ratio_error < 1e-2


def test_nondispersive_tanh_flow_keeps_its_hawking_channel():
    """A non-dispersive tanh flow has no cut-off and no plane-wave partner in-mode (its partner
    comes from the horizon): the channel exists at every omega, and the near-horizon thermal
    ratio is exp(-2 pi omega/kappa) (Hawking 1975; Unruh 1976).  Found while trying the checks:
    the plane-wave test alone had reported no channel."""
    from contourkit.catalogue import nondispersive_flow
    m = nondispersive_flow(kappa=0.05, D=0.5)
    res, cats = _scatter(m, 0.05)
    assert res.hawking_channel is True and ck.ContourkitWarning not in cats
    assert abs(res.thermal_ratio / math.exp(-2 * math.pi * 0.05 / 0.05) - 1) < 1e-12
    assert res.validity.method == "non-dispersive"


def _counter_current(v0, dv, L, alpha):
    import sympy as sp
    w, k, x = sp.symbols("omega k x")
    v = -v0 - dv * sp.tanh(x / L)
    return ck.HorizonModel.from_dispersion((w - v * k) ** 2 - k ** 2 + alpha * k ** 4, omega=w, k=k, x=x,
                                           horizon="none", window=(-50 * L, 50 * L))


def test_turning_point_mode_content_against_the_uniform_regions():
    """A turning-point result is the linearised model's.  Where the uniform regions of the full profile
    hold other in-modes (here omega = v k with dD/domega = 0 at k ~ -1.05 between the turning point and
    x -> -infinity: that branch changes its norm, so it enters from both sides; a random case of our own),
    it is flagged; where they agree (the counter-current of tests/scattering/test_conversion.py) it is not.
    Counting in-modes by norm sign on plane waves of the uniform regions: common practice."""
    import sympy as sp
    from contourkit.errors import CoalescenceWarning
    odd = _counter_current(sp.Rational(7, 25), sp.Rational(1, 20), 23, sp.Rational(9, 10))
    with warnings.catch_warnings(record=True) as seen:
        warnings.simplefilter("always")
        res = odd.scatter(0.31)
    assert res.validity is not None and not res.validity.reliable and res.validity.method == "mode content"
    assert "3 positive-norm and 1 negative-norm" in res.validity.reason
    assert any(issubclass(w.category, ck.ValidityWarning) for w in seen)
    good = _counter_current(sp.Rational(71, 200), sp.Rational(9, 200), 20, 1)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", CoalescenceWarning)
        warnings.simplefilter("error", ck.ValidityWarning)
        res = good.scatter(0.27)
    assert res.validity is None
