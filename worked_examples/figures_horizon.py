"""Figures of a superluminal (quartic) horizon for a paper: landscape, dispersion diagram, spectrum.

Our own scenario: a flow with gradient kappa = 0.05 and dispersion scale
Lambda = 2.5 (kappa/Lambda = 0.02), at omega = 0.05 (about 6 T_H).

* landscape: the near-horizon k plane at x = -20 (interior): four saddles,
  the two branch points k = 0 and k = -kappa... shifted by omega (see
  rep.branch_points) with their cuts, and the real-axis contour deformed onto
  its steepest-descent paths; a second panel zooms onto the branch points;
* dispersion: the tanh profile v = -1 + 0.5 tanh(kappa x / 0.5) in its
  interior asymptotic region at omega = 0.2 (below omega_max ~ 0.5), with the
  four propagating modes labelled from the mode catalogue;
* spectrum: |beta|^2 and T_eff/T_H of the near-horizon contour method and the
  direct full-profile solver (contourkit.compare) for omega/T_H = 0.5 ... 12.

Run:  python worked_examples/figures_horizon.py [output-directory]
(default worked_examples/output/); writes PNG and PDF files.
"""
import pathlib
import sys
import warnings

import matplotlib

matplotlib.use("Agg")

import numpy as np  # noqa: E402

import contourkit as ck  # noqa: E402
from contourkit import plotting  # noqa: E402


def main(out=None):
    out = pathlib.Path(out) if out else pathlib.Path(__file__).resolve().parent / "output"
    kappa, Lambda, omega = 0.05, 2.5, 0.05
    model = ck.catalogue.quartic_flow(kappa=kappa, Lambda=Lambda)
    rep = model.mode_equation(omega).fourier()
    written = []
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ck.CoalescenceWarning)
        fig, ax = plotting.landscape(rep, -20.0, ck.Contour.real_axis(), omega=omega)
        written += plotting.save(fig, out / "horizon_landscape", formats=("png", "pdf"))
        fig, ax = plotting.landscape(rep, -20.0, ck.Contour.real_axis(), omega=omega,
                                     window=(-0.16, 0.08, -0.12, 0.12))
        written += plotting.save(fig, out / "horizon_landscape_zoom", formats=("png", "pdf"))
        tanh = ck.catalogue.quartic_flow(kappa=kappa, Lambda=Lambda, D=0.5)
        fig, ax = plotting.dispersion(tanh, omega=0.2, side="interior")
        written += plotting.save(fig, out / "horizon_dispersion", formats=("png", "pdf"))
        T_H = model.hawking_temperature
        table = ck.compare(tanh, T_H * np.array([0.5, 1.0, 2.0, 4.0, 8.0, 12.0]))
        fig, axes = plotting.spectrum(table)
        written += plotting.save(fig, out / "horizon_spectrum", formats=("png", "pdf"))
    for p in written:
        print(p)
    return written


if __name__ == "__main__":
    main(*sys.argv[1:])
