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
from . import spirals
from ..errors import ContourError
from .paths import end_thimble, thimble
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
    """Crossings of polyline C with an ascent arm: a list of (sign, sheet shift m)."""
    kv = arm.k
    if len(kv) < 2:
        return []
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
    out = []
    for ia, ib in zip(*np.nonzero(hit)):
        p = a0[ia, 0] + s[ia, ib] * da[ia, 0]
        sign = 1 if orient * cross[ia, ib] > 0 else -1
        m = ()
        if rep._kj.size:
            lc = phase.continue_logs(rep, cverts[ia], clogs[ia], p)
            lk = phase.continue_logs(rep, kv[ib], arm.logs[ib], p)
            m = tuple(int(v) for v in np.round((lc - lk).imag / (2 * math.pi)))
        out.append((sign, m))
    return out


def term_factor(rep, kind, params, nu, exp2pii):
    """Extra factor of an elementary contour: 1/(exp(2 pi i nu_j) - 1) for a half-line drawn as a loop.

    A half-line from an integer exponent or an ordinary zero of B is drawn as
    itself (a ray from k_j, contours.half_line_start) and has no factor.
    """
    if kind != "half":
        return 1
    j, _, straight = C.half_line_start(rep, params["point"])
    if straight:
        return 1
    return 1 / (exp2pii(nu[j]) - 1)


def coefficient(rep, terms, crossing_list, nu, exp2pii):
    """Thimble coefficient sum_terms coef * factor * sum_crossings sign exp(2 pi i m.nu).

    An entry may carry a fourth element for a loop drawn as a ray from k_j
    (:mod:`contourkit.geometry.spirals`): ``("ray", j)`` gives the factor
    ``exp(2 pi i nu_j) - 1``; ``("series", j, s)`` stands for the crossings
    on every later turn and also divides by ``1 - exp(2 pi i s nu_j)``.
    """
    total = 0
    for entry in crossing_list:
        ti, sign, m = entry[:3]
        coef, kind, params = terms[ti]
        w = exp2pii(sum(mi * nj for mi, nj in zip(m, nu))) if m else 1
        if len(entry) > 3:
            j = entry[3][1]
            f = exp2pii(nu[j]) - 1
            if entry[3][0] == "series":
                f = f / (1 - exp2pii(entry[3][2] * nu[j]))
        else:
            f = term_factor(rep, kind, params, nu, exp2pii)
        total = total + coef * f * sign * w
    return total


