"""Plane-wave modes of the uniform asymptotic regions of a full profile.

A :class:`~contourkit.symbolic.horizon.HorizonModel` whose profile joins two uniform
regions (``x -> +infinity``: the subsonic exterior; ``x -> -infinity``: the
supersonic interior) has exact plane-wave solutions ``exp(i k x)`` there, with
k a root of the polynomial dispersion relation ``D(omega, k; x = +-infinity)``.
This module finds the asymptotic dispersion polynomials (``sympy.limit`` of
every coefficient), measures how far the profile still is from uniform at a
finite position, chooses a window whose ends are uniform to a given relative
accuracy, and classifies the roots at a position into labelled
:class:`~contourkit.scattering.results.Mode` objects.

Conventions: ``phi ~ exp(-i omega t + i k x)``; group velocity
``v_g = -(dD/dk)/(dD/domega)``; norm sign ``sign(dD/domega)``; in-modes move
towards the horizon; a complex root grows away from the horizon when
``Im k < 0`` on the exterior and ``Im k > 0`` on the interior; unit flux
``|a|^2 |dD/dk| = 1/(2 pi)``.

References
----------
.. [1] J. Macher, R. Parentani, Phys. Rev. D 79 (2009) 124008 (plane-wave
   modes of the asymptotic regions of a tanh flow; norms and fluxes).
.. [2] S. Corley, T. Jacobson, Phys. Rev. D 54 (1996) 1568 (mode content of a
   dispersive black-hole flow).

Examples
--------
>>> from contourkit.catalogue import quartic_flow
>>> from contourkit.profiles.planewaves import local_modes
>>> m = quartic_flow(kappa=0.05, Lambda=2.5, branch="superluminal", D=0.5)
>>> sorted(md.name for md in local_modes(m, 0.05, -300.0))
['int-in+', 'int-in-', 'int-out+', 'int-out-']
"""
import functools
import math
import weakref

import mpmath
import numpy as np
import sympy as sp

from ..errors import InputError, ScatteringError
from ..scattering.results import Mode
from ..symbolic._sym import OMEGA, KS

X = sp.Symbol("x")

#: relative deviation from uniform that the automatic window accepts at its ends
WINDOW_TOL = 1e-16

_NONUNIFORM = ("the profile is not uniform at the window ends: {why}. The direct solver needs a profile "
               "that joins two uniform asymptotic regions; use a tanh profile (D=..., e.g. "
               "quartic_flow(..., D=0.5)) or the near-horizon contour method (model.scatter(omega))")

_cache = weakref.WeakKeyDictionary()


def _store(model):
    try:
        return _cache.setdefault(model, {})
    except TypeError:  # pragma: no cover - unhashable model objects
        return {}


def _tanh_limit(expr, sign):
    """Exact limit of a polynomial in tanh(a x + b) terms (a != 0) as x -> sign*infinity, else None.

    Each tanh tends to sign(a)*sign; a polynomial in them with x-free
    coefficients is continuous there, so substitution gives the limit (fast
    path: sympy's general limit is slow for products of tanh steps).
    """
    tanhs = [t for t in expr.atoms(sp.tanh) if t.has(X)]
    if not tanhs:
        return None
    dummies = {t: sp.Dummy() for t in tanhs}
    rest = expr.xreplace(dummies)
    if rest.has(X):
        return None
    try:
        sp.Poly(rest, *dummies.values())
    except sp.PolynomialError:
        return None
    vals = {}
    for t, d in dummies.items():
        try:
            arg = sp.Poly(t.args[0], X)
        except sp.PolynomialError:
            return None
        if arg.degree() != 1:
            return None
        a = arg.coeff_monomial(X)
        if not (a.is_real and a != 0):
            return None
        vals[d] = sign * (1 if a > 0 else -1)
    return sp.expand(rest.xreplace(vals))


@functools.lru_cache(maxsize=512)
def _limit(expr, sign):
    """Limit of a sympy expression in x as x -> sign*infinity (None if not a finite real number)."""
    fast = _tanh_limit(expr, sign)
    if fast is not None and fast.is_number:
        return fast
    try:
        val = sp.limit(expr, X, sign * sp.oo)
    except Exception:  # sympy raises many kinds of errors for limits it cannot do
        return None
    if not val.is_number or val.has(sp.oo, -sp.oo, sp.zoo, sp.nan, sp.AccumBounds):
        return None
    if not val.is_finite:
        return None
    return sp.nsimplify(val) if val.is_Float else val


