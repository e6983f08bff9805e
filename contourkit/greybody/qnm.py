"""Quasinormal modes: complex omega with purely outgoing waves at both ends.

Method (two independent stages).

1. Candidates from a spectral method on a compactified hyperboloidal
   coordinate.  The outgoing behaviour is factored out, ``psi = exp(i k H) phi``,
   with a height function H that behaves as +x* at the far end(s) and -x* at
   a horizon; the equation for phi is then regular-singular at the
   compactified ends, outgoing conditions become regularity, and Chebyshev
   collocation turns it into a quadratic eigenvalue problem
   ``(M0 + k M1 + k^2 M2) phi = 0``, solved by companion linearisation.
   Two kinds of ends:

   * a horizon y_h and infinity (radial equations): ``z = l/(y - y_c)`` in
     [0, 1], ``H' = -1/D + 2 (1/D_0 + sigma/Y)``;
   * two ends at x* -> +-infinity with exponentially decaying tails:
     ``s = tanh(x*/lambda)`` in [-1, 1], ``H = lambda ln cosh(x*/lambda)``, with
     lambda = 2/(decay rate of V), so that ``V cosh^2(x*/lambda)`` stays finite.

   Eigenvalues that agree at two resolutions are the candidates.

2. Each candidate is polished by a secant iteration on the Wronskian of the
   two boundary solutions -- the horizon's Frobenius series, or the outgoing
   asymptotic series started far out on a ray ``y = y_m + t exp(i theta)``
   along which the outgoing wave decays (theta = -arg k + pi/4 for a far end;
   between -arg k and pi/2 for exponential tails, which need Re y -> infinity)
   and integrated inwards, the direction in which it dominates.  Roots already
   found are divided out of the Wronskian (deflation), so no root is reported
   twice.  A second polishing with another ray angle, matching point and
   tolerance gives the error estimate; the normalised Wronskian on that second
   path is the residual.

Only modes with Re omega >= 0 are reported (for a real potential, -conj(omega)
is a mode as well), sorted by |Im omega|; ``overtone`` counts the converged
spectral eigenvalues below each mode.  Both limits of V must be equal (V0); the
frequencies are then ``omega = sqrt(k^2 + V0)``.

References
----------
.. [1] E. W. Leaver, Proc. R. Soc. Lond. A 402 (1985) 285 (Schwarzschild values).
.. [2] J. L. Jaramillo, R. Panosso Macedo and L. Al Sheikh, Phys. Rev. X 11
   (2021) 031003 (hyperboloidal compactification and spectral methods for
   quasinormal modes; from memory).
.. [3] N. Andersson, Class. Quantum Grav. 14 (1997) (complex-coordinate
   integration of the outgoing solution; common practice, from memory).
"""
import cmath
import math
import numbers

import numpy as np
import scipy.linalg
import sympy as sp

from ..errors import AccuracyError, InputError
from ._odes import integrate_gl
from .results import ModeList, QuasinormalMode

__all__ = ["quasinormal_modes", "spectral_candidates", "wronskian"]


def _cheb(N):
    """Chebyshev-Lobatto points on [-1, 1] (descending) and differentiation matrix."""
    j = np.arange(N + 1)
    x = np.cos(np.pi * j / N)
    c = np.ones(N + 1)
    c[0] = c[-1] = 2.0
    c = c * (-1.0) ** j
    X = np.tile(x, (N + 1, 1)).T
    dX = X - X.T
    Dm = np.outer(c, 1.0 / c) / (dX + np.eye(N + 1))
    Dm = Dm - np.diag(Dm.sum(axis=1))
    return x, Dm


def _check(pot):
    VL, VR = pot.limits
    if abs(VL - VR) > 1e-12 * max(1.0, abs(VL), abs(VR)):
        raise InputError("quasinormal modes need equal limits of V at both ends (got "
                         f"{VL:.6g} and {VR:.6g}): with different limits the two wave numbers have "
                         "different branch cuts in omega.")
    for e in (pot.left, pot.right):
        if e.kind == "asymptotic" and e.coulomb:
            raise InputError("the potential has a 1/x tail (Coulomb-like): its outgoing waves carry a "
                             "logarithmic phase that depends on 1/k^2, which the quasinormal-mode search "
                             "does not handle.")
    if pot.left.kind == "asymptotic":
        if pot.left.power_law or pot.right.power_law or pot.left.D0 != 1.0 or pot._D != 1:
            raise InputError("quasinormal modes of a potential with two ends at infinity need V in the "
                             "tortoise coordinate with tails that decay exponentially (or faster); for a "
                             "power-law (centrifugal) tail use radial(), which has a horizon end.")
    return 0.5 * (VL + VR)


