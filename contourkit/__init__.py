"""contourkit: exact contour-integral solutions of mode equations near horizons.

See README.md and docs/ for the method and the conventions
(``phi ~ exp(-i omega t + i k x)``, ``d/dx -> i k``, horizon at x = 0,
exterior x > 0).
"""
from .errors import (AccuracyError, AccuracyWarning, CoalescenceWarning, ContourError,
                     ContourkitError, ContourkitWarning, HorizonError, InputError,
                     ModelError, ModelFileError, ScatteringError)
from .model import ModeEquation
from .horizon import HorizonModel

__version__ = "0.1.0"

__all__ = ["ModeEquation", "HorizonModel", "Contour", "load_model", "compare", "catalogue", "direct",
           "plotting", "scattering", "fourier", "asymptotics", "modes",
           "ContourkitError", "InputError", "ModelError", "ModelFileError", "HorizonError", "ContourError",
           "AccuracyError", "ScatteringError", "ContourkitWarning", "AccuracyWarning", "CoalescenceWarning"]


def __getattr__(name):
    # Lazy access keeps `import contourkit` light and the layers one-way.
    import importlib
    lazy = {"Contour": ("contours", "Contour"), "load_model": ("modelfile", "load_model"),
            "compare": ("comparison", "compare")}
    if name in lazy:
        mod, attr = lazy[name]
        return getattr(importlib.import_module(f".{mod}", __name__), attr)
    if name in ("catalogue", "direct", "plotting", "scattering", "fourier", "asymptotics", "modes"):
        return importlib.import_module(f".{name}", __name__)
    raise AttributeError(f"module 'contourkit' has no attribute {name!r}")
