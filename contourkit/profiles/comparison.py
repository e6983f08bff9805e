"""Near-horizon contour method versus the direct full-profile solver.

:func:`compare` runs both methods on one :class:`~contourkit.symbolic.horizon.HorizonModel`
at each frequency and tabulates the Hawking-channel figures side by side:
where the near-horizon (linearised) approximation holds, ``omega`` and
``kappa`` small against the dispersive scale and the profile's width, the two
agree; the relative differences show where it stops holding (DESIGN.md,
step 9).  :func:`plot_comparison` draws ``T_eff / T_H`` against
``omega / kappa`` for both methods.

References
----------
.. [1] S. Corley, T. Jacobson, Phys. Rev. D 54 (1996) 1568 (the quartic
   dispersive spectrum is thermal at ``T_H = kappa/(2 pi)`` for
   ``kappa << Lambda``).
.. [2] J. Macher, R. Parentani, Phys. Rev. D 79 (2009) 124008 (deviations of
   tanh flows from the near-horizon result).

Examples
--------
>>> from contourkit.catalogue import quartic_flow
>>> m = quartic_flow(kappa=0.05, Lambda=2.5, branch="superluminal", D=0.5)
>>> table = compare(m, [0.05], methods=("direct",))   # contour side omitted here
>>> round(table.rows[0]["temperature_ratio_direct"], 3)
1.0
"""
import math

from ..scattering.results import RowTable
from ..errors import ContourkitError, InputError

#: per-method fields of a row (each appears as ``<field>_<method>``)
METHOD_FIELDS = ("occupation", "thermal_ratio", "effective_temperature", "temperature_ratio",
                 "unitarity_residual", "error_estimate", "n_in", "success", "message")
#: relative differences ``(contour - direct) / direct`` (None when either side is missing or zero)
DIFF_FIELDS = ("rel_diff_occupation", "rel_diff_thermal_ratio", "rel_diff_effective_temperature")
#: the columns of every row, in order
COLUMNS = (("omega", "omega_over_kappa", "hawking_temperature")
           + tuple(f"{f}_{m}" for m in ("contour", "direct") for f in METHOD_FIELDS) + DIFF_FIELDS)


#: per-method fields of a row of a horizonless model (dispersive turning point)
TURNING_FIELDS = ("reflection", "anomalous", "unitarity_residual", "n_in", "success", "message")
#: the columns of every row of a horizonless model, in order
TURNING_COLUMNS = (("omega",) + tuple(f"{f}_{m}" for m in ("contour", "direct") for f in TURNING_FIELDS)
                   + ("max_abs_diff_S",))


class ComparisonTable(RowTable):
    """One row (dict) per frequency; see :data:`COLUMNS` for the fields.

    Attributes
    ----------
    rows : list of dict
    model_name : str
    results : list of dict
        ``{"contour": ScatteringResult or None, "direct": ...}`` per row.
    """

    columns = COLUMNS

    def __init__(self, rows, *, model_name="", results=None, columns=None):
        super().__init__(rows)
        self.model_name = model_name
        self.results = list(results or [])
        if columns is not None:
            self.columns = columns

    def __repr__(self):
        from ..scattering.display import rows_repr
        return rows_repr("ComparisonTable", self.rows, self._fields(), f", {self.model_name or 'model'}")

    def _repr_html_(self):
        from ..scattering.display import rows_html
        return rows_html(f"ComparisonTable ({self.model_name or 'model'})", self.rows, self._fields())


def _rel(a, b):
    if a is None or b is None or b == 0 or not (math.isfinite(a) and math.isfinite(b)):
        return None
    return (a - b) / abs(b)


def _missing(fields, name, err):
    """The per-method fields of a row whose method did not run (or failed): None, with the reason."""
    out = {f"{f}_{name}": None for f in fields}
    out[f"success_{name}"] = False
    out[f"message_{name}"] = err
    return out


def _method_part(res, name, err):
    if res is None:
        return _missing(METHOD_FIELDS, name, err)
    T = float(res.effective_temperature) if res.effective_temperature is not None else math.inf
    return {f"occupation_{name}": float(res.occupation), f"thermal_ratio_{name}": float(res.thermal_ratio),
            f"effective_temperature_{name}": T if math.isfinite(T) else None,
            f"temperature_ratio_{name}": T / float(res.hawking_temperature) if math.isfinite(T) else None,
            f"unitarity_residual_{name}": float(res.unitarity_residual),
            f"error_estimate_{name}": float(res.error_estimate), f"n_in_{name}": len(res.in_modes),
            f"success_{name}": bool(res.success), f"message_{name}": res.message}


