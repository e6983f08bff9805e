"""contourkit: exact contour-integral solutions of mode equations near horizons.

See README.md and docs/ for the method and the conventions
(``phi ~ exp(-i omega t + i k x)``, ``d/dx -> i k``, horizon at x = 0,
exterior x > 0), and docs/architecture.md for the layers.

This module is the package's front door: it imports the layers in their
order (each lower layer is complete before the next one registers the
convenience methods it provides, see :mod:`contourkit.symbolic.extensions`)
and re-exports the public contract.  The plotting layer is imported on first
use, so that ``import contourkit`` does not load matplotlib.
"""
import importlib
import sys

from .errors import (AccuracyError, AccuracyWarning, CoalescenceWarning, ContourError,
                     ContourkitError, ContourkitWarning, HorizonError, InputError,
                     ModelError, ModelFileError, ScatteringError, ValidityWarning)
from . import symbolic, geometry, evaluation, scattering, profiles, greybody, scans
from .symbolic import HorizonModel, ModeEquation, extensions, load_model
from .geometry import Contour
from .profiles import compare, direct
from . import catalogue

from ._version import __version__  # noqa: E402

# `contourkit.direct` is part of the public contract (ck.direct.scatter); the
# module lives in the profiles layer.
sys.modules[__name__ + ".direct"] = direct

__all__ = ["ModeEquation", "HorizonModel", "Contour", "load_model", "compare", "catalogue", "direct", "greybody",
           "plotting", "scattering", "fourier", "asymptotics", "modes",
           "ContourkitError", "InputError", "ModelError", "ModelFileError", "HorizonError", "ContourError",
           "AccuracyError", "ScatteringError", "ContourkitWarning", "AccuracyWarning", "CoalescenceWarning",
           "ValidityWarning"]


def _load_optional(name):
    # extensions.call() asks for a method no imported layer provides: load plotting
    importlib.import_module(".plotting", __name__)


extensions.add_loader(_load_optional)


def __getattr__(name):
    if name in ("plotting", "fourier", "asymptotics", "modes"):
        return importlib.import_module(f".{name}", __name__)
    raise AttributeError(f"module 'contourkit' has no attribute {name!r}")
