"""The exponent ``Phi(k) = i k x + E(k)`` with logarithms continued along paths.

``E(k) = Q(k) + sum_j [nu_j L_j(k) + sum_p c_jp (k - k_j)^-p]`` where
``L_j`` is a branch of ``log(k - k_j)``.  Along a straight segment from a to b
that does not pass through k_j, ``L_j(k) = L_j(a) + Log((k - k_j)/(a - k_j))``
with the principal Log, because the segment subtends less than pi at k_j.
So a path given as a polyline carries its branch exactly, and contours are
paths on the Riemann surface of f: no cut is crossed "by accident".

The branch at the start of a contour is the cut-plane branch: every cut runs
from k_j in the direction ``cut_angle`` and ``arg(k - k_j)`` is taken in
``(cut_angle, cut_angle + 2 pi]``; a point within 1e-9 rad of the cut is on
its top side (``cut_angle + 2 pi``).
"""
import math

import mpmath
import numpy as np


def cut_plane_logs(rep, k):
    """Logs of (k - k_j) on the cut-plane branch (numpy, shape (len(k), J))."""
    k = np.atleast_1d(np.asarray(k, dtype=complex))
    z = k[:, None] - rep._kj[None, :]
    ang = np.angle(z * np.exp(-1j * rep.cut_angle))      # in (-pi, pi]
    # in (0, 2 pi]; a point on the cut (to 1e-9 rad) gets the top, whichever side rounding put it on: the
    # ray of a valley centred on the cut direction would otherwise start on either sheet
    ang = np.where(ang <= 1e-9, ang + 2 * np.pi, ang)
    return np.log(np.abs(z)) + 1j * (ang + rep.cut_angle)


def continue_logs(rep, k_from, logs_from, k_to):
    """Continue the logs from k_from to points k_to along straight segments (numpy)."""
    k_to = np.asarray(k_to, dtype=complex)
    ratio = (k_to[..., None] - rep._kj) / (np.asarray(k_from)[..., None] - rep._kj)
    return np.asarray(logs_from) + np.log(ratio)


def phi(rep, x, k, logs):
    """Phi(k) = i k x + E(k) for arrays k with their logs (numpy)."""
    k = np.asarray(k, dtype=complex)
    val = 1j * x * k + (np.polyval(rep._Q, k) if len(rep._Q) else 0)
    if rep._kj.size:
        val = val + np.asarray(logs) @ rep._nu
        for j, c in enumerate(rep._ess):
            if c.size:
                z = k - rep._kj[j]
                for p, cp in enumerate(c, start=1):
                    val = val + cp * z ** (-p)
    return val


def dphi(rep, x, k, order=1):
    """First or second derivative of Phi (single-valued; numpy)."""
    k = np.asarray(k, dtype=complex)
    if order == 1:
        val = 1j * x + (np.polyval(rep._Qp, k) if len(rep._Qp) else 0)
    else:
        Qpp = np.polyder(rep._Qp) if len(rep._Qp) > 1 else np.zeros(1, complex)
        val = np.polyval(Qpp, k) + 0j * k
    for j, kj in enumerate(rep._kj):
        z = k - kj
        nu = rep._nu[j]
        if order == 1:
            val = val + nu / z
        else:
            val = val - nu / z ** 2
        for p, cp in enumerate(rep._ess[j], start=1):
            if order == 1:
                val = val - p * cp * z ** (-p - 1)
            else:
                val = val + p * (p + 1) * cp * z ** (-p - 2)
    return val


# -- mpmath versions ----------------------------------------------------
def phi_mp(data, x, k, logs):
    """Phi at one point in mpmath; data = rep.mp_data(dps)."""
    Q, kj, nu, ess = data
    val = mpmath.j * x * k + (mpmath.polyval(Q, k) if Q else 0)
    for j in range(len(kj)):
        val += nu[j] * logs[j]
        if ess[j]:
            z = k - kj[j]
            for p, cp in enumerate(ess[j], start=1):
                val += cp * z ** (-p)
    return val


def continue_logs_mp(data, k_from, logs_from, k_to):
    kj = data[1]
    return [logs_from[j] + mpmath.log((k_to - kj[j]) / (k_from - kj[j])) for j in range(len(kj))]


def to_mp_logs(logs, data, k, kd):
    """Lift double-precision logs at kd to mp logs at the mp point k (same branch)."""
    kj = data[1]
    out = []
    for j in range(len(kj)):
        principal = mpmath.log(k - kj[j])
        n = round((complex(logs[j]).imag - float(mpmath.im(principal))) / (2 * math.pi))
        out.append(principal + 2j * mpmath.pi * n)
    return out
