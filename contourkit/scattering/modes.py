"""WKB mode catalogue on each side of the horizon, from the thimble decomposition.

At a position x far from the horizon (|x| large in the linearised model)
every critical point of ``i k x + E(k)`` is one WKB mode:

* a critical point next to a branch point k_b (it approaches k_b like 1/x)
  is a long-wavelength mode with k -> k_b; its thimble is a Hankel loop
  around k_b, evaluated by Watson's lemma;
* any other critical point is a saddle mode with k(x) a root of the local
  dispersion relation D(k; x) = 0: propagating for real k, else growing or
  decaying (growing away from the horizon: Im k < 0 on the exterior x > 0,
  Im k > 0 on the interior x < 0).

For real k: group velocity ``v_g = -(dD/dk)/(dD/domega)``, norm sign
``sign(dD/domega)``, in/out from sign(v_g) and the side, read where the
linearised profile still describes the background (:mod:`contourkit.scattering.labels`).  The flux
normalisation ``|a|^2 |dD/dk| = 1/(2 pi)`` fixes, for each thimble, the
constant ``c = lim |I_sigma(x)| sqrt(2 pi |dD/dk|)``: the number of unit-flux
quanta that the thimble carries.  It is computed as an exact limit:

* saddle modes: the limit x -> infinity of the leading saddle-point term
  ``|I| = exp(Re Phi(s)) sqrt(2 pi / |Phi''(s)|)``, which is closed form:
  ``c = 2 pi sqrt(exp(2 Re E(k)) |sigma1(k)|)`` at any real k of the stretch
  (and sheet) the saddle runs along, because that product is constant there;
* branch modes: with ``z = k - k_b``, the Hankel loop of ``z^nu e^{i x z}``
  entering along the valley direction ``theta`` with ``arg z = alpha`` and
  leaving with ``arg z = alpha + Delta`` (``Delta = +-2 pi``) is
  ``(e^{i theta}/|x|) |x|^(-nu) Gamma(nu + 1) e^{i nu alpha} (e^{i nu Delta} - 1)``,
  so ``c^2 = 2 pi |sigma1'(k_b)| |Gamma(nu+1)|^2 e^{-2 Im(nu) alpha}
  |e^{i nu Delta} - 1|^2 |h(k_b)|^2 |x|^(-2 Re nu - 1)``, independent of x
  for the self-adjoint value Re nu = -1/2.

References
----------
.. [1] F. P. Bretherton, C. J. R. Garrett, Proc. R. Soc. A 302 (1968) 529
   (wave action: density ~ |a|^2 dD/domega, flux ~ |a|^2 dD/dk).
.. [2] NIST DLMF 2.4 (Watson's lemma, loop integrals) and 5.9.2 (Hankel's loop).
"""
import math
from dataclasses import dataclass, replace

import mpmath
import numpy as np
import sympy as sp

from ..geometry import phase
from ..symbolic._sym import exact, mp_value
from ..errors import ScatteringError
from .labels import _label, _near_horizon_labels, _side, growth_kind
from .results import Mode
from ..geometry.saddles import polish
from ..symbolic._sym import KS as K



@dataclass
class ModeData:
    """A mode at one side, tied to the critical point (thimble) that carries it.

    Attributes
    ----------
    index : int        critical point index in the geometry
    mode : Mode        labels (side, direction, norm, kind, k, group velocity)
    constant : mpf     flux constant c (None for growing/decaying modes)
    branch : int       singular-point index for long-wavelength modes, else -1
    loop : tuple       (m_in, n) of the Hankel loop of a long-wavelength mode (branch_constant_at)
    far : Mode         labels at geom.x before the near-horizon relabelling (propagating modes)
    """
    index: int
    mode: Mode
    constant: object
    branch: int
    loop: tuple = None
    far: Mode = None


