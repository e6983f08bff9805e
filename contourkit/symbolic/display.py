"""Notebook display of the symbolic objects: short ``repr``, HTML tables and LaTeX formulas.

:class:`~contourkit.symbolic.equation.ModeEquation` and
:class:`~contourkit.symbolic.kspace.KSpaceRepresentation` call these
functions from their ``__repr__``, ``_repr_html_`` and ``_repr_latex_``
(the IPython display protocol).  Formulas are sympy's LaTeX between ``$``
signs, which notebooks typeset; plain text beside them keeps the tables
readable where no typesetting runs.  The HTML builders here are also used by
the result tables of the scattering layer (:mod:`contourkit.scattering.display`).

Examples
--------
>>> import sympy as sp, contourkit as ck
>>> x = sp.Symbol("x"); y = sp.Function("y")
>>> rep = ck.ModeEquation.from_ode(y(x).diff(x, 2) - x * y(x), y, x).fourier()
>>> "E(k)" in rep._repr_html_() and rep._repr_latex_().startswith("$")
True
"""
import html
import math

import sympy as sp

#: characters of an expression in a plain repr before it is cut with "..."
SHORT = 70


def short(v, width=SHORT):
    """One line of text of at most ``width`` characters."""
    text = " ".join(str(v).split())
    return text if len(text) <= width else text[:width - 3] + "..."


def esc(v):
    """HTML-escaped text."""
    return html.escape(str(v), quote=True)


def latex(expr):
    """sympy's LaTeX of an expression (text for anything sympy cannot print)."""
    try:
        return sp.latex(expr)
    except Exception:  # noqa: BLE001 - display must never fail
        return str(expr)


def math_cell(expr):
    """A table cell with the formula typeset by the notebook and the plain text as its title."""
    return f'<span title="{esc(short(expr, 400))}">${esc(latex(expr))}$</span>'


def number(v, spec=".6g"):
    """A number as text; None as an em dash."""
    if v is None:
        return "\u2014"
    if isinstance(v, bool):
        return "yes" if v else "no"
    try:
        if spec.endswith("d"):
            return format(int(v), spec)
        if isinstance(v, complex):
            return f"{v.real:{spec}}{v.imag:+{spec}}j"
        f = float(v)
    except (TypeError, ValueError):
        return esc(v)
    if not math.isfinite(f):
        return esc(f)
    return format(f, spec)


def table(rows, *, header=None, caption=None):
    """An HTML table of rows of cells (cells are already HTML)."""
    parts = ['<table class="contourkit">']
    if caption:
        parts.append(f'<caption style="text-align:left"><b>{caption}</b></caption>')
    if header:
        parts.append("<tr>" + "".join(f"<th>{h}</th>" for h in header) + "</tr>")
    for r in rows:
        parts.append("<tr>" + "".join(f"<td>{c}</td>" for c in r) + "</tr>")
    parts.append("</table>")
    return "".join(parts)


def facts(pairs, caption):
    """A two-column table of (name, HTML value) pairs."""
    return table([(f"<b>{esc(k)}</b>", v) for k, v in pairs], caption=esc(caption))


# -- ModeEquation --------------------------------------------------------------
def equation_ode(eq):
    y = sp.Function("y")
    x = sp.Symbol("x")
    return sp.Eq(eq.ode(y, x), 0)


def equation_repr(eq):
    return f"ModeEquation(order={eq.order}, A={short(eq.A, 40)}, B={short(eq.B, 40)})"


def equation_latex(eq):
    return f"$\\displaystyle {latex(equation_ode(eq))}$"


def equation_html(eq):
    pairs = [("mode equation", math_cell(equation_ode(eq))), ("order", str(eq.order)),
             ("A(k)", math_cell(eq.A)), ("B(k)", math_cell(eq.B))]
    if eq.kappa is not None:
        pairs.append(("surface gravity kappa", number(eq.kappa, ".10g")))
    if eq.horizon is not None:
        pairs.append(("horizon x_H (now at x = 0)", number(eq.horizon, ".10g")))
    if eq.note:
        pairs.append(("note", esc(eq.note)))
    return facts(pairs, "ModeEquation: sum_n (a_n + b_n x) y^(n)(x) = 0")


# -- KSpaceRepresentation -------------------------------------------------------
def kspace_repr(rep):
    return (f"KSpaceRepresentation(order={rep.order}, E={short(rep.exponent, 50)},\n"
            f"  singular points={len(rep.singularities)}, valleys={len(rep.valleys)})")


def kspace_latex(rep):
    return f"$\\displaystyle f(k) = \\exp E(k),\\quad E(k) = {latex(rep.exponent)}$"


def kspace_html(rep):
    pairs = [("E(k), f = exp(E)", math_cell(rep.exponent)), ("order", str(rep.order)),
             ("valleys at infinity", str(len(rep.valleys))),
             ("branch cuts run in the direction", f"{math.degrees(rep.cut_angle):.4g} deg")]
    head = facts(pairs, "KSpaceRepresentation: phi(x) = integral over C of exp(i k x) f(k) dk")
    sing = [(math_cell(s.point), math_cell(s.exponent), esc(s.kind)) for s in rep.singularities]
    sing_table = table(sing, header=["point k_j", "exponent nu_j", "kind"], caption="singular points (zeros of B)") \
        if sing else "<p>no singular points</p>"
    valleys = [(str(v.index), f"{math.degrees(v.center):.4g} deg", f"{math.degrees(v.halfwidth):.4g} deg")
               for v in rep.valleys]
    valley_table = table(valleys, header=["valley", "centre", "half-width"], caption="valleys at infinity") \
        if valleys else ""
    return head + sing_table + valley_table


__all__ = ["short", "esc", "latex", "math_cell", "number", "table", "facts", "equation_repr", "equation_latex",
           "equation_html", "kspace_repr", "kspace_latex", "kspace_html"]
