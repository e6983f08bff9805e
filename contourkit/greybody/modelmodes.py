"""Quasinormal modes and bound states of model-derived effective potentials.

An :class:`~contourkit.greybody.modelpotential.EffectivePotential` (the normal
form ``psi_** + (omega^2 - V) psi = 0`` of a flow model's long-wavelength
equation, V and dx*/dx given in the model's coordinate x) is handed, once and
lazily, to the general constructor
``TortoisePotential(V, x, dxstar_dx, horizon=x_H, kind="effective")``; its
quasinormal-mode search (hyperboloidal Chebyshev spectrum, then a secant
iteration with deflation on the Wronskian of the horizon's Frobenius solution
and the outgoing solution integrated along a complex path) and its bound-state
search (Pruefer angle, Pryce 1993) then apply unchanged.  docs/greybody.md has
the method and what the tests show.

Supported: a horizon at the left end (x* -> -infinity, V -> V_H there) and a
far region where V tends to a constant with a tail that is rational or decays
faster than any power; or, without horizon, two uniform ends.

* Quasinormal modes need equal limits of V at both ends.  A flow with a
  transverse wavenumber has V -> 0 at the horizon and V -> k_perp^2 (c^2 - v^2)
  in the far region: two thresholds, two wave numbers with different branch
  cuts in omega; this search refuses it (InputError).
* A potential that vanishes identically (a flow without transverse wavenumber
  and with uniform sound speed) scatters nothing: the list of modes is empty
  and its message says so.
* Bound states need a well below both limits; otherwise the list is empty
  (with its message).

References
----------
.. [1] E. W. Leaver, Proc. R. Soc. Lond. A 402 (1985) 285.
.. [2] J. D. Pryce, Numerical Solution of Sturm-Liouville Problems (Oxford, 1993), ch. 2.
"""
import sympy as sp

from ..errors import ContourkitError, InputError
from .core import TortoisePotential
from .results import BoundStateList, ModeList

__all__ = ["model_tortoise_potential", "model_quasinormal_modes", "model_bound_states"]


def _vanishes(V):
    try:
        return V == 0 or sp.simplify(V) == 0
    except Exception:   # sympy cannot decide: treat as not identically zero
        return False


def model_tortoise_potential(pot):
    """The :class:`TortoisePotential` of an EffectivePotential (built once, cached on ``pot``).

    Parameters
    ----------
    pot : EffectivePotential

    Returns
    -------
    TortoisePotential

    Examples
    --------
    >>> import contourkit as ck
    >>> pot = ck.catalogue.nondispersive_flow(kappa=0.05, D=0.5).effective_potential(k_perp=0.05)
    >>> tp = model_tortoise_potential(pot)
    >>> round(tp.limits[1], 8), round(tp.surface_gravity, 8)
    (0.001875, 0.05)
    """
    cached = getattr(pot, "_tortoise_potential", None)
    if cached is not None:
        return cached
    try:
        tp = TortoisePotential(pot.V, pot.x, pot.tortoise_derivative, horizon=pot.horizon,
                               kind="effective", info={"model": pot.name})
    except ContourkitError as exc:
        raise type(exc)(f"the model's effective potential cannot be given boundary data: {exc}") from None
    pot._tortoise_potential = tp
    return tp


def model_quasinormal_modes(pot, *, n_max=2, region=None):
    """Quasinormal modes of a model's effective potential.

    Parameters
    ----------
    pot : EffectivePotential
    n_max : int, keyword-only
        Highest overtone returned.
    region : (re_min, re_max, im_min, im_max), keyword-only, optional
        A box of the complex omega plane.

    Returns
    -------
    ModeList
        Of QuasinormalMode (``omega``, ``overtone``, ``error``, ``residual``,
        ``spectral_estimate``); empty with a message where there is none.

    Raises
    ------
    InputError
        Different limits of V at the two ends (a transverse wavenumber: two
        thresholds), or tails without the asymptotics the search needs.

    References
    ----------
    .. [1] E. W. Leaver, Proc. R. Soc. Lond. A 402 (1985) 285.

    Examples
    --------
    >>> import contourkit as ck
    >>> pot = ck.catalogue.nondispersive_flow(kappa=0.05, D=0.5).effective_potential()
    >>> modes = model_quasinormal_modes(pot)
    >>> len(modes), modes.message[:24]
    (0, 'V vanishes identically: ')
    """
    if _vanishes(pot.V):
        return ModeList([], message="V vanishes identically: the wave crosses without scattering and "
                                    "there are no quasinormal modes (give a transverse wavenumber "
                                    "k_perp, or a varying sound speed, for a potential)",
                        method="none")
    VL, VR = pot.limits
    if abs(VL - VR) > 1e-12 * max(1.0, abs(VL), abs(VR)):
        raise InputError(f"quasinormal modes of this effective potential are not supported: V tends to "
                         f"{VL:.6g} at the {'horizon' if pot.horizon is not None else 'left end'} and to "
                         f"{VR:.6g} in the far region (two thresholds, e.g. from a transverse wavenumber), "
                         f"and the search needs equal limits. Use k_perp=0 with a varying sound speed, or "
                         f"study the transmission with .transmission(omega).")
    return model_tortoise_potential(pot).quasinormal_modes(n_max=n_max, region=region)


def model_bound_states(pot, *, rtol=1e-12):
    """Bound states (E = omega^2 below both limits of V) of a model's effective potential.

    Parameters
    ----------
    pot : EffectivePotential
    rtol : float, keyword-only

    Returns
    -------
    BoundStateList
        Lowest first; empty, with a message, where V has no well below both limits.

    References
    ----------
    .. [1] J. D. Pryce, Numerical Solution of Sturm-Liouville Problems (Oxford, 1993), ch. 2.

    Examples
    --------
    >>> import contourkit as ck
    >>> pot = ck.catalogue.nondispersive_flow(kappa=0.05, D=0.5).effective_potential()
    >>> model_bound_states(pot).count
    0
    """
    if _vanishes(pot.V):
        return BoundStateList([], message="V vanishes identically: no well, no bound states", count=0,
                              threshold=0.0)
    return model_tortoise_potential(pot).bound_states(rtol=rtol)