class DispersionDerivatives:
    """Numeric D, dD/dk and dD/domega of the linearised model at one frequency.

    D = sigma0(k) + x sigma1(k) is the Weyl symbol of the near-horizon equation;
    dD/domega comes from the model's linearised symmetric coefficients, turned
    into a function of (k, x, omega) once per model and cached on it.
    """

    def __init__(self, model, omega, eq):
        self._dDdw = self.dDdw_function(model)
        self.omega = mp_value(exact(float(omega)), 30)
        s0, s1 = eq.weyl_symbol
        self.s0 = sp.Poly(s0, K)
        self.s1 = sp.Poly(s1, K)
        n = max(self.s0.degree(), self.s1.degree()) + 1
        self._c0 = [sp.Integer(0)] * (n - len(self.s0.all_coeffs())) + self.s0.all_coeffs()
        self._c1 = [sp.Integer(0)] * (n - len(self.s1.all_coeffs())) + self.s1.all_coeffs()
        self.s0_np = np.array([complex(c) for c in self._c0])
        self.s1_np = np.array([complex(c) for c in self._c1])
        self._mp = {}

    @staticmethod
    def dDdw_function(model):
        """dD/domega of the linearised model as an mpmath function of (k, x, omega), cached on the model."""
        cache = getattr(model, "_dDdw_cache", None)
        if cache is None:
            X, w = sp.Symbol("x"), sp.Symbol("omega")
            Dw = sum((a + b * X) * (sp.I * K) ** m for m, (a, b) in enumerate(model._lin))
            cache = sp.lambdify((K, X, w), sp.diff(Dw, w), "mpmath")
            model._dDdw_cache = cache
        return cache

    def _coeffs(self):
        dps = mpmath.mp.dps
        if dps not in self._mp:
            c0 = [mp_value(c, dps) for c in self._c0]
            c1 = [mp_value(c, dps) for c in self._c1]
            self._mp[dps] = (c0, c1, _polyder(c0), _polyder(c1))
        return self._mp[dps]

    def D(self, k, x):
        c0, c1, _, _ = self._coeffs()
        return mpmath.polyval(c0, k) + x * mpmath.polyval(c1, k)

    def dDdk(self, k, x):
        _, _, d0, d1 = self._coeffs()
        return mpmath.polyval(d0, k) + x * mpmath.polyval(d1, k)

    def ds1(self, k):
        return mpmath.polyval(self._coeffs()[3], k)

    def dDdw(self, k, x):
        return self._dDdw(k, x, self.omega)

    def roots(self, x, dps=30):
        with mpmath.workdps(dps + 5):
            c0, c1, _, _ = self._coeffs()
            coeffs = [a + mpmath.mpf(x) * b for a, b in zip(c0, c1)]
        while len(coeffs) > 1 and coeffs[0] == 0:
            coeffs = coeffs[1:]
        rough = np.roots([complex(c) for c in coeffs])
        return polish(coeffs, rough, dps)


def catalogue(rep, geom, dd, *, dps, branch_radius=0.1, label_x=None):
    """One ModeData per critical point of the geometry at x = geom.x (|x| large).

    Flux constants are those of the far region (x); the labels of every
    propagating mode, saddle or branch point, are those of the near-horizon
    mode it continues to at ``label_x`` (same side, default geom.x), where
    the linearised profile still describes the background (see
    :func:`_near_horizon_labels`): far out the linear model can flip the
    norm and direction of a mode together, while its flux constant and flux
    direction do not change.
    """
    x = geom.x
    side = _side(x)
    kj = rep._kj
    out, far_k = [], []
    roots = dd.roots(x, dps)
    for i, s in enumerate(geom.crit):
        b = -1
        if kj.size:
            d = np.abs(s - kj)
            j = int(np.argmin(d))
            others = np.abs(kj - kj[j])
            others = others[others > 0]
            scale = float(np.min(others)) if others.size else max(1.0, abs(kj[j]))
            # next to an essential singular point the critical points are saddle modes (p + 1 of them)
            if d[j] < branch_radius * scale and rep.singularities[j].kind != "essential":
                b = j
        if b >= 0:
            kb = kj[b]
            r = min(roots, key=lambda z: abs(complex(z) - kb))
            if abs(kb.imag) > 1e-12 * max(1.0, abs(kb)):
                kind = growth_kind(kb, x)
                out.append(ModeData(i, Mode(side, "none", 0, kind, complex(kb), origin="branch point", x=x), None, b))
                far_k.append(None)
                continue
            m = _label(side, mpmath.mpf(float(mpmath.re(r))), x, dd, "branch point")
            m.k = complex(kb)
            far_k.append(float(mpmath.re(r)))
            c, loop = _branch_constant(rep, geom, i, b, dd, dps)
            out.append(ModeData(i, m, c, b, loop=loop, far=replace(m, data={})))
        else:
            r = min(roots, key=lambda z: abs(complex(z) - s))
            rc = complex(r)
            if abs(rc.imag) <= 1e-9 * max(1.0, abs(rc)):
                m = _label(side, mpmath.mpf(rc.real), x, dd, "saddle")
                m.k = rc
                far_k.append(rc.real)
                out.append(ModeData(i, m, _saddle_constant(rep, geom, i, dd, dps), -1, far=replace(m, data={})))
            else:
                kind = growth_kind(rc, x)
                out.append(ModeData(i, Mode(side, "none", 0, kind, rc, origin="saddle", x=x), None, -1))
                far_k.append(None)
    _near_horizon_labels(out, far_k, x, label_x, dd)
    return out


