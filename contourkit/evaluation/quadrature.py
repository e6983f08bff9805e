"""Evaluation of contour integrals along steepest-descent paths.

``phi^(n)(x) = integral_C (i k)^n exp(i k x) f(k) dk`` is computed as
``sum_sigma n_sigma exp(Phi(sigma)) integral_{J_sigma} (i k)^n exp(Phi(k) -
Phi(sigma)) dk`` (decompose.py).  Along each straight piece of a traced
thimble the integrand does not oscillate (the path follows constant
Im Phi), so Gauss-Legendre quadrature on each piece converges fast and the
cost does not grow with |x|.  A thimble that ends at a singular point where
the integrand vanishes is finished by the exact log-spiral
``k = k_j + (k_e - k_j) exp(-tau/(nu + 1))``, on which
``(k - k_j)^(nu+1) = const * exp(-tau)``, with Gauss-Laguerre quadrature.

Back ends: numpy in double precision (default, ``dps=None``), or mpmath at
``dps`` digits (``mpmath.workdps``, no global state).  The error estimate is
the difference between two rules (16 and 10 Gauss-Legendre nodes per piece
in double; mpmath.quad's own estimate at dps), plus the truncation
``exp(-u_stop)`` of the arms, relative to the largest thimble contribution.

References
----------
.. [1] D. Huybrechs, S. Vandewalle, SIAM J. Numer. Anal. 44 (2006) 1026.
.. [2] P. J. Davis, P. Rabinowitz, Methods of Numerical Integration, 2nd ed.,
   Academic Press (1984), 2.7 (Gauss rules) (from memory).
"""
import cmath
import math
import warnings
from dataclasses import dataclass, field

import mpmath
import numpy as np

from ..geometry import phase
from ..geometry.contours import Contour
from ..geometry.decompose import coefficient, decompose
from ..errors import AccuracyWarning, ContourError, InputError
from ..geometry.saddles import check_x

_LAG = np.polynomial.laguerre.laggauss(40)


class Value(complex):
    """A complex value with attributes error, dps, success, message, evaluations."""


class MpValue(mpmath.mpc):
    """An mpmath value with attributes error, dps, success, message, evaluations."""


class ArrayValue(np.ndarray):
    """An array of values with attributes error (array), dps, success, message, evaluations.

    Arrays derived from it by arithmetic keep dps, success, message and
    evaluations; their ``error`` is None (it no longer refers to them).
    """

    def __array_finalize__(self, obj):
        for a in ("dps", "success", "message", "evaluations"):
            setattr(self, a, getattr(obj, a, None))
        self.error = None


@dataclass
class Integral:
    """Result of one contour integral.

    Attributes
    ----------
    value : complex or mpmath.mpc
    error : float         estimated absolute error
    scale : float         largest |thimble contribution| (the size of the terms)
    dps : int or None     working precision (None: double)
    success : bool        error <= rtol * max(|value|, scale)
    message : str
    evaluations : int     number of integrand evaluations
    coefficients : list   (intersection coefficient, critical point) pairs
    """
    value: object
    error: float
    scale: float
    dps: object
    success: bool
    message: str
    evaluations: int
    coefficients: list = field(default_factory=list)


def _arm_integral_np(rep, x, arm, logs_sigma, phi_sigma, n):
    """Integral along an arm (traced outward) of (ik)^n exp(Phi - Phi_sigma), two rules.

    The nodes (both Gauss-Legendre rules, plus the Gauss-Laguerre log-spiral
    tail at a sink) are those of :func:`contourkit.evaluation.batch._arm_nodes`.
    """
    from .batch import _arm_nodes
    nodes, _ = _arm_nodes(rep, arm, 1.0)
    tot = {}
    evals = 0
    for rule, (K, W, E) in nodes.items():
        val = np.exp(1j * x * K + E - phi_sigma) * W
        if n:
            val = val * (1j * K) ** n
        tot[rule] = np.sum(val)
        evals += K.size
    return tot[16], abs(tot[16] - tot[10]), evals


#: from this many digits on, mpmath integrates an arm on fewer, longer chords (_coarse_vertices)
COARSE_DPS = 60


