"""S-matrix of a followed frequency in numpy extended precision, with a first-order error bound.

For modest requested accuracy (``rtol >= 1e-10``) the constants and linear
algebra of a followed frequency (sweep.py) need no arbitrary precision.
This module evaluates them with numpy's extended type (``np.longdouble``:
64-bit mantissa, unit roundoff ~1e-19, on x86-64; plain double elsewhere,
where the bound below is simply larger) and bounds the rounding error of the
Hawking-row figures to first order:

* the near-horizon data (zeros k_j of B, exponents nu_j, polynomial part Q)
  from the exact coefficients (mpmath, converted by their decimal strings),
  zeros polished by Newton's method in extended precision;
* flux constants from their closed forms (modes.py) in logarithmic form,
  with ``|Gamma(1/2 + i y)|^2 = pi / cosh(pi y)`` (DLMF 5.4.4) at the
  self-adjoint exponents ``Re nu = -1/2``; each log-constant gets a bound
  from the moduli of its terms;
* the in-mode system by Gaussian elimination with partial pivoting after
  equilibration, with one step of iterative refinement, which makes the
  solve componentwise backward stable (Higham, 12.1);
* S = M_out A^-1 with componentwise first-order propagation (see
  :func:`assemble`): an error of a flux constant only rescales a row or a
  column of S, while errors of the thimble coefficients N and of the solve
  are amplified where the sums over basis contours cancel.

The relative error bound of thermal_ratio and occupation follows; if it
exceeds the requested tolerance, or anything is out of range,
the caller falls back to the mpmath path (scattering._finish), which raises
its precision until two precisions agree.

References
----------
.. [1] N. J. Higham, Accuracy and Stability of Numerical Algorithms, 2nd ed.,
   SIAM (2002), sections 3.1 (summation) and 7.1-7.2 (perturbation bounds
   for linear systems).
.. [2] NIST DLMF 5.4.4 (|Gamma(1/2 + i y)|^2).
"""
import math

import numpy as np

from .bogoliubov import hawking_figures
from .family import quotient
from .labels import _horner

R = np.longdouble
C = np.clongdouble
U = float(np.finfo(R).eps)
DIGITS = int(np.finfo(R).precision)     # decimal digits of the extended type (18 on x86-64)
PI = R("3.14159265358979323846264338327950288")


def _polyder(c):
    n = c.size - 1
    return c[:-1] * np.arange(n, 0, -1).astype(R) if n > 0 else np.zeros(1, dtype=C)


class ExtFrame:
    """A frame's data (sweep.Frame) in extended precision, in the frame's singular-point order."""

    def __init__(self, frame):
        A, B = frame.family.ext_AB(frame.omega_ext)
        self.s1 = B
        dB0 = np.concatenate([np.zeros(1, dtype=C), _polyder(B)]) if B.size > 1 else np.zeros_like(B)
        N = 1j * A - dB0
        B = B[np.argmax(B != 0):]
        dB = _polyder(B)
        kj = frame._kj.astype(C)
        for _ in range(3):
            kj = kj - _horner(B, kj) / _horner(dB, kj)
        self.kj = kj
        self.nu = _horner(N, kj) / _horner(dB, kj)
        # Q' = quotient of N by B; Q with zero constant term
        q = np.array(quotient(N, B), dtype=C) if N.size >= B.size else np.zeros(0, dtype=C)
        self.Q = np.concatenate([q / np.arange(q.size, 0, -1).astype(R), np.zeros(1, dtype=C)]) if q.size else q


def _logs(kj, logs_double, k):
    """Extended logs of (k - k_j) on the branch of the double-precision logs at (nearly) k."""
    z = k - kj
    p = np.log(z)
    n = np.round((logs_double.imag - p.imag.astype(float)) / (2 * math.pi))
    return p + 2j * PI * n.astype(R)


def _re_sum(Q, k, logs, nu):
    """Re[Q(k) + sum nu_j logs_j] at real k and its rounding bound (only real parts of Q contribute)."""
    qr = Q.real
    q = _horner(qr.astype(C), k).real if Q.size else R(0)
    eq = U * (Q.size + 2) * float(_horner(np.abs(qr).astype(C), abs(k)).real) if Q.size else 0.0
    t = logs * nu
    et = 4 * U * float(np.sum(np.abs(logs.real * nu.real) + np.abs(logs.imag * nu.imag)))
    return q + np.sum(t.real), eq + et


def _saddle_log(ef, s, logs_d):
    kr = C(R(s.real))
    lr = _logs(ef.kj, np.asarray(logs_d) + np.log((s.real - ef.kj.astype(complex)) / (s - ef.kj.astype(complex))), kr)
    v, e = _re_sum(ef.Q, kr, lr, ef.nu)
    s1 = abs(_horner(ef.s1, kr))
    lc = np.log(2 * PI) + v + np.log(s1) / 2
    return lc, e + U * (4 + abs(float(lc)))


