"""The spectrum that reaches the far region: horizon thermality times the greybody factor.

The long-wavelength Hawking mode leaves the horizon with the near-horizon
occupation; on its way out the effective potential V of the model's normal
form (:mod:`contourkit.greybody.modelpotential`) transmits the fraction
Gamma(omega) of its flux and reflects the rest into the counter-propagating
mode, which falls through the horizon.  The far-region occupation is then

    n_far(omega) = Gamma(omega) / (exp(omega / T_eff) - 1),

with T_eff the near-horizon effective temperature (the contour method on the
linearised model, ``model.scatter``).  The split is exact for non-dispersive
fields (Hawking [1]_, Page [2]_); with dispersion it holds where the dispersive
region at the horizon is narrow against the region where V varies
(kappa/Lambda << 1); tests/greybody/test_farfield.py measures it against the
direct solver of the full profile (docs/limitations.md).

References
----------
.. [1] S. W. Hawking, Commun. Math. Phys. 43 (1975) 199 (the emitted flux is the
   thermal one times the absorption probability of the mode).
.. [2] D. N. Page, Phys. Rev. D 13 (1976) 198 (greybody factors of the emission
   rates).
"""
import math
from dataclasses import dataclass
from typing import Any

import numpy as np

from ..errors import ContourkitError, InputError
from ..scattering.results import RowTable
from .modelpotential import _check_omegas, effective_potential, short

__all__ = ["GreybodyResult", "FarSpectrum", "greybody", "far_spectrum"]


@dataclass(repr=False)
class GreybodyResult:
    """The horizon/greybody split at one or more frequencies.

    Attributes
    ----------
    omega : float or ndarray
    transmission : float or ndarray
        Gamma: the greybody factor (fraction of the Hawking flux that reaches the far region).
    reflection : float or ndarray
        |R|^2: the fraction reflected into the counter-propagating mode.
    residual : float or ndarray
        ``| |R|^2 + Gamma - 1 |``.
    error : float or ndarray
        Estimated absolute error of Gamma.
    effective_temperature : float or ndarray
        Near-horizon T_eff (contour method); T_H where that method failed
        (see ``message``).
    hawking_temperature : float
        kappa / (2 pi).
    occupation_horizon : float or ndarray
        ``1/(exp(omega/T_eff) - 1)``.
    occupation_far : float or ndarray
        ``Gamma * occupation_horizon``.
    dps : int
        Digits of the tabulated potential (the integration is double precision).
    success : bool
        Gamma within its tolerance and every T_eff from the near-horizon method.
    message : str
    """
    omega: Any
    transmission: Any
    reflection: Any
    residual: Any
    error: Any
    effective_temperature: Any
    hawking_temperature: float
    occupation_horizon: Any
    occupation_far: Any
    dps: int
    success: bool
    message: str

    def __repr__(self):
        f = short
        return (f"GreybodyResult(omega={f(self.omega)}, transmission={f(self.transmission)}, "
                f"occupation_far={f(self.occupation_far)},\n  T_eff={f(self.effective_temperature)}, "
                f"residual={float(np.max(self.residual)):.1e}, success={self.success})")


def _near_horizon(model, omega):
    """(ScatteringResult or None, T_eff, note) from the contour method."""
    try:
        res = model.scatter(omega)
    except ContourkitError as exc:
        return None, model.hawking_temperature, f"near-horizon method failed at omega = {omega:g} ({exc}); T_H used"
    T = float(res.effective_temperature)
    if not (math.isfinite(T) and T > 0):
        return res, model.hawking_temperature, f"no near-horizon T_eff at omega = {omega:g}; T_H used"
    return res, T, ""


def _potential(model, k_perp, potential):
    if potential is not None:
        return potential
    return effective_potential(model, k_perp=k_perp)


