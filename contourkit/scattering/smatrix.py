"""Norm-weighted S-matrix, Bogoliubov coefficients, temperatures and spectra.

For a horizon model and a frequency omega, the near-horizon ModeEquation has
a contour basis (``rep.basis()``, as many contours as the order).  Far from
the horizon on each side every contour is a sum of thimbles with exact
intersection coefficients (integers times sheet factors ``exp(2 pi i m.nu)``,
see decompose.py), and each thimble is one WKB mode carrying ``c`` unit-flux
quanta (modes.py).  So the mode amplitudes of contour C are
``M[j, C] = c_j N[j, C]``, built from integers and analytic constants with
no subtraction of large numbers.  Physical solutions have no growing mode;
for each in-mode the combination with unit amplitude on it and zero on the
other in-modes gives one column of S (out-mode amplitudes).  Conservation of
the norm is checked, never assumed: ``unitarity_residual = max|S^dagger
eta_out S - eta_in|``.

The geometry (thimbles, intersections) is computed in double precision at a
position X on each side where the saddle configuration is asymptotic (it is
checked to be unchanged at 2X); the constants and the linear algebra run in
mpmath at ``dps`` digits (30 by default), so exponentially small
``|beta|^2`` keep their relative accuracy.

Without dispersion (deg Q <= 1 and no dispersive saddles) there are no
dispersive in-modes; the thermal factor then comes from the analytic
structure at large k: the solution analytic in the upper half x-plane behaves
near the horizon like ``(-i x)^(-mu-1)`` with ``mu`` the sum of the exponents,
so its amplitudes on the two sides are in the ratio ``exp(pi Im mu)`` and
``|beta/alpha|^2 = exp(2 pi Im mu) = exp(-2 pi omega/kappa)``.

References
----------
.. [1] S. W. Hawking, Commun. Math. Phys. 43 (1975) 199; W. G. Unruh,
   Phys. Rev. D 14 (1976) 870 (thermal factor from analytic continuation).
.. [2] S. Corley, Phys. Rev. D 57 (1998) 6280; A. Coutant, R. Parentani,
   S. Finazzi, Phys. Rev. D 85 (2012) 024021 (k-space S-matrix of
   dispersive near-horizon flows).
"""
import math
import warnings

import mpmath
import numpy as np

from ..symbolic import extensions
from .bogoliubov import hawking_figures
from ..errors import AccuracyError, AccuracyWarning, ContourError, InputError, ScatteringError
from .modes import DispersionDerivatives
from .sides import _side_constants, _side_geometry
from .results import Mode, ScatteringResult


def _check_omega(omega):
    if isinstance(omega, bool):
        raise InputError(f"omega must be a positive number, got {omega!r}")
    try:
        w = float(omega)
    except (TypeError, ValueError):
        raise InputError(f"omega must be a positive number, got {omega!r}")
    if not math.isfinite(w) or w <= 0:
        raise InputError(f"omega must be a positive finite frequency, got {omega!r}; the spectrum is symmetric "
                         f"under omega -> -omega with complex conjugation, so contourkit takes omega > 0")
    return w


