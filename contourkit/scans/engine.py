"""The spectrum engine behind ``model.spectrum`` and ``contourkit spectrum``.

One function, :func:`spectrum`, computes the scattering figures of a horizon
model on a frequency grid by either method, in memory or into a resumable
CSV table, serially, on local worker processes or on a Dask cluster.

How the work is cut
-------------------
The grid (in the order given) is cut into blocks of :func:`block_length`
consecutive rows; the block length depends on the number of frequencies
only.  With the contour method each block traces the geometry at its lowest
frequency and follows it in omega through the block
(:func:`contourkit.scattering.spectra.follow_rows`); blocks are independent,
so they run in parallel (``workers``, ``scheduler``), and every row is the
same whichever worker computed it.  With the direct method every frequency
is solved on its own.

Files and resumption
--------------------
With ``out`` each row is written the moment it and every row before it are
known (:mod:`contourkit.scans.table`: a fingerprint line, the header, rows
in grid order).  Running the same call again on the file keeps its rows and
restarts the following at the start of the block that holds the first
missing row; the rows of that block that are already in the file are
recomputed (to follow the geometry from the same start) but not written
again, so the finished file is the same, byte for byte, as that of an
uninterrupted run.  A file written by another run (another model, grid,
method or accuracy option, see :mod:`contourkit.scans.fingerprint`) is
refused with a :class:`~contourkit.scans.table.RunMismatchError` naming the
difference; ``restart=True`` empties it first.

Examples
--------
>>> import contourkit as ck
>>> m = ck.catalogue.nondispersive_flow(kappa=0.05)
>>> spec = m.spectrum([0.01, 0.02, 0.03])
>>> [round(r["temperature_ratio"], 9) for r in spec]
[1.0, 1.0, 1.0]
"""
import math
import os
import sys
import threading
import warnings

import numpy as np

from ..errors import ContourkitError, InputError
from ..profiles.validity import has_full_profile
from ..scattering.smatrix import check_validity_tol, full_profile_checks
from ..scattering.spectra import Spectrum, follow_rows, result_row
from ..symbolic.horizon import HorizonModel
from .fingerprint import fingerprint
from .table import COLUMNS, Table, read_run

# mpmath's precision is one setting per process; blocks computed in threads of one
# process (Dask workers with several threads) take turns.
_PRECISION_LOCK = threading.Lock()
METHODS = ("contour", "direct")


def block_length(n):
    """Rows per block of a grid of n frequencies: ceil(n/4), at least 8 and at most 64."""
    return min(64, max(8, math.ceil(n / 4)))


def _one_line(text):
    return " ".join(str(text).split())


def _clean(v):
    if isinstance(v, float) and not math.isfinite(v):
        return None
    return v


def make_row(model, omega, res, error, notes=()):
    """The table row (the fields of :data:`~contourkit.scans.table.COLUMNS`) of one frequency."""
    row = result_row(res, error, omega=omega)
    if row.get("hawking_temperature") is None and isinstance(getattr(model, "kappa", None), (int, float)):
        row["hawking_temperature"] = float(model.kappa) / (2 * math.pi)
    row["hawking_channel"] = getattr(res, "hawking_channel", None) if res is not None else None
    val = getattr(res, "validity", None) if res is not None else None
    for key in ("reliable", "thermal_ratio_error", "occupation_error"):
        v = getattr(val, key, None) if val is not None else None
        row[key] = bool(v) if key == "reliable" and v is not None else (float(v) if v is not None else None)
    row["message"] = _one_line("; ".join([m for m in [row.get("message") or ""] + list(notes) if m]))
    return {c: _clean(row.get(c)) for c in COLUMNS}


def _notes(caught):
    return sorted({_one_line(f"{w.category.__name__}: {w.message}") for w in caught})