def blocked_mode_figures(res):
    """(reflection, anomalous) of the blocked in-mode of a horizonless result.

    The blocked in-mode is the one that returns most to its own side
    (largest ``sum |S_oj|^2`` over out-modes on its side); ``reflection`` is
    ``sum |S_oj|^2`` over those out-modes of its norm sign, ``anomalous`` over
    the out-modes of the opposite norm sign (the negative-norm conversion).
    """
    S = res.S
    ins, outs = res.in_modes, res.out_modes

    def back(j):
        return sum(abs(S[o, j]) ** 2 for o, mo in enumerate(outs) if mo.side == ins[j].side)
    j = max(range(len(ins)), key=back)
    refl = sum(abs(S[o, j]) ** 2 for o, mo in enumerate(outs) if mo.side == ins[j].side and mo.norm == ins[j].norm)
    anom = sum(abs(S[o, j]) ** 2 for o, mo in enumerate(outs) if mo.norm != ins[j].norm)
    return float(refl), float(anom)


def _matched(ra, rb):
    """Largest difference of |S| entries of two results, modes matched by side, direction, norm and Re k.

    None when the two have different mode content.
    """
    def order(modes):
        return sorted(range(len(modes)), key=lambda i: (modes[i].side, modes[i].direction, modes[i].norm,
                                                        modes[i].k.real))

    def content(modes):
        return sorted((m.side, m.direction, m.norm) for m in modes)
    if content(ra.in_modes) != content(rb.in_modes) or content(ra.out_modes) != content(rb.out_modes):
        return None
    ia, ib, oa, ob = order(ra.in_modes), order(rb.in_modes), order(ra.out_modes), order(rb.out_modes)
    return float(max(abs(abs(ra.S[oa[o], ia[j]]) - abs(rb.S[ob[o], ib[j]]))
                     for o in range(len(oa)) for j in range(len(ia))))


def _turning_part(res, name, err):
    if res is None:
        return _missing(TURNING_FIELDS, name, err)
    refl, anom = blocked_mode_figures(res)
    return {f"reflection_{name}": refl, f"anomalous_{name}": anom,
            f"unitarity_residual_{name}": float(res.unitarity_residual), f"n_in_{name}": len(res.in_modes),
            f"success_{name}": bool(res.success), f"message_{name}": res.message}


def compare(model, omegas, *, methods=("contour", "direct"), on_error="raise", contour_options=None,
            direct_options=None):
    """Contour (near-horizon) and direct (full-profile) figures, one row per omega.

    Parameters
    ----------
    model : HorizonModel
        A model with uniform asymptotic regions (e.g. ``quartic_flow(..., D=0.5)``).
    omegas : sequence of float
        Frequencies > 0.
    methods : tuple of {"contour", "direct"}
        Which methods to run (a method left out gives None entries).
    on_error : {"raise", "record"}
        "raise": a method's ContourkitError propagates; "record": the row gets
        None entries for that method, ``success_<method> = False`` and the
        error text in ``message_<method>``.
    contour_options, direct_options : dict, optional
        Keyword options for ``model.scatter`` and :func:`contourkit.direct.scatter`.

    Returns
    -------
    ComparisonTable
        Rows with the fields of :data:`COLUMNS`: omega, omega/kappa, T_H; per
        method ``occupation`` (``|beta|^2``), ``thermal_ratio``,
        ``effective_temperature``, ``temperature_ratio`` (T_eff/T_H),
        ``unitarity_residual``, ``error_estimate``, ``n_in``, ``success``,
        ``message``; and the relative differences (contour - direct)/direct.
        Missing values are None, never NaN.  For a horizonless model (no
        Hawking channel; the contour method works at its dispersive turning
        point) the rows have the fields of :data:`TURNING_COLUMNS` instead:
        per method ``reflection`` and ``anomalous`` of the blocked in-mode
        (:func:`blocked_mode_figures`), ``unitarity_residual``, ``n_in``,
        ``success``, ``message``, and ``max_abs_diff_S``, the largest
        difference of |S| entries with the modes matched.

    Examples
    --------
    >>> from contourkit.catalogue import quartic_flow
    >>> m = quartic_flow(kappa=0.05, Lambda=2.5, branch="superluminal", D=0.5)
    >>> t = compare(m, [0.02, 0.05], methods=("direct",))
    >>> len(t), t.rows[1]["n_in_direct"]
    (2, 3)
    """
    from . import direct
    from ..symbolic.horizon import HorizonModel
    if not isinstance(model, HorizonModel):
        raise InputError(f"compare needs a horizon model (catalogue, model file or HorizonModel), got "
                         f"{type(model).__name__}; a bare ModeEquation has no frequency or profile to compare")
    if on_error not in ("raise", "record"):
        raise InputError(f"on_error must be 'raise' or 'record', got {on_error!r}")
    bad = set(methods) - {"contour", "direct"}
    if bad or not methods:
        raise InputError(f"methods must be a non-empty subset of ('contour', 'direct'), got {methods!r}")
    try:
        ws = [float(w) for w in omegas]
    except (TypeError, ValueError):
        raise InputError(f"omegas must be a sequence of numbers, got {omegas!r}")
    if not ws:
        raise InputError("omegas is empty; give at least one frequency")
    if contour_options is not None and not isinstance(contour_options, dict):
        raise InputError(f"contour_options must be a dict of keyword arguments, got {contour_options!r}")
    if direct_options is not None and not isinstance(direct_options, dict):
        raise InputError(f"direct_options must be a dict of keyword arguments, got {direct_options!r}")
    copts = dict(contour_options or {})
    if "direct" in methods:
        # the direct solver runs anyway: the comparison replaces the validity estimate's own solve
        copts.setdefault("validity_tol", None)
    runners = {"contour": lambda w: model.scatter(w, **copts),
               "direct": lambda w: direct.scatter(model, w, **(direct_options or {}))}
    horizonless = model.horizon is None
    if horizonless:
        copts.pop("validity_tol", None)
    kappa = None if horizonless else float(model.kappa)
    rows, results = [], []
    for w in ws:
        row = {"omega": w} if horizonless else {"omega": w, "omega_over_kappa": w / kappa,
                                                 "hawking_temperature": kappa / (2 * math.pi)}
        got = {}
        for name in ("contour", "direct"):
            res, err = None, "not requested"
            if name in methods:
                try:
                    res = runners[name](w)
                except ContourkitError as exc:
                    if on_error == "raise":
                        raise
                    err = f"{type(exc).__name__}: {exc}"
            got[name] = res
            row.update((_turning_part if horizonless else _method_part)(res, name, err))
        if horizonless:
            both = got["contour"] is not None and got["direct"] is not None
            row["max_abs_diff_S"] = _matched(got["contour"], got["direct"]) if both else None
        else:
            for f, key in zip(DIFF_FIELDS, ("occupation", "thermal_ratio", "effective_temperature")):
                row[f] = _rel(row[f"{key}_contour"], row[f"{key}_direct"])
        rows.append(row)
        results.append(got)
    return ComparisonTable(rows, model_name=getattr(model, "name", ""), results=results,
                           columns=TURNING_COLUMNS if horizonless else None)


