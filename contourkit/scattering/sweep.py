"""Frequency continuation of the near-horizon geometry, for fast spectra.

A spectrum asks for the S-matrix at many nearby frequencies.  What the
geometry contributes to it is made of integers: the intersection numbers and
sheet shifts of the basis contours with the dual (ascent) paths, the loop
(entry sheet and winding) of each long-wavelength mode, and the mode labels.
They stay fixed while omega moves unless a saddle crosses a Stokes line or
two modes coalesce (a cut-off).  So :func:`contourkit.scattering.scatter`
traces the geometry once, and this module follows it in omega:

* the singular points k_j, exponents nu_j and polynomial part Q come from
  the near-horizon equation derived once with omega symbolic
  (:mod:`contourkit.scattering.family`);
* the critical points at the same positions X on each side (roots of the
  critical polynomial ``i x B + i A - B'``) are matched one to one with the
  previous ones, and their logarithms ``log(k - k_j)`` are continued along
  the move;
* flux constants (closed form, modes.py) and S are evaluated anew at the
  working precision, with the same precision escalation as scatter.

Every continued frequency is checked, and traced afresh (scatter) when a
check fails: singular points and critical points must match one to one with
moves small against the distances to the singular points; each mode keeps its
kind, far labels and near-horizon labels (:mod:`contourkit.scattering.labels`); the
valleys keep their directions; and the S-matrix must
conserve the norm (unitarity residual below the same threshold as scatter's
success flag).  The decomposition stays exact (integers and analytic
constants); only the work of tracing paths is saved.

References
----------
.. [1] M. V. Berry, Proc. R. Soc. A 422 (1989) 7 (Stokes lines: the
   coefficients of a thimble decomposition change only where a saddle
   connection forms).
"""
import cmath
from dataclasses import replace

import mpmath
import numpy as np

from ..geometry import phase
from ..geometry.decompose import coefficient
from .family import Family, Frame, Lost, _TooFar, _separation, family
from .labels import _flux_sign, _label, growth_kind, turning_mode
from .modes import ModeData, branch_constant_at, saddle_constant_at
from .results import Mode


class SideState:
    """What a side's geometry contributes, in a form that can be followed in omega.

    Attributes
    ----------
    X : float                 position (horizon at 0) where the modes are read
    xg : complex              perturbed position of the geometry (decompose.geometry_x)
    crit : ndarray            critical points at xg
    logs : list of ndarray    their logarithms log(k - k_j) (the sheets)
    modes : list of ModeData  mode templates (labels, loops, far labels)
    coeffs : list             per basis contour, (n, index, crossings) as from decompose
    label_x : float or None   position of the near-horizon labels
    """

    def __init__(self, X, xg, crit, logs, modes, coeffs, label_x):
        self.X, self.xg, self.crit, self.logs = X, xg, np.asarray(crit), [np.asarray(v) for v in logs]
        self.modes, self.coeffs, self.label_x = modes, coeffs, label_x


def _follow_side(frame, side, kj_old):
    """Critical points, logs and mode labels of one side at the frame's frequency."""
    new = frame.critical_points(side.xg)
    if new.size != side.crit.size:
        raise Lost("the number of critical points changed")
    kj = frame._kj
    shift = kj - kj_old
    sep = _separation(kj_old)
    match = []
    for i, s in enumerate(side.crit):
        # critical points next to a singular point move with it
        j = int(np.argmin(np.abs(s - kj_old))) if kj.size else -1
        guess = s + (shift[j] if j >= 0 and abs(s - kj_old[j]) < 0.25 * sep else 0)
        match.append(int(np.argmin(np.abs(new - guess))))
    if len(set(match)) != len(match):
        raise _TooFar("critical points could not be matched")
    crit = new[match]
    logs = []
    for i, (s0, s1) in enumerate(zip(side.crit, crit)):
        if kj.size:
            ratio = (s1 - kj) / (s0 - kj_old)
            if np.max(np.abs(ratio - 1)) > 0.5:
                raise _TooFar("a critical point moved too far against a singular point")
            logs.append(side.logs[i] + np.log(ratio))
        else:
            logs.append(side.logs[i])
    return crit, logs


