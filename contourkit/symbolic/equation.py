"""Symbolic input: linear mode equations with coefficients linear in x.

A :class:`ModeEquation` is the stationary mode equation at one frequency,

    L[y] = sum_n (a_n + b_n x) y^(n)(x) = 0,

stored through its left symbol ``A(k) + x B(k)`` with ``A(k) = sum a_n (i k)^n``
and ``B(k) = sum b_n (i k)^n`` (conventions: ``phi ~ exp(-i omega t + i k x)``,
``d/dx`` has the symbol ``i k``).  Its k-space representation is built by
:meth:`ModeEquation.fourier`.

References
----------
.. [1] NIST Digital Library of Mathematical Functions, https://dlmf.nist.gov,
   9.5 (Airy), 10.9 (Bessel), 13.4 (Kummer): integral representations of
   solutions of equations with coefficients linear in the variable.
"""
import sympy as sp

from . import extensions
from ._sym import KS as K, I, exact, exact_expr
from ..errors import InputError, ModelError



def _check_symbol(s, what):
    if not isinstance(s, sp.Symbol):
        raise InputError(f"{what} must be a sympy Symbol, got {s!r}; create it with sympy.Symbol('{what}')")
    return s


def _function_of(y, x):
    """Return the undefined function class and the applied y(x)."""
    if isinstance(y, sp.core.function.UndefinedFunction):
        return y, y(x)
    if isinstance(y, sp.core.function.AppliedUndef) and y.args == (x,):
        return y.func, y
    raise InputError(f"y must be an undefined sympy Function such as sympy.Function('y'), got {y!r}")


def ode_coefficients(expr, y, x):
    """Coefficients c_n(x) of a linear homogeneous ODE ``sum c_n y^(n) = 0``.

    Parameters
    ----------
    expr : sympy expression, linear in y(x) and its x-derivatives.
    y : sympy Function (class or applied to x).
    x : sympy Symbol.

    Returns
    -------
    list of sympy expressions, index n = derivative order.

    Raises
    ------
    ModelError
        If expr is not linear and homogeneous in y, naming the offending term.
    """
    if isinstance(expr, str) or not isinstance(expr, (sp.Basic, int, float, complex)):
        raise InputError(f"the equation must be a sympy expression in {y}(x) and its derivatives, got "
                         f"{type(expr).__name__} {str(expr)[:40]!r}; build it with sympy (y(x).diff(x, 2) - x*y(x)) "
                         f"or write a model file and load it with contourkit.load_model (text parsed safely)")
    if not isinstance(x, sp.Symbol):
        raise InputError(f"x must be a sympy Symbol, got {type(x).__name__} {x!r}")
    yf, yx = _function_of(y, x)
    expr = sp.sympify(expr)
    if isinstance(expr, sp.Equality):
        expr = expr.lhs - expr.rhs
    derivs = sorted(expr.atoms(sp.Derivative), key=lambda d: sp.default_sort_key(d))
    order = 0
    subs = {}
    for d in derivs:
        if d.expr == yx:
            vars_ = d.variables
            if any(v != x for v in vars_):
                raise ModelError(f"the derivative {d} is not with respect to {x}")
            order = max(order, len(vars_))
            subs[d] = sp.Symbol(f"_Y{len(vars_)}")
        elif d.expr.has(yx):
            raise ModelError(f"the term {d} is a derivative of a non-linear expression in {yx}; "
                             f"expand it so that only derivatives of {yx} itself appear")
    Y = [sp.Symbol(f"_Y{n}") for n in range(order + 1)]
    lin = expr.xreplace(subs).xreplace({yx: Y[0]})
    if lin.has(yf):
        bad = [a for a in lin.atoms(sp.core.function.AppliedUndef) if a.func == yf]
        raise ModelError(f"{bad[0]} appears in the equation; contourkit needs the unknown as {yx} "
                         f"with the same argument {x} everywhere")
    lin = sp.expand(lin)
    if lin.has(sp.nan, sp.zoo, sp.oo, -sp.oo) or expr.has(sp.nan, sp.zoo, sp.oo, -sp.oo):
        shown = "" if expr is sp.nan else f" ({expr})"
        raise ModelError(f"the equation{shown} contains a non-finite number (nan or infinity), which makes it "
                         f"undefined; replace it by a finite value (an undefined parameter or a division by zero "
                         f"gives nan)")
    coeffs = []
    for n, Yn in enumerate(Y):
        c = lin.coeff(Yn, 1)
        coeffs.append(c)
    for c in coeffs:
        if c.has(sp.nan, sp.zoo, sp.oo, -sp.oo):
            raise ModelError(f"the coefficient {c} of the equation is not finite (nan or infinity); replace the "
                             f"non-finite number in the equation by a finite value")
    rest = sp.expand(lin - sum(c * Yn for c, Yn in zip(coeffs, Y)))
    if rest != 0:
        terms = sp.Add.make_args(rest)
        bad = terms[0].xreplace({Y[0]: yx, **{v: k for k, v in subs.items()}})
        if any(t.has(*Y) for t in terms):
            raise ModelError(f"the equation is not linear in {yx}: the term {bad} is of higher degree; "
                             f"contourkit solves linear mode equations only")
        raise ModelError(f"the equation is not homogeneous: the term {bad} does not contain {yx}; "
                         f"move source terms out of the mode equation")
    for c in coeffs:
        if c.has(*Y):
            raise ModelError(f"the coefficient {c} contains the unknown; the equation is not linear")
    while len(coeffs) > 1 and sp.simplify(coeffs[-1]) == 0:
        coeffs.pop()
    if len(coeffs) < 2:
        raise ModelError("the equation has no derivative of the unknown; it is not a differential equation")
    return coeffs


