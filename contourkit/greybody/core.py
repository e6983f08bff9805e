"""Potentials of 1D wave scattering: ``psi_** + (omega^2 - V) psi = 0``.

:class:`TortoisePotential` holds a potential V given in a coordinate y with
``dx*/dy`` (x* the tortoise coordinate), optionally with a horizon at the left
end (a simple zero of dy/dx* at y = y_h, where x* -> -infinity).  The two
public constructors are :func:`potential` (V in the tortoise coordinate itself)
and :func:`contourkit.greybody.radial` (static spherically symmetric metrics);
a potential derived from a flow model calls the general constructor
``TortoisePotential(V, x, dxstar_dx, horizon=x_H)``.
"""
import math
import numbers

import mpmath
import numpy as np
import sympy as sp

from ..errors import InputError
from ._ends import AsymptoticEnd, HorizonEnd
from ._series import laurent_coefficients, singular_points, taylor_coefficients

__all__ = ["TortoisePotential", "potential"]

_SERIES_DPS = 40
_N_LAURENT = 120
_N_TAYLOR = 400


def _sympify_expr(expr, what):
    if isinstance(expr, str):
        raise InputError(f"{what} must be a sympy expression, not a string; build it with sympy "
                         "(for example V = U0 / sympy.cosh(a*x)**2) or call sympy.sympify yourself.")
    if isinstance(expr, bool) or not isinstance(expr, (sp.Basic, numbers.Number)):
        raise InputError(f"{what} must be a sympy expression (got {type(expr).__name__}).")
    e = sp.sympify(expr)
    if not isinstance(e, sp.Expr):
        raise InputError(f"{what} must be a sympy expression (got {type(e).__name__}).")
    return e


def _check_symbol(x, what="x"):
    if not isinstance(x, sp.Symbol):
        raise InputError(f"{what} must be a sympy Symbol (got {type(x).__name__}); "
                         f"create it with sympy.Symbol('{what}', real=True).")
    return x


def substitute_parameters(exprs, parameters, allowed):
    """Substitute numeric parameters; refuse free symbols other than ``allowed``."""
    subs = {}
    if parameters is not None:
        if not isinstance(parameters, dict):
            raise InputError("parameters must be a dict {symbol or name: number}.")
        names = {}
        for e in exprs:
            for s in e.free_symbols:
                names[s.name] = s
        for key, val in parameters.items():
            sym = key if isinstance(key, sp.Symbol) else names.get(str(key), sp.Symbol(str(key)))
            if isinstance(val, bool) or not isinstance(val, (numbers.Real, sp.Number)) \
                    or not math.isfinite(float(val)):
                raise InputError(f"parameter {key} must be a finite real number (got {val!r}).")
            subs[sym] = sp.nsimplify(val) if isinstance(val, float) and float(val).is_integer() \
                else sp.sympify(val)
    out = [e.subs(subs) for e in exprs]
    free = set()
    for e in out:
        free |= {s for s in e.free_symbols if s != allowed}
    if free:
        names = ", ".join(sorted(s.name for s in free))
        raise InputError(f"the expression has free symbols {names} besides {allowed}; give their "
                         f"values with parameters={{'{sorted(s.name for s in free)[0]}': ...}}.")
    return out


def _exact_number(v):
    """A sympy number for v (integers stay exact, other floats get 30 digits)."""
    if isinstance(v, sp.Basic):
        return v
    if float(v).is_integer():
        return sp.Integer(int(v))
    return sp.Float(v, 30)


def _finite_real(val):
    try:
        v = complex(sp.N(val, 30))
    except (TypeError, ValueError):
        return None
    if not (math.isfinite(v.real) and math.isfinite(v.imag)) or abs(v.imag) > 1e-12 * max(1, abs(v.real)):
        return None
    return v.real