def _relabel(frame, side, crit):
    """Mode templates at the new frequency, labelled by the rule of modes.catalogue.

    Kinds and far labels (at X) must not change.  The near-horizon root of
    each propagating mode (``mode.data["near_horizon"]``) is followed in
    omega: the real root at the labelling position nearest to the previous
    one on the same branch (same flux direction; it must stand out from the
    others), or, for a mode that turns back before the labelling position,
    its turning point (modes.turning_mode).  A mode whose near-horizon root
    disappears (two roots meeting at the labelling position) turns back from
    then on, if no other near-horizon root is left unclaimed.  The labels are
    then those of the near-horizon root when its norm differs from the far
    mode's, as in modes._near_label_plan; any change of the final labels
    against the previous frequency stops the following (traced afresh).
    """
    X = side.X
    sd = "exterior" if X > 0 else "interior"
    roots = frame.roots_np(X)
    kj = frame._kj
    out, prop = [], []
    for md in side.modes:
        m0 = md.mode
        if md.branch >= 0:
            kb = kj[md.branch]
            k_far = roots[int(np.argmin(np.abs(roots - kb)))]
            propagating = abs(kb.imag) <= 1e-12 * max(1.0, abs(kb))
            k_mode, origin = complex(kb), "branch point"
        else:
            k_far = complex(roots[int(np.argmin(np.abs(roots - crit[md.index])))])
            propagating = abs(k_far.imag) <= 1e-9 * max(1.0, abs(k_far))
            k_mode, origin = k_far, "saddle"
        if not propagating:
            kind = growth_kind(k_mode, X)
            if kind != m0.kind:
                raise Lost("a mode changed kind")
            out.append(ModeData(md.index, Mode(sd, "none", 0, kind, k_mode, origin=origin, x=X), None, md.branch))
            continue
        if m0.kind != "propagating":
            raise Lost("a mode became propagating")
        far = _label(sd, k_far.real, X, frame.np, origin)
        if (far.direction, far.norm) != (md.far.direction, md.far.norm):
            raise Lost("a mode changed its far labels")
        m = replace(far, data={})
        m.k = k_mode
        out.append(ModeData(md.index, m, None, md.branch, loop=md.loop, far=far))
        prop.append((len(out) - 1, m0, far, k_far.real))
    if side.label_x is not None:
        for pos, near in _near_modes(frame, side, prop, sd).items():
            m, m0, far = out[pos].mode, side.modes[pos].mode, out[pos].far
            m.data["near_horizon"] = {"k": near.k, "x": near.x, "group_velocity": near.group_velocity}
            if near.norm != far.norm:
                m.norm, m.direction, m.group_velocity, m.x = near.norm, near.direction, near.group_velocity, near.x
            if (m.norm, m.direction) != (m0.norm, m0.direction):
                raise Lost("a mode changed its near-horizon labels")
    return out


def _near_modes(frame, side, prop, sd):
    """Near-horizon Mode of every propagating mode (position in the side's list -> Mode); see _relabel."""
    lx = side.label_x
    rts = frame.roots_np(lx)
    rts = rts[np.abs(rts.imag) <= 1e-9 * np.maximum(1.0, np.abs(rts))].real
    near = [_label(sd, float(r), lx, frame.np, "near horizon") for r in rts]
    claimed, out, lost = set(), {}, []
    for pos, m0, far, k_far in prop:
        nh = m0.data.get("near_horizon")
        if nh is None:
            raise Lost("a mode has no near-horizon root to follow")
        if nh["x"] != lx:
            continue
        same = [q for q in range(len(near)) if _flux_sign(near[q]) == _flux_sign(far)]
        if not same:
            lost.append((pos, nh, far))
            continue
        d = sorted((abs(near[q].k.real - nh["k"].real), q) for q in same)
        if d[0][0] > 0.1 * (1 + abs(nh["k"])):
            lost.append((pos, nh, far))
            continue
        if (len(d) > 1 and d[1][0] < 3 * d[0][0]) or d[0][1] in claimed:
            raise Lost("the near-horizon root cannot be followed unambiguously")
        claimed.add(d[0][1])
        out[pos] = near[d[0][1]]
    if lost and len(claimed) < len(near):
        raise Lost("a near-horizon root disappeared while others are unclaimed")
    for pos, m0, far, k_far in prop:
        nh = m0.data["near_horizon"]
        if nh["x"] == lx and pos not in {p for p, _, _ in lost}:
            continue
        # a mode that turns back before the labelling position: follow (or find) its turning point
        m = turning_mode(frame.np, sd, nh["k"].real, nh["x"] if nh["x"] != lx else 1.001 * lx, side.X,
                         -_flux_sign(far))
        if m is None or abs(m.x) <= abs(lx):
            raise Lost("the turning point of a mode could not be followed")
        out[pos] = m
    return out


