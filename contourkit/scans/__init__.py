"""Resumable runs over frequency grids, on local processes or a Dask cluster.

Imports every layer below it; read by the command line.  Entry points:
:func:`.resumable.scan`, :func:`.resumable.omega_grid`.
"""
from .resumable import omega_grid, scan

__all__ = ["omega_grid", "scan"]
