"""Figures a journal accepts as they come out: measured properties of every figure type (issue 17).

Each figure of contourkit.plotting is rendered for the catalogue models
(contourkit.catalogue: nondispersive, quartic super- and subluminal, the
dielectric front; our own scenarios) and for one model file
(worked_examples/models/superluminal.toml), then checked by
tests/plotting/quality.py: markers of distinct points at least 3 pt apart on
the page or resolved in a zoom panel, legends at most 15 % of the figure,
axis limits within a factor 100 of the data drawn, no overlapping text, and
PDF, SVG and PNG (300 dpi) written and read back.  The thresholds are common
practice for journal figures and those of the issue.  Besides the generic
checks, each test asserts what the figure must show, against numbers from
outside the plotting code: numpy.roots for the real roots of the dispersion
relation (common practice), the cut-off of contourkit.profiles.cutoff checked
against the closed form omega_max = Lambda (u - s) sqrt(s^2 - 1),
s = (u + sqrt(u^2 + 8))/4 of a superluminal quartic flow (J. Macher,
R. Parentani, Phys. Rev. D 79 (2009) 124008, see REFERENCES.md), and the
Planck curve 1/(exp(omega/T_H) - 1) (Hawking's thermal occupation; DLMF 4.2
for exp).
"""
import math
import pathlib
import warnings

import matplotlib

matplotlib.use("Agg")

import numpy as np  # noqa: E402
import pytest  # noqa: E402

import contourkit as ck  # noqa: E402
from contourkit import plotting  # noqa: E402
from quality import (all_axes, assert_figure_quality, axis_excess, legend_fraction, plotted_points,  # noqa: E402
                     text_overlaps, unresolved_points)

MODEL_FILE = pathlib.Path(__file__).resolve().parents[2] / "worked_examples" / "models" / "superluminal.toml"


@pytest.fixture(autouse=True)
def _quiet():
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ck.CoalescenceWarning)
        warnings.filterwarnings("ignore", message=".*above the cut-off")   # expected beyond omega_max
        yield


def _gid(ax, gid):
    return [a for a in ax.get_children() if a.get_gid() == gid]


def _zooms(fig):
    return [a for a in fig.axes if a.get_label() == "landscape-zoom"]


# ---------------------------------------------------------------- landscapes

def test_horizon_landscape_zoom_resolves_branch_points_and_saddles(tmp_path):
    model = ck.catalogue.quartic_flow(kappa=0.05, Lambda=2.5)
    omega, x = 0.05, -20.0
    rep = model.mode_equation(omega).fourier()
    fig, ax = plotting.landscape(rep, x, ck.Contour.real_axis(), omega=omega)
    # the branch points k = 0 and k = -omega (rep.branch_points) sit 1 % of the window apart: a zoom shows them
    bps = np.array(sorted(s.k.real for s in rep.singularities if s.kind == "branch point"))
    np.testing.assert_allclose(bps, [-omega, 0.0], atol=1e-12)
    zooms = _zooms(fig)
    assert len(zooms) == 1 and _gid(ax, "zoom-frame")
    z = zooms[0]
    for b in bps:
        assert z.get_xlim()[0] < b < z.get_xlim()[1]
    # every saddle of rep.saddles(x) is drawn in the main panel; the two small ones again in the zoom
    assert len(_gid(ax, "saddle")[0].get_xdata()) == len(rep.saddles(x)) == 4
    assert len(plotted_points(z, ("saddle",))) == 2
    # colour scale of each panel from its own window: the zoom's range is far smaller than the main one
    main_clip = _gid(ax, "terrain")[0].get_clim()[1]
    zoom_clip = _gid(z, "terrain")[0].get_clim()[1]
    assert zoom_clip < 0.2 * main_clip
    # valleys at infinity only in the main panel (a zoom does not reach infinity)
    assert len(_gid(ax, "valley")) == 3 and not _gid(z, "valley")
    assert ax.get_title().endswith(r"$x = -20$, $\omega = 0.05$")
    rep_q = assert_figure_quality(fig, tmp_path / "horizon_landscape")
    assert rep_q["legend_fraction"] <= 0.15


