"""Notebook display of ModeEquation and KSpaceRepresentation (HTML, LaTeX, short repr).

Checked values: the Airy exponent E(k) = i k^3/3 (DLMF 9.5.4) and the Bessel
equation x y'' + y' + x y = 0, whose k-space solution (1 - k^2)^(-1/2) has
branch points k = +-1 with exponent -1/2 (DLMF 10.9.1).
"""
import sympy as sp

import contourkit as ck

x = sp.Symbol("x")
y = sp.Function("y")


def test_airy_equation_and_representation():
    eq = ck.ModeEquation.from_ode(y(x).diff(x, 2) - x * y(x), y, x)
    html = eq._repr_html_()
    assert "<table" in html and "order" in html and ">2<" in html
    assert eq._repr_latex_().startswith("$") and "\\frac{d^{2}}{d x^{2}}" in eq._repr_latex_()
    rep = eq.fourier()
    html = rep._repr_html_()
    assert "\\frac{i k^{3}}{3}" in html                                  # DLMF 9.5.4
    assert "valleys at infinity" in html and html.count("deg</td>") >= 6   # three valleys: centre, half-width
    assert "\\frac{i k^{3}}{3}" in rep._repr_latex_()
    for obj in (eq, rep):
        assert len(repr(obj).splitlines()) <= 3


def test_bessel_branch_points_in_html():
    eq = ck.ModeEquation.from_ode(x * y(x).diff(x, 2) + y(x).diff(x) + x * y(x), y, x)
    rep = eq.fourier()
    html = rep._repr_html_()
    assert html.count("branch point") >= 2
    assert html.count("- \\frac{1}{2}") >= 2                           # DLMF 10.9.1: (1 - k^2)^(-1/2)
    assert "$-1$" in html and "$1$" in html


def test_long_expressions_keep_repr_short():
    eq = ck.catalogue.quartic_flow(kappa=0.05, Lambda=2.5).mode_equation(0.0123456789)
    for obj in (eq, eq.fourier()):
        text = repr(obj)
        assert len(text.splitlines()) <= 3 and max(len(ln) for ln in text.splitlines()) <= 130
