"""Result objects with documented fields (in the manner of scipy's result objects)."""
from dataclasses import dataclass, field
from typing import Any, Optional

import numpy as np


@dataclass
class Mode:
    """One WKB or plane-wave mode on one side of the horizon.

    Attributes
    ----------
    side : {"exterior", "interior"}
        exterior is x > 0 (subsonic side of a flow), interior x < 0.
    direction : {"in", "out", "none"}
        in: group velocity towards the horizon; out: away from it; none for
        growing and decaying modes.
    norm : int
        Sign of the conserved norm, sign(dD/domega): +1 or -1 (0 if not propagating).
    kind : {"propagating", "growing", "decaying"}
        growing/decaying: complex wavenumber, growing or decaying away from the horizon.
    k : complex
        Wavenumber at the reference position (or the asymptotic value).
    group_velocity : float
        ``-(dD/dk)/(dD/domega)`` (nan only for non-propagating modes is avoided: 0.0).
    origin : str
        "saddle", "branch point" or "plane wave".
    name : str
        Short label ``<side>-<direction><norm>``, e.g. ``ext-out+``.
    data : dict
        Extra information.  Contour modes whose labels were read nearer the
        horizon than k (the far-region wavenumber where the amplitude is read)
        hold that near-horizon root in ``data["near_horizon"]`` (keys k, x,
        group_velocity).
    """
    side: str
    direction: str
    norm: int
    kind: str
    k: complex
    group_velocity: float = 0.0
    origin: str = "plane wave"
    x: Optional[float] = None
    data: dict = field(default_factory=dict, repr=False)

    @property
    def name(self):
        s = "ext" if self.side == "exterior" else "int"
        if self.kind != "propagating":
            return f"{s}-{self.kind}"
        return f"{s}-{self.direction}{'+' if self.norm > 0 else '-'}"

    @property
    def propagating(self):
        return self.kind == "propagating"


