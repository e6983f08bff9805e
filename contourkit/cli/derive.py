"""What ``contourkit derive`` prints: the derived equations and constants of a model."""
import math

import sympy as sp

from ..symbolic._sym import exact


def _degrees(angle):
    return f"{math.degrees(angle):.4g} deg"


def _facts(model, omega):
    """Named entries (label, sympy-or-text value) in the order they are printed."""
    from ..symbolic.horizon import HorizonModel
    items = []
    if isinstance(model, HorizonModel) and model.horizon is None:
        # a horizonless flow: no near-horizon equation; its dispersive turning points at omega
        items += [("model", model.name or "unnamed"),
                  ("dispersion relation D(omega, k; x) = 0, full profile", model.dispersion),
                  ("horizon", "none (horizonless flow)"), ("orientation", str(model.orientation))]
        if omega is None:
            items.append(("turning points", "give --omega W to list the dispersive turning points"))
        else:
            items.append(("frequency omega", exact(omega)))
            items.append(("turning points (x_t: k_t)", [(round(t.x, 10), round(t.k, 10))
                                                       for t in model.turning_points(omega)]))
        return items
    if isinstance(model, HorizonModel):
        items += [("model", model.name or "unnamed"),
                  ("dispersion relation D(omega, k; x) = 0, full profile", model.dispersion),
                  ("horizon x_H (shifted to x = 0 below)", model.horizon),
                  ("surface gravity kappa", model.kappa),
                  ("Hawking temperature T_H = kappa/(2 pi)", model.hawking_temperature),
                  ("cut-off frequency omega_max", model.omega_max)]
        w = exact(omega if omega is not None else model.kappa)
        items.append(("frequency omega", w))
        eq = model.mode_equation(w)
    else:
        items.append(("model", "mode equation used as given (no horizon)"))
        eq = model
    rep = eq.fourier()
    items += [("mode equation in y(x) (near-horizon, linear in x)", sp.Eq(eq.ode(), 0)),
              ("left symbol A(k) + x B(k): A", eq.A), ("left symbol A(k) + x B(k): B", eq.B),
              ("k-space equation for f(k)", rep.kspace_ode),
              ("exponent E(k), f = exp(E)", rep.exponent)]
    items.append(("branch points (k_j: exponent nu_j)", [(p, e) for p, e in rep.branch_points]))
    items.append(("poles (k_j: order)", list(rep.poles)))
    if rep.essential_singularities:
        items.append(("essential singularities", list(rep.essential_singularities)))
    items.append(("valleys at infinity (centre, half-width)",
                  [(_degrees(v.center), _degrees(v.halfwidth)) for v in rep.valleys]))
    items.append(("order (= number of independent contours)", eq.order))
    return items


def _text_value(v):
    if v is None:
        return "none"
    if isinstance(v, list):
        if not v:
            return "none"
        return "; ".join(f"{e[0]}: {e[1]}" if isinstance(e, tuple) and len(e) == 2 else str(e) for e in v)
    if isinstance(v, float):
        return f"{v:.10g}"
    if isinstance(v, sp.Eq):
        return f"{v.lhs} = {v.rhs}"
    return str(v)


_LATEX_NAMES = {
    "dispersion relation D(omega, k; x) = 0, full profile": r"D(\omega, k; x)",
    "horizon x_H (shifted to x = 0 below)": r"x_H", "surface gravity kappa": r"\kappa",
    "Hawking temperature T_H = kappa/(2 pi)": r"T_H = \kappa/2\pi",
    "cut-off frequency omega_max": r"\omega_\mathrm{max}", "frequency omega": r"\omega",
    "left symbol A(k) + x B(k): A": r"A(k)", "left symbol A(k) + x B(k): B": r"B(k)",
    "exponent E(k), f = exp(E)": r"E(k)", "order (= number of independent contours)": r"\text{order}",
}


def _latex_line(label, v):
    if isinstance(v, str):
        return f"% {label}: {v}"
    if isinstance(v, sp.Eq):
        return f"% {label}\n{sp.latex(v.lhs)} &= {sp.latex(v.rhs)} \\\\"
    if isinstance(v, list):
        if not v:
            return f"% {label}: none"
        if label.startswith("parameters"):
            return f"% {label}: " + ", ".join(f"{a} = {b}" for a, b in v)
        if label.startswith("valleys"):
            return f"% {label}: " + "; ".join(f"{a}, {b}" for a, b in v)
        sym = r"\nu" if label.startswith("branch") else "n"
        parts = [f"k_{{{i}}} = {sp.latex(e[0])},\\ {sym}_{{{i}}} = {sp.latex(e[1])}"
                 if isinstance(e, tuple) and len(e) == 2 else f"k_{{{i}}} = {sp.latex(e)}" for i, e in enumerate(v, 1)]
        return f"% {label}\n" + " \\\\\n".join(f"& {p}" for p in parts) + " \\\\"
    name = _LATEX_NAMES.get(label, r"\text{" + label + "}")
    value = r"\text{none}" if v is None else sp.latex(sp.Float(v, 10) if isinstance(v, float) else v)
    return f"{name} &= {value} \\\\"


def _symbolic_facts(model):
    """Named formulas of :meth:`HorizonModel.symbolic` (parameters and omega kept as symbols)."""
    from ..errors import InputError
    from ..symbolic.horizon import HorizonModel
    if not isinstance(model, HorizonModel):
        raise InputError("--symbolic needs a horizon model (kind = \"dispersion\", or an ode with [profiles])")
    d = model.symbolic()
    out = [("model", model.name or "unnamed"),
            ("parameters (symbol = value)", [(s, v) for s, v in d.parameters.items()]),
            ("dispersion relation D(omega, k; x) = 0, full profile", d.dispersion),
            ("horizon x_H (shifted to x = 0 below)", d.horizon),
            ("surface gravity kappa", d.kappa),
            ("Hawking temperature T_H = kappa/(2 pi)", d.hawking_temperature),
            ("left symbol A(k) + x B(k): A", d.A), ("left symbol A(k) + x B(k): B", d.B),
            ("k-space equation for f(k)", d.kspace_ode),
            ("exponent E(k), f = exp(E)", d.exponent),
            ("branch points (k_j: exponent nu_j)", list(d.singular_points))]
    if d.essential_parts:
        out.append(("essential parts (k_j: c_1, c_2, ... of the terms c_m (k - k_j)^-m of E)",
                    [(p, *cs) for p, cs in d.essential_parts.items()]))
    return out + [("orientation", str(model.orientation)), ("note", d.note)]


def report(model, *, omega=None, latex=False, symbolic=False):
    """The derivation of a model as text (or as a LaTeX ``align*`` block).

    Parameters
    ----------
    model : HorizonModel or ModeEquation
    omega : float, optional
        Frequency of the near-horizon equation (default: omega = kappa).
    latex : bool
        LaTeX instead of plain text.
    symbolic : bool
        Formulas with the parameters and omega as symbols
        (:func:`contourkit.symbolic.formulas.derive`); omega is then ignored.

    Returns
    -------
    str
    """
    items = _symbolic_facts(model) if symbolic else _facts(model, omega)
    if not latex:
        width = max(len(k) for k, _ in items)
        return "\n".join(f"{k:<{width}} : {_text_value(v)}" for k, v in items) + "\n"
    lines = [r"\begin{align*}"] + [_latex_line(k, v) for k, v in items] + [r"\end{align*}"]
    return "\n".join(lines) + "\n"
