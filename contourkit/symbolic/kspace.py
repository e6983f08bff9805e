"""The k-space representation of a mode equation with coefficients linear in x.

For ``L = sum (a_n + b_n x) d^n`` with left symbol ``A(k) + x B(k)`` the ansatz
``phi(x) = integral_C exp(i k x) f(k) dk`` and ``x -> i d/dk`` give the
first-order equation

    i B(k) f'(k) + (A(k) + i B'(k)) f(k) = 0,

solved by ``f = exp(E(k))`` with ``E' = (i A - B')/B``.  For the rational E'
the exponent is closed form by partial fractions,

    E(k) = Q(k) + sum_j [ nu_j log(k - k_j) + sum_m c_jm (k - k_j)^(-m) ],

a polynomial Q plus logarithms at the zeros k_j of B (branch points, poles
or zeros of f) and, at multiple zeros of B, essential singularities.
Valleys at infinity are the sectors where ``Re Q -> -infinity``.

References
----------
.. [1] NIST DLMF 9.5.4 (Airy: E = i k^3/3), 10.9 (Bessel: branch points
   +-1 with exponent -1/2), 13.4.4 (Kummer U: exponents a-1 and b-a-1).
"""
import cmath
import math

import mpmath
import numpy as np
import sympy as sp

from . import extensions
from ._sym import KS as K, I, mp_value
from ..errors import ContourError, InputError



def _clean(v):
    """Cheap canonical form of an exact number (much faster than sympy.simplify)."""
    v = sp.expand(v)
    if v.is_number and v.has(sp.Pow):
        v = sp.expand(sp.radsimp(v))
    return v


def laurent_part(r, B, kj, m):
    """The exponent and the essential coefficients of ``r/B`` at a zero k_j of B of order m.

    With ``h = (k - k_j)^m r/B`` (analytic at k_j), ``r/B = sum_l a_l (k - k_j)^(l - m)`` +
    analytic, ``a_l = h^(l)(k_j)/l!``.  The residue ``nu = a_(m-1)`` multiplies
    ``log(k - k_j)`` in E, and ``a_(m-1-p) (k - k_j)^-(p+1)`` integrates to
    ``c_p (k - k_j)^-p`` with ``c_p = -a_(m-1-p)/p``.  Shared by the numeric
    representation and the symbolic formulas (parameters as symbols).

    Returns
    -------
    (nu, [c_1, ..., c_P])
        P < m, trailing zero coefficients dropped (so c_P != 0).
    """
    quo, _ = sp.div(sp.Poly(sp.expand(B), K), sp.Poly((K - kj) ** m, K))
    hl = r / quo.as_expr()
    a = []
    for ll in range(m):
        a.append(_clean(hl.subs(K, kj)) / sp.factorial(ll))
        if ll < m - 1:
            hl = sp.diff(hl, K)
    ess = [_clean(-a[m - 1 - p] / p) for p in range(1, m)]
    while ess and _clean(ess[-1]) == 0:
        ess.pop()
    return _clean(a[m - 1]), ess


def _roots_with_multiplicity(B):
    """Exact roots of the polynomial B (sympy Poly) with multiplicities; numeric where needed."""
    out = []
    for fac, mult in sp.sqf_list(B.as_expr(), K)[1]:
        p = sp.Poly(fac, K)
        d = p.degree()
        if d == 0:
            continue
        if d <= 2:
            rts = sp.roots(p, multiple=True)
        else:
            rts = []
            try:
                rdict = sp.roots(p, filter=None)
                if sum(rdict.values()) == d and all(len(str(r)) < 400 and not any(
                        pw.exp.is_Rational and pw.exp.q > 2 for pw in r.atoms(sp.Pow)) for r in rdict):
                    # Cardano radicals (cube roots) defeat zero tests in sympy's EX domain
                    # (PolynomialDivisionFailed below, or radsimp running for minutes): numeric roots
                    rts = [r for r, m in rdict.items() for _ in range(m)]
            except (NotImplementedError, sp.PolynomialError):  # pragma: no cover
                rts = []
            if not rts:
                rts = [sp.Float(r, 60) if r.is_real else sp.Float(sp.re(r), 60) + I * sp.Float(sp.im(r), 60)
                       for r in sp.Poly(p, K).nroots(n=60, maxsteps=400)]
        for r in rts:
            out.append((_clean(r), mult))
    # merge numerically equal roots (from different factors) keeping order
    merged = []
    for r, m in out:
        for i, (r2, m2) in enumerate(merged):
            if abs(complex(sp.N(r - r2, 30))) < 1e-25:
                merged[i] = (r2, m2 + m)
                break
        else:
            merged.append((r, m))
    return merged