# ------------------------------------------------------------------ spectral
def _horizon_operator(pot):
    """Symbolic coefficient functions of the hyperboloidal equation in z (horizon + infinity)."""
    if hasattr(pot, "_qnm_ops"):
        return pot._qnm_ops
    y = pot.x
    end = pot.right
    z = sp.Symbol("z", positive=True)
    yc = sp.nsimplify(end.y_c)
    ell = sp.nsimplify(pot.horizon) - yc if float(pot.horizon).is_integer() else sp.Float(pot.horizon, 30) - yc
    D0 = sp.nsimplify(end.D0) if float(end.D0).is_integer() else sp.Float(end.D0, 30)
    D1 = complex(end.Dc[1]).real if len(end.Dc) > 1 else 0.0
    sigma = -sp.Float(D1, 30) / D0 ** 2 if D1 != 0 else sp.Integer(0)
    D = pot._D.subs(y, yc + ell / z)
    V0 = pot.limits[1]
    U = (pot.V - (sp.nsimplify(V0) if float(V0).is_integer() else sp.Float(V0, 30))).subs(y, yc + ell / z)
    Y = ell / z
    hp = 1 / D0 + sigma / Y
    P = -1 + 2 * D * hp
    F = 4 * hp * (1 - D * hp)
    simp = (lambda e: sp.cancel(sp.together(e))) if D.is_rational_function(z) and U.is_rational_function(z) \
        else (lambda e: e)
    exprs = {
        "c2": simp(D * z ** 2),
        "c1": simp(2 * D * z + z ** 2 * sp.diff(D, z)),
        "c0": simp(-(U / D) * ell ** 2 / z ** 2),
        "p1": simp(-2 * sp.I * ell * P),
        "p0": simp(-sp.I * ell * sp.diff(P, z)),
        "q0": simp(F * ell ** 2 / z ** 2),
    }
    ops = {}
    for key, e in exprs.items():
        ops[key] = (e, sp.lambdify(z, e, modules="numpy"), z)
    pot._qnm_ops = ops
    return ops


def _eval_coef(entry, pts):
    e, f, z = entry
    with np.errstate(all="ignore"):
        vals = np.asarray(f(pts.astype(complex)), dtype=complex) * np.ones(pts.shape)
    for i in np.nonzero(~np.isfinite(vals))[0]:
        p = pts[i]
        q = p + (1e-9 if p == 0 else -1e-9)
        with np.errstate(all="ignore"):
            lim = complex(f(complex(q)))
        if not np.isfinite(lim):
            try:
                lim = complex(sp.N(sp.limit(e, z, sp.nsimplify(p), "+" if p == 0 else "-")))
            except Exception:   # no limit: the operator is singular there
                lim = complex("nan")
        if not np.isfinite(lim):
            raise InputError("the compactified equation is singular at an end; the potential does "
                             "not have the asymptotics the quasinormal-mode search needs.")
        vals[i] = lim
    return vals


def _spectral_horizon(pot, N):
    x, Dm = _cheb(N)
    zz = (1.0 + x) / 2.0          # z in [0, 1]
    D1 = 2.0 * Dm
    D2 = D1 @ D1
    ops = _horizon_operator(pot)
    c = {k: _eval_coef(v, zz) for k, v in ops.items()}
    M0 = np.diag(c["c2"]) @ D2 + np.diag(c["c1"]) @ D1 + np.diag(c["c0"])
    M1 = np.diag(c["p1"]) @ D1 + np.diag(c["p0"])
    M2 = np.diag(c["q0"])
    return M0, M1, M2


