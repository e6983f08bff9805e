"""The near-horizon equation as a family in omega: numbers at one frequency without sympy work.

sympy derives the near-horizon equation once with omega symbolic
(:class:`Family`: the coefficients of A(k) and B(k) as polynomials in omega,
exact).  A :class:`Frame` evaluates them at one frequency, in numpy double
and extended precision and in mpmath at any precision, and gives what the
flux constants and labels need: the simple zeros k_j of B with exponents
``nu_j = (i A - B')/B'`` there, the polynomial part Q (``Q' = quotient of
(i A - B') by B``), the critical points at a position (roots of
``i x B + i A - B'``) and the roots of the local dispersion relation.  These
agree with the k-space representation derived at each omega (fourier.py);
tests/test_sweep.py checks that.

References
----------
.. [1] NIST DLMF 1.10 (Laurent series and residues at simple zeros).
"""
import mpmath
import numpy as np
import sympy as sp

from ..symbolic._sym import mp_value
from .labels import _horner
from .modes import DispersionDerivatives, _polyder
from ..geometry.saddles import polish
from ..symbolic._sym import KS as K



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
        from ..symbolic._sym import OMEGA
        from ..symbolic.symmetric import from_symmetric
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
        Dw = sp.expand(sp.diff(sum((a + b * X) * (sp.I * K) ** m for m, (a, b) in enumerate(model._lin)), W))
        # dD/domega = P0(k) + x P1(k): coefficient lists (highest power of k first) as functions of omega
        nk = sp.degree(Dw, K) + 1 if Dw.has(K) else 1
        if sp.degree(Dw, X) > 1:
            raise Lost("dD/domega is not linear in x")
        rows = [[Dw.coeff(X, q).coeff(K, p) if p else Dw.coeff(X, q).subs(K, 0) for p in range(nk - 1, -1, -1)]
                for q in (0, 1)]
        self.dDdw_coeffs = sp.lambdify(W, rows, "numpy")
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


def _trim(c):
    c = list(c)
    while len(c) > 1 and c[0] == 0:
        c = c[1:]
    return c


def quotient(num, den):
    """Quotient of polynomial division, coefficients highest power first (den without leading zeros).

    Plain arithmetic on the coefficients, so it serves mpmath lists and numpy
    arrays of any precision alike.
    """
    num = list(num)
    if len(num) < len(den):
        return [den[0] * 0]
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
        q = np.array(quotient(self._N_np, Bt), dtype=complex)
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
            q = quotient(N, Bt)
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
        self._w0, self._w1 = ([complex(v) for v in r] for r in family.dDdw_coeffs(float(frame.omega_ext)))

    def dDdk(self, k, x):
        return _horner(self._d0, k) + x * _horner(self._d1, k)

    def dDdw(self, k, x):
        return _horner(self._w0, k) + x * _horner(self._w1, k)


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
