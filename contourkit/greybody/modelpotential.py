"""Effective potentials of horizon models: numbers from the exact normal form.

:func:`contourkit.symbolic.effective.effective_form` derives, with sympy, the
normal form ``psi_** + (omega^2 - V) psi = 0`` of a model's long-wavelength
equation: V(x) and dx*/dx in the model's coordinate x, the horizon at
x* -> -infinity.  This module turns that data into numbers.

Method.  On the exterior ``x > x_H`` the coordinate ``s = ln((x - x_H)/l)``
(l = 1/kappa) maps the horizon to s -> -infinity with ``h(s) = dx*/ds -> 1/(2 kappa)``
smooth, so that the equation becomes the first-order system

    dpsi/ds = h p,    dp/ds = h (V - omega^2) psi        (p = dpsi/dx*),

whose coefficients are tabulated once (mpmath, 30 digits: no cancellation in
``c^2 - v^2`` next to the horizon) and interpolated by cubic splines (of ln h
and V) on a grid of step 0.01 in s.  The transmitted wave ``exp(i q x*)``,
``q = sqrt(omega^2 - V(+infinity))``, is started at the far end (where the
profile is uniform to 1e-16) and integrated (DOP853) towards the horizon to the
point s_L where the Born estimate of the neglected tail of V is below 1e-12;
there ``psi = A exp(i k x*) + B exp(-i k x*)`` with ``k = sqrt(omega^2 - V(x_H))``
gives ``Gamma = (q/k)/|A|^2`` and ``|R|^2 = |B/A|^2``.  The error estimate is the
change when the tolerance is divided by 100 and s_L moved 4 units further in.
Below the far region's threshold (``omega^2 < V(+infinity)``) Gamma = 0 exactly.

This is a small engine of its own for model potentials (a horizon at one end,
a uniform region at the other); :class:`contourkit.greybody.TortoisePotential`
is the general object for potentials given in closed form.

References
----------
.. [1] F. W. J. Olver, Asymptotics and Special Functions (1974), ch. 6 (Liouville
   transformation).
.. [2] E. Hairer, S. P. Norsett, G. Wanner, Solving Ordinary Differential
   Equations I (1993), section II.5 (DOP853).
"""
import math
import warnings
from dataclasses import dataclass
from typing import Any

import mpmath
import numpy as np
import sympy as sp
from scipy.integrate import solve_ivp
from scipy.interpolate import CubicSpline

from ..errors import AccuracyWarning, InputError, ModelError
from ..profiles.planewaves import uniform_length
from ..symbolic import extensions
from ..symbolic.effective import effective_form, normal_form

__all__ = ["EffectivePotential", "ModelTransmission", "effective_potential", "coefficient_potential"]

_DPS = 30
_DS = 0.01          # grid step in s (0.05 deep in the horizon region, where V ~ exp(s))
_DEEP = -6.0
_NUMPY_FROM = -6.0  # x - x_H >= exp(-6)/kappa: double-precision tabulation


def _grid_points(s_min, s_max, horizon):
    if not horizon or s_min >= _DEEP:
        n = int(math.ceil((s_max - s_min) / _DS))
        return np.linspace(s_max - n * _DS, s_max, n + 1)
    n1 = int(math.ceil((s_max - _DEEP) / _DS))
    upper = np.linspace(s_max - n1 * _DS, s_max, n1 + 1)
    n2 = int(math.ceil((upper[0] - s_min) / (5 * _DS)))
    lower = np.linspace(upper[0] - n2 * 5 * _DS, upper[0], n2 + 1)[:-1]
    return np.concatenate([lower, upper])


def short(v):
    """A number or an array, in a few characters (for the reprs of result objects)."""
    v = np.asarray(v, dtype=float)
    return f"{float(v):.8g}" if v.ndim == 0 else f"array(n={v.size})"


