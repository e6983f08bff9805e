"""The complex-k landscape of ``Phi(k) = i k x + E(k)``: panels, zoom panels, colour scales, legend."""
import math

import matplotlib
import numpy as np
from matplotlib.figure import Figure

from ..errors import ContourError, InputError
from ..geometry.saddles import check_x, critical_points
from ._panel import LEGEND, POINT_GIDS, draw_panel, zoom_frame
from ._style import COLUMN_WIDTH, style_rc
from ._zoom import auto_window, magnification, shown_starts, zoom_windows

__all__ = ["landscape", "auto_window", "LEGEND", "POINT_GIDS"]

_LEGEND_PLACES = ("below", "inside")


def _resolve_rep(rep, omega):
    from ..symbolic.kspace import KSpaceRepresentation
    from ..symbolic.horizon import HorizonModel
    from ..symbolic.equation import ModeEquation
    if isinstance(rep, KSpaceRepresentation):
        return rep
    if isinstance(rep, ModeEquation):
        return rep.fourier()
    if isinstance(rep, HorizonModel):
        if omega is None:
            raise InputError("a HorizonModel needs the frequency: landscape(model, x, omega=...)")
        return rep.mode_equation(omega).fourier()
    raise InputError(f"landscape needs a KSpaceRepresentation (eq.fourier()), a ModeEquation or a HorizonModel "
                     f"with omega=..., got {type(rep).__name__}")


def _check_window(window, what="window"):
    try:
        w = [float(v) for v in window]
    except (TypeError, ValueError):
        raise InputError(f"{what} must be four numbers (xmin, xmax, ymin, ymax), got {window!r}")
    if len(w) != 4 or not all(math.isfinite(v) for v in w):
        raise InputError(f"{what} must be four finite numbers (xmin, xmax, ymin, ymax), got {window!r}")
    if not (w[1] > w[0] and w[3] > w[2]):
        raise InputError(f"{what} {tuple(w)} has zero or negative size; give (xmin, xmax, ymin, ymax) with "
                         f"xmin < xmax and ymin < ymax")
    return tuple(w)


