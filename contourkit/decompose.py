"""Deformation of a contour into steepest-descent paths (thimbles).

``C = sum_sigma n_sigma J_sigma`` with ``n_sigma`` the intersection number of C
with the dual (ascent) path of sigma, counted with the sheet on which C
crosses it: a crossing where C's branch differs from the dual path's branch
by ``log(k - k_j) -> log(k - k_j) + 2 pi i m_j`` contributes
``exp(2 pi i sum_j m_j nu_j)`` times the sign of the crossing.  The geometry
is computed at ``x_g = x (1 + eps e^{i theta})``, an infinitesimal
perturbation that lifts exact Stokes connections (real parameters often sit
on Stokes lines) and splits coalescing saddles; the integrand itself is not
perturbed, so the decomposition is exact.

References
----------
.. [1] E. Witten, Analytic continuation of Chern-Simons theory, AMS/IP Stud.
   Adv. Math. 50 (2011) 347, section 3 (thimbles, dual cycles and
   intersection pairing; Stokes jumps).
"""
import math
from dataclasses import dataclass

import numpy as np

from . import contours as C
from . import phase
from .paths import thimble
from .saddles import critical_points

EPS = 1e-7
THETA = 1.2345


@dataclass
class Geometry:
    x: float
    xg: complex
    crit: np.ndarray
    thimbles: list
    u_stop: float


def geometry_x(x):
    return x + EPS * (abs(x) + 1.0) * complex(math.cos(THETA), math.sin(THETA))


def crossings(rep, cverts, clogs, arm, orient):
    """Signed, sheet-weighted crossings of polyline C with an ascent arm."""
    kv = arm.k
    if len(kv) < 2:
        return 0j
    a0 = cverts[:-1][:, None]
    a1 = cverts[1:][:, None]
    b0 = kv[:-1][None, :]
    b1 = kv[1:][None, :]
    da = a1 - a0
    db = b1 - b0
    cross = (np.conj(da) * db).imag
    w = b0 - a0
    with np.errstate(divide="ignore", invalid="ignore"):
        s = (np.conj(w) * db).imag / cross
        t = (np.conj(w) * da).imag / cross
    hit = (cross != 0) & (s >= 0) & (s < 1) & (t >= 0) & (t < 1)
    total = 0j
    for ia, ib in zip(*np.nonzero(hit)):
        p = a0[ia, 0] + s[ia, ib] * da[ia, 0]
        sign = 1.0 if orient * cross[ia, ib] > 0 else -1.0
        factor = 1.0 + 0j
        if rep._kj.size:
            lc = phase.continue_logs(rep, cverts[ia], clogs[ia], p)
            lk = phase.continue_logs(rep, kv[ib], arm.logs[ib], p)
            m = np.round((lc - lk).imag / (2 * math.pi))
            factor = complex(np.exp(2j * math.pi * np.dot(m, rep._nu)))
        total += sign * factor
    return total


def decompose(rep, contour, x, *, u_stop=40.0):
    """Thimble coefficients of a contour at x.

    Returns
    -------
    geometry : Geometry
    coeffs : list of (coefficient, thimble index) with nonzero coefficients
    """
    xg = geometry_x(x)
    crit = critical_points(rep, xg)
    if crit.size == 0:
        from .errors import ContourError
        raise ContourError("the exponent has no critical point at this x; nothing to deform onto")
    logs0 = [phase.cut_plane_logs(rep, s)[0] if rep._kj.size else np.zeros(0, complex) for s in crit]
    phis = np.array([phase.phi(rep, xg, s, l).real for s, l in zip(crit, logs0)])
    level = float(np.min(phis)) - 8.0
    reps = []
    for coef, kind, params in contour.terms:
        verts, slog = C.representative(rep, xg, kind, params, crit, level)
        logs = C.polyline_logs(rep, verts, slog)
        extra = 1.0
        if kind == "half":
            j = C._singular_index(rep, params["point"])
            nu = rep._nu[j]
            if nu.real <= -1:
                from .errors import ContourError
                raise ContourError(f"a half-line from {rep.singularities[j].point} needs Re(exponent) > -1 "
                                   f"(here {nu:.6g}): the integral diverges at the branch point; use a loop")
            den = np.exp(2j * math.pi * nu) - 1
            if abs(den) < 1e-12:
                from .errors import ContourError
                raise ContourError(f"the exponent at {rep.singularities[j].point} is an integer: the loop vanishes "
                                   f"and the half-line is not a closed cycle; use another contour")
            extra = 1.0 / den
        reps.append((coef * extra, verts, logs))
    cmax = -math.inf
    for _, verts, logs in reps:
        vals = phase.phi(rep, xg, verts, logs).real
        cmax = max(cmax, float(np.max(vals)))
    thims = []
    coeffs = []
    for i, s in enumerate(crit):
        u_up = max(cmax - phis[i] + 4.0, 4.0)
        t = thimble(rep, xg, s, crit, u_stop=u_stop, u_up=u_up)
        thims.append(t)
        n = 0j
        for coef, verts, logs in reps:
            n += coef * (crossings(rep, verts, logs, t.up_plus, +1) + crossings(rep, verts, logs, t.up_minus, -1))
        if abs(n) > 1e-9:
            coeffs.append((complex(n), i))
    return Geometry(x, xg, crit, thims, u_stop), coeffs
