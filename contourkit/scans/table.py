"""The spectrum table on disk: a fingerprint line, a header, one CSV line per frequency.

Format
------
Line 1 is ``# contourkit run {...}`` with the run fingerprint as JSON
(:mod:`contourkit.scans.fingerprint`); line 2 the column names of
:data:`COLUMNS`; then one line per frequency in grid order.  Readers that
take ``#`` as a comment (``pandas.read_csv(path, comment="#")``,
``numpy.genfromtxt``) read it as a plain CSV table.  Each line is one
``os.write`` to a file opened with ``O_APPEND``, then ``os.fsync``, so a
kill leaves at most one partial last line, which the next run drops.  The
file is locked (``flock``) while a run writes it.
"""
import csv
import io
import json
import os

from ..errors import ContourkitError
from .fingerprint import differences

#: the columns of a spectrum table, in order (names: docs/vocabulary.md)
COLUMNS = ("omega", "occupation", "thermal_ratio", "effective_temperature", "hawking_temperature",
           "temperature_ratio", "unitarity_residual", "n_in", "dps", "error_estimate", "success",
           "method", "hawking_channel", "reliable", "thermal_ratio_error", "occupation_error", "message")
_INT = ("n_in", "dps")
_FLOAT = ("omega", "occupation", "thermal_ratio", "effective_temperature", "hawking_temperature",
          "temperature_ratio", "unitarity_residual", "error_estimate", "thermal_ratio_error", "occupation_error")
_BOOL = ("success", "hawking_channel", "reliable")
#: the start of the fingerprint line
MARK = "# contourkit run "


class ScanError(ContourkitError):
    """A run cannot start or go on (output table of another kind, busy file, unreachable cluster, ...)."""


class RunMismatchError(ScanError):
    """The output file holds rows of another run (another model, grid, method or accuracy)."""


def format_line(row):
    """One table line (bytes) of a row dict."""
    buf = io.StringIO()
    csv.writer(buf, lineterminator="\n").writerow(["" if row.get(c) is None else row[c] for c in COLUMNS])
    return buf.getvalue().encode("utf-8")


def typed(raw):
    """A row read from the file with its values typed (floats, ints, bools, None)."""
    out = {}
    for c in COLUMNS:
        v = raw.get(c, "")
        if v == "" or v is None:
            out[c] = None
        elif c in _FLOAT:
            out[c] = float(v)
        elif c in _INT:
            out[c] = int(v)
        elif c in _BOOL:
            out[c] = v == "True"
        else:
            out[c] = v
    return out


def _restart_hint(path):
    return (f"start {path} afresh with --restart (restart=True in Python), or give another output file "
            f"(--out)")


def parse(path, data):
    """(fingerprint, rows) of a table's complete lines; raises ScanError for a foreign file."""
    if not data:
        return None, []
    text = data.decode("utf-8", errors="replace")
    first, _, rest = text.partition("\n")
    if not first.startswith(MARK):
        if first.strip() == ",".join(COLUMNS[:13]) or first.startswith("omega,"):
            raise RunMismatchError(f"{path} was written by an earlier contourkit without a run fingerprint; "
                                   f"{_restart_hint(path)}")
        raise ScanError(f"{path} exists and is not a contourkit spectrum table (its first line is not "
                        f"'{MARK.strip()} ...'); give another output file or remove it")
    try:
        fp = json.loads(first[len(MARK):])
    except ValueError:
        raise ScanError(f"{path}: the fingerprint line is damaged; {_restart_hint(path)}") from None
    reader = csv.reader(io.StringIO(rest))
    header = next(reader, None)
    if header is None:
        return None, []                   # cut short before the header: start afresh
    if tuple(header) != COLUMNS:
        raise RunMismatchError(f"{path} has the columns of another contourkit version; {_restart_hint(path)}")
    rows = []
    for i, fields in enumerate(reader, start=3):
        if len(fields) != len(COLUMNS):
            raise ScanError(f"{path}, line {i}: {len(fields)} fields instead of {len(COLUMNS)}; the table was "
                            f"edited or written by something else: {_restart_hint(path)}")
        rows.append(typed(dict(zip(COLUMNS, fields))))
    return fp, rows


def read_table(path):
    """The complete rows of a spectrum table, typed (a trailing partial line is ignored).

    Parameters
    ----------
    path : str or os.PathLike

    Returns
    -------
    list of dict
    """
    return read_run(path)[1]


def read_run(path):
    """(fingerprint, rows) of a spectrum table."""
    with open(path, "rb") as fh:
        data = fh.read()
    return parse(path, data[: data.rfind(b"\n") + 1])


class Table:
    """The output file of a run: opened for appending, locked, checked against the run's fingerprint.

    Parameters
    ----------
    path : str or os.PathLike
    fp : dict
        The fingerprint of this run.
    restart : bool
        Empty the file first (rows of any earlier run are dropped).
    """

    def __init__(self, path, fp, *, restart=False):
        self.path = os.fspath(path)
        self.fd = os.open(self.path, os.O_RDWR | os.O_APPEND | os.O_CREAT, 0o644)
        try:
            self._lock()
            if restart:
                os.ftruncate(self.fd, 0)
            data = b""
            while chunk := os.read(self.fd, 1 << 20):
                data += chunk
            keep = data.rfind(b"\n") + 1
            old, rows = parse(self.path, data[:keep])
            if old is not None:
                diff = differences(old, fp)
                if diff:
                    raise RunMismatchError(f"{self.path} holds rows of another run: {'; '.join(diff)}; "
                                           f"{_restart_hint(self.path)}")
            if old is None:               # a new file (or one cut short before its header)
                os.ftruncate(self.fd, 0)
                self.write((MARK + json.dumps(fp, sort_keys=True) + "\n" + ",".join(COLUMNS) + "\n").encode())
            elif keep < len(data):        # a write cut short: drop the partial line
                os.ftruncate(self.fd, keep)
            self.rows = rows
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
            raise ScanError(f"{self.path} is being written by another run; wait for it or give another "
                            f"output file") from None

    def write(self, line):
        """Append one complete line and flush it to the disk."""
        n = os.write(self.fd, line)
        if n != len(line):  # pragma: no cover - regular files take the whole write
            raise OSError(f"short write to {self.path}")
        os.fsync(self.fd)

    def close(self):
        os.close(self.fd)


__all__ = ["COLUMNS", "MARK", "ScanError", "RunMismatchError", "Table", "read_table", "read_run",
           "format_line", "typed", "parse"]
