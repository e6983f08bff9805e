"""Foundation: the k-space representation (closed-form exponent, singularities, valleys).

Every expected value is derived by hand in the docstring or comment of its test, from the
published integral representation named beside it (DLMF = NIST Digital Library of
Mathematical Functions, https://dlmf.nist.gov).
"""
import math
import warnings

import pytest
import sympy as sp

import contourkit as ck

X = sp.Symbol("x")
Y = sp.Function("y")
K = sp.Symbol("k")
I = sp.I


def _rep(expr):
    return ck.ModeEquation.from_ode(expr, Y, X).fourier()


def _bp(rep):
    """Branch points as {point: exponent} (exact sympy numbers)."""
    return {sp.nsimplify(p): e for p, e in rep.branch_points}


def _zero(expr):
    return sp.simplify(sp.expand(expr)) == 0


# ---------------------------------------------------------------------------- Airy
def test_airy_exponent_dlmf_9_5_4():
    """y'' - x y = 0.  A(k) = (ik)^2 = -k^2, B(k) = -1, so E' = (iA - B')/B = i k^2 and
    f = exp(i k^3/3): the integrand of Ai(x) = (1/2pi) int_R exp(i(k^3/3 + k x)) dk
    (DLMF 9.5.4 in its real-line form, i.e. 9.5.1 with the cosine written as exponentials)."""
    rep = _rep(Y(X).diff(X, 2) - X * Y(X))
    assert _zero(rep.dexponent - I * K ** 2)                       # DLMF 9.5.4
    assert sp.expand(rep.exponent - I * K ** 3 / 3) == 0           # DLMF 9.5.4
    assert rep.branch_points == []
    assert rep.singularities == [] and rep.poles == [] and rep.essential_singularities == []


def test_airy_three_valleys_at_the_right_angles():
    """Re(i k^3/3) = -r^3 sin(3 theta)/3 < 0  <=>  sin 3theta > 0: three sectors of
    half-width pi/6 centred at pi/6, 5pi/6, 3pi/2 (the valleys of DLMF 9.5.4's contour)."""
    rep = _rep(Y(X).diff(X, 2) - X * Y(X))
    assert len(rep.valleys) == 3
    centres = sorted(v.center % (2 * math.pi) for v in rep.valleys)
    for got, want in zip(centres, [math.pi / 6, 5 * math.pi / 6, 3 * math.pi / 2]):
        assert got == pytest.approx(want, abs=1e-12)
    for v in rep.valleys:
        assert v.halfwidth == pytest.approx(math.pi / 6, abs=1e-12)
        # the centre really decays and the boundary really does not
        assert math.sin(3 * v.center) == pytest.approx(1.0, abs=1e-12)
        assert abs(math.sin(3 * (v.center + v.halfwidth))) < 1e-12


# ---------------------------------------------------------------------------- Bessel
def test_bessel_branch_points_dlmf_10_9():
    """x y'' + y' + x y = 0.  A = (ik) (from y'), B = 1 + (ik)^2 = 1 - k^2.
    E' = (iA - B')/B = (-k + 2k)/(1 - k^2) = k/(1 - k^2), so f = (1 - k^2)^(-1/2)
    (DLMF 10.9: J0, Y0, H0 as integrals of e^{ixt} (1 - t^2)^(-1/2)): branch points
    +1 and -1, each with exponent -1/2."""
    rep = _rep(X * Y(X).diff(X, 2) + Y(X).diff(X) + X * Y(X))
    assert _bp(rep) == {1: sp.Rational(-1, 2), -1: sp.Rational(-1, 2)}     # DLMF 10.9
    # f is proportional to (1 - k^2)^(-1/2): E + log(1 - k^2)/2 has zero derivative
    assert _zero(sp.diff(rep.exponent + sp.log(1 - K ** 2) / 2, K))
    assert rep.valleys == []          # deg Q <= 1: no valleys of f alone
    assert rep.sum_of_exponents == pytest.approx(-1.0)


# ---------------------------------------------------------------------------- Kummer
KUMMER = [
    (sp.Rational(13, 10), sp.Rational(27, 10)),
    (sp.Rational(1, 3), sp.Rational(7, 4)),
    (sp.Rational(-13, 10), sp.Rational(1, 2)),
    (sp.Rational(1, 3) + I / 2, sp.Rational(5, 4) - I / 3),
    (sp.Rational(5, 2), sp.Rational(1, 7)),
]


