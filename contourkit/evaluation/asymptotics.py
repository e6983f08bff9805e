"""Asymptotic expansions of contour integrals at saddle points and branch points.

Saddle point (Laplace's method).  With ``p(t0 + tau) - p(t0) = sum_{j>=2} P_j tau^j`` and
``q(t0 + tau) = sum Q_j tau^j`` at a simple saddle t0, the map ``p - p(t0) = -w^2`` (series
reversion, Lagrange-Buermann) gives ``int exp(lam p) q dt ~ exp(lam p(t0)) sum_s c_s
lam^(-s-1/2)`` with ``c_s = Gamma(s+1/2) r^(2s+1) F_s``, ``r = (-P_2)^(-1/2)`` (principal root
unless a direction is given) and ``F_s = [tau^(2s)] q(t0+tau) (1 + sum_j (P_{j+2}/P_2)
tau^j)^(-s-1/2)``, a formula derived once per s and then evaluated exactly or in mpmath.

Branch point (Watson's lemma).  ``int_0^oo exp(-x t) t^nu h(t) dt ~ sum h_n Gamma(nu+n+1)
x^(-nu-n-1)``; the loop round k_b of ``exp(i k x) (k - k_b)^nu h(k)`` along ``k_b + (i/x) s``,
starting where ``arg(k - k_b) = theta``, counter-clockwise, is ``~ exp(i k_b x) sum C_n
|x|^(-nu-n-1)``, ``C_n = (e^(2 pi i nu) - 1) e^(i(nu+n+1) theta) h_n Gamma(nu+n+1)`` (the half
line: without ``e^(2 pi i nu) - 1``).

Error estimate: ``hypot(|t_{order+1}|, |t_{order+2}|) + 8 eps sum |t_s|``.  Where the real and
imaginary parts of the series each alternate (Ai, DLMF 9.7(iii); H_nu^(1), DLMF 10.17(iii),
positive argument) it bounds the remainder and exceeds it by a factor of order one.
See docs/asymptotics.md.

References
----------
.. [1] NIST DLMF, sections 2.3 (Watson's lemma) and 2.4 (Laplace's method, saddle points).
.. [2] N. Bleistein, R. A. Handelsman, Asymptotic Expansions of Integrals, Dover (1986),
   ch. 4 (Watson's lemma) and ch. 7 (the method of steepest descents).
"""
import cmath
import functools
import math
from dataclasses import dataclass, field

import mpmath
import sympy as sp
from sympy.utilities.iterables import partitions

from ..geometry import phase
from ..errors import InputError
from ..symbolic.kspace import K
from ..geometry.saddles import check_x, critical_points

__all__ = ["AsymptoticSeries", "saddle_formula", "saddle_coefficients", "saddle_series",
           "watson_coefficients", "watson_series", "branch_point_coefficients", "branch_point_series",
           "saddle_contribution", "branch_point_contribution"]


@dataclass
class AsymptoticSeries:
    """A truncated asymptotic series with its error estimate.

    Attributes
    ----------
    terms : list            terms 0..order (complex; mpmath.mpc if dps was given)
    value : complex         their sum (mpmath.mpc if dps was given)
    error_estimate : float  hypot of the first two omitted terms, plus rounding (module doc)
    order : int             index of the last term kept
    success : bool          False if the terms grow at the truncation point (see message)
    message : str
    coefficients : list     c_s (saddle) or C_n (branch point), exact where the input was
    kind : str              "saddle", "watson", "loop" or "half_line"
    point : complex         the (polished) saddle or the branch point
    """
    terms: list
    value: object
    error_estimate: float
    order: int
    success: bool
    message: str
    coefficients: list = field(default_factory=list)
    kind: str = ""
    point: object = None


# -- helpers ------------------------------------------------------------------
def _check_int(value, what, lo=0, none_ok=False):
    if none_ok and value is None:
        return None
    if isinstance(value, bool) or not isinstance(value, int) or value < lo:
        raise InputError(f"{what} must be an int >= {lo}{' or None' if none_ok else ''}, got {value!r}")
    return value


def _sym(value, what):
    try:
        return sp.sympify(value)
    except (sp.SympifyError, TypeError):
        raise InputError(f"{what} must be a sympy expression or a number, got {value!r}")


