"""Worker processes end with their parent; Dask addresses are checked before Dask sees them.

Behaviour checks (no source needed).  Network: only the loopback interface,
on a port where nothing listens (found by binding port 0 and closing it).
"""
import os
import pathlib
import signal
import socket
import subprocess
import sys
import time

import pytest

import contourkit as ck
from contourkit.scans.table import ScanError
from contourkit.scans.workers import check_address, dask_client

ROOT = pathlib.Path(__file__).resolve().parents[2]
SUPER = ROOT / "worked_examples" / "models" / "superluminal.toml"


def _env():
    env = dict(os.environ)
    env["PYTHONPATH"] = str(ROOT) + os.pathsep + env.get("PYTHONPATH", "")
    return env


def _children(pid):
    kids = set()
    try:
        for task in os.listdir(f"/proc/{pid}/task"):
            with open(f"/proc/{pid}/task/{task}/children") as fh:
                kids.update(int(p) for p in fh.read().split())
    except (FileNotFoundError, ProcessLookupError):
        pass
    return kids


def _alive(pid):
    try:
        with open(f"/proc/{pid}/stat") as fh:
            state = fh.read().rsplit(")", 1)[1].split()[0]
    except (FileNotFoundError, ProcessLookupError):
        return False
    return state not in ("Z", "X")


def _free_port():
    with socket.socket() as s:
        s.bind(("127.0.0.1", 0))
        return s.getsockname()[1]


@pytest.mark.skipif(not sys.platform.startswith("linux"), reason="reads /proc")
def test_workers_do_not_outlive_a_killed_parent(tmp_path):
    out = tmp_path / "run.csv"
    proc = subprocess.Popen([sys.executable, "-m", "contourkit", "spectrum", SUPER, "--points", "256", "--digits",
                             "20", "--workers", "2", "--quiet", "--out", out], env=_env(),
                            stdout=subprocess.PIPE, stderr=subprocess.PIPE)
    workers = set()
    try:
        deadline = time.monotonic() + 120
        while time.monotonic() < deadline and proc.poll() is None and len(workers) < 2:
            workers = _children(proc.pid)
            time.sleep(0.02)
        assert proc.poll() is None and len(workers) >= 2, "the run did not start two workers"
        proc.send_signal(signal.SIGKILL)
        proc.wait(timeout=30)
        time.sleep(5)
        alive = [p for p in workers if _alive(p)]
        assert not alive, f"workers {alive} outlived their parent"
    finally:
        for p in workers:                 # our own processes, by their id
            if _alive(p):
                os.kill(p, signal.SIGKILL)
        if proc.poll() is None:
            proc.kill()
        proc.communicate()


@pytest.mark.parametrize("address", ["", "   ", "tcp://", "tcp://127.0.0.1", "tcp://127.0.0.1:notaport",
                                     "tcp://127.0.0.1:99999", "http://127.0.0.1:8786", "tcp://bad host:8786",
                                     "tcp://127.0.0.1:8786/path", 8786])
def test_malformed_addresses_are_refused(address):
    with pytest.raises(ck.InputError):
        check_address(address)


def test_address_forms():
    assert check_address("127.0.0.1:8786") == ("tcp", "127.0.0.1", 8786)
    assert check_address("tls://127.0.0.1:1") == ("tls", "127.0.0.1", 1)


def test_unreachable_loopback_address_is_one_error():
    pytest.importorskip("distributed", reason="dask.distributed is not installed")
    with pytest.raises(ScanError, match="cannot reach the Dask scheduler"):
        dask_client(f"tcp://127.0.0.1:{_free_port()}")


def test_unreachable_scheduler_from_the_command_line(tmp_path):
    pytest.importorskip("distributed", reason="dask.distributed is not installed")
    port = _free_port()
    proc = subprocess.run([sys.executable, "-m", "contourkit", "spectrum", SUPER, "--points", "2", "--scheduler",
                           f"tcp://127.0.0.1:{port}", "--out", tmp_path / "x.csv"], env=_env(),
                          capture_output=True, text=True, timeout=60)
    assert proc.returncode == 1
    assert proc.stderr.count("\n") == 1 and "Traceback" not in proc.stderr, proc.stderr
    assert f"127.0.0.1:{port}" in proc.stderr


def test_a_silent_listener_is_one_line_and_nothing_after(tmp_path):
    # something listens on the loopback port but never speaks Dask: one line, no destructor noise
    pytest.importorskip("distributed", reason="dask.distributed is not installed")
    import threading
    srv = socket.socket()
    srv.bind(("127.0.0.1", 0))
    srv.listen(4)
    port = srv.getsockname()[1]
    held, stop = [], threading.Event()

    def accept():
        srv.settimeout(0.2)
        while not stop.is_set():
            try:
                held.append(srv.accept()[0])
            except OSError:
                pass
    t = threading.Thread(target=accept, daemon=True)
    t.start()
    try:
        proc = subprocess.run([sys.executable, "-m", "contourkit", "spectrum", SUPER, "--points", "2",
                               "--scheduler", f"tcp://127.0.0.1:{port}"], env=_env(), capture_output=True,
                              text=True, timeout=60)
    finally:
        stop.set()
        t.join()
        for c in held:
            c.close()
        srv.close()
    assert proc.returncode == 1
    assert proc.stderr.count("\n") == 1 and "Traceback" not in proc.stderr, proc.stderr
    assert "no Dask scheduler answers" in proc.stderr