def run_block(model, ws, method, options, record, on_row=None):
    """The rows of one block (run in worker processes too).

    Returns
    -------
    (rows, results, warnings, error)
        ``warnings``: (category, text) pairs to re-emit in the caller;
        ``error``: the ContourkitError that stopped the block (rows before it
        are returned), or None.
    """
    rows, results, seen, error = [None] * len(ws), [None] * len(ws), [], None
    with _PRECISION_LOCK, warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        mark = [0]

        def fresh():
            new = caught[mark[0]:]
            mark[0] = len(caught)
            seen.extend((w.category, str(w.message)) for w in new)
            return _notes(new)

        def done(i, res, err, notes=None):
            notes = fresh() if notes is None else notes
            rows[i] = make_row(model, ws[i], res, err, notes)
            results[i] = res
            if on_row is not None:
                on_row(i, rows[i], res)

        try:
            if method == "contour" and isinstance(model, HorizonModel):
                order = sorted(range(len(ws)), key=lambda i: ws[i])
                if not (options.get("validity_tol") is not None and has_full_profile(model)):
                    follow_rows(model, [ws[i] for i in order], options["digits"], follow=options["follow"],
                                record=record, on_result=lambda j, res, err: done(order[j], res, err))
                else:
                    held = []
                    try:
                        follow_rows(model, [ws[i] for i in order], options["digits"], follow=options["follow"],
                                    record=record,
                                    on_result=lambda j, res, err: held.append((order[j], res, err, fresh())))
                    finally:
                        # cut-off and validity against the full profile, once per block (profiles
                        # layer), then the block's rows in the order they finished
                        full_profile_checks(model, [h[1] for h in held if h[1] is not None],
                                            options.get("validity_tol"))
                        fresh()          # the block's validity warnings: re-issued once by the caller
                        for i, res, err, notes in held:
                            done(i, res, err, notes)
            else:
                if method == "direct":
                    from ..profiles import direct
                    solve = lambda w: direct.scatter(model, w, **options["direct"])  # noqa: E731
                else:
                    solve = lambda w: model.scatter(w, dps=options["digits"])  # noqa: E731
                for i, w in enumerate(ws):
                    try:
                        res, err = solve(w), None
                    except ContourkitError as exc:
                        if not record:
                            raise
                        res, err = None, _one_line(f"{type(exc).__name__}: {exc}")
                    done(i, res, err)
        except ContourkitError as exc:
            error = exc
    if error is not None:           # rows in grid order up to the failing one
        n = next((i for i, r in enumerate(rows) if r is None), len(rows))
        rows, results = rows[:n], results[:n]
    return rows, results, seen, error


def _run_block_task(args):
    return run_block(*args)


def _bar(progress, total, initial):
    if progress is None:
        progress = hasattr(sys.stderr, "isatty") and sys.stderr.isatty()
    if not progress:
        return None
    from tqdm import tqdm
    return tqdm(total=total, initial=initial, desc="spectrum", unit="row", file=sys.stderr, dynamic_ncols=True)


def _check(omegas, method, on_error, workers, scheduler, rtol, dps, follow, restart, out):
    if method not in METHODS:
        raise InputError(f"method must be 'contour' or 'direct', got {method!r}")
    if on_error not in ("raise", "record"):
        raise InputError(f"on_error must be 'raise' or 'record', got {on_error!r}")
    try:
        ws = [float(w) for w in np.atleast_1d(np.asarray(omegas, dtype=float))]
    except (TypeError, ValueError):
        raise InputError(f"omegas must be a sequence of positive numbers, got {omegas!r}") from None
    if not ws:
        raise InputError("omegas is empty; give at least one frequency")
    bad = [w for w in ws if not (math.isfinite(w) and w > 0)]
    if bad:
        raise InputError(f"the frequencies must be positive and finite, got {bad[0]!r}")
    if workers is not None and (isinstance(workers, bool) or not isinstance(workers, (int, np.integer))
                                or workers < 1):
        raise InputError(f"workers must be a positive integer, got {workers!r}")
    if scheduler is not None and workers is not None:
        raise InputError("give workers or scheduler, not both (a Dask cluster has its own workers)")
    if rtol is not None and (isinstance(rtol, bool) or not isinstance(rtol, (int, float)) or not 0 < rtol < 1):
        raise InputError(f"rtol must be a number in (0, 1), got {rtol!r}")
    if dps is not None and (isinstance(dps, bool) or not isinstance(dps, (int, np.integer)) or not 1 <= dps <= 5000):
        raise InputError(f"dps must be an integer from 1 to 5000, got {dps!r}")
    for name, v in (("follow", follow), ("restart", restart)):
        if not isinstance(v, bool):
            raise InputError(f"{name} must be True or False, got {v!r}")
    if out is not None and not isinstance(out, (str, os.PathLike)):
        raise InputError(f"out must be a file path, got {type(out).__name__}")
    return ws