def _mp(v):
    """An exact sympy number as an mpmath mpc at the working precision."""
    d = mpmath.mp.dps + 5
    return mpmath.mpc(sp.N(sp.re(v), d), sp.N(sp.im(v), d))


def _taylor(expr, t, t0, n, what, exact):
    """Taylor coefficients expr^(j)(t0)/j!, j = 0..n: exact sympy, or mpmath at the working precision."""
    out, d = [], expr
    for j in range(n + 1):
        try:
            v = sp.simplify(d.subs(t, t0)) / sp.factorial(j) if exact else \
                mpmath.mpmathify(sp.lambdify(t, d, "mpmath")(t0)) / mpmath.factorial(j)
        except (ZeroDivisionError, ValueError) as exc:
            raise InputError(f"{what} is not analytic at {t} = {t0}: {exc}")
        if v.has(sp.zoo, sp.nan, sp.oo, -sp.oo) if exact else not mpmath.isfinite(v):
            raise InputError(f"{what} is not analytic at {t} = {t0} (its derivative of order {j} is {v})")
        out.append(v)
        d = sp.diff(d, t)
    return out


def _finish(terms, coefficients, kind, point, order, dps):
    """Keep terms 0..order, estimate the error from the two omitted ones, judge success."""
    mags = [abs(complex(z)) for z in terms]
    err = math.hypot(mags[order + 1], mags[order + 2]) + 8 * float(mpmath.eps) * sum(mags[:order + 1])
    ok = all(math.isfinite(m) for m in mags) and (order == 0 or mags[order + 1] <= mags[order])
    msg = (f"{order + 1} term(s); the first omitted term is {mags[order + 1]:.3g}" if ok else
           f"the terms grow at the truncation point (|t_{order}| = {mags[order]:.3g} < |t_{order + 1}| = "
           f"{mags[order + 1]:.3g}): the series is past its smallest term; lower the order or enlarge "
           f"the large parameter")
    terms = terms[:order + 1] if dps is not None else [complex(z) for z in terms[:order + 1]]
    value = mpmath.fsum(terms) if dps is not None else complex(sum(terms))
    return AsymptoticSeries(terms, value, err, order, ok, msg, coefficients[:order + 1], kind, point)


# -- saddle points ------------------------------------------------------------
@functools.lru_cache(maxsize=None)
def _generic_saddle(s):
    """The formula for F_s, derived once per s: a table of (weight, i, ((j, e), ...)) with
    ``F_s = sum weight q_i prod_j b_j^e``, ``b_j = P_{j+2}/P_2`` (multinomial expansion of
    ``(1 + sum b_j tau^j)^(-s-1/2)`` over the partitions of ``2s - i``)."""
    n, m, table = 2 * s, -sp.Rational(2 * s + 1, 2), []
    for i in range(n + 1):
        for part in (partitions(n - i) if n - i else [{}]):
            kk = sum(part.values())
            w = sp.binomial(m, kk) * sp.factorial(kk) / sp.Mul(*[sp.factorial(e) for e in part.values()])
            table.append((w, i, tuple(sorted(part.items()))))
    return tuple(table)


def saddle_formula(s):
    """F_s as a sympy expression in b1, b2, ... (``b_j = P_{j+2}/P_2``) and q0, q1, ...

    Examples
    --------
    >>> saddle_formula(1)
    15*b1**2*q0/8 - 3*b1*q1/2 - 3*b2*q0/2 + q2
    """
    b, q = sp.symbols(f"b1:{2 * s + 2}"), sp.symbols(f"q0:{2 * s + 1}")
    return sp.Add(*[w * q[i] * sp.Mul(*[b[j - 1] ** e for j, e in mono]) for w, i, mono in _generic_saddle(s)])


def _eval_formula(s, beta, Qc, exact):
    tot = []
    for w, i, mono in _generic_saddle(s):
        c = w if exact else mpmath.mpf(w.p) / w.q
        for j, e in mono:
            c = c * beta[j - 1] ** e
        tot.append(c * Qc[i])
    return sp.expand(sp.Add(*tot)) if exact else mpmath.fsum(tot)