def plot_comparison(table, *, ax=None, quantity="temperature_ratio"):
    """Plot one quantity of a :class:`ComparisonTable` against omega/kappa, one line per method.

    Parameters
    ----------
    table : ComparisonTable
    ax : matplotlib Axes, optional
    quantity : {"temperature_ratio", "thermal_ratio", "occupation", "effective_temperature"}
        ``temperature_ratio`` (T_eff/T_H, default; the Hawking value is 1) or
        another per-method field (the ratio and occupation on a log scale).

    Returns
    -------
    (Figure, Axes)
        Only methods with at least one value are drawn; no other lines are added.

    Examples
    --------
    >>> import matplotlib; matplotlib.use("Agg")
    >>> rows = [{"omega_over_kappa": 1.0, "temperature_ratio_contour": 1.0, "temperature_ratio_direct": 0.99}]
    >>> fig, ax = plot_comparison(ComparisonTable(rows))
    >>> len(ax.get_lines())
    2
    """
    allowed = ("temperature_ratio", "thermal_ratio", "occupation", "effective_temperature")
    if quantity not in allowed:
        raise InputError(f"quantity must be one of {allowed}, got {quantity!r}")
    if ax is None:
        import matplotlib.pyplot as plt
        fig, ax = plt.subplots(figsize=(5.5, 3.8))
    else:
        fig = ax.figure
    styles = {"contour": dict(marker="o", linestyle="-", label="near-horizon contour"),
              "direct": dict(marker="s", linestyle="--", label="direct (full profile)")}
    for name, st in styles.items():
        pts = [(r["omega_over_kappa"], r.get(f"{quantity}_{name}")) for r in table.rows]
        pts = [(x, y) for x, y in pts if y is not None and math.isfinite(y)]
        if pts:
            ax.plot([p[0] for p in pts], [p[1] for p in pts], **st)
    ax.set_xlabel(r"$\omega/\kappa$")
    labels = {"temperature_ratio": r"$T_\mathrm{eff}/T_H$ (Hawking: 1)", "thermal_ratio": r"$|\beta/\alpha|^2$",
              "occupation": r"$|\beta|^2$", "effective_temperature": r"$T_\mathrm{eff}$"}
    ax.set_ylabel(labels[quantity])
    if quantity in ("thermal_ratio", "occupation"):
        ax.set_yscale("log")
    if ax.get_lines():
        ax.legend()
    return fig, ax
