"""Shared style of contourkit's figures: rc dictionary, palette, markers, figure set-up, saving.

The style is applied through :func:`matplotlib.rc_context` only, so it never
changes the global ``rcParams``.  It is sized for a single journal column:
3.4 inches wide, 8 pt text (9 pt titles), thin lines, TrueType fonts
embedded in PDF and mathtext (never LaTeX) for every formula.
"""
import contextlib
import math
import pathlib

import matplotlib
from matplotlib.figure import Figure

from ..errors import InputError

#: single-column width of most physics journals, inches
COLUMN_WIDTH = 3.4

#: rcParams of the journal style (applied with matplotlib.rc_context, never globally)
JOURNAL_RC = {
    "figure.figsize": (COLUMN_WIDTH, 3.0),
    "figure.dpi": 150,
    "savefig.dpi": 300,
    "savefig.pad_inches": 0.02,
    "font.family": "sans-serif",
    "font.size": 8.0,
    "axes.titlesize": 9.0,
    "axes.labelsize": 8.0,
    "xtick.labelsize": 8.0,
    "ytick.labelsize": 8.0,
    "legend.fontsize": 8.0,
    "legend.title_fontsize": 8.0,
    "legend.frameon": True,
    "legend.framealpha": 0.9,
    "legend.edgecolor": "0.6",
    "legend.fancybox": False,
    "legend.handlelength": 1.8,
    "legend.borderpad": 0.3,
    "legend.labelspacing": 0.25,
    "legend.columnspacing": 1.0,
    "text.usetex": False,
    "mathtext.fontset": "dejavusans",
    "axes.linewidth": 0.6,
    "lines.linewidth": 1.0,
    "lines.markersize": 4.5,
    "xtick.major.width": 0.6,
    "ytick.major.width": 0.6,
    "xtick.minor.width": 0.4,
    "ytick.minor.width": 0.4,
    "xtick.major.size": 3.0,
    "ytick.major.size": 3.0,
    "xtick.direction": "in",
    "ytick.direction": "in",
    "xtick.top": True,
    "ytick.right": True,
    "hatch.linewidth": 0.5,
    "pdf.fonttype": 42,
    "ps.fonttype": 42,
    "svg.fonttype": "path",
    "svg.hashsalt": "contourkit",
}

#: Okabe-Ito colours (colour-vision-deficiency safe), by role
PALETTE = {
    "positive": "#0072B2",      # blue: positive norm
    "negative": "#D55E00",      # vermillion: negative norm
    "contour": "#000000",       # black: descent paths, the contour method's data
    "direct": "#009E73",        # bluish green: the direct solver's data
    "thermal": "#555555",       # grey: the thermal (Hawking) reference curve
    "saddle": "#009E73",
    "branch point": "#F0E442",
    "pole": "#56B4E9",
    "essential": "#CC79A7",
    "zero": "#FFFFFF",
    "cut": "#222222",
    "valley": "#444444",
    "level": "#5a5a5a",
    "omega": "#000000",
}

#: marker shapes by element (shapes alone tell the elements apart in greyscale)
MARKERS = {"saddle": "D", "branch point": "o", "pole": "s", "essential": "*", "zero": "^",
           "intersection": "o"}

#: line styles by norm sign (greyscale-safe)
NORM_LINESTYLE = {1: "-", -1: (0, (4.0, 1.6))}

_FORMATS = ("pdf", "svg", "png", "eps")


def style_rc(style="journal"):
    """The rcParams dictionary for ``style``.

    Parameters
    ----------
    style : "journal", None or dict
        ``"journal"``: :data:`JOURNAL_RC`; None: no changes (the caller's
        current rcParams); a dict: :data:`JOURNAL_RC` updated with it.

    Returns
    -------
    dict

    Examples
    --------
    >>> style_rc()["font.size"]
    8.0
    >>> style_rc({"font.size": 9})["font.size"]
    9
    >>> style_rc(None)
    {}
    """
    if style is None:
        return {}
    if isinstance(style, str):
        if style != "journal":
            raise InputError(f"unknown style {style!r}; use 'journal', None (current rcParams) or a dict of "
                             f"rcParams applied on top of the journal style")
        return dict(JOURNAL_RC)
    if isinstance(style, dict):
        rc = dict(JOURNAL_RC)
        rc.update(style)
        return rc
    raise InputError(f"style must be 'journal', None or a dict of rcParams, got {type(style).__name__}")


