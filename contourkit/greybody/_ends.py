"""Boundary data at the two ends of a 1D scattering problem.

An end supplies, for a wave number k = sqrt(omega^2 - V_end), two local
solutions at a start point: ``out`` (moving away from the potential, towards
the end: exp(+i k x*) at the right end, exp(-i k x*) at the left end or into a
horizon) and ``in`` (the same with k -> -k).  For Im k > 0, ``out`` decays
towards the end.  States are (psi, dpsi/dx*).  With ``with_phase`` (real k)
the solutions are flux-normalised, |psi| -> 1 at the end; without it the
exponential factor is dropped (the solution is then an analytic function of k
up to a non-vanishing factor, as the quasinormal-mode search needs).
"""
import cmath
import math

import mpmath
import numpy as np

from ..errors import AccuracyError
from ._series import eval_frobenius, eval_outgoing, frobenius_series, outgoing_series

__all__ = ["AsymptoticEnd", "HorizonEnd"]


def _num(x, mp):
    return mpmath.mpc(x) if mp else complex(x)


class AsymptoticEnd:
    """An end y -> side * infinity.

    Parameters
    ----------
    side : {+1, -1}
    y_c : float
        Y = side * (y - y_c) is the local coordinate of the Laurent series.
    V_end : float
    Dc, Uc : list of mpc
        Laurent coefficients of D and of U = V - V_end in 1/Y.  For a fast
        tail (faster than any power) Dc = [D0] and Uc = [0].
    fast : bool
        True if the tails are treated as negligible beyond the start point
        (no power-law part).
    U_abs : callable
        |U(y)| + |D(y)/D0 - 1| (numeric, for the start-point test of fast tails).
    y_base : float
        Outermost point where U is not negligible (start of the march).
    scale : float
        Length scale of the potential's core.
    """

    kind = "asymptotic"

    def __init__(self, side, y_c, V_end, Dc, Uc, fast, U_abs, D_func, y_base, scale):
        self.side = side
        self.y_c = y_c
        self.V_end = V_end
        self.Dc_mp = Dc
        self.Uc_mp = Uc
        self.Dc = [complex(c) for c in Dc]
        self.Uc = [complex(c) for c in Uc]
        self.D0 = self.Dc[0].real
        self.fast = fast
        self.power_law = any(abs(c) > 0 for c in self.Uc[1:]) or any(abs(c) > 0 for c in self.Dc[1:])
        self.coulomb = abs(self.Uc[1]) > 0 if len(self.Uc) > 1 else False
        self.U_abs = U_abs
        self.D_func = D_func
        self.y_base = y_base
        self.scale = scale

    # ----------------------------------------------------------------- series
    def _coeffs(self, k, nmax, mp):
        if mp:
            return outgoing_series(mpmath.mpc(k), self.Dc_mp, self.Uc_mp, nmax)
        return outgoing_series(complex(k), self.Dc, self.Uc, nmax)

    def state(self, k, y, *, tol, with_phase, mp=False, nmax=80, which="out"):
        """(psi, dpsi/dx*) of the out (or in) solution at y, and the series error."""
        kk = k if which == "out" else -k
        sigma, c = self._coeffs(kk, nmax if self.power_law else 2, mp)
        if mp:
            Y = self.side * (mpmath.mpc(y) - self.y_c)
        else:
            Y = self.side * (complex(y) - self.y_c)
        D0 = self.Dc_mp[0] if mp else self.Dc[0]
        u, uY, rel, ok = eval_outgoing(kk, sigma, c, D0, Y, tol)
        if with_phase:
            rho = Y / D0 + sigma * (mpmath.log(Y) if mp else cmath.log(Y))
            ph = mpmath.exp(1j * kk * rho) if mp else cmath.exp(1j * kk * rho)
            u, uY = u * ph, uY * ph
        Dy = self.D_func(y)
        return (u, Dy * self.side * uY), rel, ok

    def start_point(self, k, tol, direction=1.0, base=None):
        """A point y = base + t * side * direction beyond which the data are exact to tol.

        ``direction`` (complex, |direction| = 1) rotates the path for complex
        frequencies; ``base`` defaults to the outer edge of the potential's core.
        """
        e = self.side * complex(direction)
        y_base = self.y_base if base is None else base
        ak = abs(k)
        t = max(self.scale, 1e-300)
        if not self.fast or self.power_law:
            t = max(t, 20.0 / max(ak, 1e-300) if self.power_law else t)
            for _ in range(60):
                y = y_base + t * e
                _, rel, ok = self.state(k, y, tol=tol, with_phase=False)
                if ok and self._tail_ok(k, y, tol, e, None, y_base):
                    return y
                t *= 2.0
            raise AccuracyError("no start point found where the asymptotic series of the "
                                f"{'right' if self.side > 0 else 'left'} end is accurate to {tol:g}; "
                                "omega may be too small for this tail, or the tail is not a power series.")
        prev = None
        for _ in range(200):
            y = y_base + t * e
            if self._tail_ok(k, y, tol, e, prev, y_base):
                return y
            prev = (t, self.U_abs(y))
            t *= 1.5
        raise AccuracyError("the potential does not approach its limit fast enough at the "
                            f"{'right' if self.side > 0 else 'left'} end to start the integration; "
                            "give a potential with a rational (power-law) or exponentially small tail.")

    def _tail_ok(self, k, y, tol, e, prev=None, y_base=None):
        if not self.fast:
            return True
        a = self.U_abs(y)
        if not np.isfinite(a):
            return False
        if a == 0.0:
            return True
        ak = max(abs(k), 1e-300)
        # decay length from the previous sample (Born estimate of the neglected tail)
        ell = self.scale
        if prev is not None and prev[1] > a > 0:
            t = abs(complex(y) - (self.y_base if y_base is None else y_base))
            ell = max(min((t - prev[0]) / math.log(prev[1] / a), 10 * t), 1e-300)
        eps = a * ell * (1.0 / ak + ell)
        return eps < 1e-3 * tol


