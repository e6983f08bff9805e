"""Every zero of an analytic function in a rectangle: argument principle, moments, deflation.

The function is given by its logarithm ``log f(z)`` (complex; the imaginary
part may be off by any multiple of 2 pi, as when it is a sum of logarithms of
LU pivots), so that huge or tiny values of f do not overflow.

* Counting: the boundary of the box is sampled adaptively until the phase of
  f changes by less than ``MAX_ARG_STEP`` rad and ``log|f|`` by less than 2
  between neighbouring samples; the phase accumulated around the boundary is
  2 pi times the number of zeros inside (argument principle).  An edge that
  passes through (or too near) a zero is moved outwards by 1% of the box.
* Locating: the contour moments ``s_p = (1/2 pi i) oint z^p dlog f`` (midpoint
  rule on the boundary samples), minus the powers of the zeros already
  found, give the elementary symmetric functions of the rest (Newton's
  identities) and so first estimates [1]_; each is polished by a secant
  iteration on ``log f - sum_j log(z - z_j)`` (deflation by the zeros found:
  no zero twice).  When fewer zeros than the count are found the box is
  bisected and each half counted again.

Iterates that fall below the real axis are reflected back: the callers in
contourkit evaluate f in the upper half plane only (below it f has the zeros
of the time-reversed problem).

References
----------
.. [1] L. M. Delves, J. N. Lyness, Math. Comp. 21 (1967) 543.

Examples
--------
>>> import numpy as np
>>> logf = lambda z: np.log((z - (0.3 + 0.2j)) * (z - (0.6 + 0.1j)) * np.exp(3j * z))
>>> box = make_box(logf, 0.0, 1.0, 0.05, 0.5)
>>> box.count
2
>>> zeros, _ = search(logf, box, 1.0)
>>> [complex(round(z.real, 12), round(z.imag, 12)) for z in sorted(zeros, key=lambda z: z.real)]
[(0.3+0.2j), (0.6+0.1j)]
"""
import math

import numpy as np

from ..errors import AccuracyError

#: largest phase change (rad) of f between boundary samples
MAX_ARG_STEP = 0.5


def _quiet(func):
    """func with numpy's divide/invalid warnings off (log f = -inf exactly at a zero is handled)."""
    def call(z):
        with np.errstate(divide="ignore", invalid="ignore"):
            return complex(func(z))
    return call


def _wrap(a):
    return (a + math.pi) % (2 * math.pi) - math.pi


class _Unresolved(Exception):
    """A boundary edge passes through (or too near) a zero of the matching function."""


def _edge(func, z0, z1, *, n0=16, max_depth=40):
    """Adaptive samples of log f along the segment z0 -> z1: (points, continuous log f)."""
    func = _quiet(func)
    zs = z0 + (z1 - z0) * np.linspace(0.0, 1.0, n0 + 1)
    fs = [func(z) for z in zs]
    out_z, out_f = [zs[0]], [fs[0]]
    min_len = abs(z1 - z0) * 2.0 ** -max_depth

    def seg(za, fa, zb, fb):
        if not (np.isfinite(fa) and np.isfinite(fb)):
            raise _Unresolved(za if not np.isfinite(fa) else zb)
        d = fb - fa
        dphi = _wrap(d.imag)
        if abs(dphi) > MAX_ARG_STEP or abs(d.real) > 2.0:
            if abs(zb - za) < min_len:
                raise _Unresolved(0.5 * (za + zb))
            zm = 0.5 * (za + zb)
            fm = func(zm)
            seg(za, fa, zm, fm)
            seg(zm, fm, zb, fb)
            return
        out_z.append(zb)
        out_f.append(out_f[-1] + complex(d.real, dphi))

    for i in range(len(zs) - 1):
        seg(zs[i], fs[i], zs[i + 1], fs[i + 1])
    return np.array(out_z), np.array(out_f)


class _Box:
    """A rectangle of the omega plane with its boundary samples, count and moments."""

    def __init__(self, func, re0, re1, im0, im1, n0=16):
        self.re0, self.re1, self.im0, self.im1 = re0, re1, im0, im1
        corners = [complex(re0, im0), complex(re1, im0), complex(re1, im1), complex(re0, im1)]
        zs, fs = [], []
        for j in range(4):
            z, f = _edge(func, corners[j], corners[(j + 1) % 4], n0=n0)
            if fs:                               # join the edges continuously
                f = f - f[0] + fs[-1][-1]
            zs.append(z if not zs else z[1:])
            fs.append(f if not fs else f[1:])
        self.z = np.concatenate(zs)
        self.f = np.concatenate(fs)
        wind = (self.f[-1] - self.f[0]).imag / (2 * math.pi)
        self.count = int(round(wind))
        self.winding_error = abs(wind - self.count)
        self.samples = len(self.z)

    def moment(self, p):
        """``(1/2 pi i) oint z^p dlog f`` by the midpoint rule on the samples."""
        zm = 0.5 * (self.z[1:] + self.z[:-1])
        return complex(np.sum(zm ** p * np.diff(self.f)) / (2j * math.pi))

    def contains(self, z, margin=0.0):
        dr, di = margin * (self.re1 - self.re0), margin * (self.im1 - self.im0)
        return (self.re0 - dr < z.real < self.re1 + dr) and (self.im0 - di < z.imag < self.im1 + di)