def _linear_parts(c, x, n):
    """Split a coefficient into a + b x, or refuse naming it."""
    c = sp.expand(c)
    if c.has(sp.core.function.AppliedUndef):
        f = next(iter(c.atoms(sp.core.function.AppliedUndef)))
        raise ModelError(f"the coefficient of y^({n}) contains the profile function {f}; give its "
                         f"expression through profiles={{...}} so that the model can be linearised at the horizon")
    try:
        p = sp.Poly(c, x)
    except sp.PolynomialError:
        raise ModelError(f"the coefficient of y^({n}) is {c}, which is not a polynomial in {x}; write the x-dependence "
                         f"through a profile function (profiles={{...}}) so that it can be linearised at a horizon")
    if p.degree() > 1:
        raise ModelError(f"the coefficient of y^({n}) is {c}, of degree {p.degree()} in {x}; contourkit needs "
                         f"coefficients of degree <= 1 in {x}, or a model with profile functions to linearise")
    a = p.coeff_monomial(1)
    b = p.coeff_monomial(x) if p.degree() == 1 else sp.Integer(0)
    for v in (a, b):
        if v.free_symbols:
            raise ModelError(f"the coefficient of y^({n}) contains the symbol(s) "
                             f"{', '.join(sorted(map(str, v.free_symbols)))}; give numeric values with parameters={{...}}")
    return exact_expr(a), exact_expr(b)


