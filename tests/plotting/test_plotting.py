"""Figures for papers (contourkit.plotting): the content of each figure, saving, refusals.

Cases: the Airy equation y'' = x y (DLMF 9.2.1; its saddles +-sqrt(-x) are the
roots of the local dispersion relation -k^2 - x = 0, DLMF 9.5.4) and the
quartic superluminal flow of contourkit.catalogue (kappa = 0.05, Lambda = 2.5,
our own scenario).  Counting checks compare with rep.saddles, rep.singularities,
decompose() and numpy.roots ("common practice": the figure must show what the
engine computed, no more and no less).
"""
import math
import warnings

import matplotlib

matplotlib.use("Agg")

import numpy as np  # noqa: E402
import pytest  # noqa: E402
import sympy as sp  # noqa: E402

import contourkit as ck  # noqa: E402
from contourkit import plotting  # noqa: E402
from contourkit.geometry.decompose import decompose  # noqa: E402
from contourkit.errors import ContourError, ContourkitError, InputError  # noqa: E402
from contourkit.plotting._panel import LEGEND  # noqa: E402


@pytest.fixture(scope="module")
def airy():
    x = sp.Symbol("x")
    y = sp.Function("y")
    return ck.ModeEquation.from_ode(y(x).diff(x, 2) - x * y(x), y, x).fourier()


@pytest.fixture(scope="module")
def quartic():
    return ck.catalogue.quartic_flow(kappa=0.05, Lambda=2.5)


@pytest.fixture(scope="module")
def qrep(quartic):
    return quartic.mode_equation(0.05).fourier()


def _gid(ax, gid):
    return [a for a in ax.get_children() if a.get_gid() == gid]


def _legend_texts(ax):
    """Texts of the legend of ax, or of the figure's legends (below the axes, or in a free panel cell)."""
    fig = ax.get_figure()
    legs = [ax.get_legend()] if ax.get_legend() is not None else \
        list(fig.legends) + [a.get_legend() for a in fig.axes if a.get_legend() is not None]
    assert legs, "no legend"
    return [t.get_text() for leg in legs for t in leg.get_texts()]


def test_airy_landscape_shows_saddles_paths_valleys(airy):
    x = -4.0
    contour = ck.Contour.real_axis()
    fig, ax = plotting.landscape(airy, x, contour, resolution=80)
    sad = _gid(ax, "saddle")
    assert len(sad) == 1 and len(sad[0].get_xdata()) == len(airy.saddles(x)) == 2
    np.testing.assert_allclose(sorted(sad[0].get_xdata()), [-2.0, 2.0])
    _geom, coeffs = decompose(airy, contour, x)
    arms = _gid(ax, "descent-arm")
    assert len(arms) == 2 * len(coeffs) == 4          # two descent arms per thimble of the real axis
    assert len(_gid(ax, "path-arrow")) == len(arms)    # one orientation arrow per visible arm
    assert len(_gid(ax, "valley")) == len(airy.valleys) == 3
    assert _gid(ax, "branch-point") == [] and _gid(ax, "branch-cut") == []
    names = _legend_texts(ax)
    for label in (LEGEND["saddle"], LEGEND["path"], LEGEND["valley"], LEGEND["level"]):
        assert label in names
    assert "branch point" not in names


def test_quartic_landscape_counts_every_element(qrep):
    x = -20.0
    fig, ax = plotting.landscape(qrep, x, ck.Contour.real_axis(), omega=0.05, resolution=80)
    assert len(_gid(ax, "saddle")[0].get_xdata()) == len(qrep.saddles(x)) == 4
    bps = _gid(ax, "branch-point")
    assert len(bps) == 1 and len(bps[0].get_xdata()) == len(qrep.branch_points) == 2
    assert len(_gid(ax, "branch-cut")) == len(qrep.branch_cuts) == 2
    _geom, coeffs = decompose(qrep, ck.Contour.real_axis(), x)
    assert len(_gid(ax, "descent-arm")) == 2 * len(coeffs)
    names = _legend_texts(ax)
    for label in (LEGEND[k] for k in ("saddle", "branch point", "cut", "path", "valley")):
        assert label in names
    assert ax.get_title() == r"(a) $x = -20$, $\omega = 0.05$"          # (b) is the zoom on the branch points


