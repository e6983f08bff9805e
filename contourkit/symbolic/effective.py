"""Normal form of a model's long-wavelength equation: psi'' + (omega^2 - V) psi = 0.

The long-wavelength limit of a :class:`~contourkit.symbolic.horizon.HorizonModel`
keeps the terms of its symmetric form (the full profile, not the linearised one)
of total degree at most two in (omega, d/dx):

    L0 = S_0[a(x) + A(x) omega^2] + S_1[omega b(x)] + S_2[C(x)],

that is ``(C phi')' + omega (b phi' + b' phi / 2) + (a + A omega^2) phi = 0``.
With ``D_2 = A omega^2 + beta omega k + gamma k^2`` the degree-two part of the
dispersion function, ``b = -i beta`` and ``C = -gamma``.  For a flow
``D = (omega - v k)^2 - c^2 k^2``: A = 1, beta = -2 v, C = c^2 - v^2.

Three exact steps (Liouville transformation, Olver [1]_ ch. 6):

1. phase: ``phi = exp(i omega S) chi`` with ``S' = beta / (2 C)`` removes every
   omega-linear term, leaving ``(C chi')' + (a + omega^2 W) chi = 0`` with
   ``W = disc / C`` and ``disc = beta^2/4 - A gamma`` (the discriminant of D_2;
   ``disc = c^2`` for a flow);
2. tortoise coordinate: ``dx*/dx = sqrt(W / C) = sqrt(disc) / C`` (``c/(c^2 - v^2)``
   for a flow; x* -> -infinity at the horizon);
3. rescaling: ``chi = psi / f`` with ``f = (C W)^(1/4) = disc^(1/4)`` removes the
   first derivative, and

       V = f_** / f - a / W.

A transverse wavenumber k_perp adds ``k_perp^2`` to ``k^2`` in the frame where the
cross term of D_2 vanishes (the rest frame of a flow): ``D_2 -> D_2 - k_perp^2
disc / A``, so ``a -> a - k_perp^2 disc / A`` and V gains ``k_perp^2 C / A``
(``k_perp^2 (c^2 - v^2)`` for a flow, the mass-like term ``m^2 = c^2 k_perp^2``).

References
----------
.. [1] F. W. J. Olver, Asymptotics and Special Functions, Academic Press (1974),
   ch. 6, sections 1-2 (Liouville transformation).
.. [2] W. G. Unruh, Phys. Rev. Lett. 46 (1981) 1351 (the acoustic wave equation
   of a flow).

Examples
--------
>>> import sympy as sp, contourkit as ck
>>> m = ck.catalogue.nondispersive_flow(kappa=0.05, D=0.5)
>>> form = effective_form(m)
>>> sp.simplify(form.potential)
0
"""
from dataclasses import dataclass, field

import sympy as sp

from ._sym import I, OMEGA, exact
from ..errors import InputError, ModelError