def spectrum(model, omegas, *, method="contour", on_error="raise", workers=None, scheduler=None, out=None,
             progress=None, restart=False, rtol=None, dps=None, follow=True, direct_options=None,
             validity_tol=1e-2):
    """Scattering figures over a frequency grid: one engine for every front end.

    Parameters
    ----------
    model : HorizonModel
    omegas : sequence of float
        Frequencies > 0; the rows keep this order.
    method : {"contour", "direct"}
        "contour": the near-horizon S-matrix (:func:`contourkit.scattering.scatter`)
        with the geometry followed in omega; "direct": the full-profile
        solver (:func:`contourkit.direct.scatter`).
    on_error : {"raise", "record"}
        "raise": the first frequency that fails stops the run with its
        error (rows before it are kept in ``out``); "record": it gets a row
        with None values, ``success = False`` and the error in ``message``,
        and the other frequencies are computed.
    workers : int, optional
        Local worker processes (default 1: this process).  Workers end with
        their parent (:mod:`contourkit.scans.workers`).
    scheduler : str, optional
        Address of a Dask scheduler (``tcp://host:8786``), instead of workers.
    out : str or os.PathLike, optional
        CSV table written row by row and resumed when it exists (see the
        module docstring); without it the rows are kept in memory.
    progress : bool, optional
        Progress bar on stderr (rows done, resumed, failed, time left);
        default: when stderr is a terminal.
    restart : bool
        Empty ``out`` first instead of resuming it.
    rtol : float, optional
        Relative accuracy of thermal_ratio and occupation (contour default
        1e-12; direct default 1e-10, the solver's own).
    dps : int, optional
        Contour method: correct digits of each S-matrix (overrides rtol).
    follow : bool
        Contour method: follow the geometry in omega (default True).
    direct_options : dict, optional
        Further keyword options of :func:`contourkit.direct.scatter`.
    validity_tol : float in (0, 1) or None
        Contour method, models with a full profile: tolerance of each row's
        validity estimate (``reliable``, ``thermal_ratio_error``,
        ``occupation_error``; :mod:`contourkit.profiles.validity`), default
        1e-2; None skips the estimate.  It costs at most six full-profile
        solves per block of the grid, and the rows of a block are written
        when the block's estimate is done.

    Returns
    -------
    Spectrum
        ``rows`` in grid order (docs/vocabulary.md for the names),
        ``results`` (None for rows resumed from ``out`` and failed rows),
        ``path``, ``computed``, ``resumed``, ``fingerprint``.  Warnings of
        each row are in its ``message`` and are issued once each.

    Raises
    ------
    InputError
        Bad frequencies or options.
    RunMismatchError
        ``out`` holds rows of another run (the message names what differs).
    ScanError
        ``out`` is not a spectrum table, is being written by another run, or
        the Dask scheduler cannot be reached.

    Examples
    --------
    >>> import contourkit as ck
    >>> m = ck.catalogue.quartic_flow(kappa=0.05, Lambda=2.5)
    >>> spec = m.spectrum([0.02, 0.05], rtol=1e-8)
    >>> [round(r["temperature_ratio"], 2) for r in spec]
    [1.0, 1.0]
    """
    ws = _check(omegas, method, on_error, workers, scheduler, rtol, dps, follow, restart, out)
    if direct_options is not None and not isinstance(direct_options, dict):
        raise InputError(f"direct_options must be a dict of keyword options, got {direct_options!r}")
    if method == "contour":
        r = 1e-12 if rtol is None else rtol
        digits = int(dps) if dps is not None else max(1, int(math.ceil(-math.log10(r))))
        check_validity_tol(validity_tol)
        options = {"digits": digits, "follow": follow, "validity_tol": validity_tol}
        fp_options = {"rtol": r, "dps": dps, "follow": follow, "validity_tol": validity_tol}
    else:
        opts = dict(direct_options or {})
        if rtol is not None:
            opts["rtol"] = rtol
        options = {"direct": opts}
        fp_options = {"direct": {k: repr(v) for k, v in sorted(opts.items())}}
    n, B = len(ws), block_length(len(ws))
    fp_options["block"] = B
    fp = fingerprint(model, ws, method=method, options=fp_options)
    record = on_error == "record"
    table = Table(out, fp, restart=restart) if out is not None else None
    try:
        have = list(table.rows) if table else []
        if len(have) > n or [r["omega"] for r in have] != ws[:len(have)]:
            from .table import RunMismatchError
            raise RunMismatchError(f"{out} holds rows that are not the first rows of this grid; start it afresh "
                                   f"with --restart (restart=True in Python), or give another output file")
        resumed = len(have)
        rows, results = list(have), [None] * resumed
        failed = [sum(1 for r in have if not r["success"])]
        bar = _bar(progress, n, resumed)
        if bar is not None:
            bar.set_postfix(resumed=resumed, failed=failed[0], refresh=False)

        def put(row, res):
            if table:
                table.write(_format(row))
            rows.append(row)
            results.append(res)
            failed[0] += not row["success"]
            if bar is not None:
                bar.set_postfix(resumed=resumed, failed=failed[0], refresh=False)
                bar.update(1)

        first = resumed // B
        tasks = [(model, ws[b * B:(b + 1) * B], method, options, record) for b in range(first, math.ceil(n / B))]
        skip = resumed - first * B
        seen = []
        try:
            _execute(tasks, put, skip, seen, workers=workers, scheduler=scheduler)
        finally:
            if bar is not None:
                bar.close()
            for cat, text in dict.fromkeys(seen):
                warnings.warn(text, cat, stacklevel=3)
    finally:
        if table:
            table.close()
    if table:
        rows = read_run(out)[1]
    return Spectrum(rows, results, path=None if out is None else os.fspath(out), computed=n - resumed,
                    resumed=resumed, fingerprint=fp)