def test_landscape_window_auto_and_user(airy):
    fig, ax = plotting.landscape(airy, 2.0, resolution=40, colorbar=False, legend=False)
    xmin, xmax = ax.get_xlim()
    ymin, ymax = ax.get_ylim()
    for s in airy.saddles(2.0):                        # +-i sqrt(2), inside with a margin
        assert xmin < s.real < xmax and ymin + 0.1 < s.imag < ymax - 0.1
    fig, ax = plotting.landscape(airy, 2.0, window=(-1, 3, -2, 0.5), resolution=40)
    assert ax.get_xlim() == (-1, 3) and ax.get_ylim() == (-2, 0.5)
    assert _legend_texts(ax) and not _gid(ax, "descent-arm")


def test_landscape_into_existing_axes_keeps_global_rcparams(airy):
    from matplotlib.figure import Figure
    before = dict(matplotlib.rcParams)
    fig0 = Figure()
    ax0 = fig0.add_subplot()
    fig, ax = plotting.landscape(airy, -1.0, ax=ax0, resolution=40)
    assert fig is fig0 and ax is ax0
    assert dict(matplotlib.rcParams) == before


def test_landscape_refusals(airy, qrep):
    with pytest.raises(InputError, match="zero or negative size"):
        plotting.landscape(airy, 1.0, window=(0, 0, -1, 1))
    with pytest.raises(InputError, match="finite"):
        plotting.landscape(airy, math.inf)
    with pytest.raises(InputError):
        plotting.landscape(airy, float("nan"))
    foreign = qrep.basis()[0]
    with pytest.raises(ContourError, match="another k-space representation"):
        plotting.landscape(airy, 1.0, foreign)
    with pytest.raises(InputError):
        plotting.landscape("not a rep", 1.0)
    with pytest.raises(ContourkitError):
        plotting.landscape(airy, 1.0, resolution=3)


def test_dispersion_marks_every_real_root_with_its_mode_name(quartic):
    omega, x = 0.05, -20.0
    fig, ax = plotting.dispersion(quartic, x, omega)
    # real roots of D(omega, k; x) straight from numpy
    poly = quartic.dispersion_at(omega, x)
    r = np.roots([complex(c) for c in poly.all_coeffs()])
    real = np.sort(r[np.abs(r.imag) < 1e-9 * np.max(np.abs(r))].real)
    pts = _gid(ax, "intersection")
    assert len(pts) == 1
    np.testing.assert_allclose(np.sort(pts[0].get_xdata()), real, rtol=1e-9)
    np.testing.assert_allclose(pts[0].get_ydata(), omega)
    # labels in the axes and in its inset (the two roots near k = 0 sit closer than 2 % of the k range)
    labels = sorted(t.get_text() for a in [ax] + ax.child_axes for t in _gid(a, "root-label"))
    from contourkit.profiles.planewaves import local_modes
    expected = sorted(m.name for m in local_modes(quartic, omega, x) if m.kind == "propagating")
    assert labels == expected and len(labels) == len(real) == 4
    assert all(lab.startswith("int-") for lab in labels)
    # both norm signs drawn, distinguishable by colour and by line style
    pos, neg = _gid(ax, "branch+"), _gid(ax, "branch-")
    assert pos and neg
    assert pos[0].get_color() != neg[0].get_color() and pos[0].get_linestyle() != neg[0].get_linestyle()
    assert len(_gid(ax, "omega-line")) == 1


def test_dispersion_asymptotic_region_and_equation(airy):
    m = ck.catalogue.quartic_flow(kappa=0.05, Lambda=2.5, D=0.5)
    fig, ax = plotting.dispersion(m, omega=0.2, side="interior")
    assert sorted(t.get_text() for t in _gid(ax, "root-label")) == ["int-in+", "int-in-", "int-out+", "int-out-"]
    fig, ax = plotting.dispersion(airy, -4.0)
    np.testing.assert_allclose(np.sort(_gid(ax, "intersection")[0].get_xdata()), [-2.0, 2.0])
    with pytest.raises(InputError):
        plotting.dispersion(ck.catalogue.quartic_flow(), omega=0.1, side="exterior")   # linear: no limit
    with pytest.raises(InputError):
        plotting.dispersion(m, omega=0.1)                                              # neither x nor side
    with pytest.raises(InputError):
        plotting.dispersion(m, x=math.nan, omega=0.1)
    with pytest.raises(InputError):
        plotting.dispersion(airy, -4.0, omega=0.1)


