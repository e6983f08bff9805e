"""Bogoliubov coefficients and temperatures from a norm-weighted S-matrix.

Shared by the near-horizon contour method and the direct position-space
solver, so that both report the same figures in the same way.

The Hawking channel is the propagating exterior out-mode of longest
wavelength (smallest |k|).  With S's row h for that mode,

* beta collects the in-modes whose norm sign is opposite to the Hawking
  mode's (``|beta|^2`` summed over them);
* alpha is the same-sign in-mode on the side where the opposite-sign in-modes
  arrive whose |k| is closest to theirs (the dispersive partner: the two
  dispersive in-modes have k of similar size and opposite sign, the
  long-wavelength counter-propagating mode has small k); without an
  opposite-sign in-mode, the largest same-sign amplitude;
* every in-mode's amplitude is listed in ``others`` under ``'<index>:<name>'``.

Pseudo-unitarity of row h reads ``sum_j eta_j |S_hj|^2 = eta_h``, i.e.
``|alpha|^2 - |beta|^2 + |gamma|^2 = 1`` for a positive-norm Hawking mode.

References
----------
.. [1] J. Macher, R. Parentani, Phys. Rev. D 79 (2009) 124008 (3x3
   Bogoliubov transformation of dispersive flows).
"""
import math

import mpmath
import numpy as np

from ..errors import ScatteringError


def hawking_row(out_modes):
    """Index of the Hawking out-mode (exterior, out, propagating, smallest |k|)."""
    cands = [(abs(m.k), i) for i, m in enumerate(out_modes)
             if m.side == "exterior" and m.direction == "out" and m.propagating]
    if not cands:
        raise ScatteringError("no propagating out-going mode on the exterior side: there is no Hawking "
                              "channel at this frequency (check omega against the cut-off omega_max)")
    return min(cands)[1]


def hawking_figures(S, in_modes, out_modes, omega, kappa):
    """alpha, beta, the per-mode amplitudes and the temperatures of the Hawking channel.

    Works in double precision for complex entries and at the current mpmath
    precision for mpmath entries (exponentially small beta keeps its digits).

    Returns
    -------
    dict with keys hawking_index, alpha, beta, others, thermal_ratio,
    occupation, effective_temperature, hawking_temperature.
    """
    S = np.asarray(S)
    mp = S.dtype == object and any(isinstance(v, (mpmath.mpc, mpmath.mpf)) for v in S.ravel())
    absf = (lambda z: abs(z)) if mp else (lambda z: abs(complex(z)))
    sqrt = mpmath.sqrt if mp else math.sqrt
    log = mpmath.log if mp else math.log
    h = hawking_row(out_modes)
    sh = out_modes[h].norm
    row = S[h]
    same = [j for j, m in enumerate(in_modes) if m.norm == sh]
    opp = [j for j, m in enumerate(in_modes) if m.norm == -sh]
    others = {f"{j}:{in_modes[j].name}": complex(row[j]) for j in range(len(in_modes))}
    if opp:
        beta2 = sum(absf(row[j]) ** 2 for j in opp)
        jb = max(opp, key=lambda j: absf(row[j]))
        beta = row[jb] if mp else complex(row[jb])
        if beta2 > 0 and beta != 0:
            beta = beta / absf(beta) * sqrt(beta2)
        sides = {in_modes[j].side for j in opp}
        partner = [j for j in same if in_modes[j].side in sides] or same
    else:
        beta2, beta, partner = 0 * absf(row[0]), 0j, same
    if not partner:
        raise ScatteringError("no in-mode with the norm sign of the Hawking mode; alpha is undefined")
    if opp:
        kb = abs(in_modes[jb].k)
        ja = min(partner, key=lambda j: abs(abs(in_modes[j].k) - kb))
    else:
        ja = max(partner, key=lambda j: absf(row[j]))
    alpha = row[ja] if mp else complex(row[ja])
    alpha2 = absf(alpha) ** 2
    ratio = beta2 / alpha2 if alpha2 > 0 else math.inf
    T_H = kappa / (2 * math.pi)
    if 0 < ratio < 1:
        T_eff = omega / log(1 / ratio)
    else:
        T_eff = math.inf if ratio >= 1 else 0 * ratio
    return dict(hawking_index=h, alpha=alpha, beta=beta, others=others, thermal_ratio=ratio,
                occupation=beta2, effective_temperature=T_eff, hawking_temperature=T_H)
