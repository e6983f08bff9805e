"""Figures for papers: complex-k landscapes, dispersion diagrams, spectra.

Every function returns ``(Figure, axes)``, draws into an existing Axes when
given ``ax=...``, uses mathtext (never LaTeX) and applies the single-column
journal style (:data:`JOURNAL_RC`: 3.4 in wide, 8 pt text) through
:func:`matplotlib.rc_context` only: the global rcParams never change.
:func:`save` writes PDF, SVG and PNG.  See docs/figures.md.

* :func:`landscape`: the k plane of ``Phi(k) = i k x + E(k)`` with saddles,
  singular points, cuts, valleys and a contour's steepest-descent paths;
* :func:`dispersion`: the real branches omega(k) of a horizon model at a
  position (or in an asymptotic region), coloured by norm sign, with the
  labelled roots at one frequency; for a ModeEquation the curve
  ``sigma0(k) + x sigma1(k) = 0`` in the (k, x) plane;
* :func:`spectrum`: ``|beta|^2`` against the thermal curve and
  ``T_eff/T_H``, contour and direct results side by side;
* :func:`mode_plane`, :func:`mode_profile`, :func:`modes_figure`: complex
  frequencies found by a mode search (marker size by residual) and the
  profile of one mode.
* :func:`greybody_figure`: the effective potential V(x*) and the greybody
  factor Gamma(omega); :func:`potential_figure`: V(x*) alone (``pot.plot()``).
"""
from ..symbolic import extensions as _extensions
from ._dispersion import dispersion
from ._greybody import greybody_figure, potential_figure
from ._landscape import auto_window, landscape
from ._modes import mode_plane, mode_profile, modes_figure
from ._spectrum import spectrum
from ._style import (COLUMN_WIDTH, JOURNAL_RC, MARKERS, NORM_LINESTYLE, PALETTE, journal_style, save,
                     style_rc)

_extensions.provide("potential_figure", potential_figure)

__all__ = ["landscape", "dispersion", "spectrum", "greybody_figure", "potential_figure", "save", "journal_style",
           "style_rc", "auto_window", "mode_plane", "mode_profile", "modes_figure",
           "JOURNAL_RC", "PALETTE", "MARKERS", "NORM_LINESTYLE", "COLUMN_WIDTH"]
