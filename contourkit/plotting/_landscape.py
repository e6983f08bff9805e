"""The complex-k landscape of ``Phi(k) = i k x + E(k)``: terrain, level lines, geometry, paths."""
import math

import matplotlib
import numpy as np
from matplotlib.colors import ListedColormap
from matplotlib.lines import Line2D
from matplotlib.patches import FancyArrowPatch, Patch, Wedge

from ..geometry import phase
from ..errors import ContourError, InputError
from ..geometry.saddles import check_x, critical_points
from ._style import MARKERS, PALETTE, new_figure, style_rc

#: labels of the legend entries, by element (also the artists' gid, with spaces -> "-")
LEGEND = {
    "saddle": "saddle point",
    "branch point": "branch point",
    "pole": "pole",
    "essential": "essential singularity",
    "zero": "zero of $f$",
    "cut": "branch cut",
    "valley": "valley at infinity",
    "level": r"level line of $\mathrm{Im}\,\Phi$",
    "path": "steepest-descent path",
    "critical": r"path start (critical point of $\Phi$)",
}


def _terrain_cmap():
    """A light diverging map (purple below, orange above the saddle level) so overlays stay visible."""
    base = matplotlib.colormaps["PuOr_r"](np.linspace(0, 1, 256))
    base[:, :3] = 0.35 + 0.65 * base[:, :3]
    return ListedColormap(base, name="contourkit_terrain")


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


def _check_window(window):
    try:
        w = [float(v) for v in window]
    except (TypeError, ValueError):
        raise InputError(f"window must be four numbers (xmin, xmax, ymin, ymax), got {window!r}")
    if len(w) != 4 or not all(math.isfinite(v) for v in w):
        raise InputError(f"window must be four finite numbers (xmin, xmax, ymin, ymax), got {window!r}")
    if not (w[1] > w[0] and w[3] > w[2]):
        raise InputError(f"window {tuple(w)} has zero or negative size; give (xmin, xmax, ymin, ymax) with "
                         f"xmin < xmax and ymin < ymax")
    return tuple(w)


def auto_window(points, *, margin=0.3):
    """A square window (xmin, xmax, ymin, ymax) holding all points with a relative margin.

    Examples
    --------
    >>> auto_window([-2, 2])
    (-2.6, 2.6, -2.6, 2.6)
    """
    pts = np.asarray([complex(p) for p in points], dtype=complex)
    pts = pts[np.isfinite(pts)]
    if pts.size == 0:
        return (-1.0, 1.0, -1.0, 1.0)
    lo = complex(pts.real.min(), pts.imag.min())
    hi = complex(pts.real.max(), pts.imag.max())
    c = (lo + hi) / 2
    half = max((hi - lo).real, (hi - lo).imag) / 2
    scale = max(float(np.max(np.abs(pts))), 1e-12)
    half = max(half * (1 + margin), 0.5 * margin * scale, 1e-9)
    if half <= 1e-9 * scale or half == 1e-9:
        half = max(1.0, scale)
    r = lambda v: float(round(v, 12))  # noqa: E731
    return (r(c.real - half), r(c.real + half), r(c.imag - half), r(c.imag + half))


def _cut_mask(rep, K, h):
    """True at grid nodes within ~1.5 cells of a branch cut or of a singular point."""
    mask = np.zeros(K.shape, bool)
    for j, s in enumerate(rep.singularities):
        z = K - s.k
        mask |= np.abs(z) < 1.5 * h
        if s.kind in ("branch point", "essential"):
            d = np.exp(-1j * rep.cut_angle)
            w = z * d                       # cut along the positive real axis of w
            mask |= (w.real > -h) & (np.abs(w.imag) < 1.5 * h)
    return mask


def _densify(pts, n=24):
    pts = np.asarray(pts, complex)
    if len(pts) < 2:
        return pts
    t = np.linspace(0, 1, n, endpoint=False)
    seg = pts[:-1, None] + (pts[1:] - pts[:-1])[:, None] * t[None, :]
    return np.concatenate([seg.ravel(), pts[-1:]])


