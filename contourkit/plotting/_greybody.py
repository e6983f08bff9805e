"""Greybody figures: the effective potential V(x*) and the transmission Gamma(omega)."""
import math

import matplotlib
import numpy as np
from matplotlib.figure import Figure

from ..errors import InputError
from ._style import COLUMN_WIDTH, PALETTE, new_figure, style_rc


def _potential_curve(potential, num):
    """(x*, V) samples of an EffectivePotential over the region where V varies."""
    for attr in ("x_of_s", "xstar", "V_at", "limits"):
        if not hasattr(potential, attr):
            raise InputError(f"potential must be an EffectivePotential (model.effective_potential()), got "
                             f"{type(potential).__name__}")
    if getattr(potential, "horizon", None) is not None:
        s = np.linspace(-10.0, potential._sR, num)
        x = potential.x_of_s(s)
    else:
        x = np.linspace(potential.left, potential.far, num)
    return potential.xstar(x), potential.V_at(x)


def _transmission_rows(result):
    """(omega, Gamma) arrays from a ModelTransmission, GreybodyResult, FarSpectrum or row dicts."""
    if hasattr(result, "transmission") and hasattr(result, "omega"):
        w = np.atleast_1d(np.asarray(result.omega, dtype=float))
        g = np.atleast_1d(np.asarray(result.transmission, dtype=float))
        return w, g
    rows = getattr(result, "rows", result)
    try:
        rows = list(rows)
        w = np.array([float(r["omega"]) for r in rows])
        g = np.array([float(r["greybody"]) for r in rows])
    except (TypeError, KeyError, ValueError):
        raise InputError("result must be a transmission result (pot.transmission(...), model.greybody(...)) or "
                         "rows with omega and greybody columns (model.far_spectrum(...))") from None
    if not len(w):
        raise InputError("result has no rows")
    return w, g


def potential_figure(potential, *, ax=None, num=400, style="journal"):
    """V against the tortoise coordinate x* (horizon at x* -> -infinity on the left).

    Parameters
    ----------
    potential : EffectivePotential
    ax : matplotlib Axes, optional
    num : int
        Number of samples.
    style : "journal", None or dict

    Returns
    -------
    (Figure, Axes)
        The curve has gid ``"potential"``.

    Examples
    --------
    >>> import matplotlib; matplotlib.use("Agg")
    >>> import contourkit as ck
    >>> pot = ck.catalogue.nondispersive_flow(kappa=0.05, D=0.5).effective_potential(k_perp=0.01)
    >>> fig, ax = potential_figure(pot)
    >>> [l.get_gid() for l in ax.get_lines()][:1]
    ['potential']
    """
    xs, V = _potential_curve(potential, num)
    with matplotlib.rc_context(style_rc(style)):
        fig, ax = new_figure(ax, height=2.4)
        ax.plot(xs, V, color=PALETTE["contour"], lw=1.0, gid="potential")
        ax.axhline(0.0, color="0.75", lw=0.6, zorder=1)
        ax.set_xlabel(r"tortoise coordinate $x_*$")
        ax.set_ylabel(r"$V(x_*)$")
    return fig, ax


def greybody_figure(potential, result, *, num=400, style="journal"):
    r"""Two panels: the potential V(x*) and the transmission Gamma(omega).

    Parameters
    ----------
    potential : EffectivePotential
    result : ModelTransmission, GreybodyResult, FarSpectrum or rows with omega and greybody
    num : int
        Samples of V.
    style : "journal", None or dict

    Returns
    -------
    (Figure, (Axes, Axes))
        Gids: ``"potential"``, ``"greybody"``, ``"threshold"`` (where the far
        region's V limit closes the channel, when it is positive).

    Examples
    --------
    >>> import matplotlib; matplotlib.use("Agg")
    >>> import contourkit as ck
    >>> pot = ck.catalogue.nondispersive_flow(kappa=0.05, D=0.5).effective_potential(k_perp=0.01)
    >>> fig, (top, bottom) = greybody_figure(pot, pot.transmission([0.009, 0.01, 0.02]))
    >>> [l.get_gid() for l in bottom.get_lines()]
    ['greybody', 'threshold']
    """
    w, g = _transmission_rows(result)
    xs, V = _potential_curve(potential, num)
    with matplotlib.rc_context(style_rc(style)):
        fig = Figure(figsize=(COLUMN_WIDTH, 4.0), layout="constrained")
        top, bottom = fig.subplots(2, 1)
        top.plot(xs, V, color=PALETTE["contour"], lw=1.0, gid="potential")
        top.axhline(0.0, color="0.75", lw=0.6, zorder=1)
        top.set_xlabel(r"tortoise coordinate $x_*$")
        top.set_ylabel(r"$V(x_*)$")
        o = np.argsort(w)
        bottom.plot(w[o], g[o], color=PALETTE["direct"], marker="o", ms=3.0, lw=0.9, gid="greybody",
                    label=r"$\Gamma(\omega)$")
        far = float(potential.limits[1])
        if far > 0:
            bottom.axvline(math.sqrt(far), color=PALETTE["thermal"], lw=1.2, alpha=0.6, gid="threshold",
                           label=r"threshold $\sqrt{V(+\infty)}$")
        bottom.set_ylim(-0.03, 1.03)
        bottom.set_xlabel(r"$\omega$")
        bottom.set_ylabel(r"greybody factor $\Gamma$")
        bottom.legend(loc="lower right", frameon=False)
    return fig, (top, bottom)
