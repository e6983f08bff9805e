"""A surface-wave-like horizon: subluminal (quartic) dispersion.

Our own scenario: long waves on a flowing stream whose speed passes the
long-wavelength wave speed with gradient kappa = 0.05, with subluminal
dispersion ``(omega - v k)^2 = k^2 (1 - k^2/Lambda^2)`` (Lambda = 2.5), as for
gravity waves at long wavelength.  Here the short-wavelength in-modes come
from the exterior (subsonic) side, against the flow.  The script computes
the near-horizon spectrum on the linear profile, and at two frequencies
compares it with the direct solver on a tanh profile that joins two uniform
regions (v from -1.5 to -0.5).  It writes ``subluminal_spectrum.csv``,
``subluminal_check.csv`` and the figures ``subluminal_dispersion`` (the
branches on each side, x = -20 and 20, with the modes at omega = 2 T_H),
``subluminal_landscape`` and ``subluminal_spectrum``.

Run:  python worked_examples/subluminal_horizon.py [OUT_DIR]
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
    model = ck.catalogue.quartic_flow(kappa=0.05, Lambda=2.5, branch="subluminal")
    T_H = model.hawking_temperature
    omegas = T_H * np.array([0.5, 1.0, 2.0, 4.0, 8.0])
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ck.CoalescenceWarning)
        spec = model.spectrum(omegas)
        table = ck.compare(ck.catalogue.quartic_flow(kappa=0.05, Lambda=2.5, branch="subluminal", D=0.5),
                           T_H * np.array([1.0, 4.0]), on_error="record")
    print(f"model: {model.name}; kappa = {model.kappa}, T_H = {T_H:.6g}")
    print(f"{'omega/T_H':>10} {'|beta|^2':>12} {'T_eff/T_H':>10} {'unitarity':>10}  in-modes")
    for r, res in zip(spec, spec.results):
        names = ", ".join(m.name for m in res.in_modes)
        print(f"{r['omega'] / T_H:10.3f} {r['occupation']:12.5e} {r['temperature_ratio']:10.6f} "
              f"{r['unitarity_residual']:10.1e}  {names}")
    print("near-horizon versus direct (tanh profile):")
    for r in table:
        print(f"  omega/T_H = {r['omega'] / T_H:5.2f}: T_eff/T_H contour {r['temperature_ratio_contour']}, "
              f"direct {r['temperature_ratio_direct']}")
    spec.to_csv(out / "subluminal_spectrum.csv")
    table.to_csv(out / "subluminal_check.csv")

    w = 2 * T_H
    fig, axes = plt.subplots(1, 2, figsize=(6.8, 3.2))
    for ax, x in zip(axes, (-20.0, 20.0)):
        plotting.dispersion(model, x=x, omega=w, ax=ax, legend=x > 0)
        ax.set_title(f"x = {x:g}", fontsize=8)
    plotting.save(fig, out / "subluminal_dispersion", ("png",))
    plt.close(fig)
    rep = model.mode_equation(w).fourier()
    for name, (fig, _) in {"landscape": plotting.landscape(rep, 20.0),
                           "spectrum": plotting.spectrum(spec)}.items():
        plotting.save(fig, out / f"subluminal_{name}", ("png",))
        plt.close(fig)
    print(f"tables and figures written to {out}")
    return spec, table


if __name__ == "__main__":
    main(*sys.argv[1:])
