"""Scattering: WKB mode catalogue, labels, the norm-weighted S-matrix, spectra.

Imports the symbolic, geometry and evaluation layers.  Entry points:
:func:`.smatrix.scatter` (one frequency), :func:`.spectra.spectrum` (many,
with the geometry followed in omega; ``model.spectrum`` is the engine of
:mod:`contourkit.scans` built on it), the result objects of :mod:`.results`,
the Bogoliubov figures of :mod:`.bogoliubov` and the notebook display of
:mod:`.display`.

``contourkit.scattering`` was a single module before the layout in
subpackages; its names (``scatter``, ``continuation_ratio``, ...) are still
reachable here.
"""
from ..symbolic import extensions
from . import smatrix as _smatrix
from .results import Mode, RowTable, ScatteringResult
from .smatrix import continuation_ratio, scatter
from .spectra import Spectrum, spectrum
from .conversion import scatter_horizonless

extensions.provide("scatter", scatter)
# model.spectrum is provided by contourkit.scans (the engine built on .spectra)
extensions.provide("scatter_horizonless", scatter_horizonless)

__all__ = ["Mode", "RowTable", "ScatteringResult", "Spectrum", "continuation_ratio", "scatter", "spectrum"]


def __getattr__(name):
    # names of the former module contourkit.scattering (now .smatrix)
    try:
        return getattr(_smatrix, name)
    except AttributeError:
        raise AttributeError(f"module 'contourkit.scattering' has no attribute {name!r}") from None
