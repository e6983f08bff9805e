"""Results for every orientation of a horizon: mirror images and time reverses of the canonical one.

The near-horizon S-matrix is computed for the canonical model (black hole,
flow towards -x, subsonic exterior x > 0; see
:mod:`contourkit.symbolic.orientation`) and mapped back to the user's model:

* parity (``x -> -x``): a canonical mode ``exp(i k x)`` is the user's mode
  ``exp(-i k x)``; positions and group velocities change sign; in/out, norms,
  sides (exterior = subsonic) and the S-matrix entries are unchanged.
* time reversal: the complex conjugate ``phi*`` of a solution of the
  canonical equation solves the user's one (``D(omega, -k, x)`` for a real
  D) at the same omega; conjugation reverses every group velocity and keeps
  every norm ``sign(dD/domega)`` and flux ``|a|^2 |dD/dk|``.  So the user's
  in-modes are the conjugates of the canonical out-modes and vice versa.
  Write the canonical scattering as ``phi_j = in_j + sum_o S_oj out_o``;
  conjugating, ``phi_j* = sum_o S_oj* in'_o + out'_j`` in the user's labels,
  i.e. the in-amplitudes ``S* e_j`` produce the out-amplitudes ``e_j``:
  ``S' S* = 1``.  With pseudo-unitarity ``S^dagger eta_out S = eta_in`` this is

      S' = (S*)^(-1) = eta_in S^T eta_out,

  rows of S' indexed by the user's out-modes (= conjugated canonical
  in-modes, norms eta_in), columns by the user's in-modes (= conjugated
  canonical out-modes, norms eta_out).  ``S'^dagger eta_in S' = eta_out``
  follows, so the residual is unchanged.

For a white hole the Hawking channel is the time reverse of the black hole's
out-going long-wavelength mode: the long-wavelength **in**-mode on the
subsonic side.  ``hawking_index`` then is a column of S; alpha and beta are
the amplitudes of that in-mode on the out-modes of the same and of the
opposite norm, ``thermal_ratio = |beta/alpha|^2`` equals the black hole's
of the time-reversed flow (``extra["hawking_channel_of_S"] = "column"``).

References
----------
.. [1] J. Macher, R. Parentani, Phys. Rev. D 79 (2009) 124008 (white-hole
   flows as time reverses of black-hole flows; their Bogoliubov coefficients).
"""
from dataclasses import replace

import numpy as np

from .bogoliubov import hawking_figures
from ..errors import ScatteringError


def map_mode(m, transform, time_reversed):
    """The user's Mode for a canonical Mode m (see the module docstring)."""
    sk, sx = transform
    k = complex(m.k)
    if time_reversed:
        k = k.conjugate()
    k = sk * k
    data = dict(m.data)
    nh = data.get("near_horizon")
    if nh is not None:
        nk = complex(nh["k"])
        nk = sk * (nk.conjugate() if time_reversed else nk)
        data["near_horizon"] = {"k": nk, "x": sx * float(nh["x"]), "group_velocity": sk * nh["group_velocity"]}
    direction = m.direction
    if time_reversed and direction in ("in", "out"):
        direction = "out" if direction == "in" else "in"
    return replace(m, k=k, x=None if m.x is None else sx * float(m.x), group_velocity=sk * m.group_velocity,
                   direction=direction, data=data)


def time_reverse_S(S, eta_in, eta_out):
    """``eta_in S^T eta_out``: the S-matrix of the time-reversed flow (module docstring).

    Works for numpy arrays of complex or of mpmath numbers (object arrays).

    Examples
    --------
    >>> S = np.array([[2.0, 3.0**0.5], [3.0**0.5, 2.0]])      # eta = (1, -1): S^T eta S = eta
    >>> time_reverse_S(S, [1, -1], [1, -1]).tolist() == [[2.0, -3.0**0.5], [-3.0**0.5, 2.0]]
    True
    """
    S = np.asarray(S)
    if S.shape[0] != S.shape[1]:
        raise ScatteringError(f"time reversal needs as many in- as out-modes, got S of shape {S.shape}")
    ei = np.diag(np.asarray(eta_in, dtype=float))
    eo = np.diag(np.asarray(eta_out, dtype=float))
    if S.dtype == object:
        n = S.shape[0]
        return np.array([[eta_in[i] * S[j, i] * eta_out[j] for j in range(n)] for i in range(n)], dtype=object)
    return ei @ S.T @ eo


