"""Local worker pools: workers end with their parent (issue 13, build item 4).

The parent-death signal is Linux prctl(2) PR_SET_PDEATHSIG (Linux man-pages); the
watchdog thread covers other POSIX systems (common practice).
"""
import os
import signal
import subprocess
import sys
import textwrap
import time

import pytest

from contourkit.scattering.processes import local_pool, stop_pool

_SCRIPT = textwrap.dedent("""
    import os, signal, sys, time
    from contourkit.scattering.processes import local_pool
    pool = local_pool(2)
    futs = [pool.submit(os.getpid) for _ in range(8)]
    pids = sorted({f.result() for f in futs})
    pool.submit(time.sleep, 600)
    print(" ".join(map(str, pids)), flush=True)
    time.sleep(0.5)
    os.kill(os.getpid(), signal.SIGKILL)
""")


def _alive(pid):
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return False
    try:                                  # a zombie not yet reaped counts as ended
        with open(f"/proc/{pid}/stat") as f:
            return f.read().split(")")[-1].split()[0] != "Z"
    except OSError:
        return True


@pytest.mark.skipif(os.name != "posix", reason="POSIX process semantics")
def test_workers_end_when_the_parent_is_killed():
    out = subprocess.run([sys.executable, "-c", _SCRIPT], capture_output=True, text=True, timeout=120)
    assert out.returncode == -signal.SIGKILL
    pids = [int(p) for p in out.stdout.split()]
    assert pids and os.getpid() not in pids
    deadline = time.time() + 5
    while time.time() < deadline and any(_alive(p) for p in pids):
        time.sleep(0.1)
    assert not any(_alive(p) for p in pids)


def test_pool_runs_tasks_and_stops():
    pool = local_pool(1)
    assert pool.submit(abs, -3).result(timeout=60) == 3
    stop_pool(pool)
    assert pool._shutdown_thread
