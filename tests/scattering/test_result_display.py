"""Notebook display of results: ScatteringResult, Spectrum, ComparisonTable.

The figures shown are checked against the exact non-dispersive thermal
factor |beta/alpha|^2 = exp(-2 pi omega / kappa) (Unruh 1981) and
T_H = kappa/(2 pi) (Hawking 1975); the rest is behaviour.
"""
import math

import pytest

import contourkit as ck
from contourkit.profiles.comparison import COLUMNS, ComparisonTable
from contourkit.scattering.spectra import Spectrum

KAPPA = 0.05


@pytest.fixture(scope="module")
def nondisp():
    return ck.catalogue.nondispersive_flow(kappa=KAPPA)


def test_result_html_has_the_key_figures(nondisp):
    res = nondisp.scatter(0.02)
    assert res.thermal_ratio == pytest.approx(math.exp(-2 * math.pi * 0.02 / KAPPA), rel=1e-12)   # Unruh 1981
    html = res._repr_html_()
    for name, value in [("hawking_temperature", KAPPA / (2 * math.pi)), ("thermal_ratio", res.thermal_ratio),
                        ("occupation", res.occupation), ("temperature_ratio", res.temperature_ratio)]:
        assert name in html and format(float(value), ".10g") in html
    assert res.temperature_ratio == pytest.approx(1.0, rel=1e-10)
    assert "unitarity_residual" in html and "|S|^2" in html and "modes" in html
    assert len(repr(res).splitlines()) <= 3 and "temperature_ratio" in repr(res)


def test_dispersive_result_shows_modes_and_s(nondisp):
    res = ck.catalogue.quartic_flow(kappa=KAPPA, Lambda=2.5).scatter(0.05)
    html = res._repr_html_()
    for m in res.in_modes + res.out_modes:
        assert m.name in html
    # |S|^2 of the Hawking channel on its negative-norm in-mode is |beta|^2 (common practice)
    assert format(float(res.occupation), ".4g") in html
    assert len(repr(res).splitlines()) <= 3


def test_extra_and_missing_fields_are_tolerated(nondisp):
    res = nondisp.scatter(0.03)

    class Validity:
        thermal_ratio_error, occupation_error, reliable, reason = 2.5e-3, 4e-3, True, "dispersive length small"
    res.validity = Validity()
    res.hawking_channel = True
    html = res._repr_html_()
    assert "validity" in html and "0.0025" in html and "dispersive length small" in html
    assert "hawking_channel" in html
    res.effective_temperature = None                       # above a cut-off (honest-results issue)
    assert res.temperature_ratio is None
    assert "\u2014" in res._repr_html_() and len(repr(res).splitlines()) <= 3


def test_spectrum_html_first_and_last_rows(nondisp):
    ws = [0.005 * (i + 1) for i in range(10)]
    spec = nondisp.spectrum(ws)
    html = spec._repr_html_()
    assert "10 rows" in html and "\u2026" in html
    for r in spec.rows[:3] + spec.rows[-3:]:
        assert format(r["thermal_ratio"], ".6g") in html
    assert format(spec.rows[4]["thermal_ratio"], ".6g") not in html     # the middle is left out
    for c in ("omega", "occupation", "thermal_ratio", "temperature_ratio", "unitarity_residual"):
        assert f"<th>{c}</th>" in html
    text = repr(spec)
    assert len(text.splitlines()) <= 3 and "10 rows" in text
    empty = Spectrum([], [])
    assert len(repr(empty).splitlines()) <= 3 and "0 rows" in empty._repr_html_()


def test_comparison_table_html():
    rows = []
    for i in range(8):
        row = {c: None for c in COLUMNS}
        row.update(omega=0.01 * (i + 1), omega_over_kappa=0.2 * (i + 1), temperature_ratio_contour=1 + i * 1e-3)
        rows.append(row)
    t = ComparisonTable(rows, model_name="test flow")
    html = t._repr_html_()
    assert "test flow" in html and "8 rows" in html and "temperature_ratio_direct" in html
    assert format(1.0, ".6g") in html and format(1.007, ".6g") in html and "\u2014" in html
    assert len(repr(t).splitlines()) <= 3
