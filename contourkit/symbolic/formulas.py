"""Formulas with the parameters kept as symbols: horizon, kappa, T_H, k-space equation, exponents.

A :class:`~contourkit.symbolic.horizon.HorizonModel` keeps, beside its numeric
coefficients, the symmetric coefficients with every parameter left as a sympy
symbol.  :func:`derive` repeats the derivation of the symbolic layer on them:
the horizon ``x_H`` (a root of the low-frequency coefficient, chosen as the
one the numeric model found), ``kappa = |d lambda_0/dx|`` at x_H, the
near-horizon left symbol ``A(k) + x B(k)`` (symmetric coefficients truncated
to first order at x_H, as in ``model.mode_equation``), the k-space equation
``i B f' + (A + i B') f = 0`` and its exponent
``E(k) = Q(k) + sum_j nu_j log(k - k_j)`` with ``nu_j = r(k_j)/B'(k_j)`` (the
remainder r of ``(i A - B')/B``) at the simple zeros k_j of B; at a multiple
zero the Laurent part of ``r/B`` gives ``nu_j`` and the essential terms
``c_m (k - k_j)^-m`` (``essential_parts``).  The frequency
stays the symbol ``omega`` (positive); each parameter becomes a symbol with
the sign of its value as assumption (``positive=True`` for a positive value),
unless the model was given a sympy Symbol that carries assumptions already.
Numbers are substituted only by :meth:`SymbolicDerivation.substitute`, for
comparison with the numeric layers.

References
----------
.. [1] S. Corley, Phys. Rev. D 57 (1998) 6280 (the k-space exponent of a
   linearised dispersive flow in closed form).

Examples
--------
>>> import sympy as sp, contourkit as ck
>>> w, k, x, kap, Lam = sp.symbols("omega k x kappa Lambda")
>>> m = ck.HorizonModel.from_dispersion((w - (-1 + kap*x)*k)**2 - k**2 - k**4/Lam**2, omega=w, k=k, x=x,
...                                     horizon=0, parameters={kap: 0.05, Lam: 2.5})
>>> d = m.symbolic()
>>> d.horizon, d.kappa
(0, kappa)
>>> [str(nu) for _, nu in d.singular_points]
['-1/2 - I*omega/(2*kappa)', '-1/2 - I*omega/(2*kappa) - I*omega**3/(2*Lambda**2*kappa)']
"""
from dataclasses import dataclass, field

import sympy as sp

from ._sym import KS as K, OMEGA, I
from ..errors import ModelError
from .kspace import laurent_part
from .symmetric import from_symmetric

#: the positive frequency symbol of the formulas
W = sp.Symbol("omega", positive=True)


@dataclass
class SymbolicDerivation:
    """The derivation of a horizon model as formulas.

    Attributes
    ----------
    parameters : dict   symbol (with assumptions) -> the model's numeric value
    dispersion : sympy expression D(omega, k; x), full profile
    horizon : sympy expression x_H
    kappa, hawking_temperature : sympy expressions
    A, B : sympy expressions, the near-horizon left symbol A(k) + x B(k) (x from x_H)
    kspace_ode : sympy Eq  ``i B f' + (A + i B') f = 0``
    exponent : sympy expression E(k), ``f = exp(E)``
    polynomial_part : sympy expression Q(k)
    singular_points : list of (k_j, nu_j)
    essential_parts : dict
        k_j -> [c_1, c_2, ...] at a multiple zero of B: ``E`` has the terms
        ``c_m (k - k_j)^-m`` there (``Singularity.essential`` of the numeric layer)
    note : str   how x_H was obtained
    """
    parameters: dict
    dispersion: object
    horizon: object
    kappa: object
    hawking_temperature: object
    A: object
    B: object
    kspace_ode: object
    exponent: object
    polynomial_part: object
    singular_points: list = field(default_factory=list)
    essential_parts: dict = field(default_factory=dict)
    note: str = ""

    def substitute(self, values=None):
        """The formulas with numbers: ``values`` maps names or symbols to numbers (default: the model's).

        ``omega`` may be given too (it stays symbolic otherwise).  Returns a
        dict with the keys of the attributes above.
        """
        subs = dict(self.parameters)
        for key, val in (values or {}).items():
            name = key if isinstance(key, str) else str(key)
            if name == "omega":
                subs[W] = sp.nsimplify(val) if isinstance(val, float) else val
                continue
            sym = next((s for s in self.parameters if str(s) == name), None)
            if sym is None:
                raise ModelError(f"unknown parameter {name!r}; the parameters are "
                                 f"{', '.join(str(s) for s in self.parameters)}")
            subs[sym] = sp.Rational(repr(val)) if isinstance(val, float) else val
        out = {}
        for key in ("dispersion", "horizon", "kappa", "hawking_temperature", "A", "B", "exponent",
                    "polynomial_part"):
            out[key] = sp.sympify(getattr(self, key)).subs(subs)
        out["singular_points"] = [(sp.sympify(p).subs(subs), sp.sympify(n).subs(subs)) for p, n in self.singular_points]
        out["essential_parts"] = {sp.sympify(p).subs(subs): [sp.sympify(c).subs(subs) for c in cs]
                                  for p, cs in self.essential_parts.items()}
        return out


