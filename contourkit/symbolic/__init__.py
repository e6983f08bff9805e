"""The symbolic layer: mode equations, horizon models and their k-space representation.

Lowest layer above :mod:`contourkit.errors`.  It derives everything exact with
sympy: the ODE (:mod:`.equation`), the symmetric (self-adjoint) form
(:mod:`.symmetric`), horizon models with profiles (:mod:`.horizon`), the k-space
representation with its exponent and singular points (:mod:`.kspace`), and
model files read by a whitelist parser (:mod:`.modelfile`, :mod:`.safeparse`).
Shared symbols (omega, k) live in :mod:`._sym`.  Upper layers provide the
convenience methods of these objects through :mod:`.extensions`.
"""
from .equation import ModeEquation
from .horizon import HorizonModel
from .kspace import KSpaceRepresentation
from .modelfile import load_model
from . import extensions

extensions.provide("HorizonModel.from_ode", HorizonModel.from_ode)

__all__ = ["ModeEquation", "HorizonModel", "KSpaceRepresentation", "load_model", "extensions"]