def _saddle_data(p, q, t, t0, nterms, exact, direction):
    """Coefficients c_s (s < nterms), the polished t0 and p(t0); exact sympy or mpmath."""
    n, dp = 2 * nterms, sp.diff(p, t)
    if exact:
        d1 = sp.simplify(dp.subs(t, t0))
        if d1 != 0 and not (d1.is_number and abs(complex(sp.N(d1, 60))) < 1e-50):
            raise InputError(f"{t} = {t0} is not a saddle point: p'({t0}) = {d1} != 0; pass a root of p'")
    else:                                               # polish a rounded saddle by Newton's method
        f1, f2 = sp.lambdify(t, dp, "mpmath"), sp.lambdify(t, sp.diff(dp, t), "mpmath")
        for it in range(60):
            step = f1(t0) / f2(t0)
            if it == 0 and abs(step) > 1e-6 * (1 + abs(t0)):
                raise InputError(f"{t} = {complex(t0)} is not a saddle point: p' = {complex(f1(t0)):.3g} there "
                                 f"(a Newton step of {complex(step):.3g}); pass a root of p'")
            t0 -= step
            if abs(step) <= 4 * mpmath.eps * (1 + abs(t0)):
                break
    P, Qc = _taylor(p, t, t0, n, "the exponent p", exact), _taylor(q, t, t0, n - 2, "the amplitude q", exact)
    if P[2] == 0 if exact else abs(P[2]) <= 1e3 * mpmath.eps * max(1, abs(P[0])):
        raise InputError(f"{t} = {t0} is a degenerate saddle (p''(t0) = 0: saddles coalesce); the simple "
                         f"saddle-point series does not apply (uniform expansions: Bleistein-Handelsman ch. 9)")
    r = 1 / (sp.sqrt(-P[2]) if exact else mpmath.sqrt(-P[2]))
    if direction is not None:
        rv, dv = complex(sp.N(r)), complex(direction)
        proj = (rv * dv.conjugate()).real
        if abs(proj) <= 1e-9 * abs(rv) * abs(dv):
            raise InputError(f"direction {direction} is perpendicular to the steepest-descent path at the saddle "
                             f"(it is the steepest ascent); give a direction along the path, e.g. {rv:.3g}")
        r = -r if proj < 0 else r
    cs = []
    for s in range(nterms):
        F = _eval_formula(s, [P[j + 2] / P[2] for j in range(1, 2 * s + 1)], Qc, exact)
        cs.append(sp.simplify(sp.gamma(sp.Rational(2 * s + 1, 2)) * r ** (2 * s + 1) * F) if exact else
                  mpmath.gamma(s + mpmath.mpf(1) / 2) * r ** (2 * s + 1) * F)
    return cs, t0, P[0]


def saddle_coefficients(p, q, t, t0, order, *, direction=None):
    """Exact coefficients of the saddle-point expansion (Laplace's method).

    ``int exp(lam p(t)) q(t) dt ~ exp(lam p(t0)) sum_{s=0}^{order} c_s lam^(-s-1/2)`` along
    the steepest-descent path through the simple saddle t0 (p'(t0) = 0 != p''(t0)); p and q are
    sympy expressions in the Symbol t, analytic at t0; ``direction`` (complex) says how the path
    crosses t0 (default: Re r > 0, see the module doc).  Returns c_0..c_order, exact when p, q
    and t0 contain no Floats.  Raises InputError for a bad order, a t0 that is not a simple
    saddle, or p, q not analytic at t0.

    References
    ----------
    DLMF 2.4; Bleistein and Handelsman (1986), ch. 7.

    Examples
    --------
    Ai at the saddle k = i of ``i(k^3/3 + k)`` (DLMF 9.5.4, 9.7.5 with z = 1):

    >>> import sympy as sp
    >>> k = sp.Symbol("k")
    >>> saddle_coefficients(sp.I*(k**3/3 + k), 1, k, sp.I, 1)
    [sqrt(pi), -5*sqrt(pi)/48]
    """
    _check_int(order, "order")
    p, q, t0 = _sym(p, "p"), _sym(q, "q"), _sym(t0, "t0")
    if not isinstance(t, sp.Symbol):
        raise InputError(f"t must be a sympy Symbol, got {t!r}")
    if any(isinstance(a, sp.Float) for e in (p, q, t0) for a in sp.preorder_traversal(e)):
        with mpmath.workdps(30):
            cs = _saddle_data(p, q, t, _mp(t0), order + 1, False, direction)[0]
        return [sp.sympify(complex(c)) for c in cs]
    return _saddle_data(p, q, t, t0, order + 1, True, direction)[0]