def _inside(p, win):
    return (p.real >= win[0]) & (p.real <= win[1]) & (p.imag >= win[2]) & (p.imag <= win[3])


def _arrow(ax, pts, win, forward, color):
    """An orientation arrow at the middle of the visible part of a polyline; returns the patch or None."""
    d = _densify(pts)
    ins = _inside(d, win)
    if ins.sum() < 3:
        return None
    idx = np.nonzero(ins)[0]
    # first visible run
    run = np.split(idx, np.nonzero(np.diff(idx) > 1)[0] + 1)[0]
    seg = d[run]
    L = np.concatenate([[0], np.cumsum(np.abs(np.diff(seg)))])
    if L[-1] <= 0:
        return None
    m = int(np.searchsorted(L, 0.55 * L[-1]))
    m = min(max(m, 1), len(seg) - 1)
    a, b = seg[m - 1], seg[m]
    if not forward:
        a, b = b, a
    mid = (a + b) / 2
    dirn = (b - a) / abs(b - a) if b != a else 1
    eps = 1e-3 * (win[1] - win[0])
    p = FancyArrowPatch(((mid - eps * dirn).real, (mid - eps * dirn).imag),
                        ((mid + eps * dirn).real, (mid + eps * dirn).imag),
                        arrowstyle="-|>", mutation_scale=9, color=color, lw=0.0, zorder=6)
    p.set_gid("path-arrow")
    ax.add_patch(p)
    return p


def _edge_distance(c, d, win):
    """Distance from the point c to the window edge along the unit direction d."""
    xmin, xmax, ymin, ymax = win
    tx = ((xmax if d.real > 0 else xmin) - c.real) / d.real if abs(d.real) > 1e-12 else math.inf
    ty = ((ymax if d.imag > 0 else ymin) - c.imag) / d.imag if abs(d.imag) > 1e-12 else math.inf
    return min(tx, ty)


def _display_arm(rep, geom, t, arm, sign, win):
    """The arm's vertices, traced further (same path, larger descent level) until it leaves the window."""
    from ..geometry.paths import trace_arm
    pts = arm.k
    u_stop = geom.u_stop
    tries = 0
    while arm.end == "valley" and _inside(pts[-1:], win)[0] and tries < 4:
        u_stop *= 4
        tries += 1
        try:
            arm = trace_arm(rep, geom.xg, t.sigma, sign * t.direction, u_stop=u_stop, crit=geom.crit,
                            max_steps=8000)
        except Exception:  # a display extension only: keep the traced arm
            break
        if arm.end in ("valley", "sink"):
            pts = arm.k
    return pts


def _fmt_coeff(c):
    c = complex(c)
    def num(v):
        return f"{v:.3g}".replace("-", "\N{MINUS SIGN}")
    if abs(c.imag) <= 1e-9 * abs(c):
        return num(c.real)
    if abs(c.real) <= 1e-9 * abs(c):
        return num(c.imag) + "i"
    sign = "+" if c.imag > 0 else "\N{MINUS SIGN}"
    return f"{num(c.real)}{sign}{num(abs(c.imag))}i"


