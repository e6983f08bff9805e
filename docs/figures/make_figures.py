"""Make the figures shown in docs/figures.md (PNG at 120 dpi, modest size for the documentation).

Run from the repository root:  python docs/figures/make_figures.py [name ...]
Each function below is the call printed in docs/figures.md beside its figure.
"""
import pathlib
import sys
import warnings

import matplotlib

matplotlib.use("Agg")

import numpy as np  # noqa: E402

import contourkit as ck  # noqa: E402
from contourkit import plotting  # noqa: E402

HERE = pathlib.Path(__file__).resolve().parent
MODEL_FILE = HERE.parents[1] / "worked_examples" / "models" / "superluminal.toml"


def horizon_landscape():
    model = ck.catalogue.quartic_flow(kappa=0.05, Lambda=2.5)
    rep = model.mode_equation(0.05).fourier()
    return plotting.landscape(rep, -20.0, ck.Contour.real_axis(), omega=0.05)


def file_basis_landscape():
    model = ck.load_model(MODEL_FILE)
    rep = model.mode_equation(0.05).fourier()
    return plotting.landscape(rep, 20.0, rep.basis()[-1], omega=0.05)


def dielectric_landscape():
    front = ck.catalogue.dielectric_front()
    w = float(front.kappa)
    rep = front.mode_equation(w).fourier()
    return plotting.landscape(rep, -1 / w, ck.Contour.real_axis(), omega=w)


def airy_landscape():
    import sympy as sp
    x, y = sp.Symbol("x"), sp.Function("y")
    rep = ck.ModeEquation.from_ode(y(x).diff(x, 2) - x * y(x), y, x).fourier()
    return plotting.landscape(rep, -4.0, ck.Contour.real_axis())


def tanh_dispersion():
    tanh = ck.catalogue.quartic_flow(kappa=0.05, Lambda=2.5, D=0.5)
    return plotting.dispersion(tanh, omega=0.2, side="interior")


def horizon_dispersion():
    model = ck.catalogue.quartic_flow(kappa=0.05, Lambda=2.5)
    return plotting.dispersion(model, -20.0, 0.05)


def dielectric_dispersion():
    front = ck.catalogue.dielectric_front()
    return plotting.dispersion(front, omega=0.002, side="exterior")


def spectrum_cutoff():
    tanh = ck.catalogue.quartic_flow(kappa=0.05, Lambda=2.5, D=0.5)
    table = ck.compare(tanh, [0.004, 0.01, 0.03, 0.1, 0.25, 0.4, 0.55, 0.7], on_error="record")
    return plotting.spectrum(table, model=tanh, xaxis="omega/kappa")


def spectrum_dielectric():
    front = ck.catalogue.dielectric_front()
    T = front.hawking_temperature
    spec = front.spectrum(T * np.array([0.5, 1, 2, 4, 8, 12, 16]), rtol=1e-6)
    return plotting.spectrum(spec, model=front)


FIGURES = [horizon_landscape, file_basis_landscape, dielectric_landscape, airy_landscape, tanh_dispersion,
           horizon_dispersion, dielectric_dispersion, spectrum_cutoff, spectrum_dielectric]


def main(names=()):
    written = []
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        for f in FIGURES:
            if names and f.__name__ not in names:
                continue
            fig, _ = f()
            written += plotting.save(fig, HERE / f.__name__, formats=("png",), dpi=120)
    for p in written:
        print(p)
    return written


if __name__ == "__main__":
    main(sys.argv[1:])