def scatter(model, omega, *, dps=None, validity_tol=1e-2):
    """Near-horizon S-matrix of a horizon model at one frequency.

    Parameters
    ----------
    model : HorizonModel (catalogue models, model files)
    omega : float > 0
    dps : int, optional
        Number of correct significant digits wanted for the S-matrix entries
        (default 16).  The working precision is raised automatically above
        it (the entries of the mode-amplitude matrix span many decades when
        |beta|^2 is exponentially small) until two working precisions agree
        to ``10**-dps``; ``result.dps`` reports the precision used.  The
        geometry is always double precision (it is made of integers).  With
        dps given, thermal_ratio, occupation, alpha and beta are mpmath numbers.
    validity_tol : float in (0, 1) or None
        For a model with a full profile (uniform asymptotic regions), the
        relative deviation from the full profile's thermal ratio and
        occupation below which ``res.validity.reliable`` is True (default
        1e-2); a :class:`~contourkit.errors.ValidityWarning` is issued when
        it is not.  The estimate costs one full-profile solve
        (:mod:`contourkit.profiles.validity`); None skips it.

    Returns
    -------
    ScatteringResult
        ``hawking_channel`` is False above a cut-off of the full profile
        (then thermal_ratio 0.0, effective_temperature None);
        ``validity`` is None for models without a full profile.

    Examples
    --------
    >>> import contourkit as ck
    >>> res = ck.catalogue.quartic_flow(kappa=0.05, Lambda=2.5).scatter(0.05)
    >>> abs(res.effective_temperature / res.hawking_temperature - 1) < 0.01
    True
    >>> res.unitarity_residual < 1e-10
    True
    """
    check_dps(dps)
    check_validity_tol(validity_tol)
    from .oriented import canonical_and_map
    canon, to_user = canonical_and_map(model)
    res = to_user(_scatter(canon, omega, dps, None))
    return full_profile_checks(model, [res], validity_tol)[0]


#: bounds of a requested number of digits (dps=)
DPS_MIN, DPS_MAX = 5, 5000


def check_dps(dps):
    """A user's dps: None or an integer with DPS_MIN <= dps <= DPS_MAX (InputError otherwise)."""
    if dps is None:
        return None
    if isinstance(dps, bool) or not isinstance(dps, (int, np.integer)):
        raise InputError(f"dps must be an integer number of digits ({DPS_MIN} to {DPS_MAX}) or None, got {dps!r}")
    if not DPS_MIN <= dps <= DPS_MAX:
        raise InputError(f"dps = {dps} is outside {DPS_MIN} <= dps <= {DPS_MAX}; ask for between {DPS_MIN} and "
                         f"{DPS_MAX} correct digits (double precision figures need about 16)")
    return int(dps)


def check_validity_tol(tol):
    """validity_tol: None or a number in (0, 1)."""
    if tol is None:
        return None
    if isinstance(tol, bool) or not isinstance(tol, (int, float, np.floating)) or not 0 < tol < 1:
        raise InputError(f"validity_tol must be a number in (0, 1) (the relative deviation from the full "
                         f"profile accepted as reliable, default 1e-2) or None to skip the estimate, got {tol!r}")
    return float(tol)


def full_profile_checks(model, results, validity_tol, stacklevel=7):
    """Cut-off and validity against the full profile, from the profiles layer through the registry.

    ``stacklevel`` 7 points the warnings at the user's ``model.scatter(...)`` or
    ``model.spectrum(...)`` line (through two registry calls).
    """
    if "full_profile" not in extensions.provided():
        return results
    return extensions.call("full_profile", model, results, tolerance=validity_tol, stacklevel=stacklevel)


def _prepare(model, omega, dps):
    """Checked frequency and target digits; warns above the full profile's cut-off."""
    w = _check_omega(omega)
    if dps is not None and (isinstance(dps, bool) or not isinstance(dps, (int, np.integer)) or dps < 1
                            or dps > DPS_MAX):
        raise InputError(f"dps must be an integer number of digits from 1 to {DPS_MAX}, got {dps!r}")
    return w, (int(dps) if dps is not None else 16)


