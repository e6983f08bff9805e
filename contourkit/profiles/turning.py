"""Dispersive turning points of a full profile: where two real roots of the dispersion relation meet.

At frequency omega a dispersive turning point is a real pair (k_t, x_t) with

    D(omega, k_t; x_t) = 0,   dD/dk (omega, k_t; x_t) = 0,   k_t != 0,

i.e. a double real root of the local dispersion relation: two WKB modes
(group velocities of opposite sign along x) merge there and turn into a
complex pair on the other side.  A wave that reaches it is reflected into
its partner; in a counter-current this is the blocking point of the
short-wavelength mode.  The search follows the number of real roots of
``D(omega, k; x)`` on a grid of x over the window and refines every change
by Newton's method in the two real unknowns (k, x) at 40 digits.  Near the
turning point ``D ~ D_x (x - x_t) + D_kk (k - k_t)^2 / 2``: an Airy
equation, whose connection gives total reflection at leading order
(common practice).

References
----------
.. [1] F. P. Bretherton, C. J. R. Garrett, Proc. R. Soc. A 302 (1968) 529
   (wave action at caustics and blocking).
.. [2] NIST DLMF 9.7 (Airy asymptotics: the connection at a simple turning point).

Examples
--------
>>> import sympy as sp, contourkit as ck
>>> w, k, x = sp.symbols("omega k x")
>>> v = -sp.Rational(71, 200) - sp.Rational(9, 200) * sp.tanh(x / 5)
>>> m = ck.HorizonModel.from_dispersion((w - v*k)**2 - k**2 + k**4, omega=w, k=k, x=x, horizon="none")
>>> tps = m.turning_points(0.27)
>>> len(tps), tps[0].real_side
(1, '-x')
"""
from dataclasses import dataclass, field

import mpmath
import numpy as np
import sympy as sp

from ..errors import InputError, ScatteringError
from .planewaves import OMEGA, X, local_modes, local_roots
from ..symbolic._sym import KS, exact


@dataclass
class TurningPoint:
    """A dispersive turning point of the full profile at one frequency.

    Attributes
    ----------
    x, k : float         position and wavenumber of the double root
    omega : float
    dD_dx, d2D_dk2 : float   the local Airy form ``D ~ dD_dx (x - x) + d2D_dk2 (k - k)^2/2``
    real_side : {"-x", "+x"}  side on which the two merging roots are real
    modes : list of Mode  the two merging modes, read 1% of the local scale away on the real side
    residual : float     max(|D|, |dD/dk|) at (k, x), relative to the scale of D
    success : bool
    message : str
    """
    x: float
    k: float
    omega: float
    dD_dx: float
    d2D_dk2: float
    real_side: str
    modes: list = field(default_factory=list)
    residual: float = 0.0
    success: bool = True
    message: str = ""

    def __repr__(self):
        return (f"TurningPoint(x={self.x:.6g}, k={self.k:.6g}, omega={self.omega:.6g}, real on {self.real_side}, "
                f"residual={self.residual:.1e})")


def _functions(model, w):
    D = sp.expand(model.dispersion.subs(OMEGA, exact(w)))
    Dk = sp.diff(D, KS)
    fs = [sp.lambdify((KS, X), e, "mpmath") for e in (D, Dk, sp.diff(D, X), sp.diff(Dk, KS), sp.diff(Dk, X))]
    return fs


def _newton(fs, k0, x0):
    D, Dk, Dx, Dkk, Dkx = fs
    k, x = mpmath.mpf(k0), mpmath.mpf(x0)
    for _ in range(100):
        F1, F2 = D(k, x), Dk(k, x)
        a, b, c, d = Dk(k, x), Dx(k, x), Dkk(k, x), Dkx(k, x)
        det = a * d - b * c
        if det == 0:
            return None
        dk, dx = (F1 * d - b * F2) / det, (a * F2 - c * F1) / det
        k, x = k - dk, x - dx
        if abs(dk) < mpmath.mpf(10) ** -30 * (1 + abs(k)) and abs(dx) < mpmath.mpf(10) ** -30 * (1 + abs(x)):
            return k, x
    return None


def turning_points(model, omega, *, window=None, points=2001, real_tol=1e-9):
    """Dispersive turning points on the real axis at frequency omega (module docstring).

    Parameters
    ----------
    model : HorizonModel (horizonless or not; the full profile is used)
    omega : float > 0
    window : (a, b), optional   search interval (default: the model's window)
    points : int                grid size of the search
    real_tol : float            a root with ``|Im k| <= real_tol max|k|`` counts as real

    Returns
    -------
    list of TurningPoint, sorted by x.  Sonic points (k_t = 0) are not listed.
    """
    try:
        w = float(omega)
    except (TypeError, ValueError):
        raise InputError(f"omega must be a positive number, got {omega!r}")
    if not (w > 0 and np.isfinite(w)):
        raise InputError(f"omega must be a positive finite frequency, got {omega!r}")
    a, b = (float(v) for v in (window or model.window))
    if not a < b:
        raise InputError(f"window must be (a, b) with a < b, got {window!r}")
    xs = np.linspace(a, b, int(points))

    def real_roots(xv):
        r = local_roots(model, w, float(xv))
        scale = max(float(np.max(np.abs(r))), 1e-300)
        return np.sort(r[np.abs(r.imag) <= real_tol * scale].real)
    counts = [len(real_roots(xv)) for xv in xs]
    fs = _functions(model, w)
    out = []
    with mpmath.workdps(40):
        for i in range(len(xs) - 1):
            if counts[i] == counts[i + 1]:
                continue
            inner, outer = (i, i + 1) if counts[i] > counts[i + 1] else (i + 1, i)
            rr = real_roots(xs[inner])
            # the two real roots closest to each other are the pair that merges
            if len(rr) < 2:
                continue
            j = int(np.argmin(np.diff(rr)))
            k0 = 0.5 * (rr[j] + rr[j + 1])
            sol = _newton(fs, k0, 0.5 * (xs[i] + xs[i + 1]))
            if sol is None:
                continue
            kt, xt = sol
            if abs(kt) < 1e-12 or not (a <= xt <= b):
                continue                # a sonic point (k = 0), or outside the window
            scale = max(abs(complex(c)) for c in sp.Poly(model.dispersion_at(w, float(xt)).as_expr(), KS).all_coeffs())
            res = float(max(abs(fs[0](kt, xt)), abs(fs[1](kt, xt))) / scale)
            side = "+x" if xs[inner] > float(xt) else "-x"
            xb = float(xt) + (1 if side == "+x" else -1) * 1e-2 * max(1.0, abs(float(xt)) * 1e-2)
            near = [md for md in local_modes(model, w, xb, "exterior" if side == "+x" else "interior")
                    if md.propagating]
            near.sort(key=lambda md: abs(md.k.real - float(kt)))
            tp = TurningPoint(x=float(xt), k=float(kt), omega=w, dD_dx=float(fs[2](kt, xt)),
                              d2D_dk2=float(fs[3](kt, xt)), real_side=side, modes=near[:2], residual=res,
                              success=res < 1e-20, message="double real root refined by Newton's method at 40 digits")
            if not any(abs(tp.x - q.x) < 1e-9 * (1 + abs(q.x)) and abs(tp.k - q.k) < 1e-9 * (1 + abs(q.k))
                       for q in out):
                out.append(tp)
    if not all(t.success for t in out):
        raise ScatteringError("a turning point did not converge to a double root; refine points=")
    return sorted(out, key=lambda t: t.x)