def test_without_zoom_the_close_points_are_reported(tmp_path):
    """The check itself can fail: the same landscape without its zoom panel has unresolved points."""
    model = ck.catalogue.quartic_flow(kappa=0.05, Lambda=2.5)
    rep = model.mode_equation(0.05).fourier()
    fig, ax = plotting.landscape(rep, -20.0, ck.Contour.real_axis(), omega=0.05, zoom=False, resolution=60)
    bad = unresolved_points(fig)
    assert bad and all(d < 3 for *_p, d in bad)


def test_dielectric_front_landscape_nested_zooms(tmp_path):
    m = ck.catalogue.dielectric_front()
    omega = float(m.kappa)
    x = -1 / omega
    rep = m.mode_equation(omega).fourier()
    fig, ax = plotting.landscape(rep, x, ck.Contour.real_axis(), omega=omega, resolution=61)
    zooms = _zooms(fig)
    assert 2 <= len(zooms) <= 4
    # the saddle next to the branch point near k = -1e-3 (2.8e-5 apart, from rep.saddles / rep.branch_points)
    sad = np.asarray(rep.saddles(x))
    bps = np.array([s.k for s in rep.singularities if s.kind == "branch point"])
    d = np.min(np.abs(sad[:, None] - bps[None, :]))
    assert d < 1e-3 * (ax.get_xlim()[1] - ax.get_xlim()[0])
    assert_figure_quality(fig, tmp_path / "dielectric_landscape")


def test_airy_and_catalogue_landscapes(tmp_path):
    import sympy as sp
    X = sp.Symbol("x")
    y = sp.Function("y")
    airy = ck.ModeEquation.from_ode(y(X).diff(X, 2) - X * y(X), y, X).fourier()    # DLMF 9.2.1
    fig, ax = plotting.landscape(airy, -4.0, ck.Contour.real_axis(), resolution=80)
    assert not _zooms(fig)                     # saddles +-2 (DLMF 9.5.4 exponent) are far apart
    assert_figure_quality(fig, tmp_path / "airy")
    nd = ck.catalogue.nondispersive_flow(kappa=0.05)
    fig, ax = plotting.landscape(nd, 20.0, omega=0.05, resolution=80)
    assert_figure_quality(fig, tmp_path / "nondispersive")


def test_model_file_landscape_basis_contour(tmp_path):
    model = ck.load_model(MODEL_FILE)
    omega = 0.05
    rep = model.mode_equation(omega).fourier()
    contour = rep.basis()[-1]                  # the loop around the branch point at 0
    fig, ax = plotting.landscape(rep, 20.0, contour, omega=omega, resolution=80)
    assert _gid(ax, "descent-arm")
    assert_figure_quality(fig, tmp_path / "file_landscape")


def test_legend_outside_and_inside_are_compact(tmp_path):
    import sympy as sp
    X = sp.Symbol("x")
    y = sp.Function("y")
    airy = ck.ModeEquation.from_ode(y(X).diff(X, 2) - X * y(X), y, X).fourier()
    for place in ("below", "inside"):
        fig, ax = plotting.landscape(airy, -4.0, ck.Contour.real_axis(), resolution=40, legend=place)
        assert legend_fraction(fig) <= 0.15
    with pytest.raises(ck.InputError):
        plotting.landscape(airy, -4.0, legend="left")
    with pytest.raises(ck.InputError):
        plotting.landscape(airy, -4.0, zoom="everywhere")


# ---------------------------------------------------------------- spectra

@pytest.fixture(scope="module")
def tanh_flow():
    return ck.catalogue.quartic_flow(kappa=0.05, Lambda=2.5, D=0.5)


def test_cutoff_against_the_closed_form(tanh_flow):
    # interior of the tanh flow: v = -1 - D = -1.5, so u = 1.5 (Macher & Parentani 2009)
    u, Lam = 1.5, 2.5
    s = (u + math.sqrt(u * u + 8)) / 4
    assert tanh_flow.omega_max == pytest.approx(Lam * (u - s) * math.sqrt(s * s - 1), rel=1e-10)