@pytest.mark.parametrize("a,b", KUMMER)
def test_kummer_branch_points_dlmf_13_4_4(a, b):
    """z w'' + (b - z) w' - a w = 0.  A = -a + b (ik), B = -(ik) + (ik)^2 = -k(k + i).
    E' = (iA - B')/B = (-ia + i + (2 - b) k)/(-k (k + i)); residues:
    at k = 0:  (-ia + i)/(-i) = a - 1;   at k = -i:  (-ia + i - i(2 - b))/i = b - a - 1.

    DLMF 13.4.4: Gamma(a) U(a,b,z) = int_0^inf e^{-zt} t^(a-1) (1+t)^(b-a-1) dt.  With
    k = i t: e^{ikz} = e^{-zt}, k^(a-1) = i^(a-1) t^(a-1), (k + i) = i(1 + t): the same
    integrand up to a constant, branch points t = 0 (k = 0) and t = -1 (k = -i) with
    exponents a - 1 and b - a - 1.  Checked exactly: d/dt E(i t) equals
    (a-1)/t + (b-a-1)/(1+t)."""
    rep = _rep(X * Y(X).diff(X, 2) + (b - X) * Y(X).diff(X) - a * Y(X))
    bp = _bp(rep)
    assert set(bp) == {0, -I}
    assert _zero(bp[0] - (a - 1))                    # DLMF 13.4.4, exponent of t
    assert _zero(bp[-I] - (b - a - 1))               # DLMF 13.4.4, exponent of (1 + t)
    t = sp.Symbol("t", positive=True)
    d_dt = sp.diff(rep.exponent.subs(K, I * t), t)
    assert _zero(sp.together(d_dt - ((a - 1) / t + (b - a - 1) / (1 + t))))


@pytest.mark.parametrize("a,b", KUMMER)
def test_kummer_M_integrand_dlmf_13_4_1(a, b):
    """DLMF 13.4.1: M(a,b,z)/Gamma(b) = (Gamma(a) Gamma(b-a))^-1 int_0^1 e^{zt} t^(a-1)
    (1-t)^(b-a-1) dt.  Substitution k = -i t: e^{ikz} = e^{zt}, k^(a-1) = (-i)^(a-1) t^(a-1),
    k + i = i (1 - t).  So the same f maps onto the 13.4.1 integrand, the segment
    t in [0, 1] is the segment from k = 0 to k = -i between the two branch points, and the
    exponents are again a - 1 (at t = 0, k = 0) and b - a - 1 (at t = 1, k = -i).
    Checked: d/dt E(-i t) = (a-1)/t - (b-a-1)/(1-t); the (b - z) sign does not change."""
    rep = _rep(X * Y(X).diff(X, 2) + (b - X) * Y(X).diff(X) - a * Y(X))
    t = sp.Symbol("t", positive=True)
    d_dt = sp.diff(rep.exponent.subs(K, -I * t), t)
    assert _zero(sp.together(d_dt - ((a - 1) / t - (b - a - 1) / (1 - t))))


def test_kummer_ordinary_point_is_not_a_singularity():
    """a = 1/2, b = 3/2: b - a - 1 = 0, f = k^(-1/2) is analytic at k = -i, which is then
    neither a branch point nor a singular point of f (only B vanishes there)."""
    a, b = sp.Rational(1, 2), sp.Rational(3, 2)
    rep = _rep(X * Y(X).diff(X, 2) + (b - X) * Y(X).diff(X) - a * Y(X))
    assert _bp(rep) == {0: sp.Rational(-1, 2)}
    assert all(abs(s.k + 1j) > 1e-12 for s in rep.singularities)
    # and -i is no critical point of i k x + E(k) (it would be a spurious x-independent one)
    for xv in (0.3, 2.0):
        from contourkit.geometry.saddles import critical_points
        crit = critical_points(rep, xv)
        assert len(crit) == 1 and abs(crit[0] - (-0.5j / xv)) < 1e-12


# ---------------------------------------------------------------------------- flows
OMEGAS = [sp.Rational(3, 10), sp.Rational(1, 7)]
FLOWS = [("nondispersive", 0), ("superluminal", 1), ("subluminal", -1)]


def _flow(kind, kappa, Lambda):
    if kind == "nondispersive":
        return ck.catalogue.nondispersive_flow(kappa=kappa)
    return ck.catalogue.quartic_flow(kappa=kappa, Lambda=Lambda, branch=kind)