def _scatter(model, omega, dps, keep):
    """scatter(); with a dict ``keep``, the traced geometry is left in keep["state"] for sweep.follow.

    ``keep["fast"]``, if given, is called as ``fast(state, omega)`` and may
    return ``(result, state)`` instead of the mpmath evaluation (None: declined).
    """
    from ..symbolic.horizon import HorizonModel
    if not isinstance(model, HorizonModel):
        raise InputError(f"scatter needs a horizon model (catalogue, model file or HorizonModel), got "
                         f"{type(model).__name__}; for a bare ModeEquation use rep.evaluate, "
                         f"contourkit.scattering.modes or contourkit.scattering.continuation_ratio")
    w, target = _prepare(model, omega, dps)
    user_dps = dps
    eq = model.mode_equation(w)
    rep = eq.fourier()
    kappa = float(model.kappa)
    if rep.degree_Q < 2:
        return _nondispersive(model, rep, w, kappa, max(target, 20), user_dps)
    contours = rep.basis()
    dd = DispersionDerivatives(model, w, eq)
    try:
        sides = (_side_geometry(rep, contours, dd, +1, kappa), _side_geometry(rep, contours, dd, -1, kappa))
    except (AccuracyError, ContourError) as exc:
        # the geometry's own advice names positions x that scatter chooses itself
        raise ScatteringError(f"the near-horizon geometry at omega = {w:g} could not be traced "
                              f"({str(exc).split(';')[0]}); scatter chooses the positions itself, so try a "
                              f"slightly different omega, or contourkit.direct.scatter for a full profile") from exc
    if keep is not None and keep.get("fast") is not None:
        # a spectrum at modest accuracy: labels once, then the caller's fast evaluation (spectra.py)
        mods = [_side_constants(rep, contours, dd, sd, target + 10)[0] for sd in sides]
        state = _state(rep, contours, sides, mods)
        if state is not None:
            state["omega"] = w
            out = keep["fast"](state, w)
            if out is not None:
                res, keep["state"] = out
                return res
    last = {}

    def constants(d):
        last["e"] = _side_constants(rep, contours, dd, sides[0], d)
        last["i"] = _side_constants(rep, contours, dd, sides[1], d)
        return (*last["e"], *last["i"])
    res = _finish(model, constants, len(contours), w, target, kappa, user_dps,
                  {"x_exterior": sides[0][0], "x_interior": sides[1][0], "geometry": "traced"})
    if keep is not None:
        keep["state"] = _state(rep, contours, sides, (last["e"][0], last["i"][0]))
        if keep["state"] is not None:
            keep["state"]["omega"] = w
    return res


def _state(rep, contours, sides, mods):
    """The traced geometry in the form that sweep.follow continues in omega (None if it cannot)."""
    from .sweep import SideState
    if any(kind == "half" for C in contours for _, kind, _ in C.terms) or any(e.size for e in rep._ess):
        return None
    out = []
    for (X, g0, coeffs, lab), md in zip(sides, mods):
        out.append(SideState(X, g0.xg, [t.sigma for t in g0.thimbles], [t.plus.logs[0] for t in g0.thimbles],
                             md, coeffs, lab))
    return {"kj": rep._kj.copy(), "q0": rep._Q[0], "sides": out, "terms": [C.terms for C in contours]}


def _finish(model, constants, n_c, w, target, kappa, user_dps, extra, start=None):
    """Escalate the working precision until two agree, then build the result.

    ``start = (prev, work)``: a result at a lower precision (same tuple as
    _assemble's) to compare the first evaluation at ``work`` digits with.
    """
    prev, work = start if start is not None else (None, target + 10)
    for _ in range(8):
        cur = _assemble(model, constants, n_c, w, work)
        if prev is not None and _settled(prev, cur, target, work):
            break
        prev = cur
        work += max(10, int(cur[6]))
    else:
        raise ScatteringError(f"the S-matrix at omega = {w} did not settle to {target} digits up to working "
                              f"precision {work}")
    in_modes, out_modes, grow, S, resid, fig, lost = cur
    S_np = np.array([[complex(S[i, j]) for j in range(S.cols)] for i in range(S.rows)])
    return _result(w, in_modes, out_modes, S_np, float(resid), fig, kappa, user_dps, work,
                   extra=dict(extra, S_mp=[[S[i, j] for j in range(S.cols)] for i in range(S.rows)],
                              digits_lost=lost, growing=grow, target_digits=target))


