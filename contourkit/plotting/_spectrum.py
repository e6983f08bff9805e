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


def _flag(r, key, suffix, default=True):
    """A boolean column of a row (``key + suffix``, else ``key``); missing or None gives the default."""
    v = r.get(key + suffix) if (key + suffix) in r else r.get(key)
    if v is None:
        return default
    return bool(v)


def _series(rows, suffix, what):
    """(omega, T_H, occupation, temperature_ratio) arrays of one method; values that are absent are NaN.

    A value is absent (NaN, never zero) when it is None, NaN or missing, when
    the row failed (``success`` False), when it has no Hawking channel
    (``hawking_channel`` False, read with a default of True), and for an
    occupation of zero or below (beta = 0: no channel; a log axis cannot
    show it), which also makes its temperature absent (T_eff = 0 is no
    temperature).
    """
    need = ("omega", "hawking_temperature", "occupation" + suffix)
    for key in need:
        if not any(key in r for r in rows):
            raise InputError(f"{what} rows have no {key!r} column (the columns are {', '.join(rows[0])})")
    ths = [t for t in (_num(r.get("hawking_temperature")) for r in rows) if t is not None and t > 0]
    if not ths:
        raise InputError(f"{what}: no row has a positive hawking_temperature; the spectrum needs T_H")
    out = []
    for r in rows:
        w, th = _num(r.get("omega")), _num(r.get("hawking_temperature"))
        if w is None:
            raise InputError(f"{what}: every row needs a finite omega, got omega={r.get('omega')!r}")
        if th is None or th <= 0:
            if np.ptp(ths) > 1e-12 * max(ths) or _flag(r, "success", suffix):
                raise InputError(f"{what}: a row at omega={w!r} has no positive hawking_temperature "
                                 f"(got {r.get('hawking_temperature')!r})")
            th = ths[0]                 # a failed row without T_H: the common T_H of the others
        ok = _flag(r, "success", suffix) and _flag(r, "hawking_channel", suffix)
        occ = _num(r.get("occupation" + suffix)) if ok else None
        tr = _num(r.get("temperature_ratio" + suffix)) if ok else None
        if ok and tr is None:
            te = _num(r.get("effective_temperature" + suffix))
            tr = te / th if te is not None else None
        if occ is not None and occ <= 0:
            occ, tr = None, None
        if tr is not None and tr <= 0:
            tr = None
        out.append((w, th, np.nan if occ is None else occ, np.nan if tr is None else tr))
    return np.array(out, dtype=float).T


#: horizontal variables: label, and the factor that turns (omega, T_H) into it
XAXES = {"omega": (r"$\omega$", lambda w, th: w),
         "omega/T_H": (r"$\omega/T_H$", lambda w, th: w / th),
         "omega/kappa": (r"$\omega/\kappa$", lambda w, th: w / (2 * math.pi * th))}


