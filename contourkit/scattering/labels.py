"""Labels of WKB modes: side, in/out, norm sign, and the near-horizon root each far mode continues to.

For a real root k of the local dispersion relation D(k; x) = 0: group
velocity ``v_g = -(dD/dk)/(dD/domega)``, norm sign ``sign(dD/domega)``, in
or out from sign(v_g) and the side.  Far from the horizon the linearised
model can flip a mode's norm and direction together (its flow speed grows
without bound, a resonance frequency squared passes through zero); the
labels are therefore read where the linearised profile still describes the
background (see :func:`_near_horizon_labels`), following each root in x
(:func:`_track_root`) or, where it turns back first, at its turning point
(:func:`turning_mode`).

References
----------
.. [1] F. P. Bretherton, C. J. R. Garrett, Proc. R. Soc. A 302 (1968) 529
   (wave action: density ~ |a|^2 dD/domega, flux ~ |a|^2 dD/dk).
"""
import math

import mpmath
import numpy as np

from ..errors import ScatteringError
from .results import Mode


def _side(x):
    return "exterior" if x > 0 else "interior"


def growth_kind(k, x):
    """"growing" or "decaying" for a complex wavenumber at x: growing away from the horizon
    (Im k < 0 on the exterior x > 0, Im k > 0 on the interior)."""
    return "growing" if (k.imag < 0) == (x > 0) else "decaying"


def _label(side, k, x, dd, origin):
    """Mode labels for a real wavenumber k at x."""
    dk = complex(dd.dDdk(k, x))
    dw = complex(dd.dDdw(k, x))
    if dw == 0:
        raise ScatteringError(f"dD/domega vanishes for the mode k = {complex(k):.6g} at x = {x}: its norm is zero")
    vg = -dk.real / dw.real
    toward = vg < 0 if side == "exterior" else vg > 0
    return Mode(side=side, direction="in" if toward else "out", norm=1 if dw.real > 0 else -1,
                kind="propagating", k=complex(k), group_velocity=vg, origin=origin, x=x)


def _horner(c, z):
    """Polynomial value by Horner's rule for a short list of Python numbers (faster than np.polyval)."""
    v = 0.0
    for a in c:
        v = v * z + a
    return v


def turning_mode(dd, side, k, x, x_far, dk_sign):
    """Labels of a mode that turns back at a turning point near (k, x), read just outside it.

    The turning point (k_t, x_t) solves D = dD/dk = 0 (Newton's method in the
    two real unknowns, double precision, from the last real point (k, x) of
    the tracked root).  The labels are read at ``x_b = 1.01 x_t`` (towards the
    far region) on the root of the mode's own branch (the sign of dD/dk along a branch
    does not change before the turning point: ``dk_sign``), so that the
    group velocity is definite and does not depend on the tracking steps.
    Returns the Mode at (k_b, x_b), or None if Newton's method fails.
    """
    s0, s1 = np.real(dd.s0_np), np.real(dd.s1_np)
    d0, d1 = np.polyder(s0), np.polyder(s1)
    dd0, dd1 = np.polyder(d0), np.polyder(d1)
    c0, c1, e0, e1, f0, f1 = ([float(v) for v in a] for a in (s0, s1, d0, d1, dd0, dd1))
    kt, xt = float(k), float(x)
    for _ in range(200):
        vs1, vd1 = _horner(c1, kt), _horner(e1, kt)
        F1 = _horner(c0, kt) + xt * vs1
        F2 = _horner(e0, kt) + xt * vd1
        a, b = F2, vs1
        c, d = _horner(f0, kt) + xt * _horner(f1, kt), vd1
        det = a * d - b * c
        if det == 0 or not math.isfinite(det):
            return None
        dk, dx = (F1 * d - b * F2) / det, (a * F2 - c * F1) / det
        damp = min(1.0, 0.05 * (1 + abs(x)) / max(abs(dx), 1e-300), 0.05 * (1 + abs(k)) / max(abs(dk), 1e-300))
        dk, dx = damp * dk, damp * dx
        kt, xt = kt - dk, xt - dx
        if abs(dk) <= 1e-13 * (1 + abs(kt)) and abs(dx) <= 1e-13 * (1 + abs(xt)):
            break
    else:
        return None
    if abs(xt - x) > 0.2 * abs(x) or abs(kt - k) > 0.2 * (1 + abs(k)) or not abs(xt) < abs(x_far):
        return None              # not the turning point where the tracked root left the real axis
    xb = 1.01 * xt                     # 1% further from the horizon, towards the far region
    roots = np.roots(np.polyadd(s0, xb * s1))
    roots = roots[np.abs(roots.imag) <= 1e-9 * np.maximum(1.0, np.abs(roots))].real
    if roots.size < 2:
        return None
    pair = roots[np.argsort(np.abs(roots - kt))[:2]]
    own = [r for r in pair if np.sign(np.polyval(d0, r) + xb * np.polyval(d1, r)) == dk_sign]
    if len(own) != 1:
        return None
    return _label(side, float(own[0]), float(xb), dd, "")