def _branch_constant(rep, geom, i, b, dd, dps):
    """Flux constant of the long-wavelength mode at branch point b (exact large-x limit).

    The loop's entry sheet (alpha) and orientation (Delta) are read off the
    traced thimble where its arms leave the saddle's neighbourhood.  When
    |nu| is large the thimble stays close to its saddle (the integrand is
    sharply peaked) and the arms never get far enough; then the candidate
    (alpha, Delta) whose exact value is closest to the saddle-point estimate
    of the same thimble is taken (candidates differ by factors
    exp(2 pi |Im nu|), the estimate is good to O(1/|nu|)).
    """
    t = geom.thimbles[i]
    x = geom.x
    kb0 = rep._kj[b]
    theta = loop_entry(rep._nu[b], t.sigma - kb0)
    r0 = abs(t.sigma - kb0)

    def local_arg(arm):
        # arg(k - k_b) where the arm has left the saddle's neighbourhood but is still local
        d = np.abs(arm.k - kb0)
        idx = np.nonzero(d > 20 * r0)[0]
        return arm.logs[int(idx[0])][b].imag if idx.size else None
    a_in, a_out = local_arg(t.minus), local_arg(t.plus)
    with mpmath.workdps(dps + 10):
        data = rep.mp_data(dps)
        nu = data[2][b]
        if abs(mpmath.re(nu) + mpmath.mpf(1) / 2) > mpmath.mpf(10) ** (-12):
            raise ScatteringError(f"the exponent {complex(nu):.6g} at {rep.singularities[b].point} has real part "
                                  f"!= -1/2: the model is not formally self-adjoint there and the flux of the "
                                  f"long-wavelength mode is not conserved")
        sig = mpmath.mpc(t.sigma)
        ls = phase.to_mp_logs(t.plus.logs[0], data, sig, t.sigma)
        ds1 = abs(dd.ds1(data[1][b]))

        if a_in is None or a_out is None:
            # arms that end close to the saddle: their last vertices still show the winding if any
            e_in, e_out = t.minus.logs[-1][b].imag, t.plus.logs[-1][b].imag
            if abs(abs(e_out - e_in) - 2 * math.pi) < 0.5 * math.pi:
                a_in, a_out = e_in, e_out
        if a_in is not None and a_out is not None:
            m_in = round((a_in - theta) / (2 * math.pi))
            m_out = round((a_out - theta) / (2 * math.pi))
            if abs(m_out - m_in) != 1:
                raise ScatteringError(f"the thimble at the branch point {rep.singularities[b].point} does not "
                                      f"encircle it (winding {m_out - m_in}); the geometry at "
                                      f"x = {x} is not asymptotic yet")
            loop = (m_in, m_out - m_in)
            return branch_constant_at(data, b, sig, ls, ds1, loop), loop
        # saddle-point estimate of the same thimble at x: |I| sqrt(2 pi |dD/dk|)
        xm = mpmath.mpf(x)
        Phi = phase.phi_mp(data, xm, sig, ls)
        f2 = _phi_derivs(data, xm, sig)[0]
        est = mpmath.exp(2 * mpmath.re(Phi)) * 2 * mpmath.pi / abs(f2) * 2 * mpmath.pi * abs(dd.dDdk(sig, xm))
        m0 = round((float(mpmath.im(ls[b])) - theta) / (2 * math.pi))
        cands = []
        for m_in in range(m0 - 2, m0 + 3):
            for n in (1, -1):
                c = branch_constant_at(data, b, sig, ls, ds1, (m_in, n))
                cands.append((abs(float(mpmath.log(c ** 2 / est))), c, (m_in, n)))
        cands.sort(key=lambda c: c[0])
        # (m, +2 pi) and (m + 1, -2 pi) are the same loop: keep distinct values only
        uniq = []
        for c in cands:
            if not any(abs(c[1] / u[1] - 1) < 1e-9 for u in uniq):
                uniq.append(c)
        cands = uniq
        if cands[0][0] > 0.5 or (len(cands) > 1 and cands[1][0] - cands[0][0] < 3):
            raise ScatteringError(f"could not identify the loop of the long-wavelength mode at "
                                  f"{rep.singularities[b].point} (exponent {complex(nu):.4g}) at x = {x}")
        return cands[0][1], cands[0][2]


def loop_entry(nu, z):
    """The valley direction theta = +-pi/2 of the Hankel loop at a branch point, from its saddle.

    Near k_b the integrand is ``z^nu e^{a z}`` with ``a = i x + g'(k_b)``
    (g the rest of the exponent); the saddle sits at ``z = -nu / a``.  The loop
    enters from ``arg z = +pi/2`` where Im a > 0, from ``-pi/2`` where Im a < 0.
    Far out ``a ~ i x`` and this is the sign of x; close in, ``g'(k_b)`` (large
    where the exponents are, as at slowly varying turning points) can set it.
    """
    return math.pi / 2 if (-complex(nu) / complex(z)).imag > 0 else -math.pi / 2


