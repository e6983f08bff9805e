"""Helpers of the horizon model: parameters, profile substitutions, message text, touching points.

Kept apart from :mod:`contourkit.symbolic.horizon` (the model class) so that
each module stays one job.
"""
import numpy as np
import sympy as sp

from ._sym import KS, OMEGA, exact
from ..errors import InputError, ModelError


def _short(expr, n=80):
    """An expression as short text for messages (no numpy reprs)."""
    t = str(expr)
    return t if len(t) <= n else t[:n - 3] + "..."


def _touching_points(f, xs, vals):
    """Positions where |c0| has a local minimum that reaches zero without a sign change (touching)."""
    from scipy.optimize import minimize_scalar
    scale = float(np.max(np.abs(vals))) or 1.0
    out = []
    a = np.abs(vals)
    for i in range(1, len(xs) - 1):
        if a[i] <= a[i - 1] and a[i] <= a[i + 1] and a[i] < 1e-2 * scale and vals[i - 1] * vals[i + 1] > 0:
            r = minimize_scalar(lambda t: abs(float(np.real(f(t)))), bounds=(xs[i - 1], xs[i + 1]),
                                method="bounded", options={"xatol": 1e-12})
            if abs(float(np.real(f(r.x)))) <= 1e-9 * scale:
                out.append(float(r.x))
    return out



def _normalise_parameters(parameters):
    out = {}
    for s, v in (parameters or {}).items():
        s = sp.Symbol(s) if isinstance(s, str) else s
        if not isinstance(s, sp.Symbol):
            raise InputError(f"parameter names must be strings or sympy Symbols, got {s!r}")
        out[s] = exact(v, f"the parameter {s}")
    return out


def _align(params, exprs):
    """Key each parameter by the symbol of the same name in the expressions (a symbol with assumptions
    and a plain one of the same name are different to sympy)."""
    names = {}
    for e in exprs:
        for s in sp.sympify(e).free_symbols:
            names.setdefault(s.name, s)
    return {names.get(s.name, s): v for s, v in params.items()}


def _symbolic_source(D, profiles, x, omega, k):
    """The dispersion function with the profiles substituted and the parameters left as symbols."""
    subs = _profile_substitutions(profiles, x, {}, strict=False)
    e = sp.sympify(D).subs(subs).subs(omega, OMEGA).subs(k, KS)
    return e.subs(x, sp.Symbol("x")) if x != sp.Symbol("x") else e


def _profile_substitutions(profiles, x, params, strict=True):
    subs = {}
    for name, expr in (profiles or {}).items():
        e = sp.sympify(expr).subs(params)
        extra = e.free_symbols - {x}
        if extra and strict:
            raise ModelError(f"the profile {name} contains the symbol(s) "
                             f"{', '.join(sorted(map(str, extra)))} that have no value; add them to parameters")
        if isinstance(name, str):
            subs[sp.Symbol(name)] = e
            subs[sp.Function(name)(x)] = e
        elif isinstance(name, sp.core.function.UndefinedFunction):
            subs[name(x)] = e
            subs[sp.Symbol(str(name))] = e
        elif isinstance(name, sp.Symbol):
            subs[name] = e
            subs[sp.Function(str(name))(x)] = e
        elif isinstance(name, sp.core.function.AppliedUndef):
            subs[name] = e
        else:
            raise InputError(f"profile names must be strings, Symbols or Functions, got {name!r}")
    return subs
