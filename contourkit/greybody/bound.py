"""Bound states of ``-psi_** + V psi = E psi`` below both limits of V.

Method: Sturm oscillation in Pruefer form.  With psi = rho sin(theta),
psi_* = rho cos(theta), the angle obeys ``dtheta/dy = [cos^2 theta + (E - V)
sin^2 theta] / D`` (D = dy/dx*).  The solution that decays at the left end
(its exact boundary data from the asymptotic or horizon series) gives
theta_L, the one that decays at the right end theta_R; at a matching point c
the mismatch ``Delta(E) = theta_L(c) - theta_R(c)`` increases strictly with E,
and E is the n-th eigenvalue (n nodes) exactly when Delta(E) = n pi.  The
number of bound states is the number of n >= 0 with n pi < Delta(E_top),
E_top = min(V(-inf), V(+inf)), evaluated with the exact threshold data of
each end, so the count does not depend on how close to the threshold the
highest state lies.  Each eigenvalue is then found by Brent's method on
Delta(E) - n pi, and checked by the normalised Wronskian of the two decaying
solutions (the residual).  The error estimate is the change of E when the
step density of the integration is lowered (rtol 100 times larger).

References
----------
.. [1] J. D. Pryce, Numerical Solution of Sturm-Liouville Problems (Oxford,
   1993), ch. 2 (Pruefer transformation, the mismatch function and the count
   of eigenvalues).
"""
import math
import numbers

import numpy as np
from scipy.optimize import brentq

from ..errors import AccuracyError, InputError
from ._odes import integrate_gl
from .results import BoundState, BoundStateList, Profile

__all__ = ["bound_states", "mismatch"]


def _decaying_state(end, E, tol):
    """(y0, (u, w)) of the solution decaying towards the end at energy E (real, u > 0)."""
    kap2 = end.V_end - E
    if kap2 <= 0:
        kap = 0.0
    else:
        kap = math.sqrt(kap2)
    if kap == 0.0:
        if end.kind == "horizon":
            y0 = end.start_point(1e-3, tol)
            st, _, _ = end.state(0.0, y0, tol=tol, with_phase=False)
        else:
            y0 = end.start_point(1e-12, tol)
            st = (1.0, 0.0)
    else:
        k = 1j * kap
        y0 = end.start_point(k, tol)
        st, _, _ = end.state(k, y0, tol=tol, with_phase=False)
    u, w = complex(st[0]).real, complex(st[1]).real
    if u < 0:
        u, w = -u, -w
    return float(complex(y0).real), (u, w)


def _theta(pot, E, y0, st, c, density):
    """Pruefer angle at c of the solution with state st at y0 (continuous along the path)."""
    (u, w), _, _, hist = integrate_gl(pot._coef_vec, E, y0, c, st, density=density, path=True)
    ang = np.arctan2(np.real(hist[:, 1]), np.real(hist[:, 2]))
    ang = np.unwrap(ang)
    th0 = math.atan2(st[0], st[1])
    return float(ang[-1] - ang[0] + th0)


def _density(rtol):
    return max(1.0, min(6.0, 0.25 * -math.log10(rtol)))


def mismatch(pot, E, *, rtol=1e-12, c=None):
    """Delta(E) = theta_L(c) - theta_R(c) (see the module docstring)."""
    tol = 1e-16
    c = pot._bs_match if c is None else c
    yL, sL = _decaying_state(pot.left, E, tol)
    yR, sR = _decaying_state(pot.right, E, tol)
    d = _density(rtol)
    return _theta(pot, E, yL, sL, c, d) - _theta(pot, E, yR, sR, c, d)


