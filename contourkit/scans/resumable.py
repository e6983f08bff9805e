"""Frequency scans that survive interruption: the grid, the scan entry point, JSON output.

:func:`scan` is the long-run front end of the spectrum engine
(:func:`contourkit.scans.engine.spectrum`, also ``model.spectrum``): it
writes each row to a CSV table the moment it is known
(:mod:`contourkit.scans.table`: a fingerprint line, the header, rows in grid
order), resumes an interrupted table, refuses a table of another run with a
message naming the difference, and runs on local worker processes (by
default every core) or a Dask cluster.  :func:`omega_grid` makes the
frequency grids of the command line; :func:`write_json` writes a finished
run with its fingerprint.

Examples
--------
>>> import contourkit as ck, tempfile, os
>>> m = ck.catalogue.nondispersive_flow(kappa=0.05)
>>> path = os.path.join(tempfile.mkdtemp(), "spec.csv")
>>> res = scan(m, omega_grid(0.01, 0.03, points=3), out=path, workers=1)
>>> [round(r["temperature_ratio"], 6) for r in res.rows]
[1.0, 1.0, 1.0]
>>> scan(m, omega_grid(0.01, 0.03, points=3), out=path, workers=1).computed
0
"""
import json
import math
import os
import warnings
from dataclasses import dataclass, field

import numpy as np

from ..errors import ContourkitError, InputError
from .engine import make_row, spectrum
from .table import COLUMNS, RunMismatchError, ScanError, read_table


@dataclass
class ScanResult:
    """The rows of a finished scan.

    Attributes
    ----------
    rows : list of dict
        Every row of the table, in file order, with typed values (floats,
        ints, bools; None for fields left empty by a failed frequency).
    path : str or None
        The CSV table (None when the scan kept its rows in memory only).
    computed : int
        Rows computed by this call.
    resumed : int
        Rows found in the table from an earlier run and not recomputed.
    fingerprint : dict or None
        The run fingerprint (:mod:`contourkit.scans.fingerprint`).
    """
    rows: list
    path: object = None
    computed: int = 0
    resumed: int = 0
    columns: tuple = field(default=COLUMNS)
    fingerprint: object = field(default=None, repr=False)


def omega_grid(start, stop, *, points, log=False):
    """Frequencies for a scan: ``points`` values from start to stop inclusive.

    Parameters
    ----------
    start, stop : float
        0 < start <= stop (start == stop only with points == 1).
    points : int
        Number of frequencies, >= 1.
    log : bool
        Geometric instead of arithmetic spacing.

    Returns
    -------
    list of float

    Examples
    --------
    >>> [round(w, 12) for w in omega_grid(0.01, 0.04, points=3, log=True)]
    [0.01, 0.02, 0.04]
    """
    if isinstance(points, bool) or not isinstance(points, (int, np.integer)) or points < 1:
        raise InputError(f"the number of points must be a positive integer, got {points!r}")
    try:
        a, b = float(start), float(stop)
    except (TypeError, ValueError):
        raise InputError(f"the frequency range must be two numbers, got {start!r} and {stop!r}")
    if not (math.isfinite(a) and math.isfinite(b)) or a <= 0:
        raise InputError(f"frequencies must be positive and finite, got the range {a!r} .. {b!r}")
    if points == 1:
        return [a]
    if not b > a:
        raise InputError(f"the upper frequency {b!r} must be larger than the lower one {a!r}")
    ws = np.geomspace(a, b, int(points)) if log else np.linspace(a, b, int(points))
    ws[0], ws[-1] = a, b
    return [float(w) for w in ws]


def _one_line(text):
    return " ".join(str(text).split())