def saddle_series(p, q, t, t0, order, *, lam=1, direction=None, dps=None, _p0=None):
    """Numeric saddle-point series of ``int exp(lam p(t)) q(t) dt`` with an error estimate.

    As :func:`saddle_coefficients`, with ``lam > 0`` the large parameter (``lam = 1`` with the
    full exponent, e.g. ``p = i k x + E(k)``) and ``dps`` the mpmath precision (None: double).
    A rounded t0 is polished by Newton's method.  Returns an :class:`AsymptoticSeries` with
    terms ``exp(lam p(t0)) c_s lam^(-s-1/2)``.

    Examples
    --------
    >>> import sympy as sp
    >>> from scipy.special import airy
    >>> k = sp.Symbol("k")
    >>> res = saddle_series(sp.I*(k**3/3 + 10*k), 1, k, 1j*10**0.5, 4)
    >>> ai = res.value / (2*3.141592653589793)          # DLMF 9.5.4
    >>> abs(ai - airy(10.0)[0]) <= res.error_estimate / (2*3.141592653589793)
    True
    """
    _check_int(order, "order"), _check_int(dps, "dps", 1, True)
    p, q = _sym(p, "p"), _sym(q, "q")
    if isinstance(lam, (bool, complex)) or not isinstance(lam, (int, float, sp.Rational)) or not 0 < lam < math.inf:
        raise InputError(f"lam must be a positive real number, got {lam!r}")
    with mpmath.workdps(dps or 15):
        cs, t0v, p0 = _saddle_data(p, q, t, _mp(_sym(t0, "t0")), order + 3, False, direction)
        L = mpmath.mpf(lam)
        pre = mpmath.exp(L * (p0 if _p0 is None else _p0(t0v)))
        terms = [pre * c * L ** (-s - mpmath.mpf(1) / 2) for s, c in enumerate(cs)]
        return _finish(terms, cs, "saddle", complex(t0v) if dps is None else t0v, order, dps)


# -- Watson's lemma and branch points -------------------------------------------
def _check_nu(nu, kind):
    if kind not in ("loop", "half_line", "watson"):
        raise InputError(f"kind must be 'loop' or 'half_line', got {kind!r}")
    nu = _sym(nu, "nu")
    nuv = complex(sp.N(nu))
    if kind == "loop" and abs(nuv.imag) < 1e-14 and abs(nuv.real - round(nuv.real)) < 1e-14:
        raise InputError(f"nu = {nu} is an integer, so this is not a branch point (the loop gives a residue "
                         f"or zero); the Hankel-loop expansion needs a non-integer exponent")
    if kind != "loop" and nuv.real <= -1:
        raise InputError(f"the integral from the endpoint diverges for Re(nu) = {nuv.real:g} <= -1; "
                         f"use the Hankel loop (kind='loop') instead")
    return nu


def watson_coefficients(h, t, nu, order):
    """Exact coefficients ``h_n Gamma(nu + n + 1)``, n = 0..order, of Watson's lemma.

    ``int_0^oo exp(-x t) t^nu h(t) dt ~ sum_n h_n Gamma(nu + n + 1) x^(-nu-n-1)`` as x -> +oo,
    for ``h(t) = sum h_n t^n`` analytic at 0 and Re(nu) > -1.

    References
    ----------
    DLMF 2.3 (Watson's lemma); Bleistein and Handelsman (1986), ch. 4.

    Examples
    --------
    >>> import sympy as sp
    >>> t = sp.Symbol("t")
    >>> watson_coefficients(1/(1 + t), t, 0, 3)     # int exp(-xt)/(1+t) dt ~ sum (-1)^n n!/x^(n+1)
    [1, -1, 2, -6]
    """
    _check_int(order, "order")
    h, nu = _sym(h, "h"), _check_nu(nu, "watson")
    return [sp.simplify(c * sp.gamma(nu + n + 1)) for n, c in enumerate(_taylor(h, t, 0, order, "h", True))]


def _bp_numeric(C, kb, nu, x, order, kind, dps, point):
    with mpmath.workdps(dps or 15):
        xm = _mp(sp.Rational(repr(x))).real
        pre = mpmath.exp(1j * _mp(kb) * xm)
        terms = [pre * _mp(c) * abs(xm) ** (-(_mp(nu) + n + 1)) for n, c in enumerate(C)]
        return _finish(terms, C, kind, point, order, dps)


