"""Discretisation of the full mode equation shared by the direct solver and the complex-frequency search.

The full symmetric operator in left form (``sum_n c_n(x) d^n/dx^n``, from
:func:`contourkit.symbolic.symmetric.from_symmetric`), the window across the
profile, segment nodes obeying ``h * max|k(x)| <= step``, and per-segment
transfer matrices by Chebyshev collocation.  :mod:`.direct` assembles them
into one sparse boundary-value system at real (or slightly complex) omega;
:mod:`.unstable` uses the same system at complex omega.

References
----------
.. [1] L. N. Trefethen, Spectral Methods in MATLAB, SIAM (2000), ch. 6
   (Chebyshev differentiation matrices).
"""
import math
import weakref

import numpy as np
import sympy as sp

from ..errors import HorizonError, InputError
from ..symbolic.symmetric import from_symmetric
from .planewaves import OMEGA, X, centre, default_window, max_root_modulus

_left_cache = weakref.WeakKeyDictionary()


def left_form(model):
    """numpy callable ``(x, omega) -> array (order+1, len(x))`` of the left-form coefficients c_n.

    The full symmetric operator ``sum_m S_m[g_m]`` expanded with x on the
    left (:func:`contourkit.symbolic.symmetric.from_symmetric`), lambdified once per model.
    """
    try:
        return _left_cache[model]
    except (KeyError, TypeError):
        pass
    cs = from_symmetric(model.g, model.x)
    fs = [sp.lambdify((X, OMEGA), c, "numpy") for c in cs]

    def coeffs(x, omega):
        x = np.asarray(x, dtype=float)
        return np.array([np.broadcast_to(np.asarray(f(x, omega), dtype=complex), x.shape) for f in fs])
    try:
        _left_cache[model] = coeffs
    except TypeError:  # pragma: no cover
        pass
    return coeffs


def _window(model, window):
    xh = centre(model)
    if window is None:
        return default_window(model)
    try:
        a, b = (float(v) for v in window)
    except (TypeError, ValueError):
        raise InputError(f"window must be a pair of numbers (a, b), got {window!r}")
    if not (math.isfinite(a) and math.isfinite(b)) or not a < b:
        raise InputError(f"window must be two finite numbers a < b, got {window!r}")
    if not a < xh < b and model.horizon is not None:
        raise HorizonError(f"the window ({a:g}, {b:g}) does not contain the horizon at x = {xh:g}; the direct "
                           f"solver integrates across the horizon: choose a < {xh:g} < b, or window=None for "
                           f"the automatic window {tuple(round(v, 1) for v in default_window(model))}")
    return a, b


def _cheb(N):
    """Chebyshev points cos(pi i/(N-1)) on [-1, 1] (from +1 down) and the differentiation matrix."""
    n = N - 1
    t = np.cos(np.pi * np.arange(N) / n)
    c = np.ones(N)
    c[0] = c[-1] = 2.0
    c *= (-1.0) ** np.arange(N)
    dT = t[:, None] - t[None, :]
    Dm = np.outer(c, 1.0 / c) / (dT + np.eye(N))
    Dm -= np.diag(Dm.sum(axis=1))
    return t, Dm


def _nodes(model, omega, a, b, step):
    """Segment ends with ``h * max|k| <= step`` (max over the neighbourhood of each segment)."""
    xs = np.linspace(a, b, 801)
    kmax = max_root_modulus(model, omega, xs)
    kfloor = step / min(10.0, (b - a) / 16)
    dx = xs[1] - xs[0]
    width = max(1, int(math.ceil(10.0 / dx)))
    env = np.array([kmax[max(0, i - width):i + width + 1].max() for i in range(len(xs))])
    env = np.maximum(env, kfloor)
    nodes = [a]
    while nodes[-1] < b:
        nodes.append(nodes[-1] + step / float(np.interp(nodes[-1], xs, env)))
    nodes = np.array(nodes)
    return a + (nodes - a) * (b - a) / (nodes[-1] - a), float(kmax.max())


def _transfer(coeffs, omega, nodes, N, K, *, full=False):
    """Transfer matrices Phi_s (scaled state, identity at the left end of segment s).

    With ``full=True`` also the collocation solutions at every node, shape
    ``(M, N, n, n)`` (node i of segment s, state component, initial unit vector).
    """
    t, Dt = _cheb(N)
    n = coeffs(np.array([nodes[0]]), omega).shape[0] - 1
    h = np.diff(nodes)
    M = len(h)
    xi = nodes[:-1, None] + h[:, None] * (1 - t[None, :]) / 2          # (M, N)
    c = coeffs(xi.ravel(), omega).reshape(n + 1, M, N)
    lead = c[n]
    A = np.zeros((M, N, n, n), dtype=complex)
    for j in range(n - 1):
        A[:, :, j, j + 1] = K
    for j in range(n):
        A[:, :, n - 1, j] = -(c[j] / lead) * K ** (j - n + 1)
    out = np.empty((M, n, n), dtype=complex)
    every = np.empty((M, N, n, n), dtype=complex) if full else None
    I_n = np.eye(n)
    rhs = np.zeros((N * n, n), dtype=complex)
    rhs[:n] = I_n
    chunk = max(1, 4_000_000 // (N * n) ** 2)
    for s0 in range(0, M, chunk):
        sl = slice(s0, min(M, s0 + chunk))
        m = len(h[sl])
        Dx = Dt[None] * (-2.0 / h[sl])[:, None, None]                  # (m, N, N)
        big = np.einsum("sij,cd->sicjd", Dx, I_n).astype(complex)     # (m, N, n, N, n)
        idx = np.arange(N)
        big[:, idx, :, idx, :] -= A[sl].transpose(1, 0, 2, 3)
        big = big.reshape(m, N * n, N * n)
        big[:, :n, :] = 0.0
        big[:, np.arange(n), np.arange(n)] = 1.0
        Y = np.linalg.solve(big, np.broadcast_to(rhs, (m, N * n, n)))
        out[sl] = Y[:, (N - 1) * n:, :]
        if full:
            every[sl] = Y.reshape(m, N, n, n)
    return (out, every) if full else out