@dataclass(repr=False)
class ModelTransmission:
    """Transmission of the long-wavelength mode from the horizon to the far region.

    Scalars for a scalar omega, numpy arrays for an array.

    Attributes
    ----------
    omega : float or ndarray
    transmission : float or ndarray
        Gamma: the fraction of the flux of a wave leaving the horizon that reaches
        the far region (flux-normalised waves).
    reflection : float or ndarray
        |R|^2: the fraction reflected into the counter-propagating mode.
    residual : float or ndarray
        ``| |R|^2 + Gamma - 1 |`` (flux conservation).
    error : float or ndarray
        Estimated absolute error of Gamma (two resolutions).
    dps : int
        Digits of the tabulated coefficients (the integration is double precision: 15).
    success : bool or ndarray
        error and residual below ``rtol``.
    message : str
    """
    omega: Any
    transmission: Any
    reflection: Any
    residual: Any
    error: Any
    dps: int
    success: Any
    message: str

    def __repr__(self):
        f = short
        return (f"ModelTransmission(omega={f(self.omega)}, transmission={f(self.transmission)}, "
                f"reflection={f(self.reflection)},\n  residual={float(np.max(self.residual)):.1e}, "
                f"error={float(np.max(self.error)):.1e}, success={bool(np.all(self.success))})")