def dispersion_terms(model):
    """The dispersion function as ``{(p, n): e_pn(x)}`` with ``D = sum e_pn(x) omega^p k^n``."""
    st = _store(model)
    if "terms" not in st:
        poly = sp.Poly(sp.expand(model.dispersion), OMEGA, KS)
        st["terms"] = {m: sp.sympify(c) for m, c in poly.terms()}
    return st["terms"]


def asymptotic_dispersion(model, side):
    """The dispersion function of one asymptotic region, exact in omega and k.

    Parameters
    ----------
    model : HorizonModel
    side : {"exterior", "interior"}
        exterior: ``x -> +infinity``; interior: ``x -> -infinity``.

    Returns
    -------
    sympy expression in ``Symbol('omega')`` and ``Symbol('k')``.

    Raises
    ------
    InputError
        If a coefficient has no finite limit (e.g. the linear profile).

    Examples
    --------
    >>> from contourkit.catalogue import quartic_flow
    >>> m = quartic_flow(kappa=0.05, Lambda=2.5, branch="superluminal", D=0.5)
    >>> sp.expand(asymptotic_dispersion(m, "interior"))
    -4*k**4/25 + 5*k**2/4 + 3*k*omega + omega**2
    """
    sign = _side_sign(side)
    st = _store(model)
    key = ("asym", side)
    if key not in st:
        out = sp.Integer(0)
        for (p, n), c in dispersion_terms(model).items():
            lim = c if not c.has(X) else _limit(c, sign)
            if lim is None:
                raise InputError(_NONUNIFORM.format(
                    why=f"the coefficient {c} of omega^{p} k^{n} has no finite limit as x -> "
                        f"{'+' if sign > 0 else '-'}infinity"))
            out += lim * OMEGA ** p * KS ** n
        st[key] = sp.expand(out)
    return st[key]


def _side_sign(side):
    if side == "exterior":
        return 1
    if side == "interior":
        return -1
    raise InputError(f"side must be 'exterior' or 'interior', got {side!r}")


def _mp_terms(model, side):
    """mpmath callables of the x-dependent coefficients and their limits (for deviations)."""
    st = _store(model)
    key = ("mpterms", side)
    if key not in st:
        asym = sp.Poly(asymptotic_dispersion(model, side), OMEGA, KS)
        lims = dict(asym.terms())
        funcs = []
        with mpmath.workdps(40):
            for m, c in dispersion_terms(model).items():
                if c.has(X):
                    lim = mpmath.mpmathify(complex(sp.N(lims.get(m, sp.Integer(0)), 45)))
                    funcs.append((sp.lambdify(X, c, "mpmath"), lim))
        scale = max([abs(complex(v)) for v in lims.values()] + [1e-300])
        st[key] = (funcs, scale)
    return st[key]


def deviation(model, x, side):
    """Relative distance of the profile at position x from its asymptotic value on ``side``.

    ``max |e_pn(x) - e_pn(+-infinity)| / max |e_pn(+-infinity)|`` over the
    coefficients of ``D = sum e_pn(x) omega^p k^n``, evaluated with 40 digits
    (so values far below double-precision round-off are seen).

    Examples
    --------
    >>> from contourkit.catalogue import quartic_flow
    >>> m = quartic_flow(kappa=0.05, Lambda=2.5, branch="superluminal", D=0.5)
    >>> deviation(m, 200.0, "exterior") < 1e-16
    True
    """
    funcs, scale = _mp_terms(model, side)
    with mpmath.workdps(40):
        xm = mpmath.mpf(float(x))
        dev = mpmath.mpf(0)
        for f, lim in funcs:
            dev = max(dev, abs(mpmath.mpmathify(f(xm)) - lim))
        return float(dev / scale)


def centre(model):
    """The point the asymptotic regions are measured from: the horizon, or a horizonless model's reference."""
    if model.horizon is not None:
        return float(model.horizon)
    return float(getattr(model, "reference", 0.0))