def _coarse_vertices(rep, arm):
    """Indices of arm vertices for chords that hug the traced arm; far fewer than the vertices.

    The arm is traced in double precision with steps of about one unit of
    ``u = Re(Phi_sigma - Phi)``; at hundreds of digits a tanh-sinh rule on
    each step costs too much.  A chord from vertex i may reach vertex j while
    the growth of u stays below ``max(2, u_i)`` (so the integrand changes by
    a bounded factor relative to its size, geometrically coarser far out) and
    every vertex in between lies within a tenth of the chord's length and a
    quarter of the distance to the nearest singular point from the chord:
    the integrand is analytic between chord and arm, so by Cauchy's theorem
    the chords give the same integral.
    """
    k = np.asarray(arm.k)
    u = np.asarray(arm.u) if arm.u is not None and len(arm.u) == len(k) else None
    if u is None or len(k) < 4:
        return list(range(len(k)))
    kj = rep._kj
    out = [0]
    i = 0
    n = len(k)
    while i < n - 1:
        j = i + 1
        while j + 1 < n:
            c = j + 1
            if u[c] - u[i] > max(2.0, abs(u[i])):
                break
            a, b = k[i], k[c]
            L = abs(b - a)
            mid = k[i + 1:c]
            t = np.clip(((mid - a) * np.conj(b - a)).real / max(L * L, 1e-300), 0.0, 1.0)
            dev = np.abs(mid - (a + t * (b - a))) if mid.size else np.zeros(0)
            clear = math.inf
            if kj.size:
                tt = np.clip(((kj - a) * np.conj(b - a)).real / max(L * L, 1e-300), 0.0, 1.0)
                clear = float(np.min(np.abs(kj - (a + tt * (b - a)))))
            if dev.size and float(dev.max()) > min(0.1 * L, 0.25 * clear):
                break
            j = c
        out.append(j)
        i = j
    return out


def _arm_integral_mp(rep, x, arm, phi_sigma, n, dps, data, logs_sigma):
    """Integral along an arm in mpmath at dps digits; returns (value, error, evaluations)."""
    total = mpmath.mpc(0)
    err = mpmath.mpf(0)
    count = [0]
    xm = mpmath.mpf(x)
    lg_prev = logs_sigma
    kprev = mpmath.mpc(arm.k[0])
    keep = _coarse_vertices(rep, arm) if dps >= COARSE_DPS else range(len(arm.k))
    for i, i1 in zip(keep[:-1], keep[1:]):
        a = mpmath.mpc(arm.k[i])
        b = mpmath.mpc(arm.k[i1])
        la = phase.continue_logs_mp(data, kprev, lg_prev, a) if i else lg_prev

        def f(t, a=a, b=b, la=la):
            count[0] += 1
            kk = a + t * (b - a)
            lk = phase.continue_logs_mp(data, a, la, kk)
            v = mpmath.exp(phase.phi_mp(data, xm, kk, lk) - phi_sigma) * (b - a)
            return v * (mpmath.j * kk) ** n if n else v
        # the chord's integrand is below e^-u relative to the saddle's: it needs u/ln(10) fewer digits;
        # it is integrated scaled by e^u (mpmath's error floor is absolute) and scaled back
        drop = int(arm.u[i] / math.log(10)) if dps >= COARSE_DPS and arm.u is not None else 0
        if drop:
            lift = mpmath.exp(mpmath.mpf(drop) * mpmath.log(10))
            with mpmath.workdps(max(20, mpmath.mp.dps - drop)):
                v, e = mpmath.quad(lambda t, f=f: f(t) * lift, [0, 1], error=True)
            v, e = v / lift, e / lift
        else:
            v, e = mpmath.quad(f, [0, 1], error=True)
        total += v
        err += e
        lg_prev, kprev = la, a
    if arm.end == "sink":
        j = arm.sink
        kj, nu = data[1][j], data[2][j]
        ke = mpmath.mpc(arm.k[-1])
        le = phase.continue_logs_mp(data, kprev, lg_prev, ke)

        def g(tau):
            count[0] += 1
            w = le[j] - tau / (nu + 1)
            kk = kj + mpmath.exp(w)
            lk = phase.continue_logs_mp(data, ke, le, kk)
            lk[j] = w
            v = mpmath.exp(phase.phi_mp(data, xm, kk, lk) - phi_sigma + w) * (-1 / (nu + 1))
            return v * (mpmath.j * kk) ** n if n else v
        v, e = mpmath.quad(g, [0, 1, 4, 16, mpmath.inf], error=True)
        total += v
        err += e
    return total, err, count[0]