def spectrum(spec_or_rows, *, direct=None, ax=None, xaxis="omega/T_H", omega_max=None, model=None,
             legend=True, style="journal"):
    r"""Two panels: the occupation ``|beta|^2`` with the thermal curve, and ``T_eff/T_H``.

    Top: ``|beta|^2`` (log scale) with the Planck curve
    ``1/(exp(omega/T_H) - 1)``, drawn over the frequencies of the data only;
    bottom: ``T_eff/T_H`` with the Hawking value 1.  The axis limits come
    from the data.  Contour (near-horizon) and direct (full-profile) results
    are drawn side by side when both are present: give a
    :class:`~contourkit.profiles.comparison.ComparisonTable` (both methods
    in one table), or a contour spectrum and ``direct=...``.  Values that
    do not exist are left out, never drawn as zero: None, NaN or missing
    entries, failed rows (``success`` False), rows without a Hawking channel
    (``hawking_channel`` False) and occupations of zero (beta = 0, as the
    direct solver reports above the cut-off) with their temperature.
    The cut-off ``omega_max`` (given, or ``model.omega_max``) is marked by a
    vertical line on both panels with the frequencies above it shaded; one
    far beyond the data (more than 1.5 times the largest frequency) is
    named in a note at the right edge instead.

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
    xaxis : {"omega/T_H", "omega/kappa", "omega"}
        Horizontal variable (``kappa = 2 pi T_H``); with "omega" every row must share one T_H.
    omega_max : float or False, optional
        The cut-off frequency to mark (default: ``model.omega_max`` when a
        model is given; False: no mark).
    model : HorizonModel, optional
        The model of the rows, for its cut-off.
    legend : bool
        One legend under the two panels (in the top panel when ``ax`` is given).
    style : "journal", None or dict

    Returns
    -------
    (Figure, (Axes, Axes))
        Gids: ``"thermal"`` (the Planck curve), ``"hawking-value"``, ``"occupation-far"``
        (rows of ``model.far_spectrum`` with an ``occupation_far`` column),
        ``"occupation-contour"``, ``"occupation-direct"``,
        ``"temperature-contour"``, ``"temperature-direct"``, ``"cutoff"``
        (the line in each panel, or the note), ``"cutoff-region"``.

    Raises
    ------
    InputError
        No rows, missing columns, a bad ``ax``, ``xaxis`` or ``omega_max``.

    Examples
    --------
    >>> import matplotlib; matplotlib.use("Agg")
    >>> rows = [{"omega": w, "hawking_temperature": 0.01, "occupation": 1 / math.expm1(w / 0.01),
    ...          "temperature_ratio": 1.0, "method": "contour"} for w in (0.005, 0.01, 0.02)]
    >>> fig, (top, bottom) = spectrum(rows, omega_max=0.025)
    >>> sorted(l.get_gid() for l in top.get_lines())
    ['cutoff', 'occupation-contour', 'thermal']
    """
    if xaxis not in XAXES:
        raise InputError(f"xaxis must be one of {', '.join(map(repr, XAXES))}, got {xaxis!r}")
    if omega_max is None and model is not None:
        omega_max = getattr(model, "omega_max", None)
    if omega_max is not None and omega_max is not False:
        omega_max = _num(omega_max)
        if omega_max is None or omega_max <= 0:
            raise InputError(f"omega_max must be a positive number or False, got {omega_max!r}")
    if omega_max is False:
        omega_max = None
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
    if not any(np.isfinite(s[2]).any() or np.isfinite(s[3]).any() for s in series.values()):
        raise InputError("no row has a value to draw (every row failed or has no Hawking channel)")
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
            fig = Figure(figsize=(COLUMN_WIDTH, 4.1 if legend else 3.6), layout="constrained")
            top, bottom = fig.subplots(2, 1, sharex=True)
        else:
            fig = top.get_figure()
        _draw(top, bottom, series, xaxis, float(ths[0]), omega_max)
        if "occupation_far" in rows[0]:
            # far-region rows (model.far_spectrum): Gamma/(exp(omega/T_eff) - 1) beside |beta|^2;
            # rows without a value are left out, never drawn as zero
            wf = np.array([_num(r.get("omega")) for r in rows], dtype=float)
            nf = np.array([_num(r.get("occupation_far")) for r in rows], dtype=float)
            tf = np.array([_num(r.get("hawking_temperature")) for r in rows], dtype=float)
            keep = np.isfinite(wf) & np.isfinite(nf) & np.isfinite(tf) & (nf > 0)
            xf = XAXES[xaxis][1](wf[keep], tf[keep])
            o = np.argsort(xf)
            top.plot(xf[o], nf[keep][o], color=PALETTE["direct"], marker="^", ms=3.5, lw=0.9, ls=(0, (1, 1)),
                     gid="occupation-far", label=r"far region $\Gamma/(e^{\omega/T_\mathrm{eff}} - 1)$")
        if legend:
            hs = [l for l in top.get_lines() + bottom.get_lines() + top.patches
                  if l.get_label() and not l.get_label().startswith("_")]
            if ax is None:
                leg = fig.legend(handles=hs, loc="outside lower center", ncol=2, frameon=False, fontsize=7,
                                 handlelength=2.0, columnspacing=1.0)
            else:
                leg = top.legend(handles=hs, loc="best", frameon=False, fontsize=7)
            leg.set_gid("legend")
    return fig, (top, bottom)