def _estimates(box, found):
    """Zeros not yet found from the moments deflated by the found ones (Newton's identities)."""
    inside = [r for r in found if box.contains(r)]
    m = box.count - len(inside)
    if m <= 0:
        return []
    s = [box.moment(p) - sum(r ** p for r in inside) for p in range(1, m + 1)]
    e = [1.0 + 0j]
    for j in range(1, m + 1):                                     # elementary symmetric functions
        e.append(sum((-1) ** (i - 1) * e[j - i] * s[i - 1] for i in range(1, j + 1)) / j)
    coeffs = [(-1) ** j * e[j] for j in range(m + 1)]
    return list(np.roots(coeffs)) if m > 1 else [s[0]]


def polish(func, z, found, scale, *, tol=1e-13, maxiter=60):
    """Secant iteration on log f deflated by the found zeros; None if it does not converge."""
    func = _quiet(func)

    def g(w):
        v = func(w)
        for r in found:
            v -= np.log(complex(w - r))
        return v

    # iterates that fall below the real axis are reflected: there f has the zeros of the time-reversed
    # problem (decaying modes, at conj(omega)), which must not attract the search
    z0 = complex(z.real, abs(z.imag))
    z1 = z0 + 1e-4 * scale * (1 + 0.5j)
    g0, g1 = g(z0), g(z1)
    for _ in range(maxiter):
        if not np.isfinite(g1):
            return z1
        with np.errstate(over="ignore", invalid="ignore"):
            q = np.exp(g0 - g1)
        if not np.isfinite(q):
            return z1
        if q == 1:
            return None
        step = (z1 - z0) / (1 - q)
        if not np.isfinite(step) or abs(step) > 10 * scale:
            return None
        z0, g0 = z1, g1
        z1 = z1 - step
        if z1.imag <= 0:
            z1 = complex(z1.real, max(-z1.imag, 1e-3 * abs(z0.imag)))
        g1 = g(z1)
        if abs(step) < tol * scale:
            return z1
    return None


def search(func, box0, scale, *, max_boxes=64):
    """Every zero in box0: moments + deflated polishing, bisecting boxes where that falls short."""
    found = []
    pending = [box0]
    boxes = 0
    while pending:
        box = pending.pop()
        boxes += 1
        if box.count <= 0:
            continue
        for est in _estimates(box, found):
            r = polish(func, est, found, scale)
            if r is not None and box.contains(r) and all(abs(r - q) > 1e-8 * scale for q in found):
                found.append(r)
        if sum(box.contains(r) for r in found) >= box.count:
            continue
        if boxes >= max_boxes:
            break
        # bisect the longer side (relative to the box's aspect), at a slightly off-centre line
        if (box.re1 - box.re0) >= (box.im1 - box.im0):
            cut = box.re0 + 0.4987 * (box.re1 - box.re0)
            halves = [(box.re0, cut, box.im0, box.im1), (cut, box.re1, box.im0, box.im1)]
        else:
            cut = box.im0 + 0.4987 * (box.im1 - box.im0)
            halves = [(box.re0, box.re1, box.im0, cut), (box.re0, box.re1, cut, box.im1)]
        for h in halves:
            pending.append(make_box(func, *h))
    return found, boxes


def make_box(func, re0, re1, im0, im1):
    """A _Box; edges that pass through a zero are moved by a small fraction and tried again."""
    for attempt in range(6):
        try:
            box = _Box(func, re0, re1, im0, im1)
        except _Unresolved as exc:
            z = exc.args[0]
            # move the edge nearest to the offending point outwards by 1% of the box
            dists = [abs(z.real - re0), abs(z.real - re1), abs(z.imag - im0), abs(z.imag - im1)]
            j = int(np.argmin(dists))
            dr, di = 0.01 * (re1 - re0), 0.01 * (im1 - im0)
            if j == 0:
                re0 -= dr
            elif j == 1:
                re1 += dr
            elif j == 2:
                im0 = im0 - di if im0 - di > 0 else 0.5 * im0
            else:
                im1 += di
            continue
        if box.winding_error < 0.05:
            return box
        im1 *= 1.01
    raise AccuracyError(f"the argument principle on the box Re omega in [{re0:.4g}, {re1:.4g}], Im omega in "
                          f"[{im0:.4g}, {im1:.4g}] did not give an integer count; change the box "
                          f"(omega_max=, im_min=, im_max=) or the resolution (points=)")
