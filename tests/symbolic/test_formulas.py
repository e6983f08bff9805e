"""Symbolic parameters: formulas of the horizon, kappa and the k-space exponents.

Source: S. Corley, Phys. Rev. D 57 (1998) 6280 (the exponents of the
linearised quartic flow: nu_0 = -1/2 - i omega/(2 kappa),
nu_1 = -1/2 - i (omega/(2 kappa))(1 + s omega^2/Lambda^2); also worked in
NOTES-scattering.md).  The check is the numeric layer itself after substitution.
"""
import pytest
import sympy as sp

import contourkit as ck

w, k, x = sp.symbols("omega k x")
kap, Lam, M = sp.symbols("kappa Lambda M", positive=True)


def _flows():
    v = -1 + kap * x
    return {
        "superluminal": (w - v * k) ** 2 - k ** 2 - k ** 4 / Lam ** 2,
        "subluminal": (w - v * k) ** 2 - k ** 2 + k ** 4 / Lam ** 2,
        "sixth order": (w - v * k) ** 2 - k ** 2 - k ** 4 / Lam ** 2 - k ** 6 / M ** 4,
    }


SETS = [dict(kappa=0.05, Lambda=2.5, M=4.0, omega=0.05),
        dict(kappa=0.02, Lambda=1.5, M=3.0, omega=0.013),
        dict(kappa=0.1, Lambda=7.0, M=9.5, omega=0.31)]


def _model(D, vals):
    return ck.HorizonModel.from_dispersion(D, omega=w, k=k, x=x, horizon=0.0,
                                           parameters={kap: vals["kappa"], Lam: vals["Lambda"], M: vals["M"]})


@pytest.mark.parametrize("name", ["superluminal", "subluminal", "sixth order"])
def test_symbolic_exponents_equal_numeric(name):
    D = _flows()[name]
    for vals in SETS:
        m = _model(D, vals)
        d = m.symbolic()
        assert d.kappa == kap and d.horizon == 0
        rep = m.mode_equation(vals["omega"]).fourier()
        num = sorted(rep.branch_points, key=lambda p: complex(p[0]).real, reverse=True)
        sub = d.substitute({"omega": vals["omega"]})
        sym = sub["singular_points"]
        assert len(sym) == len(num) == 2
        for (ps, ns), (pn, nn) in zip(sym, num):
            assert sp.simplify(ps - pn) == 0 and sp.simplify(ns - nn) == 0            # exact
            assert abs(complex(ns) - complex(nn)) < 1e-14                              # numerically
        assert sp.simplify(sub["polynomial_part"] - rep.polynomial_part.as_expr()) == 0
        assert abs(complex(sub["kappa"]) - m.kappa) < 1e-14
    if name != "sixth order":
        # Corley 1998 / NOTES-scattering.md: the two exponents in closed form
        s = 1 if name == "superluminal" else -1
        nus = [n for _, n in d.singular_points]
        W = sp.Symbol("omega", positive=True)
        assert sp.simplify(nus[0] - (-sp.Rational(1, 2) - sp.I * W / (2 * kap))) == 0
        assert sp.simplify(nus[1] - (-sp.Rational(1, 2) - sp.I * W / (2 * kap) * (1 + s * W ** 2 / Lam ** 2))) == 0


def test_symbolic_horizon_off_origin_and_temperature():
    x0 = sp.Symbol("x0", positive=True)
    D = (w - (-1 + kap * (x - x0)) * k) ** 2 - k ** 2 - k ** 4 / Lam ** 2
    m = ck.HorizonModel.from_dispersion(D, omega=w, k=k, x=x, parameters={kap: 0.05, Lam: 2.5, x0: 3},
                                        window=(-10, 10))
    d = m.symbolic()
    assert sp.simplify(d.horizon - x0) == 0
    assert sp.simplify(d.hawking_temperature - kap / (2 * sp.pi)) == 0


def test_symbolic_white_hole_kappa_is_positive():
    D = (w - (-1 - kap * x) * k) ** 2 - k ** 2 - k ** 4 / Lam ** 2
    m = ck.HorizonModel.from_dispersion(D, omega=w, k=k, x=x, parameters={kap: 0.05, Lam: 2.5}, horizon=0.0)
    assert m.symbolic().kappa == kap


def test_model_without_symbolic_source():
    m = ck.catalogue.quartic_flow(kappa=0.05, Lambda=2.5, hole="white").canonical_model()
    with pytest.raises(ck.ModelError, match="symbolic"):
        m.symbolic()


def test_symbolic_essential_part_at_a_double_zero():
    """Only c(x) varies: B = -2 kappa k^2 has a double zero at k = 0, so E has the term c_1/k.  The
    symbolic Laurent part equals the numeric layer's (kspace.Singularity.essential, exponent) after
    substitution, exactly and to 1e-14, at three parameter sets; the closed form
    nu = -1 - i omega/kappa, c_1 = i omega^2/(2 kappa) follows from r/B by hand (superluminal quartic)."""
    c = 1 + kap * x
    D = (w + k) ** 2 - c ** 2 * k ** 2 - k ** 4 / Lam ** 2
    W = sp.Symbol("omega", positive=True)
    for vals in SETS:
        m = _model(D, vals)
        d = m.symbolic()
        (p, nu), = d.singular_points
        assert p == 0 and sp.simplify(nu - (-1 - sp.I * W / kap)) == 0
        assert sp.simplify(d.essential_parts[0][0] - sp.I * W ** 2 / (2 * kap)) == 0
        rep = m.mode_equation(vals["omega"]).fourier()
        (s,) = rep.singularities
        sub = d.substitute({"omega": vals["omega"]})
        assert sp.simplify(sub["singular_points"][0][1] - s.exponent) == 0
        assert len(sub["essential_parts"][0]) == len(s.essential) == 1
        assert sp.simplify(sub["essential_parts"][0][0] - s.essential[0]) == 0
        assert abs(complex(sub["essential_parts"][0][0]) - complex(s.essential[0])) < 1e-14
        # the whole exponent: E(k) of both layers at a few points (the log branch is the same)
        for kk in (0.3 + 0.1j, -0.7 + 0.4j, 1.2 - 0.5j):
            e_sym = complex(sub["exponent"].subs(sp.Symbol("k"), kk).evalf(20))
            e_num = complex(rep.exponent.subs(rep.exponent.free_symbols.pop(), kk).evalf(20))
            assert abs(e_sym - e_num) < 1e-12 * max(1.0, abs(e_num))