@pytest.mark.parametrize("kind,s", FLOWS)
@pytest.mark.parametrize("omega", OMEGAS)
def test_flow_branch_points_exact(kind, s, omega):
    """Linear profile v = -1 + kappa x; D = (omega - v k)^2 - k^2 - s k^4/Lambda^2.

    The symmetric coefficient of k^2, v^2 - 1 = -2 kappa x + kappa^2 x^2, is truncated to
    -2 kappa x (self-adjoint linearisation), so the Weyl symbol is D = A(k) + x B(k) with
        A = omega^2 + 2 omega k - s k^4/Lambda^2,   B = -2 kappa k (k + omega).
    Weyl ordering gives f = B^(-1/2) exp(i int A/B dk), so the exponent at a simple zero
    k_j of B is -1/2 + Res_{k_j} (i A/B) = -1/2 + i A(k_j)/B'(k_j), B' = -2 kappa (2k + omega):
      k = 0:       i omega^2 / (-2 kappa omega)              = -i omega/(2 kappa)
      k = -omega:  i (-omega^2 (1 + s omega^2/Lambda^2)) / (2 kappa omega)
                                                              = -i omega (1 + s omega^2/Lambda^2)/(2 kappa)
    so nu0 = -1/2 - i omega/(2 kappa), nu1 = -1/2 - i (omega/(2 kappa)) (1 + s omega^2/Lambda^2).
    The numbers are exact rationals (kappa = 1/20, Lambda = 5/2 typed as decimals)."""
    kappa, Lambda = sp.Rational(1, 20), sp.Rational(5, 2)
    model = _flow(kind, 0.05, 2.5)
    eq = model.mode_equation(omega)
    rep = eq.fourier()
    bp = _bp(rep)
    assert set(bp) == {0, -omega}
    nu0 = -sp.Rational(1, 2) - I * omega / (2 * kappa)
    nu1 = -sp.Rational(1, 2) - I * (omega / (2 * kappa)) * (1 + s * omega ** 2 / Lambda ** 2)
    assert sp.simplify(bp[0] - nu0) == 0
    assert sp.simplify(bp[-omega] - nu1) == 0
    # the Weyl symbol itself is the linearised dispersion relation
    s0, s1 = eq.weyl_symbol
    assert sp.expand(s0 - (omega ** 2 + 2 * omega * K - s * K ** 4 / Lambda ** 2)) == 0
    assert sp.expand(s1 - (-2 * kappa * K * (K + omega))) == 0
    assert model.kappa == pytest.approx(0.05, abs=1e-15)


@pytest.mark.parametrize("kind,s", FLOWS)
def test_weyl_quantisation_equals_symmetric_ode(kind, s):
    """from_dispersion (Weyl quantisation of D) versus from_ode of the symmetric-form operator
        -omega^2 - i omega (2 v y' + v' y) + d/dx((v^2 - 1) y') + s y''''/Lambda^2
    (k -> -i d/dx: (v k)_W = -i(v d + v'/2), k^2 -> -d^2, k^4 -> d^4; this operator is minus
    the Weyl quantisation of D, and the overall sign drops out of E' = (iA - B')/B).
    The k-space solutions agree: same E' (same exponent up to an additive constant)."""
    omega = sp.Rational(3, 10)
    Lambda = sp.Rational(5, 2)
    w = sp.Symbol("omega")
    v = sp.Function("v")
    expr = (-w ** 2 * Y(X) - I * w * (2 * v(X) * Y(X).diff(X) + v(X).diff(X) * Y(X))
            + ((v(X) ** 2 - 1) * Y(X).diff(X)).diff(X) + s * Y(X).diff(X, 4) / Lambda ** 2)
    with warnings.catch_warnings():
        # v^2 = 1 also at v = +1 (x = 40): the horizon nearest to 0 is used, with a warning
        warnings.simplefilter("ignore", ck.ContourkitWarning)
        eq_ode = ck.ModeEquation.from_ode(expr, Y, X, parameters={w: omega},
                                          profiles={v: -1 + sp.Rational(1, 20) * X}, frequency=w)
    eq_disp = _flow(kind, 0.05, 2.5).mode_equation(omega)
    assert eq_ode.order == eq_disp.order == (4 if s else 2)
    assert sp.simplify(eq_ode.fourier().dexponent - eq_disp.fourier().dexponent) == 0
    assert eq_ode.horizon == pytest.approx(0.0, abs=1e-14)
