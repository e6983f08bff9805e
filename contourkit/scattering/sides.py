"""Where and how each side's modes are read: the asymptotic position X, its geometry, its stability.

Far from the horizon (or the turning point) on each side every critical
point of the linearised model is one WKB mode.  :func:`_asymptotic_x` finds a
position X where they sit in their asymptotic places; :func:`_side_geometry`
decomposes the basis contours into thimbles there and checks that the
decomposition is unchanged at 2X (critical points followed from X to 2X),
moving out past Stokes lines where it is not; :func:`_side_constants` gives
the mode catalogue with its flux constants and the thimble coefficients at
the working precision.

References
----------
.. [1] E. Witten, Analytic continuation of Chern-Simons theory, AMS/IP Stud.
   Adv. Math. 50 (2011) 347, section 3 (thimbles and Stokes jumps).
"""
import math

import mpmath
import numpy as np

from ..errors import ScatteringError
from ..geometry import phase
from ..geometry.decompose import coefficient, decompose
from ..geometry.tracking import track
from .modes import catalogue


def _asymptotic_x(rep, sign):
    """A position on the given side where every critical point sits in its asymptotic place.

    Each singular point k_j must have exactly one critical point within 2% of
    its distance to the nearest other singular point (p + 1 at an essential
    singular point of order p, where ``i x = p c_p (k - k_j)^-(p+1)`` has p + 1
    roots: saddle modes that approach k_j like ``x^(-1/(p+1))``), and every
    other critical point must be three such distances away (and next to an
    essential point the term ``nu_j/(k - k_j)`` must be below 10% of the
    essential one at the saddle); X is doubled from a small start until that
    holds (X stays moderate, so the double-precision
    geometry keeps its accuracy).
    """
    from ..geometry.saddles import critical_points
    kj = rep._kj
    near = []
    for i, a in enumerate(kj):
        d = [abs(a - b) for j, b in enumerate(kj) if j != i]
        near.append(min(d) if d else max(1.0, abs(a)))
    X = 1.0 / max(min(near) if near else 1.0, 1e-300)
    for _ in range(80):
        crit = critical_points(rep, sign * X)
        ok = True
        count = [0] * len(kj)
        for c in crit:
            d = np.abs(c - kj)
            i = int(np.argmin(d))
            if d[i] < 0.02 * near[i]:
                count[i] += 1
                p = len(rep.singularities[i].valleys)
                if p and abs(rep._nu[i]) * d[i] ** p > 0.1 * p * abs(rep._ess[i][p - 1]):
                    ok = False       # the log term still moves this saddle: not yet the essential point's
            elif d[i] < 3 * near[i]:
                ok = False
        ok = ok and all(n == len(s.valleys) + 1 for n, s in zip(count, rep.singularities))
        if ok:
            return sign * X
        X *= 2
    raise ScatteringError("could not find an asymptotic region where every saddle has separated from the "
                          "branch points; the model may have coalescing saddles at all positions")


def _sheet_factors(rep, crit_a, crit_b):
    """Per critical point, the factor that refers a thimble at crit_b to the sheet of the same thimble at crit_a.

    A thimble carries the cut-plane branch at its critical point.  A critical
    point next to a branch point can sit on that point's cut (for x > 0 it
    lies at angle ~ arg(i nu) from it, i.e. on a downward cut when Im nu ~ 0)
    and cross it as x doubles; the thimble is then the same path on the
    neighbouring sheet, ``J_b = exp(-2 pi i m.nu) J_a``, and its coefficient
    changes by ``exp(2 pi i m.nu)`` without any Stokes phenomenon.  The
    critical points move radially between X and 2X in the asymptotic region,
    so the logs are continued along the straight segment from crit_a to crit_b.
    """
    return np.array([np.exp(-2j * math.pi * complex(m @ rep._nu)) if m is not None else 1.0
                     for m in _sheet_shifts(rep, crit_a, crit_b)], dtype=complex)


def _sheet_shifts(rep, crit_a, crit_b):
    """Per critical point, the integer sheet shifts m (one per singular point; None: no shift) of _sheet_factors."""
    if not rep._kj.size or len(crit_a) != len(crit_b):
        return [None] * len(crit_b)
    out = []
    for a, b in zip(crit_a, crit_b):
        la = phase.cut_plane_logs(rep, a)[0]
        pts = a + (b - a) * np.linspace(0.0, 1.0, 9)[1:]
        for p, q in zip(np.concatenate([[a], pts[:-1]]), pts):
            la = phase.continue_logs(rep, p, la, q)
        m = np.round((la - phase.cut_plane_logs(rep, b)[0]).imag / (2 * math.pi)).astype(int)
        out.append(m if m.any() else None)
    return out


