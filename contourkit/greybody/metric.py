"""Radial wave equations of static spherically symmetric metrics.

For ``ds^2 = -f dt^2 + dr^2/f + r^2 dOmega^2`` a field of spin s and
multipole l obeys ``psi_** + (omega^2 - V) psi = 0`` with dr*/dr = 1/f and

    V = f (l(l+1)/r^2 + (1 - s^2) f'/r),

which is the scalar (s = 0), electromagnetic (s = 1) and Regge-Wheeler
(s = 2, axial gravitational perturbations; valid for vacuum metrics only, for
example Schwarzschild) potential.  The object returned is a
:class:`~contourkit.greybody.core.TortoisePotential` in the coordinate r, with
the horizon (outermost simple zero of f) at x* -> -infinity; its transmission
integrates in r and never inverts r*(r).

References
----------
.. [1] T. Regge and J. A. Wheeler, Phys. Rev. 108 (1957) 1063.
.. [2] E. Berti, V. Cardoso and A. O. Starinets, Class. Quantum Grav. 26
   (2009) 163001 (review of quasinormal modes; the potentials above).
"""
import numbers

import mpmath
import numpy as np
import sympy as sp

from ..errors import InputError
from .core import TortoisePotential, _check_symbol, _sympify_expr, substitute_parameters

__all__ = ["radial", "outer_horizon"]


def outer_horizon(f, r):
    """The outermost simple zero of f(r) on r > 0, and f'(r_h).

    Rational f: roots of the numerator; otherwise a scan of r in (1e-6, 1e8)
    for sign changes, refined with mpmath.findroot.
    """
    f = sp.cancel(sp.together(f))
    fp = sp.diff(f, r)
    roots = []
    if f.is_rational_function(r):
        num, _ = sp.fraction(f)
        if num.has(r):
            poly = sp.Poly(sp.expand(num), r)
            for z in poly.nroots(n=30, maxsteps=200):
                z = complex(z)
                if abs(z.imag) < 1e-20 * max(1.0, abs(z)) and z.real > 0:
                    roots.append(sp.Float(z.real, 30))
            # keep exact integers/rationals where they are roots
            exact = [q for q in sp.roots(poly, filter="R") if q.is_positive] if poly.degree() <= 4 else []
            if exact:
                roots = [sp.nsimplify(q) for q in exact]
    else:
        fn = sp.lambdify(r, f, modules="numpy")
        grid = np.logspace(-6, 8, 4000)
        with np.errstate(all="ignore"):
            vals = np.real(np.asarray(fn(grid.astype(complex)), dtype=complex))
        fm = sp.lambdify(r, f, modules="mpmath")
        for i in np.nonzero(np.sign(vals[:-1]) * np.sign(vals[1:]) < 0)[0]:
            with mpmath.workdps(30):
                z = mpmath.findroot(fm, (grid[i], grid[i + 1]), solver="anderson")
            roots.append(sp.Float(mpmath.nstr(z, 30), 30))
    if not roots:
        raise InputError("f has no zero on r > 0: radial() needs a metric with a horizon "
                         "(f = 0 at some r_h > 0, f > 0 beyond it).")
    rh = max(roots, key=lambda q: float(q))
    slope = complex(sp.N(fp.subs(r, rh), 30))
    if not slope.real > 0:
        raise InputError(f"the outermost zero of f at r = {float(rh):.6g} is not simple with f' > 0; "
                         "an extremal horizon has no tortoise coordinate of this kind.")
    return rh, slope.real


def radial(f, r, ell, *, spin=0, parameters=None):
    """Radial equation of a field of spin s on a static spherically symmetric metric.

    Parameters
    ----------
    f : sympy expression
        The metric function of ``-f dt^2 + dr^2/f + r^2 dOmega^2``; f must
        have a simple zero (the horizon) and tend to a positive constant as
        r -> infinity.
    r : sympy Symbol
    ell : int
        Multipole index l >= spin.
    spin : {0, 1, 2}
        0: massless scalar; 1: electromagnetic; 2: Regge-Wheeler (axial
        gravitational perturbations; only valid for vacuum metrics such as
        Schwarzschild, where f = 1 - 2M/r).
    parameters : dict, optional
        Values of the other symbols of f (for example {"M": 1}).

    Returns
    -------
    TortoisePotential
        With V(r), dxstar_dx = 1/f, horizon = r_h, and ``info`` holding
        f, ell and spin.

    References
    ----------
    .. [1] T. Regge and J. A. Wheeler, Phys. Rev. 108 (1957) 1063.

    Examples
    --------
    >>> import sympy as sp
    >>> import contourkit.greybody as gb
    >>> r, M = sp.symbols("r M", positive=True)
    >>> pot = gb.radial(1 - 2*M/r, r, 1, parameters={"M": 1})
    >>> pot.horizon, pot.limits
    (2.0, (0.0, 0.0))
    """
    f = _sympify_expr(f, "f")
    r = _check_symbol(r, "r")
    if isinstance(spin, bool) or not isinstance(spin, numbers.Integral) or spin not in (0, 1, 2):
        raise InputError(f"spin must be 0, 1 or 2 (got {spin!r}); other spins have other radial "
                         "equations.")
    if isinstance(ell, bool) or not isinstance(ell, numbers.Integral) or ell < 0:
        raise InputError(f"ell must be a non-negative integer (got {ell!r}).")
    if ell < spin:
        raise InputError(f"ell must be at least the spin (got ell={ell}, spin={spin}): lower "
                         "multipoles of a spin-s field are not dynamical.")
    (f,) = substitute_parameters([f], parameters, r)
    if not f.has(r):
        raise InputError("f must depend on r (a constant f has no horizon).")
    rh, _ = outer_horizon(f, r)
    l = int(ell)
    V = sp.cancel(sp.together(f * (l * (l + 1) / r ** 2 + (1 - spin ** 2) * sp.diff(f, r) / r)))
    info = {"f": f, "ell": l, "spin": int(spin)}
    pot = TortoisePotential(V, r, sp.cancel(1 / f), horizon=rh, kind="radial", info=info)
    return pot
