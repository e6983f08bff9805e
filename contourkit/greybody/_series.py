"""Series data at the ends of a 1D scattering problem (functional core).

The equation is ``D (D psi')' + (omega^2 - V) psi = 0`` in a coordinate y with
``D = dy/dx*`` (x* the tortoise coordinate).  Two kinds of ends:

* an asymptotic end y -> +-infinity where D and U = V - V_end have Laurent
  series in 1/Y (Y = +-(y - y_c)), possibly all zero beyond the constant
  ("fast" tails, decaying faster than any power);
* a horizon end y -> y_h, where D has a simple zero and V is analytic.

This module computes the coefficients (rational functions exactly, by
polynomial division; other analytic functions by a discrete Cauchy integral)
and the two recurrences:

* the outgoing asymptotic series ``psi = exp(i k rho(Y)) sum_n c_n Y^-n`` with
  ``rho = Y/D_0 + sigma ln Y`` (divergent in general, used at its smallest
  term);
* the Frobenius series ``psi = (y - y_h)^r sum_n a_n (y - y_h)^n`` with
  ``r = -i k / D'(y_h)`` (convergent within the distance to the next singular
  point).

Numbers are duck-typed: Python complex for double precision, mpmath.mpc at
raised precision.

References
----------
.. [1] F. W. J. Olver, Asymptotics and Special Functions (Academic Press,
   1974), ch. 5 (Frobenius series) and ch. 7 (irregular singularities).
"""
import mpmath
import numpy as np
import sympy as sp

from ..errors import InputError

__all__ = ["laurent_coefficients", "taylor_coefficients", "singular_points",
           "outgoing_series", "eval_outgoing", "frobenius_series", "eval_frobenius",
           "to_mp", "series_mul"]


def to_mp(c, dps):
    """A sympy (or Python) number as mpmath.mpc at ``dps`` digits."""
    c = sp.sympify(c)
    v = sp.N(c, dps + 5)
    re, im = v.as_real_imag()
    return mpmath.mpc(mpmath.mpf(str(sp.N(re, dps + 5))), mpmath.mpf(str(sp.N(im, dps + 5))))


def _poly_coeffs_low_first(expr, z, dps):
    poly = sp.Poly(sp.expand(expr), z)
    coeffs = [to_mp(c, dps) for c in reversed(poly.all_coeffs())]
    return coeffs


def series_mul(a, b, n):
    """First n coefficients of the product of two power series."""
    out = []
    for m in range(n):
        s = 0
        for j in range(max(0, m - len(b) + 1), min(m, len(a) - 1) + 1):
            s += a[j] * b[m - j]
        out.append(s)
    return out


def _series_div(num, den, n):
    q = []
    d0 = den[0]
    for m in range(n):
        s = num[m] if m < len(num) else 0
        for j in range(1, min(m, len(den) - 1) + 1):
            s -= den[j] * q[m - j]
        q.append(s / d0)
    return q


def _rational_expansion(expr, z, n, dps, what):
    """Power series at z = 0 of a rational function of z, n coefficients."""
    e = sp.cancel(sp.together(expr))
    num, den = sp.fraction(e)
    pn = _poly_coeffs_low_first(num, z, dps)
    pd = _poly_coeffs_low_first(den, z, dps)
    # strip leading zero coefficients (powers of z)
    def strip(c):
        k = 0
        while k < len(c) and c[k] == 0:
            k += 1
        return k, c[k:]
    a, pn = strip(pn)
    b, pd = strip(pd)
    if not pn:
        return [mpmath.mpc(0)] * n
    if a < b:
        raise InputError(f"{what} is not bounded there (it has a pole); "
                         "give a function with a finite limit.")
    q = _series_div(pn, pd, n)
    return [mpmath.mpc(0)] * (a - b) + q[: n - (a - b)]


def laurent_coefficients(expr, y, y_c, sign, n, *, dps=30):
    """Coefficients g_j, j < n, of ``expr = sum_j g_j Y^-j``, Y = sign*(y - y_c).

    Exact (polynomial division) for a rational function of y; ``None`` when
    expr is not rational in y (the caller then treats the tail as fast or
    refuses it).
    """
    expr = sp.sympify(expr)
    if not expr.has(y):
        return [to_mp(expr, dps)] + [mpmath.mpc(0)] * (n - 1)
    if not expr.is_rational_function(y):
        return None
    z = sp.Dummy("z")
    with mpmath.workdps(dps):
        return _rational_expansion(expr.subs(y, y_c + sp.Integer(sign) / z), z, n, dps,
                                   "the expression at infinity")


