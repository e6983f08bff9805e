"""Integration of ``D (D psi')' + (omega^2 - V) psi = 0`` along straight paths.

State (u, w) = (psi, dpsi/dx*) with ``u' = w / D`` and
``w' = -(omega^2 - V) u / D`` (prime: d/dy, y complex on a straight segment
y(t) = y_a + t (y_b - y_a), t in [0, 1]).  Two engines:

* double precision: scipy's DOP853 (order 8) with tight tolerances, the
  segment split into pieces at whose ends the state is rescaled, so that
  exponentially large solutions never overflow (the scale is kept as a
  logarithm);
* raised precision: an s-stage Gauss-Legendre collocation method (order 2s)
  in mpmath on a mesh taken from a double-precision run.  For this linear
  system the stage equations reduce to one s-by-s linear solve per step.

References
----------
.. [1] E. Hairer, S. P. Norsett, G. Wanner, Solving Ordinary Differential
   Equations I, 2nd ed. (Springer, 1993), section II.5 (DOP853) and
   section II.7 (Gauss-Legendre collocation methods).
"""
import functools
import math

import mpmath
import numpy as np
from scipy.integrate import solve_ivp

from ..errors import AccuracyError

__all__ = ["integrate_double", "integrate_mp", "gauss_legendre_tableau"]


def integrate_double(coef, omega2, y_a, y_b, state, *, rtol=1e-12, pieces=8):
    """Integrate the state from y_a to y_b in double precision.

    Parameters
    ----------
    coef : callable
        ``coef(y) -> (1/D(y), V(y)/D(y))`` for complex y.
    omega2 : complex
    y_a, y_b : complex
    state : (complex, complex)
        (u, w) at y_a.
    rtol : float
    pieces : int
        Number of rescaling pieces.

    Returns
    -------
    (u, w), log_scale, mesh
        The state at y_b is ``exp(log_scale) * (u, w)``; mesh is the list of
        accepted points (complex y) for the raised-precision engine.
    """
    delta = complex(y_b) - complex(y_a)
    y_a = complex(y_a)

    def rhs(t, s):
        y = y_a + t * delta
        inv_d, v_d = coef(y)
        return np.array([delta * inv_d * s[1], -delta * (omega2 * inv_d - v_d) * s[0]])

    s = np.array([complex(state[0]), complex(state[1])])
    log_scale = 0.0
    mesh = [y_a]
    ts = np.linspace(0.0, 1.0, pieces + 1)
    for t0, t1 in zip(ts[:-1], ts[1:]):
        nrm = float(np.max(np.abs(s)))
        if not np.isfinite(nrm) or nrm == 0.0:
            raise AccuracyError("the solution became zero or non-finite during the integration; "
                                "check that V is finite on the integration path.")
        s = s / nrm
        log_scale += math.log(nrm)
        with np.errstate(all="ignore"):
            sol = solve_ivp(rhs, (t0, t1), s, method="DOP853", rtol=rtol, atol=rtol * 1e-10)
        if sol.status != 0 or not np.all(np.isfinite(sol.y[:, -1])):
            raise AccuracyError(f"the ODE integration failed ({sol.message}); the potential may "
                                "be singular on the path or too stiff for rtol; check V.")
        s = sol.y[:, -1]
        mesh.extend((y_a + t * delta) for t in sol.t[1:])
    return (s[0], s[1]), log_scale, mesh