def uniform_length(model, side, *, tol=WINDOW_TOL, start=1e-2, stop=1e7):
    """Smallest distance L from the horizon beyond which the profile is uniform to ``tol``.

    The deviation is sampled on a geometric grid of distances from the
    horizon; the result is the first grid distance after the last one that
    still deviates by more than ``tol``, times 1.05.

    Raises
    ------
    InputError
        If the profile is not uniform to ``tol`` even at ``stop``.
    """
    sign = _side_sign(side)
    xh = centre(model)
    ds = np.geomspace(start, stop, 721)
    bad = [d for d in ds if deviation(model, xh + sign * d, side) > tol]
    if not bad:
        return float(ds[0])
    if bad[-1] == ds[-1]:
        raise InputError(_NONUNIFORM.format(
            why=f"on the {side} side the profile is still {deviation(model, xh + sign * stop, side):.1e} "
                f"(relative) away from its limit at distance {stop:g} from the horizon"))
    i = int(np.searchsorted(ds, bad[-1])) + 1
    return float(ds[i] * 1.05)


def default_window(model, *, tol=WINDOW_TOL):
    """A window ``(a, b)`` around the horizon whose two ends are uniform to ``tol``.

    Examples
    --------
    >>> from contourkit.catalogue import quartic_flow
    >>> m = quartic_flow(kappa=0.05, Lambda=2.5, branch="superluminal", D=0.5)
    >>> a, b = default_window(m)
    >>> 150 < -a < 250 and 150 < b < 250
    True
    """
    st = _store(model)
    key = ("window", float(tol))
    if key not in st:
        xh = centre(model)
        st[key] = (xh - uniform_length(model, "interior", tol=tol), xh + uniform_length(model, "exterior", tol=tol))
    return st[key]


def dispersion_callables(model):
    """numpy callables ``(omega, x) -> coefficient arrays`` of D and dD/domega in powers of k.

    Returns ``(cD, cW)``: lists (index n = power of k, lowest first) of
    functions of ``(omega, x)``.
    """
    st = _store(model)
    if "calls" not in st:
        poly = sp.Poly(sp.expand(model.dispersion), KS)
        n = poly.degree()
        cs = [poly.coeff_monomial(KS ** j) for j in range(n + 1)]
        cD = [sp.lambdify((OMEGA, X), c, "numpy") for c in cs]
        cW = [sp.lambdify((OMEGA, X), sp.diff(c, OMEGA), "numpy") for c in cs]
        st["calls"] = (cD, cW)
    return st["calls"]


def _eval_coeffs(funcs, omega, x):
    return np.array([complex(f(omega, x)) for f in funcs])


def local_roots(model, omega, x):
    """Roots k of ``D(omega, k; x)`` at one position, polished by Newton steps."""
    cD, _ = dispersion_callables(model)
    c = _eval_coeffs(cD, omega, x)
    while len(c) > 1 and c[-1] == 0:
        c = c[:-1]
    if len(c) < 2:
        raise ScatteringError(f"the dispersion relation has no k-dependence at x = {x}")
    p = c[::-1]
    roots = np.roots(p)
    dp = np.polyder(p)
    for _ in range(3):
        d = np.polyval(dp, roots)
        safe = np.abs(d) > 0
        roots = np.where(safe, roots - np.polyval(p, roots) / np.where(safe, d, 1), roots)
    return roots


def max_root_modulus(model, omega, xs):
    """``max |k|`` over the roots of ``D(omega, k; x)`` at each position of the array xs (vectorised)."""
    cD, _ = dispersion_callables(model)
    xs = np.asarray(xs, dtype=float)
    c = np.array([np.broadcast_to(np.asarray(f(omega, xs), dtype=complex), xs.shape) for f in cD])
    n = c.shape[0] - 1
    if np.any(c[n] == 0):
        return np.array([float(np.max(np.abs(local_roots(model, omega, x)))) for x in xs])
    comp = np.zeros((len(xs), n, n), dtype=complex)
    comp[:, 0, :] = -(c[n - 1::-1] / c[n]).T
    comp[:, np.arange(1, n), np.arange(n - 1)] = 1.0
    return np.max(np.abs(np.linalg.eigvals(comp)), axis=1)