def taylor_coefficients(expr, y, y0, n, *, dps=30, radius=None, func=None):
    """Taylor coefficients of expr about y0 (n of them).

    Rational functions: exact division.  Other analytic functions: a discrete
    Cauchy integral on a circle of the given radius (inside the disc of
    analyticity), with ``func`` an mpmath-callable of expr.
    """
    expr = sp.sympify(expr)
    if not expr.has(y):
        return [to_mp(expr, dps)] + [mpmath.mpc(0)] * (n - 1)
    if expr.is_rational_function(y):
        x = sp.Dummy("x")
        with mpmath.workdps(dps):
            y0s = sp.Float(mpmath.nstr(mpmath.mpf(mpmath.re(y0)), dps + 5), dps + 5)
            return _rational_expansion(expr.subs(y, y0s + x), x, n, dps, "the expression")
    if func is None or radius is None:
        raise InputError("a Taylor series of a non-rational function needs a radius")
    with mpmath.workdps(dps + 10):
        # y0 may be a sympy number (an exact horizon position): the circle's points must be
        # mpmath numbers, or the mpmath-lambdified func mixes sympy and mpmath objects
        y0 = to_mp(y0, dps + 10) if isinstance(y0, sp.Basic) else mpmath.mpmathify(y0)
        radius = mpmath.mpf(to_mp(radius, dps + 10).real) if isinstance(radius, sp.Basic) else mpmath.mpf(radius)
        N = max(2 * n + 16, 64)
        pts = [y0 + radius * mpmath.expjpi(2 * mpmath.mpf(j) / N) for j in range(N)]
        try:
            vals = [mpmath.mpc(func(p)) for p in pts]
        except (TypeError, ValueError, AttributeError, ZeroDivisionError) as exc:
            raise InputError(f"the expression cannot be evaluated numerically on the circle |y - {mpmath.nstr(y0, 8)}| "
                             f"= {mpmath.nstr(radius, 6)} ({type(exc).__name__}: {exc}); give V and dxstar_dx as "
                             f"sympy expressions of the coordinate alone, analytic near the horizon") from None
        if not all(mpmath.isfinite(v) for v in vals):
            raise InputError(f"the expression is not finite on the circle |y - {mpmath.nstr(y0, 8)}| = "
                             f"{mpmath.nstr(radius, 6)} around the horizon (a singular point within it); "
                             f"give dxstar_dx and V analytic in a disc around the horizon")
        out = []
        for m in range(n):
            s = mpmath.fsum(vals[j] * mpmath.expjpi(-2 * mpmath.mpf(j * m) / N) for j in range(N))
            out.append(s / N / radius ** m)
        return out


def singular_points(exprs, y):
    """Finite singular points (poles, and zeros of the first expression).

    For rational functions only (an empty list otherwise).  Returns complex
    numbers: roots of every denominator and of the numerator of ``exprs[0]``
    (the coefficient D whose zeros are singular points of the equation).
    """
    pts = []
    for i, e in enumerate(exprs):
        e = sp.cancel(sp.together(sp.sympify(e)))
        if not e.is_rational_function(y) or not e.has(y):
            continue
        num, den = sp.fraction(e)
        polys = [den] + ([num] if i == 0 else [])
        for p in polys:
            if not p.has(y):
                continue
            c = [complex(sp.N(v)) for v in sp.Poly(sp.expand(p), y).all_coeffs()]
            if len(c) > 1:
                pts.extend(np.roots(c).tolist())
    return pts


# --------------------------------------------------------------------------
# asymptotic end: outgoing series in 1/Y