def watson_series(h, t, nu, x, order, *, dps=None):
    """Numeric Watson's-lemma series of ``int_0^oo exp(-x t) t^nu h(t) dt`` (x > 0) with error estimate.

    Examples
    --------
    >>> import sympy as sp
    >>> t = sp.Symbol("t")
    >>> res = watson_series(1/(1 + t), t, 0, 20.0, 3)
    >>> bool(abs(res.value - (1/20 - 1/400 + 2/8000 - 6/160000)) < 1e-15), res.success
    (True, True)
    """
    _check_int(order, "order"), _check_int(dps, "dps", 1, True)
    if check_x(x) <= 0:
        raise InputError(f"Watson's lemma needs x > 0 here, got {x!r}")
    cs = watson_coefficients(h, t, nu, order + 2)
    return _bp_numeric(cs, 0, _sym(nu, "nu"), check_x(x), order, "watson", dps, 0)


def _loop_from_taylor(hn, nu, theta, kind):
    w = sp.exp(2 * sp.pi * sp.I * nu) - 1 if kind == "loop" else 1
    return [sp.simplify(w * sp.exp(sp.I * (nu + n + 1) * theta) * c * sp.gamma(nu + n + 1)) for n, c in enumerate(hn)]


def branch_point_coefficients(h, k, kb, nu, order, *, side=1, theta=None, kind="loop"):
    """Exact coefficients C_n of the Hankel-loop (or half-line) expansion at a branch point.

    ``int exp(i k x) (k - kb)^nu h(k) dk ~ exp(i kb x) sum_{n=0}^{order} C_n |x|^(-nu-n-1)`` for
    the loop along ``kb + (i/x) s``, s > 0, in from infinity, round kb counter-clockwise and out
    (kind="loop"; nu not an integer), or the half line from kb (kind="half_line"; Re nu > -1).
    h is analytic at kb; side is the sign of x; theta is ``arg(k - kb)`` on the starting leg,
    by default the principal value ``side * pi/2``.

    References
    ----------
    DLMF 2.3 and 5.9 (Hankel's loop); Bleistein and Handelsman (1986), ch. 4.

    Examples
    --------
    H0(1): the loop of ``exp(i k x) (k^2 - 1)^(-1/2)`` round k = 1 (DLMF 10.17.5):

    >>> import sympy as sp
    >>> k = sp.Symbol("k")
    >>> C = branch_point_coefficients((k + 1)**sp.Rational(-1, 2), k, 1, sp.Rational(-1, 2), 1)
    >>> [sp.nsimplify(sp.expand(c / C[0])) for c in C]
    [1, -I/8]
    """
    _check_int(order, "order")
    h, kb, nu = _sym(h, "h"), _sym(kb, "kb"), _check_nu(nu, kind)
    if side not in (1, -1):
        raise InputError(f"side must be +1 or -1 (the sign of x), got {side!r}")
    theta = side * sp.pi / 2 if theta is None else _sym(theta, "theta")
    return _loop_from_taylor(_taylor(h, k, kb, order, "h", True), nu, theta, kind)


def branch_point_series(h, k, kb, nu, x, order, *, theta=None, kind="loop", dps=None):
    """Numeric branch-point series at position x (side = sign of x) with an error estimate.

    Examples
    --------
    H0(1)(x) = (2/(i pi)) int_1^(1+i oo) exp(i k x) (k^2-1)^(-1/2) dk, from DLMF 10.9.9:

    >>> import sympy as sp
    >>> from scipy.special import hankel1
    >>> k = sp.Symbol("k")
    >>> res = branch_point_series((k + 1)**sp.Rational(-1, 2), k, 1, sp.Rational(-1, 2), 50.0, 3,
    ...                           kind="half_line")
    >>> bool(abs(2/(1j*3.141592653589793) * res.value - hankel1(0, 50.0)) <= res.error_estimate)
    True
    """
    _check_int(order, "order"), _check_int(dps, "dps", 1, True)
    xv = check_x(x)
    if xv == 0:
        raise InputError("x = 0: the branch-point expansion is in powers of 1/|x|; take |x| large")
    C = branch_point_coefficients(h, k, kb, nu, order + 2, side=1 if xv > 0 else -1, theta=theta, kind=kind)
    return _bp_numeric(C, _sym(kb, "kb"), _sym(nu, "nu"), xv, order, kind, dps, complex(sp.N(kb)))