class HorizonEnd:
    """A horizon at y_h (the left end, x* -> -infinity).

    Parameters
    ----------
    y_h : float
    Dt, Vt : list of mpc
        Taylor coefficients of D and V about y_h (Dt[0] = 0, Dt[1] = 2 kappa).
    R_conv : float
        Distance to the nearest other singular point of the equation.
    D_func : callable
    """

    kind = "horizon"
    side = -1

    def __init__(self, y_h, Dt, Vt, R_conv, D_func):
        self.y_h = y_h
        self.Dt_mp, self.Vt_mp = Dt, Vt
        self.Dt = [complex(c) for c in Dt]
        self.Vt = [complex(c) for c in Vt]
        self.V_end = self.Vt[0].real
        self.kappa = self.Dt[1].real / 2
        self.R_conv = R_conv
        self.D_func = D_func
        self.fast = False
        self.power_law = False
        self.coulomb = False

    def state(self, k, y, *, tol, with_phase, mp=False, nmax=None, which="out"):
        """(psi, dpsi/dx*) of the ingoing (out) or outgoing (in) horizon solution at y."""
        kk = k if which == "out" else -k
        x = (mpmath.mpc(y) if mp else complex(y)) - self.y_h
        Dt = self.Dt_mp if mp else self.Dt
        Vt = self.Vt_mp if mp else self.Vt
        cap = len(Dt) - 3
        n = min(nmax or 60, cap)
        while True:
            r, a = frobenius_series(mpmath.mpc(kk) if mp else complex(kk), Dt, Vt, n)
            u, ux, rel, ok = eval_frobenius(r, a, x, tol)
            if ok or n >= cap:
                break
            n = min(2 * n, cap)
        if with_phase:
            ph = mpmath.exp(r * mpmath.log(x)) if mp else cmath.exp(r * cmath.log(x))
            u, ux = u * ph, ux * ph
        return (u, self.D_func(y) * ux), rel, ok

    def start_point(self, k, tol, direction=1.0, base=None):
        """y_h + delta, inside the disc of convergence of the horizon series."""
        delta = 0.5 * self.R_conv
        for _ in range(30):
            y = self.y_h + delta
            _, rel, ok = self.state(k, y, tol=tol, with_phase=False)
            if ok:
                return y
            delta *= 0.5
        raise AccuracyError("the horizon series does not converge at any start point; "
                            "the horizon may not be a simple zero of f (dy/dx*).")