def test_spectrum_with_cutoff_inside_its_range(tanh_flow, tmp_path):
    T = tanh_flow.hawking_temperature
    wmax = tanh_flow.omega_max
    ws = [0.03, 0.1, 0.25, 0.4, 0.55, 0.7]                  # two above omega_max = 0.501
    table = ck.compare(tanh_flow, ws, on_error="record")
    fig, (top, bottom) = plotting.spectrum(table, model=tanh_flow, xaxis="omega/kappa")
    kappa = 2 * math.pi * T
    cut = _gid(top, "cutoff")
    assert len(cut) == 1 and cut[0].get_xdata()[0] == pytest.approx(wmax / kappa)
    assert _gid(bottom, "cutoff")
    lo, hi = top.get_xlim()
    assert lo < wmax / kappa < hi
    # above the cut-off the direct solver has no Hawking channel (beta = 0): left out, never drawn at zero
    above = [r for r in table.rows if r["omega"] > wmax]
    assert above and all(not r["occupation_direct"] for r in above)
    for gid, ax_ in (("occupation-direct", top), ("temperature-direct", bottom)):
        ln = _gid(ax_, gid)[0]
        yd = np.asarray(ln.get_ydata(), float)
        xd = np.asarray(ln.get_xdata(), float)
        assert not np.any(yd == 0)
        assert np.all(np.isnan(yd[xd > wmax / kappa]))
        assert np.sum(np.isfinite(yd)) == len(ws) - len(above)
    # the thermal curve is drawn over the range of the data that have a value only (above the
    # cut-off neither method has a Hawking channel), and it is the Planck curve
    th = _gid(top, "thermal")[0]
    xt = np.asarray(th.get_xdata())
    valued = [w for w in ws if w < wmax]
    assert xt.min() == pytest.approx(valued[0] / kappa) and xt.max() == pytest.approx(valued[-1] / kappa)
    np.testing.assert_allclose(th.get_ydata(), 1 / np.expm1(2 * math.pi * xt), rtol=1e-12)
    rep = assert_figure_quality(fig, tmp_path / "spectrum_cutoff")
    assert rep["axis_excess"]


def _rows(T, ws, **over):
    rows = [{"omega": w, "hawking_temperature": T, "occupation": 1 / math.expm1(w / T), "temperature_ratio": 1.0,
             "success": True, "method": "contour"} for w in ws]
    for i, r in over.items():
        rows[int(i[1:])].update(r)
    return rows


def test_missing_values_are_left_out_never_zero(tmp_path):
    T = 0.01
    ws = T * np.arange(1, 9, dtype=float)
    rows = _rows(T, ws, r1={"occupation": None, "temperature_ratio": None},
                 r2={"occupation": float("nan"), "temperature_ratio": float("nan")},
                 r3={"hawking_channel": False, "occupation": 0.0, "temperature_ratio": 0.0},
                 r5={"success": False, "occupation": 0.0, "temperature_ratio": 0.0})
    del rows[4]["occupation"], rows[4]["temperature_ratio"]                  # missing keys
    fig, (top, bottom) = plotting.spectrum(rows, xaxis="omega")
    for ax_, gid in ((top, "occupation-contour"), (bottom, "temperature-contour")):
        ln = _gid(ax_, gid)[0]
        y = np.asarray(ln.get_ydata(), float)
        assert not np.any(y == 0)
        assert np.isfinite(y).sum() == 3                                    # rows 0, 6, 7
        np.testing.assert_allclose(np.asarray(ln.get_xdata())[np.isfinite(y)], ws[[0, 6, 7]])
    # the y limits come from the data: the lowest occupation (at omega = 8 T) sets the bottom
    ylo, yhi = top.get_ylim()
    assert ylo < 1 / math.expm1(8) and yhi < 100 * 1 / math.expm1(1)
    assert_figure_quality(fig, tmp_path / "spectrum_missing")


def test_axis_excess_detects_a_runaway_axis():
    T = 0.01
    fig, (top, bottom) = plotting.spectrum(_rows(T, T * np.array([1.0, 2.0, 3.0])))
    assert max(axis_excess(fig).values()) <= 100
    top.set_ylim(1e-9, 1e7)                       # the axis of the issue: far beyond the data
    assert max(axis_excess(fig).values()) > 100


@pytest.mark.parametrize("name", ["nondispersive", "quartic", "subluminal",
                                  pytest.param("dielectric", marks=pytest.mark.slow), "file"])