class ModeEquation:
    """A linear mode equation with coefficients linear in x.

    ``sum_n (a_n + b_n x) y^(n) = 0``; build it with :meth:`from_ode`,
    :meth:`from_coefficients` or, for a horizon model, ``model.mode_equation``.

    Attributes
    ----------
    A, B : sympy expressions in :data:`k`
        Left symbol ``A(k) + x B(k)``, i.e. ``A = sum a_n (i k)^n``.
    order : int
        Order of the ODE.
    kappa : float or None
        Surface gravity when the equation came from a horizon model.
    horizon : float or None
        Position of the horizon in the original coordinate (now at x = 0).
    note : str
        How the equation was obtained.

    Examples
    --------
    >>> import sympy as sp, contourkit as ck
    >>> x = sp.Symbol("x"); y = sp.Function("y")
    >>> eq = ck.ModeEquation.from_ode(y(x).diff(x, 2) - x * y(x), y, x)   # Airy
    >>> eq.order
    2
    """

    k = K

    def __init__(self, a, b, *, kappa=None, horizon=None, note=""):
        a = [exact(v) for v in a]
        b = [exact(v) for v in b]
        n = max(len(a), len(b))
        a += [sp.Integer(0)] * (n - len(a))
        b += [sp.Integer(0)] * (n - len(b))
        while n > 1 and a[-1] == 0 and b[-1] == 0:
            a.pop(); b.pop(); n -= 1
        if n < 2:
            raise ModelError("the equation has no derivative of the unknown; it is not a differential equation")
        if all(v == 0 for v in b):
            raise ModelError("no coefficient depends on x: the equation has constant coefficients and its "
                             "solutions are plane waves exp(i k x) with k a root of A(k); no contour integral is needed")
        self.a = tuple(a)
        self.b = tuple(b)
        self.order = n - 1
        self.kappa = kappa
        self.horizon = horizon
        self.note = note
        self.A = sp.expand(sum(c * (I * K) ** j for j, c in enumerate(self.a)))
        self.B = sp.expand(sum(c * (I * K) ** j for j, c in enumerate(self.b)))
        self._rep = None

    # -- constructors -------------------------------------------------
    @classmethod
    def from_coefficients(cls, a, b, **kw):
        """From lists ``a[n]``, ``b[n]``: the equation ``sum (a_n + b_n x) y^(n) = 0``."""
        return cls(list(a), list(b), **kw)

    @classmethod
    def from_ode(cls, expr, y, x, *, parameters=None, profiles=None, frequency=None, horizon=None):
        """Build the equation from a sympy ODE.

        Parameters
        ----------
        expr : sympy expression (or Eq) linear in y(x) and its x-derivatives.
        y : sympy Function; x : sympy Symbol.
        parameters : dict, optional
            Numeric values of the symbols in `expr`, e.g. ``{omega: 0.3}``.
        profiles : dict, optional
            Profile functions, ``{v: -1 + 0.1*sympy.tanh(2*(x - 3))}`` with
            ``v = sympy.Function('v')``.  With profiles the equation is put in
            symmetric form and linearised at the horizon, which is shifted to
            x = 0 (see :mod:`contourkit.symbolic.horizon`).
        frequency : sympy Symbol, optional
            The frequency symbol in `expr` (its value in `parameters`); needed to
            locate the horizon from the low-frequency branch.
        horizon : float, optional
            Horizon position, instead of searching for it.

        Without profiles, every coefficient must have degree <= 1 in x and the
        equation is used as it is.
        """
        x = _check_symbol(x, "x")
        coeffs = ode_coefficients(expr, y, x)
        params = {}
        for s, v in (parameters or {}).items():
            s = sp.Symbol(s) if isinstance(s, str) else s
            params[s] = exact(v)
        if profiles:
            model = extensions.call("HorizonModel.from_ode", expr, y, x, parameters=parameters,
                                    profiles=profiles, frequency=frequency, horizon=horizon)
            return model.mode_equation(params.get(frequency) if frequency is not None else None)
        coeffs = [sp.sympify(c).subs(params) for c in coeffs]
        a, b = [], []
        for n, c in enumerate(coeffs):
            an, bn = _linear_parts(c, x, n)
            a.append(an)
            b.append(bn)
        return cls(a, b, note="ODE used as given (coefficients linear in x, x to the left of derivatives)")

    # -- views --------------------------------------------------------
    def coefficients(self, x=None):
        """The ODE coefficients ``a_n + b_n x`` as sympy expressions, n = 0..order."""
        x = x if x is not None else sp.Symbol("x")
        return [self.a[n] + self.b[n] * x for n in range(self.order + 1)]

    def ode(self, y=None, x=None):
        """The equation as a sympy expression in y(x)."""
        x = x if x is not None else sp.Symbol("x")
        y = y if y is not None else sp.Function("y")
        return sum(c * (y(x).diff(x, n) if n else y(x)) for n, c in enumerate(self.coefficients(x)))

    @property
    def weyl_symbol(self):
        """``(sigma0(k), sigma1(k))``: the Weyl symbol is ``sigma0 + x sigma1``.

        For a formally self-adjoint equation it is real for real k; its zeros at
        fixed x form the local dispersion relation.
        """
        return sp.expand(self.A + I * sp.diff(self.B, K) / 2), self.B

    def fourier(self, *, cut_angle=None):
        """The k-space representation (see :class:`contourkit.symbolic.kspace.KSpaceRepresentation`)."""
        from .kspace import KSpaceRepresentation
        if cut_angle is None:
            if self._rep is None:
                self._rep = KSpaceRepresentation(self)
            return self._rep
        return KSpaceRepresentation(self, cut_angle=cut_angle)

    def __repr__(self):
        from . import display
        return display.equation_repr(self)

    def _repr_html_(self):
        from . import display
        return display.equation_html(self)

    def _repr_latex_(self):
        from . import display
        return display.equation_latex(self)