def _decay_rate(pot, e):
    """Exponential decay rate beta of U = V - V_end at an end (None: faster than exponential)."""
    y = pot.x
    U = pot.V - (pot._VR_exact if e.side > 0 else pot._VL_exact)
    try:
        lim = sp.limit(sp.log(U ** 2) / (2 * e.side * y), y, e.side * sp.oo)
        if lim == -sp.oo:
            return None
        b = -float(lim)
        if math.isfinite(b) and b > 0:
            return b
    except Exception:   # sympy cannot take the limit: estimate numerically below
        pass
    t = np.linspace(0, 200 * pot.scale, 2001)
    ys = e.y_base + e.side * t
    with np.errstate(all="ignore"):
        a = np.array([e.U_abs(v) for v in ys])
    amp = max(pot.amplitude, 1e-300)
    sel = (a < 1e-6 * amp) & (a > 1e-14 * amp)
    if np.count_nonzero(sel) < 5:
        return None
    slope = np.polyfit(t[sel], np.log(a[sel]), 2)
    if slope[0] < -1e-3 * abs(slope[1]) / max(t[sel].max(), 1e-300):
        return None                    # curving down: faster than exponential
    return -slope[1] if slope[1] < 0 else None


def _decay_lambda(pot):
    """lambda = 2/beta, beta the slowest exponential decay rate of the tails."""
    if hasattr(pot, "_qnm_lambda"):
        return pot._qnm_lambda
    betas = [_decay_rate(pot, e) for e in (pot.left, pot.right)]
    width = pot.core[1] - pot.core[0]
    finite = [b for b in betas if b]
    lam = 2.0 / min(finite) if finite else max(width / 4, 0.5)
    pot._qnm_lambda = lam
    return lam


def _spectral_tortoise(pot, N, V0):
    lam = _decay_lambda(pot)
    s, Dm = _cheb(N)
    mid = 0.5 * (pot.core[0] + pot.core[1])
    inner = s.copy()
    inner[0], inner[-1] = 1 - 1e-9, -(1 - 1e-9)
    xs = mid + lam * np.arctanh(inner)
    with np.errstate(all="ignore"):
        u = (pot.V_at(xs) - V0) / (1 - inner ** 2)
    u[~np.isfinite(u)] = 0.0
    M0 = np.diag(1 - s ** 2) @ Dm @ Dm - np.diag(2 * s) @ Dm - lam ** 2 * np.diag(u)
    M1 = 1j * lam * (np.diag(2 * s) @ Dm + np.eye(N + 1))
    M2 = lam ** 2 * np.eye(N + 1)
    return M0, M1, M2


def _horizon_tortoise_map(pot):
    """lambda, and y(x*) at given x* for a horizon with an exponentially decaying far tail.

    x* = 0 at the peak of |V - V_end|; y(x*) from dy/dx* = D(y), integrated in
    u = ln(y - y_h) (du/dx* -> 2 kappa at the horizon: smooth there).
    Returns (lam, ys_of) with ys_of(array of x*) -> array of y.
    """
    if hasattr(pot, "_qnm_hmap"):
        return pot._qnm_hmap
    from scipy.integrate import solve_ivp
    yh, kap = pot.horizon, pot.left.kappa
    beta_R = _decay_rate(pot, pot.right)
    beta_R = beta_R * pot.right.D0 if beta_R else None        # rate in x* (x* ~ y/D0 far out)
    # at the horizon V - V_h ~ (y - y_h)^p ~ exp(2 kappa p x*): p from the Taylor coefficients
    Vt, rho = pot.left.Vt, 0.5 * pot.left.R_conv
    mags = [abs(Vt[m]) * rho ** m for m in range(1, min(len(Vt), 9))]
    big = max(mags) if mags else 0.0
    p = next((m + 1 for m, v in enumerate(mags) if v > 1e-10 * big), 1) if big > 0 else 1
    lam = 2.0 / min([2.0 * kap * p] + ([beta_R] if beta_R else []))
    g = yh + (pot.core[1] - yh) * np.logspace(-4, 0, 400)
    V0 = pot.limits[1]
    y_ref = float(g[np.argmax(np.abs(pot.V_at(g) - V0))])
    u_ref = math.log(y_ref - yh)

    def rhs(t, u):
        e = np.exp(u[0])
        with np.errstate(all="ignore"):
            d = complex(pot._D_np(complex(yh + e))).real
        return [d / e]
    cache = {}

    def ys_of(xs):
        xs = np.asarray(xs, dtype=float)
        out = np.empty_like(xs)
        for sgn in (-1, 1):
            sel = (xs * sgn > 0)
            if not np.any(sel):
                continue
            tt = np.sort(np.abs(xs[sel])) * sgn
            sol = solve_ivp(rhs, (0.0, tt[-1]), [u_ref], t_eval=tt, method="DOP853", rtol=1e-12, atol=1e-12)
            if not sol.success:
                raise InputError(f"the tortoise coordinate could not be inverted ({sol.message}); "
                                 "dx*/dx must be positive and finite beyond the horizon.")
            vals = dict(zip(tt.tolist(), (yh + np.exp(sol.y[0])).tolist()))
            out[sel] = [vals[v] for v in xs[sel].tolist()]
        out[xs == 0] = y_ref
        return out
    pot._qnm_hmap = (lam, ys_of)
    return pot._qnm_hmap


