"""Light at a moving refractive-index front in a dielectric with two resonances.

Our own scenario (no experiment's values): a front moving at u = 0.6 c
through a lossless medium with two oscillator resonances (strengths 1.2 and
5.2, frequencies 1 and 3 in the medium frame); the front shifts the first
resonance by 5 % over a width of 20, so that the low-frequency group velocity
in the front's frame goes through zero: a horizon with small surface gravity
kappa ~ shift/width.  The model is ``contourkit.catalogue.dielectric_front``
with its linearised profile (``linear=True``, the exact near-horizon model).
The dispersion relation is of sixth order in k: besides the low-frequency
(Hawking) branch there are the branches below and above each resonance.

The script prints the derived k-space exponent data (branch points and their
exponents), writes the dispersion diagrams at x = -200 and x = 200 and the
complex-k landscape, and tabulates the near-horizon scattering figures at
omega/T_H = 1, 2, 4 into ``dielectric_spectrum.csv`` (five in-modes each, all
from the exterior: v_R, the two short-wavelength modes of the low-frequency
branch and the two modes between the resonances, each pair of opposite norm;
the modes at omega = T_H are printed with their near-horizon wavenumbers).
A frequency where the S-matrix cannot be built would be recorded with
``success = False`` and the reason in ``message``, not dropped.  At
omega = T_H the contour result is compared with the direct solver on the
full tanh profile (``dielectric_check.csv``).

In the linearised model the squared resonance frequency
``w_0^2 (1 + 2 shift x/width)`` vanishes at x = -width/(2 shift) = -200;
beyond it the model is no longer a dielectric, so mode labels are taken in
the near-horizon region (docs/limitations.md).

Safety: experiments that make such fronts with intense laser pulses are
hazardous; see docs/safety.md.  Nothing here is operating guidance.

Run:  python worked_examples/dielectric_front.py [OUT_DIR]
"""
import csv
import pathlib
import sys
import warnings

import matplotlib
matplotlib.use("Agg")
import matplotlib.pyplot as plt

import contourkit as ck
from contourkit import plotting
from contourkit.scans.resumable import COLUMNS, compute_row


def main(out_dir="."):
    out = pathlib.Path(out_dir)
    out.mkdir(parents=True, exist_ok=True)
    model = ck.catalogue.dielectric_front(u=0.6, resonances=((1.2, 1.0), (5.2, 3.0)), shift=0.05, width=20.0,
                                          linear=True)
    T_H = model.hawking_temperature
    print(f"model: {model.name}; kappa = {model.kappa:.6g}, T_H = {T_H:.6g}, order {model.order}")
    rep = model.mode_equation(T_H).fourier()
    print("branch points of f(k) at omega = T_H (k_j, exponent nu_j):")
    for k, nu in rep.branch_points:
        print(f"  k = {complex(k).real:+.6f}   nu = {complex(nu):.6f}")
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ck.ContourkitWarning)
        rows = [compute_row(model, f * T_H, record_errors=True) for f in (1.0, 2.0, 4.0)]
        res = model.scatter(T_H)
        full = ck.catalogue.dielectric_front(u=0.6, resonances=((1.2, 1.0), (5.2, 3.0)), shift=0.05, width=20.0)
        check = ck.compare(full, [T_H], on_error="record")
        fig, axes = plt.subplots(1, 2, figsize=(6.8, 3.2))
        for ax, x in zip(axes, (-200.0, 200.0)):
            plotting.dispersion(model, x=x, omega=T_H, ax=ax, legend=x > 0)
            ax.set_title(f"x = {x:g}", fontsize=8)
        plotting.save(fig, out / "dielectric_dispersion", ("png",))
        plt.close(fig)
        fig, _ = plotting.landscape(rep, 200.0)
        plotting.save(fig, out / "dielectric_landscape", ("png",))
        plt.close(fig)
    with open(out / "dielectric_spectrum.csv", "w", newline="", encoding="utf-8") as fh:
        w = csv.DictWriter(fh, fieldnames=list(COLUMNS), lineterminator="\n")
        w.writeheader()
        w.writerows(rows)
    check.to_csv(out / "dielectric_check.csv")
    print("modes of the S-matrix at omega = T_H: labels and wavenumber near the horizon, and the "
          "far-region wavenumber where the contour method reads the amplitude")
    for md in res.in_modes + res.out_modes:
        nh = md.data.get("near_horizon", {})
        near = f"k = {nh['k'].real:+.6g} at x = {nh['x']:+.4g}" if nh else ""
        print(f"  {md.name:9s} {near:32s} far: {md.origin:12s} k = {md.k.real:+.6g}")
    for r in rows:
        if r["success"]:
            print(f"omega/T_H = {r['omega'] / T_H:4.1f}: |beta|^2 = {r['occupation']:.5e}, "
                  f"T_eff/T_H = {r['temperature_ratio']:.6f}, unitarity {r['unitarity_residual']:.1e}")
        else:
            print(f"omega/T_H = {r['omega'] / T_H:4.1f}: no S-matrix ({r['message'][:120]})")
    c = check.rows[0]
    print(f"omega = T_H, full tanh profile: T_eff/T_H contour {c['temperature_ratio_contour']}, "
          f"direct {c['temperature_ratio_direct']}")
    print(f"tables and figures written to {out}")
    return rows


if __name__ == "__main__":
    main(*sys.argv[1:])