def _thermal_rows(T, ws, method="contour", scale=1.0):
    return [{"omega": w, "hawking_temperature": T, "occupation": scale / math.expm1(w / T),
             "temperature_ratio": 1.0, "method": method} for w in ws]


def test_spectrum_has_thermal_curve_and_both_methods():
    T = 0.05 / (2 * math.pi)
    ws = T * np.array([0.5, 1.0, 2.0, 4.0])
    fig, (top, bottom) = plotting.spectrum(_thermal_rows(T, ws), direct=_thermal_rows(T, ws, "direct"))
    thermal = _gid(top, "thermal")[0]
    xd, yd = thermal.get_xdata(), thermal.get_ydata()
    np.testing.assert_allclose(yd, 1 / np.expm1(xd))                # Planck curve in omega/T_H
    occ = _gid(top, "occupation-contour")[0]
    np.testing.assert_allclose(occ.get_xdata(), [0.5, 1, 2, 4])
    np.testing.assert_allclose(occ.get_ydata(), 1 / np.expm1([0.5, 1, 2, 4]))
    assert _gid(top, "occupation-direct") and _gid(bottom, "temperature-direct") and _gid(bottom, "hawking-value")
    assert top.get_yscale() == "log"
    assert {"near-horizon contour", "direct (full profile)"} <= set(_legend_texts(top))


def test_spectrum_from_comparison_table_and_refusals():
    from contourkit.profiles.comparison import ComparisonTable
    rows = [{"omega": 0.01, "hawking_temperature": 0.008, "occupation_contour": 0.4, "temperature_ratio_contour": 1.0,
             "occupation_direct": None, "temperature_ratio_direct": None}]
    fig, (top, bottom) = plotting.spectrum(ComparisonTable(rows))
    assert _gid(top, "occupation-contour") and not _gid(top, "occupation-direct")
    with pytest.raises(InputError):
        plotting.spectrum([])
    with pytest.raises(InputError, match="occupation"):
        plotting.spectrum([{"omega": 1.0, "hawking_temperature": 1.0}])
    with pytest.raises(InputError):
        plotting.spectrum(_thermal_rows(1.0, [1.0]), xaxis="k")
    with pytest.raises(InputError):
        plotting.spectrum(_thermal_rows(1.0, [1.0]), ax="not axes")


@pytest.mark.slow
def test_spectrum_of_the_quartic_model(quartic):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ck.CoalescenceWarning)
        spec = quartic.spectrum([0.01, 0.03], rtol=1e-6)
    fig, (top, bottom) = plotting.spectrum(spec)
    np.testing.assert_allclose(_gid(bottom, "temperature-contour")[0].get_ydata(),
                               [r["temperature_ratio"] for r in spec.rows])


def test_save_writes_nonempty_vector_and_raster_files(airy, tmp_path):
    fig, ax = plotting.landscape(airy, -2.0, resolution=40)
    paths = plotting.save(fig, tmp_path / "sub" / "airy")
    assert [p.suffix for p in paths] == [".pdf", ".svg", ".png"]
    heads = {".pdf": b"%PDF", ".svg": b"<?xml", ".png": b"\x89PNG"}
    for p in paths:
        data = p.read_bytes()
        assert len(data) > 1000 and data.startswith(heads[p.suffix])
    assert b"<svg" in paths[1].read_bytes()
    with pytest.raises(InputError):
        plotting.save(fig, tmp_path / "x", formats=("bmp",))
    with pytest.raises(InputError):
        plotting.save("not a figure", tmp_path / "x")


def test_style_is_applied_only_inside_the_context():
    base = matplotlib.rcParams["font.size"]
    with plotting.journal_style():
        assert matplotlib.rcParams["font.size"] == 8.0
        assert matplotlib.rcParams["text.usetex"] is False
    assert matplotlib.rcParams["font.size"] == base
    assert plotting.style_rc({"font.size": 9})["font.size"] == 9
    with pytest.raises(InputError):
        plotting.style_rc("fancy")