def landscape(rep, x, contour=None, *, omega=None, window=None, ax=None, resolution=241, clip=None,
              n_levels=14, colorbar=True, legend=True, style="journal"):
    r"""The complex-k plane of ``phi(x) = \int_C exp(i k x) f(k) dk`` at one position x.

    Draws the terrain ``Re Phi = log|exp(i k x) f(k)|`` (shading, relative
    to the highest critical point, clipped to +-``clip``), level lines of
    ``Im Phi`` (the steepest-descent directions run along them; the lines
    stop at branch cuts, where Im Phi jumps), the valleys at infinity
    (hatched wedges at the window edge, labelled with their index as used
    by :meth:`Contour.between`), the saddle points ``rep.saddles(x)``,
    branch points, poles, essential singularities and zeros of f (each its
    own marker shape), the branch cuts, and, for a contour, its
    steepest-descent decomposition: one line per descent arm of every
    thimble with a nonzero coefficient, with an arrow for the orientation
    the contour gives it (a real negative coefficient reverses the arrow;
    any coefficient other than 1 or -1 is written beside its saddle).

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
        Region of the k plane (default: a square holding every saddle,
        critical point and singular point with a 30 % margin).
    ax : matplotlib Axes, optional
        Draw into this axes (default: a new single-column figure).
    resolution : int
        Grid points along Re k (>= 20).
    clip : float, optional
        Shading range: ``Re Phi - Re Phi(k*)`` is clipped to [-clip, clip]
        (default from the spread of the critical values, at least 4).
    n_levels : int
        Number of Im Phi level lines (0: none).
    colorbar, legend : bool
    style : "journal", None or dict
        rcParams used while drawing (see :func:`contourkit.plotting.style_rc`).

    Returns
    -------
    (Figure, Axes)
        Artists carry a gid naming the element: ``"saddle"``,
        ``"branch-point"``, ``"pole"``, ``"essential"``, ``"zero"`` (one
        Line2D each, one marker per point), ``"branch-cut"``, ``"valley"``,
        ``"descent-arm"`` (one Line2D per drawn arm), ``"path-arrow"``,
        ``"terrain"``.

    Raises
    ------
    InputError
        Non-finite or complex x, a window of zero size, a bad resolution.
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
    if omega is not None:
        try:
            omega = float(omega)
        except (TypeError, ValueError):
            raise InputError(f"omega must be a number, got {omega!r}")

    sad = np.asarray(rep.saddles(x), dtype=complex)
    crit = critical_points(rep, x)
    geom, coeffs = (None, [])
    if contour is not None:
        geom, coeffs = decompose(rep, contour, x)
    sing = rep.singularities
    win = _check_window(window) if window is not None else \
        auto_window(list(sad) + list(crit) + [s.k for s in sing])

    with matplotlib.rc_context(style_rc(style)):
        fig, ax = new_figure(ax, height=3.9 if legend else 2.9)
        _draw(ax, fig, rep, x, win, sad, crit, geom, coeffs, resolution, clip, n_levels, colorbar, legend,
              omega, contour)
    return fig, ax


def _phi_grid(rep, x, K):
    flat = K.ravel()
    with np.errstate(all="ignore"):      # grid nodes on a singular point give inf, masked below
        logs = phase.cut_plane_logs(rep, flat) if rep._kj.size else np.zeros((flat.size, 0), complex)
        P = phase.phi(rep, x, flat, logs).reshape(K.shape)
    P = np.where(np.isfinite(P), P, np.nan + 0j)
    return P


def _draw(ax, fig, rep, x, win, sad, crit, geom, coeffs, resolution, clip, n_levels, colorbar, legend, omega,
          contour):
    xmin, xmax, ymin, ymax = win
    nx = int(resolution)
    ny = max(20, int(round(nx * (ymax - ymin) / (xmax - xmin))))
    nx, ny = min(nx, 2000), min(ny, 2000)
    X, Y = np.meshgrid(np.linspace(xmin, xmax, nx), np.linspace(ymin, ymax, ny))
    K = X + 1j * Y
    P = _phi_grid(rep, x, K)
    # reference level: the highest critical point (the height the dominant saddle contributes)
    if crit.size:
        cl = phase.cut_plane_logs(rep, crit) if rep._kj.size else np.zeros((crit.size, 0), complex)
        with np.errstate(all="ignore"):
            heights = phase.phi(rep, x, crit, cl).real
        heights = heights[np.isfinite(heights)]
    else:
        heights = np.zeros(0)
    ref = float(np.max(heights)) if heights.size else float(np.nanmedian(P.real))
    if clip is None:
        spread = float(np.ptp(heights)) if heights.size else 0.0
        clip = min(max(4.0, 1.25 * spread), 60.0)
    R = np.clip(P.real - ref, -clip, clip)
    mesh = ax.pcolormesh(X, Y, np.ma.masked_invalid(R), cmap=_terrain_cmap(), vmin=-clip, vmax=clip,
                         shading="auto", rasterized=True, zorder=0)
    mesh.set_gid("terrain")
    handles = []
    # level lines of Im Phi, cut out along the branch cuts (where Im Phi jumps)
    if n_levels:
        h = max((xmax - xmin) / (nx - 1), (ymax - ymin) / (ny - 1))
        Im = np.where(_cut_mask(rep, K, h), np.nan, P.imag)
        fin = Im[np.isfinite(Im)]
        if fin.size and np.ptp(fin) > 0:
            lv = np.linspace(*np.percentile(fin, [4, 96]), n_levels + 2)[1:-1]
            if np.ptp(lv) > 0:
                cs = ax.contour(X, Y, np.ma.masked_invalid(Im), levels=lv, colors=PALETTE["level"],
                                linewidths=0.35, linestyles="solid", alpha=0.8, zorder=1)
                cs.set_gid("im-level")
                handles.append(Line2D([], [], color=PALETTE["level"], lw=0.5, label=LEGEND["level"]))
    # valleys at infinity: hatched wedges at the window edge, with their index
    c = complex((xmin + xmax) / 2, (ymin + ymax) / 2)
    corner = abs(complex(xmax, ymax) - c)
    valleys = rep.valleys_at(x)
    for v in valleys:
        d = complex(math.cos(v.center), math.sin(v.center))
        edge = _edge_distance(c, d, win)
        r_in = 0.86 * edge
        w = Wedge((c.real, c.imag), 1.5 * corner, math.degrees(v.center - v.halfwidth),
                  math.degrees(v.center + v.halfwidth), width=1.5 * corner - r_in, facecolor=(0.3, 0.3, 0.3, 0.16),
                  edgecolor=PALETTE["valley"], hatch="////", lw=0.5, zorder=2)
        w.set_gid("valley")
        ax.add_patch(w)
        tip = c + 0.985 * edge * d
        tail = c + 0.80 * edge * d
        arr = FancyArrowPatch((tail.real, tail.imag), (tip.real, tip.imag), arrowstyle="-|>", mutation_scale=8,
                              color=PALETTE["valley"], lw=0.8, zorder=3)
        arr.set_gid("valley-arrow")
        ax.add_patch(arr)
        off = complex(math.cos(v.center + 0.6 * v.halfwidth), math.sin(v.center + 0.6 * v.halfwidth))
        t = c + 0.9 * _edge_distance(c, off, win) * off
        ax.text(t.real, t.imag, f"$V_{{{v.index}}}$", ha="center", va="center", fontsize=8, zorder=7,
                bbox=dict(boxstyle="round,pad=0.12", fc="white", ec="none", alpha=0.75), gid="valley-label")
    if valleys:
        handles.append(Patch(facecolor=(0.3, 0.3, 0.3, 0.16), edgecolor=PALETTE["valley"], hatch="////", lw=0.5,
                             label=LEGEND["valley"]))
    # branch cuts
    cuts = rep.branch_cuts
    span = 4 * corner + max([abs(complex(p) - c) for p, _ in cuts] or [0])
    for p, ang in cuts:
        p = complex(p)
        e = p + span * complex(math.cos(ang), math.sin(ang))
        ax.plot([p.real, e.real], [p.imag, e.imag], color=PALETTE["cut"], lw=1.3, ls=(0, (1.0, 1.2)),
                solid_capstyle="butt", zorder=3, gid="branch-cut")
    if cuts:
        handles.append(Line2D([], [], color=PALETTE["cut"], lw=1.3, ls=(0, (1.0, 1.2)), label=LEGEND["cut"]))
    # descent paths of the contour
    if geom is not None:
        for n, i, _cl in coeffs:
            t = geom.thimbles[i]
            n = complex(n)
            real = abs(n.imag) <= 1e-9 * abs(n)
            forward = not (real and n.real < 0)
            for arm, out, sg in ((t.minus, False, -1), (t.plus, True, 1)):
                pts = _display_arm(rep, geom, t, arm, sg, win)
                ax.plot(pts.real, pts.imag, color=PALETTE["contour"], lw=1.4, zorder=5, gid="descent-arm",
                        solid_capstyle="round")
                _arrow(ax, pts, win, out == forward, PALETTE["contour"])
            if (real and abs(abs(n.real) - 1) > 1e-9) or not real:
                txt = ("\N{MULTIPLICATION SIGN}" + _fmt_coeff(abs(n.real) if real else n))
                ax.annotate(txt, (t.sigma.real, t.sigma.imag), xytext=(5, 5), textcoords="offset points",
                            fontsize=7.5, zorder=8, gid="coefficient",
                            bbox=dict(boxstyle="round,pad=0.1", fc="white", ec="none", alpha=0.8))
        if coeffs:
            handles.append(Line2D([], [], color=PALETTE["contour"], lw=1.4, marker=r"$\rightarrow$",
                                  markersize=7, label=LEGEND["path"]))
            starts = np.array([geom.thimbles[i].sigma for _n, i, _c in coeffs], dtype=complex)
            # mark the start only where it is visibly away from a saddle marker (O(1/x) apart)
            tol = 0.012 * max(xmax - xmin, ymax - ymin)
            starts = np.array([p for p in starts if not sad.size or np.min(np.abs(sad - p)) > tol], dtype=complex)
        if coeffs and starts.size:
            ln, = ax.plot(starts.real, starts.imag, ls="none", marker="o", ms=2.6, mfc="white", mec="black",
                          mew=0.7, zorder=8, gid="critical-point", label=LEGEND["critical"])
            handles.append(ln)
    # points: saddles and singular points, one Line2D per kind
    kinds = [("branch point", "branch-point"), ("pole", "pole"), ("essential", "essential"), ("zero", "zero")]
    for kind, gid in kinds:
        pts = np.array([s.k for s in rep.singularities if s.kind == kind], dtype=complex)
        if pts.size:
            ms = 9 if kind == "essential" else 5.5
            ln, = ax.plot(pts.real, pts.imag, ls="none", marker=MARKERS[kind], ms=ms, mfc=PALETTE[kind],
                          mec="black", mew=0.8, zorder=11, gid=gid, label=LEGEND[kind], clip_on=True)
            handles.append(ln)
    if sad.size:
        ln, = ax.plot(sad.real, sad.imag, ls="none", marker=MARKERS["saddle"], ms=5, mfc=PALETTE["saddle"],
                      mec="black", mew=0.8, zorder=10, gid="saddle", label=LEGEND["saddle"])
        handles.insert(0, ln)
    ax.set_xlim(xmin, xmax)
    ax.set_ylim(ymin, ymax)
    ax.set_aspect("equal", adjustable="box")
    ax.set_xlabel(r"$\mathrm{Re}\,k$")
    ax.set_ylabel(r"$\mathrm{Im}\,k$")
    title = f"$x = {x:g}$"
    if omega is not None:
        title += f", $\\omega = {omega:g}$"
    ax.set_title(title)
    if colorbar:
        cax = ax.inset_axes([1.03, 0.0, 0.045, 1.0])
        cb = fig.colorbar(mesh, cax=cax, extend="both", extendfrac=0.04)
        cb.set_label(r"$\mathrm{Re}\,\Phi(k) - \mathrm{Re}\,\Phi(k_\ast)$")
        cb.ax.tick_params(labelsize=7.5)
    if legend and handles:
        ax.legend(handles=handles, loc="upper center", bbox_to_anchor=(0.5, -0.16), ncol=2, frameon=False,
                  handlelength=1.6)