def test_spectrum_of_each_model(name, tmp_path):
    models = {"nondispersive": lambda: ck.catalogue.nondispersive_flow(),
              "quartic": lambda: ck.catalogue.quartic_flow(),
              "subluminal": lambda: ck.catalogue.quartic_flow(branch="subluminal"),
              "dielectric": lambda: ck.catalogue.dielectric_front(),
              "file": lambda: ck.load_model(MODEL_FILE)}
    m = models[name]()
    T = m.hawking_temperature
    spec = m.spectrum(T * np.array([0.5, 1.0, 2.0, 4.0, 8.0]), rtol=1e-6)
    fig, (top, bottom) = plotting.spectrum(spec, model=m)
    # the figure shows the engine's numbers: |beta|^2 and T_eff/T_H of every row, and T_eff/T_H near 1
    occ = _gid(top, "occupation-contour")[0]
    np.testing.assert_allclose(occ.get_ydata(), [r["occupation"] for r in spec.rows], rtol=1e-12)
    tr = np.asarray(_gid(bottom, "temperature-contour")[0].get_ydata())
    np.testing.assert_allclose(tr, [r["temperature_ratio"] for r in spec.rows], rtol=1e-12)
    np.testing.assert_allclose(tr, 1.0, atol=0.01)       # Hawking's T_H = kappa/2pi below the dispersive scale
    if m.omega_max is not None:                    # the dielectric front: cut-off at 19 T_H, inside 1.5 x range
        assert _gid(top, "cutoff")
    assert_figure_quality(fig, tmp_path / f"spectrum_{name}")


# ---------------------------------------------------------------- dispersion

def _real_roots(poly):
    r = np.roots([complex(c) for c in poly])
    return np.sort(r[np.abs(r.imag) < 1e-9 * np.max(np.abs(r))].real)


def test_tanh_flow_dispersion_centred_on_roots_and_hump(tanh_flow, tmp_path):
    from contourkit.profiles import planewaves
    omega = 0.2
    fig, ax = plotting.dispersion(tanh_flow, omega=omega, side="interior")
    wmax = tanh_flow.omega_max
    lo, hi = ax.get_ylim()
    assert hi > wmax and hi < 2 * wmax and lo < 0 < omega          # the hump below omega_max is resolved
    cut = _gid(ax, "cutoff")
    assert cut and cut[0].get_ydata()[0] == pytest.approx(wmax)
    import sympy as sp
    D = planewaves.asymptotic_dispersion(tanh_flow, "interior")
    k = sp.Symbol("k")
    from contourkit.symbolic._sym import KS, OMEGA
    real = _real_roots(sp.Poly(D.subs(OMEGA, sp.Rational(1, 5)), KS).all_coeffs())
    assert len(real) == 4
    xl = ax.get_xlim()
    assert xl[0] < real.min() and real.max() < xl[1] and (xl[1] - xl[0]) < 3 * (real.max() - real.min())
    assert r"\omega = 0.2" in ax.get_title()
    del k
    assert_figure_quality(fig, tmp_path / "tanh_dispersion")


def test_dispersion_close_roots_get_an_inset(tmp_path):
    q = ck.catalogue.quartic_flow(kappa=0.05, Lambda=2.5)
    fig, ax = plotting.dispersion(q, -20.0, 0.05)
    insets = [a for a in all_axes(fig) if a.get_label() == "root-zoom"]
    assert len(insets) == 1
    real = _real_roots(q.dispersion_at(0.05, -20.0).all_coeffs())
    close = real[np.abs(real) < 0.1]
    assert len(close) == 2
    xl = insets[0].get_xlim()
    assert all(xl[0] < c < xl[1] for c in close)
    assert_figure_quality(fig, tmp_path / "quartic_dispersion")


def test_dielectric_and_file_dispersion(tmp_path):
    d = ck.catalogue.dielectric_front()
    fig, ax = plotting.dispersion(d, omega=0.002, side="exterior")
    assert _gid(ax, "cutoff")                           # the exterior cut-off 0.00312 sets the range
    assert ax.get_ylim()[1] > d.omega_max
    assert_figure_quality(fig, tmp_path / "dielectric_dispersion")
    m = ck.load_model(MODEL_FILE)
    fig, ax = plotting.dispersion(m, 20.0, 0.05)
    assert_figure_quality(fig, tmp_path / "file_dispersion")


def test_overlapping_text_is_detected():
    """The text check can fail: two titles written on top of each other are reported."""
    T = 0.01
    fig, (top, bottom) = plotting.spectrum(_rows(T, T * np.array([1.0, 2.0, 3.0])))
    assert not text_overlaps(fig)
    top.text(0.5, 0.5, "overlap", transform=top.transAxes)
    top.text(0.5, 0.5, "overlap", transform=top.transAxes)
    assert text_overlaps(fig)
