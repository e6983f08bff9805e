"""One panel of a landscape: terrain in the panel's own colour scale, level lines, valleys, paths, points."""
import math

import matplotlib
import numpy as np
from matplotlib.colors import ListedColormap
from matplotlib.lines import Line2D
from matplotlib.patches import FancyArrowPatch, Patch, Polygon, Rectangle

from ..geometry import phase
from ._style import MARKERS, PALETTE
from ._zoom import inside, shown_starts, width

#: labels of the legend entries, by element (short, so that the legend stays compact)
LEGEND = {
    "saddle": "saddle point",
    "branch point": "branch point",
    "pole": "pole",
    "essential": "essential sing.",
    "zero": "zero of $f$",
    "cut": "branch cut",
    "valley": "valley at $\\infty$",
    "level": r"$\mathrm{Im}\,\Phi$ level",
    "path": "descent path",
    "critical": "path start",
}

#: gids of the point markers (one Line2D per kind)
POINT_GIDS = ("saddle", "branch-point", "pole", "essential", "zero", "critical-point")

_KINDS = [("branch point", "branch-point"), ("pole", "pole"), ("essential", "essential"), ("zero", "zero")]


def terrain_cmap():
    """A light diverging map (purple below, orange above the reference level) so overlays stay visible."""
    base = matplotlib.colormaps["PuOr_r"](np.linspace(0, 1, 256))
    base[:, :3] = 0.35 + 0.65 * base[:, :3]
    return ListedColormap(base, name="contourkit_terrain")


def _cut_mask(rep, K, h):
    """True at grid nodes within ~1.5 cells of a branch cut or of a singular point."""
    mask = np.zeros(K.shape, bool)
    for s in rep.singularities:
        z = K - s.k
        mask |= np.abs(z) < 1.5 * h
        if s.kind in ("branch point", "essential"):
            w = z * np.exp(-1j * rep.cut_angle)       # cut along the positive real axis of w
            mask |= (w.real > -h) & (np.abs(w.imag) < 1.5 * h)
    return mask


def _densify(pts, n=24):
    pts = np.asarray(pts, complex)
    if len(pts) < 2:
        return pts
    t = np.linspace(0, 1, n, endpoint=False)
    seg = pts[:-1, None] + (pts[1:] - pts[:-1])[:, None] * t[None, :]
    return np.concatenate([seg.ravel(), pts[-1:]])


def _arrow(ax, pts, win, forward, color, size):
    """An orientation arrow at the middle of the visible part of a polyline; returns the patch or None."""
    d = _densify(pts)
    ins = inside(d, win)
    if ins.sum() < 3:
        return None
    idx = np.nonzero(ins)[0]
    run = np.split(idx, np.nonzero(np.diff(idx) > 1)[0] + 1)[0]       # first visible run
    seg = d[run]
    L = np.concatenate([[0], np.cumsum(np.abs(np.diff(seg)))])
    if L[-1] <= 0.02 * width(win):
        return None
    m = min(max(int(np.searchsorted(L, 0.55 * L[-1])), 1), len(seg) - 1)
    a, b = seg[m - 1], seg[m]
    if not forward:
        a, b = b, a
    mid = (a + b) / 2
    dirn = (b - a) / abs(b - a) if b != a else 1
    eps = 1e-3 * width(win)
    p = FancyArrowPatch(((mid - eps * dirn).real, (mid - eps * dirn).imag),
                        ((mid + eps * dirn).real, (mid + eps * dirn).imag),
                        arrowstyle="-|>", mutation_scale=size, color=color, lw=0.0, zorder=6)
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
    while arm.end == "valley" and inside(pts[-1:], win)[0] and tries < 4:
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


def fmt_coeff(c):
    """A coefficient as short text with a true minus sign."""
    c = complex(c)

    def num(v):
        return f"{v:.3g}".replace("-", "\N{MINUS SIGN}")
    if abs(c.imag) <= 1e-9 * abs(c):
        return num(c.real)
    if abs(c.real) <= 1e-9 * abs(c):
        return num(c.imag) + "i"
    sign = "+" if c.imag > 0 else "\N{MINUS SIGN}"
    return f"{num(c.real)}{sign}{num(abs(c.imag))}i"


def _phi_grid(rep, x, K):
    flat = K.ravel()
    with np.errstate(all="ignore"):      # grid nodes on a singular point give inf, masked below
        logs = phase.cut_plane_logs(rep, flat) if rep._kj.size else np.zeros((flat.size, 0), complex)
        P = phase.phi(rep, x, flat, logs).reshape(K.shape)
    return np.where(np.isfinite(P), P, np.nan + 0j)