def _profile(pot, E, tol=1e-16):
    c = pot._bs_match
    out = []
    for end in (pot.left, pot.right):
        y0, st = _decaying_state(end, E, tol)
        (u, w), ls, mesh, hist = integrate_gl(pot._coef_vec, E, y0, c, st, density=3.0, path=True)
        out.append((np.real(mesh), hist, u, w, ls))
    (yl, hl, ul, wl, lsl), (yr, hr, ur, wr, lsr) = out
    # residual: normalised Wronskian at c
    W = ul * wr - wl * ur
    res = abs(W) / (math.hypot(abs(ul), abs(wl)) * math.hypot(abs(ur), abs(wr)))
    # join: scale the right part to the left part at c
    psil = np.real(hl[:, 1]) * np.exp(np.real(hl[:, 0]) - lsl)
    psir = np.real(hr[:, 1]) * np.exp(np.real(hr[:, 0]) - lsr)
    ratio = (ul.real if abs(ul) > abs(wl) else wl.real) / (ur.real if abs(ul) > abs(wl) else wr.real)
    psir = psir * ratio
    y = np.concatenate([yl, yr[::-1][1:]])
    psi = np.concatenate([psil, psir[::-1][1:]])
    order = np.argsort(y)
    y, psi = y[order], psi[order]
    keep = np.concatenate([[True], np.diff(y) > 0])
    y, psi = y[keep], psi[keep]
    dxs = np.real(pot.dxstar_dx_func(y.astype(complex))) * np.ones_like(y)
    norm = np.sqrt(np.trapezoid(psi ** 2 * dxs, y))
    psi = psi / norm
    if psi[np.argmax(np.abs(psi) > 1e-3 * np.max(np.abs(psi)))] < 0:
        psi = -psi
    nodes = int(np.count_nonzero(np.sign(psi[:-1]) * np.sign(psi[1:]) < 0))
    return Profile(coordinate=y, xstar=pot.xstar_func(y), psi=psi), res, nodes


def bound_states(pot, *, rtol=1e-12):
    """All bound states E = omega^2 < min(V(-inf), V(+inf)), lowest first.

    Parameters
    ----------
    pot : TortoisePotential
    rtol : float
        Tolerance of the Pruefer integration.

    Returns
    -------
    BoundStateList
        BoundState objects with energy, node_count, profile, error, residual;
        ``count`` is the number of states from the oscillation count.
    """
    if isinstance(rtol, bool) or not isinstance(rtol, numbers.Real) or not (1e-14 <= rtol < 1e-3):
        raise InputError(f"rtol must be a number in [1e-14, 1e-3) (got {rtol!r}).")
    for e in (pot.left, pot.right):
        if e.kind == "asymptotic" and e.power_law:
            raise InputError("bound_states needs tails that decay faster than any power (or a horizon "
                             "end); a power-law tail (for example 1/x^2) is not supported here.")
    E_top = min(pot.limits)
    yL, yR = pot.core
    grid = np.linspace(yL if pot.horizon is None else pot.horizon + 1e-6 * max(1, abs(pot.horizon)),
                       yR, 4001)
    vals = pot.V_at(grid)
    E_min = float(np.min(vals))
    pot._bs_match = float(grid[np.argmin(vals)])
    if E_min >= E_top:
        return BoundStateList([], message="no bound state: V is nowhere below min(V(-inf), V(+inf))",
                              count=0, threshold=E_top)
    span = E_top - E_min
    E_lo = E_min - 1e-3 * span - 1e-12
    d_top = mismatch(pot, E_top, rtol=rtol)
    d_lo = mismatch(pot, E_lo, rtol=rtol)
    if d_lo > 1e-9:
        raise AccuracyError("the oscillation count is inconsistent (Delta > 0 below min V); the "
                            "integration did not resolve the potential.")
    count = int(math.ceil(d_top / math.pi - 1e-9)) if d_top > 0 else 0
    msg = f"{count} bound state(s) below E = {E_top:.10g} (Sturm oscillation count)"
    if abs(d_top / math.pi - round(d_top / math.pi)) < 1e-6 and round(d_top / math.pi) > 0:
        msg += "; a zero-energy resonance sits at the threshold (not counted)"
    states = []
    for n in range(count):
        f = lambda E, n=n: mismatch(pot, E, rtol=rtol) - n * math.pi
        E_n = brentq(f, E_lo, E_top, xtol=1e-15 * max(1.0, abs(E_top)), rtol=1e-15, maxiter=200)
        g = lambda E, n=n: mismatch(pot, E, rtol=rtol * 100) - n * math.pi
        try:
            E_c = brentq(g, E_lo, E_top, xtol=1e-15 * max(1.0, abs(E_top)), rtol=1e-15, maxiter=200)
        except ValueError:
            E_c = E_n
        prof, res, nodes = _profile(pot, E_n)
        if nodes != n:
            msg += f"; state {n}: the sampled profile shows {nodes} sign changes"
        states.append(BoundState(energy=float(E_n), node_count=n, profile=prof,
                                 error=max(abs(E_n - E_c), 4e-16 * max(abs(E_n), span)),
                                 residual=float(res)))
    return BoundStateList(states, message=msg, count=count, threshold=E_top)
