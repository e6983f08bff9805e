"""Worker processes that never outlive their parent, and Dask clusters reached in one step.

Local workers
-------------
:func:`local_pool`, :func:`stop_pool` and :func:`worker_init` come from
:mod:`contourkit.scattering.processes` (the in-memory spectrum uses the same
pool): workers end with their parent (``prctl(PR_SET_PDEATHSIG)`` on Linux and
a watchdog thread everywhere) and ignore ``SIGINT``.

Dask
----
:func:`dask_client` checks the address before Dask sees it: a malformed
address or a TCP address where nothing answers (one ``socket`` connection
attempt, then a question to the scheduler, each at most 3 seconds) is refused with one line; only then is a
``distributed.Client`` made, with Dask's own log messages silenced while it
connects, so that nothing is printed after the error.

References
----------
.. [1] Linux man-pages, prctl(2), PR_SET_PDEATHSIG.
"""
import logging
import re
import socket
import threading
from contextlib import contextmanager
from urllib.parse import urlsplit

from ..errors import InputError
from ..scattering.processes import local_pool, stop_pool, worker_init  # noqa: F401  (re-exported)
from .table import ScanError

#: seconds allowed for the first connection to a Dask scheduler
CONNECT_TIMEOUT = 3.0


def check_address(address):
    """Refuse a malformed Dask address; return (scheme, host, port).

    Parameters
    ----------
    address : str
        ``tcp://host:port`` (``host:port`` means tcp), ``tls://host:port``
        or ``inproc://...``.

    Raises
    ------
    InputError
    """
    if not isinstance(address, str) or not address.strip():
        raise InputError(f"the Dask scheduler address must be text like tcp://host:8786, got {address!r}")
    text = address.strip()
    if "://" not in text:
        text = "tcp://" + text
    parts = urlsplit(text)
    if parts.scheme == "inproc":
        return "inproc", None, None
    if parts.scheme not in ("tcp", "tls"):
        raise InputError(f"the Dask scheduler address {address!r} has the protocol {parts.scheme!r}; give "
                         f"tcp://host:port or tls://host:port")
    try:
        port = parts.port
    except ValueError:
        port = None
    host_ok = bool(parts.hostname) and re.fullmatch(r"[A-Za-z0-9._:-]+", parts.hostname) is not None
    if not host_ok or port is None or not 0 < port < 65536 or parts.path not in ("", "/"):
        raise InputError(f"the Dask scheduler address {address!r} is malformed; give it as tcp://host:port, "
                         f"e.g. tcp://127.0.0.1:8786")
    return parts.scheme, parts.hostname, port


@contextmanager
def _quiet_dask():
    names = ("distributed", "distributed.client", "distributed.core", "distributed.comm", "tornado", "asyncio")
    saved = {n: logging.getLogger(n).level for n in names}
    for n in names:
        logging.getLogger(n).setLevel(logging.CRITICAL + 1)
    try:
        yield
    finally:
        for n, level in saved.items():
            logging.getLogger(n).setLevel(level)


def dask_client(address):
    """A ``distributed.Client`` for the scheduler at ``address``, or a one-line refusal.

    Raises
    ------
    InputError
        Malformed address, or dask.distributed not installed.
    ScanError
        Nothing answers at the address within :data:`CONNECT_TIMEOUT` seconds.
    """
    scheme, host, port = check_address(address)
    try:
        from distributed import Client
    except ImportError:
        raise InputError("a Dask scheduler needs dask.distributed: pip install \"contourkit[dask]\"") from None
    if scheme in ("tcp", "tls"):
        try:
            socket.create_connection((host, port), timeout=CONNECT_TIMEOUT).close()
        except OSError as exc:
            reason = exc.strerror or type(exc).__name__
            raise ScanError(f"cannot reach the Dask scheduler at {address} ({reason}); check that the "
                            f"scheduler runs and that the address and port are right") from None
    _probe(address)
    with _quiet_dask():
        try:
            return Client(address, timeout=CONNECT_TIMEOUT, set_as_default=False)
        except (OSError, TimeoutError, ValueError) as exc:
            reason = " ".join(str(exc).split()) or type(exc).__name__
            raise ScanError(f"cannot connect to the Dask scheduler at {address}: {reason}") from None


def _probe(address):
    """Ask the scheduler who it is, within CONNECT_TIMEOUT seconds, before a Client is made.

    A half-made ``distributed.Client`` prints tracebacks from its destructor
    long after the error; the probe uses Dask's comm layer in a thread of its
    own (so that it also works where an event loop is already running, as in
    a notebook) and gives up at the deadline.
    """
    import asyncio
    outcome = {}

    async def ask():
        from distributed.comm import connect
        comm = await asyncio.wait_for(connect(address, timeout=CONNECT_TIMEOUT), CONNECT_TIMEOUT + 1)
        try:
            await comm.write({"op": "identity", "reply": True})
            outcome["identity"] = await asyncio.wait_for(comm.read(), CONNECT_TIMEOUT)
        finally:
            comm.abort()

    def run():
        try:
            with _quiet_dask():
                asyncio.run(ask())
        except BaseException as exc:  # noqa: BLE001 - reported below in one line
            outcome["error"] = exc

    t = threading.Thread(target=run, name="contourkit-dask-probe", daemon=True)
    t.start()
    t.join(2 * CONNECT_TIMEOUT + 1)
    ident = outcome.get("identity")
    if t.is_alive() or "error" in outcome or not isinstance(ident, dict) or ident.get("type") != "Scheduler":
        exc = outcome.get("error")
        reason = (" ".join(str(exc).split()) or type(exc).__name__) if exc is not None else \
            ("no answer" if ident is None else "the answer is not a Dask scheduler's")
        raise ScanError(f"no Dask scheduler answers at {address} ({reason[:160]}); check that the scheduler runs "
                        f"and that the address and port are right")


__all__ = ["local_pool", "stop_pool", "worker_init", "check_address", "dask_client"]