def colour_scale(rep, x, crit, win, Pre, clip=None):
    """(reference, clip) of a panel, from the panel's own window.

    The reference is ``Re Phi`` at the highest critical point inside the
    window (the grid median if none is inside); ``clip`` (when not given) is
    the 80th percentile of ``|Re Phi - reference|`` over the window (2 digits), so that
    every panel, a zoom as well, shows its own relief.
    """
    crit = np.asarray(crit, dtype=complex)
    crit = crit[inside(crit, win)] if crit.size else crit
    ref = None
    if crit.size:
        cl = phase.cut_plane_logs(rep, crit) if rep._kj.size else np.zeros((crit.size, 0), complex)
        with np.errstate(all="ignore"):
            h = phase.phi(rep, x, crit, cl).real
        h = h[np.isfinite(h)]
        if h.size:
            ref = float(np.max(h))
    fin = Pre[np.isfinite(Pre)]
    if ref is None:
        ref = float(np.median(fin)) if fin.size else 0.0
    if clip is None:
        dev = np.abs(fin - ref)
        clip = float(np.percentile(dev, 80)) if dev.size else 1.0
        clip = max(clip, 1e-12 * max(1.0, abs(ref)))
        if not clip > 0:
            clip = 1.0
        clip = float(f"{clip:.2g}")
    return ref, clip


def draw_panel(ax, rep, x, win, sad, crit, geom, coeffs, *, resolution, clip, n_levels, valleys,
               panel_inches, children=()):
    """Draw one panel into ax; returns (mesh, clip, handles: dict label -> legend handle)."""
    xmin, xmax, ymin, ymax = win
    nx = int(resolution)
    ny = max(20, int(round(nx * (ymax - ymin) / (xmax - xmin))))
    nx, ny = min(nx, 2000), min(ny, 2000)
    X, Y = np.meshgrid(np.linspace(xmin, xmax, nx), np.linspace(ymin, ymax, ny))
    K = X + 1j * Y
    P = _phi_grid(rep, x, K)
    ref, clip = colour_scale(rep, x, crit, win, P.real, clip)
    R = np.clip(P.real - ref, -clip, clip)
    mesh = ax.pcolormesh(X, Y, np.ma.masked_invalid(R), cmap=terrain_cmap(), vmin=-clip, vmax=clip,
                         shading="auto", rasterized=True, zorder=0)
    mesh.set_gid("terrain")
    handles = {}
    size = max(5.0, min(9.0, 3.2 * panel_inches))        # arrow heads scaled to the panel, in points
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
                handles[LEGEND["level"]] = Line2D([], [], color=PALETTE["level"], lw=0.5)
    if valleys:
        _draw_valleys(ax, rep, x, win, size, handles)
    _draw_cuts(ax, rep, win, handles)
    if geom is not None:
        _draw_paths(ax, rep, geom, coeffs, win, sad, size, handles, children)
    for kind, gid in _KINDS:
        pts = np.array([s.k for s in rep.singularities if s.kind == kind], dtype=complex)
        if pts.size:
            ms = 8 if kind == "essential" else 5.0
            ln, = ax.plot(pts.real, pts.imag, ls="none", marker=MARKERS[kind], ms=ms, mfc=PALETTE[kind],
                          mec="black", mew=0.8, zorder=11, gid=gid, clip_on=True)
            handles[LEGEND[kind]] = ln
    if sad.size:
        ln, = ax.plot(sad.real, sad.imag, ls="none", marker=MARKERS["saddle"], ms=4.5, mfc=PALETTE["saddle"],
                      mec="black", mew=0.8, zorder=10, gid="saddle")
        handles = {LEGEND["saddle"]: ln, **handles}
    ax.set_xlim(xmin, xmax)
    ax.set_ylim(ymin, ymax)
    ax.set_aspect("equal", adjustable="box")
    return mesh, clip, handles


def _draw_valleys(ax, rep, x, win, size, handles):
    """Hatched bands at the window edge in the valley directions, with an outward arrow and the index."""
    xmin, xmax, ymin, ymax = win
    c = complex((xmin + xmax) / 2, (ymin + ymax) / 2)
    valleys = rep.valleys_at(x)
    for v in valleys:
        d = complex(math.cos(v.center), math.sin(v.center))
        edge = _edge_distance(c, d, win)
        # a band along the window edge, 12 % of the half-width deep, scaled to the window
        th = np.linspace(v.center - v.halfwidth, v.center + v.halfwidth, 61)
        dirs = np.exp(1j * th)
        e = np.array([_edge_distance(c, dd, win) for dd in dirs])
        inner = c + (e - 0.12 * min(xmax - xmin, ymax - ymin) / 2) * dirs
        outer = c + 1.02 * e * dirs
        ring = np.concatenate([inner, outer[::-1]])
        w = Polygon(np.column_stack([ring.real, ring.imag]), closed=True, facecolor=(0.3, 0.3, 0.3, 0.14),
                    edgecolor=PALETTE["valley"], hatch="////", lw=0.5, zorder=2)
        w.set_gid("valley")
        ax.add_patch(w)
        tip, tail = c + 0.985 * edge * d, c + 0.80 * edge * d
        arr = FancyArrowPatch((tail.real, tail.imag), (tip.real, tip.imag), arrowstyle="-|>", mutation_scale=size,
                              color=PALETTE["valley"], lw=0.8, zorder=3)
        arr.set_gid("valley-arrow")
        ax.add_patch(arr)
        off = complex(math.cos(v.center + 0.6 * v.halfwidth), math.sin(v.center + 0.6 * v.halfwidth))
        t = c + 0.9 * _edge_distance(c, off, win) * off
        ax.text(t.real, t.imag, f"$V_{{{v.index}}}$", ha="center", va="center", fontsize=7.5, zorder=7,
                bbox=dict(boxstyle="round,pad=0.12", fc="white", ec="none", alpha=0.75), gid="valley-label")
    if valleys:
        handles[LEGEND["valley"]] = Patch(facecolor=(0.3, 0.3, 0.3, 0.14), edgecolor=PALETTE["valley"],
                                          hatch="////", lw=0.5)


