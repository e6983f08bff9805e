"""Evaluation of contour integrals: quadrature (numpy and mpmath), arrays, asymptotic series.

Imports the symbolic and geometry layers.  Entry points:
:func:`.quadrature.evaluate`, :func:`.batch.evaluate_many`, and the saddle-point
and Watson expansions of :mod:`.asymptotics`.
"""
from ..symbolic import extensions
from .quadrature import evaluate

extensions.provide("evaluate", evaluate)

__all__ = ["evaluate"]