def _settled(prev, cur, target, work):
    """Two working precisions agree: Hawking-row figures relatively, S absolutely (floor 10^-target)."""
    with mpmath.workdps(work + 10):
        tol = mpmath.mpf(10) ** (-target)
        for key in ("occupation", "thermal_ratio"):
            a, b = prev[5][key], cur[5][key]
            if b != 0 and abs(a - b) > tol * abs(b):
                return False
        Sa, Sb = prev[3], cur[3]
        scale = max(abs(Sb[i, j]) for i in range(Sb.rows) for j in range(Sb.cols))
        return all(abs(Sa[i, j] - Sb[i, j]) <= tol * max(abs(Sb[i, j]), scale)
                   for i in range(Sb.rows) for j in range(Sb.cols))


def _assemble(model, constants, n_c, w, dps):
    """Modes, S-matrix and figures at working precision dps; constants(dps) -> (modes_e, N_e, modes_i, N_i)."""
    mod_e, Ne, mod_i, Ni = constants(dps)
    rows = [(md, Ne) for md in mod_e] + [(md, Ni) for md in mod_i]
    ins = [(md, N) for md, N in rows if md.mode.kind == "propagating" and md.mode.direction == "in"]
    outs = [(md, N) for md, N in rows if md.mode.kind == "propagating" and md.mode.direction == "out"]
    grow = [(md, N) for md, N in rows if md.mode.kind == "growing"]
    if len(ins) + len(grow) != n_c:
        raise ScatteringError(f"mode counting does not close: {len(ins)} in-modes and {len(grow)} growing modes "
                              f"for {n_c} independent solutions at omega = {w}; is omega beyond a cut-off "
                              f"(model.omega_max) or at a coalescence?")
    with mpmath.workdps(dps + 10):
        try:
            S, resid, lost = in_mode_smatrix(ins, outs, grow, n_c)
        except ZeroDivisionError:
            raise ScatteringError(f"the in-mode amplitudes of the contour basis are degenerate at omega = {w}")
        in_modes = [md.mode for md, _ in ins]
        out_modes = [md.mode for md, _ in outs]
        Sobj = np.array([[S[i, j] for j in range(S.cols)] for i in range(S.rows)], dtype=object)
        fig = hawking_figures(Sobj, in_modes, out_modes, mpmath.mpf(w), mpmath.mpf(model.kappa))
    return in_modes, out_modes, [md.mode for md, _ in grow], S, resid, fig, lost


def in_mode_smatrix(ins, outs, grow, n_c):
    """S-matrix from the mode amplitudes of a contour basis (at the caller's mpmath precision).

    ``ins``, ``outs``, ``grow``: (mode data, coefficient matrix N) pairs of the
    in-, out- and growing modes, amplitude ``constant * N[index, c]`` in
    contour c.  For each in-mode the combination with unit amplitude on it,
    zero on the other in-modes and no growing mode gives one column of S.

    Returns
    -------
    (S, resid, lost)
        The mpmath matrix S, the pseudo-unitarity residual
        ``max|S^dagger eta_out S - eta_in|`` and the decimal digits spanned by
        the nonzero amplitudes (a measure of cancellation).  ZeroDivisionError
        when the amplitudes are degenerate.
    """
    A = mpmath.matrix(n_c, n_c)
    for r, (md, N) in enumerate(ins):
        for c in range(n_c):
            A[r, c] = md.constant * N[md.index, c]
    for r, (md, N) in enumerate(grow):
        for c in range(n_c):
            A[len(ins) + r, c] = N[md.index, c]
    nz = [abs(A[i, j]) for i in range(n_c) for j in range(n_c) if A[i, j] != 0]
    lost = float(mpmath.log10(max(nz) / min(nz))) if nz else 0.0
    rhs = mpmath.matrix(n_c, len(ins))
    for j in range(len(ins)):
        rhs[j, j] = 1
    X = _solve_equilibrated(A, rhs)
    S = mpmath.matrix(len(outs), len(ins))
    for o, (md, N) in enumerate(outs):
        for j in range(len(ins)):
            S[o, j] = mpmath.fsum(md.constant * N[md.index, c] * X[c, j] for c in range(n_c))
    eta_in = [md.mode.norm for md, _ in ins]
    eta_out = [md.mode.norm for md, _ in outs]
    M = S.H * mpmath.diag(eta_out) * S - mpmath.diag(eta_in)
    resid = max(abs(M[i, j]) for i in range(M.rows) for j in range(M.cols))
    return S, resid, lost


