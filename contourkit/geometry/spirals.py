"""Loops around branch points with a large imaginary exponent, drawn as rays.

Where ``|Im nu_j|`` is large (slowly varying turning points: ``Im nu`` grows
like the length of the profile), steepest-ascent paths near k_j are slow
log-spirals: ``Im(nu_j) log|k - k_j| + Re(nu_j) arg(k - k_j) ~ const``, so
they wind ``|Im nu| / (2 pi |Re nu|)`` times per e-fold of the radius.  A loop
drawn as a circle of fixed radius is crossed on many of these turns, and the
tracer must follow every one.  Here the loop is drawn as the half-line from
k_j (``loop = (exp(2 pi i nu_j) - 1) half_line`` for ``Re nu_j > -1``).  A
spiral that winds into k_j with a monotone angle crosses that ray once per
turn, with the same sign, one sheet further each turn: the crossings after
the point where the tracer stops form the geometric series
``sum_t exp(2 pi i (m + t s e_j).nu) = exp(2 pi i m.nu) / (1 - exp(2 pi i s nu_j))``
(``|exp(2 pi i s nu_j)| < 1`` on an ascent path), summed exactly.  The tracer
may stop as soon as the rest of the arm provably stays in a disc around k_j
that no other representative path enters (``paths._disc_limit`` with the
clearance computed here).

Crossing entries of such terms carry a fourth element: ``("ray", j)`` for an
ordinary crossing, ``("series", j, s)`` for the tail
(:func:`contourkit.geometry.decompose.coefficient`).
"""
import cmath
import math

import numpy as np

from . import contours as C
from . import phase
from ..errors import AccuracyError

#: loops around branch points with |Im nu| at least this are drawn as rays (spiral_rays=True)
SPIRAL_IM_NU = 10.0


def is_spiral(rep, kind, params):
    """Index j if this elementary contour is a loop drawn as a ray from k_j, else None."""
    if kind != "loop":
        return None
    j = C._singular_index(rep, params["point"])
    nu = complex(rep._nu[j])
    if rep._ess[j].size or abs(nu.imag) < SPIRAL_IM_NU or nu.real <= -1:
        return None
    return j


def ray(rep, x, params, j, crit, level):
    """The half-line from k_j to the loop's valley, on the loop's sheet (contours.ray_from)."""
    verts, start = C.ray_from(rep, x, j, complex(rep._kj[j]), params["valley"], level, C.scales(rep, crit),
                              params.get("sheet", 0))
    return np.array(verts, dtype=complex), start


def clearances(rep, polylines, ray_of):
    """Per singular point: the distance from k_j to the nearest path that is not a ray from k_j.

    ``polylines`` is a list of vertex arrays, ``ray_of`` the singular index each
    is a ray from (None otherwise).
    """
    out = np.full(rep._kj.size, np.inf)
    for j, kj in enumerate(rep._kj):
        for verts, rj in zip(polylines, ray_of):
            if rj == j or len(verts) < 2:
                continue
            a, b = verts[:-1], verts[1:]
            ab = b - a
            t = np.clip(((kj - a) * np.conj(ab)).real / np.maximum(np.abs(ab) ** 2, 1e-300), 0.0, 1.0)
            out[j] = min(out[j], float(np.min(np.abs(kj - (a + t * ab)))))
    return out


def tail(rep, rverts, rlogs, arm, orient, j):
    """The geometric tail of crossings of an ascent arm captured at k_j with the ray from k_j.

    Returns ``(sign, m, step)``: the first crossing after the arm's end, its
    sheet shift m, and the change ``step`` of ``m_j`` per turn.  Refuses
    (AccuracyError) unless the rest of the arm provably winds into k_j with a
    monotone angle inside the clear disc (``arm.wound``: paths._captured,
    paths._captured_turn).
    """
    kj = complex(rep._kj[j])
    if len(arm.k) < 3 or not arm.wound:
        raise AccuracyError(f"an ascent path ends at the branch point {kj:.6g} without the guarantee that it "
                            f"winds into it; the crossings with the ray of its loop cannot be summed; move x "
                            f"slightly")
    a_end = float(arm.logs[-1][j].imag)
    w = 1 if a_end > float(arm.logs[-2][j].imag) else -1
    ray_arg = float(rlogs[0][j].imag)
    q = (a_end - ray_arg) / (2 * math.pi)
    n1 = math.floor(q) + 1 if w > 0 else math.ceil(q) - 1
    if abs(q - round(q)) < 1e-9:
        raise AccuracyError(f"an ascent path captured at the branch point {kj:.6g} ends on the ray that "
                            f"represents its loop; move x slightly")
    # the other logarithms are single-valued in the disc around k_j: compare them at one point of the ray
    p = kj + abs(complex(arm.k[-1]) - kj) * cmath.exp(1j * ray_arg)
    lc = phase.continue_logs(rep, rverts[0], rlogs[0], p)
    lk = phase.continue_logs(rep, arm.k[-1], arm.logs[-1], p)
    m = [int(v) for v in np.round((lc - lk).imag / (2 * math.pi))]
    m[j] = -n1
    return orient * w, tuple(m), -w