def decompose(rep, contour, x, *, u_stop=40.0, descent=True, exact=False, spiral_rays=False):
    """Thimble coefficients of a contour (or of a list of contours, sharing one geometry) at x.

    Returns
    -------
    geometry : Geometry
    coeffs : list of (coefficient, thimble index, crossings) with nonzero coefficients;
        crossings is a list of (term index, sign, sheet shift) from which the
        coefficient is recomputed at any precision by :func:`coefficient`.
        For a list of contours, a list of such lists.
    descent : bool or callable
        Trace the descent arms (needed for quadrature); a callable decides per
        critical point.  Intersection numbers need only the ascent arms.
    exact : bool
        The caller recomputes every coefficient in mpmath from its crossings
        (:func:`coefficient`): sheet factors beyond the double range are then
        kept (their double value may be 0 or inf) instead of refused.
    spiral_rays : bool
        Draw loops around branch points with a large ``|Im nu|`` as rays and
        sum the crossings of the spiralling ascent paths in closed form
        (:mod:`contourkit.geometry.spirals`).  The coefficients are the same.
    """
    many = isinstance(contour, (list, tuple))
    contours = list(contour) if many else [contour]
    xg = geometry_x(x)
    crit = critical_points(rep, xg)
    # the ends of half-lines at ordinary zeros of B carry end thimbles of their own
    zs = np.array([complex(z) for z in getattr(rep, "ordinary_zeros", ())], dtype=complex)
    if crit.size == 0 and zs.size == 0:
        raise ContourError("the exponent has no critical point at this x; nothing to deform onto")
    logs0 = [phase.cut_plane_logs(rep, s)[0] if rep._kj.size else np.zeros(0, complex) for s in crit]
    phis = np.array([phase.phi(rep, xg, s, l).real for s, l in zip(crit, logs0)])
    zphis = [phase.phi(rep, xg, z, phase.cut_plane_logs(rep, z)[0] if rep._kj.size else np.zeros(0, complex)).real
             for z in zs]
    level = float(np.min(np.concatenate([phis, np.array(zphis, dtype=float)]))) - 8.0
    reps_all = [_representatives(rep, c, xg, crit, level, spiral_rays) for c in contours]
    cmax = -math.inf
    rmax = 0.0
    for reps in reps_all:
        for _, verts, logs, _r in reps:
            vals = phase.phi(rep, xg, verts, logs).real
            cmax = max(cmax, float(np.max(vals)))
            rmax = max(rmax, float(np.max(np.abs(verts))))
    # half-lines from ordinary zeros of B end at a finite point where f does not vanish: the
    # steepest-descent path from that point (an end thimble, coefficient 1) closes them into a
    # valley-to-valley path, whose saddle coefficients count the crossings of both with the duals
    ends, end_arms = [], []
    for c, reps in enumerate(reps_all):
        for ti, (coef, verts, logs, _r) in enumerate(reps):
            kind, params = contours[c].terms[ti][1], contours[c].terms[ti][2]
            if kind == "half" and C.half_line_start(rep, params["point"])[0] is None:
                ends.append((c, ti, len(end_arms)))
                end_arms.append(end_thimble(rep, xg, complex(verts[0]), crit, u_stop=u_stop))
    for t in end_arms:
        rmax = max(rmax, float(np.max(np.abs(t.plus.k))))
    clear = None
    if spiral_rays and rep._kj.size:
        polys = [v for reps in reps_all for _, v, _, _ in reps] + [t.plus.k for t in end_arms]
        rays = [r for reps in reps_all for _, _, _, r in reps] + [None] * len(end_arms)
        clear = spirals.clearances(rep, polys, rays)
    thims = []
    for i, s in enumerate(crit):
        u_up = max(cmax - phis[i] + 4.0, 4.0)
        want = descent(s) if callable(descent) else descent
        thims.append(thimble(rep, xg, s, crit, u_stop=u_stop, u_up=u_up, r_beyond=1.05 * rmax, descent=want,
                             clear=clear))
    n_saddles = len(thims)
    ends = [(c, ti, n_saddles + ie) for c, ti, ie in ends]
    thims += end_arms
    crit = np.concatenate([crit, np.array([t.sigma for t in end_arms], dtype=complex)])
    out = [[] for _ in contours]
    exp2 = lambda z: np.exp(2j * math.pi * z)  # noqa: E731
    nu = list(rep._nu)
    for i in range(n_saddles):
        t, s = thims[i], crit[i]
        for c, (cont, reps) in enumerate(zip(contours, reps_all)):
            cl = []
            for ti, (coef, verts, logs, rj) in enumerate(reps):
                for arm, orient in ((t.up_plus, +1), (t.up_minus, -1)):
                    if rj is None:
                        cl += [(ti, sg, m) for sg, m in crossings(rep, verts, logs, arm, orient)]
                        continue
                    cl += [(ti, sg, m, ("ray", rj)) for sg, m in crossings(rep, verts, logs, arm, orient)]
                    if arm.end == "source" and arm.sink == rj:
                        sg, m, step = spirals.tail(rep, verts, logs, arm, orient, rj)
                        cl.append((ti, sg, m, ("series", rj, step)))
            for ce, ti, ie in ends:
                if ce == c:
                    e = thims[ie].plus
                    cl += [(ti, -sg, m) for sg, m in crossings(rep, e.k, e.logs, t.up_plus, +1)]
                    cl += [(ti, -sg, m) for sg, m in crossings(rep, e.k, e.logs, t.up_minus, -1)]
            try:
                with np.errstate(over="ignore", invalid="ignore"):
                    n = complex(coefficient(rep, cont.terms, cl, nu, exp2))
                    size = sum(abs(complex(coefficient(rep, cont.terms, [q], nu, exp2))) for q in cl)
                    finite = math.isfinite(abs(n)) and math.isfinite(size) and size > 0
            except OverflowError:          # |n| beyond the double range although its parts are finite
                finite = False
            if cl and not finite:
                # sheet factors exp(2 pi i m nu) beyond double range: decide in mpmath
                n, keep = _wide_coefficient(rep, cont.terms, cl, nu)
                if keep and not exact:
                    big = max(abs(v.imag) for v in nu)
                    raise ContourError(f"the coefficient of the thimble at k = {s:.6g} (x = {x}) overflows double "
                                       f"precision: sheet factors exp(2 pi i m nu) with |Im nu| up to {big:.4g} "
                                       f"leave the range 1e-308..1e308 (|Im nu| > 112), and the quadrature works "
                                       f"in double precision here; for a horizon model use "
                                       f"contourkit.direct.scatter")
                if keep:
                    out[c].append((n, i, cl))
            elif cl and abs(n) > 1e-12 * size:
                out[c].append((n, i, cl))
    for c, ti, ie in ends:
        cl = [(ti, 1, ())]
        out[c].append((complex(coefficient(rep, contours[c].terms, cl, nu, exp2)), ie, cl))
    return Geometry(x, xg, crit, thims, u_stop), (out if many else out[0])


def _wide_coefficient(rep, terms, cl, nu):
    """(coefficient as mpmath number, keep?) where double precision under- or overflows."""
    import mpmath
    with mpmath.workdps(30):
        nmp = [mpmath.mpc(complex(v)) for v in nu]
        e2 = lambda z: mpmath.expjpi(2 * z)  # noqa: E731
        n = coefficient(rep, terms, cl, nmp, e2)
        size = mpmath.fsum(abs(coefficient(rep, terms, [q], nmp, e2)) for q in cl)
        return n, bool(size > 0 and abs(n) > mpmath.mpf("1e-12") * size)


def _representatives(rep, contour, xg, crit, level, spiral_rays=False):
    """(coefficient, vertices, logs at the vertices, j or None) per term; j for a loop drawn as a ray."""
    reps = []
    for coef, kind, params in contour.terms:
        rj = spirals.is_spiral(rep, kind, params) if spiral_rays else None
        if rj is not None:
            verts, slog = spirals.ray(rep, xg, params, rj, crit, level)
            reps.append((coef, verts, C.polyline_logs(rep, verts, slog), rj))
            continue
        verts, slog = C.representative(rep, xg, kind, params, crit, level)
        logs = C.polyline_logs(rep, verts, slog)
        j = C.half_line_start(rep, params["point"])[0] if kind == "half" else None
        if j is not None and rep.singularities[j].kind != "essential":
            nu = rep._nu[j]
            if nu.real <= -1:
                raise ContourError(f"a half-line from {rep.singularities[j].point} needs Re(exponent) > -1 "
                                   f"(here {nu:.6g}): the integral diverges at the branch point; use a loop")

        reps.append((coef, verts, logs, None))
    return reps