def _spectral_horizon_fast(pot, N, V0):
    """Tortoise compactification s = tanh(x*/lambda) for a horizon and an exponential far tail."""
    lam, ys_of = _horizon_tortoise_map(pot)
    s, Dm = _cheb(N)
    inner = s.copy()
    inner[0], inner[-1] = 1 - 1e-9, -(1 - 1e-9)
    xs = lam * np.arctanh(inner)
    ys = ys_of(xs)
    with np.errstate(all="ignore"):
        u = (pot.V_at(ys) - V0) / (1 - inner ** 2)
    u[~np.isfinite(u)] = 0.0
    u[0] = 0.0 if abs(u[1]) < 1e-8 * max(np.max(np.abs(u)), 1e-300) else u[0]
    M0 = np.diag(1 - s ** 2) @ Dm @ Dm - np.diag(2 * s) @ Dm - lam ** 2 * np.diag(u)
    M1 = 1j * lam * (np.diag(2 * s) @ Dm + np.eye(N + 1))
    M2 = lam ** 2 * np.eye(N + 1)
    return M0, M1, M2


def _qep(M0, M1, M2):
    n = M0.shape[0]
    I = np.eye(n)
    Z = np.zeros((n, n))
    A = np.block([[Z, I], [-M0, -M1]])
    B = np.block([[I, Z], [Z, M2]])
    with np.errstate(all="ignore"):
        w = scipy.linalg.eigvals(A, B)
    return w[np.isfinite(w) & (np.abs(w) < 1e6)]


def _backward_error(M0, M1, M2, k):
    Q = M0 + k * M1 + k * k * M2
    sv = np.linalg.svd(Q, compute_uv=False)
    scale = np.linalg.norm(M0, 2) + abs(k) * np.linalg.norm(M1, 2) + abs(k) ** 2 * np.linalg.norm(M2, 2)
    return float(sv[-1] / scale)


def spectral_candidates(pot, *, N=(32, 44), details=False):
    """Converged eigenvalues k (Im k < 0, Re k >= 0) of the spectral discretisation.

    With ``details``, tuples (k, |k(N1) - k(N2)|, backward error at N2).
    """
    _check(pot)
    V0 = pot.limits[1]
    if pot.left.kind == "horizon" and pot.right.fast and not pot.right.power_law:
        make = (lambda n: _spectral_horizon_fast(pot, n, V0))      # horizon + exponential far tail
    elif pot.left.kind == "horizon":
        make = (lambda n: _spectral_horizon(pot, n))
    else:
        make = (lambda n: _spectral_tortoise(pot, n, V0))
    mats = [make(n) for n in N]
    ev = [_qep(*m) for m in mats]
    out = []
    for k in ev[1]:
        if not (k.imag < 0 and k.real >= -1e-7 * abs(k)):
            continue
        d = np.min(np.abs(ev[0] - k)) if ev[0].size else np.inf
        if d < 2e-2 * max(abs(k), 1e-3):
            if abs(k.real) < 1e-9 * abs(k):
                k = complex(0.0, k.imag)
            out.append((complex(k), float(d)))
    out.sort(key=lambda t: (abs(t[0].imag), t[0].real))
    uniq = []
    for k, d in out:
        if all(abs(k - q[0]) > 1e-6 * max(abs(k), 1e-3) for q in uniq):
            uniq.append((k, d))
    if details:
        return [(k, d, _backward_error(*mats[1], k)) for k, d in uniq]
    return [k for k, _ in uniq]