class EffectivePotential:
    """The normal form of a model's long-wavelength equation, with numbers.

    Build it with ``model.effective_potential(k_perp=...)`` or
    :func:`effective_potential`.

    Attributes
    ----------
    form : EffectiveForm
        The sympy data (phase derivative, tortoise derivative, rescaling, V).
    V : sympy expression
        V(x) in the model's coordinate x.
    tortoise_derivative : sympy expression
        dx*/dx.
    tortoise : sympy expression or None
        A closed form of x*(x) where sympy has one.
    x : sympy Symbol
    horizon : float
        Horizon position in x.
    horizon_xstar : float
        -inf: the horizon is at x* -> -infinity.
    limits : (float, float)
        V at the horizon and in the far region.
    far : float
        Position x of the far end (profile uniform to 1e-16).
    kappa : float
        Surface gravity of the model.

    Examples
    --------
    >>> import contourkit as ck
    >>> m = ck.catalogue.nondispersive_flow(kappa=0.05, D=0.5)
    >>> pot = m.effective_potential()
    >>> round(float(pot.transmission(0.01).transmission), 9)
    1.0
    """

    def __init__(self, form, *, far, kappa=None, left=None, scale=None, name=""):
        self.form = form
        self.x = form.x
        self.V = form.potential
        self.tortoise_derivative = form.tortoise_derivative
        self.tortoise = form.tortoise
        self.name = name
        if form.horizon is None:
            if left is None or scale is None or not left < far:
                raise InputError("an equation without horizon needs left < far (uniform ends) and scale "
                                 "(the length over which the coefficients vary)")
            self.horizon, self.horizon_xstar, self.left = None, None, float(left)
            self.kappa = None
            self._ell = float(scale)
        else:
            self.horizon = float(form.horizon)
            self.horizon_xstar = -math.inf
            self.left = None
            self.kappa = float(kappa)
            self._ell = 1.0 / self.kappa
            if not far > self.horizon:
                raise InputError(f"the far end x = {far} must lie beyond the horizon x_H = {self.horizon}")
        self.far = float(far)
        free = (self.V.free_symbols | self.tortoise_derivative.free_symbols) - {self.x}
        if free:
            raise InputError(f"the potential still contains the symbol(s) {', '.join(sorted(map(str, free)))}; "
                             f"give numbers (for example k_perp=0.01) to build the numeric potential")
        self._tabulate()

    # -- tabulation ---------------------------------------------------
    def _tabulate(self):
        x = self.x
        Vf = sp.lambdify(x, self.V, "mpmath")
        hf = sp.lambdify(x, self.tortoise_derivative, "mpmath")
        self._Vmp, self._hmp = Vf, hf
        self._grid = {}
        with mpmath.workdps(_DPS):
            self.V_far = float(mpmath.re(Vf(mpmath.mpf(self.far))))
            if self.horizon is None:
                self.V_horizon = float(mpmath.re(Vf(mpmath.mpf(self.left))))
                self.limits = (self.V_horizon, self.V_far)
                self._sR = self.far / self._ell
                self._extend(self.left / self._ell)
                return
            xh = _refined_horizon(self.form.C, x, self.horizon)
            self._xh_mp = xh
            self.V_horizon = float(mpmath.re(Vf(xh + mpmath.mpf(10) ** -25 * self._ell)))
        self.limits = (self.V_horizon, self.V_far)
        self._sR = math.log((self.far - self.horizon) / self._ell)
        self._extend(-25.0)

    def _values(self, s):
        s = np.asarray(s, dtype=float)
        if self.horizon is not None:
            # away from the horizon double precision loses at most 1e-16/(x - x_H) relative to the
            # horizon's cancellation (c^2 - v^2): tabulate there with numpy, nearer with mpmath
            far = s >= _NUMPY_FROM
            if np.any(far):
                h_n, V_n = self._values_numpy(s[far])
                h_m, V_m = self._values_mp(s[~far])
                return np.concatenate([h_m, h_n]), np.concatenate([V_m, V_n])
        return self._values_mp(s)

    def _values_numpy(self, s):
        if not hasattr(self, "_np_funcs"):
            self._np_funcs = (sp.lambdify(self.x, self.tortoise_derivative, "numpy"),
                              sp.lambdify(self.x, self.V, "numpy"))
        xv = self.x_of_s(s)
        with np.errstate(all="ignore"):
            h = (xv - self.horizon) * np.broadcast_to(np.asarray(self._np_funcs[0](xv), dtype=complex), xv.shape)
            V = np.broadcast_to(np.asarray(self._np_funcs[1](xv), dtype=complex), xv.shape)
        if np.any(np.abs(h.imag) > 1e-12 * np.abs(h)) or np.any(np.abs(V.imag) > 1e-12 * (1 + np.abs(V))):
            return self._values_mp(s)
        h, V = h.real.copy(), V.real.copy()
        if not (np.all(np.isfinite(h)) and np.all(np.isfinite(V))):
            return self._values_mp(s)
        return h, V

    def _values_mp(self, s):
        out_h, out_V = [], []
        with mpmath.workdps(_DPS):
            for sv in s:
                if self.horizon is None:
                    xv = mpmath.mpf(float(sv)) * self._ell
                    h = self._ell * self._hmp(xv)
                else:
                    xv = self._xh_mp + mpmath.exp(mpmath.mpf(float(sv))) * self._ell
                    h = (xv - self._xh_mp) * self._hmp(xv)
                V = self._Vmp(xv)
                if abs(mpmath.im(h)) > 1e-20 * abs(h) or abs(mpmath.im(V)) > 1e-20 * (1 + abs(V)):
                    raise ModelError(f"dx*/dx or V is not real at x = {mpmath.nstr(xv, 8)}; the normal form "
                                     f"needs a real tortoise coordinate on the whole exterior")
                out_h.append(float(mpmath.re(h)))
                out_V.append(float(mpmath.re(V)))
        h, V = np.array(out_h), np.array(out_V)
        if not (np.all(np.isfinite(h)) and np.all(np.isfinite(V))) or np.any(h <= 0):
            bad = s[np.argmax(~np.isfinite(h) | ~np.isfinite(V) | (h <= 0))]
            raise ModelError(f"dx*/dx is not positive and finite (or V not finite) at x = "
                             f"{float(self.x_of_s(bad)):.6g}; the exterior must have no "
                             f"second horizon or singular point up to the far end x = {self.far:g}")
        return h, V

    def _extend(self, s_min):
        """Tabulate ln h and V on [s_min, s_R] (grid step _DS), reusing what is there."""
        if self._grid and self._grid["s"][0] <= s_min:
            return
        s = _grid_points(s_min, self._sR, self.horizon is not None)
        if self._grid:
            old = self._grid["s"]
            new = s[s < old[0] - _DS / 2]
            h_new, V_new = self._values(new)
            s = np.concatenate([new, old])
            h = np.concatenate([h_new, self._grid["h"]])
            V = np.concatenate([V_new, self._grid["V"]])
        else:
            h, V = self._values(s)
        self._grid = {"s": s, "h": h, "V": V}
        self._lnh = CubicSpline(s, np.log(h))
        self._Vs = CubicSpline(s, V)

    # -- coordinates --------------------------------------------------
    def x_of_s(self, s):
        s = np.asarray(s, dtype=float)
        if self.horizon is None:
            return s * self._ell
        return self.horizon + np.exp(s) * self._ell

    def s_of_x(self, x):
        x = np.asarray(x, dtype=float)
        if self.horizon is None:
            if np.any((x < self.left) | (x > self.far)):
                raise InputError(f"x must lie in [{self.left}, {self.far}] (the tabulated interval)")
            return x / self._ell
        if np.any(x <= self.horizon):
            raise InputError(f"x* is defined on the exterior x > x_H = {self.horizon}")
        s = np.log((x - self.horizon) / self._ell)
        self._extend(min(-25.0, float(np.min(s)) - 1))
        return s

    def xstar(self, x):
        """x*(x) by quadrature (numpy array); x* = 0 at x = x_H + 1/kappa (at x = 0 without horizon)."""
        s = self.s_of_x(x)
        anti = self._integral()
        return anti(s) - anti(0.0)

    def _integral(self):
        g = self._grid
        return CubicSpline(g["s"], g["h"]).antiderivative()

    def V_at(self, x):
        """V at positions x on the exterior (numpy array; mpmath-tabulated, spline-interpolated)."""
        s = self.s_of_x(x)
        return np.where(s > self._sR, self.V_far, self._Vs(np.minimum(s, self._sR)))

    # -- transmission -------------------------------------------------
    def _left_end(self, omega, tol):
        """s_L with Born estimate |V - V_h| h / omega below tol (tabulating further in as needed)."""
        if self.horizon is None:
            return self._grid["s"][0]
        s = -8.0
        while True:
            self._extend(s - 6.0)
            dv = abs(float(self._Vs(s)) - self.V_horizon)
            if dv * math.exp(float(self._lnh(s))) <= tol * max(omega, 1e-300) or s < -200:
                return s
            s -= 2.0

    def _solve(self, omega, rtol, shift):
        k = math.sqrt(max(omega ** 2 - self.V_horizon, 0.0))
        q2 = omega ** 2 - self.V_far
        sL = self._left_end(omega, 1e-12) - (shift if self.horizon is not None else 0.0)
        self._extend(sL - 1.0)
        w2 = omega ** 2
        lnh, Vs = self._lnh, self._Vs

        def rhs(s, y):
            h = math.exp(float(lnh(s)))
            return [h * y[1], h * (float(Vs(s)) - w2) * y[0]]
        if q2 > 0:
            q = math.sqrt(q2)
            y0 = [1.0 + 0j, 1j * q]
        else:
            q = 0.0
            y0 = [1.0 + 0j, -math.sqrt(-q2) + 0j]
        sol = solve_ivp(rhs, (self._sR, sL), y0, method="DOP853", rtol=rtol, atol=1e-14 * rtol)
        if not sol.success:
            raise ModelError(f"the integration of the normal form failed at omega = {omega}: {sol.message}")
        psi, p = sol.y[0, -1], sol.y[1, -1]
        if k == 0:
            raise InputError(f"omega = {omega} is at or below the value of V at the left end "
                             f"({self.V_horizon:g}); no wave is incident from there")
        A = (psi + p / (1j * k)) / 2
        B = (psi - p / (1j * k)) / 2
        gamma = (q / k) / abs(A) ** 2
        refl = abs(B) ** 2 / abs(A) ** 2
        return gamma, refl

    def transmission(self, omega, *, rtol=1e-9):
        """Gamma and |R|^2 of the long-wavelength mode, horizon to far region.

        Parameters
        ----------
        omega : float or array_like
            Real frequencies > 0.
        rtol : float, keyword-only
            Integration tolerance (the error estimate reports what was reached).

        Returns
        -------
        ModelTransmission

        Examples
        --------
        >>> import contourkit as ck
        >>> pot = ck.catalogue.nondispersive_flow(kappa=0.05, D=0.5).effective_potential(k_perp=0.05)
        >>> r = pot.transmission([0.03, 0.05])
        >>> bool(r.residual.max() < 1e-8)
        True
        """
        arr = _check_omegas(omega)
        if not (isinstance(rtol, (int, float)) and 1e-13 <= rtol < 1e-2):
            raise InputError(f"rtol must be a number in [1e-13, 1e-2), got {rtol!r}")
        G, R, res, err = (np.zeros(arr.shape) for _ in range(4))
        for i, w in enumerate(arr.ravel()):
            g1, r1 = self._solve(float(w), rtol, 0.0)
            g2, r2 = self._solve(float(w), rtol / 100, 4.0)
            G.flat[i], R.flat[i] = g2, r2
            res.flat[i] = abs(g2 + r2 - 1)
            err.flat[i] = abs(g2 - g1)
        tol = max(100 * rtol, 1e-8)
        success = (err <= tol) & (res <= tol)
        msg = "ok" if np.all(success) else f"accuracy {max(err.max(), res.max()):.1e} not reached {tol:.0e}"
        if not np.all(success):
            warnings.warn(f"transmission: {msg} (some omega); raise rtol or check the potential",
                          AccuracyWarning, stacklevel=2)
        below = arr ** 2 < self.V_far
        if np.any(below):
            msg += (f"; Gamma = 0 exactly below the far region's threshold omega = {math.sqrt(self.V_far):.6g} "
                    f"(no propagating mode there)")
        scalar = np.ndim(omega) == 0
        pick = (lambda a: float(a.reshape(()))) if scalar else (lambda a: a)
        return ModelTransmission(omega=pick(arr), transmission=pick(G), reflection=pick(R), residual=pick(res),
                                 error=pick(err), dps=_DPS, success=bool(success.all()) if scalar else success,
                                 message=msg)

    def quasinormal_modes(self, *, n_max=2, region=None):
        """Quasinormal modes (equal limits of V only); see
        :func:`contourkit.greybody.modelmodes.model_quasinormal_modes`."""
        from .modelmodes import model_quasinormal_modes
        return model_quasinormal_modes(self, n_max=n_max, region=region)

    def bound_states(self, *, rtol=1e-12):
        """Bound states below both limits of V; see
        :func:`contourkit.greybody.modelmodes.model_bound_states`."""
        from .modelmodes import model_bound_states
        return model_bound_states(self, rtol=rtol)

    def plot(self, *, ax=None, **kwargs):
        """V against x*: (Figure, Axes); see :func:`contourkit.plotting.potential_figure`.

        The plotting layer provides it through :mod:`contourkit.symbolic.extensions`
        (loaded on first use).
        """
        return extensions.call("potential_figure", self, ax=ax, **kwargs)

    def __repr__(self):
        where = (f"horizon x={self.horizon:.6g} (x* = -inf)" if self.horizon is not None
                 else f"ends x={self.left:.6g}, {self.far:.6g}")
        return (f"EffectivePotential({self.name or 'model'}: V={sp.sstr(self.V)[:60]},\n"
                f"  {where}, limits=({self.limits[0]:.4g}, {self.limits[1]:.4g}))")


