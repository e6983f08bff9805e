"""Spectrum figure: |beta|^2 against the thermal curve, and T_eff/T_H, for contour and direct results."""
import math

import matplotlib
import numpy as np
from matplotlib.figure import Figure

from ..errors import InputError
from ._style import COLUMN_WIDTH, PALETTE, style_rc

#: how each method is drawn (labels as in contourkit.profiles.comparison.plot_comparison)
METHOD_STYLE = {
    "contour": dict(color=PALETTE["contour"], marker="o", ms=4.0, mfc=PALETTE["contour"], ls="-", lw=0.9,
                    label="near-horizon contour"),
    "direct": dict(color=PALETTE["direct"], marker="s", ms=4.5, mfc="white", mew=1.0, ls=(0, (3.5, 1.5)), lw=0.9,
                   label="direct (full profile)"),
}


def _num(v):
    if v is None or isinstance(v, bool):
        return None
    try:
        f = float(v)
    except (TypeError, ValueError):
        return None
    return f if math.isfinite(f) else None


def _rows_of(obj, what):
    """Rows (dicts) of a Spectrum, a ComparisonTable, a ScatteringResult list or a list of dicts."""
    from ..scattering.results import ScatteringResult
    if isinstance(obj, ScatteringResult):
        return [obj.as_row()]
    rows = getattr(obj, "rows", obj)
    try:
        rows = list(rows)
    except TypeError:
        raise InputError(f"{what} must be a Spectrum, a ComparisonTable, a list of ScatteringResult or a list of "
                         f"row dicts, got {type(obj).__name__}")
    rows = [r.as_row() if isinstance(r, ScatteringResult) else r for r in rows]
    if not rows:
        raise InputError(f"{what} has no rows; compute at least one frequency")
    if not all(isinstance(r, dict) for r in rows):
        raise InputError(f"{what} must hold row dicts (or ScatteringResult objects)")
    return rows


def _series(rows, suffix, what):
    """(omega, T_H, occupation, temperature_ratio) arrays of one method; None entries become NaN."""
    need = ("omega", "hawking_temperature", "occupation" + suffix)
    for key in need:
        if key not in rows[0]:
            raise InputError(f"{what} rows have no {key!r} column (the columns are {', '.join(rows[0])})")
    out = []
    for r in rows:
        w, th = _num(r.get("omega")), _num(r.get("hawking_temperature"))
        if w is None or th is None or th <= 0:
            raise InputError(f"{what}: every row needs a finite omega and a positive hawking_temperature, got "
                             f"omega={r.get('omega')!r}, hawking_temperature={r.get('hawking_temperature')!r}")
        occ = _num(r.get("occupation" + suffix))
        tr = _num(r.get("temperature_ratio" + suffix))
        if tr is None:
            te = _num(r.get("effective_temperature" + suffix))
            tr = te / th if te is not None else None
        out.append((w, th, np.nan if occ is None or occ <= 0 else occ, np.nan if tr is None else tr))
    return np.array(out, dtype=float).T


