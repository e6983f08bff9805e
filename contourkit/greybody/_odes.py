"""Integration of ``D (D psi')' + (omega^2 - V) psi = 0`` along straight paths.

State (u, w) = (psi, dpsi/dx*) with ``u' = w / D`` and
``w' = -(omega^2 - V) u / D`` (prime: d/dy, y complex on a straight segment
y(t) = y_a + t (y_b - y_a), t in [0, 1]).  Two engines:

* double precision: the 8-stage Gauss-Legendre collocation method (order 16)
  on a mesh adapted to the local rate of the solution; all step propagators
  are built in one batched linear solve and multiplied with rescaling, so
  exponentially large solutions never overflow (the scale is kept as a
  logarithm);
* raised precision: the same method in mpmath on the same kind of mesh.  For
  this linear system the stage equations reduce to one s-by-s linear solve
  per step.

References
----------
.. [1] E. Hairer, S. P. Norsett, G. Wanner, Solving Ordinary Differential
   Equations I, 2nd ed. (Springer, 1993), section II.7 (Gauss-Legendre
   collocation methods).
"""
import functools
import math

import mpmath
import numpy as np

from ..errors import AccuracyError

__all__ = ["integrate_gl", "integrate_mp", "gauss_legendre_tableau", "path_mesh"]

_GL_STAGES = 8          # order 16 in double precision


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


def _tableau_np(s):
    a, b, c = gauss_legendre_tableau(s, 30)
    return (np.array([[float(v) for v in row] for row in a]), np.array([float(v) for v in b]),
            np.array([float(v) for v in c]))


def path_mesh(coef_vec, omega2, y_a, y_b, *, density=1.0, min_steps=12, max_steps=400000):
    """Step points t_n in [0, 1] on the path y = y_a + t (y_b - y_a).

    The local rate nu = sqrt(|alpha beta|) + |d ln(alpha beta)/dt|/2 + |d ln alpha/dt|
    (alpha = dy/dt / D, beta = -dy/dt (omega^2 - V)/D) is sampled on a grid
    that is geometric towards both ends, and steps are placed so that
    ``h nu <= 1/density`` on every step.
    """
    delta = complex(y_b) - complex(y_a)
    g = np.geomspace(1e-7, 0.5, 400)
    t = np.unique(np.concatenate([[0.0, 1.0], g, 1 - g, np.linspace(0, 1, 1201)]))
    y = complex(y_a) + t * delta
    inv_d, v_d = coef_vec(y)
    al = delta * inv_d
    be = -delta * (omega2 * inv_d - v_d)
    with np.errstate(all="ignore"):
        prod = np.abs(al * be)
        lam = np.sqrt(prod)
        tiny = 1e-300 + 1e-14 * np.max(prod)
        lp = np.log(prod + tiny)
        la = np.log(np.abs(al) + 1e-300)
        dt = np.diff(t)
        var = 0.5 * np.abs(np.diff(lp)) / dt + np.abs(np.diff(la)) / dt
    nu = np.maximum(0.5 * (lam[1:] + lam[:-1]) + var, 0.0)
    if not np.all(np.isfinite(nu)):
        from ..errors import AccuracyError as _AE
        raise _AE("the coefficients of the equation are not finite on the integration path; "
                  "the potential or dx*/dx is singular there.")
    cum = np.concatenate([[0.0], np.cumsum(nu * dt)]) * density
    n = int(min(max(math.ceil(cum[-1]), min_steps), max_steps))
    if cum[-1] <= 0:
        return np.linspace(0.0, 1.0, n + 1)
    # equidistribute in cum, but never steps longer than 1/min_steps
    target = np.linspace(0.0, cum[-1], n + 1)
    ts = np.interp(target, cum, t)
    extra = np.linspace(0.0, 1.0, min_steps + 1)
    return np.unique(np.concatenate([ts, extra]))


def integrate_gl(coef_vec, omega2, y_a, y_b, state, *, density=1.0, stages=_GL_STAGES, mesh=None,
                 path=False):
    """Integrate the state from y_a to y_b with Gauss-Legendre steps in double precision.

    All step propagators are built at once (one batched linear solve); the
    product is taken with rescaling.  Returns ((u, w), log_scale, mesh) where
    mesh is the array of step points (complex y); with ``path``, also the
    arrays of log-scales and states at the mesh points.
    """
    a, b, c = _tableau_np(stages)
    delta = complex(y_b) - complex(y_a)
    ts = path_mesh(coef_vec, omega2, y_a, y_b, density=density) if mesh is None else mesh
    h = np.diff(ts)                                  # (M,)
    tt = ts[:-1, None] + h[:, None] * c[None, :]     # (M, s)
    inv_d, v_d = coef_vec(complex(y_a) + tt * delta)
    al = delta * np.broadcast_to(inv_d, tt.shape)
    be = -delta * (omega2 * np.broadcast_to(inv_d, tt.shape) - np.broadcast_to(v_d, tt.shape))
    if not (np.all(np.isfinite(al)) and np.all(np.isfinite(be))):
        raise AccuracyError("the coefficients of the equation are not finite on the integration path; "
                            "the potential or dx*/dx is singular there.")
    s_ = stages
    # B = A diag(al) A for every step: (M, s, s)
    Bm = np.einsum("ij,mj,jk->mik", a, al, a)
    Mm = np.eye(s_)[None] - (h * h)[:, None, None] * be[:, :, None] * Bm
    r = al @ a.T                                     # r_i = sum_j a_ij al_j  (M, s)
    rhs = np.stack([be, be * h[:, None] * r], axis=-1)   # (M, s, 2)
    q = np.linalg.solve(Mm, rhs)                     # (M, s, 2)
    aq = np.einsum("jm,nmk->njk", a, q)              # (M, s, 2)
    p1 = al * (h[:, None] * aq[:, :, 0])
    p2 = al * (1 + h[:, None] * aq[:, :, 1])
    hb = h[:, None] * b[None, :]
    P11 = 1 + np.sum(hb * p1, axis=1)
    P12 = np.sum(hb * p2, axis=1)
    P21 = np.sum(hb * q[:, :, 0], axis=1)
    P22 = 1 + np.sum(hb * q[:, :, 1], axis=1)
    u, w = complex(state[0]), complex(state[1])
    log_scale = 0.0
    hist = [(0.0, u, w)] if path else None
    for m11, m12, m21, m22 in zip(P11.tolist(), P12.tolist(), P21.tolist(), P22.tolist()):
        u, w = m11 * u + m12 * w, m21 * u + m22 * w
        if path:
            hist.append((log_scale, u, w))
        nrm = abs(u) + abs(w)
        if nrm > 1e100 or nrm < 1e-100:
            if nrm == 0.0 or not math.isfinite(nrm):
                raise AccuracyError("the solution became zero or non-finite during the integration; "
                                    "check that V is finite on the integration path.")
            u, w = u / nrm, w / nrm
            log_scale += math.log(nrm)
    if not (math.isfinite(abs(u)) and math.isfinite(abs(w))):
        raise AccuracyError("the solution became non-finite during the integration.")
    if path:
        arr = np.array(hist)
        return (u, w), log_scale, complex(y_a) + ts * delta, arr
    return (u, w), log_scale, complex(y_a) + ts * delta


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
