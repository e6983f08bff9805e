"""Windows of the k plane: the automatic square window and the zoom windows that resolve close points."""
import numpy as np

#: points closer than this fraction of a window's width get a zoom panel
ZOOM_FRACTION = 0.04
#: a path start (critical point of Phi) closer than this fraction of the width to a saddle is not marked
START_FRACTION = 0.025


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


def width(win):
    """The larger side of a window."""
    return max(win[1] - win[0], win[3] - win[2])


def inside(p, win):
    """True where the complex points p lie in the window (edges included)."""
    p = np.asarray(p, dtype=complex)
    return (p.real >= win[0]) & (p.real <= win[1]) & (p.imag >= win[2]) & (p.imag <= win[3])


def shown_starts(starts, saddles, win):
    """The path starts worth a marker in ``win``: those inside it and visibly away from every saddle."""
    starts = np.asarray(starts, dtype=complex)
    saddles = np.asarray(saddles, dtype=complex)
    if not starts.size:
        return starts
    tol = START_FRACTION * width(win)
    keep = [p for p in starts[inside(starts, win)] if not saddles.size or np.min(np.abs(saddles - p)) > tol]
    return np.array(keep, dtype=complex)


def clusters(points, win, *, fraction=ZOOM_FRACTION):
    """Groups (arrays) of >= 2 distinct points of ``win`` linked by distances below fraction * width(win)."""
    pts = np.asarray(points, dtype=complex)
    pts = pts[np.isfinite(pts) & inside(pts, win)]
    if pts.size < 2:
        return []
    tol = fraction * width(win)
    n = pts.size
    parent = list(range(n))

    def root(i):
        while parent[i] != i:
            parent[i] = parent[parent[i]]
            i = parent[i]
        return i
    for i in range(n):
        for j in range(i + 1, n):
            if abs(pts[i] - pts[j]) < tol:
                parent[root(i)] = root(j)
    groups = {}
    for i in range(n):
        groups.setdefault(root(i), []).append(pts[i])
    out = []
    for g in groups.values():
        g = np.array(g, dtype=complex)
        if g.size >= 2 and np.ptp(g.real) + np.ptp(g.imag) > 0:
            out.append(g)
    return sorted(out, key=lambda g: (g.real.mean(), g.imag.mean()))


def zoom_window(group, *, margin=0.6):
    """A square window centred on a group of points, its half-width (1 + margin) times the group's half-extent."""
    g = np.asarray(group, dtype=complex)
    c = complex((g.real.min() + g.real.max()) / 2, (g.imag.min() + g.imag.max()) / 2)
    half = max(np.ptp(g.real), np.ptp(g.imag)) / 2 * (1 + margin)
    return (float(c.real - half), float(c.real + half), float(c.imag - half), float(c.imag + half))


def zoom_windows(points_in, win, *, max_panels=4, fraction=ZOOM_FRACTION):
    """Zoom windows for the groups of close points, nested where a zoom still holds close points.

    Parameters
    ----------
    points_in : callable
        ``points_in(window)`` gives the complex points drawn in that window.
    win : (xmin, xmax, ymin, ymax)
        The main window.
    max_panels : int
        At most this many zoom windows.

    Returns
    -------
    list of (parent_index, window)
        ``parent_index`` 0 is the main window, j >= 1 the j-th zoom window.

    Examples
    --------
    >>> pts = lambda w: [0, 1e-3, 5, -5]
    >>> [(p, [round(v, 4) for v in w]) for p, w in zoom_windows(pts, (-6, 6, -6, 6))]
    [(0, [-0.0003, 0.0013, -0.0008, 0.0008])]
    """
    wins = [tuple(win)]
    out = []
    j = 0
    while j < len(wins) and len(out) < max_panels:
        for g in clusters(points_in(wins[j]), wins[j], fraction=fraction):
            if len(out) >= max_panels:
                break
            zw = zoom_window(g)
            if width(zw) < 0.5 * width(wins[j]) and width(zw) > 1e-12 * max(1.0, float(np.max(np.abs(g)))):
                out.append((j, zw))
                wins.append(zw)
        j += 1
    return out


def magnification(parent, child):
    """How many times smaller the child window is (for the panel title)."""
    m = width(parent) / width(child)
    return f"{m:.2g}" if m < 10 else f"{int(float(f'{m:.2g}')):d}"