@contextlib.contextmanager
def journal_style(style="journal"):
    """Context manager applying a contourkit style with :func:`matplotlib.rc_context`.

    Inside the block new figures and artists use the style; on exit every
    rcParam is restored.

    Examples
    --------
    >>> import matplotlib
    >>> before = matplotlib.rcParams["font.size"]
    >>> with journal_style():
    ...     matplotlib.rcParams["font.size"]
    8.0
    >>> matplotlib.rcParams["font.size"] == before
    True
    """
    with matplotlib.rc_context(style_rc(style)):
        yield


def new_figure(ax=None, *, height=None, width=COLUMN_WIDTH):
    """A (figure, axes) pair: the caller's axes, or a new pyplot-free Figure with one axes.

    The figure is a plain :class:`matplotlib.figure.Figure` (not registered
    with pyplot, so no global figure list grows); show it in a notebook by
    evaluating it, or pass ``ax=`` from :func:`matplotlib.pyplot.subplots`
    for an interactive window.
    """
    if ax is not None:
        if not isinstance(ax, matplotlib.axes.Axes):
            raise InputError(f"ax must be a matplotlib Axes, got {type(ax).__name__}")
        return ax.get_figure(), ax
    fig = Figure(figsize=(width, height or matplotlib.rcParams["figure.figsize"][1]), layout="constrained")
    return fig, fig.add_subplot()


def save(fig, path_stem, formats=("pdf", "svg", "png"), *, dpi=None, style="journal"):
    """Write a figure as vector (PDF, SVG, EPS) and raster (PNG) files.

    Parameters
    ----------
    fig : matplotlib Figure
    path_stem : str or path-like
        File name without extension (a trailing ``.pdf``/``.svg``/``.png``/``.eps``
        is dropped); missing parent folders are created.
    formats : sequence of {"pdf", "svg", "png", "eps"}
    dpi : float, optional
        Raster resolution (default 300 from the style).
    style : "journal", None or dict
        rcParams in force while saving (see :func:`style_rc`).

    Returns
    -------
    list of pathlib.Path, one per format.  The files carry no creation date,
    so saving the same figure twice gives the same PDF and SVG.

    Examples
    --------
    >>> import tempfile, os
    >>> from matplotlib.figure import Figure
    >>> fig = Figure(); _ = fig.add_subplot().plot([0, 1], [0, 1])
    >>> d = tempfile.mkdtemp()
    >>> [p.suffix for p in save(fig, os.path.join(d, "line"))]
    ['.pdf', '.svg', '.png']
    """
    if not isinstance(fig, Figure):
        raise InputError(f"save needs a matplotlib Figure, got {type(fig).__name__}")
    if isinstance(formats, str):
        formats = (formats,)
    formats = tuple(str(f).lower().lstrip(".") for f in formats)
    bad = [f for f in formats if f not in _FORMATS]
    if bad or not formats:
        raise InputError(f"unsupported format(s) {bad or formats!r}; choose from {', '.join(_FORMATS)}")
    if dpi is not None and not (isinstance(dpi, (int, float)) and math.isfinite(dpi) and dpi > 0):
        raise InputError(f"dpi must be a positive number, got {dpi!r}")
    stem = pathlib.Path(path_stem)
    if stem.suffix.lower().lstrip(".") in _FORMATS:
        stem = stem.with_suffix("")
    if not stem.name:
        raise InputError(f"path_stem {str(path_stem)!r} has no file name")
    stem.parent.mkdir(parents=True, exist_ok=True)
    meta = {"pdf": {"CreationDate": None}, "svg": {"Date": None}, "png": {}, "eps": {}}
    out = []
    with matplotlib.rc_context(style_rc(style)):
        for f in formats:
            p = stem.with_name(stem.name + "." + f)
            kw = {"dpi": dpi} if dpi is not None else {}
            fig.savefig(p, format=f, metadata=meta[f], bbox_inches="tight", **kw)
            out.append(p)
    return out