def outgoing_series(k, Dc, Uc, nmax):
    """Coefficients of the outgoing series at an asymptotic end.

    ``psi = exp(i k rho(Y)) sum_n c_n Y^-n``, ``rho = Y/D_0 + sigma ln Y``.
    Dc, Uc: Laurent coefficients of D and U = V - V_end in 1/Y (Uc[0] = 0).
    Returns (sigma, c).  The recurrence (derived in docs/greybody.md) is
    ``2 i k m c_m = sum_{n<m} [n m D_{m-1-n} - 2 i k n h_{m-n}
    - i k (m-n) h_{m-n} + G_{m+1-n}] c_n`` with ``h = D rho'`` and
    ``G = (k^2 (1 - h^2) - U) / D``.
    """
    L = nmax + 3
    D = list(Dc[:L]) + [0] * max(0, L - len(Dc))
    U = list(Uc[:L]) + [0] * max(0, L - len(Uc))
    D0, D1, U1 = D[0], D[1], U[1]
    sigma = -D1 / D0 ** 2 - U1 / (2 * k * k * D0)
    h = [D[j] / D0 + (sigma * D[j - 1] if j >= 1 else 0) for j in range(L)]
    hh = series_mul(h, h, L)
    num = [k * k * ((1 if j == 0 else 0) - hh[j]) - U[j] for j in range(L)]
    G = _series_div(num, D, L)
    c = [1 + 0 * k]
    ik = 1j * k
    for m in range(1, nmax + 1):
        s = 0
        for n in range(m):
            s += (n * m * D[m - 1 - n] - 2 * ik * n * h[m - n] - ik * (m - n) * h[m - n]
                  + G[m + 1 - n]) * c[n]
        c.append(s / (2 * ik * m))
    return sigma, c


def eval_outgoing(k, sigma, c, D0, Y, tol):
    """The outgoing series at Y, summed up to its smallest term.

    Returns (u, uY, rel_err, ok): u = sum c_n Y^-n, uY = exp(-i k rho) dpsi/dY
    = i k (1/D0 + sigma/Y) u + du/dY, rel_err the first omitted term relative
    to |u| (the usual error estimate of an asymptotic series), ok whether it
    is below tol.
    """
    u = 0
    up = 0
    Yinv = 1 / Y
    p = 1 + 0 * Yinv
    prev = None
    err = None
    recent = []
    for n, cn in enumerate(c):
        term = cn * p
        a = abs(term)
        if n > 3 and a > max(recent) and a > 0:   # the series starts to diverge: stop before this term
            err = a
            break
        u += term
        up += -n * term * Yinv
        recent = (recent + [a])[-3:]
        prev = max(recent)
        p = p * Yinv
        if n > 3 and prev <= tol * abs(u) * 1e-3:
            err = prev
            break
    if err is None:
        err = prev
    rel = err / abs(u) if abs(u) > 0 else err
    uY = 1j * k * (1 / D0 + sigma * Yinv) * u + up
    return u, uY, rel, rel <= tol


def frobenius_series(k, Dt, Vt, nmax):
    """Coefficients a_n of the ingoing Frobenius solution at a horizon.

    Dt, Vt: Taylor coefficients of D (Dt[0] = 0) and V about y_h; k: the wave
    number at the horizon, sqrt(omega^2 - V(y_h)).  Returns (r, a) with
    ``r = -i k / D'(y_h)`` (ingoing: exp(-i k x*)).
    """
    L = nmax + 3
    D = list(Dt[:L]) + [0] * max(0, L - len(Dt))
    V = list(Vt[:L]) + [0] * max(0, L - len(Vt))
    Dp = [(j + 1) * D[j + 1] for j in range(L - 1)] + [0]
    p = series_mul(D, D, L)
    q = series_mul(D, Dp, L)
    d1 = D[1]
    r = -1j * k / d1
    a = [1 + 0 * k]
    for m in range(1, nmax + 1):
        s = 0
        for n in range(m):
            j2, j1, j0 = m - n + 2, m - n + 1, m - n
            t = (p[j2] if j2 < L else 0) * (n + r) * (n + r - 1) + (q[j1] if j1 < L else 0) * (n + r)
            t -= V[j0]
            s += a[n] * t
        den = d1 * d1 * m * (m + 2 * r)
        if abs(den) < 1e-12 * abs(d1 * d1 * m * m):
            raise InputError("omega is at an algebraically special point (2 i k/D'(y_h) is an "
                             "integer): the horizon series has a logarithm; move omega slightly.")
        a.append(-s / den)
    return r, a


def eval_frobenius(r, a, x, tol):
    """Sum of the Frobenius series without the factor x^r.

    Returns (u, ux, rel_err, ok) with u = sum a_n x^n and
    ux = x^-r d/dx (x^r u) = r u / x + u'.
    """
    u = 0
    up = 0
    p = 1 + 0 * x
    recent = []
    for n, an in enumerate(a):
        term = an * p
        u += term
        if n >= 1:
            up += n * an * p / x
        recent = (recent + [abs(term)])[-4:]
        p = p * x
        if n > 4 and max(recent) <= tol * abs(u) * 1e-3:
            break
    last = max(recent)
    rel = last / abs(u) if abs(u) > 0 else last
    return u, r * u / x + up, rel, rel <= tol
