"""Horizon models: full profiles, horizon finding, self-adjoint linearisation, kappa.

A :class:`HorizonModel` holds a stationary mode equation whose coefficients
depend on x through profile functions (a flow velocity, a resonance frequency,
...).  It is given either as a dispersion relation ``D(omega, k; p(x)) = 0``,
quantised in symmetric (Weyl) order, or as an ODE with profile functions, put
in symmetric form (:mod:`contourkit.symbolic.symmetric`).  The symmetric coefficients
``g_m(x; omega)`` are the single source for everything else:

* the dispersion function ``D(omega, k, x) = sum_m g_m(x) (i k)^m``;
* the horizon x_H: the zero of the coefficient of ``k^d`` in the lowest-degree
  homogeneous part of D in (omega, k), i.e. where the low-frequency branch
  ``omega = lambda(x) k`` has zero group velocity in the static frame;
* the surface gravity ``kappa = d lambda/dx`` at x_H (for a flow
  ``v = -1 + kappa x`` this is the velocity gradient);
* the near-horizon ModeEquation: every g_m truncated to first order at x_H,
  so that the operator stays formally self-adjoint and the norm is conserved.

Conventions: ``phi ~ exp(-i omega t + i k x)``; the fluid moves towards -x
near the horizon; after the shift the horizon is at x = 0 and the exterior
(subsonic) side is x > 0.

References
----------
.. [1] W. G. Unruh, Phys. Rev. Lett. 46 (1981) 1351 (sonic horizon; kappa is
   the flow gradient at the sonic point).
.. [2] S. Corley, Phys. Rev. D 57 (1998) 6280 (linearised near-horizon flows
   solved in k-space).
"""
import warnings

import numpy as np
import sympy as sp

from . import extensions
from ._sym import KS, OMEGA, I, exact, exact_expr
from ..errors import ContourkitWarning, HorizonError, InputError, ModelError
from .equation import ModeEquation, ode_coefficients
from .symmetric import from_symmetric, linearise, to_symmetric



def _normalise_parameters(parameters):
    out = {}
    for s, v in (parameters or {}).items():
        s = sp.Symbol(s) if isinstance(s, str) else s
        if not isinstance(s, sp.Symbol):
            raise InputError(f"parameter names must be strings or sympy Symbols, got {s!r}")
        out[s] = exact(v, f"the parameter {s}")
    return out


def _profile_substitutions(profiles, x, params):
    subs = {}
    for name, expr in (profiles or {}).items():
        e = sp.sympify(expr).subs(params)
        extra = e.free_symbols - {x}
        if extra:
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


def checked_kappa(kappa, xh):
    """kappa if it is a finite nonzero number, else HorizonError (e.g. a profile with a kink at x_H)."""
    try:
        val = float(kappa)
    except (TypeError, ValueError, OverflowError):
        val = float("nan")
    if not np.isfinite(val) or val == 0:
        raise HorizonError(f"the surface gravity kappa at the horizon x = {xh:g} is {val!r} (not a finite nonzero "
                           f"number): the profile has no finite nonzero slope there (a kink such as sqrt(x**2) "
                           f"or abs(x), or a flat point); use a profile that is smooth with a nonzero slope at "
                           f"the horizon")
    return val


