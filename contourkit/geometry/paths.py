"""Steepest-descent and steepest-ascent paths of ``Phi(k) = i k x + E(k)``.

From a critical point sigma, a descent arm is a curve with
``Im Phi = Im Phi(sigma)`` on which ``u = Re(Phi(sigma) - Phi)`` grows from
0.  It is traced by predictor-corrector continuation in u: the predictor is
the Newton step ``dk = -du / Phi'(k)``; the corrector solves
``Phi(k) = Phi(sigma) - u`` by Newton's method.  Steps are limited so that a
step is short against the distance to every singular point and against
``|Phi'/Phi''|`` (the distance to the nearest other critical point), so the
arm follows sharp turns near other saddles.  An arm ends

* in a valley at infinity, once ``u`` exceeds the level ``u_stop`` below
  which the integrand is negligible at the working precision;
* at a singular point where the integrand vanishes (``Re nu > -1`` and the
  arm converging into it); the rest of the arm is then the exact log-spiral
  tail integrated by Gauss-Laguerre quadrature (see quadrature.py);
* for ascent arms, at a singular point where the integrand blows up (also
  after one turn of a slow spiral that provably contains the rest of the arm,
  :func:`_captured_turn`), or once it has climbed above every point of the
  contour being decomposed.

The vertices carry the continued logarithms (phase.py), so every arm knows
the sheet it is on.

References
----------
.. [1] D. Huybrechs, S. Vandewalle, SIAM J. Numer. Anal. 44 (2006) 1026
   (numerical steepest descent; cost independent of the frequency).
"""
import cmath
import math
from dataclasses import dataclass, field

import numpy as np

from . import phase
from ._scalar import ScalarPhase
from ..errors import AccuracyError


@dataclass
class Arm:
    """One traced arm: vertices (first = the critical point), logs at vertices, how it ended."""
    k: np.ndarray
    logs: np.ndarray
    end: str                 # "valley", "sink", "source", "level", "stalled"
    sink: int = -1           # index of the singular point for "sink"/"source"
    u: np.ndarray = field(default=None, repr=False)
    wound: bool = False      # "source" reached with a monotone winding angle (_captured, _captured_turn)


