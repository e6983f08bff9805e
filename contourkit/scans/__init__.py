"""Resumable runs over frequency grids, on local processes or a Dask cluster.

Imports every layer below it; read by the command line.  Entry points:
:func:`.engine.spectrum` (also ``model.spectrum``: the one spectrum engine,
registered here through :mod:`contourkit.symbolic.extensions`),
:func:`.resumable.scan`, :func:`.resumable.omega_grid`.
"""
from ..symbolic import extensions
from .engine import spectrum
from .resumable import omega_grid, scan

extensions.provide("spectrum", spectrum)

__all__ = ["omega_grid", "scan", "spectrum"]