def compute_row(model, omega, *, dps=None, record_errors=False):
    """The table row of one frequency, traced on its own (no following).

    Parameters
    ----------
    model : HorizonModel (or any object with ``scatter(omega, dps=)``)
    omega : float
    dps : int, optional
        Correct digits wanted (see :func:`contourkit.scattering.scatter`).
    record_errors : bool
        Return a row with ``success = False`` and the error text instead of
        raising a :class:`~contourkit.errors.ContourkitError`.

    Returns
    -------
    dict
        The fields of :data:`COLUMNS`; warnings raised on the way are
        appended to ``message``.
    """
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        try:
            res, err = model.scatter(omega, dps=dps), None
        except ContourkitError as exc:
            if not record_errors:
                raise
            res, err = None, _one_line(f"{type(exc).__name__}: {exc}")
    return make_row(model, float(omega), res, err, sorted({_one_line(f"{w.category.__name__}: {w.message}")
                                                           for w in caught}))


def default_workers():
    """The number of cores this process may use."""
    try:
        return len(os.sched_getaffinity(0))
    except AttributeError:  # pragma: no cover - not Linux
        return os.cpu_count() or 1


def scan(model, omegas, *, out=None, workers=None, scheduler=None, progress=None, dps=None,
         on_error="stop", restart=False):
    """Scattering figures over frequencies, written row by row and resumable.

    Parameters
    ----------
    model : HorizonModel
        Catalogue model or model file with a horizon.
    omegas : sequence of float
        Frequencies > 0, in the order the rows are written.
    out : str or os.PathLike, optional
        CSV table; rows already there are kept and their frequencies skipped
        (resume).  Without it the rows are kept in memory only.
    workers : int, optional
        Local worker processes (default: every core this process may use).
    scheduler : str, optional
        Address of a Dask scheduler (``tcp://host:8786``); overrides workers.
    progress : bool, optional
        Progress bar on stderr; default: when stderr is a terminal.
    dps : int, optional
        Correct significant digits of each S-matrix (see
        :func:`contourkit.scattering.scatter`); default: relative accuracy 1e-12.
    on_error : {"stop", "raise", "record"}
        "stop" (or "raise"): the first failing frequency stops the scan with
        its error (rows before it are kept); "record": it gets a row with
        ``success = False`` and the error in ``message``.
    restart : bool
        Empty ``out`` first instead of resuming it.

    Returns
    -------
    ScanResult

    Raises
    ------
    InputError
        Bad frequencies or options.
    ScanError
        The output file is not a scan table, holds another run
        (:class:`~contourkit.scans.table.RunMismatchError`) or is being
        written by another scan.
    OSError
        The output file cannot be opened or written.
    """
    if on_error not in ("stop", "raise", "record"):
        raise InputError(f"on_error must be 'stop' or 'record', got {on_error!r}")
    if scheduler is None and workers is None:
        workers = default_workers()
    if scheduler is not None:
        workers = None
    spec = spectrum(model, omegas, on_error="record" if on_error == "record" else "raise", workers=workers,
                    scheduler=scheduler, out=out, progress=progress, dps=dps, restart=restart)
    return ScanResult(rows=spec.rows, path=spec.path, computed=spec.computed, resumed=spec.resumed,
                      fingerprint=spec.fingerprint)


def write_json(result, path, *, metadata=None):
    """Write the rows of a scan (and optional metadata) as JSON, atomically.

    Parameters
    ----------
    result : ScanResult
    path : str or os.PathLike
    metadata : dict, optional
        Stored under ``"model"`` (name, kappa, ...).

    The document holds ``"fingerprint"`` (the run fingerprint, as in the
    first line of the CSV table), ``"columns"``, ``"model"`` and ``"rows"``.
    """
    path = os.fspath(path)
    doc = {"fingerprint": getattr(result, "fingerprint", None), "columns": list(COLUMNS),
           "model": dict(metadata or {}), "rows": result.rows}
    tmp = f"{path}.tmp{os.getpid()}"
    try:
        with open(tmp, "w", encoding="utf-8") as fh:
            fh.write(json.dumps(doc, indent=1, allow_nan=False) + "\n")
        os.replace(tmp, path)
    finally:
        if os.path.exists(tmp):
            os.remove(tmp)
    return path


__all__ = ["scan", "omega_grid", "compute_row", "read_table", "write_json", "default_workers",
           "ScanResult", "ScanError", "RunMismatchError", "COLUMNS"]
