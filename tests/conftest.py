"""Shared fixtures: the k-space representations of the Airy and Bessel equations, and the
interruption of a scan in a subprocess (``interrupt_scan``).

Airy: y'' - x y = 0 (DLMF 9.2.1); Bessel of order 0: x y'' + y' + x y = 0 (DLMF 10.2.1).
"""
import signal
import subprocess
import time

import pytest
import sympy as sp

import contourkit as ck

_X = sp.Symbol("x")
_Y = sp.Function("y")


@pytest.fixture(scope="session")
def airy_rep():
    return ck.ModeEquation.from_ode(_Y(_X).diff(_X, 2) - _X * _Y(_X), _Y, _X).fourier()


@pytest.fixture(scope="session")
def bessel_rep():
    return ck.ModeEquation.from_ode(_X * _Y(_X).diff(_X, 2) + _Y(_X).diff(_X) + _X * _Y(_X), _Y, _X).fourier()


@pytest.fixture(scope="session")
def airy(airy_rep):
    return airy_rep


@pytest.fixture(scope="session")
def bessel(bessel_rep):
    return bessel_rep


def _interrupt_scan(cmd, out, *, rows, total, sig, env, attempts=4):
    """Start the scan ``cmd`` and send it ``sig`` once ``out`` holds ``rows`` rows.

    Returns (returncode, stderr, rows left in the file).  Rows that follow the
    geometry in omega take milliseconds, so on a loaded machine the signal can
    come after the last row: then the file is dropped and the scan started
    again, up to ``attempts`` times.
    """
    for _ in range(attempts):
        out.unlink(missing_ok=True)
        proc = subprocess.Popen(cmd, env=env, stdout=subprocess.DEVNULL, stderr=subprocess.PIPE, text=True)
        try:
            deadline = time.monotonic() + 200
            while time.monotonic() < deadline and proc.poll() is None:
                if out.exists() and out.read_bytes().count(b"\n") >= rows + 2:   # fingerprint, header, rows
                    break
                time.sleep(0.005)
            if proc.poll() is None:
                proc.send_signal(sig)
            _, err = proc.communicate(timeout=60)
        finally:
            if proc.poll() is None:
                proc.send_signal(signal.SIGKILL)
                proc.wait()
        left = out.read_bytes().count(b"\n") - 2 if out.exists() else 0
        if left < total:
            return proc.returncode, err, left
    pytest.fail(f"the scan finished before it could be interrupted, {attempts} times")


@pytest.fixture
def interrupt_scan():
    """The function that starts a scan and interrupts it after some rows (see _interrupt_scan)."""
    return _interrupt_scan