def _with_assumptions(params):
    """Map each parameter symbol to a symbol with the sign of its value as assumption."""
    ren = {}
    for s, v in params.items():
        if s.assumptions0:
            ren[s] = s
            continue
        try:
            fv = float(v)
        except (TypeError, ValueError):
            ren[s] = sp.Symbol(s.name, real=True)
            continue
        ren[s] = sp.Symbol(s.name, positive=True) if fv > 0 else (
            sp.Symbol(s.name, negative=True) if fv < 0 else sp.Symbol(s.name, real=True))
    return ren


def _pick_root(expr, x, target, values):
    """The root of expr in x whose value with the numbers equals target (the numeric horizon)."""
    if target == 0 and sp.simplify(expr.subs(x, 0)) == 0:
        return sp.Integer(0), "x_H = 0 (exact)"
    try:
        sols = sp.solve(expr, x)
    except (NotImplementedError, ValueError):
        sols = []
    for s in sols:
        try:
            if abs(complex(sp.N(s.subs(values), 30)) - target) <= 1e-9 * max(1.0, abs(target)):
                return s, "x_H solved in closed form"
        except (TypeError, ValueError):
            continue
    return sp.Float(target, 30), "x_H numeric (no closed form found by sympy)"


def derive(model):
    """Formulas of a horizon model with its parameters as symbols (module docstring).

    Returns
    -------
    SymbolicDerivation

    Raises
    ------
    ModelError
        For a model without symbolic source (built from numbers only) or a
        horizonless one.
    """
    g = getattr(model, "_symbolic_g", None)
    if g is None:
        raise ModelError("this model keeps no symbolic coefficients (it was built from a transformed or a "
                         "numeric model); build it with HorizonModel.from_dispersion or from_ode")
    if model.horizon is None:
        raise ModelError("a horizonless flow has no horizon formulas")
    x = model.x
    ren = _with_assumptions(getattr(model, "_symbolic_params", {}))
    g = [sp.sympify(gm).xreplace(ren).subs(OMEGA, W) for gm in g]
    values = {ren[s]: v for s, v in getattr(model, "_symbolic_params", {}).items()}
    values[W] = W
    D = sp.expand(sum(gm * (I * K) ** m for m, gm in enumerate(g)))
    poly = sp.Poly(D, W, K)
    terms = [(m, c) for m, c in poly.terms() if sp.simplify(c) != 0]
    d = min(sum(m) for m, _ in terms)
    part = {m: c for m, c in terms if sum(m) == d}
    c0, c1 = part.get((0, d), sp.Integer(0)), part.get((1, d - 1), sp.Integer(0))
    xh, note = _pick_root(c0, x, float(model.horizon), values)
    slope = sp.simplify((-sp.diff(c0, x) / c1).subs(x, xh))
    sign = 1 if model.orientation.slope > 0 else -1
    kappa = sp.simplify(sign * slope)
    lin = [(sp.simplify(gm.subs(x, xh)), sp.simplify(sp.diff(gm, x).subs(x, xh))) for gm in g]
    left = from_symmetric([a + b * x for a, b in lin], x)
    A = sp.expand(sum(sp.expand(c).subs(x, 0) * (I * K) ** j for j, c in enumerate(left)))
    B = sp.expand(sum(sp.expand(sp.diff(c, x)) * (I * K) ** j for j, c in enumerate(left)))
    f = sp.Function("f")
    ode = sp.Eq(I * B * f(K).diff(K) + (A + I * sp.diff(B, K)) * f(K), 0, evaluate=False)
    N = sp.expand(I * A - sp.diff(B, K))
    q, r = sp.div(sp.Poly(N, K), sp.Poly(B, K))
    Q = sp.expand(sp.integrate(q.as_expr(), K))
    points = []
    E = Q
    roots = sp.roots(sp.Poly(B, K))
    if sum(roots.values()) != sp.Poly(B, K).degree():
        raise ModelError(f"sympy finds no closed-form zeros of B(k) = {B}; the exponent stays numeric")
    essential = {}
    for kj, mult in roots.items():
        if mult == 1:
            nu, ess = sp.expand(sp.simplify(r.as_expr().subs(K, kj) / sp.diff(B, K).subs(K, kj))), []
        else:
            nu, ess = laurent_part(r.as_expr(), B, kj, mult)
            nu, ess = sp.expand(sp.simplify(nu)), [sp.simplify(c) for c in ess]
        if nu == 0 and not ess:
            continue
        kj = sp.simplify(kj)
        points.append((kj, nu))
        E += nu * sp.log(K - kj) + sum(c * (K - kj) ** -m for m, c in enumerate(ess, start=1))
        if ess:
            essential[kj] = ess
    points.sort(key=lambda p: complex(sp.N(p[0].subs(values).subs(W, 1), 20)).real, reverse=True)
    return SymbolicDerivation(parameters={ren[s]: v for s, v in getattr(model, "_symbolic_params", {}).items()},
                              dispersion=D, horizon=xh, kappa=kappa, hawking_temperature=kappa / (2 * sp.pi),
                              A=A, B=B, kspace_ode=ode, exponent=E, polynomial_part=Q, singular_points=points,
                              essential_parts=essential, note=note)