def _solve_equilibrated(A, rhs):
    """Solve A X = rhs after scaling rows and columns to unit size (entries span many decades)."""
    n = A.rows
    rs = [max(abs(A[i, j]) for j in range(n)) or 1 for i in range(n)]
    B = mpmath.matrix(n, n)
    for i in range(n):
        for j in range(n):
            B[i, j] = A[i, j] / rs[i]
    cs = [max(abs(B[i, j]) for i in range(n)) or 1 for j in range(n)]
    for i in range(n):
        for j in range(n):
            B[i, j] /= cs[j]
    R = mpmath.matrix(n, rhs.cols)
    for i in range(n):
        for j in range(rhs.cols):
            R[i, j] = rhs[i, j] / rs[i]
    try:
        Y = mpmath.inverse(B) * R
    except (ZeroDivisionError, TypeError) as exc:
        # mpmath's LU raises ZeroDivisionError for a numerically singular matrix, or a TypeError when a
        # whole pivot column cancels to zero at the working precision
        raise ZeroDivisionError("the in-mode system is numerically singular at this precision") from exc
    for i in range(n):
        for j in range(rhs.cols):
            Y[i, j] /= cs[i]
    return Y


def _result(w, in_modes, out_modes, S, resid, fig, kappa, user_dps, dps, extra, message="", error=None):
    def conv(v):
        if user_dps is not None:
            return mpmath.mpmathify(v)
        return float(v) if not isinstance(v, (complex, mpmath.mpc)) else complex(v)
    ok = resid < 1e-11
    msg = message or ("converged" if ok else f"unitarity residual {resid:.3g} is larger than expected")
    if not ok:
        warnings.warn(f"S-matrix at omega = {w}: {msg}", AccuracyWarning, stacklevel=3)
    return ScatteringResult(
        omega=w, in_modes=in_modes, out_modes=out_modes, S=S, unitarity_residual=resid,
        hawking_index=fig["hawking_index"], alpha=conv(fig["alpha"]), beta=conv(fig["beta"]),
        others={k: complex(v) for k, v in fig["others"].items()},
        thermal_ratio=conv(fig["thermal_ratio"]), occupation=conv(fig["occupation"]),
        effective_temperature=conv(fig["effective_temperature"]),
        hawking_temperature=kappa / (2 * math.pi), kappa=kappa, dps=dps,
        error_estimate=error if error is not None else max(resid, 10.0 ** (-extra.get("target_digits", 16))),
        success=ok, message=msg, method="contour", extra=extra)


