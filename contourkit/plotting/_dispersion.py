"""Dispersion diagrams: real branches omega(k) coloured by norm sign, with the labelled roots at one omega."""
import math

import matplotlib
import numpy as np
import sympy as sp

from ..errors import InputError
from ..geometry.saddles import check_x
from ._style import MARKERS, NORM_LINESTYLE, PALETTE, new_figure, style_rc
from ..symbolic._sym import OMEGA, KS

X = sp.Symbol("x")

NORM_LABEL = {1: r"norm $> 0$", -1: r"norm $< 0$"}


def _check_range(r, name):
    try:
        a, b = (float(v) for v in r)
    except (TypeError, ValueError):
        raise InputError(f"{name} must be two numbers (min, max), got {r!r}")
    if not (math.isfinite(a) and math.isfinite(b) and b > a):
        raise InputError(f"{name} must be two finite numbers with min < max, got {r!r}")
    return a, b


def _label_positions(ks, ax):
    """Vertical offsets (points) that keep neighbouring labels apart: alternate, and step out in clusters."""
    order = np.argsort(ks)
    offs = np.zeros(len(ks))
    span = np.ptp(ks) if len(ks) > 1 else 1.0
    prev = None
    level = 0
    for n, i in enumerate(order):
        if prev is not None and abs(ks[i] - ks[prev]) < 0.12 * max(span, 1e-300):
            level += 1
        else:
            level = 0
        sign = 1 if n % 2 == 0 else -1
        offs[i] = sign * (9 + 9 * (level // 2))
        prev = i
    return offs


def _branches(coeffs_w, dDdw, kgrid):
    """Real roots omega(k) sorted per k, and their norm signs; arrays (n_branches, n_k) with NaN gaps."""
    deg = len(coeffs_w) - 1
    W = np.full((deg, kgrid.size), np.nan)
    S = np.zeros((deg, kgrid.size))
    for j, k in enumerate(kgrid):
        c = np.array([complex(f(k)) for f in coeffs_w[::-1]])      # highest power first
        c = np.trim_zeros(c, "f")
        if len(c) < 2:
            continue
        r = np.roots(c)
        scale = max(1.0, float(np.max(np.abs(r))))
        real = np.sort(r[np.abs(r.imag) <= 1e-9 * scale].real)
        for b, w in enumerate(real):
            W[b, j] = w
            S[b, j] = np.sign(float(np.real(dDdw(w, k))))
    return W, S


def dispersion(model_or_eq, x=None, omega=None, *, side=None, ax=None, krange=None, wrange=None,
               legend=True, style="journal"):
    r"""Dispersion diagram: the real branches of ``D(omega, k; x) = 0`` and the roots at one frequency.

    For a :class:`~contourkit.symbolic.horizon.HorizonModel` the branches ``omega(k)``
    of the full profile at position ``x`` (or, with ``x=None`` and
    ``side``, of the uniform asymptotic region, from
    :func:`contourkit.profiles.planewaves.asymptotic_dispersion`) are found by solving
    the polynomial in omega at each k.  They are coloured by norm sign
    ``sign(dD/domega)`` (blue, solid: positive; vermillion, dashed: negative;
    Okabe-Ito colours, told apart in greyscale by the dash).  With ``omega``
    the horizontal line at omega is drawn and each real root k of
    ``D(omega, k; x) = 0`` is marked and labelled with its mode name from the
    mode catalogue (:func:`contourkit.profiles.planewaves.local_modes`: side,
    in/out from the group velocity ``-(dD/dk)/(dD/domega)``, norm sign;
    e.g. ``ext-out+``).

    For a :class:`~contourkit.symbolic.equation.ModeEquation` (or its k-space
    representation), which has no frequency, the diagram is the real curve
    ``sigma0(k) + x' sigma1(k) = 0`` of the local dispersion relation in the
    (k, x') plane, with the line at ``x`` and its real saddle points marked
    ``k_1, k_2, ...``.

    Parameters
    ----------
    model_or_eq : HorizonModel, ModeEquation or KSpaceRepresentation
    x : float, optional
        Position (the model's own coordinate).  Required for a ModeEquation.
    omega : float, optional
        Frequency of the horizontal line and the labelled roots (HorizonModel only).
    side : {"exterior", "interior"}, optional
        Side for the in/out labels (default: from the sign of ``x - horizon``);
        with ``x=None`` the asymptotic region of that side is drawn.
    ax : matplotlib Axes, optional
    krange : (kmin, kmax), optional
        Default: centred on the real roots at omega and on the extrema of the
        branches that set a cut-off (marked, gid ``"cutoff"``), with a quarter
        of their spread on each side.
    wrange : (min, max), optional
        Vertical range (omega, or x' for a ModeEquation).  Default: 0, omega and
        the cut-off extrema with 30 % of their spread as margin (without them,
        the branches in krange).  Real roots closer than 2 % of the k range get
        an inset (axes labelled ``"root-zoom"``) showing them apart.
    legend : bool
    style : "journal", None or dict

    Returns
    -------
    (Figure, Axes)
        Gids: ``"branch+"`` / ``"branch-"`` (the norm-coloured branch lines),
        ``"omega-line"``, ``"intersection"`` (one marker per real root, one
        Line2D), ``"root-label"`` (one annotation per root, its text the mode name).

    Raises
    ------
    InputError
        Missing or non-finite x/omega, a bad side or range, a model without
        uniform asymptotic regions for ``x=None``.

    Examples
    --------
    >>> import matplotlib; matplotlib.use("Agg")
    >>> import contourkit as ck
    >>> m = ck.catalogue.quartic_flow(kappa=0.05, Lambda=2.5, D=0.5)
    >>> fig, ax = dispersion(m, omega=0.2, side="interior")
    >>> sorted(t.get_text() for t in ax.texts if t.get_gid() == "root-label")
    ['int-in+', 'int-in-', 'int-out+', 'int-out-']
    """
    from ..symbolic.kspace import KSpaceRepresentation
    from ..symbolic.horizon import HorizonModel
    from ..symbolic.equation import ModeEquation
    if krange is not None:
        krange = _check_range(krange, "krange")
    if wrange is not None:
        wrange = _check_range(wrange, "wrange")
    if isinstance(model_or_eq, HorizonModel):
        draw = _model_diagram
    elif isinstance(model_or_eq, (ModeEquation, KSpaceRepresentation)):
        if omega is not None:
            raise InputError("a ModeEquation is at one fixed frequency already and has no omega branches; pass "
                             "the HorizonModel for an omega(k) diagram, or leave omega out")
        if side is not None:
            raise InputError("side applies to a HorizonModel only")
        draw = _equation_diagram
    else:
        raise InputError(f"dispersion needs a HorizonModel, a ModeEquation or a KSpaceRepresentation, got "
                         f"{type(model_or_eq).__name__}")
    with matplotlib.rc_context(style_rc(style)):
        fig, ax = new_figure(ax, height=2.9)
        draw(ax, model_or_eq, x, omega, side, krange, wrange, legend)
    return fig, ax


def _extrema(D, omega, model=None, side=None):
    """The extrema of the real branches (cut-offs: D = dD/dk = 0 at real k) worth showing beside omega.

    For an asymptotic region (``model`` given) the model's cached cut-offs of that side are used.
    """
    from ..profiles.cutoff import cutoffs, model_cutoffs
    try:
        cs = [c for c in model_cutoffs(model) if c.side == side] if model is not None else cutoffs(D)
    except Exception:   # a display aid only: a dispersion relation the cut-off search cannot take shows none
        return []
    if not cs:
        return []
    top = max(abs(omega) if omega is not None else 0.0, cs[0].omega)
    return [c for c in cs if c.omega <= 2.0 * top]


def _auto_krange(model, modes, prop, extrema, omega):
    """k range centred on the real roots at omega and the extrema, with a quarter of their spread each side."""
    ks = [m.k.real for m in prop] + [c.k for c in extrema]
    if not ks and omega is not None:
        ks = [abs(m.k) for m in modes] + [-abs(m.k) for m in modes]
    if not ks:
        scale = float(getattr(model, "Lambda", None) or 1.0)
        return (-1.3 * scale, 1.3 * scale)
    lo, hi = min(ks + [0.0]), max(ks + [0.0])
    pad = max(0.25 * (hi - lo), 0.1 * max(abs(lo), abs(hi)), 1e-9)
    return (lo - pad, hi + pad)


def _auto_wrange(W, omega, extrema):
    """omega range holding 0, omega and the extrema with 30 % of their spread as margin (or the branches)."""
    ws = [0.0] + ([omega] if omega is not None else []) + [c.omega for c in extrema]
    if len(ws) > 1:
        lo, hi = min(ws), max(ws)
        pad = 0.3 * (hi - lo)
        return (lo - pad, hi + pad)
    fin = W[np.isfinite(W)]
    if fin.size and np.ptp(fin) > 0:
        return (float(fin.min()), float(fin.max()))
    return (-1.0, 1.0)


def _model_diagram(ax, model, x, omega, side, krange, wrange, legend):
    from ..profiles import planewaves
    if side is not None and side not in ("exterior", "interior"):
        raise InputError(f"side must be 'exterior' or 'interior', got {side!r}")
    if omega is not None:
        if isinstance(omega, bool):
            raise InputError(f"omega must be a number, got {omega!r}")
        try:
            omega = float(omega)
        except (TypeError, ValueError):
            raise InputError(f"omega must be a number, got {omega!r}")
        if not math.isfinite(omega):
            raise InputError(f"omega must be finite, got {omega!r}")
    if x is None:
        if side is None:
            raise InputError("give a position x, or side='exterior'/'interior' for an asymptotic region")
        D = planewaves.asymptotic_dispersion(model, side)
        where = f"{side}, $x \\to {'+' if side == 'exterior' else '-'}\\infty$"
    else:
        x = check_x(x)
        xh = float(model.horizon)
        if side is None:
            if x == xh:
                raise InputError(f"x = {x} is the horizon, where in and out are not defined; give side=")
            side = "exterior" if x > xh else "interior"
        D = sp.expand(model.dispersion.subs(X, sp.Rational(repr(x))))
        where = f"$x = {x:g}$ ({side})"
    if omega is not None:
        where += f", $\\omega = {omega:g}$"
    poly = sp.Poly(D, OMEGA)
    coeffs_w = [sp.lambdify(KS, poly.coeff_monomial(OMEGA ** p), "numpy") for p in range(poly.degree() + 1)]
    dDdw = sp.lambdify((OMEGA, KS), sp.diff(D, OMEGA), "numpy")
    modes = []
    if omega is not None:
        if x is None:
            modes = planewaves.asymptotic_modes(model, omega, side)
        else:
            modes = planewaves.local_modes(model, omega, x, side)
    prop = [m for m in modes if m.kind == "propagating"]
    extrema = _extrema(D, omega, model if x is None else None, side)
    if krange is None:
        krange = _auto_krange(model, modes, prop, extrema, omega)
    kg = np.linspace(krange[0], krange[1], 801)
    W, S = _branches(coeffs_w, dDdw, kg)
    _draw_branches(ax, kg, W, S, legend=True)
    if wrange is None:
        wrange = _auto_wrange(W, omega, extrema)
    for c in extrema:
        ax.plot([c.k], [c.omega], ls="none", marker="v", ms=4.5, mfc="white", mec=PALETTE["negative" if c.norm < 0
                else "positive"], mew=1.0, zorder=6, gid="cutoff", label=r"cut-off $\omega_\mathrm{max}$")
        ax.annotate(rf"$\omega_\mathrm{{max}} = {c.omega:.3g}$", (c.k, c.omega), xytext=(0, 6),
                    textcoords="offset points", ha="center", va="bottom", fontsize=7, zorder=7, gid="cutoff-label",
                    bbox=dict(boxstyle="round,pad=0.1", fc="white", ec="none", alpha=0.85))
    ax.set_xlim(*krange)
    ax.set_ylim(*wrange)
    if omega is not None:
        ax.axhline(omega, color=PALETTE["omega"], lw=0.7, ls=(0, (1, 1.5)), zorder=2, gid="omega-line",
                   label=rf"$\omega = {omega:g}$")
        if prop:
            kk = np.array([m.k.real for m in prop])
            group = _close_roots(kk, krange)
            _draw_roots(ax, prop, omega, skip_labels=group, legend=True)
            if group:
                _root_zoom(ax, coeffs_w, dDdw, prop, group, omega, krange, wrange)
    ax.axhline(0, color="0.75", lw=0.4, zorder=1)
    ax.axvline(0, color="0.75", lw=0.4, zorder=1)
    ax.set_xlabel(r"$k$")
    ax.set_ylabel(r"$\omega$")
    ax.set_title(where)
    if legend:
        leg = ax.legend(loc="upper center", bbox_to_anchor=(0.5, -0.2), ncol=3, frameon=False, fontsize=7,
                        handlelength=1.8, columnspacing=0.8)
        leg.set_gid("legend")


def _draw_branches(ax, kg, W, S, *, legend):
    for sgn in (1, -1):
        first = legend
        for b in range(W.shape[0]):
            m = S[b] == sgn
            # widen each run by one point so that the two colours meet without a gap
            mm = m | np.concatenate([m[1:], [False]]) | np.concatenate([[False], m[:-1]])
            y = np.where(mm & np.isfinite(W[b]), W[b], np.nan)
            if np.all(np.isnan(y)):
                continue
            ax.plot(kg, y, color=PALETTE["positive" if sgn > 0 else "negative"], ls=NORM_LINESTYLE[sgn], lw=1.2,
                    gid="branch+" if sgn > 0 else "branch-", label=NORM_LABEL[sgn] if first else None, zorder=3)
            first = False


def _draw_roots(ax, prop, omega, *, skip_labels=(), legend=False, fontsize=7.5):
    kk = np.array([m.k.real for m in prop])
    ax.plot(kk, np.full(kk.size, omega), ls="none", marker=MARKERS["intersection"], ms=4.5, mfc="white",
            mec="black", mew=0.9, zorder=6, gid="intersection", label="real root (mode)" if legend else None)
    keep = [j for j in range(len(prop)) if j not in skip_labels]
    offs = _label_positions(kk[keep], ax) if keep else []
    for j, dy in zip(keep, offs):
        m = prop[j]
        ax.annotate(m.name, (m.k.real, omega), xytext=(0, dy), textcoords="offset points",
                    ha="center", va="bottom" if dy > 0 else "top", fontsize=fontsize, zorder=7,
                    gid="root-label", arrowprops=dict(arrowstyle="-", lw=0.4, color="0.3", shrinkA=0, shrinkB=2.5),
                    bbox=dict(boxstyle="round,pad=0.1", fc="white", ec="none", alpha=0.85))


def _close_roots(kk, krange, fraction=0.02, chain=0.035):
    """Indices of the first group of real roots with a gap below ``fraction`` of the k range (empty if none).

    The group takes in its neighbours up to gaps of ``chain`` of the k range, so that the inset shows
    every root of the crowded stretch.
    """
    order = np.argsort(kk)
    span = krange[1] - krange[0]
    gaps = np.diff(kk[order])
    close = np.nonzero(gaps < fraction * span)[0]
    if not close.size:
        return []
    lo = hi = int(close[0])                       # the gap between order[lo] and order[lo + 1]
    while lo > 0 and gaps[lo - 1] < chain * span:
        lo -= 1
    while hi + 1 < gaps.size and gaps[hi + 1] < chain * span:
        hi += 1
    return sorted(int(i) for i in order[lo:hi + 2])


def _root_zoom(ax, coeffs_w, dDdw, prop, group, omega, krange, wrange):
    """An inset zooming on real roots too close to tell apart, in the emptiest corner of the axes."""
    ks = np.array([prop[j].k.real for j in group])
    c, half = (ks.min() + ks.max()) / 2, max(np.ptp(ks), 1e-12) * 1.1
    kwin = (c - half, c + half)
    kg = np.linspace(kwin[0], kwin[1], 401)
    W, S = _branches(coeffs_w, dDdw, kg)
    fin = W[np.isfinite(W)]
    wspan = (wrange[1] - wrange[0]) * (kwin[1] - kwin[0]) / (krange[1] - krange[0])
    if fin.size:
        wspan = max(wspan, 0.6 * float(np.ptp(np.clip(fin, omega - 10 * wspan, omega + 10 * wspan))))
    wspan = min(wspan, 0.25 * (wrange[1] - wrange[0]))
    wwin = (omega - wspan, omega + wspan)
    # the corner whose box holds the fewest branch samples and roots
    big = np.linspace(krange[0], krange[1], 801)
    Wb, _ = _branches(coeffs_w, dDdw, big)
    u = (np.broadcast_to(big, Wb.shape) - krange[0]) / (krange[1] - krange[0])
    v = (Wb - wrange[0]) / (wrange[1] - wrange[0])
    boxes = [(0.02, 0.56), (0.6, 0.56), (0.02, 0.04), (0.6, 0.04)]
    kk = (np.array([m.k.real for m in prop]) - krange[0]) / (krange[1] - krange[0])
    vv = (omega - wrange[0]) / (wrange[1] - wrange[0])

    def ink(b):
        inb = (u >= b[0]) & (u <= b[0] + 0.38) & (v >= b[1]) & (v <= b[1] + 0.4)
        roots = np.sum((kk >= b[0] - 0.05) & (kk <= b[0] + 0.43) & (vv >= b[1] - 0.1) & (vv <= b[1] + 0.5))
        return int(np.sum(inb)) + 1000 * int(roots)
    bx = min(boxes, key=ink)
    ins = ax.inset_axes([bx[0], bx[1], 0.38, 0.4])
    ins.set_label("root-zoom")
    ins.set_gid("root-zoom")
    _draw_branches(ins, kg, W, S, legend=False)
    ins.axhline(omega, color=PALETTE["omega"], lw=0.7, ls=(0, (1, 1.5)), zorder=2)
    ins.set_xlim(*kwin)
    ins.set_ylim(*wwin)
    _draw_roots(ins, [prop[j] for j in group], omega, fontsize=6.5)
    ins.tick_params(labelsize=6, pad=1.5)
    for axis in (ins.xaxis, ins.yaxis):
        axis.set_major_locator(matplotlib.ticker.MaxNLocator(3))
        fmt = matplotlib.ticker.ScalarFormatter(useMathText=True)
        fmt.set_powerlimits((-2, 4))
        axis.set_major_formatter(fmt)
        axis.get_offset_text().set_fontsize(6)
    ins.patch.set_alpha(0.92)
    from matplotlib.patches import Rectangle
    fw = max(kwin[1] - kwin[0], 0.03 * (krange[1] - krange[0]))
    fh = max(wwin[1] - wwin[0], 0.05 * (wrange[1] - wrange[0]))
    ax.add_patch(Rectangle((c - fw / 2, omega - fh / 2), fw, fh, fill=False, ec="black", lw=0.6, zorder=8,
                           gid="zoom-frame"))
    return ins


def _equation_diagram(ax, eq, x, omega, side, krange, wrange, legend):
    from ..symbolic.kspace import KSpaceRepresentation
    rep = eq if isinstance(eq, KSpaceRepresentation) else eq.fourier()
    if x is None:
        raise InputError("give the position x for the diagram of a ModeEquation")
    x = check_x(x)
    s0, s1 = rep.equation.weyl_symbol
    f0 = sp.lambdify(KS, s0, "numpy")
    f1 = sp.lambdify(KS, s1, "numpy")
    sad = np.asarray(rep.saddles(x), dtype=complex)
    scale = max(1.0, float(np.max(np.abs(sad)))) if sad.size else 1.0
    real = np.sort(sad[np.abs(sad.imag) <= 1e-9 * scale].real)
    if krange is None:
        kmax = 1.4 * max([abs(v) for v in real] + [float(np.max(np.abs(sad))) if sad.size else 1.0])
        krange = (-kmax, kmax)
    kg = np.linspace(krange[0], krange[1], 801)
    with np.errstate(all="ignore"):
        a = np.broadcast_to(np.asarray(f0(kg), dtype=complex), kg.shape)
        b = np.broadcast_to(np.asarray(f1(kg), dtype=complex), kg.shape)
        xs = -a / b
    ok = np.isfinite(xs) & (np.abs(xs.imag) <= 1e-9 * np.maximum(1.0, np.abs(xs)))
    y = np.where(ok, xs.real, np.nan)
    ax.plot(kg, y, color=PALETTE["positive"], lw=1.2, gid="branch",
            label=r"$\sigma_0(k) + x\,\sigma_1(k) = 0$", zorder=3)
    ax.axhline(x, color=PALETTE["omega"], lw=0.7, ls=(0, (1, 1.5)), zorder=2, gid="omega-line",
               label=rf"$x = {x:g}$")
    if real.size:
        ax.plot(real, np.full(real.size, x), ls="none", marker=MARKERS["intersection"], ms=4.5, mfc="white",
                mec="black", mew=0.9, zorder=6, gid="intersection", label="real saddle point")
        offs = _label_positions(real, ax)
        for j, (k, dy) in enumerate(zip(real, offs), start=1):
            ax.annotate(f"$k_{{{j}}} = {k:.3g}$".replace("-", "\N{MINUS SIGN}"), (k, x), xytext=(0, dy),
                        textcoords="offset points", ha="center", va="bottom" if dy > 0 else "top",
                        fontsize=7.5, zorder=7, gid="root-label",
                        bbox=dict(boxstyle="round,pad=0.1", fc="white", ec="none", alpha=0.85))
    if wrange is None:
        fin = y[np.isfinite(y)]
        lo, hi = (float(fin.min()), float(fin.max())) if fin.size else (x - 1, x + 1)
        lo, hi = min(lo, x), max(hi, x)
        pad = 0.08 * (hi - lo or 1.0)
        wrange = (lo - pad, hi + pad)
    ax.set_xlim(*krange)
    ax.set_ylim(*wrange)
    ax.set_xlabel(r"$k$")
    ax.set_ylabel(r"position $x$")
    ax.set_title("local dispersion relation")
    if legend:
        leg = ax.legend(loc="upper center", bbox_to_anchor=(0.5, -0.2), ncol=2, frameon=False, fontsize=7)
        leg.set_gid("legend")
