"""Greybody factors, quasinormal modes and bound states of 1D wave equations.

The equation is ``psi_** + (omega^2 - V) psi = 0`` in a tortoise coordinate
x*.  Entry points:

* :func:`potential` -- V as a sympy expression in x* (constant limits at both ends);
* :func:`radial` -- the radial equation of a static spherically symmetric metric;
* :func:`transmission` -- the one-call form of ``potential(V, x).transmission(omega)``;
* :class:`TortoisePotential` -- the general object (V in any coordinate x with
  dx*/dx, optionally a horizon at the left end), whose methods
  ``transmission``, ``quasinormal_modes`` and ``bound_states`` do the work.

Methods and checks: docs/greybody.md.
"""
from .core import TortoisePotential, potential
from .metric import radial
from .results import (BoundState, BoundStateList, ModeList, Profile, QuasinormalMode,
                      TransmissionResult)

__all__ = ["potential", "radial", "transmission", "TortoisePotential", "TransmissionResult",
           "QuasinormalMode", "ModeList", "BoundState", "BoundStateList", "Profile"]


def transmission(V, x, omega, *, parameters=None, rtol=1e-10, dps=None):
    """Transmission through a potential given in the tortoise coordinate (one call).

    Parameters
    ----------
    V : sympy expression
        V(x) with constant limits at x -> +-infinity.
    x : sympy Symbol
    omega : float or array_like
        Real frequencies.
    parameters : dict, optional
        Values of other symbols in V.
    rtol : float
    dps : int, optional
        mpmath precision (see :meth:`TortoisePotential.transmission`).

    Returns
    -------
    TransmissionResult

    Examples
    --------
    >>> import sympy as sp
    >>> import contourkit.greybody as gb
    >>> x = sp.Symbol("x", real=True)
    >>> g = gb.transmission(1 / sp.cosh(x)**2, x, 2.0)
    >>> bool(g.residual < 1e-10)
    True
    """
    return potential(V, x, parameters=parameters).transmission(omega, rtol=rtol, dps=dps)

# model potentials (the normal form of a HorizonModel's long-wavelength equation)
from ..symbolic import extensions as _extensions  # noqa: E402
from .modelpotential import EffectivePotential, ModelTransmission, effective_potential  # noqa: E402
from .farfield import FarSpectrum, GreybodyResult, far_spectrum, greybody  # noqa: E402

_extensions.provide("effective_potential", effective_potential)
_extensions.provide("greybody", greybody)
_extensions.provide("far_spectrum", far_spectrum)
__all__ += ["EffectivePotential", "ModelTransmission", "effective_potential", "FarSpectrum", "GreybodyResult",
            "far_spectrum", "greybody"]
