"""Result objects of the greybody layer (documented fields, short repr)."""
from dataclasses import dataclass
from typing import Any, Optional

import numpy as np

__all__ = ["TransmissionResult", "QuasinormalMode", "ModeList", "BoundState", "BoundStateList",
           "Profile"]


def _fmt(v):
    if isinstance(v, np.ndarray):
        if v.size <= 3:
            return np.array2string(v, precision=6)
        return f"array(n={v.size}, {v.flat[0]:.6g} ... {v.flat[-1]:.6g})"
    try:
        return f"{float(v):.10g}"
    except (TypeError, ValueError):
        return str(v)


@dataclass(repr=False)
class TransmissionResult:
    """Transmission through a 1D potential at real frequencies.

    Scalars for a scalar omega, numpy arrays (one entry per omega) for an
    array.

    Attributes
    ----------
    omega : float or ndarray
    transmission : float or ndarray
        Gamma, the transmitted fraction of the incident flux (flux-normalised
        waves, wave numbers ``sqrt(omega^2 - V(+-inf))`` at the two ends).
        mpmath.mpf values (object arrays) when a precision ``dps`` was asked for.
    reflection : float or ndarray
        |R|^2, the reflected fraction.
    T, R : complex or ndarray
        Amplitudes of the transmitted and reflected waves for a unit incident
        flux-normalised wave; their phases refer to the asymptotic tortoise
        coordinate of each end (Y/D0 + sigma ln Y, or ln(y - y_h)/(2 kappa)
        at a horizon).
    log_transmission : float or ndarray
        ln Gamma (finite even where Gamma underflows; -inf where Gamma = 0).
    residual : float or ndarray
        | |R|^2 + Gamma - 1 | (flux conservation).
    error : float or ndarray
        Estimate of the absolute error of Gamma: the difference between two
        resolutions (integration tolerance and start points moved outwards).
    relative_error : float or ndarray
        error / Gamma (0 where Gamma = 0 exactly).
    dps : int or None
        Decimal digits used (15 for double precision).
    success : bool or ndarray of bool
        True where ``relative_error <= rtol`` and ``residual <= max(100 rtol, 1e-12)``.
    message : str or list of str
    k_left, k_right : complex or ndarray
        Wave numbers at the two ends (imaginary: evanescent end).
    """
    omega: Any
    transmission: Any
    reflection: Any
    T: Any
    R: Any
    log_transmission: Any
    residual: Any
    error: Any
    relative_error: Any
    dps: Optional[int]
    success: Any
    message: Any
    k_left: Any
    k_right: Any

    def __repr__(self):
        return (f"TransmissionResult(omega={_fmt(self.omega)}, transmission={_fmt(self.transmission)},\n"
                f"  reflection={_fmt(self.reflection)}, residual={_fmt(np.max(self.residual))}, "
                f"error={_fmt(np.max(self.error))}, dps={self.dps}, success={np.all(self.success)})")


@dataclass(repr=False)
class QuasinormalMode:
    """One quasinormal mode: purely outgoing at both ends, Im omega < 0.

    Attributes
    ----------
    omega : complex
    overtone : int
        n, counted among the modes with Re omega >= 0 in order of |Im omega|.
    error : float
        Estimate of |omega - exact|: the difference between two independent
        polishings (different matching points, path angles and tolerances).
    residual : float
        Normalised Wronskian |W| / (|psi_1||psi_2'| + |psi_1'||psi_2|) of the
        two boundary solutions at omega (from the second polishing), computed
        on the first path.
    spectral_estimate : complex
        The eigenvalue of the spectral discretisation the root was polished from.
    """
    omega: complex
    overtone: int
    error: float
    residual: float
    spectral_estimate: complex = None

    def __repr__(self):
        return (f"QuasinormalMode(n={self.overtone}, omega={self.omega.real:.10f}"
                f"{self.omega.imag:+.10f}j, error={self.error:.2g}, residual={self.residual:.2g})")


class ModeList(list):
    """A list of :class:`QuasinormalMode` with a ``message`` (why it may be empty)
    and the ``method`` used."""

    def __init__(self, modes=(), *, message="", method=""):
        super().__init__(modes)
        self.message = message
        self.method = method

    def __repr__(self):
        return f"ModeList({list.__repr__(self)}, message={self.message!r})"


@dataclass(repr=False)
class Profile:
    """A normalised bound-state profile, ``int |psi|^2 dx* = 1``.

    Attributes
    ----------
    coordinate : ndarray
        Points in the potential's own coordinate.
    xstar : ndarray
        The same points in the tortoise coordinate.
    psi : ndarray
        Real values of the profile (sign: positive at the left end).

    Calling the profile with coordinate values interpolates psi (cubic).
    """
    coordinate: np.ndarray
    xstar: np.ndarray
    psi: np.ndarray

    def __call__(self, y):
        from scipy.interpolate import CubicSpline
        if not hasattr(self, "_spline"):
            self._spline = CubicSpline(self.coordinate, self.psi)
        y = np.asarray(y, dtype=float)
        out = self._spline(y)
        outside = (y < self.coordinate[0]) | (y > self.coordinate[-1])
        return np.where(outside, 0.0, out)

    def __repr__(self):
        return f"Profile({self.coordinate.size} points on [{self.coordinate[0]:.4g}, {self.coordinate[-1]:.4g}])"


@dataclass(repr=False)
class BoundState:
    """One bound state of ``-psi'' + V psi = E psi`` (x* derivatives).

    Attributes
    ----------
    energy : float
        E = omega^2, below both limits of V.
    node_count : int
        Zeros of the profile (Sturm oscillation: the n-th state has n).
    profile : Profile
    error : float
        Estimate of |E - exact| (two tolerances).
    residual : float
        Normalised Wronskian of the two decaying solutions at E.
    """
    energy: float
    node_count: int
    profile: Profile
    error: float
    residual: float

    def __repr__(self):
        return (f"BoundState(n={self.node_count}, energy={self.energy:.12g}, "
                f"error={self.error:.2g}, residual={self.residual:.2g})")


class BoundStateList(list):
    """A list of :class:`BoundState`, lowest first, with ``message`` and ``count``
    (the number of states below the threshold from the oscillation count)."""

    def __init__(self, states=(), *, message="", count=0, threshold=None):
        super().__init__(states)
        self.message = message
        self.count = count
        self.threshold = threshold

    def __repr__(self):
        return f"BoundStateList({list.__repr__(self)}, count={self.count})"