def _refined_horizon(C, x, guess):
    """The zero of C (= c^2 - v^2 for a flow) next to the model's horizon, at _DPS digits."""
    if guess == 0 and sp.simplify(C.subs(x, 0)) == 0:
        return mpmath.mpf(0)
    f = sp.lambdify(x, C, "mpmath")
    try:
        return mpmath.mpf(mpmath.re(mpmath.findroot(f, mpmath.mpf(repr(guess)))))
    except (ValueError, ZeroDivisionError):
        raise ModelError(f"the coefficient of k^2 of the long-wavelength dispersion, {C}, has no zero at the "
                         f"model's horizon x = {guess}; the normal form needs it to vanish there") from None


def _check_omegas(omega):
    try:
        arr = np.asarray(omega, dtype=float)
    except (TypeError, ValueError):
        raise InputError(f"omega must be a real number or an array of real numbers, got {omega!r}") from None
    if np.iscomplexobj(np.asarray(omega)) or arr.size == 0 or not np.all(np.isfinite(arr)) or np.any(arr <= 0):
        raise InputError(f"omega must be finite real numbers > 0, got {omega!r}; the limit omega -> 0 is "
                         f"reached by small omega (the transmission is smooth there)")
    return np.atleast_1d(arr)


def effective_potential(model, *, k_perp=0, far=None):
    """The normal form of the model's long-wavelength equation as a numeric potential.

    Parameters
    ----------
    model : HorizonModel
        A model whose profile joins the horizon to a uniform exterior region.
    k_perp : float, keyword-only
        Transverse wavenumber (see :func:`contourkit.symbolic.effective.effective_form`).
    far : float, keyword-only
        Position of the far end; default: where the profile is uniform to 1e-16
        (relative), the far end of the direct solver's window.

    Returns
    -------
    EffectivePotential

    References
    ----------
    .. [1] F. W. J. Olver, Asymptotics and Special Functions (1974), ch. 6.

    Examples
    --------
    >>> import contourkit as ck
    >>> pot = effective_potential(ck.catalogue.nondispersive_flow(kappa=0.05, D=0.5), k_perp=0.02)
    >>> round(pot.limits[1], 8)      # k_perp^2 (1 - v^2) far out, v = -1/2
    0.0003
    """
    if isinstance(k_perp, sp.Basic) and not k_perp.is_number:
        raise InputError("k_perp must be a number for the numeric potential; use "
                         "contourkit.symbolic.effective.effective_form(model, k_perp=Symbol) for a symbolic one")
    form = effective_form(model, k_perp=k_perp)
    if far is None:
        far = float(model.horizon) + uniform_length(model, "exterior")
    elif isinstance(far, bool) or not isinstance(far, (int, float)) or not math.isfinite(far):
        raise InputError(f"far must be a finite number beyond the horizon, got {far!r}")
    return EffectivePotential(form, far=far, kappa=model.kappa, name=model.name)


