"""Unstable-mode figures: the complex omega plane with the modes found, and a mode's profile.

Reads the results of :func:`contourkit.profiles.unstable.unstable_modes` only (any
objects with ``.omega``, ``.residual`` and ``.profile``; a list that also has
``.box`` draws the search box).  Not yet exported from
:mod:`contourkit.plotting` (the integrator wires it).
"""
import math

import matplotlib
import numpy as np

from ..errors import InputError
from ._style import COLUMN_WIDTH, MARKERS, PALETTE, new_figure, style_rc

#: marker area (points^2) for residuals 1e-16 (largest) ... 1e-4 (smallest)
SIZE_RANGE = (60.0, 6.0)


def _residual_size(res):
    """Marker area from a residual: larger for a smaller residual (log scale, 1e-16 .. 1e-4)."""
    r = min(max(float(res), 1e-16), 1e-4)
    f = (math.log10(r) + 16.0) / 12.0                       # 0 at 1e-16, 1 at 1e-4
    return SIZE_RANGE[0] + f * (SIZE_RANGE[1] - SIZE_RANGE[0])


def _check_modes(modes):
    try:
        items = list(modes)
    except TypeError:
        raise InputError(f"modes must be a list of unstable modes (the result of unstable_modes), got "
                         f"{type(modes).__name__}")
    for md in items:
        if not all(hasattr(md, a) for a in ("omega", "residual", "profile")):
            raise InputError(f"every mode needs .omega, .residual and .profile (as UnstableMode); got "
                             f"{type(md).__name__}")
        if not (math.isfinite(complex(md.omega).real) and math.isfinite(complex(md.omega).imag)
                and math.isfinite(float(md.residual))):
            raise InputError(f"mode with a non-finite omega or residual: {md!r}")
    return items


def mode_plane(modes, *, ax=None, mirrors=True, box=True, style="journal"):
    r"""The complex omega plane with the unstable modes; marker size by residual.

    Parameters
    ----------
    modes : ModeList or list of UnstableMode
    ax : matplotlib Axes, optional
    mirrors : bool
        Also draw the mirror images ``-conj(omega)`` of oscillating modes
        (hollow markers): the same real solutions.
    box : bool
        Outline the search box (``modes.box``) when the list carries one.
    style : "journal", None or dict

    Returns
    -------
    (Figure, Axes)
        Gids: ``"mode"`` (one PathCollection, one marker per mode, sizes from
        the residuals), ``"mirror"``, ``"search-box"``, ``"size-key"``.

    Examples
    --------
    >>> import matplotlib; matplotlib.use("Agg")
    >>> from types import SimpleNamespace as NS
    >>> md = [NS(omega=0.04 + 0.0145j, residual=2e-12, profile=None, oscillating=True)]
    >>> fig, ax = mode_plane(md)
    >>> [c.get_gid() for c in ax.collections][:2]
    ['mode', 'mirror']
    """
    items = _check_modes(modes)
    with matplotlib.rc_context(style_rc(style)):
        fig, ax = new_figure(ax, height=2.6)
        w = np.array([complex(md.omega) for md in items], dtype=complex)
        sizes = np.array([_residual_size(md.residual) for md in items])
        colour = PALETTE["negative"]
        ax.scatter(w.real, w.imag, s=sizes, marker=MARKERS["pole"], color=colour, edgecolors="black",
                   linewidths=0.4, zorder=3, gid="mode", label="unstable mode")
        if mirrors:
            osc = [getattr(md, "oscillating", True) for md in items]
            wm = np.array([-np.conj(z) for z, o in zip(w, osc) if o], dtype=complex)
            ax.scatter(wm.real, wm.imag, s=sizes[np.array(osc, dtype=bool)] if len(wm) else [],
                       marker=MARKERS["pole"], facecolors="none", edgecolors=colour, linewidths=0.7, zorder=3,
                       gid="mirror", label=r"mirror $-\bar\omega$")
        rect = getattr(modes, "box", None)
        if box and rect is not None:
            r0, r1, i0, i1 = rect
            ax.plot([r0, r1, r1, r0, r0], [i0, i0, i1, i1, i0], color=PALETTE["level"], lw=0.6,
                    ls=(0, (3.0, 2.0)), gid="search-box", label="search box")
        ax.axhline(0.0, color=PALETTE["cut"], lw=0.5)
        ax.axvline(0.0, color=PALETTE["cut"], lw=0.3)
        for r in (1e-14, 1e-10, 1e-6):                    # size key
            ax.scatter([], [], s=_residual_size(r), marker=MARKERS["pole"], color="0.7", edgecolors="black",
                       linewidths=0.4, label=f"residual {r:.0e}", gid="size-key")
        if items:                                          # frame the modes, not the (taller) search box
            top = 1.3 * float(np.max(w.imag))
            ax.set_ylim(-0.06 * top, top)
        ax.set_xlabel(r"Re $\omega$")
        ax.set_ylabel(r"Im $\omega$ (growth rate)")
        if not items:
            ax.text(0.5, 0.5, "no unstable mode in the box", transform=ax.transAxes, ha="center", va="center")
        ax.legend(loc="best", scatterpoints=1)
    return fig, ax