def oriented_figures(S, in_modes, out_modes, omega, kappa, orientation):
    """Hawking figures in the user's orientation: for a white hole from the time-reversed (black-hole) form."""
    if orientation is None or not orientation.time_reversed:
        return hawking_figures(S, in_modes, out_modes, omega, kappa)
    eta_in = [m.norm for m in in_modes]
    eta_out = [m.norm for m in out_modes]
    Sb = time_reverse_S(S, eta_in, eta_out)
    ins = [map_mode(m, (1, 1), True) for m in out_modes]
    outs = [map_mode(m, (1, 1), True) for m in in_modes]
    fig = hawking_figures(Sb, ins, outs, omega, kappa)
    h = fig["hawking_index"]
    col = np.asarray(S)[:, h]
    fig["others"] = {f"{j}:{out_modes[j].name}": complex(col[j]) for j in range(len(out_modes))}
    fig["beta"] = -fig["beta"]          # eta_in[jb] eta_out[h] = -1 for the opposite norm
    return fig


def map_result(res, orientation):
    """The canonical model's ScatteringResult in the user's orientation.

    For a horizonless flow (``orientation.hole == "none"``, transform from
    ``Orientation.at_turning_point``) the sides are the flow's x -> +-infinity
    ends in the user's x, so parity also exchanges exterior and interior.
    """
    tr = orientation.time_reversed
    tf = orientation.transform
    horizonless = orientation.hole == "none"
    swap = {"exterior": "interior", "interior": "exterior"} if horizonless and orientation.parity else {}

    def user(m):
        m = map_mode(m, tf, tr)
        return replace(m, side=swap.get(m.side, m.side)) if swap else m
    if tr:
        eta_in = [m.norm for m in res.in_modes]
        eta_out = [m.norm for m in res.out_modes]
        S = time_reverse_S(res.S, eta_in, eta_out)
        ins = [user(m) for m in res.out_modes]
        outs = [user(m) for m in res.in_modes]
        others = {f"{j}:{outs[j].name}": complex(S[j, res.hawking_index]) for j in range(len(outs))} \
            if res.hawking_index is not None else {}
        extra = dict(res.extra) if horizonless else dict(res.extra, hawking_channel_of_S="column")
        if "S_mp" in extra:
            Smp = np.array(extra["S_mp"], dtype=object)
            extra["S_mp"] = time_reverse_S(Smp, eta_in, eta_out).tolist()
        beta = -res.beta
        msg = (res.message + "; white hole: S from the time-reversed black hole, S' = eta_in S^T eta_out; the "
               "Hawking channel is the long-wavelength in-mode (column hawking_index)")
    else:
        S = res.S
        ins = [user(m) for m in res.in_modes]
        outs = [user(m) for m in res.out_modes]
        others = dict(res.others)
        extra = dict(res.extra)
        beta = res.beta
        msg = res.message + "; mirror image (x -> -x) of the canonical black hole"
    if horizonless:
        what = {(1, -1): "mirror image and time reverse", (-1, -1): "mirror image", (-1, 1): "time reverse"}[tf]
        msg = res.message + f"; computed for the {what} of the flow and mapped back to the user's x"
    extra["canonical_result"] = res
    out = replace(res, in_modes=ins, out_modes=outs, S=S, others=others, beta=beta, message=msg, extra=extra)
    out.convention = orientation
    return out


def canonical_and_map(model):
    """``(canonical model, function mapping its results to the user's orientation)``.

    Models without an ``orientation`` (or already canonical) map to themselves;
    the results then only get their ``convention`` field set.  A horizonless
    model is refused here: it has no near-horizon S-matrix (ScatteringError).
    """
    o = getattr(model, "orientation", None)
    if o is not None and o.hole == "none":
        raise ScatteringError("a horizonless flow has no near-horizon S-matrix; use model.scatter(omega) (at its "
                              "dispersive turning point) or contourkit.direct.scatter (full profile)")
    if o is None or o.canonical:
        def same(res):
            res.convention = o
            return res
        return model, same
    return model.canonical_model(), lambda res: map_result(res, o)