def _track_root(dd, r, x_from, x_to, dps=None, steps=80):
    """Follow a real root of D(k; x) from x_from towards x_to (same sign) along its branch.

    At each step the real roots of the polynomial are computed and the one
    nearest to the previous root with the same sign of dD/dk is taken: along a
    real branch dD/dk vanishes only at a turning point, so where two real
    roots cross (a mode that decouples from the profile) the branch is the
    one that keeps its flux direction.  Stops where no such root is left (a
    turning point: the mode does not exist closer in); returns the root and
    the position where it was last real.  Double precision: only the signs
    of dD/dk and dD/domega there are used.
    """
    r = complex(r).real
    last = (complex(r), x_from)
    s0, s1 = dd.s0_np, dd.s1_np
    d0, d1 = np.polyder(s0), np.polyder(s1)
    sign0 = np.sign((np.polyval(d0, r) + x_from * np.polyval(d1, r)).real)
    for t in range(1, steps + 1):
        x = x_from * (x_to / x_from) ** (t / steps)
        c = np.polyadd(s0, x * s1)
        dc = np.polyadd(d0, x * d1)
        while len(c) > 1 and c[0] == 0:
            c = c[1:]
        roots = np.roots(c)
        real = [z.real for z in roots if abs(z.imag) <= 1e-7 * (1 + abs(z))]
        cands = []
        for z in real:
            for _ in range(3):                      # polish
                dz = _horner(dc, z)
                if dz == 0:
                    break
                z = (z - _horner(c, z) / dz).real
            if np.sign(_horner(dc, z).real) == sign0:
                cands.append(z)
        if not cands:
            break
        rn = min(cands, key=lambda z: abs(z - r))
        if abs(rn - r) > 0.5 * abs(r) + 1e-12 * (1 + abs(r)) + 1e-300:
            break
        r = rn
        last = (complex(r), x)
    return last


def _flux_sign(m):
    """Direction of the conserved (wave-action) flux of a mode along x: sign(norm * v_g) = -sign(dD/dk)."""
    return m.norm * (1 if m.group_velocity > 0 else -1)


def _relabel(md, near, labels):
    """Record the near-horizon mode of md (and take its labels when ``labels``)."""
    md.mode.data["near_horizon"] = {"k": near.k, "x": near.x, "group_velocity": near.group_velocity}
    if labels:
        md.mode.norm, md.mode.direction = near.norm, near.direction
        md.mode.group_velocity, md.mode.x = near.group_velocity, near.x


def _near_horizon_labels(out, far_k, x, label_x, dd):
    """Give each propagating far mode the labels (norm, direction) of the near-horizon mode it continues to.

    Far out the linearised profile stops describing the background (a flow's
    speed grows without bound, a resonance frequency squared passes through
    zero), which can flip a mode's norm and direction together; the flux
    direction sign(norm v_g) = -sign(dD/dk) and the flux constant do not
    change.  Boundary conditions (which modes are in-modes) belong to the
    near-horizon region, so labels are read at ``label_x``:

    * a real root that can be followed from x to label_x takes the labels of
      the near-horizon root it reaches when its norm differs there (the
      artefact flips norm and direction together; otherwise far labels stand);
    * roots that turn complex on the way (a turning point or a coalescence
      between x and label_x) are matched with the near-horizon real roots
      that no followed root reached, by flux direction, the one label that a
      flux-conserving connection cannot change.  The match must be unique
      (same numbers of each flux direction, one label per direction), else
      ScatteringError.  If no near-horizon root is left over, the mode turns
      back before the near-horizon region and keeps the labels at the last
      point where its root is real.

    Each labelled mode records its near-horizon root in
    ``mode.data["near_horizon"]`` (keys k, x, group_velocity).
    """
    if label_x is None or label_x == x:
        return
    key = (x, label_x, tuple(far_k))
    cache = dd.__dict__.setdefault("_near_labels", {})   # labels do not depend on the working precision
    if key not in cache:
        cache[key] = _near_label_plan(far_k, x, label_x, dd)
    for i, near, take in cache[key]:
        _relabel(out[i], near, take)


