"""Many positions at once: steepest-descent paths reused across nearby x, vectorised quadrature.

A contour's thimble decomposition at x0 is a sum of fixed paths whose ends lie
deep in valleys.  For x near x0 the same paths are still a valid
representative of the contour (the valleys of ``exp(i k x + E(k))`` do not
move when deg Q >= 2, and for deg Q <= 1 they move only with the sign of x),
and the integrand along them still hardly oscillates.  So the integrand's
x-independent part is evaluated once on the nodes of both Gauss-Legendre
rules, and the integrals for a whole block of x values are a matrix-vector
product.  Each x is accepted only if (a) the two rules agree to the
requested tolerance relative to the size of the terms and (b) the integrand
at every path end is negligible; otherwise the geometry is traced anew at
that x.  The results are the same integrals as quadrature.integrate, to the
same accuracy.
"""
import math

import numpy as np

from ..geometry import phase
from ..geometry.decompose import decompose

_GL = {16: np.polynomial.legendre.leggauss(16), 10: np.polynomial.legendre.leggauss(10)}
_LAG = np.polynomial.laguerre.laggauss(40)


def _arm_nodes(rep, arm, sign):
    """Nodes and weights (both rules), E at the nodes, and the end node of one arm."""
    out = {}
    k0, k1, L0 = arm.k[:-1], arm.k[1:], arm.logs[:-1]
    for n, (t, w) in _GL.items():
        nodes = 0.5 * (k0[:, None] + k1[:, None]) + 0.5 * (k1 - k0)[:, None] * t[None, :]
        if rep._kj.size:
            lg = phase.continue_logs(rep, k0[:, None], L0[:, None, :], nodes)
        else:
            lg = np.zeros(nodes.shape + (0,), complex)
        E = phase.phi(rep, 0.0, nodes, lg)
        W = sign * (w[None, :] * 0.5 * (k1 - k0)[:, None])
        out[n] = [nodes.ravel(), W.ravel(), E.ravel()]
    if arm.end == "sink":
        j = arm.sink
        kj, nu = rep._kj[j], rep._nu[j]
        ke, le = arm.k[-1], arm.logs[-1]
        tau, wl = _LAG
        wj = le[j] - tau / (nu + 1)
        nodes = kj + np.exp(wj)
        with np.errstate(divide="ignore", invalid="ignore"):
            # far down the tail exp(wj) underflows and the node is k_j itself: its own log is wj (set
            # below), the log(0) of that column is never used
            lg = phase.continue_logs(rep, ke, le, nodes)
        lg[:, j] = wj
        E = phase.phi(rep, 0.0, nodes, lg) + wj + tau
        W = sign * wl * (-1.0 / (nu + 1))
        for n in out:
            out[n] = [np.concatenate([a, b]) for a, b in zip(out[n], (nodes, W, E))]
    lend = arm.logs[-1]
    # a sink's tail is integrated to the end; the single-vertex start of an end thimble is no end
    end = (arm.k[-1], complex(phase.phi(rep, 0.0, arm.k[-1], lend))) if arm.end not in ("sink", "end") else None
    return out, end


def _prepare(rep, geom, coeffs, derivative):
    rules = {16: [[], [], []], 10: [[], [], []]}
    ends = []
    for n_sig, i, _ in coeffs:
        t = geom.thimbles[i]
        for arm, sign in ((t.plus, 1.0), (t.minus, -1.0)):
            nodes, end = _arm_nodes(rep, arm, sign * n_sig)
            for n in rules:
                for lst, arr in zip(rules[n], nodes[n]):
                    lst.append(arr)
            if end is not None:
                ends.append(end)
    prep = {}
    for n, (K, W, E) in rules.items():
        K, W, E = np.concatenate(K), np.concatenate(W), np.concatenate(E)
        if derivative:
            W = W * (1j * K) ** derivative
        prep[n] = (K, W, E)
    return prep, ends


def _block(prep, ends, xs):
    """Values, error estimates and term sizes for a block of x; plus the end-point check."""
    out = {}
    for n, (K, W, E) in prep.items():
        M = 1j * np.outer(xs, K) + E[None, :]
        s = np.max(M.real, axis=1)
        T = W[None, :] * np.exp(M - s[:, None])
        out[n] = (np.sum(T, axis=1), np.sum(np.abs(T), axis=1), s)
    v16, a16, s = out[16]
    v10, _, s10 = out[10]
    v10 = v10 * np.exp(s10 - s)
    worst_end = np.full(len(xs), -np.inf)
    for k, Ee in ends:
        worst_end = np.maximum(worst_end, (1j * xs * k + Ee).real - s)
    return v16, np.abs(v16 - v10), a16, s, worst_end


def evaluate_many(rep, contour, xs, *, derivative, u_stop, rtol):
    """Values at many real x (numpy double precision); returns (values, errors, ok, evaluations)."""
    xs = np.asarray(xs, dtype=float)
    order = np.argsort(xs, kind="stable")
    vals = np.empty(len(xs), complex)
    errs = np.empty(len(xs))
    ok = np.ones(len(xs), bool)
    evals = 0
    pos = 0
    while pos < len(order):
        x0 = xs[order[pos]]
        geom, coeffs = decompose(rep, contour, x0, u_stop=u_stop)
        if not coeffs:
            vals[order[pos]], errs[order[pos]] = 0.0, 0.0
            pos += 1
            continue
        prep, ends = _prepare(rep, geom, coeffs, derivative)
        nn = prep[16][0].size + prep[10][0].size
        start = pos
        while pos < len(order):
            idx = order[pos:pos + 64]
            blk = xs[idx]
            if rep.degree_Q < 2:                       # valleys follow the sign of x
                same = np.sign(blk) == np.sign(x0)
                blk, idx = blk[same], idx[same]
                if not blk.size:
                    break
            v, e, a, s, wend = _block(prep, ends, blk)
            if np.any(s > 700):
                good = np.zeros(len(blk), bool)
            else:
                absv = np.maximum(np.abs(v), 1e-300)
                # both rules agree relative to the value, and the path ends contribute < rtol/20
                good = (e <= 0.01 * rtol * absv) & (wend - np.log(absv) < math.log(rtol) - 3)
            # accept the leading run of good points (the first one at x0 always has its own geometry)
            n_ok = len(good) if good.all() else int(np.argmin(good))
            if pos == start and n_ok == 0:
                n_ok = 1
                ok[idx[0]] = bool(good[0])
            fac = np.exp(s[:n_ok])
            vals[idx[:n_ok]] = v[:n_ok] * fac
            errs[idx[:n_ok]] = e[:n_ok] * fac + math.exp(-u_stop) * a[:n_ok] * fac * 10
            evals += nn * n_ok
            pos += n_ok
            if n_ok < len(blk):
                break
    return vals, errs, ok, evals