def classify(model, omega, x, k, side):
    """A :class:`~contourkit.scattering.results.Mode` for the root k at position x on ``side``.

    ``data`` holds ``dD_dk``, ``dD_domega`` and the unit-flux amplitude
    ``amplitude = 1/sqrt(2 pi |dD/dk|)`` (propagating modes only).
    """
    sign = _side_sign(side)
    cD, cW = dispersion_callables(model)
    c = _eval_coeffs(cD, omega, x)
    w = _eval_coeffs(cW, omega, x)
    Dk = sum(n * c[n] * k ** (n - 1) for n in range(1, len(c)))
    Dw = sum(w[n] * k ** n for n in range(len(w)))
    if k.imag == 0:
        Dk, Dw = float(np.real(Dk)), float(np.real(Dw))
        if Dw == 0 or Dk == 0:
            raise ScatteringError(
                f"the real root k = {k.real:.6g} at x = {x:g} has dD/domega = {Dw:.3g}, dD/dk = {Dk:.3g}: "
                f"zero norm or zero group velocity (omega = {omega:g} is at a cut-off or a critical point); "
                f"move omega away from it")
        vg = -Dk / Dw
        moving_in = vg * sign < 0
        return Mode(side=side, direction="in" if moving_in else "out", norm=1 if Dw > 0 else -1,
                    kind="propagating", k=complex(k.real, 0.0), group_velocity=vg, origin="plane wave", x=float(x),
                    data={"dD_dk": Dk, "dD_domega": Dw, "amplitude": 1.0 / math.sqrt(2 * math.pi * abs(Dk))})
    growing = (k.imag < 0) if sign > 0 else (k.imag > 0)
    return Mode(side=side, direction="none", norm=0, kind="growing" if growing else "decaying",
                k=complex(k), group_velocity=0.0, origin="plane wave", x=float(x),
                data={"dD_dk": complex(Dk), "dD_domega": complex(Dw), "amplitude": 1.0})


def local_modes(model, omega, x, side=None, *, real_tol=1e-9):
    """Classified local plane-wave modes (roots of ``D(omega, k; x)``) at position x.

    Parameters
    ----------
    model : HorizonModel
    omega : float
    x : float
        Position (in a uniform region the modes are exact plane waves; at a
        finite position they are the local, first-order WKB modes).
    side : {"exterior", "interior"}, optional
        Default: from the sign of ``x - model.horizon``.
    real_tol : float
        A root with ``|Im k| <= real_tol * max|k|`` counts as real.

    Returns
    -------
    list of Mode, sorted by (kind, direction, Re k).
    """
    if side is None:
        side = "exterior" if x > centre(model) else "interior"
    roots = local_roots(model, float(omega), float(x))
    scale = max(float(np.max(np.abs(roots))), 1e-300)
    out = []
    for k in roots:
        k = complex(k.real, 0.0) if abs(k.imag) <= real_tol * scale else complex(k)
        out.append(classify(model, float(omega), float(x), k, side))
    order = {"propagating": 0, "decaying": 1, "growing": 2}
    out.sort(key=lambda m: (order[m.kind], m.direction, m.k.real))
    return out


def asymptotic_modes(model, omega, side, *, distance=None):
    """Plane-wave modes of one asymptotic region, evaluated at a uniform position.

    ``distance`` (from the horizon) defaults to :func:`uniform_length`.
    """
    sign = _side_sign(side)
    d = uniform_length(model, side) if distance is None else float(distance)
    return local_modes(model, omega, centre(model) + sign * d, side)


def mode_count(modes):
    """Counts of in, out, growing and decaying modes in a list of Mode.

    Examples
    --------
    >>> mode_count([Mode("exterior", "in", 1, "propagating", 0.1)])
    {'in': 1, 'out': 0, 'growing': 0, 'decaying': 0, 'in+': 1, 'in-': 0, 'out+': 0, 'out-': 0}
    """
    c = {"in": 0, "out": 0, "growing": 0, "decaying": 0, "in+": 0, "in-": 0, "out+": 0, "out-": 0}
    for m in modes:
        if m.kind == "propagating":
            c[m.direction] += 1
            c[m.direction + ("+" if m.norm > 0 else "-")] += 1
        else:
            c[m.kind] += 1
    return c
