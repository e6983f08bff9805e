"""The complex-plane geometry: saddles, steepest-descent paths, sheets, thimbles, contours.

Imports the symbolic layer only.  Entry points: :func:`.saddles.saddles`,
:func:`.saddles.critical_points`, :func:`.paths.thimble`, :class:`.contours.Contour`,
:func:`.contours.basis`, :func:`.decompose.decompose`.
"""
from ..symbolic import extensions
from . import saddles as _saddles
from .contours import Contour, basis

extensions.provide("saddles", _saddles.saddles)
extensions.provide("basis", basis)

__all__ = ["Contour", "basis"]