@functools.lru_cache(maxsize=16)
def gauss_legendre_tableau(s, dps):
    """Butcher tableau (a, b, c) of the s-stage Gauss-Legendre method at dps digits."""
    with mpmath.workdps(dps + 10):
        xs = []
        for i in range(1, s + 1):
            x = mpmath.cos(mpmath.pi * (i - mpmath.mpf(1) / 4) / (s + mpmath.mpf(1) / 2))
            for _ in range(100):
                p = mpmath.legendre(s, x)
                dp = s * (x * p - mpmath.legendre(s - 1, x)) / (x * x - 1)
                dx = p / dp
                x -= dx
                if abs(dx) < mpmath.mpf(10) ** (-dps - 8):
                    break
            xs.append(x)
        c = sorted((1 + x) / 2 for x in xs)
        a = [[None] * s for _ in range(s)]
        b = [None] * s
        for j in range(s):
            # Lagrange basis polynomial l_j, coefficients low first
            poly = [mpmath.mpf(1)]
            for m in range(s):
                if m == j:
                    continue
                den = c[j] - c[m]
                new = [mpmath.mpf(0)] * (len(poly) + 1)
                for i, pc in enumerate(poly):
                    new[i + 1] += pc / den
                    new[i] -= pc * c[m] / den
                poly = new
            integ = [mpmath.mpf(0)] + [pc / (i + 1) for i, pc in enumerate(poly)]
            ev = lambda t: mpmath.fsum(ic * t ** i for i, ic in enumerate(integ))
            b[j] = ev(mpmath.mpf(1))
            for i in range(s):
                a[i][j] = ev(c[i])
        return a, b, c


def _solve(M, rhs):
    n = len(M)
    A = [row[:] + [r] for row, r in zip(M, rhs)]
    for col in range(n):
        piv = max(range(col, n), key=lambda i: abs(A[i][col]))
        A[col], A[piv] = A[piv], A[col]
        p = A[col][col]
        for i in range(col + 1, n):
            f = A[i][col] / p
            if f != 0:
                Ai, Ac = A[i], A[col]
                for j in range(col, n + 1):
                    Ai[j] -= f * Ac[j]
    x = [0] * n
    for i in range(n - 1, -1, -1):
        s = A[i][n]
        for j in range(i + 1, n):
            s -= A[i][j] * x[j]
        x[i] = s / A[i][i]
    return x


def integrate_mp(coef_mp, omega2, mesh, state, *, stages, dps):
    """Integrate the state along the points of ``mesh`` with Gauss-Legendre steps.

    Parameters
    ----------
    coef_mp : callable
        mpmath version of ``coef``: ``y -> (1/D, V/D)``.
    omega2 : mpc
    mesh : sequence of complex
        Step end points (first: start).
    state : (mpc, mpc)
    stages : int
        s; the method has order 2s.
    dps : int

    Returns
    -------
    (u, w), log_scale
    """
    with mpmath.workdps(dps):
        a, b, c = gauss_legendre_tableau(stages, dps)
        s_ = stages
        u, w = mpmath.mpc(state[0]), mpmath.mpc(state[1])
        log_scale = mpmath.mpf(0)
        om2 = mpmath.mpc(omega2)
        pts = [mpmath.mpc(p) for p in mesh]
        for y0, y1 in zip(pts[:-1], pts[1:]):
            h = y1 - y0
            al, be = [], []
            for ci in c:
                inv_d, v_d = coef_mp(y0 + ci * h)
                al.append(inv_d)
                be.append(-(om2 * inv_d - v_d))
            r = [mpmath.fsum(a[i][j] * al[j] for j in range(s_)) for i in range(s_)]
            # B_im = sum_j a_ij al_j a_jm
            M = []
            h2 = h * h
            for i in range(s_):
                row = []
                for m in range(s_):
                    bim = mpmath.fsum(a[i][j] * al[j] * a[j][m] for j in range(s_))
                    row.append((1 if i == m else 0) - h2 * be[i] * bim)
                M.append(row)
            rhs = [be[i] * (u + h * w * r[i]) for i in range(s_)]
            q = _solve(M, rhs)
            p = [al[j] * (w + h * mpmath.fsum(a[j][m] * q[m] for m in range(s_))) for j in range(s_)]
            u = u + h * mpmath.fsum(b[j] * p[j] for j in range(s_))
            w = w + h * mpmath.fsum(b[j] * q[j] for j in range(s_))
            nrm = max(abs(u), abs(w))
            if nrm > mpmath.mpf(10) ** 40 or nrm < mpmath.mpf(10) ** -40:
                if nrm == 0:
                    raise AccuracyError("the solution vanished identically during the "
                                        "raised-precision integration.")
                u, w = u / nrm, w / nrm
                log_scale += mpmath.log(nrm)
        return (u, w), log_scale
