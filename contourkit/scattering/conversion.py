"""Scattering at a dispersive turning point by contours (the profile linearised there).

At a turning point (k_t, x_t) of the full profile (``D = dD/dk = 0``, found by
:func:`contourkit.profiles.turning.turning_points`) the symmetric
coefficients are truncated to first order in ``xi = x - x_t``
(``model.mode_equation(omega, at=x_t)``), exactly as at a sonic horizon.  The
k-space equation of that model has the double saddle k_t at xi = 0; at
``xi = -+X`` (X a few Airy lengths ``l = |D_kk/(2 D_x)|^(1/3)`` away, inside
the region where the linearisation holds) every critical point is a WKB mode
(saddle modes only: the singular points of the linearised model lie away from
the real roots there).  Each basis contour is decomposed into thimbles with
integer and sheet coefficients, each thimble carries its closed-form flux
constant (:mod:`contourkit.scattering.modes`), and the S-matrix is assembled
as for a horizon: no growing mode, unit amplitude on one in-mode at a time.
It holds the reflection of the blocked mode into its partner, the passing
modes, and the anomalous (negative-norm) conversion, all of the linearised
model; pseudo-unitarity is checked, never assumed.

How far it can be trusted: the linearisation at x_t describes the profile
only where ``|xi| << L`` (L: the length over which the profile changes).
The reflection of the blocked mode (``|R| -> 1``) and the passing modes are
local and agree with the full profile where it varies slowly on the Airy
length; the exponentially small couplings (the anomalous, negative-norm
one above all) are set by the complex-x structure of the whole profile, and
those of the linearised model are not the full profile's (measured on a tanh
counter-current of length 5: |beta| about 1e-93 here against 6e-6 from the
direct solver; both exponentially small).  ``X`` is doubled to check that the thimble decomposition
is stable, and the leading-order saddle amplitudes carry relative errors that
fall like a power of ``l/X``.

References
----------
.. [1] NIST DLMF 9.7 (Airy asymptotics at a simple turning point).
.. [2] F. P. Bretherton, C. J. R. Garrett, Proc. R. Soc. A 302 (1968) 529
   (wave action at caustics; flux normalisation).
"""
import math
import types

import mpmath
import numpy as np

from ..errors import AccuracyError, InputError, ScatteringError
from ..geometry.decompose import decompose
from ..symbolic import extensions
from ..symbolic._sym import exact, exact_expr
from ..symbolic.symmetric import linearise
from .modes import DispersionDerivatives
from .oriented import map_result
from .results import ScatteringResult
from .sides import _side_constants, _stable
from .smatrix import in_mode_smatrix


#: the largest working precision the turning-point S-matrix escalates to
MAX_DPS = 4000


def _geometry(rep, contours, X):
    """The decomposition at xi = X, checked against the one at 2X thimble by thimble (sides._stable)."""
    g0, coeffs = decompose(rep, contours, X, descent=False, exact=True, spiral_rays=True)
    g2, cf2 = decompose(rep, contours, 2 * X, descent=False, exact=True, spiral_rays=True)
    if not _stable(rep, g0, coeffs, g2, cf2, exact=True):
        raise ScatteringError(f"the thimble decomposition at the turning point changes between xi = {X:.4g} "
                              f"and {2 * X:.4g} (Stokes phenomenon); give another X=")
    return g0, coeffs


