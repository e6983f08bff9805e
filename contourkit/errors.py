"""Exception and warning classes of contourkit.

Every refusal raises a subclass of :class:`ContourkitError`; its message says
what was wrong and how to fix it.  Warnings that report a reduced accuracy are
subclasses of :class:`ContourkitWarning`.
"""


class ContourkitError(Exception):
    """Base class of every error that contourkit raises on purpose."""


class InputError(ContourkitError, ValueError):
    """An argument has the wrong type or value (non-finite x, bad dps, ...)."""


class ModelError(ContourkitError):
    """A mode equation or dispersion relation cannot be used as given."""


class ModelFileError(ModelError):
    """A model file is malformed or asks for something that is not allowed."""


class HorizonError(ModelError):
    """No horizon, or no unique horizon, was found in the profile."""


class ModelFileHorizonError(ModelFileError, HorizonError):
    """The horizon of a model file is not usable (a position that is no horizon, kappa not finite, ...)."""


class ContourError(ContourkitError):
    """A contour is unknown, does not converge, or belongs elsewhere."""


class AccuracyError(ContourkitError):
    """The requested accuracy could not be reached."""


class ScatteringError(ContourkitError):
    """The mode content does not allow a scattering matrix to be built."""


class ContourkitWarning(UserWarning):
    """Base class of contourkit's warnings."""


class AccuracyWarning(ContourkitWarning):
    """A value is returned, but its error estimate exceeds the tolerance."""


class CoalescenceWarning(ContourkitWarning):
    """Two saddles, or a saddle and a singular point, nearly coincide."""


class ValidityWarning(ContourkitWarning):
    """A near-horizon result is exact for the linearised model but not a reliable value for the full profile.

    Issued whenever ``result.validity.reliable`` is False (see
    :mod:`contourkit.profiles.validity`).
    """


__all__ = [
    "ContourkitError", "InputError", "ModelError", "ModelFileError",
    "HorizonError", "ModelFileHorizonError", "ContourError", "AccuracyError", "ScatteringError",
    "ContourkitWarning", "AccuracyWarning", "CoalescenceWarning", "ValidityWarning",
]
