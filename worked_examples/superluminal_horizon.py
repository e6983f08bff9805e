"""A flowing condensate-like horizon with superluminal (quartic) dispersion.

Our own scenario: a flow that accelerates through the speed of sound with
gradient kappa = 0.05 (units of the sound speed and the healing length), with
the dispersion scale Lambda = 2.5, so kappa/Lambda = 0.02.  The script
computes the near-horizon S-matrix on a few frequencies and prints, for
each, the occupation |beta|^2 of the Hawking mode, the thermal ratio
|beta/alpha|^2, the effective temperature over kappa/(2 pi) and the
pseudo-unitarity residual; it writes the table ``superluminal_spectrum.csv``
and the figures ``superluminal_landscape`` (the k plane at x = 20 with the
first basis contour), ``superluminal_dispersion`` (the branches at x = 20
with the modes at omega = T_H) and ``superluminal_spectrum``.

Run:  python worked_examples/superluminal_horizon.py [OUT_DIR]
"""
import pathlib
import sys
import warnings

import matplotlib
matplotlib.use("Agg")
import matplotlib.pyplot as plt
import numpy as np

import contourkit as ck
from contourkit import plotting


def main(out_dir="."):
    out = pathlib.Path(out_dir)
    out.mkdir(parents=True, exist_ok=True)
    model = ck.catalogue.quartic_flow(kappa=0.05, Lambda=2.5, branch="superluminal")
    T_H = model.hawking_temperature
    omegas = T_H * np.array([0.5, 1.0, 2.0, 4.0, 8.0, 16.0])
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ck.CoalescenceWarning)
        spec = model.spectrum(omegas)
    print(f"model: {model.name}; kappa = {model.kappa}, T_H = kappa/(2 pi) = {T_H:.6g}")
    print(f"{'omega/T_H':>10} {'|beta|^2':>12} {'|beta/alpha|^2':>15} {'T_eff/T_H':>10} {'unitarity':>10}")
    for r in spec:
        print(f"{r['omega'] / T_H:10.3f} {r['occupation']:12.5e} {r['thermal_ratio']:15.6e} "
              f"{r['temperature_ratio']:10.6f} {r['unitarity_residual']:10.1e}")
    spec.to_csv(out / "superluminal_spectrum.csv")

    rep = model.mode_equation(T_H).fourier()
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ck.CoalescenceWarning)
        figures = {"landscape": plotting.landscape(rep, 20.0, contour=rep.basis()[0]),
                   "dispersion": plotting.dispersion(model, x=20.0, omega=T_H),
                   "spectrum": plotting.spectrum(spec)}
    for name, (fig, _) in figures.items():
        plotting.save(fig, out / f"superluminal_{name}", ("png",))
        plt.close(fig)
    print(f"table and figures written to {out}")
    return spec


if __name__ == "__main__":
    main(*sys.argv[1:])