def scatter_turning_point(model, omega, point, *, X=None, dps=60):
    """S-matrix of the linearised model at one dispersive turning point (module docstring).

    Parameters
    ----------
    model : HorizonModel (horizonless or not)
    omega : float > 0
    point : TurningPoint (from ``model.turning_points(omega)``)
    X : float, optional   distance from x_t where the modes are read (default one Airy length)
    dps : int             working precision of the constants and the linear algebra

    Returns
    -------
    ScatteringResult
        ``method="contour (turning point)"``; positions of the modes in the
        user's x; ``extra`` holds x_t, k_t, X and the Airy length.  There is no
        Hawking channel (kappa = 0, thermal_ratio = 0).
    """
    w = float(omega)
    if not (w > 0 and math.isfinite(w)):
        raise InputError(f"omega must be a positive finite frequency, got {omega!r}")
    xt = float(point.x)
    ell = abs(point.d2D_dk2 / (2 * point.dD_dx)) ** (1.0 / 3.0)
    X_given = X is not None
    X = ell if X is None else float(X)
    if not (X > 0 and math.isfinite(X)):
        raise InputError(f"X must be a positive distance, got {X!r}")
    eq = model.mode_equation(w, at=xt)
    rep = eq.fourier()
    contours = rep.basis()
    lin = [(exact_expr(mpmath_free(a)), exact_expr(mpmath_free(b))) for a, b in linearise(model.g, model.x, exact(xt))]
    dd = DispersionDerivatives(types.SimpleNamespace(_lin=lin), w, eq)
    geoms = {}

    def attempt(Xa, work=dps):
        rows = []
        for sign in (+1, -1):
            if sign * Xa not in geoms:
                geoms[sign * Xa] = _geometry(rep, contours, sign * Xa)
            g0, coeffs = geoms[sign * Xa]
            mods, N = _side_constants(rep, contours, dd, (sign * Xa, g0, coeffs, None), work)
            rows += [(md, N) for md in mods]
        ins = [(md, N) for md, N in rows if md.mode.kind == "propagating" and md.mode.direction == "in"]
        outs = [(md, N) for md, N in rows if md.mode.kind == "propagating" and md.mode.direction == "out"]
        grow = [(md, N) for md, N in rows if md.mode.kind == "growing"]
        if len(ins) + len(grow) != len(contours):
            raise ScatteringError(f"mode counting does not close at xi = -+{Xa:.4g}: "
                                  f"{len(ins)} in-modes and {len(grow)} growing modes for {len(contours)} solutions "
                                  f"(for instance a branch on which omega = v k, whose norm changes sign there, "
                                  f"enters from both sides)")
        return ins, outs, grow
    n_c = len(contours)

    def solve(Xa):
        """S at X = Xa; the amplitudes span many decades (sheet factors exp(2 pi |Im nu|)): where the
        solve cancels across them, pseudo-unitarity fails, and the precision rises to the decades spanned."""
        ins, outs, grow = attempt(Xa)
        work = dps
        for _ in range(6):
            with mpmath.workdps(work + 10):
                try:
                    S, resid, lost = in_mode_smatrix(ins, outs, grow, n_c)
                except ZeroDivisionError:
                    S = None
            if S is not None and mpmath.isfinite(resid) and resid < mpmath.mpf(10) ** (-30):
                break
            if work >= MAX_DPS:
                raise ScatteringError(f"the amplitudes span more decades than {MAX_DPS} digits resolve")
            work = min(MAX_DPS, max(work + 20, int(lost) + dps + 20 if S is not None else 2 * work))
            ins, outs, grow = attempt(Xa, work)
        if S is None:
            raise ScatteringError(f"the in-mode system at x_t -+ {Xa:.4g} stays numerically singular up to "
                                  f"{work} digits (its amplitudes span too many decades)")
        if not (mpmath.isfinite(resid) and resid < 1e-3):
            raise ScatteringError(f"the S-matrix is not pseudo-unitary (residual {float(resid):.3g}): the modes "
                                  f"read at x_t -+ {Xa:.4g} are not asymptotic")
        return ins, outs, S, resid, work

    err = None
    for Xtry in ((X,) if X_given else (X, 0.6 * X, 1.5 * X, 0.4 * X)):
        try:
            ins, outs, S, resid, work = solve(Xtry)
            X = Xtry
            break
        except (AccuracyError, ScatteringError) as exc:
            err = exc
    else:
        raise ScatteringError(f"the contour method at the turning point x_t = {xt:.6g} failed at every X tried "
                              f"(last: {err}); give another X= or use contourkit.direct.scatter, which holds "
                              f"for any profile with two uniform regions") from err
    resid = float(resid)
    in_modes, out_modes = [md.mode for md, _ in ins], [md.mode for md, _ in outs]
    for m in in_modes + out_modes:
        m.x = None if m.x is None else float(m.x) + xt
    S_np = np.array([[complex(S[i, j]) for j in range(S.cols)] for i in range(S.rows)])
    ok = resid < 1e-6
    msg = (f"turning point x_t = {xt:.6g}, k_t = {point.k:.6g}; modes read at x_t -+ {X:.4g} "
           f"(Airy length {ell:.4g}); coefficients of the profile linearised at x_t")
    return ScatteringResult(
        omega=w, in_modes=in_modes, out_modes=out_modes, S=S_np, unitarity_residual=resid, hawking_index=None,
        alpha=0j, beta=0j, others={}, thermal_ratio=0.0, occupation=0.0, effective_temperature=0.0,
        hawking_temperature=0.0, kappa=0.0, dps=work, error_estimate=max(resid, (ell / X) ** 1.5),
        success=ok, message=msg, method="contour (turning point)",
        extra={"x_t": xt, "k_t": point.k, "X": X, "airy_length": ell}, convention=getattr(model, "orientation", None))


