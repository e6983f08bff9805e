"""Measurable properties of a finished figure, for every figure of contourkit.plotting.

Use from any test module in tests/plotting (the folder is on sys.path when
pytest collects it)::

    from quality import assert_figure_quality
    report = assert_figure_quality(fig, tmp_path / "name")

``assert_figure_quality`` runs every check below and raises AssertionError
naming each failure; the single checks are public so that a test can assert
one property on its own.  The thresholds are common practice for journal
figures (a reader tells markers apart at about 3 pt; a legend should not take
more than a small part of the figure; axes should not run far beyond the
data) and are the ones issue 17 asks for:

* ``unresolved_points``: two markers of points (saddles, singular points,
  path starts, real roots; gids in ``POINT_GIDS``) closer than 3 pt on the
  page, unless another axes of the figure (a zoom panel or an inset, same
  data coordinates) shows both at least 3 pt apart;
* ``legend_fraction``: the legends' area over the figure's area (<= 0.15);
* ``axis_excess``: for every axis, how many times wider the limits are than
  the data drawn (lines whose gid starts with one of ``DATA_GIDS``);
  linear axes compare spans (a flat series counts as 1e-3 of its size
  wide), log axes compare the ratios hi/lo of limits and data (<= 100,
  i.e. at most two decades beyond the data in all);
  axes with equal aspect (landscapes) use the larger of the two data spans;
* ``text_overlaps``: pairs of text boxes that overlap (tick labels, axis
  labels, titles, offset texts, annotations, legends as whole boxes),
  measured with the renderer;
* ``save_and_read_back``: PDF, SVG and PNG (300 dpi) written by
  ``plotting.save`` and read back: PDF header, trailer, a page, embedded
  TrueType fonts; SVG parsed as XML with an ``svg`` root; PNG read with
  matplotlib and Pillow, 300 dpi in its header, not blank.
"""
import itertools
import xml.etree.ElementTree as ET

import matplotlib
import numpy as np
from matplotlib.backends.backend_agg import FigureCanvasAgg

from contourkit import plotting

POINT_GIDS = ("saddle", "branch-point", "pole", "essential", "zero", "critical-point", "intersection")
DATA_GIDS = ("occupation-", "temperature-", "branch", "intersection", "saddle", "pole", "essential", "zero",
             "critical-point", "cutoff-point", "data-")
#: reference lines, not data, although their gids start like data gids
NOT_DATA = ("branch-cut",)
MIN_POINTS = 3.0
MAX_LEGEND = 0.15
MAX_EXCESS = 100.0


def all_axes(fig):
    """Every axes of the figure, inset (child) axes included."""
    out = []

    def walk(a):
        out.append(a)
        for c in getattr(a, "child_axes", []):
            walk(c)
    for a in fig.axes:
        walk(a)
    return out


def render(fig, style="journal"):
    """Draw the figure (with the rcParams of ``style`` in force, as ``save`` does); returns the renderer."""
    if not isinstance(fig.canvas, FigureCanvasAgg):
        FigureCanvasAgg(fig)
    with matplotlib.rc_context(plotting.style_rc(style)):
        fig.canvas.draw()
    return fig.canvas.get_renderer()


def _points_pt(ax, xy):
    """Display positions in points (1/72 in) of data points."""
    d = ax.transData.transform(xy)
    return d * 72.0 / ax.get_figure().dpi


def _in_view(ax, xy):
    x0, x1 = sorted(ax.get_xlim())
    y0, y1 = sorted(ax.get_ylim())
    return (xy[:, 0] >= x0) & (xy[:, 0] <= x1) & (xy[:, 1] >= y0) & (xy[:, 1] <= y1)


def plotted_points(ax, gids=POINT_GIDS):
    """(n, 2) data coordinates of the markers of ``gids`` inside the view of ax."""
    pts = []
    for ln in ax.get_lines():
        if ln.get_gid() in gids and ln.get_visible():
            xy = np.column_stack([np.asarray(ln.get_xdata(), float), np.asarray(ln.get_ydata(), float)])
            xy = xy[np.all(np.isfinite(xy), axis=1)]
            pts.append(xy[_in_view(ax, xy)])
    return np.concatenate(pts) if pts else np.zeros((0, 2))