def _nondispersive(model, rep, w, kappa, dps, user_dps):
    """Thermal factor from the large-k exponent (no dispersive in-modes exist)."""
    with mpmath.workdps(dps + 10):
        nus = rep.mp_data(dps)[2]
        mu = mpmath.fsum(nus)
        if abs(mpmath.re(mu) + 1) > mpmath.mpf(10) ** (-12):
            raise ScatteringError(f"the large-k exponent {complex(mu):.6g} has real part != -1: the model is not "
                                  f"a self-adjoint non-dispersive horizon")
        ratio = mpmath.exp(2 * mpmath.pi * mpmath.im(mu))          # |beta/alpha|^2
        alpha = 1 / mpmath.sqrt(1 - ratio)
        beta = mpmath.sqrt(ratio) * alpha
        S = mpmath.matrix([[alpha, beta], [beta, alpha]])
        eta = [1, -1]
        M = S.H * mpmath.diag(eta) * S - mpmath.diag(eta)
        resid = max(abs(M[i, j]) for i in range(2) for j in range(2))
        in_modes = [Mode("exterior", "in", 1, "propagating", 0j, origin="horizon (positive Kruskal frequency)"),
                    Mode("interior", "in", -1, "propagating", complex(-w), origin="horizon (positive Kruskal frequency)")]
        out_modes = [Mode("exterior", "out", 1, "propagating", 0j, origin="branch point"),
                     Mode("interior", "out", -1, "propagating", complex(-w), origin="branch point")]
        Sobj = np.array([[S[i, j] for j in range(2)] for i in range(2)], dtype=object)
        fig = hawking_figures(Sobj, in_modes, out_modes, mpmath.mpf(w), mpmath.mpf(model.kappa))
    S_np = np.array([[complex(S[i, j]) for j in range(2)] for i in range(2)])
    return _result(w, in_modes, out_modes, S_np, float(resid), fig, kappa, user_dps, dps,
                   extra={"large_k_exponent": complex(mu)},
                   message="non-dispersive horizon: no dispersive in-modes; |beta/alpha|^2 from the large-k "
                           "exponent (analytic continuation through the upper half x-plane)")


def continuation_ratio(eq, point, *, through="upper", x=2000.0):
    """Amplitude ratio of a long-wavelength wave continued past x = 0 through a half-plane.

    For equations whose only valley at infinity comes from exp(i k x)
    (deg Q <= 1: Budden-type, non-dispersive horizons), a solution analytic in
    the upper (lower) half x-plane is the loop around the branch point k_b
    entered from the direction that rotates with x.  Far from x = 0 it is the
    single wave ``exp(i k_b x)`` times a power on both sides; the function
    returns ``|amplitude at -x| / |amplitude at +x|`` from exact contour values
    at x, 2x (Richardson extrapolation in 1/x removes the first correction).

    Parameters
    ----------
    eq : ModeEquation
    point : the branch point k_b
    through : {"upper", "lower"}  the half x-plane of the continuation
    x : float > 0                 position at which the amplitudes are compared

    Examples
    --------
    >>> import sympy as sp, contourkit as ck, math
    >>> X = sp.Symbol("x"); y = sp.Function("y")
    >>> eq = ck.ModeEquation.from_ode(X*y(X).diff(X, 2) + (X + 1)*y(X), y, X)   # Budden, b = 1
    >>> r = continuation_ratio(eq, -1)
    >>> abs(r - math.exp(-math.pi / 2)) < 1e-5
    True
    """
    if through not in ("upper", "lower"):
        raise InputError(f"through must be 'upper' or 'lower', got {through!r}")
    from ..geometry.contours import Contour
    rep = eq.fourier()
    if rep.degree_Q >= 2:
        raise ScatteringError("this equation has valleys of its own at infinity; continuation past x = 0 is "
                              "not needed, use scatter() on a horizon model")
    x = float(x)
    if not (x > 0 and math.isfinite(x)):
        raise InputError(f"x must be a positive finite position, got {x!r}")
    # the entry direction rotates from +pi/2 (x > 0) to -pi/2 (x < 0) clockwise through the upper
    # half x-plane, counter-clockwise (to +3pi/2) through the lower one
    th_neg = -math.pi / 2 if through == "upper" else 3 * math.pi / 2
    from ..geometry.contours import _reduce
    sheet = round((th_neg - _reduce(-math.pi / 2, rep.cut_angle)) / (2 * math.pi))
    pos = Contour.loop(point)
    neg = Contour.loop(point, sheet=sheet)
    vals = []
    for X in (x, 2 * x):
        a = abs(complex(rep.evaluate(pos, X)))
        b = abs(complex(rep.evaluate(neg, -X)))
        vals.append(b / a)
    return 2 * vals[1] - vals[0]