@dataclass
class ScatteringResult:
    """Scattering between in and out modes at one frequency.

    Attributes
    ----------
    omega : float
    in_modes, out_modes : list of Mode
    S : ndarray, shape (n_out, n_in)
        Column j holds the out-mode amplitudes of the solution with unit
        amplitude on in-mode j and zero on the other in-modes (unit flux).
    unitarity_residual : float
        ``max |S^dagger eta_out S - eta_in|`` with eta = diag(norm signs).
    hawking_index : int
        Row of S of the Hawking channel (the long-wavelength out-mode on the exterior side).
    alpha, beta : complex
        Amplitudes of the Hawking out-mode on the same-norm partner in-mode
        (alpha) and the opposite-norm in-mode(s) (beta; if several, the root of
        the summed squares with the phase of the largest).
    others : dict
        Every in-mode's amplitude in the Hawking channel, by mode name.
    thermal_ratio : float
        ``|beta/alpha|^2``.
    occupation : float
        ``|beta|^2``: the mean number of quanta in the Hawking out-mode.
    effective_temperature : float or None
        ``omega / ln(|alpha|^2/|beta|^2)``; None where there is no Hawking
        channel (``hawking_channel`` False) and for a complex omega (the
        continued S-matrix is not a spectrum).
    temperature_ratio : float (property)
        ``effective_temperature / hawking_temperature``.
    hawking_temperature : float
        ``kappa/(2 pi)``.
    kappa : float
    dps : int or None
        Working precision in decimal digits (None: double precision).
    error_estimate : float
        Estimated relative error of the thermal ratio.
    success : bool
    message : str
    method : str
        "contour" (near-horizon exact solution) or "direct" (position space).
    convention : Orientation or None
        How the modes' sides and labels relate to the user's x
        (:class:`contourkit.symbolic.orientation.Orientation`: black or white
        hole, flow direction, which side is subsonic = "exterior", upstream
        side).  Positions and wavenumbers of the modes are in the user's x.
        For a white hole ``hawking_index`` is a column of S (the
        long-wavelength in-mode; see :mod:`contourkit.scattering.oriented`).
    hawking_channel : bool
        False above a cut-off of the full profile (``model.omega_max``), where
        no in-mode of opposite norm to the Hawking mode (or no Hawking
        out-mode) exists: then thermal_ratio and occupation are 0.0 and
        effective_temperature is None.
    validity : Validity or None
        How far the near-horizon result can be trusted for the full profile
        (:class:`contourkit.profiles.validity.Validity`: thermal_ratio_error,
        occupation_error, reliable, reason, tolerance); None for models with
        no full profile (linear-profile catalogue models) and for results of
        the direct solver.
    """
    omega: float
    in_modes: list
    out_modes: list
    S: Any
    unitarity_residual: float
    hawking_index: int
    alpha: complex
    beta: complex
    others: dict
    thermal_ratio: float
    occupation: float
    effective_temperature: float
    hawking_temperature: float
    kappa: float
    dps: Optional[int] = None
    error_estimate: float = 0.0
    success: bool = True
    message: str = ""
    method: str = "contour"
    extra: dict = field(default_factory=dict, repr=False)
    convention: Any = field(default=None, repr=False)
    hawking_channel: bool = True
    validity: Any = field(default=None, repr=False)

    @property
    def modes(self):
        """All in and out modes."""
        return list(self.in_modes) + list(self.out_modes)

    @property
    def temperature_ratio(self):
        """``T_eff / T_H`` (None where T_eff is missing); the column of the same name in tables."""
        from .display import temperature_ratio
        return temperature_ratio(self)

    def __repr__(self):
        from .display import result_repr
        return result_repr(self)

    def _repr_html_(self):
        from .display import result_html
        return result_html(self)

    def as_row(self):
        """A flat dict for tables (CSV/JSON).

        Missing values are None: ``effective_temperature`` and
        ``temperature_ratio`` where there is no Hawking channel
        (``hawking_channel`` False, above a cut-off; figures leave such rows
        out) or for a complex omega (the continued S-matrix of
        ``direct.scatter``, whose row holds ``omega`` as a complex number),
        and the validity columns ``thermal_ratio_error``,
        ``occupation_error``, ``reliable`` where no validity estimate exists.
        """
        T_eff = self.effective_temperature
        if not self.hawking_channel or T_eff is None:
            T_eff = T_ratio = None
        else:
            T_eff = float(T_eff)
            T_ratio = T_eff / float(self.hawking_temperature) if self.hawking_temperature else None
        v = self.validity
        w = complex(self.omega) if isinstance(self.omega, complex) else float(self.omega)
        return {"omega": w, "occupation": float(self.occupation),
                "thermal_ratio": float(self.thermal_ratio),
                "effective_temperature": T_eff,
                "hawking_temperature": float(self.hawking_temperature),
                "temperature_ratio": T_ratio,
                "hawking_channel": bool(self.hawking_channel),
                "unitarity_residual": float(self.unitarity_residual),
                "n_in": len(self.in_modes), "dps": self.dps if self.dps is not None else 16,
                "error_estimate": float(self.error_estimate), "success": bool(self.success),
                "method": self.method,
                "thermal_ratio_error": None if v is None else float(v.thermal_ratio_error),
                "occupation_error": None if v is None else float(v.occupation_error),
                "reliable": None if v is None else bool(v.reliable)}


def pseudo_unitarity_residual(S, eta_out, eta_in):
    """``max |S^dagger diag(eta_out) S - diag(eta_in)|`` (a conservation check)."""
    S = np.asarray(S, dtype=complex)
    M = S.conj().T @ np.diag(np.asarray(eta_out, dtype=float)) @ S - np.diag(np.asarray(eta_in, dtype=float))
    return float(np.max(np.abs(M)))


class RowTable:
    """A table as a list of dict rows, with the same interface for spectra and comparisons.

    Subclasses set ``columns`` (a tuple of field names) or leave it None to take
    the keys of the first row.
    """

    columns = None

    def __init__(self, rows):
        self.rows = list(rows)

    def __len__(self):
        return len(self.rows)

    def __iter__(self):
        return iter(self.rows)

    def __getitem__(self, i):
        return self.rows[i]

    def _fields(self):
        return list(self.columns) if self.columns else (list(self.rows[0]) if self.rows else [])

    def column(self, name):
        """The values of one column, in row order."""
        from ..errors import InputError
        if name not in self._fields():
            raise InputError(f"unknown column {name!r}; the columns are {', '.join(self._fields())}")
        return [r[name] for r in self.rows]

    def to_csv(self, path=None):
        """The table as CSV text; written to ``path`` when given (then the path is returned)."""
        import csv
        import io
        buf = io.StringIO()
        keys = self._fields()
        w = csv.DictWriter(buf, fieldnames=keys, lineterminator="\n")
        w.writeheader()
        for r in self.rows:
            w.writerow({c: ("" if r.get(c) is None else r[c]) for c in keys})
        text = buf.getvalue()
        if path is None:
            return text
        with open(path, "w", encoding="utf-8", newline="") as fh:
            fh.write(text)
        return path