def unresolved_points(fig, *, min_pt=MIN_POINTS, gids=POINT_GIDS):
    """Pairs of distinct points closer than min_pt on the page in one axes and resolved in no other.

    Returns a list of (axes label, point, point, distance in pt).
    """
    render(fig)
    axes = all_axes(fig)
    bad = []
    for ax in axes:
        P = plotted_points(ax, gids)
        if len(P) < 2:
            continue
        D = _points_pt(ax, P)
        for i, j in itertools.combinations(range(len(P)), 2):
            dist = float(np.hypot(*(D[i] - D[j])))
            same = np.allclose(P[i], P[j], rtol=1e-12, atol=0)
            if dist >= min_pt or same:
                continue
            pair = np.array([P[i], P[j]])
            ok = False
            for other in axes:
                if other is ax or not np.all(_in_view(other, pair)):
                    continue
                Q = _points_pt(other, pair)
                if float(np.hypot(*(Q[0] - Q[1]))) >= min_pt:
                    ok = True
                    break
            if not ok:
                bad.append((ax.get_label(), tuple(P[i]), tuple(P[j]), dist))
    return bad


def legends(fig):
    """Every legend of the figure (figure legends and axes legends)."""
    out = list(fig.legends)
    for ax in all_axes(fig):
        leg = ax.get_legend()
        if leg is not None:
            out.append(leg)
    return out


def legend_fraction(fig):
    """Total legend area over the figure area (the full figure, before any tight cropping)."""
    r = render(fig)
    area = fig.bbox.width * fig.bbox.height
    return sum(leg.get_window_extent(r).width * leg.get_window_extent(r).height for leg in legends(fig)) / area


def _data_values(ax, prefixes):
    xs, ys = [], []
    for ln in ax.get_lines():
        g = ln.get_gid() or ""
        if ln.get_visible() and g.startswith(prefixes) and g not in NOT_DATA:
            x = np.asarray(ln.get_xdata(), float)
            y = np.asarray(ln.get_ydata(), float)
            ok = np.isfinite(x) & np.isfinite(y)
            xs.append(x[ok])
            ys.append(y[ok])
    if not xs:
        return None, None
    return np.concatenate(xs), np.concatenate(ys)


def _excess(lim, data, scale, flat_span=None):
    lo, hi = sorted(lim)
    if data.size == 0:
        return np.inf
    if scale == "log":
        d = data[data > 0]
        if d.size == 0 or lo <= 0:
            return np.inf
        return max((hi / lo) / (d.max() / d.min()), 1.0)
    span = flat_span if flat_span is not None else float(np.ptp(data))
    span = max(span, 1e-3 * float(np.max(np.abs(data))), 1e-300)
    return (hi - lo) / span


def axis_excess(fig, *, prefixes=DATA_GIDS):
    """{(axes label, "x"|"y"): factor} for every axes that draws data (lines with gids of ``prefixes``)."""
    render(fig)
    out = {}
    for n, ax in enumerate(all_axes(fig)):
        xd, yd = _data_values(ax, tuple(prefixes))
        if xd is None or xd.size == 0:
            continue
        vis = _in_view(ax, np.column_stack([xd, yd]))
        if not vis.any():
            out[(f"{n}:{ax.get_label()}", "visible")] = np.inf
            continue
        flat = None
        if ax.get_aspect() == 1.0:            # equal aspect: one length scale for both directions
            flat = max(float(np.ptp(xd[vis])), float(np.ptp(yd[vis])))
        # the data an axis should frame: the points in view along the other direction
        out[(f"{n}:{ax.get_label()}", "x")] = _excess(ax.get_xlim(), xd[vis], ax.get_xscale(), flat)
        out[(f"{n}:{ax.get_label()}", "y")] = _excess(ax.get_ylim(), yd[vis], ax.get_yscale(), flat)
    return out


def _text_items(fig, renderer):
    items = []

    def add(t, what):
        if t is None or not t.get_visible() or not t.get_text().strip():
            return
        if isinstance(t, matplotlib.text.Annotation) and hasattr(t, "_check_xy") and not t._check_xy(renderer):
            return
        bb = t.get_window_extent(renderer)
        if bb.width > 0 and bb.height > 0:
            items.append((what + ": " + t.get_text()[:30], bb))
    for n, ax in enumerate(all_axes(fig)):
        lab = f"{n}:{ax.get_label()}"
        if not ax.get_visible() or not ax.axison:
            pass
        else:
            for axis, name in ((ax.xaxis, "x"), (ax.yaxis, "y")):
                for tick in axis._update_ticks():        # the ticks drawn: those inside the view
                    for t in (tick.label1, tick.label2):
                        add(t, f"{lab} {name}tick")
                add(axis.label, f"{lab} {name}label")
                add(axis.get_offset_text(), f"{lab} {name}offset")
        for t in (ax.title, ax._left_title, ax._right_title):
            add(t, f"{lab} title")
        for t in ax.texts:
            add(t, f"{lab} text")
    for t in fig.texts:
        add(t, "figure text")
    if getattr(fig, "_suptitle", None) is not None:
        add(fig._suptitle, "suptitle")
    for k, leg in enumerate(legends(fig)):
        items.append((f"legend {k}", leg.get_window_extent(renderer)))
    return items


