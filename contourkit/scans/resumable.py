"""Frequency scans that survive interruption: row-by-row tables, resume, parallel workers.

:func:`scan` computes the near-horizon scattering figures of a horizon model
(:meth:`HorizonModel.scatter <contourkit.symbolic.horizon.HorizonModel.scatter>`) on a
list of frequencies and writes each row to a CSV table the moment it is
known, so that a scan stopped by a crash, a kill or a lost connection loses
only the rows still being computed.

Table, resume and workers
-------------------------
One header line with the columns of :data:`COLUMNS`, then one line per
frequency in the order given (rows that finish early wait for the rows
before them, so the file does not depend on the number of workers).  Each
line is one ``os.write`` of the complete line to a file opened with
``O_APPEND``, then ``os.fsync``.  Running the same scan on the same file
again drops a trailing partial line, keeps the complete rows and computes
only the frequencies whose ``repr(float(omega))`` is not yet in the omega
column, so the finished file equals that of an uninterrupted run.
``workers=N`` runs N local processes
(:class:`concurrent.futures.ProcessPoolExecutor`); ``scheduler=ADDRESS``
sends the work to a Dask cluster (``pip install "contourkit[dask]"``; the
workers must import contourkit).  The model is pickled to the workers;
mpmath's precision is process-wide, so one process computes one row at a time.

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
import csv
import io
import json
import math
import os
import sys
import threading
import warnings
from dataclasses import dataclass, field

import numpy as np

from ..errors import ContourkitError, InputError

#: the columns of a scan table, in order
COLUMNS = ("omega", "occupation", "thermal_ratio", "effective_temperature", "hawking_temperature",
           "temperature_ratio", "unitarity_residual", "n_in", "dps", "error_estimate", "success",
           "method", "message")
_INT = ("n_in", "dps")
_FLOAT = ("omega", "occupation", "thermal_ratio", "effective_temperature", "hawking_temperature",
          "temperature_ratio", "unitarity_residual", "error_estimate")
# mpmath's precision is one setting per process; rows computed in threads of one
# process (Dask workers with several threads) take turns.
_PRECISION_LOCK = threading.Lock()


class ScanError(ContourkitError):
    """A scan cannot start or go on (output table of another kind, busy file, ...)."""


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
    """
    rows: list
    path: object = None
    computed: int = 0
    resumed: int = 0
    columns: tuple = field(default=COLUMNS)


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
    """The table row of one frequency (run in the worker processes).

    Parameters
    ----------
    model : HorizonModel
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
    with _PRECISION_LOCK, warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        try:
            res = model.scatter(omega, dps=dps)
        except ContourkitError as exc:
            if not record_errors:
                raise
            row = {c: None for c in COLUMNS}
            row.update(omega=float(omega), success=False, method="contour",
                       message=_one_line(f"{type(exc).__name__}: {exc}"))
            return row
    row = res.as_row()
    notes = sorted({_one_line(f"{w.category.__name__}: {w.message}") for w in caught})
    row["message"] = _one_line("; ".join([res.message] + notes))
    return {c: row.get(c) for c in COLUMNS}


def _format_line(row):
    buf = io.StringIO()
    csv.writer(buf, lineterminator="\n").writerow(["" if row[c] is None else row[c] for c in COLUMNS])
    return buf.getvalue().encode("utf-8")


def _typed(raw):
    out = {}
    for c in COLUMNS:
        v = raw.get(c, "")
        if v == "" or v is None:
            out[c] = None
        elif c in _FLOAT:
            out[c] = float(v)
        elif c in _INT:
            out[c] = int(v)
        elif c == "success":
            out[c] = v == "True"
        else:
            out[c] = v
    return out


def read_table(path):
    """The complete rows of a scan table, typed (a trailing partial line is ignored).

    Parameters
    ----------
    path : str or os.PathLike

    Returns
    -------
    list of dict
    """
    with open(path, "rb") as fh:
        data = fh.read()
    return _parse(path, data[: data.rfind(b"\n") + 1])


def _parse(path, data):
    if not data:
        return []
    reader = csv.reader(io.StringIO(data.decode("utf-8")))
    header = next(reader, None)
    if tuple(header or ()) != COLUMNS:
        raise ScanError(f"{path} exists and is not a contourkit spectrum table (its first line is not the "
                        f"header {','.join(COLUMNS)}); give another output file or remove it")
    rows = []
    for i, fields in enumerate(reader, start=2):
        if len(fields) != len(COLUMNS):
            raise ScanError(f"{path}, line {i}: {len(fields)} fields instead of {len(COLUMNS)}; the table was "
                            f"edited or written by something else: give another output file or remove it")
        rows.append(_typed(dict(zip(COLUMNS, fields))))
    return rows


class _Table:
    """The output file: opened for appending, locked, resumed."""

    def __init__(self, path):
        self.path = os.fspath(path)
        self.fd = os.open(self.path, os.O_RDWR | os.O_APPEND | os.O_CREAT, 0o644)
        try:
            self._lock()
            data = b""
            while chunk := os.read(self.fd, 1 << 20):
                data += chunk
            keep = data.rfind(b"\n") + 1
            if keep < len(data):          # a write cut short: drop the partial line
                os.ftruncate(self.fd, keep)
            self.rows = _parse(self.path, data[:keep])
            if keep == 0:
                self.write(",".join(COLUMNS).encode() + b"\n")
        except BaseException:
            os.close(self.fd)
            raise

    def _lock(self):
        try:
            import fcntl
        except ImportError:  # pragma: no cover - not POSIX
            return
        try:
            fcntl.flock(self.fd, fcntl.LOCK_EX | fcntl.LOCK_NB)
        except BlockingIOError:
            raise ScanError(f"{self.path} is being written by another scan; wait for it or give another "
                            f"output file") from None

    def write(self, line):
        n = os.write(self.fd, line)
        if n != len(line):  # pragma: no cover - regular files take the whole write
            raise OSError(f"short write to {self.path}")
        os.fsync(self.fd)

    def close(self):
        os.close(self.fd)


class _Ordered:
    """Hold rows that finish early until every row before them is written."""

    def __init__(self, sink):
        self.sink, self.next, self.held = sink, 0, {}

    def put(self, i, row):
        self.held[i] = row
        while self.next in self.held:
            self.sink(self.held.pop(self.next))
            self.next += 1


def _local(model, todo, put, *, workers, dps, record):
    if workers <= 1 or len(todo) <= 1:
        for i, w in enumerate(todo):
            put(i, compute_row(model, w, dps=dps, record_errors=record))
        return
    from concurrent.futures import FIRST_COMPLETED, ProcessPoolExecutor, wait
    with ProcessPoolExecutor(max_workers=min(workers, len(todo))) as pool:
        futures = {pool.submit(compute_row, model, w, dps=dps, record_errors=record): i
                   for i, w in enumerate(todo)}
        try:
            pending = set(futures)
            while pending:
                done, pending = wait(pending, return_when=FIRST_COMPLETED)
                for f in sorted(done, key=futures.get):
                    put(futures[f], f.result())
        except BaseException:
            pool.shutdown(wait=False, cancel_futures=True)
            raise


def _dask(model, todo, put, *, scheduler, dps, record):
    try:
        from distributed import Client, as_completed
    except ImportError:
        raise InputError("a Dask scheduler needs dask.distributed: pip install \"contourkit[dask]\"") from None
    try:
        client = Client(scheduler, timeout=10, set_as_default=False)
    except (OSError, TimeoutError) as exc:
        raise ScanError(f"cannot reach the Dask scheduler at {scheduler}: {_one_line(exc)}") from None
    try:
        shared = client.scatter(model, broadcast=True)
        futures = [client.submit(compute_row, shared, w, dps=dps, record_errors=record, pure=False)
                   for w in todo]
        index = {f.key: i for i, f in enumerate(futures)}
        with client.as_current():
            for f in as_completed(futures):
                put(index[f.key], f.result())
    finally:
        client.close()


def default_workers():
    """The number of cores this process may use."""
    try:
        return len(os.sched_getaffinity(0))
    except AttributeError:  # pragma: no cover - not Linux
        return os.cpu_count() or 1


def scan(model, omegas, *, out=None, workers=None, scheduler=None, progress=None, dps=None,
         on_error="stop"):
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
        Progress bar on stderr (tqdm, if installed); default: when stderr is a
        terminal.
    dps : int, optional
        Correct significant digits of each S-matrix (see
        :func:`contourkit.scattering.scatter`).
    on_error : {"stop", "record"}
        "stop": the first failing frequency stops the scan with its error (rows
        before it are kept); "record": it gets a row with ``success = False``
        and the error in ``message``.

    Returns
    -------
    ScanResult

    Raises
    ------
    InputError
        Bad frequencies or options.
    ScanError
        The output file is not a scan table or is being written by another scan.
    OSError
        The output file cannot be opened or written.
    """
    if on_error not in ("stop", "record"):
        raise InputError(f"on_error must be 'stop' or 'record', got {on_error!r}")
    try:
        ws = [float(w) for w in omegas]
    except (TypeError, ValueError):
        raise InputError(f"omegas must be a sequence of numbers, got {omegas!r}") from None
    bad = [w for w in ws if not (math.isfinite(w) and w > 0)]
    if not ws or bad:
        raise InputError(f"the frequencies must be positive and finite (got {bad[0]!r})" if bad else
                         "no frequencies to scan; give at least one")
    if workers is None:
        workers = default_workers()
    if isinstance(workers, bool) or not isinstance(workers, (int, np.integer)) or workers < 1:
        raise InputError(f"workers must be a positive integer, got {workers!r}")
    table = _Table(out) if out is not None else None
    try:
        rows = list(table.rows) if table else []
        done = {repr(r["omega"]) for r in rows}
        resumed = sum(repr(w) in done for w in dict.fromkeys(ws))
        todo = [w for w in dict.fromkeys(ws) if repr(w) not in done]
        bar = _bar(progress, total=resumed + len(todo), initial=resumed)

        def sink(row):
            if table:
                table.write(_format_line(row))
            rows.append(row)
            if bar is not None:
                bar.update(1)

        put = _Ordered(sink).put
        record = on_error == "record"
        try:
            if scheduler is not None:
                _dask(model, todo, put, scheduler=scheduler, dps=dps, record=record)
            else:
                _local(model, todo, put, workers=int(workers), dps=dps, record=record)
        finally:
            if bar is not None:
                bar.close()
    finally:
        if table:
            table.close()
    if table:
        rows = read_table(out)
    return ScanResult(rows=rows, path=None if out is None else os.fspath(out), computed=len(todo),
                      resumed=resumed)


def _bar(progress, *, total, initial):
    if progress is None:
        progress = hasattr(sys.stderr, "isatty") and sys.stderr.isatty()
    if not progress:
        return None
    try:
        from tqdm import tqdm
    except ImportError:
        return None
    return tqdm(total=total, initial=initial, desc="spectrum", unit="omega", file=sys.stderr)


def write_json(result, path, *, metadata=None):
    """Write the rows of a scan (and optional metadata) as JSON, atomically.

    Parameters
    ----------
    result : ScanResult
    path : str or os.PathLike
    metadata : dict, optional
        Stored under ``"model"`` (name, kappa, ...).
    """
    path = os.fspath(path)
    doc = {"columns": list(COLUMNS), "model": dict(metadata or {}), "rows": result.rows}
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
           "ScanResult", "ScanError", "COLUMNS"]