def trace_arm(rep, x, sigma, direction, *, ascent=False, u_stop=40.0, crit=None,
              logs0=None, max_steps=4000, u_cap=None, r_beyond=0.0, clear=None):
    """Trace one descent (or ascent) arm from the critical point sigma.

    Parameters
    ----------
    rep : KSpaceRepresentation
    x : complex      position used for the geometry (may carry a tiny imaginary part)
    sigma : complex  critical point
    direction : complex   unit vector of the initial direction
    ascent : bool    trace Re Phi increasing instead of decreasing
    u_stop : float   stop once the change of Re Phi exceeds this
    r_beyond : float for ascent arms: stop at the level only beyond this radius
                     (Re Phi differs between sheets, so a level alone is no bound)
    crit : array     all critical points (for step control)
    clear : array    for ascent arms: per singular point, the distance to the nearest representative
                     path other than rays from it (spirals.clearances); see _disc_limit
    """
    P = ScalarPhase(rep, x)
    J = P.J
    crit = [complex(c) for c in (crit if crit is not None else [])]
    other = [_other_scale(rep, j) for j in range(J)]
    sgn = 1.0 if ascent else -1.0          # Phi(k) = Phi0 + sgn * u
    sigma = complex(sigma)
    if logs0 is None:
        logs0 = list(phase.cut_plane_logs(rep, sigma)[0]) if J else []
    else:
        logs0 = list(logs0)
    phi0 = P.phi(sigma, logs0)

    def local_scale(k):
        d = P.nearest_singular(k)[0]
        for c in crit:
            dc = abs(k - c)
            if 0 < dc < d:
                d = dc
        return d

    f2 = P.d2(sigma)
    scale0 = local_scale(sigma)
    scale0 = scale0 if math.isfinite(scale0) else max(1.0, abs(sigma))
    du0 = 0.02
    h = math.sqrt(2 * du0 / abs(f2)) if f2 != 0 else 0.05 * scale0
    h = min(h, 0.05 * scale0)
    ks, lg, us = [sigma], [logs0], [0.0]
    k = sigma + h * direction
    logs = P.continue_logs(sigma, logs0, k)
    end = "stalled"
    sink = -1
    wound = False
    turn = None                            # (j, first index, arg) of the turn being watched (ascent arms)
    u = float(sgn * (P.phi(k, logs) - phi0).real)
    if u <= 0:
        u = du0
    for _ in range(max_steps):
        target = phi0 + sgn * u
        kc, lc = k, logs
        ok = False
        prev = ks[-1]
        for _it in range(12):
            val = P.phi(kc, lc)
            d1 = P.d1(kc)
            if d1 == 0:
                break
            step = (val - target) / d1
            knew = kc - step
            lc = P.continue_logs(kc, lc, knew)
            kc = knew
            if abs(step) <= 1e-10 * abs(kc - prev) + 1e-300 or abs(val - target) <= 2e-15 * (1.0 + abs(target)):
                ok = True
                break
        if not ok or abs(kc - prev) > 3 * max(abs(k - prev), 1e-300) + 1e-14:
            du_last = u - us[-1]
            if du_last < 1e-12:
                end = "stalled"
                break
            u = us[-1] + du_last / 4
            d1p = P.d1(prev)
            k = prev + (sgn * (u - us[-1])) / d1p if d1p != 0 else prev
            logs = P.continue_logs(prev, lg[-1], k)
            continue
        k, logs = kc, lc
        ks.append(k)
        lg.append(logs)
        us.append(u)
        if u >= u_stop and (not ascent or abs(k) > r_beyond):
            end = "valley" if not ascent else "level"
            break
        if J:
            dist, j = P.nearest_singular(k)
            # an arm can only end where the integrand vanishes (descent) or blows up (ascent); a descent
            # arm into an essential singular point is traced on until u_stop (the integrand vanishes
            # faster than any power there: it ends as in a valley, with no power-law tail)
            can = ascent if P.ess[j] else (P.nu[j].real < 0 if ascent else P.nu[j].real > 0)
            lim = _disc_limit(other[j], None if clear is None else clear[j])
            if can and len(ks) > 2 and dist < abs(ks[-2] - P.kj[j]):
                wound = ascent and _captured(P, j, dist, lim)
                if wound or dist < min(1e-3 * other[j], 0.1 * abs(sigma - P.kj[j])):
                    end, sink = ("source" if ascent else "sink"), j
                    break
            if ascent and can and not P.ess[j]:
                a_now = lg[-1][j].imag
                if turn is None or turn[0] != j:
                    turn = (j, len(ks) - 1, a_now)
                elif abs(a_now - turn[2]) >= 2 * math.pi:
                    if _captured_turn(P, j, ks[turn[1]:], lg[turn[1]:], lim):
                        end, sink, wound = "source", j, True
                        break
                    turn = (j, len(ks) - 1, a_now)
        if u_cap is not None and u > u_cap:
            end = "level"
            break
        d1 = P.d1(k)
        d2 = P.d2(k)
        loc = local_scale(k)
        geo = min(0.25 * abs(d1) / abs(d2) if d2 != 0 else math.inf, 0.2 * loc,
                  0.5 * max(abs(k), 1e-3) + 0.2 * loc)
        if not math.isfinite(geo):
            geo = 0.5 * max(1.0, abs(k))
        du = min(geo * abs(d1), 1.0 + 0.25 * u, 2.0 if not ascent else 1e300)
        du = max(du, 1e-14 * max(1.0, u))
        u = u + du
        # ascent arms (only crossed with contours, no quadrature nodes on them): second-order
        # predictor from the quadratic Taylor model, so the corrector needs fewer Newton steps;
        # descent arms keep the first-order predictor their node placement was tuned with
        h = (sgn * du) / d1
        if ascent:
            h2 = h - d2 * h * h / (2 * d1)
            h = h2 if abs(h2 - h) < 0.5 * abs(h) else h
        k = k + h
        logs = P.continue_logs(ks[-1], lg[-1], k)
    else:
        end = "stalled"
    return Arm(np.array(ks, dtype=complex), np.array(lg, dtype=complex).reshape(len(ks), -1), end, sink,
               np.array(us), wound)


def _disc_limit(other_j, clear_j=None):
    """Radius of the disc around k_j that the rest of a captured ascent arm may occupy.

    No representative path other than rays from k_j enters it: by default
    ``0.25 min(d_j, 0.45)`` (paths stay at ``0.3 min(d_j, 0.45)`` or more from
    every singular point: loop circles, indentations and the bends of legs in
    contours.py), or 0.8 of the measured clearance ``clear_j``
    (spirals.clearances); and at most half the distance d_j to the nearest
    other singular point, so that the rest g of the exponent is analytic in it.
    """
    lim = 0.25 * min(other_j, 0.45) if clear_j is None else 0.8 * clear_j
    return min(lim, 0.5 * other_j)