def mode_profile(mode, *, ax=None, horizons=None, style="journal"):
    r"""Real part, imaginary part and modulus of an unstable mode's profile phi(x).

    Parameters
    ----------
    mode : UnstableMode
        ``mode.profile`` is ``(x, phi)``.
    ax : matplotlib Axes, optional
    horizons : sequence of float, optional
        Positions marked by vertical lines (e.g. ``(model.white_horizon, model.horizon)``).
    style : "journal", None or dict

    Returns
    -------
    (Figure, Axes)
        Gids: ``"re"``, ``"im"``, ``"abs"``, ``"horizon"``.

    Examples
    --------
    >>> import matplotlib; matplotlib.use("Agg")
    >>> from types import SimpleNamespace as NS
    >>> x = np.linspace(-20, 20, 201)
    >>> md = NS(omega=0.04 + 0.0145j, residual=1e-12, profile=(x, np.exp(-x**2 / 50 + 1j * x)))
    >>> fig, ax = mode_profile(md, horizons=(-5, 5))
    >>> sorted(l.get_gid() for l in ax.lines)
    ['abs', 'horizon', 'horizon', 'im', 're']
    """
    if not hasattr(mode, "profile") or not hasattr(mode, "omega"):
        raise InputError(f"mode_profile needs an unstable mode with .profile = (x, phi), got {type(mode).__name__}")
    try:
        x, phi = mode.profile
        x = np.asarray(x, dtype=float)
        phi = np.asarray(phi, dtype=complex)
    except (TypeError, ValueError):
        raise InputError("mode.profile must be a pair (x, phi) of arrays")
    if x.shape != phi.shape or x.ndim != 1 or len(x) < 2 or not np.all(np.isfinite(x)) \
            or not np.all(np.isfinite(phi)):
        raise InputError("mode.profile must be two finite 1-d arrays of the same length")
    with matplotlib.rc_context(style_rc(style)):
        fig, ax = new_figure(ax, height=2.3)
        w = complex(mode.omega)
        ax.plot(x, phi.real, color=PALETTE["positive"], lw=0.9, gid="re", label=r"Re $\phi$")
        ax.plot(x, phi.imag, color=PALETTE["negative"], lw=0.9, ls=(0, (4.0, 1.6)), gid="im", label=r"Im $\phi$")
        ax.plot(x, np.abs(phi), color=PALETTE["contour"], lw=0.7, gid="abs", label=r"$|\phi|$")
        for xh in (horizons or ()):
            ax.axvline(float(xh), color=PALETTE["level"], lw=0.5, ls=":", gid="horizon")
        ax.set_xlabel(r"$x$")
        ax.set_ylabel(r"$\phi(x)$")
        if getattr(mode, "oscillating", True):
            ax.set_title(rf"$\omega = {w.real:.5g} {'+' if w.imag >= 0 else '-'} {abs(w.imag):.5g}\,i$")
        else:
            ax.set_title(rf"$\omega = {w.imag:.5g}\,i$ (no oscillation)")
        ax.legend(loc="upper right")
    return fig, ax


def modes_figure(modes, *, mode=0, horizons=None, style="journal"):
    """Two panels: the omega plane (:func:`mode_plane`) and the profile of one mode (:func:`mode_profile`).

    Parameters
    ----------
    modes : ModeList or list of UnstableMode
    mode : int
        Index of the mode whose profile is drawn (0: the dominant one).
    horizons : sequence of float, optional
    style : "journal", None or dict

    Returns
    -------
    (Figure, (Axes, Axes))

    Examples
    --------
    >>> import matplotlib; matplotlib.use("Agg")
    >>> from types import SimpleNamespace as NS
    >>> x = np.linspace(-20, 20, 201)
    >>> md = [NS(omega=0.04 + 0.0145j, residual=1e-12, profile=(x, np.exp(-x**2 / 50)), oscillating=True)]
    >>> fig, (a, b) = modes_figure(md)
    >>> len(fig.axes)
    2
    """
    from matplotlib.figure import Figure
    items = _check_modes(modes)
    if not items:
        raise InputError("no mode to draw a profile of (the list is empty); draw the plane alone with mode_plane")
    if isinstance(mode, bool) or not isinstance(mode, int) or not -len(items) <= mode < len(items):
        raise InputError(f"mode must be an index into the {len(items)} modes, got {mode!r}")
    with matplotlib.rc_context(style_rc(style)):
        fig = Figure(figsize=(COLUMN_WIDTH, 4.8), layout="constrained")
        a, b = fig.subplots(2, 1)
    mode_plane(modes, ax=a, style=style)
    mode_profile(items[mode], ax=b, horizons=horizons, style=style)
    return fig, (a, b)
