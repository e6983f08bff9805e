"""Small sympy helpers shared by the symbolic layers (exact numbers, checks)."""
import math

import sympy as sp

from ..errors import InputError, ModelError

I = sp.I
#: the frequency and wavenumber symbols shared by every layer
OMEGA = sp.Symbol("omega")
KS = sp.Symbol("k")


def _for(what):
    return f" for {what}" if what else ""


def exact(value, what=None):
    """Return `value` as an exact sympy number where that is meaningful.

    Python floats and sympy Floats are read as the decimal the user typed
    (``0.05 -> 1/20``), so that symbolic steps (roots, residues) stay exact and
    high-precision evaluation is not limited by binary round-off.

    Examples
    --------
    >>> exact(0.05)
    1/20
    """
    if isinstance(value, bool):
        raise InputError(f"expected a number{_for(what)}, got the boolean {value!r}")
    if isinstance(value, (int, sp.Integer, sp.Rational)):
        return sp.Integer(value) if isinstance(value, int) else value
    if isinstance(value, float):
        if not math.isfinite(value):
            raise InputError(f"expected a finite number{_for(what)}, got {value!r}; give a finite value")
        return sp.Rational(repr(float(value)))       # float(): numpy's float64 is a float with its own repr
    if isinstance(value, complex):
        value = complex(value)
        return exact(value.real) + I * exact(value.imag)
    if isinstance(value, sp.Basic):
        if value.has(sp.nan, sp.zoo, sp.oo, -sp.oo):
            raise InputError(f"expected a finite number{_for(what)}, got {value}; give a finite value")
        return value.xreplace({f: sp.Rational(str(f)) for f in value.atoms(sp.Float)})
    try:
        import numpy as np
        if isinstance(value, np.generic):
            return exact(value.item())
    except ImportError:  # pragma: no cover
        pass
    raise InputError(f"expected a number, got {value!r} of type {type(value).__name__}")


def exact_expr(expr):
    """Replace every Float inside a sympy expression by its decimal rational."""
    expr = sp.sympify(expr)
    return expr.xreplace({f: sp.Rational(str(f)) for f in expr.atoms(sp.Float)})


def as_poly_in(expr, k, what):
    """Return `expr` as a sympy Poly in `k`, or raise ModelError naming `what`."""
    expr = sp.expand(expr)
    try:
        poly = sp.Poly(expr, k)
    except sp.PolynomialError as exc:  # pragma: no cover - defensive
        raise ModelError(f"{what} is not a polynomial in {k}: {expr}") from exc
    for c in poly.coeffs():
        if c.free_symbols:
            names = ", ".join(sorted(str(s) for s in c.free_symbols))
            raise ModelError(
                f"{what} still contains the symbol(s) {names}; give them numeric "
                f"values through parameters=... before building the k-space equation")
    return poly


def complex_value(value):
    """Evaluate an exact sympy number to a Python complex."""
    return complex(sp.N(value, 30))


def mp_value(value, dps):
    """Evaluate an exact sympy number to an mpmath mpc at `dps` digits."""
    import mpmath
    v = sp.N(value, dps + 10)
    re, im = v.as_real_imag()
    with mpmath.workdps(dps + 10):
        return mpmath.mpc(mpmath.mpf(str(sp.Float(re, dps + 10))), mpmath.mpf(str(sp.Float(im, dps + 10))))
