"""Saddle points at position x and their classification.

The saddle points reported to the user are the roots of the local
dispersion relation ``sigma0(k) + x sigma1(k) = 0`` (the Weyl symbol of the
equation at x): away from the horizon they are the WKB wavenumbers.  The
steepest-descent construction uses the critical points of the whole exponent
``i k x + E(k)`` (:func:`critical_points`); they differ from the saddles by
the logarithmic derivative of the amplitude prefactor, O(1/x) away.

Roots are found from the companion matrix (numpy.roots) and polished by
Newton's method in mpmath, so that they are correct to the working
precision.  They are sorted by real part, then imaginary part (rounded to 12
digits), which makes the order deterministic.

References
----------
.. [1] N. Bleistein, R. A. Handelsman, Asymptotic Expansions of Integrals,
   Dover (1986), ch. 7 (saddle points; coalescence of a saddle with another
   saddle or with an endpoint singularity).
"""
import math
import warnings
from dataclasses import dataclass

import mpmath
import numpy as np
import sympy as sp

from ..symbolic._sym import exact, mp_value
from ..errors import CoalescenceWarning, InputError
from ..symbolic._sym import KS as K



def check_x(x):
    """Validate a real position (scalar) and return it as float."""
    if isinstance(x, bool):
        raise InputError(f"x must be a real number, got {x!r}")
    try:
        xv = complex(x)
    except (TypeError, ValueError):
        raise InputError(f"x must be a real number, got {x!r}")
    if not (math.isfinite(xv.real) and math.isfinite(xv.imag)):
        raise InputError(f"x must be finite, got {x!r}; contourkit evaluates solutions at finite positions only")
    if xv.imag != 0:
        raise InputError(f"x must be real, got {x!r}")
    return xv.real


def _sort(roots):
    return np.array(sorted(roots, key=lambda z: (round(z.real, 12), round(z.imag, 12))), dtype=complex)


def polish(coeffs_mp, roots, dps):
    """Newton-polish polynomial roots in mpmath at dps digits; returns mpc list."""
    out = []
    with mpmath.workdps(dps + 10):
        dcoeffs = [c * (len(coeffs_mp) - 1 - i) for i, c in enumerate(coeffs_mp[:-1])]
        for r in roots:
            z = mpmath.mpc(r)
            for _ in range(100):
                p = mpmath.polyval(coeffs_mp, z)
                dp = mpmath.polyval(dcoeffs, z)
                if dp == 0:
                    break
                step = p / dp
                z -= step
                if abs(step) <= mpmath.mpf(10) ** (-dps - 5) * max(1, abs(z)):
                    break
            out.append(z)
    return out


def dispersion_coefficients(rep, x, dps=30):
    """mpmath coefficients (highest first) of sigma0 + x sigma1."""
    s0, s1 = rep.equation.weyl_symbol
    poly = sp.Poly(sp.expand(s0 + exact(x) * s1), K)
    return [mp_value(c, dps) for c in poly.all_coeffs()]


def saddles(rep, x, *, dps=None, warn=True):
    """Saddle points at x: the roots of the local dispersion relation.

    Parameters
    ----------
    rep : KSpaceRepresentation
    x : float
    dps : int, optional
        Digits to which the roots are polished (default 20 for double output).

    Returns
    -------
    numpy array of complex (deterministic order).

    Examples
    --------
    >>> import sympy as sp, contourkit as ck
    >>> x = sp.Symbol("x"); y = sp.Function("y")
    >>> rep = ck.ModeEquation.from_ode(y(x).diff(x, 2) - x*y(x), y, x).fourier()
    >>> rep.saddles(-4.0)
    array([-2.+0.j,  2.+0.j])
    """
    x = check_x(x)
    d = rep._checked_dps(dps) or 20
    coeffs = dispersion_coefficients(rep, sp.Rational(repr(x)), d)
    while len(coeffs) > 1 and coeffs[0] == 0:
        coeffs = coeffs[1:]
    if len(coeffs) < 2:
        return np.zeros(0, dtype=complex)
    rough = np.roots(np.array([complex(c) for c in coeffs]))
    roots = polish(coeffs, rough, d)
    out = _sort([complex(r) for r in roots])
    if warn:
        coalescence_warnings(rep, out)
    return out


@dataclass
class SaddleInfo:
    """A saddle with its classification.

    Attributes
    ----------
    k : complex
    kind : {"real", "complex"}   real or complex wavenumber
    nearest : float              distance to the nearest other saddle or singularity
    """
    k: complex
    kind: str
    nearest: float


def classify(rep, x, *, rtol=1e-9):
    """Saddles at x with their kind (real/complex wavenumber) and separation."""
    s = saddles(rep, x, warn=False)
    scale = max(1.0, float(np.max(np.abs(s)))) if s.size else 1.0
    out = []
    for i, z in enumerate(s):
        others = [abs(z - w) for j, w in enumerate(s) if j != i] + [abs(z - kj) for kj in rep._kj]
        kind = "real" if abs(z.imag) <= rtol * scale else "complex"
        out.append(SaddleInfo(z, kind, min(others) if others else math.inf))
    return out


def coalescence_warnings(rep, s, *, tol=1e-3):
    """Warn (CoalescenceWarning) when saddles, or a saddle and a singular point, nearly meet."""
    scale = max([1.0] + [abs(z) for z in s] + [abs(z) for z in rep._kj])
    for i in range(len(s)):
        for j in range(i + 1, len(s)):
            if abs(s[i] - s[j]) < tol * scale:
                warnings.warn(f"saddles {s[i]:.6g} and {s[j]:.6g} nearly coincide: the plain saddle-point "
                              f"(WKB) picture breaks down here; exact contour values remain valid",
                              CoalescenceWarning, stacklevel=3)
        for kj in rep._kj:
            if abs(s[i] - kj) < tol * scale:
                warnings.warn(f"saddle {s[i]:.6g} nearly coincides with the singular point {kj:.6g}: use the "
                              f"branch-point (Watson) expansion there, not the saddle-point one",
                              CoalescenceWarning, stacklevel=3)


def critical_points(rep, x):
    """Critical points of ``i k x + E(k)`` (x may be complex), double precision, polished."""
    c = rep.critical_polynomial(x)
    c = np.trim_zeros(c, "f")
    if len(c) < 2:
        return np.zeros(0, dtype=complex)
    r = np.roots(c)
    dc = np.polyder(c)
    for _ in range(3):
        d = np.polyval(dc, r)
        ok = d != 0
        r = np.where(ok, r - np.polyval(c, r) / np.where(ok, d, 1), r)
    return _sort(list(r))