class HorizonModel:
    """A mode equation with profile functions, linearised at its horizon.

    Build it with :meth:`from_dispersion` or :meth:`from_ode`, or take a ready
    one from :mod:`contourkit.catalogue`.

    Attributes
    ----------
    omega, x : sympy Symbols of frequency and position.
    g : list of sympy expressions
        Symmetric-form coefficients ``g_m(x; omega)`` of the full operator.
    dispersion : sympy expression
        ``D(omega, k, x)`` with the full profile.
    horizon : float
        Horizon position in the original coordinate.
    kappa : float
        Surface gravity.
    name : str

    Examples
    --------
    >>> import sympy as sp, contourkit as ck
    >>> w, k, x, v = sp.symbols("omega k x v")
    >>> m = ck.HorizonModel.from_dispersion((w - v*k)**2 - k**2, omega=w, k=k, x=x,
    ...         profiles={v: -1 + sp.Rational(1, 10)*sp.tanh(2*(x - 3))})
    >>> round(m.horizon, 12), round(m.kappa, 12)
    (3.0, 0.2)
    """

    def __init__(self, g, *, omega, x, name="", horizon=None, window=(-50.0, 50.0),
                 profiles=None, parameters=None, description=""):
        self.g = [sp.sympify(v) for v in g]
        self.omega = omega
        self.x = x
        self.name = name
        self.description = description
        self.profiles = dict(profiles or {})
        self.parameters = dict(parameters or {})
        self.window = tuple(float(v) for v in window)
        self.dispersion = sp.expand(sum(gm * (I * KS) ** m for m, gm in enumerate(self.g)))
        self.order = len(self.g) - 1
        if horizon is None:
            horizon = self._find_horizon()
        self.horizon = horizon
        self.kappa = checked_kappa(self._surface_gravity(horizon), horizon)
        # exact decimals of any Float (a numerically located horizon), never a guessed rational
        self._lin = [(exact_expr(a), exact_expr(b)) for a, b in linearise(self.g, x, horizon)]
        self._eq_cache = {}

    # -- constructors -------------------------------------------------
    @classmethod
    def from_dispersion(cls, D, *, omega, k, x, profiles=None, parameters=None, **kw):
        """From a dispersion relation ``D(omega, k; p(x)) = 0``.

        D must be a polynomial in k; its coefficients may depend on omega, on
        parameters and on profile symbols.  The operator is the symmetric (Weyl)
        quantisation ``sum_n S_n[d_n(x) (-i)^n]`` of ``D = sum_n d_n(x) k^n``;
        it is formally self-adjoint when D is real.  Normalise D so that
        positive-norm modes have ``dD/domega > 0``.
        """
        if isinstance(D, str) or not isinstance(D, (sp.Basic, int, float)):
            raise InputError(f"D must be a sympy expression in omega, k and x, got {type(D).__name__} "
                             f"{str(D)[:40]!r}; build it with sympy, or write a model file and load it with "
                             f"contourkit.load_model (its text is parsed safely, never evaluated)")
        for name, sym in (("omega", omega), ("k", k), ("x", x)):
            if not isinstance(sym, sp.Symbol):
                raise InputError(f"{name} must be a sympy Symbol, got {type(sym).__name__} {sym!r}")
        params = _normalise_parameters(parameters)
        subs = _profile_substitutions(profiles, x, params)
        D = sp.sympify(D).subs(params).subs(subs).subs(omega, OMEGA).subs(k, KS)
        D = D.subs(x, sp.Symbol("x")) if x != sp.Symbol("x") else D
        X = sp.Symbol("x")
        extra = D.free_symbols - {OMEGA, KS, X}
        if extra:
            raise ModelError(f"the dispersion relation contains the symbol(s) "
                             f"{', '.join(sorted(map(str, extra)))} with no value; give them in parameters or profiles")
        num, den = sp.fraction(sp.together(D))
        if den.has(KS):
            raise ModelError("the dispersion relation is not polynomial in k; multiply it by its denominator first")
        try:
            poly = sp.Poly(sp.expand(D), KS)
        except sp.PolynomialError:
            raise ModelError(f"the dispersion relation is not a polynomial in {k}: {D}")
        n = poly.degree()
        if n < 1:
            raise ModelError("the dispersion relation does not depend on k")
        g = [sp.expand(poly.coeff_monomial(KS ** m) * (-I) ** m) for m in range(n + 1)]
        return cls(g, omega=OMEGA, x=X, profiles=profiles, parameters=params, **kw)

    @classmethod
    def from_ode(cls, expr, y, x, *, profiles=None, parameters=None, frequency=None, horizon=None, **kw):
        """From an ODE in y(x) containing profile functions and a frequency symbol."""
        params = _normalise_parameters(parameters)
        omega_val = None
        if frequency is not None:
            omega_val = params.pop(frequency, None)
        subs = _profile_substitutions(profiles, x, params)
        coeffs = [sp.sympify(c).subs(params).subs(subs).doit() for c in ode_coefficients(expr, y, x)]
        X = sp.Symbol("x")
        w = frequency if frequency is not None else OMEGA
        coeffs = [c.subs(w, OMEGA).subs(x, X) for c in coeffs]
        left = set().union(*(c.free_symbols for c in coeffs)) - {OMEGA, X}
        if left:
            raise ModelError(f"the equation contains the symbol(s) {', '.join(sorted(map(str, left)))} "
                             f"with no value; give them in parameters, or name the frequency with frequency=")
        if frequency is None and horizon is None:
            raise ModelError("to linearise an ODE at its horizon contourkit needs the frequency symbol "
                             "(frequency=omega, with its value in parameters) or the horizon position (horizon=x_H)")
        model = cls(to_symmetric(coeffs, X), omega=OMEGA, x=X, horizon=horizon,
                    profiles=profiles, parameters=params, **kw)
        model._default_omega = omega_val
        return model

    # -- horizon ------------------------------------------------------
    def _low_frequency_part(self):
        poly = sp.Poly(self.dispersion, OMEGA, KS)
        terms = [(m, c) for m, c in poly.terms() if sp.simplify(c) != 0]
        if not terms:
            raise HorizonError("the dispersion function vanishes identically")
        d = min(sum(m) for m, _ in terms)
        part = {m: c for m, c in terms if sum(m) == d}
        return d, part.get((0, d), sp.Integer(0)), part.get((1, d - 1), sp.Integer(0))

    def _find_horizon(self):
        d, c0, c1 = self._low_frequency_part()
        if c0 == 0 or not c0.has(self.x):
            raise HorizonError("no horizon: the low-frequency branch never has zero group velocity "
                               "(the coefficient of the lowest power of k at omega = 0 does not vary with x)")
        f = sp.lambdify(self.x, c0, "numpy")
        a, b = self.window
        xs = np.linspace(a, b, 4001)
        with np.errstate(all="ignore"):
            vals = np.real(np.asarray(f(xs), dtype=complex))
        roots = []
        from scipy.optimize import brentq
        for i in range(len(xs) - 1):
            if vals[i] == 0:
                roots.append(xs[i])
            elif vals[i] * vals[i + 1] < 0:
                roots.append(brentq(lambda t: float(np.real(f(t))), xs[i], xs[i + 1], xtol=1e-15, rtol=1e-15))
        if not roots:
            raise HorizonError(f"no horizon in the window {self.window}: the low-frequency group velocity "
                               f"({c0}) does not change sign; widen window=(a, b) or check the profile")
        good = []
        for r in roots:
            try:
                good.append((abs(r), r, self._surface_gravity(r)))
            except HorizonError:
                continue
        if not good:
            raise HorizonError(f"the horizon(s) at x = {roots} have the exterior on the x < 0 side; contourkit's "
                               f"convention puts the subsonic exterior at x > 0: reflect the profile (x -> -x)")
        good.sort()
        if len(good) > 1:
            warnings.warn(f"several horizons found at {[g[1] for g in good]}; using x = {good[0][1]} "
                          f"(give horizon=... to choose another)", ContourkitWarning, stacklevel=3)
        import mpmath
        fm = sp.lambdify(self.x, c0, "mpmath")
        with mpmath.workdps(40):
            try:
                r = mpmath.findroot(lambda t: mpmath.re(fm(t)), mpmath.mpf(good[0][1]))
                root = sp.Float(mpmath.nstr(r, 35), 35)
            except (ValueError, ZeroDivisionError):
                root = sp.Float(good[0][1], 17)
        return float(root) if abs(root) > 1e-30 else 0.0

    def _surface_gravity(self, xh):
        d, c0, c1 = self._low_frequency_part()
        if c1 == 0:
            raise HorizonError("the low-frequency part of the dispersion relation has no omega*k term; "
                               "contourkit cannot define the group velocity of the low-frequency branch")
        slope = -sp.diff(c0, self.x) / c1
        val = complex(sp.N(slope.subs(self.x, xh), 30))
        if abs(val.imag) > 1e-12 * max(1.0, abs(val.real)) or val.real <= 0:
            raise HorizonError(f"at x = {xh} the low-frequency group velocity has slope {val}; a horizon with "
                               f"the exterior at x > 0 needs a positive slope: reflect the profile (x -> -x)")
        return val.real

    def __getstate__(self):
        # caches hold lambdified functions (not picklable); workers rebuild them
        state = dict(self.__dict__)
        for key in ("_eq_cache", "_dDdw_cache", "_direct_cache", "_family_cache"):
            state.pop(key, None)
        state["_eq_cache"] = {}
        return state

    @property
    def omega_max(self):
        """Cut-off frequency of the dispersive branches in the asymptotic regions (None if none).

        See :func:`contourkit.profiles.cutoff.omega_max`.
        """
        if not hasattr(self, "_omega_max"):
            self._omega_max = extensions.call("omega_max", self)
        return self._omega_max

    @property
    def hawking_temperature(self):
        """T_H = kappa / (2 pi)."""
        return self.kappa / (2 * np.pi)

    # -- near-horizon equation ----------------------------------------
    def mode_equation(self, omega):
        """The linearised near-horizon ModeEquation at frequency omega (horizon at x = 0)."""
        if omega is None:
            omega = getattr(self, "_default_omega", None)
            if omega is None:
                raise InputError("give the frequency: model.mode_equation(omega)")
        w = exact(omega, "omega")
        key = w
        if key not in self._eq_cache:
            X = self.x
            g_lin = [sp.expand((a + b * X).subs(OMEGA, w)) for a, b in self._lin]
            left = from_symmetric(g_lin, X)
            a = [sp.expand(c).subs(X, 0) for c in left]
            b = [sp.expand(sp.diff(c, X)) for c in left]
            self._eq_cache[key] = ModeEquation(
                a, b, kappa=self.kappa, horizon=self.horizon,
                note=f"symmetric form linearised at the horizon x_H = {self.horizon}, shifted to x = 0")
        return self._eq_cache[key]

    def dispersion_at(self, omega, x):
        """The dispersion polynomial in k at frequency omega and position x (full profile)."""
        return sp.Poly(sp.expand(self.dispersion.subs({OMEGA: exact(omega), self.x: exact(x)})), KS)

    # -- physics entry points (thin wrappers over functional layers) --
    def scatter(self, omega, **kw):
        """Near-horizon S-matrix at one frequency; see :func:`contourkit.scattering.smatrix.scatter`."""
        return extensions.call("scatter", self, omega, **kw)

    def spectrum(self, omegas, **kw):
        """One row per frequency; see :func:`contourkit.scattering.spectra.spectrum`."""
        return extensions.call("spectrum", self, omegas, **kw)

    def __repr__(self):
        return f"HorizonModel({self.name or 'unnamed'}, horizon={self.horizon}, kappa={self.kappa})"
