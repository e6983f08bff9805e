"""Spectra: scattering figures over many frequencies, with the geometry followed in omega.

:func:`spectrum` computes the near-horizon S-matrix of
:func:`contourkit.scattering.scatter` at every frequency.  It traces the
geometry once at the lowest frequency and follows it to the next ones
(:mod:`contourkit.scattering.sweep`: the geometry is made of integers that change only
at Stokes lines and coalescences; every followed frequency is checked and
traced afresh if a check fails).  At modest accuracy (rtol >= 1e-10) a
followed frequency is evaluated in numpy extended precision with a
first-order error bound (:mod:`contourkit.scattering.fastpath`), otherwise in mpmath
with the precision escalation of scatter.

References
----------
.. [1] M. V. Berry, Proc. R. Soc. A 422 (1989) 7 (Stokes lines).
.. [2] N. J. Higham, Accuracy and Stability of Numerical Algorithms, 2nd ed.,
   SIAM (2002) (first-order error bounds).
"""
import math
import warnings

import mpmath
import numpy as np

from ..errors import AccuracyWarning, InputError, ScatteringError
from .results import RowTable
from .smatrix import (_finish, _prepare, _result, _scatter, check_dps, check_validity_tol,
                      full_profile_checks)


def _continued(model, family, state, omega, dps, geometry=None):
    """scatter() at omega from a state traced at a nearby frequency (sweep.follow); raises Lost."""
    from .sweep import Lost, follow
    w, target = _prepare(model, omega, dps)
    frame, new, constants = follow(family, state, w)
    n_c = len(state["terms"])
    extra = {"x_exterior": new["sides"][0].X, "x_interior": new["sides"][1].X,
             "geometry": geometry or f"continued from omega = {state['omega']:.17g}"}
    if target <= 10:
        from . import fastpath
        ef = fastpath.ExtFrame(frame)
        data = [fastpath.side_data(frame, ef, side, state["terms"]) for side in new["sides"]]
        out = fastpath.assemble(model, data, n_c, w) if None not in data else None
        if out is not None and out[4] < 1e-11 and out[6] <= 10.0 ** (-target):
            in_modes, out_modes, grow, S, resid, fig, bound = out
            new["omega"] = w
            return _result(w, in_modes, out_modes, S, resid, fig, float(model.kappa), dps, fastpath.DIGITS,
                           extra=dict(extra, arithmetic="numpy extended precision", growing=grow,
                                      target_digits=target), error=max(resid, bound)), new
        if out is not None and out[4] < 1e-6:
            # not accurate enough by its bound: it still serves as the lower of the two precisions
            # that must agree, with the working precision raised by the digits the bound says are lost
            in_modes, out_modes, grow, S, resid, fig, bound = out
            lost = max(0.0, math.log10(bound / fastpath.U)) if bound > 0 else 0.0
            prev = (in_modes, out_modes, grow, mpmath.matrix(S.tolist()), resid, fig, lost)
            start = (prev, target + 10 + int(math.ceil(lost)))
        else:
            start = None
    else:
        start = None
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("error", AccuracyWarning)
            res = _finish(model, constants, n_c, w, target, float(model.kappa), dps, extra, start=start)
    except (ScatteringError, AccuracyWarning, ZeroDivisionError) as e:
        raise Lost(str(e))
    new["omega"] = w
    return res, new


class Spectrum(RowTable):
    """Rows of scattering figures, one per frequency.

    Attributes
    ----------
    rows : list of dict
        Keys: omega, occupation (|beta|^2), thermal_ratio (|beta/alpha|^2),
        effective_temperature, hawking_temperature, temperature_ratio
        (T_eff/T_H), hawking_channel, unitarity_residual, n_in, dps (working
        precision used), error_estimate, success, method, thermal_ratio_error,
        occupation_error, reliable (the validity estimate; None without one),
        message.  effective_temperature and temperature_ratio are None where
        hawking_channel is False (above a cut-off).
    results : list of ScatteringResult
    """

    def __init__(self, rows, results):
        super().__init__(rows)
        self.results = results

    def column(self, key):
        """One column as a numpy array (floats); a masked array where some rows have no value (None).

        Above a cut-off (``hawking_channel`` False) ``effective_temperature``
        and ``temperature_ratio`` are missing; figures leave those rows out.
        """
        vals = super().column(key)
        if any(v is None for v in vals):
            return np.ma.masked_array([0.0 if v is None else float(v) for v in vals],
                                      mask=[v is None for v in vals])
        return np.array([float(v) for v in vals])