def _branch_log(ef, b, s, logs_d, X, loop):
    kb, v = ef.kj[b], ef.nu[b]
    if abs(complex(kb).imag) > 1e-12 * max(1.0, abs(complex(kb))) or abs(float(v.real) + 0.5) > 1e-12:
        return None
    others = np.arange(ef.kj.size) != b
    kd = ef.kj.astype(complex)
    ld = np.asarray(logs_d)[others] + np.log((complex(kb) - kd[others]) / (s - kd[others]))
    lb = _logs(ef.kj[others], ld, kb)
    val, e = _re_sum(ef.Q, C(kb.real), lb, ef.nu[others])
    ds1 = abs(_horner(_polyder(ef.s1), kb))
    y = v.imag
    alpha = (PI / 2 if X > 0 else -PI / 2) + 2 * PI * loop[0]
    wind = abs(np.exp(2j * PI * v * loop[1]) - 1)
    # |Gamma(1/2 + i y)|^2 = pi / cosh(pi y)
    log2 = np.log(2 * PI * ds1) + 2 * val + np.log(PI / np.cosh(PI * y)) - 2 * y * alpha + 2 * np.log(wind)
    bound = e + U * (8 + abs(float(PI * y)) + abs(float(y * alpha)) + 4 * math.pi * abs(complex(v)) / float(wind))
    return log2 / 2, bound


def side_data(frame, ef, side, terms):
    """(modes with constants, N, error bound of N, log-constant bounds) of one side; None if out of range."""
    from .modes import ModeData
    mods, bounds = [], []
    for md in side.modes:
        c, err = None, 0.0
        if md.mode.kind == "propagating":
            s, logs = side.crit[md.index], side.logs[md.index]
            r = _branch_log(ef, md.branch, s, logs, side.X, md.loop) if md.branch >= 0 else _saddle_log(ef, s, logs)
            if r is None or not np.isfinite(r[0]) or abs(float(r[0])) > 5000:
                return None
            c, err = np.exp(r[0]), r[1]
        mods.append(ModeData(md.index, md.mode, c, md.branch, loop=md.loop, far=md.far))
        bounds.append(err)
    rows, cols, wts, Mm = _crossing_arrays(side, terms, ef.nu.size)
    z = Mm @ ef.nu if Mm.size else np.zeros(len(rows), dtype=C)
    w = np.exp(2j * PI * z)
    N = np.zeros((len(mods), len(terms)), dtype=C)
    EN = np.zeros(N.shape)
    np.add.at(N, (rows, cols), wts * w)
    np.add.at(EN, (rows, cols), np.abs(wts) * np.abs(w).astype(float) * U * (4 + 2 * math.pi * np.abs(z).astype(float)))
    return mods, N, EN, bounds


def _crossing_arrays(side, terms, J):
    """The side's crossings as arrays (cached on it): N[i, c] = sum of coef * sign * exp(2 pi i m.nu).

    The same sums as decompose.coefficient for contours without half-line terms
    (the only ones a followed state has).
    """
    cached = getattr(side, "_crossings", None)
    if cached is None:
        rows, cols, wts, ms = [], [], [], []
        for col, (tm, cf) in enumerate(zip(terms, side.coeffs)):
            for _, i, cl in cf:
                for ti, sign, m in cl:
                    rows.append(i)
                    cols.append(col)
                    wts.append(complex(tm[ti][0]) * sign)
                    ms.append(list(m) if m else [0] * J)
        cached = (np.array(rows, dtype=int), np.array(cols, dtype=int), np.array(wts, dtype=C),
                  np.array(ms, dtype=R).reshape(len(rows), J))
        side._crossings = cached
    return cached


def _solve(B, rhs):
    """Gaussian elimination with partial pivoting (any numpy dtype)."""
    n = B.shape[0]
    M = np.concatenate([B, rhs], axis=1)
    for j in range(n):
        p = j + int(np.argmax(np.abs(M[j:, j])))
        if M[p, j] == 0:
            raise ZeroDivisionError("singular in-mode system")
        if p != j:
            M[[j, p]] = M[[p, j]]
        M[j + 1:] -= np.outer(M[j + 1:, j] / M[j, j], M[j])
    Xs = np.zeros_like(rhs)
    for j in range(n - 1, -1, -1):
        Xs[j] = (M[j, n:] - M[j, j + 1:n] @ Xs[j + 1:]) / M[j, j]
    return Xs