def _near_label_plan(far_k, x, label_x, dd):
    """(position, near-horizon Mode, take its labels) for the propagating far modes; see above."""
    side = _side(x)
    near = []
    for r in dd.roots(label_x, 20):
        rc = complex(r)
        if abs(rc.imag) <= 1e-9 * max(1.0, abs(rc)):
            near.append(_label(side, mpmath.mpf(rc.real), label_x, dd, "near horizon"))
    far = {i: _label(side, mpmath.mpf(k), x, dd, "") for i, k in enumerate(far_k) if k is not None}
    claimed, pending, plan, unmatched = set(), [], [], []
    tracked = []
    for i, fm in far.items():
        r, xl = _track_root(dd, far_k[i], x, label_x)
        if abs(xl - label_x) > 1e-9 * abs(label_x) or not near:
            pending.append((i, r, xl))
            continue
        # along a real branch dD/dk keeps its sign (it vanishes only at turning points), so the
        # flux direction picks the branch where two near-horizon roots are close together
        same = [q for q in range(len(near)) if _flux_sign(near[q]) == _flux_sign(fm)]
        j = min(same, key=lambda q: abs(near[q].k - r)) if same else -1
        tracked.append((i, r, xl, j))
    counts = {}
    for _, _, _, j in tracked:
        counts[j] = counts.get(j, 0) + 1
    for i, r, xl, j in tracked:
        if abs(xl - label_x) > 1e-9 * abs(label_x):
            pending.append((i, r, xl))        # turned complex after a crossing: a turning mode
            continue
        if j < 0 or counts[j] > 1 or abs(near[j].k - r) > 0.1 * max(1.0, abs(r)):
            # two real roots that cross (a mode that decouples from the profile, as the
            # counter-propagating wave does for v + c constant) or a root that ends next to a root
            # of the other flux direction: matched below by flux direction, the label a
            # flux-conserving connection cannot change
            pending.append((i, r, xl))
            unmatched.append(i)
            continue
        claimed.add(j)
        plan.append((i, near[j], near[j].norm != far[i].norm))
    free = [m for j, m in enumerate(near) if j not in claimed]
    if not free and unmatched:
        # a root that met another one on the way (crossing) and has no near-horizon root left: it is
        # the partner of a mode that turns back, with the opposite flux direction, at the same
        # turning point (two real branches of opposite dD/dk meet there)
        turning = [(i, r, xl) for i, r, xl in pending if i not in unmatched]
        paired = {}
        for i in unmatched:
            cands = [t for t in turning if _flux_sign(far[t[0]]) != _flux_sign(far[i]) and t[0] not in paired.values()]
            if not cands:
                raise ScatteringError(f"the root k = {far_k[i]:.6g} at x = {x} does not continue to a distinct "
                                      f"near-horizon root at x = {label_x}; the mode cannot be labelled")
            paired[i] = cands[0][0]
        pos = {t[0]: t for t in pending}
        pending = [(i, pos[paired[i]][1], pos[paired[i]][2]) if i in paired else (i, r, xl) for i, r, xl in pending]
    if not free:
        for i, r, xl in pending:
            last = turning_mode(dd, side, complex(r).real, float(xl), x, -_flux_sign(far[i]))
            if last is None:
                last = _label(side, mpmath.mpf(complex(r).real), float(xl), dd, "")
            plan.append((i, last, last.norm != far[i].norm))
        return plan
    want = sorted(_flux_sign(far[i]) for i, _, _ in pending)
    have = sorted(_flux_sign(m) for m in free)
    groups = {g: {(m.norm, m.direction) for m in free if _flux_sign(m) == g} for g in set(have)}
    if not pending:
        raise ScatteringError(f"on the {side} side {len(free)} propagating mode(s) next to the horizon have no "
                              f"propagating continuation in the far region of the linearised model (their "
                              f"wavenumbers turn complex there: the linearised profile leaves the physical range, "
                              f"e.g. a squared wave speed that turns negative), so the near-horizon method cannot "
                              f"label them; use contourkit.direct.scatter on the full profile")
    if want != have or any(len(g) != 1 for g in groups.values()):
        raise ScatteringError(f"on the {side} side {len(pending)} far-region mode(s) of the linearised model do "
                              f"not continue to propagating modes next to the horizon (their wavenumbers turn "
                              f"complex on the way) and their flux directions do not match the remaining "
                              f"near-horizon modes one to one: the linearised model's far region is not a "
                              f"continuation of the near-horizon region; use contourkit.direct.scatter on the "
                              f"full profile")
    for i, _, _ in pending:
        plan.append((i, next(m for m in free if _flux_sign(m) == _flux_sign(far[i])), True))
    return plan