def _draw(top, bottom, series, xaxis, T0, omega_max):
    label, conv = XAXES[xaxis]
    xs_all = []
    for name, (w, th, occ, tr) in series.items():
        xv = conv(w, th)
        xs_all.append(xv[np.isfinite(occ) | np.isfinite(tr)])
        st = dict(METHOD_STYLE[name])
        o = np.argsort(xv)
        top.plot(xv[o], occ[o], gid=f"occupation-{name}", zorder=4, **st)
        st["label"] = None
        bottom.plot(xv[o], tr[o], gid=f"temperature-{name}", zorder=4, **st)
    xa = np.concatenate(xs_all)
    lo, hi = float(np.min(xa)), float(np.max(xa))
    # the thermal reference over the data's range only
    g = np.linspace(lo, hi, 400) if hi > lo else np.array([lo])
    ratio = g / conv(1.0, T0) * (1.0 / T0) if xaxis != "omega/T_H" else g
    with np.errstate(over="ignore"):
        planck = 1.0 / np.expm1(ratio)
    top.plot(g, planck, color=PALETTE["thermal"], lw=1.6, alpha=0.55, zorder=2, gid="thermal",
             label=r"thermal $1/(e^{\omega/T_H} - 1)$")
    bottom.axhline(1.0, color=PALETTE["thermal"], lw=1.6, alpha=0.55, zorder=2, gid="hawking-value",
                   label=r"Hawking value $T_\mathrm{eff} = T_H$")
    top.set_yscale("log")
    top.set_ylabel(r"$|\beta_\omega|^2$")
    bottom.set_ylabel(r"$T_\mathrm{eff}/T_H$")
    bottom.set_xlabel(label)
    span = hi - lo if hi > lo else max(abs(hi), 1.0)
    xlo, xhi = lo - 0.04 * span, hi + 0.04 * span
    if omega_max is not None:
        xc = conv(omega_max, T0)
        if xc <= 1.5 * hi:
            xhi = max(xhi, xc + 0.04 * span)
            for a in (top, bottom):
                a.axvline(xc, color=PALETTE["cut"], lw=0.9, ls=(0, (5, 2, 1, 2)), zorder=3, gid="cutoff",
                          label=r"cut-off $\omega_\mathrm{max}$" if a is top else None)
                a.axvspan(xc, max(xhi, xc) + span, color="0.5", alpha=0.12, lw=0, zorder=0, gid="cutoff-region")
        else:
            top.annotate(r"$\omega_\mathrm{max}$" + f" = {omega_max:.3g} beyond the axis \N{RIGHTWARDS ARROW}",
                         (1.0, 1.0), xycoords="axes fraction", xytext=(-2, -2), textcoords="offset points",
                         ha="right", va="top", fontsize=6.5, gid="cutoff")
    top.set_xlim(xlo, xhi)
    occs = np.concatenate([s[2][np.isfinite(s[2])] for s in series.values()] + [planck[np.isfinite(planck)]])
    occs = occs[occs > 0]
    if occs.size:
        olo, ohi = float(np.min(occs)), float(np.max(occs))
        pad = 10 ** min(max(0.3, 0.06 * math.log10(ohi / olo)), 0.9)    # 6 % of the decades, 0.3 ... 0.9
        top.set_ylim(olo / pad, ohi * pad)
    vals = np.concatenate([s[3][np.isfinite(s[3])] for s in series.values()] + [np.array([1.0])])
    dev = float(np.max(np.abs(vals - 1.0)))
    half = max(dev * 1.3, 2e-3)
    bottom.set_ylim(1 - half, 1 + half)
    bottom.ticklabel_format(axis="y", useOffset=False)