@dataclass(repr=False)
class EffectiveForm:
    """The exact normal form of a model's long-wavelength equation (sympy data).

    Attributes
    ----------
    x : sympy Symbol
        The model's original coordinate.
    omega : sympy Symbol
    k_perp : sympy expression
        The transverse wavenumber used (a number, or a Symbol if one was given).
    A, beta, C, a : sympy expressions in x
        Long-wavelength coefficients, ``sign`` times those of
        ``D_2 = A omega^2 + beta omega k - C k^2`` and of the omega-independent
        term a of g_0 (transverse term included).
    discriminant : sympy expression
        ``beta^2/4 + A C`` (c^2 for a flow).
    phase_derivative : sympy expression
        ``S'(x) = beta / (2 C)``; ``phi = exp(i omega S) chi``.
    tortoise_derivative : sympy expression
        ``dx*/dx = sqrt(discriminant) / C``.
    tortoise : sympy expression or None
        A closed form of x*(x) when sympy finds one (rational dx*/dx), else None
        (the greybody layer integrates dx*/dx by quadrature).
    rescaling : sympy expression
        ``f = discriminant^(1/4)`` (the impedance of the equation is ``f^2``);
        ``chi = psi / f``.
    potential : sympy expression
        V(x) in the normal form ``psi_** + (omega^2 - V) psi = 0``.
    horizon : float or None
        Horizon position in x (x* -> -infinity there); the exterior is x > horizon.
        None for an equation without horizon (built by :func:`normal_form`).
    sign : int
        +1 or -1: the factor the long-wavelength operator was multiplied by so
        that the omega^2 coefficient W is positive on the exterior.
    dropped : list of str
        The terms of the symmetric form left out of the long-wavelength limit.
    """
    x: sp.Symbol
    omega: sp.Symbol
    k_perp: sp.Expr
    A: sp.Expr
    beta: sp.Expr
    C: sp.Expr
    a: sp.Expr
    discriminant: sp.Expr
    phase_derivative: sp.Expr
    tortoise_derivative: sp.Expr
    tortoise: object
    rescaling: sp.Expr
    potential: sp.Expr
    horizon: object
    sign: int = 1
    dropped: list = field(default_factory=list)

    def __repr__(self):
        where = "no horizon" if self.horizon is None else f"horizon x = {self.horizon:g} (x* = -inf)"
        return (f"EffectiveForm(V = {sp.sstr(self.potential)[:70]},\n"
                f"  dx*/dx = {sp.sstr(self.tortoise_derivative)[:60]}, k_perp = {self.k_perp}, {where})")

    def operator(self, phi):
        """The long-wavelength operator L0 (times ``sign``) applied to a sympy expression phi(x)."""
        x, w = self.x, self.omega
        b = -I * self.beta
        C = self.C
        return (sp.diff(C * sp.diff(phi, x), x) + w * (b * sp.diff(phi, x) + sp.diff(b, x) * phi / 2)
                + (self.a + self.A * w ** 2) * phi)

    def back_substitution(self):
        """``L0[phi]`` for ``phi = exp(i omega S) psi(x*(x)) / f`` with psi solving the normal form.

        Returns the pair ``(c0, c1)`` of sympy expressions in x with
        ``exp(-i omega S) L0[phi] = c0 psi + c1 psi_*`` after ``psi_**`` has been
        replaced by ``(V - omega^2) psi``; both vanish identically when the
        three steps are exact.
        """
        x, w = self.x, self.omega
        P0, P1 = sp.symbols("psi psi_star")
        xs1 = self.tortoise_derivative
        Sp = self.phase_derivative
        f = self.rescaling
        # Psi(x) = psi(x*(x)); derivatives by the chain rule, psi_** from the normal form
        Psi = P0
        dPsi = xs1 * P1
        d2Psi = sp.diff(xs1, x) * P1 + xs1 ** 2 * (self.potential - w ** 2) * P0
        g = 1 / f                                          # phi = e^{i w S} g Psi
        # phi' e^{-i w S} and phi'' e^{-i w S}
        e1 = I * w * Sp
        p0 = g * Psi
        p1 = e1 * g * Psi + sp.diff(g, x) * Psi + g * dPsi
        p2 = ((sp.diff(e1, x) + e1 ** 2) * g * Psi + 2 * e1 * (sp.diff(g, x) * Psi + g * dPsi)
              + sp.diff(g, x, 2) * Psi + 2 * sp.diff(g, x) * dPsi + g * d2Psi)
        b = -I * self.beta
        C = self.C
        res = (C * p2 + sp.diff(C, x) * p1 + w * (b * p1 + sp.diff(b, x) * p0 / 2)
               + (self.a + self.A * w ** 2) * p0)
        res = sp.expand(res)
        return res.coeff(P0), res.coeff(P1)


def _tidy(expr):
    """A rational normal form in the expression's generators (tanh(x/L), sqrt(...)): cheap, exact.

    sympy's simplify() can take minutes on the derivatives of profiles; cancel() puts the
    expression over a common denominator in its generators and cancels common factors,
    which is enough for every identity the derivation needs (V = 0 for constant c included).
    """
    expr = sp.sympify(expr)
    try:
        return sp.cancel(sp.together(expr))
    except (sp.PolynomialError, NotImplementedError):  # pragma: no cover - defensive
        return expr


def _coefficient(expr, power):
    return sp.expand(expr).coeff(OMEGA, power) if power else sp.expand(expr).subs(OMEGA, 0)