def _captured_turn(P, j, pts, logs, lim):
    """True if an ascent arm that has just wound once around k_j (``pts``) can only wind on into k_j.

    On the arm ``F = Im(nu) rho + Re(nu) theta + Im g(k_j + e^(rho + i theta)) = c``
    (``rho = log|k - k_j|``, ``theta`` its continued argument, g as in
    :func:`_captured`).  Let R be the largest radius of the turn and M bound
    ``|g'|`` on the disc of radius R (sampled on its circle at 32 points, 25%
    of margin).  With ``M R < |Im nu|`` and Re nu < 0: theta moves
    monotonically on the arm, ``h(rho) = Im(nu) rho + Im g`` is monotone in
    rho at fixed theta, and one more turn changes h by ``2 pi |Re nu|``
    towards smaller rho.  So at every angle each turn lies strictly inside the
    one before: the rest of the arm stays inside this turn, within radius R,
    and winds into k_j; the disc holds no critical point.  ``lim``
    (:func:`_disc_limit`) bounds R.
    """
    nu = P.nu[j]
    if nu.real >= 0 or len(pts) < 4:
        return False
    kj = P.kj[j]
    args = np.array([complex(l[j]).imag for l in logs])
    steps = np.diff(args)
    if not (np.all(steps > 0) or np.all(steps < 0)):
        return False
    R = float(np.max(np.abs(np.asarray(pts, dtype=complex) - kj)))
    if R >= lim:
        return False
    M = 0.0
    for i in range(32):
        z = R * cmath.exp(2j * math.pi * i / 32)
        M = max(M, abs(P.d1(kj + z) - nu / z))
    return 1.25 * M * R < abs(nu.imag)


def _captured(P, j, dist, lim):
    """True if an ascent arm at distance ``dist`` from k_j can only go on into k_j.

    Near k_j, ``Phi = nu_j w + g(k)`` with ``w = log(k - k_j)`` and g analytic
    in the disc of radius ``lim``; let ``r = dist`` and ``M`` bound
    ``|g'|`` on the disc of radius 2r (the maximum of an analytic function is
    on the circle; sampled at 32 points, with 25% of margin).  Two cases end
    the arm, both for ``Re nu_j < 0``:

    * radial: ``2 M r < |Re nu_j|``; the ascent flow ``dk/dt ~ conj(Phi')``
      then moves inwards at every point of the disc;
    * spiral (``|Im nu| >> |Re nu|``, as at slowly varying turning points):
      on the arm ``Im(nu_j) log|k - k_j| = c - Re(nu_j) arg(k - k_j) - Im g``.
      With ``2 M r < |Im nu_j|`` the angle moves monotonically, so the first
      term on the right falls without bound, and ``Im g`` changes by at most
      ``4 M r`` on the disc; with ``4 M r <= log(2) |Im nu_j|`` the arm never
      leaves the disc of radius 2r and winds into k_j.  Such arms wind many
      times before they come within ``1e-3 other_j``.

    Both bounds give ``|g'| |k - k_j| < |nu_j|`` on the disc, so it holds no
    critical point.  The disc of radius 2r stays within ``lim``
    (:func:`_disc_limit`), so the rest of the arm crosses no representative
    path there but rays from k_j, which it crosses on every later turn:
    spirals.tail sums those crossings.
    """
    nu = P.nu[j]
    if P.ess[j] or nu.real >= 0 or 2 * dist >= lim:
        return False
    kj = P.kj[j]
    # |g'| at any point of the disc is a lower bound of M: a cheap test first (most calls end here)
    z0 = 1j * dist
    g0 = 1.25 * abs(P.d1(kj + z0) - nu / z0)
    if not (2 * g0 * dist < -nu.real or 4 * g0 * dist <= math.log(2.0) * abs(nu.imag)):
        return False
    M = 0.0
    for i in range(32):
        z = 2 * dist * cmath.exp(2j * math.pi * i / 32)
        M = max(M, abs(P.d1(kj + z) - nu / z))
    M *= 1.25
    if 2 * M * dist < -nu.real:
        return True
    return 4 * M * dist <= math.log(2.0) * abs(nu.imag)