def _numeric_limit(expr, y, sign):
    """Limit at sign*infinity from mpmath values at 1e6 ... 1e30 (None if not convincing)."""
    f = sp.lambdify(y, expr, modules="mpmath")
    with mpmath.workdps(40):
        try:
            vals = [mpmath.mpc(f(sign * mpmath.mpf(10) ** p)) for p in (6, 10, 15, 20, 30)]
        except Exception:
            return None
        if not all(mpmath.isfinite(v) for v in vals):
            return None
        v = vals[-1]
        scale = 1 + abs(v)
        if abs(vals[3] - v) < 1e-25 * scale and abs(vals[2] - vals[3]) < 1e-12 * scale \
                and abs(v.imag) < 1e-25 * scale:
            if abs(v) < 1e-28:
                return sp.Integer(0)
            q = sp.nsimplify(sp.Float(mpmath.nstr(v.real, 32), 32), tolerance=1e-26, rational=True)
            if q.is_Rational and q.q < 10 ** 6:
                return q
            return sp.Float(mpmath.nstr(v.real, 32), 32)
    return None


def end_limit(expr, y, point, what):
    """Limit of expr at an end (numerically at raised precision, else sympy); refuse if not finite.

    Returns (float, sympy number).
    """
    if not expr.has(y):
        val = _finite_real(expr)
        if val is None:
            raise InputError(f"{what} is not a finite real number.")
        return val, expr
    if point in (sp.oo, -sp.oo):
        q = _numeric_limit(expr, y, 1 if point == sp.oo else -1)
        if q is not None:
            return float(q), q
    else:
        try:
            q = expr.subs(y, point)
            if q.is_number and _finite_real(q) is not None:
                return _finite_real(q), q
        except Exception:   # not evaluable by substitution: take the limit below
            pass
    lim = None
    try:
        if point in (sp.oo, -sp.oo):
            lim = sp.limit(expr, y, point)
        else:
            lim = sp.limit(expr, y, point, dir="+")
    except Exception:  # sympy cannot do it
        lim = None
    if lim is not None and not lim.has(sp.Limit) and not isinstance(lim, sp.AccumBounds):
        val = _finite_real(lim)
        if val is not None:
            return val, lim
    raise InputError(f"{what} does not tend to a finite constant (limit: {lim}); the potential "
                     "must have constant limits at both ends.")