def landscape(rep, x, contour=None, *, omega=None, window=None, zoom="auto", ax=None, resolution=241, clip=None,
              n_levels=14, colorbar=True, legend="below", title=None, style="journal"):
    r"""The complex-k plane of ``phi(x) = \int_C exp(i k x) f(k) dk`` at one position x.

    Draws the terrain ``Re Phi = log|exp(i k x) f(k)|`` (shading relative to
    the highest critical point in the panel, clipped to +-``clip``; each
    panel computes its own scale from its own window), level lines of
    ``Im Phi`` (the steepest-descent directions run along them; the lines
    stop at branch cuts, where Im Phi jumps), the valleys at infinity
    (hatched bands at the window edge, labelled with their index as used by
    :meth:`Contour.between`; drawn only in a window that holds every
    saddle and singular point, since a zoom does not reach infinity), the
    saddle points ``rep.saddles(x)``, branch points, poles, essential
    singularities and zeros of f (each its own marker shape), the branch
    cuts, and, for a contour, its steepest-descent decomposition: one line
    per descent arm of every thimble with a nonzero coefficient, with an
    arrow for the orientation the contour gives it (a real negative
    coefficient reverses the arrow; any coefficient other than 1 or -1 is
    written beside its saddle).

    Points that sit closer than 4 % of a window's width to each other get a
    zoom panel (below the main panel, framed and lettered in its parent);
    a zoom that still holds close points gets its own zoom, up to four zoom
    panels in all (with three or four the figure is two columns wide: the
    main panel on the left, the zooms in a 2 x 2 grid on the right).

    Parameters
    ----------
    rep : KSpaceRepresentation, ModeEquation, or HorizonModel
        A HorizonModel needs ``omega`` (its near-horizon equation at omega is used).
    x : float
        Position (finite, real).
    contour : Contour, optional
        A contour of this representation (``rep.basis()`` or
        ``Contour.real_axis()``, ``Contour.between(...)``, ...).
    omega : float, optional
        Frequency: builds the representation of a HorizonModel; shown in the title.
    window : (xmin, xmax, ymin, ymax), optional
        Main region of the k plane (default: a square holding every saddle,
        singular point and start of a drawn path with a 30 % margin).
    zoom : "auto", False, int or list of windows
        "auto": zoom panels where points are closer than 4 % of the window
        (at most 4); an int: at most that many; False: none; a list of
        ``(xmin, xmax, ymin, ymax)``: exactly these zoom panels.  With
        ``ax=`` given, no zoom panels are drawn (draw them yourself with
        ``window=`` into axes of your own).
    ax : matplotlib Axes, optional
        Draw the main panel into this axes (default: a new single-column figure).
    resolution : int
        Grid points along Re k in each panel (>= 20).
    clip : float, optional
        Shading range: ``Re Phi - Re Phi(k*)`` clipped to [-clip, clip] in
        every panel (default: per panel, the 80th percentile of
        ``|Re Phi - Re Phi(k*)|`` over the panel's window).
    n_levels : int
        Number of Im Phi level lines per panel (0: none).
    colorbar : bool
        A colour bar beside each panel.
    legend : "below", "inside" or False
        "below" (also True): a compact legend in three columns under the
        axes (outside them); "inside": in a corner of the main panel.
    title : str, optional
        Title of the main panel (default ``x = ..., omega = ...``).
    style : "journal", None or dict
        rcParams used while drawing (see :func:`contourkit.plotting.style_rc`).

    Returns
    -------
    (Figure, Axes)
        The main panel.  Zoom panels are the figure's other axes labelled
        ``"landscape-zoom"`` (``[a for a in fig.axes if a.get_label() ==
        "landscape-zoom"]``; also ``ax.zoom_panels``).  Artists carry a gid
        naming the element: ``"saddle"``, ``"branch-point"``, ``"pole"``,
        ``"essential"``, ``"zero"``, ``"critical-point"`` (one Line2D each,
        one marker per point), ``"branch-cut"``, ``"valley"``,
        ``"descent-arm"`` (one Line2D per drawn arm), ``"path-arrow"``,
        ``"terrain"``, ``"zoom-frame"``.

    Raises
    ------
    InputError
        Non-finite or complex x, a window of zero size, a bad resolution, zoom or legend.
    ContourError
        A contour that belongs to another representation.

    Examples
    --------
    >>> import matplotlib; matplotlib.use("Agg")
    >>> import sympy as sp, contourkit as ck
    >>> x = sp.Symbol("x"); y = sp.Function("y")
    >>> rep = ck.ModeEquation.from_ode(y(x).diff(x, 2) - x*y(x), y, x).fourier()
    >>> fig, ax = landscape(rep, -4.0, ck.Contour.real_axis(), resolution=60)
    >>> len([l for l in ax.get_lines() if l.get_gid() == "descent-arm"])
    4
    >>> len(next(l for l in ax.get_lines() if l.get_gid() == "saddle").get_xdata())
    2
    """
    from ..geometry.contours import Contour
    from ..geometry.decompose import decompose
    rep = _resolve_rep(rep, omega)
    x = check_x(x)
    if contour is not None:
        if not isinstance(contour, Contour):
            raise InputError(f"contour must be a contourkit Contour, got {type(contour).__name__}")
        if contour.owner is not None and contour.owner is not rep:
            raise ContourError("the contour belongs to another k-space representation (contour.owner is not this "
                               "rep); take it from this representation's basis() or build it with "
                               "Contour.real_axis/between/loop")
    if isinstance(resolution, bool) or not isinstance(resolution, (int, np.integer)) or resolution < 20:
        raise InputError(f"resolution must be an integer >= 20, got {resolution!r}")
    if isinstance(n_levels, bool) or not isinstance(n_levels, (int, np.integer)) or n_levels < 0:
        raise InputError(f"n_levels must be a non-negative integer, got {n_levels!r}")
    if clip is not None and not (isinstance(clip, (int, float)) and math.isfinite(clip) and clip > 0):
        raise InputError(f"clip must be a positive number, got {clip!r}")
    if legend is True:
        legend = "below"
    if legend not in (False, None) + _LEGEND_PLACES:
        raise InputError(f"legend must be 'below', 'inside' or False, got {legend!r}")
    if omega is not None:
        try:
            omega = float(omega)
        except (TypeError, ValueError):
            raise InputError(f"omega must be a number, got {omega!r}")
    if title is not None and not isinstance(title, str):
        raise InputError(f"title must be a string, got {type(title).__name__}")

    sad = np.asarray(rep.saddles(x), dtype=complex)
    crit = critical_points(rep, x)
    geom, coeffs = (None, [])
    if contour is not None:
        geom, coeffs = decompose(rep, contour, x)
    sing = np.array([s.k for s in rep.singularities], dtype=complex)
    starts = [geom.thimbles[i].sigma for _n, i, _c in coeffs] if geom is not None else []
    # the points drawn: saddles, singular points and the starts of the drawn paths
    allpts = np.concatenate([sad, sing, np.asarray(starts, complex)])
    win = _check_window(window) if window is not None else auto_window(allpts)

    def points_in(w):
        return np.concatenate([sad, sing, shown_starts(starts, sad, w)])
    zooms = _zoom_request(zoom, ax, points_in, win)
    # valleys at infinity only where the window holds every finite point of the plane
    from ._zoom import inside
    holds_all = bool(np.all(inside(allpts, win))) if allpts.size else True
    if title is None:
        title = f"$x = {x:g}$" + (f", $\\omega = {omega:g}$" if omega is not None else "")
    own = ax is None
    with matplotlib.rc_context(style_rc(style)):
        fig, ax, zaxes, lcell = _layout(ax, len(zooms), legend)
        opts = dict(resolution=resolution, clip=clip, n_levels=n_levels)
        kids = lambda j: [w for p, w in zooms if p == j]  # noqa: E731
        mesh, _c, handles = draw_panel(ax, rep, x, win, sad, crit, geom, coeffs, valleys=holds_all,
                                       panel_inches=_inches(ax), children=kids(0), **opts)
        ax.set_xlabel(r"$\mathrm{Re}\,k$")
        ax.set_ylabel(r"$\mathrm{Im}\,k$")
        ax.set_title(("(a) " if zooms else "") + title)
        if colorbar:
            _colorbar(fig, ax, mesh, label=True)
        wins = [win]
        for j, ((parent, zw), zax) in enumerate(zip(zooms, zaxes)):
            letter = "abcdefgh"[j + 1]
            zoom_frame(ax if parent == 0 else zaxes[parent - 1], zw, wins[parent], letter)
            zmesh, _zc, zh = draw_panel(zax, rep, x, zw, sad, crit, geom, coeffs, valleys=False,
                                        panel_inches=_inches(zax), children=kids(j + 1), **opts)
            for k, v in zh.items():
                handles.setdefault(k, v)
            zax.set_title(f"({letter}) \N{MULTIPLICATION SIGN}{magnification(wins[parent], zw)}", fontsize=8, loc="right")
            zax.tick_params(labelsize=6.5)
            zax.set_xlabel(r"$\mathrm{Re}\,k$", fontsize=7, labelpad=1)
            zax.set_ylabel(r"$\mathrm{Im}\,k$", fontsize=7, labelpad=1)
            for axis in (zax.xaxis, zax.yaxis):
                axis.set_major_locator(matplotlib.ticker.MaxNLocator(3))
                fmt = matplotlib.ticker.ScalarFormatter(useMathText=True)
                fmt.set_powerlimits((-2, 4))
                axis.set_major_formatter(fmt)
                axis.get_offset_text().set_fontsize(6.5)
            if colorbar:
                _colorbar(fig, zax, zmesh, label=False)
            wins.append(zw)
        ax.zoom_panels = list(zaxes)
        if legend and handles:
            _legend(fig, ax, handles, legend, own_figure=own, cell=lcell)
    return fig, ax