def _side_geometry(rep, contours, dd, sign, kappa):
    """Double-precision geometry on one side: thimbles, crossings, stability at 2X.

    The decomposition at X is compared with the one at 2X thimble by thimble,
    the critical points being followed continuously from X to 2X
    (:func:`contourkit.geometry.tracking.track`: a root finder may list them
    in another order).  Where the two still differ (a Stokes line crossed
    between X and 2X), the geometry moves further out, X -> 2X, up to
    ``_STOKES_DOUBLINGS`` times, until two consecutive positions agree.
    """
    X = _asymptotic_x(rep, sign)
    kj = rep._kj

    def near_branch(s):
        # descent arms are needed only where a loop constant is read off (long-wavelength modes)
        return bool(kj.size) and float(np.min(np.abs(s - kj))) < 0.05 * max(1.0, float(np.max(np.abs(kj))))
    X0 = X
    for _ in range(_STOKES_DOUBLINGS + 1):
        g0, coeffs = decompose(rep, contours, X, descent=near_branch)
        g2, cf2s = decompose(rep, contours, 2 * X, descent=False)
        if _stable(rep, g0, coeffs, g2, cf2s):
            break
        X *= 2
    else:
        raise ScatteringError(f"the thimble decomposition on the {'exterior' if sign > 0 else 'interior'} side "
                              f"keeps changing from x = {X0:.6g} to {X:.6g} (Stokes lines crossed at every "
                              f"doubling of x); the asymptotic region is not reached for this model at this "
                              f"frequency: use contourkit.direct.scatter for a full profile, or another omega")
    lab = sign * min(abs(X), 0.1 / kappa) if kappa else None
    return X, g0, coeffs, lab


#: how often the geometry may move outwards (X -> 2X) past Stokes lines before scatter gives up
_STOKES_DOUBLINGS = 6


def _stable(rep, g0, coeffs, g2, cf2s, *, exact=False):
    """The decompositions at X and 2X agree thimble by thimble (critical points followed from X to 2X).

    ``exact``: the coefficients may be mpmath numbers beyond the double range
    (``decompose(..., exact=True)``); the sheet factors are then taken in
    mpmath too.
    """
    perm = track(rep, g0.xg, g2.xg, crit0=g0.crit, crit1=g2.crit)
    if perm is None:
        return False
    inv = np.empty(len(perm), dtype=int)
    inv[perm] = np.arange(len(perm))
    if exact:
        with mpmath.workdps(30):
            nu = [mpmath.mpc(complex(v)) for v in rep._nu]
            sheet = [mpmath.expjpi(-2 * mpmath.fsum(int(mi) * v for mi, v in zip(m, nu))) if m is not None else 1
                     for m in _sheet_shifts(rep, g0.crit, g2.crit[perm])]
    else:
        sheet = _sheet_factors(rep, g0.crit, g2.crit[perm])
    for c, cf2 in enumerate(cf2s):
        a = sorted((i, abs(n)) for n, i, _ in coeffs[c])
        b = sorted((int(inv[i]), abs(n * sheet[inv[i]])) for n, i, _ in cf2)
        if [i for i, _ in a] != [i for i, _ in b] or any(abs(p - q) > 1e-6 * max(1.0, p, q)
                                                         for (_, p), (_, q) in zip(a, b)):
            return False
    return True


def _side_constants(rep, contours, dd, side, dps):
    """Mode catalogue with flux constants and the coefficient matrix N at dps digits."""
    X, g0, coeffs, lab = side
    modes = catalogue(rep, g0, dd, dps=dps, label_x=lab)
    with mpmath.workdps(dps + 10):
        nu = rep.mp_data(dps)[2]
        N = mpmath.matrix(len(modes), len(contours))
        for c, (C, cf) in enumerate(zip(contours, coeffs)):
            for n, i, cl in cf:
                N[i, c] = coefficient(rep, C.terms, cl, nu, lambda z: mpmath.expjpi(2 * z))
    return modes, N
