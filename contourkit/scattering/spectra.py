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

This module is the contour method's core: :func:`follow_rows` (the following
loop, one block of frequencies), :func:`result_row` and the :class:`Spectrum`
table.  ``model.spectrum`` is the general engine built on it
(:func:`contourkit.scans.engine.spectrum`, one layer up: both methods, files
and resumption, progress, Dask); the :func:`spectrum` here is the in-memory
contour-only form.  Both run local workers that end with their parent
(:mod:`.processes`).

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

from ..errors import AccuracyWarning, ContourkitError, InputError, ScatteringError
from .processes import local_pool
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
    """Rows of scattering figures, one per frequency, in the order of the grid.

    Attributes
    ----------
    rows : list of dict
        Keys (docs/vocabulary.md): omega, occupation (|beta|^2), thermal_ratio
        (|beta/alpha|^2), effective_temperature, hawking_temperature,
        temperature_ratio (T_eff/T_H), unitarity_residual, n_in, dps (working
        precision used), error_estimate, success, method, message; more keys
        (validity, hawking_channel) where the engine provides them.  A
        frequency recorded as failed (``on_error="record"``) has None values
        and its error in ``message``.
    results : list of ScatteringResult or None
        None for a failed row and for rows resumed from a file.
    path : str or None
        The CSV file the rows were written to (``out=``), else None.
    computed, resumed : int
        Rows computed by this call and rows read back from an earlier run.
    fingerprint : dict or None
        The run fingerprint written into the file (see :mod:`contourkit.scans.fingerprint`).
    """

    def __init__(self, rows, results, *, path=None, computed=None, resumed=0, fingerprint=None):
        super().__init__(rows)
        self.results = list(results)
        self.path = path
        self.computed = len(self.rows) - resumed if computed is None else computed
        self.resumed = resumed
        self.fingerprint = fingerprint

    def column(self, key):
        """One column as a numpy array of floats (NaN marks a failed row's missing value)."""
        return np.array([np.nan if v is None else float(v) for v in super().column(key)])

    def __repr__(self):
        from .display import spectrum_repr
        return spectrum_repr(self)

    def _repr_html_(self):
        from .display import spectrum_html
        return spectrum_html(self)


def _one_line(text):
    return " ".join(str(text).split())


def follow_rows(model, ws, digits, *, follow=True, record=False, on_result=None):
    """scatter() at increasing frequencies, following the traced geometry in omega where it can.

    The geometry is traced at the first frequency and followed to the next
    ones; a frequency where following fails is traced afresh.  With
    ``record`` a frequency whose S-matrix cannot be built gives
    ``(None, message)`` and the next frequency is traced afresh; otherwise
    the :class:`~contourkit.errors.ContourkitError` propagates.

    Parameters
    ----------
    model : HorizonModel
    ws : list of float, increasing
    digits : int, correct digits wanted
    follow : bool
    record : bool
    on_result : callable, optional
        Called with ``(index, result_or_None, error_or_None)`` as each frequency finishes.

    Returns
    -------
    list of (ScatteringResult or None, str or None)
    """
    from .sweep import Lost, family as family_of
    from .oriented import canonical_and_map
    model, to_user = canonical_and_map(model)
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
    for i, w in enumerate(ws):
        res, err = None, None
        try:
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
        except ContourkitError as exc:
            if not record:
                raise
            res, err, state = None, _one_line(f"{type(exc).__name__}: {exc}"), None
        if res is not None:
            res = to_user(res)
        out.append((res, err))
        if on_result is not None:
            on_result(i, res, err)
    return out


def _sweep(args):
    model, ws, digits, follow, record = args
    return follow_rows(model, ws, digits, follow=follow, record=record)


def result_row(res, error=None, *, omega=None):
    """The table row of one frequency: the result's figures, or None values and the error."""
    if res is None:
        return {"omega": float(omega), "occupation": None, "thermal_ratio": None, "effective_temperature": None,
                "hawking_temperature": None, "temperature_ratio": None, "unitarity_residual": None,
                "n_in": None, "dps": None, "error_estimate": None, "success": False, "method": None,
                "message": error or ""}
    row = res.as_row()
    row["dps"] = res.dps if res.dps is not None else row.get("dps")
    row["message"] = res.message
    return row


def spectrum(model, omegas, *, rtol=1e-12, dps=None, workers=1, follow=True, on_error="raise",
             validity_tol=1e-2):
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
    workers : int, number of local processes (default 1).  ``model.spectrum``
        is the general engine (:func:`contourkit.scans.engine.spectrum`: files,
        resumption, progress, the direct method); this function is its
        contour-method core.
    follow : bool, follow the traced geometry from one frequency to the next
        (:mod:`contourkit.scattering.sweep`; default True).  Each followed frequency is
        checked (matching, labels, unitarity) and traced afresh if a check
        fails; ``results[i].extra["geometry"]`` says which was done.  False
        traces every frequency (as :func:`scatter` does).
    on_error : {"raise", "record"}
        "record": a frequency whose S-matrix cannot be built gives a row with
        None values, ``success = False`` and the error in ``message``; the
        other frequencies are computed.
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
    >>> from contourkit.scattering.spectra import spectrum
    >>> spec = spectrum(ck.catalogue.quartic_flow(kappa=0.05, Lambda=2.5), [0.02, 0.05])
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
    if on_error not in ("raise", "record"):
        raise InputError(f"on_error must be 'raise' or 'record', got {on_error!r}")
    record = on_error == "record"
    order = sorted(range(len(ws)), key=lambda i: ws[i])
    done = [None] * len(ws)
    n = min(int(workers), len(ws))
    chunks = [order[i * len(ws) // n:(i + 1) * len(ws) // n] for i in range(n)]
    if n > 1:
        with local_pool(n) as pool:
            for idx, res in zip(chunks, pool.map(_sweep, [(model, [ws[i] for i in c], digits, follow, record)
                                                          for c in chunks])):
                for i, r in zip(idx, res):
                    done[i] = r
    else:
        for i, r in zip(order, _sweep((model, [ws[i] for i in order], digits, follow, record))):
            done[i] = r
    ok = [res for res, _ in done if res is not None]
    full_profile_checks(model, ok, validity_tol)
    rows = [result_row(res, err, omega=w) for w, (res, err) in zip(ws, done)]
    return Spectrum(rows, [res for res, _ in done])
