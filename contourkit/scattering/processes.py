"""Local worker processes that never outlive their parent.

:func:`local_pool` gives a :class:`concurrent.futures.ProcessPoolExecutor`
whose workers

* ask the kernel for ``SIGKILL`` when their parent dies (Linux
  ``prctl(PR_SET_PDEATHSIG)``) [1]_,
* run a watchdog thread that ends the worker (``os._exit``) within a quarter
  of a second once its parent process has changed (the parent died and the
  worker was handed to another process), on every POSIX system, and
* ignore ``SIGINT``: an interrupt at the terminal reaches the whole process
  group, and the parent alone decides (it ends the workers with
  :func:`stop_pool`).

Both process pools of the package use it: the in-memory
:func:`contourkit.scattering.spectra.spectrum` and the resumable engine
(:mod:`contourkit.scans.engine`, through :mod:`contourkit.scans.workers`).

References
----------
.. [1] Linux man-pages, prctl(2), PR_SET_PDEATHSIG.

Examples
--------
>>> from contourkit.scattering.processes import local_pool, stop_pool
>>> pool = local_pool(1)
>>> pool.submit(abs, -2).result()
2
>>> stop_pool(pool)
"""
import os
import signal
import sys
import threading
import time

#: seconds between two checks of the parent process in a worker
WATCH_INTERVAL = 0.25

def _parent_death_signal():
    if not sys.platform.startswith("linux"):
        return
    try:
        import ctypes
        libc = ctypes.CDLL(None, use_errno=True)
        libc.prctl(1, int(signal.SIGKILL), 0, 0, 0)       # PR_SET_PDEATHSIG = 1
    except (OSError, AttributeError):  # pragma: no cover - no prctl
        pass


def _watch(parent):
    while True:
        if os.getppid() != parent:
            os._exit(1)
        time.sleep(WATCH_INTERVAL)


def worker_init():
    """Initialiser of a worker process (see the module docstring)."""
    signal.signal(signal.SIGINT, signal.SIG_IGN)
    _parent_death_signal()
    parent = os.getppid()
    if parent == 1:                      # pragma: no cover - parent already gone
        os._exit(1)
    threading.Thread(target=_watch, args=(parent,), name="contourkit-parent-watch", daemon=True).start()


def local_pool(workers):
    """A process pool of ``workers`` processes that end with their parent."""
    from concurrent.futures import ProcessPoolExecutor
    return ProcessPoolExecutor(max_workers=int(workers), initializer=worker_init)


def stop_pool(pool):
    """End a pool now: cancel what has not started, terminate the running workers."""
    procs = list(getattr(pool, "_processes", {}).values())
    pool.shutdown(wait=False, cancel_futures=True)
    for p in procs:
        try:
            p.terminate()
        except (OSError, AttributeError):  # pragma: no cover - already gone
            pass
    for p in procs:
        try:
            p.join(2)
        except (OSError, AssertionError, AttributeError):  # pragma: no cover
            pass