def assemble(model, data, n_c, w):
    """(in_modes, out_modes, growing, S, residual, figures, bound), or None if the system is out of range.

    The caller keeps the result if ``bound`` (relative, thermal ratio and
    occupation) is within its tolerance.

    First-order error propagation for ``S = M_out A^-1`` (rows of A: in-modes
    ``c_r N_r`` and growing modes ``N_r``; rows of M_out: ``c_o N_o``):
    ``|dS| <= (b_o + b_j) |S| + |c_o| |dN_o| |X| + |G| (|dA| + 3 n u |A|) |X| + n u |M_out| |X|``
    with ``X = A^-1`` (in-mode columns) and ``G = M_out A^-1``: an error of a
    flux constant (b) only rescales a row or column of S; errors of N and of
    the solve (backward error ``3 n u |A|``) enter through G, and the rounding
    of the sum ``M_out X`` is amplified where it cancels.
    """
    (mod_e, Ne, Ee, be), (mod_i, Ni, Ei, bi) = data
    rows = [(md, Ne, Ee, b) for md, b in zip(mod_e, be)] + [(md, Ni, Ei, b) for md, b in zip(mod_i, bi)]
    ins = [r for r in rows if r[0].mode.kind == "propagating" and r[0].mode.direction == "in"]
    outs = [r for r in rows if r[0].mode.kind == "propagating" and r[0].mode.direction == "out"]
    grow = [r for r in rows if r[0].mode.kind == "growing"]
    if len(ins) + len(grow) != n_c or not ins:
        return None
    A = np.zeros((n_c, n_c), dtype=C)
    EA = np.zeros((n_c, n_c))
    for r, (md, N, E, _) in enumerate(ins):
        A[r] = md.constant * N[md.index]
        EA[r] = float(md.constant) * E[md.index]
    for r, (md, N, E, _) in enumerate(grow):
        A[len(ins) + r] = N[md.index]
        EA[len(ins) + r] = E[md.index]
    rs = np.max(np.abs(A), axis=1)
    rs[rs == 0] = 1
    Bm = A / rs[:, None]
    cs = np.max(np.abs(Bm), axis=0)
    cs[cs == 0] = 1
    Bm = Bm / cs[None, :]
    Bd = Bm.astype(complex)
    cond = float(np.linalg.cond(Bd))
    if not math.isfinite(cond) or cond * U > 1e-6:
        return None
    rhs = np.diag(1 / rs).astype(C)
    try:
        Y = _solve(Bm, rhs)
        Y = Y + _solve(Bm, rhs - Bm @ Y)       # one step of iterative refinement
    except ZeroDivisionError:
        return None
    Ainv = Y / cs[:, None]
    Xs = Ainv[:, :len(ins)]
    Mo = np.array([md.constant * N[md.index] for md, N, _, _ in outs], dtype=C)
    EMo = np.array([float(md.constant) * E[md.index] for md, _, E, _ in outs])
    G = Mo @ Ainv                              # out-amplitudes of the solutions with one unit in-amplitude
    S = G[:, :len(ins)]
    aX = np.abs(Xs).astype(float)
    dA = EA + 3 * n_c * U * np.abs(A).astype(float)
    bo = np.array([b for _, _, _, b in outs])
    bj = np.array([b for _, _, _, b in ins])
    err = ((bo[:, None] + bj[None, :]) * np.abs(S).astype(float) + EMo @ aX
           + np.abs(G).astype(float) @ (dA @ aX) + n_c * U * (np.abs(Mo).astype(float) @ aX))
    eta_in = np.array([md.mode.norm for md, _, _, _ in ins])
    eta_out = np.array([md.mode.norm for md, _, _, _ in outs])
    resid = float(np.max(np.abs(S.conj().T @ (eta_out[:, None] * S) - np.diag(eta_in))))
    in_modes = [md.mode for md, _, _, _ in ins]
    out_modes = [md.mode for md, _, _, _ in outs]
    Sd = S.astype(complex)
    fig = hawking_figures(Sd, in_modes, out_modes, w, float(model.kappa))
    h = fig["hawking_index"]
    row = np.abs(Sd[h])
    with np.errstate(divide="ignore", invalid="ignore"):
        rel = np.where(row > 0, err[h] / row, np.inf)
    opp = [j for j, m in enumerate(in_modes) if m.norm == -out_modes[h].norm]
    ja = int(np.argmin(np.abs(Sd[h] - fig["alpha"])))
    # relative error of |beta|^2 / |alpha|^2, plus the rounding of S to double
    bound = 2 * max([float(rel[j]) for j in opp] + [0.0]) + 2 * float(rel[ja]) + 4e-16
    return in_modes, out_modes, [r[0].mode for r in grow], Sd, resid, fig, bound