def _zoom_request(zoom, ax, points_in, win):
    if zoom is False or zoom is None or ax is not None:
        return []
    if isinstance(zoom, str):
        if zoom != "auto":
            raise InputError(f"zoom must be 'auto', False, a number of panels or a list of windows, got {zoom!r}")
        return zoom_windows(points_in, win)
    if isinstance(zoom, (int, np.integer)) and not isinstance(zoom, bool):
        if not 0 <= zoom <= 4:
            raise InputError(f"zoom as a number of panels must be 0 ... 4, got {zoom!r}")
        return zoom_windows(points_in, win, max_panels=int(zoom))
    try:
        ws = [_check_window(w, "a zoom window") for w in zoom]
    except TypeError:
        raise InputError(f"zoom must be 'auto', False, a number of panels or a list of windows, got {zoom!r}")
    if len(ws) > 4:
        raise InputError(f"at most 4 zoom windows fit a column figure, got {len(ws)}")
    return [(0, w) for w in ws]


def _inches(ax):
    pos = ax.get_position()
    fw, fh = ax.get_figure().get_size_inches()
    return min(pos.width * fw, pos.height * fh)


def _layout(ax, nz, legend):
    """(fig, main axes, zoom axes, legend cell or None) of a new figure, or the caller's axes."""
    from ._style import new_figure
    if ax is not None:
        fig, ax = new_figure(ax)
        return fig, ax, [], None
    if nz == 0:
        fig = Figure(figsize=(COLUMN_WIDTH, 2.95 + (0.55 if legend == "below" else 0.0)), layout="constrained")
        return fig, fig.add_subplot(label="landscape"), [], None
    if nz >= 3:                      # double-column figure: main panel left, 2 x 2 zoom panels right
        fig = Figure(figsize=(2 * COLUMN_WIDTH + 0.3, 3.6 + (0.45 if legend == "below" else 0.0)),
                     layout="constrained")
        gs = fig.add_gridspec(2, 4, width_ratios=[1.0, 1.0, 0.95, 0.95])
        main = fig.add_subplot(gs[:, :2], label="landscape")
        zaxes = [fig.add_subplot(gs[j // 2, 2 + j % 2], label="landscape-zoom") for j in range(nz)]
        return fig, main, zaxes, None
    cell = legend == "below" and nz == 1          # the legend fills the free cell beside the zoom panel
    extra = 0.55 if legend == "below" and not cell else 0.0
    fig = Figure(figsize=(COLUMN_WIDTH, 4.55 + extra), layout="constrained")
    gs = fig.add_gridspec(2, 2, height_ratios=[1.75, 1.0])
    main = fig.add_subplot(gs[0, :], label="landscape")
    zaxes = [fig.add_subplot(gs[1, j], label="landscape-zoom") for j in range(nz)]
    lcell = None
    if cell:
        lcell = fig.add_subplot(gs[1, 1], label="legend-cell")
        lcell.set_axis_off()
    return fig, main, zaxes, lcell


def _colorbar(fig, ax, mesh, *, label):
    cax = ax.inset_axes([1.04, 0.0, 0.05, 1.0])
    cb = fig.colorbar(mesh, cax=cax, extend="both", extendfrac=0.04)
    cb.ax.tick_params(labelsize=6.5 if not label else 7)
    fmt = matplotlib.ticker.ScalarFormatter(useMathText=True)
    fmt.set_powerlimits((-2, 3))
    cb.locator = matplotlib.ticker.MaxNLocator(4 if label else 3, symmetric=True)
    cb.formatter = fmt
    cb.update_ticks()
    cb.ax.yaxis.get_offset_text().set_fontsize(6.5)
    if label:
        cb.set_label(r"$\mathrm{Re}\,\Phi(k) - \mathrm{Re}\,\Phi(k_\ast)$", fontsize=7.5)
    cax.set_gid("colorbar")
    return cb


def _legend(fig, ax, handles, place, *, own_figure, cell=None):
    labels = list(handles)
    hs = [handles[k] for k in labels]
    kw = dict(fontsize=7, handlelength=1.5, handletextpad=0.5, columnspacing=0.9, labelspacing=0.3)
    if cell is not None:
        leg = cell.legend(hs, labels, loc="center", ncol=1, frameon=False, **kw)
    elif place == "inside":
        leg = ax.legend(hs, labels, loc="best", ncol=1, frameon=True, framealpha=0.85, borderpad=0.3, **kw)
    elif own_figure:
        wide = fig.get_size_inches()[0] > 1.5 * COLUMN_WIDTH
        leg = fig.legend(hs, labels, loc="outside lower center", ncol=5 if wide else 3, frameon=False, **kw)
    else:
        leg = ax.legend(hs, labels, loc="upper center", bbox_to_anchor=(0.5, -0.14), ncol=3, frameon=False, **kw)
    leg.set_gid("legend")
    return leg
