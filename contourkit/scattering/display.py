"""Notebook display of results: a short ``repr`` and an HTML summary for results and tables.

:class:`~contourkit.scattering.results.ScatteringResult` shows T_H, T_eff/T_H
(temperature_ratio), |beta|^2 (occupation), |beta/alpha|^2 (thermal_ratio),
the unitarity residual, the validity estimate and the Hawking channel where
the result has them, and compact tables of the modes and of |S|^2.  Tables
of rows (:class:`~contourkit.scattering.spectra.Spectrum`,
``ComparisonTable``) show their column names and their first and last rows.
Fields a result does not have, and values that are None, are shown as a dash:
the display never fails on a result with more or fewer fields.  Names are
those of docs/vocabulary.md.

Examples
--------
>>> import contourkit as ck
>>> res = ck.catalogue.nondispersive_flow(kappa=0.05).scatter(0.02)
>>> len(repr(res).splitlines()) <= 3 and "temperature_ratio" in res._repr_html_()
True
"""
import math

import numpy as np

from ..symbolic.display import esc, facts, number, table

#: rows shown at each end of a long table
ENDS = 3


def _f(v):
    try:
        return float(v)
    except (TypeError, ValueError):
        return None


def temperature_ratio(res):
    """T_eff/T_H of a result, None where either is missing or T_H is 0."""
    T, TH = _f(getattr(res, "effective_temperature", None)), _f(getattr(res, "hawking_temperature", None))
    if T is None or not TH or not math.isfinite(T):
        return None
    return T / TH


def result_repr(res):
    """Two lines: what was computed, then the key figures."""
    ok = "success" if getattr(res, "success", False) else "FAILED"
    head = (f"ScatteringResult(omega={number(getattr(res, 'omega', None))}, method={getattr(res, 'method', '?')}, "
            f"{ok}, {len(getattr(res, 'in_modes', []) or [])} in-modes)")
    figs = (f"  temperature_ratio={number(temperature_ratio(res))}, occupation={number(getattr(res, 'occupation', None))}, "
            f"thermal_ratio={number(getattr(res, 'thermal_ratio', None))}, "
            f"unitarity_residual={number(getattr(res, 'unitarity_residual', None), '.2g')}")
    return head + "\n" + figs


def _validity_cell(res):
    if not hasattr(res, "validity"):
        return None
    v = res.validity
    if v is None:
        return "none (the model has no full profile)"
    rel = getattr(v, "reliable", None)
    parts = [f"reliable: {number(rel)}",
             f"thermal_ratio_error {number(getattr(v, 'thermal_ratio_error', None), '.2g')}",
             f"occupation_error {number(getattr(v, 'occupation_error', None), '.2g')}"]
    reason = getattr(v, "reason", "")
    return esc("; ".join(parts) + (f" ({reason})" if reason else ""))


def _modes_table(res):
    rows = []
    for kind, modes in (("in", getattr(res, "in_modes", []) or []), ("out", getattr(res, "out_modes", []) or [])):
        for m in modes:
            rows.append((esc(kind), esc(getattr(m, "name", "?")), number(getattr(m, "k", None)),
                         number(getattr(m, "group_velocity", None)), number(getattr(m, "norm", None), "+d"),
                         esc(getattr(m, "origin", ""))))
    if not rows:
        return ""
    return table(rows, header=["", "mode", "k", "group velocity", "norm", "origin"], caption="modes")


def _s_table(res):
    S = getattr(res, "S", None)
    ins, outs = getattr(res, "in_modes", []) or [], getattr(res, "out_modes", []) or []
    try:
        A = np.array(S.tolist() if hasattr(S, "tolist") else S, dtype=complex)
    except (TypeError, ValueError):
        return ""
    if A.shape != (len(outs), len(ins)) or len(ins) > 8:
        return ""
    rows = [[f"<b>{esc(o.name)}</b>"] + [number(abs(A[i, j]) ** 2, ".4g") for j in range(len(ins))]
            for i, o in enumerate(outs)]
    return table(rows, header=["|S|^2: out \\ in"] + [esc(m.name) for m in ins], caption="|S|^2 (out-mode row, in-mode column)")


def result_html(res):
    """The key figures, the validity estimate and the modes and |S|^2 tables of one result."""
    pairs = [("omega", number(getattr(res, "omega", None), ".10g")),
             ("hawking_temperature T_H", number(getattr(res, "hawking_temperature", None), ".10g")),
             ("effective_temperature T_eff", number(getattr(res, "effective_temperature", None), ".10g")),
             ("temperature_ratio T_eff/T_H", number(temperature_ratio(res), ".10g")),
             ("occupation |beta|^2", number(getattr(res, "occupation", None), ".10g")),
             ("thermal_ratio |beta/alpha|^2", number(getattr(res, "thermal_ratio", None), ".10g")),
             ("unitarity_residual", number(getattr(res, "unitarity_residual", None), ".3g"))]
    validity = _validity_cell(res)
    if validity is not None:
        pairs.append(("validity", validity))
    if hasattr(res, "hawking_channel"):
        pairs.append(("hawking_channel", number(res.hawking_channel)))
    pairs += [("error_estimate", number(getattr(res, "error_estimate", None), ".3g")),
              ("dps (working precision)", number(getattr(res, "dps", None), "d") if getattr(res, "dps", None)
               is not None else "double"),
              ("success", number(getattr(res, "success", None))), ("message", esc(getattr(res, "message", "")))]
    caption = f"ScatteringResult ({esc(getattr(res, 'method', ''))} method)"
    return facts(pairs, caption) + _modes_table(res) + _s_table(res)


def rows_repr(kind, rows, columns, extra=""):
    """At most three lines: the kind and size, the columns, the omega range."""
    n = len(rows)
    head = f"{kind}({n} rows{extra})"
    cols = ", ".join(columns)
    if len(cols) > 100:
        cols = cols[:97] + "..."
    ws = [r.get("omega") for r in rows if r.get("omega") is not None]
    span = f"  omega from {number(min(ws))} to {number(max(ws))}" if ws else "  no rows"
    return f"{head}\n  columns: {cols}\n{span}"


def rows_html(title, rows, columns):
    """Column names and the first and last rows of a table."""
    n = len(rows)
    shown = list(enumerate(rows)) if n <= 2 * ENDS else list(enumerate(rows[:ENDS])) + [None] + \
        [(n - ENDS + i, r) for i, r in enumerate(rows[-ENDS:])]
    body = []
    for item in shown:
        if item is None:
            body.append(["\u2026"] * (len(columns) + 1))
            continue
        i, r = item
        cells = []
        for c in columns:
            v = r.get(c)
            cells.append(esc(v) if isinstance(v, str) else number(v))
        body.append([str(i)] + cells)
    return table(body, header=[""] + [esc(c) for c in columns], caption=f"{esc(title)}: {n} rows")


def spectrum_repr(spec):
    extra = f", {spec.resumed} resumed" if getattr(spec, "resumed", 0) else ""
    return rows_repr("Spectrum", spec.rows, spec._fields(), extra)


def spectrum_html(spec):
    title = "Spectrum" + (f" ({esc(spec.path)})" if getattr(spec, "path", None) else "")
    return rows_html(title, spec.rows, spec._fields())


__all__ = ["result_repr", "result_html", "rows_repr", "rows_html", "spectrum_repr", "spectrum_html",
           "temperature_ratio"]