def spectrum(spec_or_rows, *, direct=None, ax=None, xaxis="omega/T_H", style="journal"):
    r"""Two panels: the occupation ``|beta|^2`` with the thermal curve, and ``T_eff/T_H``.

    Top: ``|beta|^2`` (log scale) with the Planck curve
    ``1/(exp(omega/T_H) - 1)``; bottom: ``T_eff/T_H`` with the Hawking value 1.
    Contour (near-horizon) and direct (full-profile) results are drawn side by
    side when both are present: give a :class:`~contourkit.profiles.comparison.ComparisonTable`
    (both methods in one table), or a contour spectrum and ``direct=...``.

    Parameters
    ----------
    spec_or_rows : Spectrum, ComparisonTable, list of ScatteringResult, or list of row dicts
        Rows need ``omega``, ``hawking_temperature`` and ``occupation`` (and
        ``temperature_ratio`` or ``effective_temperature``); comparison rows
        the ``_contour``/``_direct`` columns.  A row's ``method`` ("contour" or
        "direct") picks its style.
    direct : same types, optional
        Direct-solver results drawn beside the first argument.
    ax : sequence of two Axes, optional
        (top, bottom) axes to draw into (default: a new single-column figure).
    xaxis : {"omega/T_H", "omega"}
        Horizontal variable; with "omega" every row must share one T_H.
    style : "journal", None or dict

    Returns
    -------
    (Figure, (Axes, Axes))
        Gids: ``"thermal"`` (the Planck curve), ``"hawking-value"``, ``"occupation-far"``
        (rows of ``model.far_spectrum`` with an ``occupation_far`` column),
        ``"occupation-contour"``, ``"occupation-direct"``,
        ``"temperature-contour"``, ``"temperature-direct"``.

    Raises
    ------
    InputError
        No rows, missing columns, a bad ``ax`` or ``xaxis``.

    Examples
    --------
    >>> import matplotlib; matplotlib.use("Agg")
    >>> rows = [{"omega": w, "hawking_temperature": 0.01, "occupation": 1 / math.expm1(w / 0.01),
    ...          "temperature_ratio": 1.0, "method": "contour"} for w in (0.005, 0.01, 0.02)]
    >>> fig, (top, bottom) = spectrum(rows)
    >>> sorted(l.get_gid() for l in top.get_lines())
    ['occupation-contour', 'thermal']
    """
    if xaxis not in ("omega/T_H", "omega"):
        raise InputError(f"xaxis must be 'omega/T_H' or 'omega', got {xaxis!r}")
    rows = _rows_of(spec_or_rows, "spec_or_rows")
    series = {}
    if any("occupation_contour" in r or "occupation_direct" in r for r in rows[:1]):
        for name in ("contour", "direct"):
            s = _series(rows, "_" + name, "the comparison table")
            if np.isfinite(s[2]).any() or np.isfinite(s[3]).any():
                series[name] = s
    else:
        method = rows[0].get("method", "contour")
        series[method if method in METHOD_STYLE else "contour"] = _series(rows, "", "spec_or_rows")
    if direct is not None:
        if "direct" in series:
            raise InputError("the first argument already holds direct results; give direct= only with a "
                             "contour spectrum")
        series["direct"] = _series(_rows_of(direct, "direct"), "", "direct")
    ths = np.concatenate([s[1] for s in series.values()])
    if xaxis == "omega" and np.ptp(ths) > 1e-12 * np.max(ths):
        raise InputError("the rows have different Hawking temperatures; plot against omega/T_H (xaxis='omega/T_H')")
    if ax is not None:
        try:
            top, bottom = ax
        except (TypeError, ValueError):
            raise InputError("ax must be a pair (top, bottom) of matplotlib Axes")
        if not all(isinstance(a, matplotlib.axes.Axes) for a in (top, bottom)):
            raise InputError("ax must be a pair (top, bottom) of matplotlib Axes")
    with matplotlib.rc_context(style_rc(style)):
        if ax is None:
            fig = Figure(figsize=(COLUMN_WIDTH, 3.9), layout="constrained")
            top, bottom = fig.subplots(2, 1, sharex=True)
        else:
            fig = top.get_figure()
        _draw(top, bottom, series, xaxis, float(ths[0]))
        if "occupation_far" in rows[0]:
            # far-region rows (model.far_spectrum): Gamma/(exp(omega/T_eff) - 1) beside |beta|^2
            wf = np.array([_num(r["omega"]) for r in rows], dtype=float)
            nf = np.array([_num(r["occupation_far"]) or np.nan for r in rows], dtype=float)
            xf = wf / np.array([_num(r["hawking_temperature"]) for r in rows], dtype=float) \
                if xaxis == "omega/T_H" else wf
            o = np.argsort(xf)
            top.plot(xf[o], nf[o], color=PALETTE["direct"], marker="^", ms=3.5, lw=0.9, ls=(0, (1, 1)),
                     gid="occupation-far", label=r"far region $\Gamma/(e^{\omega/T_\mathrm{eff}} - 1)$")
            top.legend(loc="upper right", frameon=False)
    return fig, (top, bottom)


def _draw(top, bottom, series, xaxis, T0):
    xs_all = []
    for name, (w, th, occ, tr) in series.items():
        xv = w / th if xaxis == "omega/T_H" else w
        xs_all.append(xv)
        st = dict(METHOD_STYLE[name])
        o = np.argsort(xv)
        top.plot(xv[o], occ[o], gid=f"occupation-{name}", zorder=4, **st)
        bottom.plot(xv[o], tr[o], gid=f"temperature-{name}", zorder=4, **st)
    xa = np.concatenate(xs_all)
    lo, hi = float(np.min(xa)), float(np.max(xa))
    if hi <= lo:
        lo, hi = 0.8 * lo, 1.2 * hi + (hi == 0)
    pad = 0.04 * (hi - lo)
    g = np.linspace(max(lo - pad, 1e-9 * hi), hi + pad, 400)
    ratio = g if xaxis == "omega/T_H" else g / T0
    top.plot(g, 1.0 / np.expm1(ratio), color=PALETTE["thermal"], lw=1.6, alpha=0.55, zorder=2, gid="thermal",
             label=r"thermal $1/(e^{\omega/T_H} - 1)$")
    bottom.axhline(1.0, color=PALETTE["thermal"], lw=1.6, alpha=0.55, zorder=2, gid="hawking-value",
                   label=r"Hawking value $T_H = \kappa/2\pi$")
    top.set_yscale("log")
    top.set_ylabel(r"$|\beta_\omega|^2$")
    bottom.set_ylabel(r"$T_\mathrm{eff}/T_H$")
    bottom.set_xlabel(r"$\omega/T_H$" if xaxis == "omega/T_H" else r"$\omega$")
    top.set_xlim(g[0], g[-1])
    vals = np.concatenate([s[3][np.isfinite(s[3])] for s in series.values()] + [np.array([1.0])])
    dev = float(np.max(np.abs(vals - 1.0)))
    span = max(dev * 1.3, 2e-3)
    bottom.set_ylim(1 - span, 1 + span)
    bottom.ticklabel_format(axis="y", useOffset=False)
    top.legend(loc="upper right", frameon=False)
    hv = [l for l in bottom.get_lines() if l.get_gid() == "hawking-value"]
    bottom.legend(handles=hv, loc="best", frameon=False)
