"""Figures of the Airy equation y'' = x y for a paper: two landscapes and the local dispersion curve.

Our own scenario: the turning-point problem in its simplest form.  On the
oscillatory side (x = -4) the two saddles k = +-2 are real and the real-axis
contour (Ai, DLMF 9.5.4) is the sum of both thimbles; on the evanescent side
(x = +2) the saddles are +-i sqrt(2) and the real axis deforms onto the
single thimble through i sqrt(2).  The third figure is the local dispersion
relation -k^2 - x = 0 in the (k, x) plane, with the two real saddles at x = -4.
There is no frequency and no Bogoliubov spectrum for this equation.

Run:  python worked_examples/figures_airy.py [output-directory]
(default worked_examples/output/); writes PNG and PDF files.
"""
import pathlib
import sys

import matplotlib

matplotlib.use("Agg")

import sympy as sp  # noqa: E402

import contourkit as ck  # noqa: E402
from contourkit import plotting  # noqa: E402


def main(out=None):
    out = pathlib.Path(out) if out else pathlib.Path(__file__).resolve().parent / "output"
    x = sp.Symbol("x")
    y = sp.Function("y")
    rep = ck.ModeEquation.from_ode(y(x).diff(x, 2) - x * y(x), y, x).fourier()
    written = []
    for xv, name in ((-4.0, "airy_landscape_oscillatory"), (2.0, "airy_landscape_evanescent")):
        fig, ax = plotting.landscape(rep, xv, ck.Contour.real_axis())
        written += plotting.save(fig, out / name, formats=("png", "pdf"))
    fig, ax = plotting.dispersion(rep, -4.0)
    written += plotting.save(fig, out / "airy_dispersion", formats=("png", "pdf"))
    for p in written:
        print(p)
    return written


if __name__ == "__main__":
    main(*sys.argv[1:])