class Singularity:
    """A zero k_j of B(k): ``f ~ (k - k_j)^nu exp(sum_m c_m (k - k_j)^-m)``.

    Attributes
    ----------
    point : sympy number
    exponent : sympy number (nu_j, the residue of E')
    essential : list of sympy numbers (c_1, c_2, ...), empty if none
    kind : {"branch point", "pole", "zero", "regular", "essential"}
    valleys : list of Valley
        At an essential singular point with leading term ``c_p (k - k_j)^-p``:
        the p sectors ``|arg(k - k_j) - center| < pi/(2p)`` in which that
        factor decays as k -> k_j (contours may end there); empty otherwise.
    """

    def __init__(self, point, exponent, essential=()):
        self.point = point
        self.exponent = exponent
        self.essential = list(essential)
        nu = complex(sp.N(exponent, 30))
        self.nu = nu
        self.k = complex(sp.N(point, 30))
        self.valleys = []
        if self.essential:
            self.kind = "essential"
            p = len(self.essential)                  # laurent_part drops trailing zeros: c_p != 0
            c = complex(sp.N(self.essential[-1], 30))
            # Re(c e^{-i p theta}) < 0 around arg c - p theta = pi (mod 2 pi)
            self.valleys = [Valley(m, (cmath.phase(c) - math.pi + 2 * math.pi * m) / p, math.pi / (2 * p))
                            for m in range(p)]
        elif abs(nu.imag) < 1e-14 and abs(nu.real - round(nu.real)) < 1e-14:
            n = round(nu.real)
            self.kind = "pole" if n < 0 else ("zero" if n > 0 else "regular")
        else:
            self.kind = "branch point"

    def __repr__(self):
        return f"Singularity({self.kind} at {self.point}, exponent {self.exponent})"


class Valley:
    """A sector at infinity where the integrand decays.

    Attributes
    ----------
    index : int
    center : float      direction (radians) of fastest decay
    halfwidth : float   the sector is ``|arg k - center| < halfwidth``
    """

    def __init__(self, index, center, halfwidth):
        self.index = index
        self.center = float((center + math.pi) % (2 * math.pi) - math.pi)
        self.halfwidth = float(halfwidth)

    def contains(self, angle, margin=0.0):
        d = (angle - self.center + math.pi) % (2 * math.pi) - math.pi
        return abs(d) < self.halfwidth - margin

    def __repr__(self):
        return f"Valley({self.index}, center={self.center:.6g}, halfwidth={self.halfwidth:.6g})"