# ------------------------------------------------------------------ Wronskian
def _config(pot, k, variant):
    """Freeze the path (angle, matching point, far points) for a polishing run."""
    tol = 1e-16
    ang = -cmath.phase(k) if k != 0 else 0.0
    if pot.left.kind == "horizon" and not pot.right.fast:
        theta = ang + (math.pi / 4 if variant == 0 else math.pi / 3)
        theta = min(theta, 0.9 * math.pi)
        y_m = pot.left.start_point(k, tol) if variant == 0 else \
            pot.horizon + 0.35 * pot.left.R_conv
        e = cmath.exp(1j * theta)
        y_far = pot.right.start_point(k, tol, direction=e, base=y_m)
        if variant == 1:
            y_far = y_m + 1.5 * (y_far - y_m)
        return {"y_m": y_m, "ends": [(pot.right, y_far)], "density": 2.0 if variant == 0 else 3.0}
    frac = 0.5 if variant == 0 else 0.65
    theta = ang + frac * (math.pi / 2 - ang)
    e = cmath.exp(1j * theta)
    if pot.left.kind == "horizon":      # horizon and an exponentially decaying far tail
        y_m = pot.left.start_point(k, tol) if variant == 0 else pot.horizon + 0.35 * pot.left.R_conv
        y_far = pot.right.start_point(k, tol, direction=e, base=y_m)
        return {"y_m": y_m, "ends": [(pot.right, y_far)], "density": 2.0 if variant == 0 else 3.0}
    mid = 0.5 * (pot.core[0] + pot.core[1]) + (0.0 if variant == 0 else 0.1 * pot.scale)
    yR = pot.right.start_point(k, tol, direction=e, base=mid)
    yL = pot.left.start_point(k, tol, direction=e, base=mid)
    return {"y_m": mid, "ends": [(pot.left, yL), (pot.right, yR)], "density": 2.0 if variant == 0 else 3.0}


def wronskian(pot, k, cfg, V0=0.0):
    """W(k) of the two outgoing solutions at the matching point and its normalised size."""
    tol = 1e-16
    om2 = k * k + V0
    y_m = cfg["y_m"]
    sols = []
    if pot.left.kind == "horizon":
        st, _, _ = pot.left.state(k, y_m, tol=tol, with_phase=False)
        sols.append((st, 0.0))
    for end, y0 in cfg["ends"]:
        st, _, _ = end.state(k, y0, tol=tol, with_phase=False)
        (u, w), ls, _ = integrate_gl(pot._coef_vec, om2, y0, y_m, st, density=cfg["density"])
        sols.append(((u, w), ls))
    (a, la), (b, lb) = sols
    if "ref" not in cfg:
        cfg["ref"] = la + lb            # fixed reference scale: W stays continuous in k
    W = (a[0] * b[1] - a[1] * b[0])
    ak = max(abs(k), 1e-300)
    norm = math.hypot(abs(a[0]) * ak, abs(a[1])) * math.hypot(abs(b[0]) * ak, abs(b[1])) / ak
    return W * cmath.exp(min(la + lb - cfg["ref"], 600.0)), abs(W) / norm if norm > 0 else math.inf


def _polish(pot, k0, cfg, found, V0, tol=1e-13, maxit=24):
    """Secant iteration on the deflated Wronskian; (root, converged)."""
    def F(k):
        W, _ = wronskian(pot, k, cfg, V0)
        for q in found:
            W = W / (k - q)
        return W
    k1 = k0 * (1 + 1e-6) + 1e-9j * abs(k0)
    f0, f1 = F(k0), F(k1)
    ka, kb = k0, k1
    for it in range(maxit):
        if f1 == f0:
            break
        k2 = kb - f1 * (kb - ka) / (f1 - f0)
        ka, f0 = kb, f1
        kb = k2
        if abs(kb - k0) > 0.5 * abs(k0) or (it > 10 and abs(kb - ka) > 1e-6 * abs(kb)):
            return kb, False          # wandering off: the candidate was spurious
        f1 = F(kb)
        if abs(kb - ka) < tol * abs(kb):
            return kb, True
    return kb, abs(kb - ka) < 1e-10 * abs(kb)


def _parse_region(region):
    if region is None:
        return None
    try:
        vals = [float(v) for v in region]
    except (TypeError, ValueError):
        raise InputError("region must be (re_min, re_max, im_min, im_max) of omega.") from None
    if len(vals) != 4 or not all(math.isfinite(v) for v in vals) or vals[0] >= vals[1] or vals[2] >= vals[3]:
        raise InputError("region must be four finite numbers (re_min, re_max, im_min, im_max) with "
                         "re_min < re_max and im_min < im_max.")
    return vals