def coefficient_potential(A, beta, C, x, *, left, far, scale, a=0, k_perp=0):
    """The normal form of ``(C phi')' + omega (b phi' + b' phi/2) + (a + A omega^2) phi = 0``, no horizon.

    For long-wavelength equations given by their coefficients (``b = -i beta``;
    dispersion ``A omega^2 + beta omega k - C k^2 + a``) on a line whose ends
    ``left`` and ``far`` are uniform, e.g. sound without flow, ``A = 1``,
    ``beta = 0``, ``C = c(x)^2``.

    Parameters
    ----------
    A, beta, C : sympy expressions in x
    x : sympy Symbol
    left, far : float, keyword-only
        Ends of the interval (coefficients uniform there to the accuracy wanted).
    scale : float, keyword-only
        Length over which the coefficients vary (sets the tabulation step 0.01 scale).
    a : sympy expression, keyword-only
        omega-independent term.
    k_perp : float, keyword-only

    Returns
    -------
    EffectivePotential

    Examples
    --------
    >>> import sympy as sp
    >>> x = sp.Symbol("x"); c = 2 + sp.tanh(x)
    >>> pot = coefficient_potential(1, 0, c**2, x, left=-40, far=40, scale=1.0)
    >>> r = pot.transmission(1e-3)
    >>> abs(r.transmission - 4 * 1 * 3 / (1 + 3)**2) < 1e-5     # 4 Z1 Z2/(Z1 + Z2)^2, Z = c
    True
    """
    form = normal_form(sp.sympify(A), sp.sympify(beta), sp.sympify(C), sp.sympify(a), x, k_perp=k_perp,
                       horizon=None, probe=0.5 * (left + far))
    return EffectivePotential(form, far=far, left=left, scale=scale)