def scatter_horizonless(model, omega, **kw):
    """S-matrix of a horizonless flow by contours at its one dispersive turning point, in the user's x.

    The contour method works in one orientation: the flow runs towards -x and
    the blocked wave lives on the -x side of the turning point. There the
    amplitudes of the basis span few decades. Every other orientation is
    mapped onto it by parity P (``x -> -x``), time reversal T (complex
    conjugation of the stationary modes: in and out exchanged, norms kept),
    or both (``model.transformed_flow``; ``Orientation.at_turning_point``),
    and the result is mapped back as for horizons
    (:func:`contourkit.scattering.oriented.map_result`):

    * P: wavenumbers, positions and group velocities change sign, and the
      sides exchange, because a horizonless flow's exterior is its
      ``x -> +infinity`` side in the user's x;
    * T: ``S' = eta_in S^T eta_out``, with the user's in-modes the conjugated
      canonical out-modes.

    Parameters
    ----------
    model : HorizonModel
        A horizonless flow.
    omega : float
        The frequency.
    **kw
        Options of :func:`scatter_turning_point`.

    Returns
    -------
    ScatteringResult
        ``validity`` is None, or not reliable (with the reason and a
        ValidityWarning) where the full profile's uniform regions hold other
        in-modes than the linearised turning point
        (:func:`contourkit.profiles.validity.attach_turning`).

    Raises
    ------
    ScatteringError
        Unless the flow has exactly one dispersive turning point at omega.

    Examples
    --------
    >>> import sympy as sp, contourkit as ck
    >>> w, k, x = sp.symbols("omega k x")
    >>> v = sp.Rational(71, 200) + sp.Rational(9, 200) * sp.tanh(x / 5)      # towards +x
    >>> m = ck.HorizonModel.from_dispersion((w - v*k)**2 - k**2 + k**4, omega=w, k=k, x=x, horizon="none",
    ...                                     window=(-250, 250))
    >>> res = m.scatter(0.27)
    >>> res.unitarity_residual < 1e-8
    True
    """
    res = _scatter_horizonless(model, omega, **kw)
    if "turning_point_check" in extensions.provided():       # the full profile's mode content (profiles layer)
        extensions.call("turning_point_check", model, res, stacklevel=6)
    return res


def _scatter_horizonless(model, omega, **kw):
    """scatter_horizonless without the mode-content check: the orientation mapping and the solve."""
    tps = model.turning_points(omega)
    if len(tps) != 1:
        raise ScatteringError(f"this horizonless flow has {len(tps)} dispersive turning points at omega = {omega} "
                              f"({', '.join(f'x = {t.x:.6g}' for t in tps) or 'none'}); the contour method "
                              f"scatters at exactly one; use contourkit.direct.scatter for the full profile")
    o = model.orientation.at_turning_point(tps[0].real_side)
    if o.transform == (1, 1):
        return scatter_turning_point(model, omega, tps[0], **kw)
    can = model.transformed_flow(o.transform)
    ctps = can.turning_points(omega)
    if len(ctps) != 1 or ctps[0].real_side != "-x":
        raise ScatteringError(f"the {'time reverse' if o.time_reversed else 'mirror image'} of this flow has no "
                              f"single turning point in the canonical orientation at omega = {omega}; use "
                              f"contourkit.direct.scatter")
    out = map_result(scatter_turning_point(can, omega, ctps[0], **kw), o)
    sk, sx = o.transform
    out.extra.update(x_t=sx * out.extra["x_t"], k_t=sk * out.extra["k_t"])
    return out


def mpmath_free(e):
    """A sympy expression evaluated to 40-digit decimals (numeric x_t)."""
    import sympy as sp
    return sp.N(e, 40)