class TortoisePotential:
    """A potential for ``psi_** + (omega^2 - V) psi = 0`` (x* the tortoise coordinate).

    Parameters
    ----------
    V : sympy expression
        The potential as a function of the coordinate ``x``.
    x : sympy Symbol
        The coordinate in which V is given.
    dxstar_dx : sympy expression, optional
        dx*/dx as a function of x (1: x is the tortoise coordinate).  Must be
        positive on the domain.
    horizon : number, optional
        Position x_H of a horizon at the left end: dx/dx* has a simple zero
        there and x* -> -infinity.  The domain is then (x_H, infinity);
        without a horizon it is the real line.
    parameters : dict, optional
        Values of the other symbols in V and dxstar_dx.
    kind : str, optional
        A label ("tortoise", "radial", "coordinate", ...).

    Attributes
    ----------
    V, x, dxstar_dx : sympy
    limits : tuple of float
        (V at the left end, V at the right end).
    horizon : float or None
    horizon_xstar : float or None
        -inf where the left end is a horizon, else None.
    V_func, dxstar_dx_func, xstar_func : callables (numpy)
        V(x), dx*/dx and x*(x).
    xstar : sympy expression or None
        x*(x) in closed form where sympy integrates dx*/dx (rational case).

    Notes
    -----
    The ends: an end at infinity whose tail is a rational function uses the
    asymptotic series of the outgoing solution (started where its smallest
    term is below the tolerance); a tail that decays faster than any power is
    neglected beyond a point where its Born estimate is below the tolerance; a
    horizon uses the convergent Frobenius series.  docs/greybody.md has the
    formulas.

    Examples
    --------
    >>> import sympy as sp
    >>> import contourkit.greybody as gb
    >>> x = sp.Symbol("x", real=True)
    >>> pot = gb.TortoisePotential(1 / sp.cosh(x)**2, x)
    >>> pot.limits
    (0.0, 0.0)
    """

    def __init__(self, V, x, dxstar_dx=1, *, horizon=None, parameters=None, kind=None, info=None):
        V = _sympify_expr(V, "V")
        dxs = _sympify_expr(dxstar_dx, "dxstar_dx")
        x = _check_symbol(x)
        V, dxs = substitute_parameters([V, dxs], parameters, x)
        if horizon is not None:
            if isinstance(horizon, bool) or not isinstance(horizon, (numbers.Real, sp.Number)) \
                    or not math.isfinite(float(horizon)):
                raise InputError(f"horizon must be a finite real number (got {horizon!r}).")
        self.V = V
        self.x = x
        self.dxstar_dx = dxs
        self.parameters = dict(parameters or {})
        self.kind = kind or ("tortoise" if dxs == 1 and horizon is None else "coordinate")
        self.info = dict(info or {})
        if dxs == 1:
            D = sp.Integer(1)
        elif dxs.is_rational_function(x):
            D = sp.cancel(1 / dxs)
        else:
            D = 1 / dxs
        self._D = D
        self.horizon = None if horizon is None else float(horizon)
        self._yh_sym = None if horizon is None else _exact_number(horizon)
        self.horizon_xstar = -math.inf if horizon is not None else None
        self._lambdify()
        self._limits()
        self._make_ends()
        self._tortoise()

    # ----------------------------------------------------------------- setup
    def _lambdify(self):
        y = self.x
        D = self._D
        if D == 1:
            VD = self.V
        elif (self.V / D).is_rational_function(y):
            VD = sp.cancel(sp.together(self.V / D))
        else:
            VD = self.V * self.dxstar_dx
        invD = self.dxstar_dx
        f_np = sp.lambdify(y, [invD, VD], modules="numpy")
        self.V_func = np.vectorize(sp.lambdify(y, self.V, modules="numpy"), otypes=[float]) \
            if not self.V.has(y) else sp.lambdify(y, self.V, modules="numpy")
        self._V_np = sp.lambdify(y, self.V, modules="numpy")
        self._D_np = sp.lambdify(y, D, modules="numpy")
        self.dxstar_dx_func = sp.lambdify(y, invD, modules="numpy")
        V_mp = sp.lambdify(y, self.V, modules="mpmath")
        D_mp = sp.lambdify(y, D, modules="mpmath")
        f_mp = sp.lambdify(y, [invD, VD], modules="mpmath")
        self._V_mp, self._D_mp = V_mp, D_mp

        def coef(yv):
            a, b = f_np(yv)
            return complex(a), complex(b)

        def coef_mp(yv):
            a, b = f_mp(yv)
            return mpmath.mpc(a), mpmath.mpc(b)

        self._coef, self._coef_mp = coef, coef_mp

        def coef_vec(yv):
            yv = np.asarray(yv, dtype=complex)
            with np.errstate(all="ignore"):
                a, b = f_np(yv)
            return (np.broadcast_to(np.asarray(a, dtype=complex), yv.shape),
                    np.broadcast_to(np.asarray(b, dtype=complex), yv.shape))
        self._coef_vec = coef_vec

        def Dfun(yv):
            if isinstance(yv, (mpmath.mpc, mpmath.mpf)):
                return mpmath.mpc(D_mp(yv))
            return complex(self._D_np(complex(yv)))
        self._Dfun = Dfun

    def V_at(self, y):
        """V at real coordinate values (numpy array)."""
        y = np.asarray(y, dtype=float)
        with np.errstate(all="ignore"):
            out = np.broadcast_to(np.asarray(self._V_np(y), dtype=complex), y.shape).real
        return np.array(out, dtype=float)

    def _limits(self):
        y = self.x
        VR, self._VR_exact = end_limit(self.V, y, sp.oo, "V at x -> +infinity")
        if self.horizon is None:
            VL, self._VL_exact = end_limit(self.V, y, -sp.oo, "V at x -> -infinity")
            D0L, self._D0L_exact = end_limit(self._D, y, -sp.oo, "dx/dx* at x -> -infinity")
            if not D0L > 0:
                raise InputError("dxstar_dx must tend to a positive constant at x -> -infinity.")
        else:
            VL, self._VL_exact = end_limit(self.V, y, self._yh_sym, "V at the horizon")
        D0R, self._D0R_exact = end_limit(self._D, y, sp.oo, "dx/dx* at x -> +infinity")
        if not D0R > 0:
            raise InputError("dxstar_dx must tend to a positive constant at x -> +infinity "
                             "(for a metric: f must tend to a positive constant).")
        self.limits = (float(VL), float(VR))
        self._D0 = (None if self.horizon is not None else float(D0L), float(D0R))

    def _grid(self, side):
        if self.horizon is not None:
            s0 = max(abs(self.horizon), 1.0)
            if side < 0:
                return self.horizon + s0 * np.logspace(-6, 0, 200)
            return self.horizon + s0 * np.logspace(-6, 8, 700)
        return side * np.concatenate([[0.0], np.logspace(-4, 8, 900)])

    def _make_ends(self):
        y = self.x
        VL, VR = self.limits
        # sample the core
        gR, gL = self._grid(+1), self._grid(-1)
        with np.errstate(all="ignore"):
            vR = self.V_at(gR)
            vL = self.V_at(gL)
            dR = np.real(np.asarray(self._D_np(gR), dtype=complex) * np.ones_like(gR))
        if not (np.all(np.isfinite(vR)) and np.all(np.isfinite(vL))):
            bad = np.concatenate([gR[~np.isfinite(vR)], gL[~np.isfinite(vL)]])
            raise InputError(f"V is not finite at x = {bad[0]:.6g} on the domain; the potential must be "
                             "finite on the whole line (or beyond the horizon).")
        if np.any(dR[1:] <= 0) or not np.all(np.isfinite(dR[1:])):
            raise InputError("dxstar_dx must be finite and positive on the domain (beyond the horizon).")
        amp = max(np.max(np.abs(vR - VR)), np.max(np.abs(vL - (VL if self.horizon is None else VR))), 1e-300)
        self.amplitude = float(amp)
        big = np.abs(vR - VR) > 1e-3 * amp
        yR = float(gR[np.nonzero(big)[0][-1]]) if np.any(big) else float(gR[1] if self.horizon is not None else 0.0)
        if self.horizon is None:
            bigL = np.abs(vL - VL) > 1e-3 * amp
            yL = float(gL[np.nonzero(bigL)[0][-1]]) if np.any(bigL) else 0.0
            scale = max((yR - yL) / 4, 1e-3)
        else:
            yL = self.horizon
            scale = max((yR - yL) / 4, 1e-3 * max(abs(self.horizon), 1.0))
        self.core = (yL, yR)
        self.scale = scale
        self.scale_guess = max(abs(yR), abs(yL), scale, 1.0)
        self.right = self._asymptotic_end(+1, VR, self._VR_exact, self._D0[1], yR, scale)
        if self.horizon is None:
            self.left = self._asymptotic_end(-1, VL, self._VL_exact, self._D0[0], yL, scale)
        else:
            self.left = self._horizon_end(VL)

    def _tail(self, expr, side, y_c):
        """Laurent coefficients of a tail, or None (fast: decays faster than any power)."""
        y = self.x
        c = laurent_coefficients(expr, y, y_c, side, _N_LAURENT, dps=_SERIES_DPS)
        if c is not None:
            return c
        # not rational: accept tails that decay faster than any power (checked numerically)
        f = sp.lambdify(y, expr, modules="mpmath")
        ok = False
        with mpmath.workdps(30):
            try:
                pts = [self.scale_guess * 2 ** j for j in range(4, 12)]
                a = [abs(mpmath.mpc(f(side * mpmath.mpf(p)))) for p in pts]
                # values at the level of the 30-digit rounding (e.g. a polynomial in tanh x that
                # vanishes at tanh x = 1, evaluated where tanh x = 1 - 1e-300) are zero, not a tail
                floor = mpmath.mpf(10) ** -24 * max(1, getattr(self, "amplitude", 1))
                g = [(v if v > floor else mpmath.mpf(0)) * mpmath.mpf(p) ** 8 for v, p in zip(a, pts)]
                ok = all(mpmath.isfinite(v) for v in g) and g[-1] < 1e-20 * max(max(g), 1e-300) \
                    and g[-1] <= g[-2] <= g[-3]
                ok = ok or all(v == 0 for v in g)
            except Exception:
                ok = False
        if not ok:
            raise InputError("the potential's tail at x -> " + ("+" if side > 0 else "-")
                             + "infinity is neither a rational function of x nor faster than any "
                             "power; contourkit cannot give it asymptotic boundary data. Write the "
                             "tail as a rational function (for example l(l+1)/x**2).")
        return None

    def _asymptotic_end(self, side, V_end, V_exact, D0, y_base, scale):
        y = self.x
        y_c = 0.0
        if self.horizon is not None:
            y_c = min(0.0, self.horizon - max(abs(self.horizon), 1.0))
        U = self.V - V_exact
        Uc = self._tail(U, side, _exact_number(y_c))
        if self._D.is_rational_function(y):
            Dc = self._tail(self._D, side, _exact_number(y_c))
        else:
            # the exact limit (a float 5/6 would leave a constant 4e-17 'tail')
            D0_exact = getattr(self, "_D0R_exact" if side > 0 else "_D0L_exact", None)
            D0_exact = _exact_number(D0) if D0_exact is None else D0_exact
            Dc = self._tail(self._D - D0_exact, side, _exact_number(y_c))
        fast = Uc is None or Dc is None
        if Uc is None:
            Uc = [mpmath.mpc(0)]
        if Dc is None:
            Dc = [mpmath.mpc(D0)]
        Uc = [mpmath.mpc(0)] + list(Uc[1:])
        Vnp, Dnp = self._V_np, self._D_np

        floor_V = 4e-16 * (abs(V_end) + getattr(self, "amplitude", 0.0))

        def U_abs(yv):
            # differences at the level of double-precision rounding are no tail (they would stop
            # the Born test at small k forever, e.g. D/D0 - 1 = 1e-16 where D0 = 5/6)
            with np.errstate(all="ignore"):
                du = abs(complex(Vnp(complex(yv))) - V_end)
                dd = abs(complex(Dnp(complex(yv))) / D0 - 1)
            return (du if du > floor_V else 0.0) + (dd if dd > 4e-16 else 0.0)
        return AsymptoticEnd(side, y_c, V_end, Dc, Uc, fast, U_abs, self._Dfun, y_base, scale)

    def _horizon_end(self, V_h):
        y = self.x
        yh = self._yh_sym
        D1 = _finite_real(sp.diff(self._D, y).subs(y, yh))
        Dh = _finite_real(self._D.subs(y, yh))
        if Dh is None or abs(Dh) > 1e-10 or D1 is None or not D1 > 0:
            raise InputError("at the horizon dx/dx* (1/dxstar_dx) must have a simple zero with positive "
                             "slope; check the horizon position and dxstar_dx.")
        pts = singular_points([self._D, self.V], y)
        pts = [p for p in pts if abs(p - self.horizon) > 1e-9 * max(1.0, abs(self.horizon))]
        if pts:
            R = min(abs(p - self.horizon) for p in pts)
        else:
            R = max(abs(self.horizon), 1.0) / 2
        rational = self._D.is_rational_function(y) and self.V.is_rational_function(y)
        radius = 0.8 * R
        Dt = taylor_coefficients(self._D, y, yh, _N_TAYLOR if rational else 80, dps=_SERIES_DPS,
                                 radius=radius, func=self._D_mp)
        Vt = taylor_coefficients(self.V, y, yh, _N_TAYLOR if rational else 80, dps=_SERIES_DPS,
                                 radius=radius, func=self._V_mp)
        Dt[0] = mpmath.mpc(0)
        self.surface_gravity = D1 / 2
        return HorizonEnd(self.horizon, Dt, Vt, R, self._Dfun)

    def _tortoise(self):
        y = self.x
        self.xstar = None
        if self.dxstar_dx == 1:
            self.xstar = y
        elif self.dxstar_dx.is_rational_function(y):
            from sympy.integrals.rationaltools import ratint
            try:
                self.xstar = sp.simplify(ratint(sp.cancel(self.dxstar_dx), y))
            except Exception:
                self.xstar = None
        if self.xstar is not None:
            f = sp.lambdify(y, self.xstar, modules="numpy")

            def xs(v):
                v = np.asarray(v, dtype=complex)
                with np.errstate(all="ignore"):
                    return np.real(np.asarray(f(v), dtype=complex) * np.ones_like(v))
            self.xstar_func = xs
            return
        from scipy.integrate import quad
        ref = self.core[1] if self.horizon is not None else 0.0
        g = lambda t: float(np.real(complex(self.dxstar_dx_func(complex(t)))))

        def xs(v):
            v = np.atleast_1d(np.asarray(v, dtype=float))
            return np.array([quad(g, ref, t, limit=200)[0] for t in v]).reshape(np.shape(v))
        self.xstar_func = xs

    # --------------------------------------------------------------- display
    def __repr__(self):
        hz = "" if self.horizon is None else f", horizon={self.horizon:.6g}"
        return (f"TortoisePotential({self.kind}: V={sp.sstr(self.V)[:60]}, x={self.x}{hz},\n"
                f"  limits=({self.limits[0]:.6g}, {self.limits[1]:.6g}))")

    def plot(self, ax=None, *, num=600, xstar_range=None, **kwargs):
        """Plot V against the tortoise coordinate x*.

        Parameters
        ----------
        ax : matplotlib Axes, optional
        num : int
            Number of points.
        xstar_range : (float, float), optional
            Range of x* shown (default: the core of the potential).
        **kwargs
            Passed to ``ax.plot``.

        Returns
        -------
        (fig, ax)
        """
        if ax is None:
            import matplotlib.pyplot as plt
            fig, ax = plt.subplots(figsize=(6, 4))
        else:
            fig = ax.figure
        yL, yR = self.core
        if self.horizon is not None:
            s0 = max(abs(self.horizon), 1.0)
            ys = self.horizon + s0 * np.logspace(-4, np.log10(max(yR - self.horizon, s0) * 3 / s0), num)
        else:
            w = yR - yL
            ys = np.linspace(yL - 0.5 * w, yR + 0.5 * w, num)
        xs = self.xstar_func(ys)
        vs = self.V_at(ys)
        ax.plot(xs, vs, **kwargs)
        if xstar_range is not None:
            ax.set_xlim(*xstar_range)
        ax.set_xlabel("tortoise coordinate $x_*$")
        ax.set_ylabel("$V$")
        ax.axhline(0.0, color="0.7", lw=0.8)
        return fig, ax

    # ---------------------------------------------------------------- physics
    def transmission(self, omega, *, rtol=1e-10, dps=None):
        """Transmission Gamma and reflection |R|^2 at real frequencies.

        Parameters
        ----------
        omega : float or array_like of float
            Real frequencies (complex ones: use :meth:`quasinormal_modes`).
        rtol : float
            Relative tolerance on Gamma.
        dps : int, optional
            Decimal digits: integrate with mpmath (Gauss-Legendre steps) at
            this precision; values are then mpmath numbers.

        Returns
        -------
        TransmissionResult

        Examples
        --------
        >>> import sympy as sp
        >>> import contourkit.greybody as gb
        >>> x = sp.Symbol("x", real=True)
        >>> res = gb.potential(1 / sp.cosh(x)**2, x).transmission(1.0)
        >>> round(float(res.transmission), 8)
        0.6962282
        """
        from .scattering1d import transmission_sweep
        return transmission_sweep(self, omega, rtol=rtol, dps=dps)

    def quasinormal_modes(self, *, n_max=2, region=None):
        """Quasinormal modes: complex omega, purely outgoing at both ends.

        See :func:`contourkit.greybody.qnm.quasinormal_modes`.
        """
        from .qnm import quasinormal_modes
        return quasinormal_modes(self, n_max=n_max, region=region)

    def bound_states(self, *, rtol=1e-12):
        """Bound states below both limits of V (lowest first).

        See :func:`contourkit.greybody.bound.bound_states`.
        """
        from .bound import bound_states
        return bound_states(self, rtol=rtol)


def potential(V, x, *, parameters=None):
    """A potential given as a sympy expression in the tortoise coordinate.

    Parameters
    ----------
    V : sympy expression
        V(x) with constant (possibly different) finite limits at x -> +-infinity.
    x : sympy Symbol
        The tortoise coordinate.
    parameters : dict, optional
        Values of the other symbols of V.

    Returns
    -------
    TortoisePotential

    Examples
    --------
    >>> import sympy as sp
    >>> import contourkit.greybody as gb
    >>> x = sp.Symbol("x", real=True)
    >>> pot = gb.potential(2 / sp.cosh(x)**2, x)
    >>> pot.limits, pot.horizon_xstar
    ((0.0, 0.0), None)
    """
    return TortoisePotential(V, x, 1, parameters=parameters, kind="tortoise")