# -- convenience functions on a KSpaceRepresentation --------------------------------
def _reduce(angle, lo):
    """Angle reduced into (lo, lo + 2 pi], the cut-plane sheet of fourier.py and contours.py."""
    a = (angle - lo) % (2 * math.pi)
    return lo + (a if a > 1e-12 else 2 * math.pi)


def _turns(arg, rep):
    """Whole turns to add to a principal arg to reach the cut-plane sheet."""
    return round((_reduce(float(arg), rep.cut_angle) - float(arg)) / (2 * math.pi))


def saddle_contribution(rep, x, saddle, order, *, derivative=0, direction=None, dps=None):
    """Saddle-point series of one saddle's contribution to ``phi^(n)(x)`` (n = derivative).

    The integrand is ``(i k)^n exp(i k x + E(k))`` with f = exp(E) on the cut-plane branch at
    the saddle; the terms are those of :func:`saddle_series` with lam = 1, each smaller than
    the last by a factor of order ``|Phi'''| / |Phi''|^(3/2)`` (a power of 1/|x| for large |x|).
    ``saddle`` is an index into ``contourkit.geometry.saddles.critical_points(rep, x)`` (the critical
    points of ``i k x + E(k)``) or a point near one, e.g. from ``rep.saddles(x)``.

    Examples
    --------
    >>> import sympy as sp, contourkit as ck
    >>> from scipy.special import airy
    >>> X = sp.Symbol("x"); y = sp.Function("y")
    >>> rep = ck.ModeEquation.from_ode(y(X).diff(X, 2) - X*y(X), y, X).fourier()
    >>> res = saddle_contribution(rep, 10.0, 1j*10**0.5, 3)
    >>> abs(res.value / (2*3.141592653589793) - airy(10.0)[0]) < res.error_estimate
    True
    """
    _check_int(order, "order"), _check_int(dps, "dps", 1, True), _check_int(derivative, "derivative")
    xv = check_x(x)
    crit = list(critical_points(rep, xv))
    if not crit:
        raise InputError(f"i k x + E(k) has no saddle point at x = {x}")
    if isinstance(saddle, int) and not isinstance(saddle, bool):
        if not 0 <= saddle < len(crit):
            raise InputError(f"saddle index {saddle} out of range: there are {len(crit)} saddles at x = {x}")
        k0 = crit[saddle]
    else:
        s = _mp(_sym(saddle, "saddle"))
        k0 = min(crit, key=lambda c: abs(c - s))
        others = [abs(k0 - c) for c in crit if c is not k0] + [abs(k0 - kj) for kj in rep._kj]
        if abs(k0 - s) > max(1e-8 * (1 + abs(k0)), 0.1 * min(others + [1.0])):
            raise InputError(f"{saddle} is not a saddle point of i k x + E(k) at x = {x}; the saddles are "
                             f"{[complex(round(c.real, 10), round(c.imag, 10)) for c in crit]}")
    if any(abs(k0 - kj) < 1e-8 * (1 + abs(kj)) for kj in rep._kj):
        raise InputError(f"the saddle {k0} sits on a singular point: use branch_point_contribution")
    xs = sp.Rational(repr(xv))

    def p0(kk):                                          # Phi(k0) on the cut-plane branch
        data = rep.mp_data(mpmath.mp.dps)
        logs = [mpmath.log(kk - kj) + 2j * mpmath.pi * _turns(mpmath.arg(kk - kj), rep) for kj in data[1]]
        return phase.phi_mp(data, _mp(xs).real, kk, logs)

    return saddle_series(sp.I * K * xs + rep.exponent, (sp.I * K) ** derivative, K, complex(k0), order,
                         direction=direction, dps=dps, _p0=p0)