def _other_scale(rep, j):
    kj = rep._kj
    if kj.size == 1:
        return max(1.0, abs(kj[0]))
    d = np.abs(kj - kj[j])
    d = d[d > 0]
    return float(np.min(d)) if d.size else 1.0


@dataclass
class Thimble:
    """Steepest-descent path through a critical point, and its dual ascent path.

    ``minus`` and ``plus`` are the descent arms (the thimble runs from the
    end of minus through sigma to the end of plus); ``up_minus`` and
    ``up_plus`` are the ascent arms (the dual runs from the end of up_minus
    through sigma to the end of up_plus); their intersection number is +1.
    """
    sigma: complex
    direction: complex
    minus: Arm
    plus: Arm
    up_minus: Arm = None
    up_plus: Arm = None


def descent_direction(rep, x, sigma):
    f2 = complex(phase.dphi(rep, x, sigma, 2))
    if f2 == 0:
        return 1.0 + 0j
    return cmath.exp(1j * (math.pi - cmath.phase(f2)) / 2)


def end_thimble(rep, x, k0, crit, *, u_stop):
    """The steepest-descent path from a point k0 that is not critical (the end of a half-line).

    ``plus`` runs from k0 (``u = 0``) down into a valley (or a sink), in the
    direction ``-conj(Phi'(k0))`` where Re Phi falls fastest; ``minus`` is the
    single vertex k0.  Integrated like a thimble, it gives the integral from k0.
    """
    d1 = complex(phase.dphi(rep, x, k0, 1))
    if d1 == 0:
        raise AccuracyError(f"the half-line starts at k = {k0:.6g}, a critical point at x = {x:.6g}; move x slightly")
    d = -d1.conjugate() / abs(d1)
    logs0 = phase.cut_plane_logs(rep, k0)[0] if rep._kj.size else np.zeros(0, complex)
    plus = trace_arm(rep, x, k0, d, u_stop=u_stop, crit=crit, logs0=logs0)
    if plus.end == "stalled":
        raise AccuracyError(f"the steepest-descent path from the end k = {k0:.6g} of a half-line stalled near "
                            f"k = {plus.k[-1]:.6g} (x = {x:.6g}); move x slightly")
    stub = Arm(np.array([k0], dtype=complex), logs0.reshape(1, -1), "end")
    return Thimble(k0, d, stub, plus)


def thimble(rep, x, sigma, crit, *, u_stop, u_up=None, r_beyond=0.0, descent=True, clear=None):
    """Trace the thimble (and, if u_up is given, the dual) through sigma.

    With descent=False only the dual (ascent) arms are traced; the descent
    arms are then single-vertex placeholders (enough for intersection numbers).
    """
    d = descent_direction(rep, x, sigma)
    if not descent:
        logs0 = phase.cut_plane_logs(rep, sigma)[0] if rep._kj.size else np.zeros(0, complex)
        stub = Arm(np.array([sigma], dtype=complex), logs0.reshape(1, -1), "not traced")
        plus = minus = stub
    else:
        plus = trace_arm(rep, x, sigma, d, u_stop=u_stop, crit=crit)
        minus = trace_arm(rep, x, sigma, -d, u_stop=u_stop, crit=crit)
    for a in (plus, minus) if descent else ():
        if a.end == "stalled":
            raise AccuracyError(f"a steepest-descent path from the saddle {sigma:.6g} at x = {x:.6g} stalled "
                                f"after {len(a.k)} steps near k = {a.k[-1]:.6g}; this happens where saddles "
                                f"coalesce: move x slightly")
    t = Thimble(sigma, d, minus, plus)
    if u_up is not None:
        for name, dd in (("up_plus", 1j * d), ("up_minus", -1j * d)):
            # an ascent arm that winds into a branch point ends after one turn that contains the rest
            # (_captured_turn), but may wind a few times before it gets there
            arm = trace_arm(rep, x, sigma, dd, ascent=True, u_stop=u_up, crit=crit, r_beyond=r_beyond, clear=clear,
                            max_steps=20000)
            if arm.end == "stalled":
                raise AccuracyError(f"a steepest-ascent path from the saddle {sigma:.6g} at x = {x:.6g} stalled "
                                    f"near k = {arm.k[-1]:.6g}; move x slightly")
            setattr(t, name, arm)
    return t
