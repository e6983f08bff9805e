"""Benchmark: near-horizon spectrum (contour method) against the direct solver.

Measures in one run, on this machine:
* a 100-point spectrum of the quartic superluminal flow (kappa = 0.05,
  Lambda = 2.5, linear profile) at unitarity residual <= 1e-10, serial;
* per-omega time of the contour method and of the direct position-space
  solver (tanh profile D = 0.5) at the same frequencies, and their ratio.

Writes the figures between the markers <!-- scattering:start --> and
<!-- scattering:end --> in docs/performance.md.

Run:  python tests/benchmarks/bench_scattering.py [--points 100]
"""
import argparse
import os
import platform
import re
import time
import warnings

import sys

import numpy as np

HERE = os.path.dirname(os.path.abspath(__file__))
sys.path.insert(0, os.path.join(HERE, "..", ".."))
import contourkit as ck  # noqa: E402

PAGE = os.path.join(HERE, "..", "..", "docs", "performance.md")


def main(points=100, direct_points=6):
    warnings.simplefilter("ignore", ck.CoalescenceWarning)
    lin = ck.catalogue.quartic_flow(kappa=0.05, Lambda=2.5)
    tanh = ck.catalogue.quartic_flow(kappa=0.05, Lambda=2.5, D=0.5)
    omegas = np.linspace(0.1, 3.0, points) * 0.05
    lin.scatter(omegas[0])                       # warm-up (sympy caches)
    t0 = time.perf_counter()
    spec = lin.spectrum(omegas)
    t_spec = time.perf_counter() - t0
    ncores = os.cpu_count() or 1
    t0 = time.perf_counter()
    spec2 = lin.spectrum(omegas, workers=ncores)
    t_par = time.perf_counter() - t0
    assert [r["thermal_ratio"] for r in spec2] == [r["thermal_ratio"] for r in spec]
    worst = max(r["unitarity_residual"] for r in spec)
    sel = omegas[:: max(1, points // direct_points)][:direct_points]
    ck.direct.scatter(tanh, sel[0])              # warm-up (window search, limits)
    tc, td = [], []
    for w in sel:
        t = time.perf_counter()
        tanh.scatter(w)
        tc.append(time.perf_counter() - t)
        t = time.perf_counter()
        ck.direct.scatter(tanh, w)
        td.append(time.perf_counter() - t)
    tc, td = np.array(tc), np.array(td)
    lines = [
        "<!-- scattering:start -->",
        "## Scattering (near-horizon contour method)",
        "",
        f"Measured {time.strftime('%Y-%m-%d')} on {platform.machine()}, {os.cpu_count()} cores, "
        f"Python {platform.python_version()}; `python tests/benchmarks/bench_scattering.py`.",
        "",
        f"- {points}-point spectrum, quartic superluminal, linear profile, serial: "
        f"{t_spec:.1f} s ({t_spec / points * 1e3:.0f} ms per omega); with `workers={ncores}` "
        f"({ncores} processes): {t_par:.1f} s; worst unitarity residual {worst:.1e}.",
        f"- Per omega, tanh profile D = 0.5, {len(sel)} frequencies: contour method median "
        f"{np.median(tc) * 1e3:.0f} ms (min {tc.min() * 1e3:.0f}), direct solver median "
        f"{np.median(td) * 1e3:.0f} ms (min {td.min() * 1e3:.0f}); ratio direct/contour = "
        f"{np.median(td) / np.median(tc):.2f}.",
        "",
        "Issue targets: a 100-point spectrum in under 10 s on 2 cores, and the contour method",
        "at least 30 times faster than the direct solver. "
        + (f"Spectrum target {'met' if t_par < 10 else 'NOT met'} ({t_par:.1f} s with {ncores} processes); "
           f"speed ratio target {'met' if np.median(td) / np.median(tc) >= 30 else 'NOT met'} "
           f"({np.median(td) / np.median(tc):.2f}). Most of the contour time is the double-precision "
           "tracing of the steepest-descent and -ascent paths in pure Python (two positions per side, "
           "the second a stability check of the intersection numbers) and the sympy construction of "
           "the k-space representation for each omega; the direct solver is vectorised numpy."),
        "<!-- scattering:end -->",
    ]
    block = "\n".join(lines)
    text = open(PAGE).read() if os.path.exists(PAGE) else "# Performance\n"
    if "<!-- scattering:start -->" in text:
        text = re.sub(r"<!-- scattering:start -->.*<!-- scattering:end -->", block, text, flags=re.S)
    else:
        text = text.rstrip() + "\n\n" + block + "\n"
    with open(PAGE, "w") as fh:
        fh.write(text)
    print(block)


if __name__ == "__main__":
    ap = argparse.ArgumentParser()
    ap.add_argument("--points", type=int, default=100)
    main(ap.parse_args().points)