def greybody(model, omega, *, k_perp=0, temperature="near-horizon", potential=None, rtol=1e-9):
    """Greybody factor, reflection and far-region occupation of a model.

    Parameters
    ----------
    model : HorizonModel
    omega : float or array_like
        Frequencies > 0.
    k_perp : float, keyword-only
        Transverse wavenumber of the effective potential (see
        :func:`contourkit.symbolic.effective.effective_form`); the near-horizon
        T_eff is that of the model itself.
    temperature : {"near-horizon", "hawking"}, keyword-only
        T_eff from the contour method at each omega, or T_H = kappa/(2 pi).
    potential : EffectivePotential, optional
        Reuse a potential built before (k_perp is then ignored).
    rtol : float
        Integration tolerance of Gamma.

    Returns
    -------
    GreybodyResult

    References
    ----------
    .. [1] D. N. Page, Phys. Rev. D 13 (1976) 198.

    Examples
    --------
    >>> import contourkit as ck
    >>> m = ck.catalogue.nondispersive_flow(kappa=0.05, D=0.5)
    >>> g = m.greybody(0.01, temperature="hawking")
    >>> round(float(g.transmission), 10), round(float(g.occupation_far), 6)
    (1.0, 0.397838)
    """
    if temperature not in ("near-horizon", "hawking"):
        raise InputError(f"temperature must be 'near-horizon' or 'hawking', got {temperature!r}")
    arr = _check_omegas(omega)
    pot = _potential(model, k_perp, potential)
    tr = pot.transmission(arr, rtol=rtol)
    T_H = model.hawking_temperature
    temps, notes = np.full(arr.shape, T_H), []
    if temperature == "near-horizon":
        for i, w in enumerate(arr):
            _, temps[i], note = _near_horizon(model, float(w))
            if note:
                notes.append(note)
    n_h = 1.0 / np.expm1(arr / temps)
    n_far = tr.transmission * n_h
    scalar = np.ndim(omega) == 0
    pick = (lambda a: float(np.asarray(a).reshape(-1)[0])) if scalar else (lambda a: np.asarray(a))
    ok = bool(np.all(tr.success)) and not notes
    msg = "; ".join([tr.message] + notes)
    return GreybodyResult(omega=pick(arr), transmission=pick(tr.transmission), reflection=pick(tr.reflection),
                          residual=pick(tr.residual), error=pick(tr.error), effective_temperature=pick(temps),
                          hawking_temperature=T_H, occupation_horizon=pick(n_h), occupation_far=pick(n_far),
                          dps=tr.dps, success=ok, message=msg)


class FarSpectrum(RowTable):
    """Near-horizon figures and the far-region ones, one row per frequency.

    Columns: those of the near-horizon rows (``ScatteringResult.as_row``:
    omega, occupation, thermal_ratio, effective_temperature,
    hawking_temperature, temperature_ratio, unitarity_residual, n_in, dps,
    error_estimate, success, method) and ``greybody`` (Gamma), ``reflection``
    (|R|^2), ``greybody_residual``, ``greybody_error``, ``occupation_far``
    (Gamma/(exp(omega/T_eff) - 1)), ``k_perp`` and ``message``.
    """

    columns = ("omega", "occupation", "thermal_ratio", "effective_temperature", "hawking_temperature",
               "temperature_ratio", "unitarity_residual", "n_in", "dps", "error_estimate", "success", "method",
               "greybody", "reflection", "greybody_residual", "greybody_error", "occupation_far", "k_perp",
               "message")

    def __repr__(self):
        return f"FarSpectrum({len(self.rows)} rows, columns: omega ... greybody, occupation_far)"


def far_spectrum(model, omegas, *, k_perp=0, rtol=1e-9, potential=None):
    """The near-horizon spectrum with the greybody factor and the far-region occupation beside it.

    Parameters
    ----------
    model : HorizonModel
    omegas : array_like
        Frequencies > 0.
    k_perp : float, keyword-only
        Transverse wavenumber of the effective potential.
    rtol : float
        Integration tolerance of Gamma.
    potential : EffectivePotential, optional
        Reuse a potential built before.

    Returns
    -------
    FarSpectrum
        Where the near-horizon method fails at a frequency, its columns hold
        the thermal values at T_H (``method = "hawking-temperature"``,
        ``success = False``) and ``message`` says why.

    Examples
    --------
    >>> import contourkit as ck
    >>> m = ck.catalogue.quartic_flow(kappa=0.05, Lambda=2.5, D=0.5)
    >>> tab = m.far_spectrum([0.01, 0.02], k_perp=0.01)
    >>> [round(g, 4) for g in tab.column("greybody")]
    [0.8934, 0.998]
    """
    arr = _check_omegas(omegas)
    pot = _potential(model, k_perp, potential)
    tr = pot.transmission(arr, rtol=rtol)
    T_H = model.hawking_temperature
    rows = []
    for i, w in enumerate(arr):
        w = float(w)
        res, T, note = _near_horizon(model, w)
        if res is not None and not note:
            row = res.as_row()
        else:
            ratio = math.exp(-w / T)
            row = {"omega": w, "occupation": ratio / (1 - ratio), "thermal_ratio": ratio,
                   "effective_temperature": T, "hawking_temperature": T_H, "temperature_ratio": T / T_H,
                   "unitarity_residual": 0.0, "n_in": 0, "dps": 16, "error_estimate": 0.0,
                   "success": False, "method": "hawking-temperature"}
        G = float(tr.transmission[i])
        row.update(greybody=G, reflection=float(tr.reflection[i]), greybody_residual=float(tr.residual[i]),
                   greybody_error=float(tr.error[i]), occupation_far=G / math.expm1(w / T),
                   k_perp=float(pot.form.k_perp), message=note or ("ok" if bool(tr.success[i]) else tr.message))
        rows.append(row)
    return FarSpectrum(rows)