def _sweep(args):
    """scatter() at increasing frequencies, following the traced geometry in omega where it can."""
    model, ws, digits, follow, progress = args
    from .sweep import Lost, family as family_of
    family, state, out = None, None, []

    def fast(st, w):
        # the traced frequency itself, evaluated like a followed one (labels from the trace)
        nonlocal family
        try:
            if family is None:
                family = family_of(model)
            return _continued(model, family, st, w, digits, geometry="traced")
        except Lost:
            return None
    if progress:
        try:
            from tqdm import tqdm
            ws = tqdm(ws, desc="spectrum", unit="omega")
        except ImportError:  # pragma: no cover
            pass
    for w in ws:
        res = None
        if state is not None:
            try:
                res, state = _continued(model, family, state, w, digits)
            except Lost:
                res = None
        if res is None:
            keep = {"fast": fast if digits <= 10 else None} if follow else None
            res = _scatter(model, w, digits, keep)
            state = keep.get("state") if follow else None
            if state is not None and family is None:
                try:
                    family = family_of(model)
                except Lost:            # coefficients not polynomial in omega: trace every frequency
                    state = None
        out.append(res)
    return out


def spectrum(model, omegas, *, rtol=1e-12, dps=None, progress=False, workers=1, follow=True, validity_tol=1e-2):
    """Scattering figures over frequencies, correct also for exponentially small |beta|^2.

    Each frequency gets the S-matrix of :func:`scatter`: the geometry is traced
    at the lowest frequency and followed to the next ones (``follow``), and the
    working precision is raised until two precisions agree on the thermal
    ratio and occupation to ``rtol`` (relative).  For ``rtol >= 1e-10`` a
    followed frequency is first evaluated in numpy extended precision
    (:mod:`contourkit.scattering.fastpath`) and kept if its first-order error bound is
    at most ``rtol``.  Each row reports the precision used (``dps``) and the
    error estimate.

    Parameters
    ----------
    model : HorizonModel
    omegas : sequence of positive floats
    rtol : float, relative accuracy requested for thermal_ratio and occupation
    dps : int, optional, number of correct digits (overrides rtol)
    progress : bool, show a progress bar (tqdm, if installed)
    workers : int, number of local processes (default 1; for resumable and
        cluster scans use :func:`contourkit.scans.resumable.scan`)
    follow : bool, follow the traced geometry from one frequency to the next
        (:mod:`contourkit.scattering.sweep`; default True).  Each followed frequency is
        checked (matching, labels, unitarity) and traced afresh if a check
        fails; ``results[i].extra["geometry"]`` says which was done.  False
        traces every frequency (as :func:`scatter` does).
    validity_tol : float in (0, 1) or None, tolerance of ``validity.reliable``
        for models with a full profile (default 1e-2; None: no estimate).  The
        estimate costs at most six full-profile solves per spectrum, spread
        over the frequencies (:mod:`contourkit.profiles.validity`).

    Returns
    -------
    Spectrum

    Examples
    --------
    >>> import contourkit as ck
    >>> spec = ck.catalogue.quartic_flow(kappa=0.05, Lambda=2.5).spectrum([0.02, 0.05])
    >>> [round(r["temperature_ratio"], 3) for r in spec]
    [1.0, 1.0]
    """
    try:
        ws = [float(w) for w in np.atleast_1d(np.asarray(omegas, dtype=float))]
    except (TypeError, ValueError):
        raise InputError(f"omegas must be a sequence of positive numbers, got {omegas!r}")
    if not ws:
        raise InputError("omegas is empty; give at least one frequency")
    if not (isinstance(rtol, (int, float)) and 0 < rtol < 1):
        raise InputError(f"rtol must be a number in (0, 1), got {rtol!r}")
    check_dps(dps)
    check_validity_tol(validity_tol)
    digits = int(dps) if dps is not None else max(1, int(math.ceil(-math.log10(rtol))))
    if isinstance(workers, bool) or not isinstance(workers, (int, np.integer)) or workers < 1:
        raise InputError(f"workers must be a positive integer, got {workers!r}")
    if not isinstance(follow, bool):
        raise InputError(f"follow must be True or False, got {follow!r}")
    order = sorted(range(len(ws)), key=lambda i: ws[i])
    done = [None] * len(ws)
    n = min(int(workers), len(ws))
    chunks = [order[i * len(ws) // n:(i + 1) * len(ws) // n] for i in range(n)]
    if n > 1:
        from concurrent.futures import ProcessPoolExecutor
        with ProcessPoolExecutor(max_workers=n) as pool:
            for idx, res in zip(chunks, pool.map(_sweep, [(model, [ws[i] for i in c], digits, follow, False)
                                                          for c in chunks])):
                for i, r in zip(idx, res):
                    done[i] = r
    else:
        for i, r in zip(order, _sweep((model, [ws[i] for i in order], digits, follow, progress))):
            done[i] = r
    full_profile_checks(model, done, validity_tol)
    rows = []
    for res in done:
        row = res.as_row()
        row["dps"] = res.dps
        row["message"] = res.message
        rows.append(row)
    return Spectrum(rows, done)