def _draw_cuts(ax, rep, win, handles):
    xmin, xmax, ymin, ymax = win
    c = complex((xmin + xmax) / 2, (ymin + ymax) / 2)
    corner = abs(complex(xmax, ymax) - c)
    cuts = rep.branch_cuts
    span = 4 * corner + max([abs(complex(p) - c) for p, _ in cuts] or [0])
    for p, ang in cuts:
        p = complex(p)
        e = p + span * complex(math.cos(ang), math.sin(ang))
        ax.plot([p.real, e.real], [p.imag, e.imag], color=PALETTE["cut"], lw=1.2, ls=(0, (1.0, 1.2)),
                solid_capstyle="butt", zorder=3, gid="branch-cut")
    if cuts:
        handles[LEGEND["cut"]] = Line2D([], [], color=PALETTE["cut"], lw=1.2, ls=(0, (1.0, 1.2)))


def _draw_paths(ax, rep, geom, coeffs, win, sad, size, handles, children=()):
    for n, i, _cl in coeffs:
        t = geom.thimbles[i]
        n = complex(n)
        real = abs(n.imag) <= 1e-9 * abs(n)
        forward = not (real and n.real < 0)
        for arm, out, sg in ((t.minus, False, -1), (t.plus, True, 1)):
            pts = _display_arm(rep, geom, t, arm, sg, win)
            ax.plot(pts.real, pts.imag, color=PALETTE["contour"], lw=1.3, zorder=5, gid="descent-arm",
                    solid_capstyle="round")
            _arrow(ax, pts, win, out == forward, PALETTE["contour"], size)
        zoomed = any(abs(t.sigma - complex((w[0] + w[1]) / 2, (w[2] + w[3]) / 2)) < max(width(w), 0.1 * width(win))
                     for w in children)             # written in the zoom panel instead
        if ((real and abs(abs(n.real) - 1) > 1e-9) or not real) and inside([t.sigma], win)[0] and not zoomed:
            txt = "\N{MULTIPLICATION SIGN}" + fmt_coeff(abs(n.real) if real else n)
            ax.annotate(txt, (t.sigma.real, t.sigma.imag), xytext=(5, 5), textcoords="offset points",
                        fontsize=7, zorder=8, gid="coefficient",
                        bbox=dict(boxstyle="round,pad=0.1", fc="white", ec="none", alpha=0.8))
    if coeffs:
        handles[LEGEND["path"]] = Line2D([], [], color=PALETTE["contour"], lw=1.3, marker=r"$\rightarrow$",
                                         markersize=7)
        starts = shown_starts([geom.thimbles[i].sigma for _n, i, _c in coeffs], sad, win)
        if starts.size:
            ln, = ax.plot(starts.real, starts.imag, ls="none", marker="o", ms=2.6, mfc="white", mec="black",
                          mew=0.7, zorder=8, gid="critical-point")
            handles[LEGEND["critical"]] = ln


def zoom_frame(ax, win, parent, label):
    """The outline of a zoom window in its parent panel (at least 10 % of the parent wide), with its letter."""
    half = max(width(win), 0.1 * width(parent)) / 2
    c = complex((win[0] + win[1]) / 2, (win[2] + win[3]) / 2)
    win = (c.real - half, c.real + half, c.imag - half, c.imag + half)
    r = Rectangle((win[0], win[2]), win[1] - win[0], win[3] - win[2], fill=False, ec="black", lw=0.7,
                  ls="-", zorder=12, gid="zoom-frame")
    ax.add_patch(r)
    ax.annotate(label, (win[1], win[3]), xytext=(2, 2), textcoords="offset points", fontsize=7, zorder=12,
                gid="zoom-label", bbox=dict(boxstyle="round,pad=0.1", fc="white", ec="none", alpha=0.8))
