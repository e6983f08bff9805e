"""A flowing condensate-like horizon with superluminal (quartic) dispersion.

Our own scenario: a flow that accelerates through the speed of sound with
gradient kappa = 0.05 (units of the sound speed and the healing length), with
the dispersion scale Lambda = 2.5, so kappa/Lambda = 0.02.  The script
computes the near-horizon S-matrix on a few frequencies and prints, for
each, the occupation |beta|^2 of the Hawking mode, the thermal ratio
|beta/alpha|^2, the effective temperature over kappa/(2 pi) and the
pseudo-unitarity residual; it writes the table to superluminal_spectrum.csv.

Run:  python worked_examples/superluminal_horizon.py
"""
import sys
import warnings

import numpy as np

import contourkit as ck


def main(out="superluminal_spectrum.csv"):
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
    spec.to_csv(out)
    print(f"table written to {out}")
    return spec


if __name__ == "__main__":
    main(*sys.argv[1:])
