"""Frequency continuation of the near-horizon geometry, for fast spectra.

A spectrum asks for the S-matrix at many nearby frequencies.  What the
geometry contributes to it is made of integers: the intersection numbers and
sheet shifts of the basis contours with the dual (ascent) paths, the loop
(entry sheet and winding) of each long-wavelength mode, and the mode labels.
They stay fixed while omega moves unless a saddle crosses a Stokes line or
two modes coalesce (a cut-off).  So :func:`contourkit.scattering.scatter`
traces the geometry once, and this module follows it in omega:

* the singular points k_j, exponents nu_j and polynomial part Q come from
  the near-horizon equation derived once with omega symbolic (sympy), as
  numbers at the working precision (mpmath): ``nu_j = (i A - B')/B'`` at the
  simple zeros of B, ``Q' = quotient of (i A - B') by B``;
* the critical points at the same positions X on each side (roots of the
  critical polynomial ``i x B + i A - B'``) are matched one to one with the
  previous ones, and their logarithms ``log(k - k_j)`` are continued along
  the move;
* flux constants (closed form, modes.py) and S are evaluated anew at the
  working precision, with the same precision escalation as scatter.

Every continued frequency is checked, and traced afresh (scatter) when a
check fails: singular points and critical points must match one to one with
moves small against the distances to the singular points; each mode keeps its
kind and far labels; the valleys keep their directions; and the S-matrix must
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
import sympy as sp

from . import phase
from .decompose import coefficient
from ._sym import mp_value
from .modes import (DispersionDerivatives, ModeData, _flux_sign, _horner, _label, branch_constant_at,
                    saddle_constant_at, turning_mode)
from .results import Mode
from .saddles import polish

K = sp.Symbol("k")


class Lost(Exception):
    """The geometry cannot be continued to this frequency (internal: scatter traces it afresh)."""


class _TooFar(Lost):
    """The step in omega is too large to match points one to one (follow takes smaller steps)."""


def family(model):
    """The model's Family, derived once and cached on the model (dropped when the model is pickled)."""
    fam = getattr(model, "_family_cache", None)
    if fam is None:
        fam = Family(model)
        model._family_cache = fam
    return fam


class Family:
    """The near-horizon equation of a model with omega symbolic: coefficient lists of A and B in k."""

    def __init__(self, model):
        from .horizon import OMEGA
        from .symmetric import from_symmetric
        X = model.x
        left = from_symmetric([sp.expand(a + b * X) for a, b in model._lin], X)
        a = [sp.expand(c).subs(X, 0) for c in left]
        b = [sp.expand(sp.diff(c, X)) for c in left]
        A = sp.expand(sum(c * (sp.I * K) ** j for j, c in enumerate(a)))
        B = sp.expand(sum(c * (sp.I * K) ** j for j, c in enumerate(b)))
        n = max(sp.degree(A, K), sp.degree(B, K)) + 1
        # coefficients of k^p as polynomials in omega (exact numbers), highest power of k first
        self._exact = []
        for P in (A, B):
            rows = []
            for p in range(n - 1, -1, -1):
                c = sp.expand(P.coeff(K, p))
                if not c.is_polynomial(OMEGA):
                    raise Lost(f"the coefficient {c} of k^{p} is not polynomial in omega")
                rows.append([sp.Poly(c, OMEGA).coeff_monomial(OMEGA ** e) for e in range(_deg(c, OMEGA) + 1)])
            self._exact.append(rows)
        self._mp = {}
        m = max(len(r) for rows in self._exact for r in rows)
        self.ext = np.zeros((2, n, m), dtype=np.clongdouble)      # [A or B, power of k, power of omega]
        for t, rows in enumerate(self._exact):
            for i, r in enumerate(rows):
                for e, c in enumerate(r):
                    self.ext[t, i, e] = _to_ext(c)
        X, W = sp.Symbol("x"), sp.Symbol("omega")
        Dw = sum((a + b * X) * (sp.I * K) ** m for m, (a, b) in enumerate(model._lin))
        self.dDdw_np = sp.lambdify((K, X, W), sp.diff(Dw, W), "numpy")
        self.model = model

    def ext_AB(self, w):
        """Coefficients of A and B (highest power of k first) at omega = w, extended precision."""
        v = np.zeros(self.ext.shape[:2], dtype=np.clongdouble)
        for e in range(self.ext.shape[2] - 1, -1, -1):
            v = v * w + self.ext[:, :, e]
        return v[0], v[1]

    def mp_AB(self, w):
        """Coefficients of A and B at omega = w, at the current mpmath precision."""
        dps = mpmath.mp.dps
        if dps not in self._mp:
            self._mp[dps] = [[[mp_value(c, dps) for c in r] for r in rows] for rows in self._exact]
        out = []
        for rows in self._mp[dps]:
            out.append([mpmath.polyval(r[::-1], w) if r else mpmath.mpf(0) for r in rows])
        return out[0], out[1]