def _check_request(rep, contour, derivative):
    """Refuse a wrong contour object, a contour of another representation, a bad derivative order."""
    if not isinstance(contour, Contour):
        raise ContourError(f"expected a contourkit Contour, got {contour!r}; build one with Contour.real_axis(), "
                           f"Contour.between(a, b), Contour.loop(point) or rep.basis()")
    if contour.owner is not None and contour.owner is not rep:
        raise ContourError("this contour belongs to another k-space representation; build contours for this "
                           "one with rep.basis() or the Contour constructors")
    if isinstance(derivative, bool) or not isinstance(derivative, (int, np.integer)) or derivative < 0:
        raise InputError(f"derivative must be a non-negative integer, got {derivative!r}")


def integrate(rep, contour, x, *, derivative=0, dps=None, rtol=None):
    """One contour integral at one real x, with its error estimate (an :class:`Integral`)."""
    _check_request(rep, contour, derivative)
    dps = rep._checked_dps(dps)
    x = check_x(x)
    digits = 16 if dps is None else dps
    u_stop = math.log(10) * (digits + 3) + 5
    if rtol is None:
        rtol = 1e-11 if dps is None else 10.0 ** (-(dps - 3))
    key = (repr(contour.terms), x, u_stop)
    if key not in rep._geom:
        if len(rep._geom) > 64:
            rep._geom.pop(next(iter(rep._geom)))
        rep._geom[key] = decompose(rep, contour, x, u_stop=u_stop)
    geom, coeffs = rep._geom[key]
    evals = 0
    if dps is None:
        total = 0j
        err = 0.0
        scale = 0.0
        for n_sig, i, cl in coeffs:
            t = geom.thimbles[i]
            ls = t.plus.logs[0]
            ps = complex(phase.phi(rep, x, t.sigma, ls))
            Ip, ep, cp = _arm_integral_np(rep, x, t.plus, ls, ps, derivative)
            Im, em, cm = _arm_integral_np(rep, x, t.minus, ls, ps, derivative)
            evals += cp + cm
            if ps.real > 700:
                raise ContourError(f"the integral at x = {x} exceeds the double-precision range "
                                   f"(|integrand| ~ e^{ps.real:.0f}); use dps=... for mpmath")
            with np.errstate(over="ignore", invalid="ignore"):      # not finite: refused below
                fac = n_sig * np.exp(ps)
                contrib = fac * (Ip - Im)
                total += contrib
                scale = max(scale, abs(contrib))
                err += abs(fac) * (ep + em)
        err += math.exp(-u_stop) * scale * 10
        value = total
        if not (cmath.isfinite(value) and math.isfinite(err)):
            # e.g. intersection coefficients exp(2 pi i m nu) with |Im nu| ~ 100 overflow
            raise ContourError(f"the integral at x = {x} overflows double precision (a thimble coefficient or "
                               f"contribution is not finite); use dps=... for mpmath")
    else:
        with mpmath.workdps(dps + 10):
            data = rep.mp_data(dps)
            total = mpmath.mpc(0)
            err = mpmath.mpf(0)
            scale = mpmath.mpf(0)
            xm = mpmath.mpf(x)
            for n_sig, i, cl in coeffs:
                t = geom.thimbles[i]
                sig = mpmath.mpc(t.sigma)
                ls = phase.to_mp_logs(t.plus.logs[0], data, sig, t.sigma)
                ps = phase.phi_mp(data, xm, sig, ls)
                Ip, ep, cp = _arm_integral_mp(rep, x, t.plus, ps, derivative, dps, data, ls)
                Im, em, cm = _arm_integral_mp(rep, x, t.minus, ps, derivative, dps, data, ls)
                evals += cp + cm
                nsig = coefficient(rep, contour.terms, cl, data[2], lambda z: mpmath.expjpi(2 * z))
                fac = nsig * mpmath.exp(ps)
                contrib = fac * (Ip - Im)
                total += contrib
                scale = max(scale, abs(contrib))
                err += abs(fac) * (ep + em)
            err += mpmath.exp(-u_stop) * scale * 10
            value = +total
        err = float(err)
        scale = float(scale)
    ok = err <= rtol * max(abs(complex(value)) if dps is None else float(abs(value)), scale)
    msg = "converged" if ok else (f"estimated error {err:.3g} exceeds rtol={rtol:.1g} times the size of the terms "
                                  f"{max(float(abs(value)), scale):.3g}")
    return Integral(value, float(err), float(scale), dps, bool(ok), msg, evals,
                    [(n, geom.crit[i]) for n, i, _ in coeffs])