def quasinormal_modes(pot, *, n_max=2, region=None):
    """Quasinormal modes of a potential (method in the module docstring).

    Parameters
    ----------
    pot : TortoisePotential
    n_max : int
        Highest overtone returned (n = 0 .. n_max); ignored inside a region
        (all modes found there are returned).
    region : (re_min, re_max, im_min, im_max), optional
        A box in the complex omega plane.

    Returns
    -------
    ModeList
        A list of QuasinormalMode (sorted by |Im omega|) with ``message``;
        empty, with a message saying so, where no mode was found.
    """
    if isinstance(n_max, bool) or not isinstance(n_max, numbers.Integral) or n_max < 0:
        raise InputError(f"n_max must be a non-negative integer (got {n_max!r}).")
    box = _parse_region(region)
    V0 = _check(pot)
    cands = spectral_candidates(pot, details=True)
    to_omega = (lambda k: k) if V0 == 0 else (lambda k: complex(np.sqrt(complex(k * k + V0))))
    if box is not None:
        mr, mi = 0.05 * (box[1] - box[0]), 0.05 * (box[3] - box[2])
        cands = [c for c in cands if box[0] - mr <= to_omega(c[0]).real <= box[1] + mr
                 and box[2] - mi <= to_omega(c[0]).imag <= box[3] + mi]
    found, modes = [], []
    notes = set()
    kap = pot.left.kappa if pot.left.kind == "horizon" else None
    for k, dspec, bwd in cands:
        if kap is not None and abs(k.real) < 1e-6 * abs(k) and \
                abs(k.imag / kap - round(k.imag / kap)) < 1e-5 and round(k.imag / kap) != 0:
            notes.add("candidates at omega = -i m kappa (where the horizon series has a logarithm "
                      "and the spectral method cannot decide) were skipped")
            continue
        if box is None and len(modes) > n_max and abs(k.imag) > max(abs(m[0].imag) for m in modes[: n_max + 1]):
            break
        if pot.right.fast and not pot.right.power_law and math.pi / 2 + cmath.phase(k) < 0.2:
            # Exponential tails and k near the negative imaginary axis: no ray with Re y -> inf
            # makes the outgoing wave subdominant; keep the spectral eigenvalue.
            if all(abs(k - q) > 1e-7 * abs(k) for q in found) and dspec < 1e-6 * abs(k):
                found.append(k)
                modes.append((k, k + 10 * dspec, k, bwd))
                modes.sort(key=lambda m: (abs(m[0].imag), m[0].real))
                notes.add("modes near the imaginary axis are spectral eigenvalues (error: two "
                          "resolutions; residual: backward error of the discretisation)")
            continue
        try:
            cfgA = _config(pot, k, 0)
            kA, okA = _polish(pot, k, cfgA, found, V0, tol=1e-11)
            if not okA:
                continue
            cfgB = _config(pot, kA, 1)
            kB, okB = _polish(pot, kA, cfgB, found, V0)
        except (AccuracyError, OverflowError, ZeroDivisionError, FloatingPointError):
            continue
        if not okB or kB.imag >= 0 or kB.real < -1e-8 * abs(kB):
            continue
        if any(abs(kB - q) < 1e-7 * abs(kB) for q in found):
            continue
        _, res = wronskian(pot, kB, cfgA, V0)
        found.append(kB)
        modes.append((kB, kA, k, res))
        modes.sort(key=lambda m: (abs(m[0].imag), m[0].real))
    out = []
    for n, (kB, kA, k, res) in enumerate(modes):
        w = to_omega(kB)
        if box is not None and not (box[0] <= w.real <= box[1] and box[2] <= w.imag <= box[3]):
            continue
        if box is None and n > n_max:
            break
        out.append(QuasinormalMode(omega=w, overtone=n, error=abs(to_omega(kA) - w), residual=res,
                                   spectral_estimate=to_omega(k)))
    modes = out
    method = "hyperboloidal Chebyshev spectrum, polished on the Wronskian along complex paths"
    if not modes:
        msg = ("no quasinormal mode found" + (f" in the region {tuple(box)}" if box else "")
               + f" ({len(cands)} converged spectral eigenvalue(s) in the lower half plane)")
    else:
        msg = (f"{len(modes)} mode(s); overtone n counts the modes found below each one"
               + (" (inside a region the count starts at the lowest mode in it)" if box else "")
               + "".join("; " + n for n in sorted(notes)))
    return ModeList(modes, message=msg, method=method)