def long_wavelength(model):
    """The coefficients ``(A, beta, C, a, dropped)`` of the model's long-wavelength limit.

    Keeps the terms of the symmetric coefficients g_0, g_1, g_2 of total degree
    at most two in (omega, d/dx); refuses degree-one terms (omega or d/dx alone),
    which have no wave equation as their limit.
    """
    x = model.x
    g = list(model.g) + [sp.Integer(0)] * max(0, 3 - len(model.g))
    g0, g1, g2 = (sp.expand(v) for v in g[:3])
    for expr, what in ((g0, "g_0"), (g1, "g_1"), (g2, "g_2")):
        if not expr.is_polynomial(OMEGA):
            raise ModelError(f"the symmetric coefficient {what} is not a polynomial in omega; "
                             f"multiply the dispersion relation by its denominator first")
    bad = []
    if _tidy(_coefficient(g0, 1)) != 0:
        bad.append("a term linear in omega without d/dx (in g_0)")
    if _tidy(_coefficient(g1, 0)) != 0:
        bad.append("a first derivative without omega (in g_1)")
    if bad:
        raise ModelError("the model's long-wavelength limit is not a wave equation: it has "
                         + " and ".join(bad) + "; effective_potential needs a dispersion relation whose "
                         "terms of degree one in (omega, k) vanish")
    A = _tidy(_coefficient(g0, 2))
    a = _tidy(_coefficient(g0, 0))
    b = _tidy(_coefficient(g1, 1))
    C = _tidy(_coefficient(g2, 0))
    beta = _tidy(I * b)                         # g_1 = omega b = -i omega beta
    if A == 0 or C == 0:
        raise ModelError("the model's long-wavelength limit has no omega^2 term or no k^2 term "
                         f"(A = {A}, C = {C}); it has no normal form psi'' + (omega^2 - V) psi = 0")
    if beta.has(I) or A.has(I) or C.has(I) or a.has(I):
        raise ModelError("the long-wavelength coefficients are not real; effective_potential needs a real "
                         "dispersion relation (a formally self-adjoint operator)")
    dropped = []
    for m, gm in enumerate(g):
        deg = sp.Poly(sp.expand(gm), OMEGA).degree() if gm != 0 else -1
        if m >= 3 and gm != 0:
            dropped.append(f"g_{m} (order {m} in d/dx)")
        elif m < 3 and deg > 2 - m:
            dropped.append(f"omega^{2 - m + 1}.. terms of g_{m}")
    return A, beta, C, a, dropped


def _closed_integral(expr, x):
    """sympy's antiderivative when expr is a rational function of x (else None: quadrature)."""
    expr = _tidy(expr)
    if not expr.is_rational_function(x):
        return None
    try:
        out = sp.integrate(sp.apart(sp.cancel(expr), x), x)
    except (NotImplementedError, ValueError, sp.PolynomialError):
        return None
    return None if out.has(sp.Integral) else out


def effective_form(model, *, k_perp=0):
    """Derive the exact normal form ``psi_** + (omega^2 - V) psi = 0`` of the model's long-wavelength equation.

    Parameters
    ----------
    model : HorizonModel
    k_perp : number or sympy Symbol, keyword-only
        Transverse wavenumber; adds ``k_perp^2`` to ``k^2`` in the frame where
        the cross term ``omega k`` of the long-wavelength dispersion vanishes
        (the rest frame of a flow), so that V gains ``k_perp^2 C / A``
        (``k_perp^2 (c^2 - v^2)`` for a flow).

    Returns
    -------
    EffectiveForm

    Raises
    ------
    ModelError
        A long-wavelength limit that is not a wave equation, or coefficients
        whose signs give no real tortoise coordinate on the exterior.
    InputError
        A k_perp that is neither a real number nor a sympy Symbol.

    References
    ----------
    .. [1] F. W. J. Olver, Asymptotics and Special Functions (1974), ch. 6.

    Examples
    --------
    >>> import sympy as sp, contourkit as ck
    >>> m = ck.catalogue.nondispersive_flow(kappa=0.05, D=0.5)
    >>> form = effective_form(m, k_perp=sp.Symbol("q"))
    >>> v = -1 + sp.tanh(sp.Symbol("x") / 10) / 2
    >>> sp.simplify(form.potential - sp.Symbol("q")**2 * (1 - v**2))
    0
    """
    if isinstance(k_perp, sp.Symbol):
        kp = k_perp
    else:
        try:
            kp = exact(k_perp)
        except InputError:
            raise InputError(f"k_perp must be a real number or a sympy Symbol, got {k_perp!r}") from None
        if not kp.is_real:
            raise InputError(f"k_perp must be a real number, got {k_perp!r}")
    A, beta, C, a, dropped = long_wavelength(model)
    return normal_form(A, beta, C, a, model.x, k_perp=kp, horizon=float(model.horizon),
                       probe=_exterior_probe(model), dropped=dropped)


