"""The Airy turning point: the simplest exact contour solution.

Our own scenario: a wave approaching a turning point where its local
wavenumber goes through zero, y'' - x y = 0 (the model file shipped as
``contourkit.symbolic.modelfile.example_path("airy")``).  Its k-space exponent is
E(k) = i k^3/3 and the contour integrals between the three valleys at
infinity give the Airy functions (DLMF 9.5.4 and 9.2.11):

    Ai(x)          = (1/2 pi) * integral over the real axis,
    (Ai + i Bi)/2  = (1/2 pi) * integral from valley 2 to valley 0,
    (Ai - i Bi)/2  = (1/2 pi) * integral from valley 1 to valley 2.

The script evaluates them along steepest-descent paths, compares with
scipy.special.airy (double precision) and mpmath.airyai/airybi (30 digits),
writes the table ``airy_table.csv`` and the figures ``airy_landscape``
(the k plane at x = -4 with the real-axis contour) and ``airy_functions``.

Run:  python worked_examples/airy_turning_point.py [OUT_DIR]
"""
import csv
import math
import pathlib
import sys

import matplotlib
matplotlib.use("Agg")
import matplotlib.pyplot as plt
import mpmath
import numpy as np
from scipy.special import airy

import contourkit as ck
from contourkit import plotting
from contourkit.symbolic.modelfile import example_path


def main(out_dir="."):
    out = pathlib.Path(out_dir)
    out.mkdir(parents=True, exist_ok=True)
    eq = ck.load_model(example_path("airy"))
    rep = eq.fourier()
    print(f"exponent E(k) = {rep.exponent}; valleys at {[round(math.degrees(v.center)) for v in rep.valleys]} deg")
    real = ck.Contour.real_axis()
    up, down = ck.Contour.between(2, 0), ck.Contour.between(1, 2)
    xs = np.array([-8.0, -4.0, -1.0, 0.0, 0.5, 2.0, 4.0])
    ai_c = np.array(rep.evaluate(real, xs)) / (2 * np.pi)
    bi_c = (np.array(rep.evaluate(up, xs)) - np.array(rep.evaluate(down, xs))) / (2j * np.pi)
    ai, _, bi, _ = airy(xs)
    rows = []
    for x, a_c, b_c, a, b in zip(xs, ai_c, bi_c, ai, bi):
        err_mp = ""
        if x in (-4.0, 2.0):   # 30 digits at two points (mpmath back end)
            with mpmath.workdps(30):
                a_mp = rep.evaluate(real, float(x), dps=30) / (2 * mpmath.pi)
                err_mp = float(abs(a_mp - mpmath.airyai(x)) / abs(mpmath.airyai(x)))
        rows.append({"x": float(x), "Ai_scipy": float(a), "Ai_contour": a_c.real, "Ai_rel_err": abs(a_c - a) / abs(a),
                     "Bi_scipy": float(b), "Bi_contour": b_c.real, "Bi_rel_err": abs(b_c - b) / abs(b),
                     "Ai_mpmath30_rel_err": err_mp})
    with open(out / "airy_table.csv", "w", newline="", encoding="utf-8") as fh:
        w = csv.DictWriter(fh, fieldnames=list(rows[0]), lineterminator="\n")
        w.writeheader()
        w.writerows(rows)
    print(f"{'x':>6} {'Ai':>14} {'rel.err':>9} {'Bi':>14} {'rel.err':>9}")
    for r in rows:
        print(f"{r['x']:6.2f} {r['Ai_contour']:14.6e} {r['Ai_rel_err']:9.1e} {r['Bi_contour']:14.6e} {r['Bi_rel_err']:9.1e}")

    fig, _ = plotting.landscape(rep, -4.0, contour=real)
    plotting.save(fig, out / "airy_landscape", ("png",))
    plt.close(fig)
    grid = np.linspace(-8, 2.5, 120)
    fig, ax = plt.subplots(figsize=(4.5, 3.0))
    ax.plot(grid, airy(grid)[0], "k-", lw=1, label="Ai (scipy)")
    ax.plot(grid, airy(grid)[2], "k--", lw=1, label="Bi (scipy)")
    ax.plot(xs, ai_c.real, "o", label="Ai, real-axis contour")
    ax.plot(xs, bi_c.real, "s", label="Bi, valley contours")
    ax.set_ylim(-0.6, 1.5)
    ax.set_xlabel("$x$")
    ax.legend(fontsize=7)
    plotting.save(fig, out / "airy_functions", ("png",))
    plt.close(fig)
    print(f"table and figures written to {out}")
    return rows


if __name__ == "__main__":
    main(*sys.argv[1:])