def follow(family, state, omega):
    """Continue a traced state to omega.

    Parameters
    ----------
    family : Family
    state : dict with keys ``omega`` (its frequency), ``kj`` (singular
        points, numpy), ``q0`` (leading coefficient of Q), ``sides`` (two
        SideState) and ``terms`` (the terms of the basis contours)
    omega : float

    Returns
    -------
    frame, new state, side constant function ``f(dps) -> (modes_e, N_e, modes_i, N_i)``

    Raises
    ------
    Lost if a check fails.
    """
    frame, new = _advance(family, state, float(omega), 0)
    sides = new["sides"]

    def constants(dps):
        out = []
        for side in sides:
            out.extend(side_constants(frame, side, state["terms"], dps))
        return tuple(out)
    return frame, new, constants


def _advance(family, state, omega, depth):
    """Frame and state at omega, halving the step in omega where points move too far to be matched."""
    try:
        return _step(family, state, omega)
    except _TooFar:
        if depth >= 8:
            raise
        _, mid = _advance(family, state, 0.5 * (state["omega"] + omega), depth + 1)
        return _advance(family, mid, omega, depth + 1)


def _step(family, state, omega):
    frame = Frame(family, omega)
    frame.order_like(state["kj"])
    if frame._Q.size < 3 or abs(cmath.phase(frame._Q[0] / state["q0"])) > 0.05:
        raise Lost("the valleys moved")
    sides = []
    for side in state["sides"]:
        crit, logs = _follow_side(frame, side, state["kj"])
        modes = _relabel(frame, side, crit)
        new = SideState(side.X, side.xg, crit, logs, modes, side.coeffs, side.label_x)
        new._crossings = getattr(side, "_crossings", None)     # the same integers (fastpath cache)
        sides.append(new)
    return frame, dict(state, kj=frame._kj.copy(), q0=frame._Q[0], sides=sides, omega=omega)


def side_constants(frame, side, terms, dps):
    """Flux constants of a side's modes and its coefficient matrix N at dps digits."""
    mods = []
    with mpmath.workdps(dps + 15):
        data = frame.mp_data(dps + 5)
        for md in side.modes:
            c = None
            if md.mode.kind == "propagating":
                s = side.crit[md.index]
                sm = mpmath.mpc(s)
                ls = phase.to_mp_logs(side.logs[md.index], data, sm, s)
                if md.branch >= 0:
                    ds1 = abs(frame.ds1(data[1][md.branch]))
                    c = branch_constant_at(data, md.branch, sm, ls, ds1, md.loop)
                else:
                    c = saddle_constant_at(data, frame._coeffs()[1], sm, ls)
            mods.append(ModeData(md.index, md.mode, c, md.branch, loop=md.loop, far=md.far))
    with mpmath.workdps(dps + 10):
        nu = frame.mp_data(dps)[2]
        N = mpmath.matrix(len(mods), len(terms))
        for c, (tm, cf) in enumerate(zip(terms, side.coeffs)):
            for n, i, cl in cf:
                N[i, c] = coefficient(None, tm, cl, nu, lambda z: mpmath.expjpi(2 * z))
    return mods, N


__all__ = ["Family", "Frame", "Lost", "SideState", "family", "follow", "side_constants"]