def normal_form(A, beta, C, a, x, *, k_perp=0, horizon=None, probe=0, dropped=()):
    """The three exact steps for given long-wavelength coefficients (no model needed).

    The equation is ``(C phi')' + omega (b phi' + b' phi/2) + (a + A omega^2) phi = 0``
    with ``b = -i beta`` (dispersion ``A omega^2 + beta omega k - C k^2 + a``).

    Parameters
    ----------
    A, beta, C, a : sympy expressions in x
    x : sympy Symbol
    k_perp : number or Symbol, keyword-only
    horizon : float or None
        Zero of C (x* -> -infinity there); None for an equation without horizon.
    probe : float
        A point of the domain where the signs of the coefficients are read.
    dropped : sequence of str
        Recorded in the result.

    Returns
    -------
    EffectiveForm

    Examples
    --------
    >>> import sympy as sp
    >>> x = sp.Symbol("x"); c = 2 + sp.tanh(x)
    >>> form = normal_form(sp.Integer(1), sp.Integer(0), c**2, sp.Integer(0), x)
    >>> sp.simplify(form.tortoise_derivative - 1/c)
    0
    """
    A, beta, C, a = (sp.sympify(v) for v in (A, beta, C, a))
    kp = k_perp
    disc = _tidy(beta ** 2 / 4 + A * C)
    a = _tidy(a - kp ** 2 * disc / A) if kp != 0 else a
    W = _tidy(disc / C)
    Wp = complex(sp.N(W.subs(x, probe)))
    if abs(Wp.imag) > 1e-12 * abs(Wp) or Wp.real == 0:
        raise ModelError(f"the omega^2 coefficient of the phase-transformed equation, {W}, is not real and "
                         f"nonzero on the exterior (x = {probe:g}); the model has no real tortoise coordinate")
    sign = 1 if Wp.real > 0 else -1
    dp = complex(sp.N(disc.subs(x, probe)))
    if not dp.real > 0:
        raise ModelError(f"the discriminant beta^2/4 + A C = {disc} of the long-wavelength dispersion is not "
                         f"positive on the exterior (x = {probe:g}): the long-wavelength modes are not waves "
                         f"there, and no real tortoise coordinate exists")
    Cs, As, as_ = sign * C, sign * A, sign * a
    Ws = sign * W
    Sp = _tidy(beta / (2 * C))
    root = _positive_root(disc, x, probe)
    xs1 = _tidy(root / Cs)
    f = sp.sqrt(root)
    # f_** / f with d/dx* = (1/xs1) d/dx
    fd = sp.diff(f, x) / xs1
    fdd = sp.diff(fd, x) / xs1
    V = _tidy(fdd / f - as_ / Ws)
    return EffectiveForm(x=x, omega=OMEGA, k_perp=kp, A=As, beta=sign * beta, C=Cs, a=as_, discriminant=disc,
                         phase_derivative=Sp, tortoise_derivative=xs1, tortoise=_closed_integral(xs1, x),
                         rescaling=f, potential=V, horizon=horizon, sign=sign, dropped=list(dropped))


def _positive_root(disc, x, probe):
    """sqrt(disc) as a plain expression (sqrt(c^2) -> c), positive at the probe point.

    disc > 0 on the domain, so a continuous root keeps its sign there; the
    denested root is checked against sqrt(disc) at the probe and flipped if negative.
    """
    r = sp.powdenest(sp.sqrt(sp.factor(disc)), force=True)
    val = complex(sp.N(r.subs(x, probe)))
    ref = complex(sp.N(sp.sqrt(disc.subs(x, probe))))
    if abs(abs(val) - abs(ref)) > 1e-12 * abs(ref) or abs(val.imag) > 1e-12 * abs(ref):
        return sp.sqrt(disc)
    return r if val.real > 0 else -r


def _exterior_probe(model):
    """A point on the exterior side, between the horizon and the window end."""
    xh = float(model.horizon)
    scale = 1.0 / float(model.kappa) if model.kappa else 1.0
    hi = float(model.window[1])
    return xh + min(0.5 * scale, 0.5 * (hi - xh)) if hi > xh else xh + 0.5 * scale