def _rep_h_taylor(rep, j, n, derivative):
    """Exact Taylor coefficients at k_j of h = (i k)^d exp(E - nu_j log(k - k_j)), cut-plane branch."""
    kb, tau = rep.singularities[j].point, sp.Symbol("tau")
    Qs = sp.Poly(sp.expand(rep.polynomial_part.as_expr().subs(K, kb + tau)), tau)
    a = [Qs.coeff_monomial(tau ** m) for m in range(n + 1)]       # series of log h
    for i, si in enumerate(rep.singularities):
        if i == j:
            continue
        d = sp.simplify(kb - si.point)
        a[0] += si.exponent * (sp.log(sp.Abs(d)) + sp.I * (sp.arg(d) + 2 * sp.pi * _turns(sp.N(sp.arg(d), 30), rep)))
        a[0] += sum(c * d ** (-pp) for pp, c in enumerate(si.essential, 1))
        for m in range(1, n + 1):
            a[m] += si.exponent * sp.Integer(-1) ** (m + 1) / (m * d ** m)
            a[m] += sum(c * sp.binomial(-pp, m) * d ** (-pp - m) for pp, c in enumerate(si.essential, 1))
    b = [sp.Integer(1)]                                   # exp of the series: b_m = (1/m) sum_i i a_i b_(m-i)
    for m in range(1, n + 1):
        b.append(sp.expand(sum(i * a[i] * b[m - i] for i in range(1, m + 1)) / m))
    pol = sp.Poly(sp.expand((sp.I * (kb + tau)) ** derivative), tau)
    pc = [pol.coeff_monomial(tau ** m) for m in range(n + 1)]
    return [sp.simplify(sp.exp(a[0]) * sum(pc[i] * b[m - i] for i in range(m + 1))) for m in range(n + 1)]


def branch_point_contribution(rep, x, point, order, *, derivative=0, kind="loop", dps=None):
    """Watson expansion in powers of 1/|x| of the loop (or half line) at a branch point of rep.

    ``int (i k)^n exp(i k x) f(k) dk ~ exp(i kb x) sum C_n |x|^(-nu-n-1)`` (exact C_n in
    ``coefficients``), legs along ``kb + (i/x) s``, starting on the sheet contours.py documents
    for ``Contour.loop(point)``: for deg Q <= 1 this expands ``rep.evaluate(Contour.loop(point), x)``.

    Examples
    --------
    >>> import sympy as sp, contourkit as ck
    >>> from scipy.special import hankel1
    >>> X = sp.Symbol("x"); y = sp.Function("y")
    >>> rep = ck.ModeEquation.from_ode(X*y(X).diff(X, 2) + y(X).diff(X) + X*y(X), y, X).fourier()
    >>> res = branch_point_contribution(rep, 10.0, 1, 5, kind="half_line")
    >>> bool(abs(2/(1j*3.141592653589793) * res.value - hankel1(0, 10.0)) < res.error_estimate)
    True
    """
    _check_int(order, "order"), _check_int(dps, "dps", 1, True), _check_int(derivative, "derivative")
    xv = check_x(x)
    if xv == 0:
        raise InputError("x = 0: the branch-point expansion is in powers of 1/|x|; take |x| large")
    try:
        pv = complex(point)
    except (TypeError, ValueError):
        raise InputError(f"point must be a number, got {point!r}")
    js = [j for j, s in enumerate(rep.singularities) if abs(s.k - pv) <= 1e-9 * max(1.0, abs(pv))]
    if not js or rep.singularities[js[0]].kind != "branch point":
        what = f"a {rep.singularities[js[0]].kind}, not a branch point" if js else "not a singular point"
        raise InputError(f"{point} is {what}; the branch points of this representation are "
                         f"{[b for b, _ in rep.branch_points]}")
    s = rep.singularities[js[0]]
    ray = math.pi / 2 if xv > 0 else -math.pi / 2        # direction in which exp(i k x) decays
    if rep.degree_Q <= 1:                                # from the sheet of rep's loop leg (valley centre)
        th = math.pi - cmath.phase(1j * xv + (rep._Q[-2] if rep.degree_Q == 1 else 0j))
        theta = _reduce(th, rep.cut_angle) + ((ray - th + math.pi) % (2 * math.pi) - math.pi)
    else:
        theta = _reduce(ray, rep.cut_angle)
    rat = sp.nsimplify(theta / math.pi, tolerance=1e-13, rational=True)
    theta = rat * sp.pi if rat.q <= 1000 else sp.Float(theta, 30)
    C = _loop_from_taylor(_rep_h_taylor(rep, js[0], order + 2, derivative), _check_nu(s.exponent, kind), theta, kind)
    return _bp_numeric(C, s.point, s.exponent, xv, order, kind, dps, s.k)
