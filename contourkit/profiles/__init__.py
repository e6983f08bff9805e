"""Full profiles: plane waves of the uniform regions, cut-offs, the direct solver, comparison.

Imports the symbolic and scattering layers (result objects, Bogoliubov figures).
Entry points: :func:`.direct.scatter`, :func:`.cutoff.omega_max`,
:func:`.comparison.compare`.
"""
from ..symbolic import extensions
from . import cutoff, direct, turning, validity
from .comparison import compare

extensions.provide("omega_max", cutoff.omega_max)
extensions.provide("turning_points", turning.turning_points)
extensions.provide("full_profile", validity.attach)
extensions.provide("turning_point_check", validity.attach_turning)

__all__ = ["compare", "cutoff", "direct", "turning", "validity"]