def text_overlaps(fig, *, tolerance=0.5):
    """Pairs of overlapping text boxes (tick labels, labels, titles, annotations, legends); tolerance in pixels."""
    r = render(fig)
    items = _text_items(fig, r)
    bad = []
    for (a, ba), (b, bb) in itertools.combinations(items, 2):
        w = min(ba.x1, bb.x1) - max(ba.x0, bb.x0)
        h = min(ba.y1, bb.y1) - max(ba.y0, bb.y0)
        if w > tolerance and h > tolerance:
            bad.append((a, b))
    return bad


def save_and_read_back(fig, stem, *, dpi=300):
    """Save PDF, SVG, PNG with plotting.save and read each back; returns {suffix: path}. Raises AssertionError."""
    from PIL import Image
    import matplotlib.image as mpimg
    paths = {p.suffix: p for p in plotting.save(fig, stem, ("pdf", "svg", "png"))}
    pdf = paths[".pdf"].read_bytes()
    assert pdf.startswith(b"%PDF-") and pdf.rstrip().endswith(b"%%EOF"), "PDF header or trailer missing"
    assert pdf.count(b"/Type /Page") >= 1, "the PDF has no page"
    assert b"/FontFile2" in pdf, "the PDF does not embed its TrueType fonts (pdf.fonttype 42)"
    root = ET.parse(paths[".svg"]).getroot()
    assert root.tag.endswith("svg"), f"the SVG root is {root.tag}"
    assert root.get("width", "").endswith("pt") and root.get("viewBox"), "the SVG has no size"
    with Image.open(paths[".png"]) as im:
        got = im.info.get("dpi", (0, 0))
        assert abs(got[0] - dpi) < 1 and abs(got[1] - dpi) < 1, f"PNG resolution {got}, not {dpi} dpi"
        w, h = im.size
    fw, fh = fig.get_size_inches()
    assert 0.5 * fw * dpi < w <= fw * dpi + 2 and 0.5 * fh * dpi < h <= fh * dpi + 2, \
        f"PNG of {w} x {h} px for a {fw:.2f} x {fh:.2f} in figure at {dpi} dpi"
    img = mpimg.imread(paths[".png"])
    assert img.shape[:2] == (h, w) and float(np.std(img[..., :3])) > 0.01, "the PNG is blank"
    return paths


def figure_report(fig, stem=None, *, min_pt=MIN_POINTS, prefixes=DATA_GIDS):
    """Every measured property in a dict (and the saved files when stem is given)."""
    rep = {"unresolved_points": unresolved_points(fig, min_pt=min_pt),
           "legend_fraction": legend_fraction(fig),
           "axis_excess": axis_excess(fig, prefixes=prefixes),
           "text_overlaps": text_overlaps(fig)}
    if stem is not None:
        rep["files"] = save_and_read_back(fig, stem)
    return rep


def assert_figure_quality(fig, stem=None, *, min_pt=MIN_POINTS, max_legend=MAX_LEGEND, max_excess=MAX_EXCESS,
                          prefixes=DATA_GIDS):
    """Run every check; raise AssertionError listing each property out of bounds; return the report."""
    rep = figure_report(fig, stem, min_pt=min_pt, prefixes=prefixes)
    problems = []
    if rep["unresolved_points"]:
        problems.append(f"points closer than {min_pt} pt without a zoom: {rep['unresolved_points'][:4]}")
    if rep["legend_fraction"] > max_legend:
        problems.append(f"legends take {rep['legend_fraction']:.1%} of the figure (> {max_legend:.0%})")
    wide = {k: v for k, v in rep["axis_excess"].items() if not v <= max_excess}
    if wide:
        problems.append(f"axis limits wider than {max_excess:g} x the data: {wide}")
    if rep["text_overlaps"]:
        problems.append(f"overlapping texts: {rep['text_overlaps'][:6]}")
    assert not problems, "; ".join(problems)
    return rep
