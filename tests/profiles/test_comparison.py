"""Contour (near-horizon) versus direct (full profile) comparison (contourkit.profiles.comparison).

The contour side calls ``model.scatter(omega)`` (contourkit.scattering); the
tests that need it fail until that module exists.
"""
import math

import matplotlib
import pytest

matplotlib.use("Agg")

from contourkit import errors  # noqa: E402
from contourkit.catalogue import quartic_flow  # noqa: E402
from contourkit.profiles.comparison import COLUMNS, ComparisonTable, compare, plot_comparison  # noqa: E402

KAPPA, LAMBDA, D = 0.05, 2.5, 0.5      # our own scenario values (kappa/Lambda = 0.02)
WK = [0.2, 1.0, 2.0]


@pytest.fixture(scope="module")
def sup():
    return quartic_flow(kappa=KAPPA, Lambda=LAMBDA, branch="superluminal", D=D)


@pytest.fixture(scope="module")
def table(sup):
    return compare(sup, [wk * KAPPA for wk in WK])


def test_direct_only_rows_have_the_documented_fields(sup, tmp_path):
    t = compare(sup, [0.01, 0.05], methods=("direct",))
    assert len(t) == 2
    for row in t.rows:
        assert tuple(row) == COLUMNS
        assert row["thermal_ratio_contour"] is None and row["message_contour"] == "not requested"
        assert row["rel_diff_thermal_ratio"] is None
        assert row["n_in_direct"] == 3 and row["unitarity_residual_direct"] <= 1e-8
        assert all(not (isinstance(v, float) and math.isnan(v)) for v in row.values())
    text = t.to_csv()
    assert text.splitlines()[0].split(",") == list(COLUMNS)
    assert t.to_csv(tmp_path / "c.csv") == tmp_path / "c.csv"
    assert (tmp_path / "c.csv").read_text().startswith("omega,")


def test_rows_have_the_documented_fields(table):
    assert isinstance(table, ComparisonTable) and len(table) == len(WK)
    for row, wk in zip(table.rows, WK):
        assert tuple(row) == COLUMNS
        assert row["omega_over_kappa"] == pytest.approx(wk)
        for name in ("contour", "direct"):
            assert row[f"success_{name}"] is True
            assert row[f"unitarity_residual_{name}"] <= 1e-8
        for key in ("rel_diff_occupation", "rel_diff_thermal_ratio", "rel_diff_effective_temperature"):
            assert isinstance(row[key], float) and math.isfinite(row[key])


def test_thermal_ratio_agrees(table):
    # Both tend to the Hawking value for kappa/Lambda -> 0 (Corley and Jacobson 1996; Macher and
    # Parentani 2009); 3% agreement in this regime is a tolerance recalled from memory.
    for row in table.rows:
        assert abs(row["rel_diff_thermal_ratio"]) <= 0.03
        assert row["thermal_ratio_direct"] == pytest.approx(row["thermal_ratio_contour"], rel=0.03)


def test_plot_one_line_per_method(table):
    fig, ax = plot_comparison(table)
    assert isinstance(fig, matplotlib.figure.Figure)
    assert len(ax.get_lines()) == 2
    assert {ln.get_label() for ln in ax.get_lines()} == {"near-horizon contour", "direct (full profile)"}


def test_plot_direct_only_and_given_axes(sup):
    import matplotlib.pyplot as plt
    t = compare(sup, [0.02, 0.05], methods=("direct",))
    fig0, ax0 = plt.subplots()
    fig, ax = plot_comparison(t, ax=ax0, quantity="thermal_ratio")
    assert fig is fig0 and ax is ax0 and len(ax.get_lines()) == 1
    assert ax.get_yscale() == "log"
    plt.close("all")


def test_bad_arguments(sup):
    with pytest.raises(errors.InputError, match="methods"):
        compare(sup, [0.05], methods=("wkb",))
    with pytest.raises(errors.InputError, match="omegas is empty"):
        compare(sup, [])
    with pytest.raises(errors.InputError, match="on_error"):
        compare(sup, [0.05], on_error="ignore")
    with pytest.raises(errors.InputError, match="quantity"):
        plot_comparison(ComparisonTable([]), quantity="colour")


def test_record_errors(sup):
    t = compare(sup, [-1.0], methods=("direct",), on_error="record")
    row = t.rows[0]
    assert row["success_direct"] is False and "InputError" in row["message_direct"]
    assert row["thermal_ratio_direct"] is None


@pytest.mark.slow
def test_horizonless_rows():
    """A horizonless flow: rows of the turning-point figures, both methods.  Total reflection of the blocked
    wave (common practice), pseudo-unitarity, and the S-matrices agree entry by entry (|S| to 0.05)."""
    import pathlib
    from contourkit.profiles.comparison import TURNING_COLUMNS
    from contourkit.symbolic.modelfile import load_model
    m = load_model(pathlib.Path(__file__).resolve().parents[2] / "worked_examples" / "models" / "counter_current.toml")
    t = compare(m, [0.27, 0.5], on_error="record")
    assert tuple(t._fields()) == TURNING_COLUMNS
    r, above = t.rows
    for name in ("contour", "direct"):
        assert r[f"success_{name}"]
        assert abs(r[f"reflection_{name}"] - 1) < 1e-8
        assert r[f"unitarity_residual_{name}"] < 1e-8
        assert r[f"anomalous_{name}"] < 1e-12
    assert r["max_abs_diff_S"] < 0.05
    # above the blocking band there is no turning point: the contour row is recorded, not raised
    assert not above["success_contour"] and "turning point" in above["message_contour"]
    assert above["success_direct"] and above["reflection_direct"] < 1e-3
    assert above["max_abs_diff_S"] is None