class KSpaceRepresentation:
    """The k-space form of a :class:`~contourkit.symbolic.equation.ModeEquation`.

    Attributes
    ----------
    equation : ModeEquation
    kspace_ode : sympy Eq   ``i B f' + (A + i B') f = 0``
    exponent : sympy expression E(k), ``f = exp(E)`` (additive constant dropped)
    dexponent : sympy expression E'(k), rational
    polynomial_part : sympy Poly Q(k)
    singularities : list of Singularity (the zeros of B where f is not analytic or vanishes)
    ordinary_zeros : list of points
        Zeros of B where f is analytic and nonzero (exponent 0): not singular
        points of f, but ends of half-line solutions (the boundary term
        ``B f e^{ikx}`` vanishes there).
    branch_points : list of (point, exponent) pairs for non-integer exponents
    poles : list of (point, order)
    essential_singularities : list of points
    valleys : list of Valley of exp(E) alone (empty if deg Q <= 1)
    cut_angle : float  every branch cut runs from its point in this direction
    branch_cuts : list of (point, angle)

    Examples
    --------
    >>> import sympy as sp, contourkit as ck
    >>> x = sp.Symbol("x"); y = sp.Function("y")
    >>> rep = ck.ModeEquation.from_ode(y(x).diff(x, 2) - x*y(x), y, x).fourier()
    >>> rep.exponent
    I*k**3/3
    >>> len(rep.valleys)
    3
    """

    def __init__(self, equation, *, cut_angle=-math.pi / 2):
        self.equation = equation
        self.order = equation.order
        A = sp.Poly(equation.A, K)
        B = sp.Poly(equation.B, K)
        self.A, self.B = A, B
        f = sp.Function("f")
        self.kspace_ode = sp.Eq(I * B.as_expr() * f(K).diff(K) + (A.as_expr() + I * B.diff(K).as_expr()) * f(K), 0,
                                evaluate=False)
        N = sp.Poly(I * A.as_expr() - B.diff(K).as_expr(), K)
        q, r = sp.div(N, B)
        self.dexponent = sp.together(N.as_expr() / B.as_expr())
        Qp = q
        Q = Qp.integrate() if not Qp.is_zero else sp.Poly(0, K)
        self.polynomial_part = Q
        sings = []
        if B.degree() > 0:
            for kj, m in _roots_with_multiplicity(B):
                sings.append(Singularity(kj, *laurent_part(r.as_expr(), B.as_expr(), kj, m)))
        # a zero of B where E' is analytic (exponent 0, no essential part) is an ordinary point of f
        self.ordinary_zeros = [s.point for s in sings if s.kind == "regular"]
        sings = [s for s in sings if s.kind != "regular"]
        self.singularities = sings
        # common factors of B and N = iA - B' give spurious x-independent roots of the critical
        # polynomial i x B + N (at the ordinary points dropped above): divide them out once
        G = sp.gcd(N, B)
        self._crit_B = np.array([complex(sp.N(c, 30)) for c in sp.div(B, G)[0].all_coeffs()], dtype=complex)
        self._crit_N = np.array([complex(sp.N(c, 30)) for c in sp.div(N, G)[0].all_coeffs()], dtype=complex)
        E = Q.as_expr()
        for s in sings:
            E += s.exponent * sp.log(K - s.point)
            for p, c in enumerate(s.essential, start=1):
                E += c * (K - s.point) ** (-p)
        self.exponent = sp.expand(E) if not sings else E
        self.cut_angle = float(cut_angle)
        self.branch_points = [(s.point, s.exponent) for s in sings if s.kind == "branch point"]
        self.poles = [(s.point, -round(s.nu.real)) for s in sings if s.kind == "pole"]
        self.essential_singularities = [s.point for s in sings if s.kind == "essential"]
        self.branch_cuts = [(s.point, self.cut_angle) for s in sings if s.kind in ("branch point", "essential")]
        # numeric data
        self._Q = np.array([complex(sp.N(c, 30)) for c in Q.all_coeffs()], dtype=complex)
        self._Qp = np.polyder(self._Q) if len(self._Q) > 1 else np.zeros(1, complex)
        self._kj = np.array([s.k for s in sings], dtype=complex)
        self._nu = np.array([s.nu for s in sings], dtype=complex)
        self._ess = [np.array([complex(sp.N(c, 30)) for c in s.essential], dtype=complex) for s in sings]
        self.degree_Q = Q.degree() if not Q.is_zero else -1
        self.valleys = self._valleys()
        self._callables = {}
        self._mp_cache = {}
        self._geom = {}

    # -- fast callables, generated once (on first use) from the sympy expressions
    def _callable(self, which, module):
        key = (which, module)
        if key not in self._callables:
            expr = self.exponent if which == "E" else self.dexponent
            self._callables[key] = sp.lambdify(K, expr, module)
        return self._callables[key]

    @property
    def E_numpy(self):
        """E(k) as a numpy function (principal logarithms, i.e. cuts along the negative real direction)."""
        return self._callable("E", "numpy")

    @property
    def dE_numpy(self):
        """E'(k) as a numpy function (single-valued)."""
        return self._callable("dE", "numpy")

    @property
    def E_mpmath(self):
        """E(k) as an mpmath function (principal logarithms)."""
        return self._callable("E", "mpmath")

    @property
    def dE_mpmath(self):
        """E'(k) as an mpmath function."""
        return self._callable("dE", "mpmath")

    # -- geometry at infinity -----------------------------------------
    def _valleys(self):
        q = self.degree_Q
        if q < 2:
            return []
        c = self._Q[0]
        hw = math.pi / (2 * q)
        return [Valley(m, (math.pi - cmath.phase(c) + 2 * math.pi * m) / q, hw) for m in range(q)]

    def valleys_at(self, x):
        """Valleys of the whole integrand exp(i k x + E(k)) at position x.

        For deg Q >= 2 these are the valleys of exp(E); otherwise the linear
        term ``(i x + Q_1) k`` defines one half-plane valley.
        """
        if self.degree_Q >= 2:
            return self.valleys
        c1 = self._Q[-2] if self.degree_Q == 1 else 0j
        lin = 1j * x + c1
        if abs(lin) == 0:
            raise ContourError(f"at x = {x} the integrand has no valley at infinity (the linear coefficient "
                               f"i x + Q1 vanishes): the contour integrals do not converge there; take x != {x}")
        return [Valley(0, math.pi - cmath.phase(lin), math.pi / 2)]

    @property
    def sum_of_exponents(self):
        """sum_j nu_j: the power of k in f at infinity (times exp(Q))."""
        return complex(np.sum(self._nu))

    # -- numeric evaluation -------------------------------------------
    def critical_polynomial(self, x):
        """Coefficients (highest first) of the polynomial whose roots are the critical points
        of ``i k x + E(k)``: ``i x B + i A - B'``."""
        x = complex(x)
        # i x B + i A - B' with the x-independent common factor gcd(B, iA - B') divided out
        return np.polyadd(1j * x * self._crit_B, self._crit_N)

    def _checked_dps(self, dps):
        if dps is None:
            return None
        if isinstance(dps, bool) or not isinstance(dps, (int, np.integer)):
            raise InputError(f"dps must be an integer number of decimal digits (5 to 5000) or None, got {dps!r}")
        if not 5 <= dps <= 5000:
            raise InputError(f"dps = {dps} is outside 5 <= dps <= 5000; ask for between 5 and 5000 digits "
                             f"(dps=None evaluates in double precision)")
        return int(dps)

    def mp_data(self, dps):
        """Polynomial and singularity data as mpmath numbers at dps digits."""
        dps = int(dps)
        if dps not in self._mp_cache:
            with mpmath.workdps(dps + 10):
                Q = [mp_value(c, dps) for c in self.polynomial_part.all_coeffs()]
                kj = [mp_value(s.point, dps) for s in self.singularities]
                nu = [mp_value(s.exponent, dps) for s in self.singularities]
                ess = [[mp_value(c, dps) for c in s.essential] for s in self.singularities]
            self._mp_cache[dps] = (Q, kj, nu, ess)
        return self._mp_cache[dps]

    def __repr__(self):
        from . import display
        return display.kspace_repr(self)

    def _repr_html_(self):
        from . import display
        return display.kspace_html(self)

    def _repr_latex_(self):
        from . import display
        return display.kspace_latex(self)

    # -- engine entry points (functional core in saddles/paths/quadrature)
    def saddles(self, x, *, dps=None):
        """Saddle points at x: roots of the local dispersion relation; see :func:`contourkit.geometry.saddles.saddles`."""
        return extensions.call("saddles", self, x, dps=dps)

    def basis(self, **kw):
        """Independent contours, as many as the order; see :func:`contourkit.geometry.contours.basis`."""
        return extensions.call("basis", self, **kw)

    def evaluate(self, contour, x, derivative=0, dps=None, **kw):
        """phi(x) = integral over contour of exp(i k x) f(k) dk; see :func:`contourkit.evaluation.quadrature.evaluate`."""
        return extensions.call("evaluate", self, contour, x, derivative=derivative, dps=dps, **kw)