def branch_constant_at(data, b, sig, ls, ds1, loop):
    """Flux constant of the Hankel loop at singular point b (module docstring), in mpmath.

    data : (Q, kj, nu, ess) at the working precision; sig, ls : a point near
    k_b and the logs there (the sheet); ds1 : |sigma1'(k_b)|; loop : (m_in, n)
    with entry argument alpha = theta + 2 pi m_in and winding Delta = 2 pi n, the
    valley direction theta = +-pi/2 from the saddle (:func:`loop_entry`).
    """
    Q, kjm, num, ess = data
    nu, kb = num[b], kjm[b]
    lb = phase.continue_logs_mp(data, sig, ls, kb + (sig - kb) * mpmath.eps)
    # h(k_b): everything but the (k - k_b)^nu factor and e^{i k_b x} (modulus one for real k_b)
    logh = (mpmath.polyval(Q, kb) if Q else 0)
    for j in range(len(kjm)):
        if j != b:
            logh += num[j] * lb[j]
        for p, c in enumerate(ess[j], start=1):
            logh += c * (kb - kjm[j]) ** (-p)
    pref = 2 * mpmath.pi * ds1 * mpmath.exp(2 * mpmath.re(logh)) * abs(mpmath.gamma(nu + 1)) ** 2
    alpha = (mpmath.pi / 2 if loop_entry(nu, sig - kb) > 0 else -mpmath.pi / 2) + 2 * mpmath.pi * loop[0]
    c2 = pref * mpmath.exp(-2 * mpmath.im(nu) * alpha) * abs(mpmath.expj(2 * mpmath.pi * nu * loop[1]) - 1) ** 2
    return mpmath.sqrt(c2)


def _saddle_constant(rep, geom, i, dd, dps):
    """Flux constant of a propagating saddle mode, in closed form.

    With ``E' = i sigma0/sigma1 - sigma1'/(2 sigma1)`` (fourier.py, Weyl form),
    ``F(k) = exp(2 Re E(k)) |sigma1(k)|`` has ``d ln F/dk = 2 Re(i sigma0/sigma1) = 0``
    on real stretches free of singular points (sigma0, sigma1 real there), so F
    is constant along the stretch and on the sheet that the thimble's saddle
    sits on.  As x -> infinity the saddle runs along that stretch, ``Phi''`` tends
    to ``-i dx/dk = i (dD/dk)/sigma1`` on the root of D = 0, and the leading
    saddle term gives ``c^2 = |I|^2 2 pi |dD/dk| -> (2 pi)^2 F``: the exact
    large-x limit, read off at the real point below the saddle.
    """
    t = geom.thimbles[i]
    with mpmath.workdps(dps + 15):
        data = rep.mp_data(dps + 5)
        s = mpmath.mpc(t.sigma)
        logs = phase.to_mp_logs(t.plus.logs[0], data, s, t.sigma)
        return saddle_constant_at(data, dd._coeffs()[1], s, logs)


def saddle_constant_at(data, s1, s, logs):
    """``2 pi sqrt(F)`` at the real point below the saddle s (logs: its branch at s); see _saddle_constant."""
    kr = mpmath.mpf(mpmath.re(s))
    lr = phase.continue_logs_mp(data, s, logs, kr)
    E = phase.phi_mp(data, 0, kr, lr)
    return 2 * mpmath.pi * mpmath.sqrt(mpmath.exp(2 * mpmath.re(E)) * abs(mpmath.polyval(s1, kr)))


def _phi_derivs(data, x, k):
    Q, kj, nu, ess = data
    d2 = mpmath.polyval(_polyder(_polyder(Q)), k) if len(Q) > 2 else mpmath.mpf(0)
    d3 = mpmath.polyval(_polyder(_polyder(_polyder(Q))), k) if len(Q) > 3 else mpmath.mpf(0)
    for j in range(len(kj)):
        z = k - kj[j]
        d2 -= nu[j] / z ** 2
        d3 += 2 * nu[j] / z ** 3
        for p, c in enumerate(ess[j], start=1):
            d2 += p * (p + 1) * c * z ** (-p - 2)
            d3 -= p * (p + 1) * (p + 2) * c * z ** (-p - 3)
    return d2, d3


def _polyder(c):
    n = len(c) - 1
    return [c[i] * (n - i) for i in range(n)] if n > 0 else [mpmath.mpf(0)]