def evaluate(rep, contour, x, *, derivative=0, dps=None, rtol=None, full_output=False):
    """phi^(n)(x) = integral over the contour of (i k)^n exp(i k x) f(k) dk.

    Parameters
    ----------
    rep : KSpaceRepresentation
    contour : Contour
    x : float or array of floats
    derivative : int, the order n
    dps : int, optional     mpmath precision; None for the numpy double path
    rtol : float, optional  tolerance for the accuracy check
    full_output : bool      return the :class:`Integral` objects instead

    Returns
    -------
    A complex (``Value``), an mpmath number (``MpValue``) or an array
    (``ArrayValue``), each with the attributes ``error``, ``dps``,
    ``success``, ``message`` and ``evaluations``.  If the accuracy check fails
    an :class:`~contourkit.errors.AccuracyWarning` is issued.

    Examples
    --------
    >>> import sympy as sp, contourkit as ck
    >>> from scipy.special import airy
    >>> x = sp.Symbol("x"); y = sp.Function("y")
    >>> rep = ck.ModeEquation.from_ode(y(x).diff(x, 2) - x*y(x), y, x).fourier()
    >>> v = rep.evaluate(ck.Contour.real_axis(), -3.0) / (2 * 3.141592653589793)
    >>> abs(v - airy(-3.0)[0]) < 1e-13
    True
    """
    scalar = np.ndim(x) == 0
    if not scalar and np.iscomplexobj(np.asarray(x)):
        raise InputError("x must be real")
    xs = [x] if scalar else list(np.asarray(x, dtype=float).ravel())
    if not scalar and dps is None and not full_output and len(xs) > 1:
        return _evaluate_array(rep, contour, x, xs, derivative, rtol)
    res = [integrate(rep, contour, xv, derivative=derivative, dps=dps, rtol=rtol) for xv in xs]
    if full_output:
        return res[0] if scalar else res
    for r in res:
        if not r.success:
            warnings.warn(f"contour integral at accuracy below the request: {r.message}", AccuracyWarning,
                          stacklevel=3)
    if scalar:
        r = res[0]
        if dps is None:
            v = Value(r.value)
        else:
            with mpmath.workdps(dps + 10):
                v = MpValue(r.value)
        v.error, v.dps, v.success, v.message, v.evaluations = r.error, dps, r.success, r.message, r.evaluations
        return v
    if dps is None:
        arr = np.array([r.value for r in res], dtype=complex).reshape(np.shape(x)).view(ArrayValue)
    else:
        arr = np.array([r.value for r in res], dtype=object).reshape(np.shape(x)).view(ArrayValue)
    arr.error = np.array([r.error for r in res]).reshape(np.shape(x))
    arr.dps = dps
    arr.success = all(r.success for r in res)
    arr.message = "converged" if arr.success else "; ".join(r.message for r in res if not r.success)
    arr.evaluations = sum(r.evaluations for r in res)
    return arr


def _evaluate_array(rep, contour, x, xs, derivative, rtol):
    """Array path (double precision): geometry reused across nearby x (see batch.py)."""
    from .batch import evaluate_many
    _check_request(rep, contour, derivative)
    for xv in xs:
        check_x(xv)
    rtol = 1e-11 if rtol is None else rtol
    u_stop = math.log(10) * 19 + 5
    vals, errs, ok, evals = evaluate_many(rep, contour, xs, derivative=derivative, u_stop=u_stop, rtol=rtol)
    arr = vals.reshape(np.shape(x)).view(ArrayValue)
    arr.error = errs.reshape(np.shape(x))
    arr.dps = None
    arr.success = bool(ok.all())
    arr.message = "converged" if arr.success else f"{int((~ok).sum())} point(s) below the requested accuracy"
    arr.evaluations = int(evals)
    if not arr.success:
        warnings.warn(f"contour integral at accuracy below the request: {arr.message}", AccuracyWarning,
                      stacklevel=3)
    return arr