def _format(row):
    from .table import format_line
    return format_line(row)


def _deliver(out, put, skip, seen):
    rows, results, warned, error = out
    seen.extend(warned)
    for i, (row, res) in enumerate(zip(rows, results)):
        if i >= skip:
            put(row, res)
    if error is not None:
        raise error


def _execute(tasks, put, skip, seen, *, workers, scheduler):
    """Run the blocks in order (serially, on local workers or on Dask); rows go to put in grid order."""
    if not tasks:
        return
    if scheduler is not None:
        return _on_dask(tasks, put, skip, seen, scheduler)
    if workers is None or workers <= 1 or len(tasks) == 1:
        for b, task in enumerate(tasks):
            first = skip if b == 0 else 0
            held, nxt = {}, [0]

            def on_row(i, row, res, first=first, held=held, nxt=nxt):
                held[i] = (row, res)              # rows finish in omega order; they are written in grid order
                while nxt[0] in held:
                    r, x = held.pop(nxt[0])
                    if nxt[0] >= first:
                        put(r, x)
                    nxt[0] += 1
            out = run_block(*task, on_row=on_row)
            seen.extend(out[2])
            if out[3] is not None:
                raise out[3]
        return
    from .workers import local_pool, stop_pool
    pool = local_pool(min(int(workers), len(tasks)))
    try:
        futures = [pool.submit(_run_block_task, t) for t in tasks]
        for b, f in enumerate(futures):
            _deliver(f.result(), put, skip if b == 0 else 0, seen)
    except BaseException:
        stop_pool(pool)
        raise
    pool.shutdown(wait=True)


def _on_dask(tasks, put, skip, seen, scheduler):
    from .workers import dask_client
    client = dask_client(scheduler)
    try:
        shared = client.scatter(tasks[0][0], broadcast=True)
        futures = [client.submit(run_block, shared, *t[1:], pure=False) for t in tasks]
        for b, f in enumerate(futures):
            _deliver(f.result(), put, skip if b == 0 else 0, seen)
    finally:
        client.close()


__all__ = ["spectrum", "block_length", "run_block", "make_row", "METHODS"]
