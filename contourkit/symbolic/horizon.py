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

Conventions: ``phi ~ exp(-i omega t + i k x)``; x is the user's x.  Any
orientation is accepted: black and white holes, flows towards -x or +x
(``model.orientation``, :mod:`contourkit.symbolic.orientation`); kappa is the
modulus of the gradient.  ``mode_equation`` linearises in the user's x
(horizon shifted to 0); the near-horizon S-matrix is computed on
``canonical_model()`` (black hole, flow towards -x, subsonic exterior at
x > 0) and mapped back.  ``horizon='none'`` builds a horizonless flow (no
near-horizon model; direct solver and turning points).

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
from .orientation import Orientation, transformed_model
from .profilesubs import (_align, _normalise_parameters, _profile_substitutions, _short, _symbolic_source,
                          _touching_points)
from .symmetric import from_symmetric, linearise, to_symmetric


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
        self._eq_cache = {}
        self._canonical = None
        if isinstance(horizon, str):
            if horizon.strip().lower() != "none":
                raise InputError(f"horizon must be a position, None (find it) or 'none' (a horizonless flow), "
                                 f"got {horizon!r}")
            # a horizonless flow: no sonic point, no near-horizon model (direct solver, turning points)
            self.horizon = None
            self.kappa = None
            self.reference = 0.5 * (self.window[0] + self.window[1])
            self.orientation = self._horizonless_orientation()
            self._lin = None
            return
        if horizon is None:
            horizon = self._find_horizon()
        self.horizon = horizon
        self.orientation = self._orientation(horizon)
        self.kappa = checked_kappa(abs(self.orientation.slope), horizon)
        # exact decimals of any Float (a numerically located horizon), never a guessed rational
        self._lin = [(exact_expr(a), exact_expr(b)) for a, b in linearise(self.g, x, horizon)]

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
        params = _align(params, [D, *(profiles or {}).values()])
        subs = _profile_substitutions(profiles, x, params)
        try:
            Dsym = sp.expand(_symbolic_source(D, profiles, x, omega, k))
            gsym = [sp.expand(sp.Poly(Dsym, KS).coeff_monomial(KS ** m) * (-I) ** m)
                    for m in range(sp.Poly(Dsym, KS).degree() + 1)]
        except (sp.PolynomialError, TypeError, ValueError):
            gsym = None
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
        model = cls(g, omega=OMEGA, x=X, profiles=profiles, parameters=params, **kw)
        model._symbolic_g = gsym
        model._symbolic_params = params
        return model

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
        try:
            ssub = _profile_substitutions(profiles, x, {}, strict=False)
            csym = [sp.sympify(c).subs(ssub).doit().subs(w, OMEGA).subs(x, X) for c in ode_coefficients(expr, y, x)]
            model._symbolic_g = to_symmetric(csym, X)
            model._symbolic_params = params
        except (sp.PolynomialError, TypeError, ValueError):  # pragma: no cover - symbolic extra only
            pass
        return model

    # -- horizon ------------------------------------------------------
    def _low_frequency_part(self):
        """(d, c0, c1, c2): coefficients of k^d, omega k^(d-1), omega^2 k^(d-2) in the lowest-degree part of D."""
        if not self.dispersion.has(OMEGA):
            raise HorizonError(
                f"the dispersion function {_short(self.dispersion)} does not contain the frequency omega: it has "
                f"no group velocity, so it has no sonic horizon; write it as D(omega, k; x) with the frequency "
                f"(e.g. (omega - v k)^2 - c^2 k^2), or, for one stationary equation without a horizon, use "
                f"ModeEquation.from_ode")
        poly = sp.Poly(self.dispersion, OMEGA, KS)
        # a mass-like term (no omega, no k: a transverse wavenumber) does not move the horizon,
        # which is that of the massless part (the lowest degree >= 1)
        terms = [(m, c) for m, c in poly.terms() if sum(m) > 0 and sp.simplify(c) != 0]
        if not terms:
            raise HorizonError("the dispersion function vanishes identically")
        d = min(sum(m) for m, _ in terms)
        part = {m: c for m, c in terms if sum(m) == d}
        return (d, part.get((0, d), sp.Integer(0)), part.get((1, d - 1), sp.Integer(0)),
                part.get((2, d - 2), sp.Integer(0)) if d >= 2 else sp.Integer(0))

    def _find_horizon(self):
        d, c0, c1, _ = self._low_frequency_part()
        gap = sp.Poly(self.dispersion, OMEGA, KS).coeff_monomial(1)
        if c1 == 0 and gap.has(self.x):
            raise HorizonError(
                f"the only x-dependent low-order term of the dispersion function is {_short(gap)}, a term with "
                f"neither omega nor k (a gap or potential term), and D has no omega*k term: the long-wavelength "
                f"branch is not a sound wave omega = lambda(x) k, so contourkit's sonic horizon is not defined; "
                f"such a point is a turning point of the equation (Airy- or Budden-type), not a horizon: use the "
                f"equation as given with ModeEquation.from_ode(...) and its contours, or add the sound branch to D")
        if c1 == 0:
            raise HorizonError(
                f"the lowest-order part of the dispersion function has no omega*k term (it is "
                f"{_short(c0)} k^{d} + ...): the low-frequency branch omega = lambda(x) k is not defined, so "
                f"neither is a horizon; normalise D so that its sound branch reads (omega - v k)^2 - c^2 k^2 + ...")
        if c0 == 0 or not c0.has(self.x):
            raise HorizonError("no horizon: the low-frequency branch never has zero group velocity "
                               "(the coefficient of the lowest power of k at omega = 0 does not vary with x); "
                               "for a horizonless flow give horizon='none'")
        f = sp.lambdify(self.x, c0, "numpy")
        a, b = self.window
        xs = np.linspace(a, b, 4001)
        with np.errstate(all="ignore"):
            vals = np.real(np.asarray(f(xs), dtype=complex))
        roots = []
        from scipy.optimize import brentq
        for i in range(len(xs) - 1):
            if vals[i] == 0 and (i == 0 or vals[i - 1] * vals[i + 1] < 0):
                roots.append(float(xs[i]))
            elif vals[i] * vals[i + 1] < 0:
                roots.append(float(brentq(lambda t: float(np.real(f(t))), xs[i], xs[i + 1], xtol=1e-15, rtol=1e-15)))
        good, degenerate = [], []
        for r in roots:
            try:
                good.append((abs(r), r, self._surface_gravity(r)))
            except HorizonError:
                degenerate.append(r)
        if not good:
            touch = _touching_points(f, xs, vals)
            if degenerate:
                raise HorizonError(
                    f"the only sonic point{'s' if len(degenerate) > 1 else ''} (x = "
                    f"{', '.join(f'{r:.6g}' for r in degenerate)}) {'are' if len(degenerate) > 1 else 'is'} "
                    f"degenerate: the flow crosses the wave speed with zero gradient there, so kappa = 0 and the "
                    f"near-horizon linearisation has no x-dependence; give the profile a non-zero gradient at its "
                    f"sonic point (e.g. v = -1 + kappa x + ...)")
            if touch:
                raise HorizonError(
                    f"the flow speed touches the wave speed without crossing it at x = "
                    f"{', '.join(f'{t:.6g}' for t in touch)}: that is not a horizon (the flow is subsonic, or "
                    f"supersonic, on both sides); change the profile so that it crosses, or give horizon='none' to "
                    f"treat it as a horizonless flow (contourkit.direct.scatter, model.turning_points)")
            raise HorizonError(f"no horizon in the window ({a:g}, {b:g}): the low-frequency group velocity "
                               f"({_short(c0)}) does not change sign; widen window=(a, b), check the profile, "
                               f"or give horizon='none' for a horizonless flow")
        good.sort()
        if len(good) > 1:
            warnings.warn(f"several horizons found at {[round(g[1], 10) for g in good]}; using x = {good[0][1]:.10g} "
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

    def _signed_slope(self, xh):
        """``d lambda_0/dx`` at xh (see :mod:`contourkit.symbolic.orientation`); HorizonError if it is not usable."""
        d, c0, c1, _ = self._low_frequency_part()
        if c1 == 0:
            raise HorizonError("the low-frequency part of the dispersion relation has no omega*k term; "
                               "contourkit cannot define the group velocity of the low-frequency branch")
        c1h = complex(sp.N(c1.subs(self.x, xh), 30))
        if abs(c1h) == 0:
            raise HorizonError(f"at x = {xh:.6g} the omega*k coefficient of the low-frequency part vanishes: the "
                               f"flow is at rest there and the sonic point is not a horizon")
        slope = -sp.diff(c0, self.x) / c1
        val = complex(sp.N(slope.subs(self.x, xh), 30))
        if not (np.isfinite(val.real) and np.isfinite(val.imag)):
            checked_kappa(float("nan"), xh)          # a kink (sqrt(x**2), abs(x)): kappa is not defined
        if abs(val.imag) > 1e-12 * max(1.0, abs(val.real)):
            raise HorizonError(f"at x = {xh:.6g} the low-frequency group velocity has the complex slope "
                               f"{val.real:.6g}{val.imag:+.6g}j: the dispersion function is not real there")
        if abs(val.real) <= 1e-9:
            raise HorizonError(f"the sonic point at x = {xh:.6g} is degenerate (zero gradient, slope "
                               f"{val.real:.2g}): kappa = 0")
        return val.real

    def _surface_gravity(self, xh):
        """kappa = |d lambda_0/dx| at xh (any sign of flow and gradient)."""
        return abs(self._signed_slope(xh))

    def _orientation(self, xh):
        slope = self._signed_slope(xh)
        d, c0, c1, c2 = self._low_frequency_part()
        lam1 = complex(sp.N((-c1 / c2).subs(self.x, xh), 30)).real if c2 != 0 else 0.0
        if lam1 != 0:
            return Orientation.from_signs(slope, 1 if lam1 > 0 else -1,
                                          note="flow direction from the co-propagating branch -c1/c2")
        return Orientation.from_signs(slope, -1, note="flow direction assumed towards -x (no omega^2 term)")

    def _horizonless_orientation(self):
        d, c0, c1, c2 = self._low_frequency_part()
        x0 = 0.5 * (self.window[0] + self.window[1])
        lam1 = complex(sp.N((-c1 / c2).subs(self.x, x0), 30)).real if c2 != 0 else 0.0
        return Orientation.horizonless(1 if lam1 > 0 else -1, note=f"flow direction at x = {x0:g}")

    def canonical_model(self):
        """The same model in the canonical orientation (black hole, flow towards -x, subsonic side x > 0).

        Mirror image and/or time reverse of this one (see
        :mod:`contourkit.symbolic.orientation`); ``self`` if it is canonical already.
        """
        o = self.orientation
        if o.canonical or o.hole == "none":
            return self
        if getattr(self, "_canonical", None) is None:
            m = transformed_model(self, o.transform, o.transform[1] * self.horizon)
            if not m.orientation.canonical:  # pragma: no cover - the table in orientation.py is exhaustive
                raise HorizonError(f"internal error: the transformed model is {m.orientation}")
            for key in ("flow_D", "Lambda", "branch"):
                if hasattr(self, key):
                    setattr(m, key, getattr(self, key))
            self._canonical = m
        return self._canonical

    def transformed_flow(self, transform):
        """A horizonless flow under parity and/or time reversal: ``D(omega, sk k, sx x)``.

        ``transform = (sk, sx)`` as in :mod:`contourkit.symbolic.orientation`:
        ``(-1, -1)`` is the mirror image ``x -> -x``, ``(-1, 1)`` the time
        reverse, ``(1, -1)`` both.  The contour method at a dispersive turning
        point works in one orientation (flow towards -x, the blocked wave on
        the -x side of the turning point); the others are mapped onto it
        (:func:`contourkit.scattering.conversion.scatter_horizonless`).
        """
        if self.horizon is not None:
            raise HorizonError("transformed_flow is for horizonless flows; a horizon model maps onto its "
                               "canonical orientation with canonical_model()")
        cache = self.__dict__.setdefault("_transformed", {})
        if transform not in cache:
            cache[transform] = transformed_model(self, transform, "none")
        return cache[transform]

    def __getstate__(self):
        # caches hold lambdified functions (not picklable); workers rebuild them
        state = dict(self.__dict__)
        for key in ("_eq_cache", "_dDdw_cache", "_direct_cache", "_family_cache", "_transformed"):
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
        """T_H = kappa / (2 pi) (None for a horizonless flow)."""
        return None if self.kappa is None else self.kappa / (2 * np.pi)

    @property
    def horizonless(self):
        """True for a flow without a sonic horizon (built with horizon='none')."""
        return self.horizon is None

    def turning_points(self, omega, **kw):
        """Dispersive turning points on the real axis at frequency omega; see
        :func:`contourkit.profiles.turning.turning_points`."""
        return extensions.call("turning_points", self, omega, **kw)

    def symbolic(self, **kw):
        """Formulas with the parameters kept as symbols; see :func:`contourkit.symbolic.formulas.derive`."""
        from .formulas import derive
        return derive(self, **kw)

    # -- near-horizon equation ----------------------------------------
    def mode_equation(self, omega, *, at=None):
        """The linearised near-horizon ModeEquation at frequency omega (horizon at x = 0).

        ``at=x0`` linearises at x0 instead (shifted to x = 0), e.g. at a dispersive
        turning point of ``model.turning_points(omega)``: its k-space equation
        has the double saddle k_t at x = 0.
        """
        if at is not None:
            x0 = exact(at)
            # coefficients at x0 as 40-digit decimals (closed forms at a numeric x0 grow without bound)
            lin = [(exact_expr(sp.N(a, 40)), exact_expr(sp.N(b, 40))) for a, b in linearise(self.g, self.x, x0)]
            g_lin = [sp.expand((a + b * self.x).subs(OMEGA, exact(omega))) for a, b in lin]
            left = from_symmetric(g_lin, self.x)
            return ModeEquation([sp.expand(c).subs(self.x, 0) for c in left],
                                [sp.expand(sp.diff(c, self.x)) for c in left], kappa=None, horizon=float(at),
                                note=f"symmetric form linearised at x0 = {float(at)}, shifted to x = 0")
        if omega is None:
            omega = getattr(self, "_default_omega", None)
            if omega is None:
                raise InputError("give the frequency: model.mode_equation(omega)")
        if self._lin is None:
            raise HorizonError("a horizonless flow has no near-horizon equation; use contourkit.direct.scatter "
                               "for its S-matrix and model.turning_points(omega) for its dispersive turning points")
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
        """Near-horizon S-matrix at one frequency; see :func:`contourkit.scattering.smatrix.scatter`.

        A horizonless flow scatters at its dispersive turning point instead
        (:func:`contourkit.scattering.conversion.scatter_horizonless`); it must have exactly one.
        """
        if self.horizon is None:
            return extensions.call("scatter_horizonless", self, omega, **kw)
        return extensions.call("scatter", self, omega, **kw)

    def spectrum(self, omegas, **kw):
        """One row per frequency; see :func:`contourkit.scans.engine.spectrum`."""
        return extensions.call("spectrum", self, omegas, **kw)

    def effective_potential(self, *, k_perp=0, far=None):
        """Normal form psi'' + (omega^2 - V) psi = 0 of the long-wavelength equation, with numbers.

        See :func:`contourkit.greybody.modelpotential.effective_potential` (the sympy
        derivation is :func:`contourkit.symbolic.effective.effective_form`).
        """
        return extensions.call("effective_potential", self, k_perp=k_perp, far=far)

    def greybody(self, omega, **kw):
        """Greybody factor, reflection and far-region occupation; see :func:`contourkit.greybody.farfield.greybody`."""
        return extensions.call("greybody", self, omega, **kw)

    def far_spectrum(self, omegas, **kw):
        """Near-horizon rows with greybody and occupation_far; see :func:`contourkit.greybody.farfield.far_spectrum`."""
        return extensions.call("far_spectrum", self, omegas, **kw)

    def __repr__(self):
        if self.horizon is None:
            return f"HorizonModel({self.name or 'unnamed'}, horizonless)"
        return (f"HorizonModel({self.name or 'unnamed'}, horizon={self.horizon}, kappa={self.kappa}, "
                f"{self.orientation.hole} hole)")