def _deg(c, w):
    return sp.Poly(c, w).degree() if c != 0 else 0


def _to_ext(c):
    """An exact sympy number as np.clongdouble (through a 25-digit decimal string)."""
    re, im = (sp.Float(v, 25) for v in sp.N(c, 30).as_real_imag())
    return np.longdouble(str(re)) + 1j * np.longdouble(str(im))


def _polyder(c):
    n = len(c) - 1
    return [c[i] * (n - i) for i in range(n)] if n > 0 else [mpmath.mpf(0)]


def _trim(c):
    c = list(c)
    while len(c) > 1 and c[0] == 0:
        c = c[1:]
    return c


def _polydiv(num, den):
    num, den = list(num), _trim(den)
    if len(num) < len(den):
        return [mpmath.mpf(0)]
    q = []
    for i in range(len(num) - len(den) + 1):
        f = num[i] / den[0]
        q.append(f)
        for j in range(len(den)):
            num[i + j] -= f * den[j]
    return q


class Frame(DispersionDerivatives):
    """Analytic data of the near-horizon equation at one frequency, from a Family (no sympy work).

    Provides what the constants and labels need: ``mp_data(dps)`` in the order
    of the reference singular points (``perm``), the numpy arrays ``_kj``,
    ``_nu``, ``_Q``, and the dispersion derivatives of DispersionDerivatives.
    """

    def __init__(self, family, omega, perm=None):
        self.family = family
        self.model = family.model
        # omega is read as the decimal the user typed (as model.mode_equation does: _sym.exact)
        self._w_text = repr(float(omega))
        self._w_mp = {}
        self.omega_ext = np.longdouble(self._w_text)
        self._dDdw = DispersionDerivatives.dDdw_function(self.model)
        self._mp = {}
        self._data = {}
        self.perm = perm
        # double-precision data (numpy); mpmath data on demand (mp_data)
        A, B = family.ext_AB(self.omega_ext)
        A, B = A.astype(complex), B.astype(complex)
        Bp = np.concatenate([[0], np.polyder(B)]) if B.size > 1 else np.zeros_like(B)
        self.s0_np, self.s1_np = A + 0.5j * Bp, B
        self._B_np, self._N_np = B, 1j * A - Bp
        Bt = np.trim_zeros(B, "f")
        q = _quotient(self._N_np, Bt)
        self._Q = np.trim_zeros(np.polyint(q), "f") if np.any(q) else np.zeros(0, complex)
        kj = np.roots(Bt) if Bt.size > 1 else np.zeros(0, complex)
        dB = np.polyder(Bt) if Bt.size > 1 else np.zeros(1, complex)
        for _ in range(2):
            kj = kj - np.polyval(Bt, kj) / np.polyval(dB, kj)
        d = np.polyval(dB, kj)
        if kj.size and np.min(np.abs(d)) < 1e-8 * np.max(np.abs(Bt)):
            raise Lost("a multiple zero of B (essential singularity)")
        nu = np.polyval(self._N_np, kj) / d
        if kj.size and np.min(np.abs(nu)) < 1e-8:
            raise Lost("an ordinary point among the zeros of B")
        self._kj_raw, self._nu_raw = kj, nu
        self.np = _Numeric(self, family)

    @property
    def omega(self):
        """omega at the current mpmath precision (used by DispersionDerivatives.dDdw)."""
        return self.omega_mp(mpmath.mp.dps)

    def omega_mp(self, dps):
        if dps not in self._w_mp:
            with mpmath.workdps(dps):
                self._w_mp[dps] = mpmath.mpf(self._w_text)
        return self._w_mp[dps]

    def _AB(self):
        return self.family.mp_AB(self.omega_mp(mpmath.mp.dps))

    @staticmethod
    def _weyl(A, B):
        Bp = [mpmath.mpf(0)] + _polyder(B)
        return [a + mpmath.j * b / 2 for a, b in zip(A, Bp)], B

    @staticmethod
    def _N(A, B):
        Bp = [mpmath.mpf(0)] + _polyder(B)
        return [mpmath.j * a - b for a, b in zip(A, Bp)]

    def _coeffs(self):
        dps = mpmath.mp.dps
        if dps not in self._mp:
            A, B = self._AB()
            c0, c1 = self._weyl(A, B)
            self._mp[dps] = (c0, c1, _polyder(c0), _polyder(c1))
        return self._mp[dps]

    def _raw(self, dps):
        with mpmath.workdps(dps + 10):
            A, B = self._AB()
            N = self._N(A, B)
            Bt = _trim(B)
            q = _polydiv(N, Bt)
            Q = [c / (len(q) - i) for i, c in enumerate(q)] + [mpmath.mpf(0)] if any(q) else []
            Q = _trim(Q) if Q else []
            kj, nu = [], []
            if len(Bt) > 1:
                roots = polish(Bt, np.roots([complex(c) for c in Bt]), dps + 5)
                Bp = _polyder(Bt)
                scale = max(abs(c) for c in Bt)
                for r in roots:
                    d = mpmath.polyval(Bp, r)
                    if abs(d) < mpmath.mpf(10) ** (-dps // 2) * scale:
                        raise Lost("a multiple zero of B (essential singularity)")
                    v = mpmath.polyval(N, r) / d
                    if abs(v) < mpmath.mpf(10) ** (-dps // 2):
                        raise Lost("an ordinary point among the zeros of B")
                    kj.append(r)
                    nu.append(v)
        return Q, kj, nu, [[] for _ in kj]

    def order_like(self, kj_ref):
        """Match the singular points one to one with kj_ref (nearest, well separated); sets perm."""
        kr = np.asarray(kj_ref, dtype=complex)
        if kr.size != self._kj_raw.size:
            raise Lost("the number of singular points changed")
        if kr.size == 0:
            self.perm = []
            return
        perm = [int(np.argmin(np.abs(self._kj_raw - k))) for k in kr]
        if len(set(perm)) != len(perm):
            raise _TooFar("singular points could not be matched")
        sep = _separation(kr)
        if np.max(np.abs(self._kj_raw[perm] - kr)) > 0.25 * sep:
            raise _TooFar("the singular points moved too far")
        self.perm = perm

    @property
    def _kj(self):
        return self._kj_raw[self.perm]

    @property
    def _nu(self):
        return self._nu_raw[self.perm]

    def mp_data(self, dps):
        dps = int(dps)
        if dps not in self._data:
            Q, kj, nu, ess = self._raw(dps)
            self._data[dps] = (Q, [kj[p] for p in self.perm], [nu[p] for p in self.perm], ess)
        return self._data[dps]

    def critical_points(self, x):
        return _polished_roots(np.polyadd(1j * x * self._B_np, self._N_np))

    def roots_np(self, x):
        return _polished_roots(np.polyadd(self.s0_np, x * self.s1_np))


class _Numeric:
    """dD/dk and dD/domega of a frame in double precision (for mode labels)."""

    def __init__(self, frame, family):
        self.s0_np, self.s1_np = frame.s0_np, frame.s1_np
        self._d0 = [complex(v) for v in np.polyder(frame.s0_np)]
        self._d1 = [complex(v) for v in np.polyder(frame.s1_np)]
        self._f, self._w = family.dDdw_np, float(frame.omega_ext)

    def dDdk(self, k, x):
        return _horner(self._d0, k) + x * _horner(self._d1, k)

    def dDdw(self, k, x):
        return complex(self._f(k, x, self._w))


def _quotient(num, den):
    """Quotient of polynomial division (coefficient arrays, highest power first)."""
    num = np.array(num, dtype=complex)
    q = np.zeros(max(num.size - den.size + 1, 1), dtype=complex)
    for i in range(num.size - den.size + 1):
        q[i] = num[i] / den[0]
        num[i:i + den.size] -= q[i] * den
    return q


def _polished_roots(c):
    """np.roots with one Newton step (double precision)."""
    c = c[int(np.argmax(c != 0)):]
    r = np.roots(c)
    d = np.polyval(np.polyder(c), r)
    return np.where(d != 0, r - np.polyval(c, r) / np.where(d != 0, d, 1), r)


def _separation(pts):
    pts = np.asarray(pts, dtype=complex)
    if pts.size < 2:
        return max(1.0, float(np.max(np.abs(pts)))) if pts.size else 1.0
    d = np.abs(pts[:, None] - pts[None, :])
    return float(np.min(d[d > 0])) if np.any(d > 0) else 1.0


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
            kind = "growing" if (k_mode.imag < 0) == (X > 0) else "decaying"
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
        sides.append(SideState(side.X, side.xg, crit, logs, modes, side.coeffs, side.label_x))
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
                    c = branch_constant_at(data, md.branch, sm, ls, ds1, side.X, md.loop)
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


__all__ = ["Family", "Frame", "Lost", "SideState", "follow", "side_constants"]
