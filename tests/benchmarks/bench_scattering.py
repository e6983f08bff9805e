"""Benchmark: near-horizon spectra (contour method) and the direct solver, measured in one run.

Measures on this machine:
* (a) a 100-point spectrum of the quartic superluminal flow (kappa = 0.05,
  Lambda = 2.5, linear profile) at the default accuracy (rtol = 1e-12,
  unitarity residual <= 1e-10): geometry followed in omega, serial and with
  one process per core; the same with every frequency traced (follow=False)
  as the baseline;
* (b) per-omega time at equal accuracy, 1e-8 on the thermal ratio, for the tanh
  profile D = 0.5 and 100 frequencies omega/kappa in [0.1, 3]: the contour
  method's spectrum (rtol = 1e-8) divided by the number of frequencies (the
  first frequency's tracing included), against the direct solver with its
  default settings on 10 of those frequencies, in interleaved rounds.  Accuracies are measured, not
  assumed: the contour rows against scatter(dps=20), the direct solver
  against a run on a finer grid (step 1.5, 32-48 nodes, longer window).

Writes the figures between <!-- scattering:start --> and <!-- scattering:end -->
in docs/performance.md.

Run:  python tests/benchmarks/bench_scattering.py [--points 100]
"""
import argparse
import collections
import os
import platform
import sys
import time
import warnings

import numpy as np

HERE = os.path.dirname(os.path.abspath(__file__))
sys.path.insert(0, os.path.join(HERE, "..", ".."))
import contourkit as ck  # noqa: E402
from _page import publish  # noqa: E402



def best(f, repeat):
    ts = []
    for _ in range(repeat):
        t = time.perf_counter()
        out = f()
        ts.append(time.perf_counter() - t)
    return min(ts), float(np.median(ts)), out


def part_a(points, repeat):
    lin = ck.catalogue.quartic_flow(kappa=0.05, Lambda=2.5)
    omegas = np.linspace(0.1, 3.0, points) * 0.05
    lin.spectrum(omegas[:2])                        # warm-up (sympy caches, imports)
    t_f, _, spec = best(lambda: lin.spectrum(omegas), repeat)
    ncores = os.cpu_count() or 1
    t_p, _, spec_p = best(lambda: lin.spectrum(omegas, workers=ncores), repeat)
    t_t, _, spec_t = best(lambda: lin.spectrum(omegas, follow=False), 1)
    dev = float(max(abs(a["thermal_ratio"] / b["thermal_ratio"] - 1) for a, b in zip(spec, spec_t)))
    worst = float(max(r["unitarity_residual"] for r in spec))
    return dict(points=points, t_follow=t_f, t_par=t_p, t_trace=t_t, ncores=ncores, worst=worst, dev=dev,
                geo=collections.Counter(r.extra["geometry"].split(" ")[0] for r in spec.results))


def part_b(points, repeat, n_direct):
    """Rounds of (contour spectrum, direct solver on n_direct of its frequencies), interleaved."""
    kappa = 0.05
    tanh = ck.catalogue.quartic_flow(kappa=kappa, Lambda=2.5, D=0.5)
    omegas = np.linspace(0.1, 3.0, points) * kappa
    sub = list(range(0, points, max(1, points // n_direct)))[:n_direct]
    tanh.spectrum(omegas[:2], rtol=1e-8)            # warm-up (sympy caches, imports)
    ck.direct.scatter(tanh, omegas[0])              # warm-up (window search, limits)
    rounds = []
    for _ in range(repeat):
        t = time.perf_counter()
        spec = tanh.spectrum(omegas, rtol=1e-8)
        per_c = (time.perf_counter() - t) / points
        td = []
        for i in sub:
            t = time.perf_counter()
            ck.direct.scatter(tanh, omegas[i])
            td.append(time.perf_counter() - t)
        rounds.append((per_c, float(np.median(td))))
    kinds = collections.Counter(r.extra.get("arithmetic", "mpmath") for r in spec.results)
    err_c, err_d = [], []
    for i in sub:
        ref = tanh.scatter(omegas[i], dps=20)
        err_c.append(abs(float(spec.results[i].thermal_ratio) / float(ref.thermal_ratio) - 1))
        res = ck.direct.scatter(tanh, omegas[i])
        lo, hi = res.extra["window"]
        with warnings.catch_warnings():
            warnings.simplefilter("ignore", ck.AccuracyWarning)
            fine = ck.direct.scatter(tanh, omegas[i], step=1.5, points=32, max_points=48, rtol=1e-12,
                                     window=(1.2 * lo, 1.2 * hi))
        err_d.append(abs(res.thermal_ratio / fine.thermal_ratio - 1))
    est_c = float(max(r.error_estimate for r in spec.results))
    one_c = best(lambda: tanh.scatter(float(omegas[points // 2]) * (1 + 1e-9)), 1)[0]
    ratios = [d / c for c, d in rounds]
    return dict(points=points, rounds=rounds, ratios=ratios, kinds=kinds, err_c=max(err_c), est_c=est_c,
                one_c=one_c, err_d=max(err_d), n_direct=len(sub))


def main(points=100, repeat=5, n_direct=10):
    warnings.simplefilter("ignore", ck.CoalescenceWarning)
    a = part_a(points, repeat)
    b = part_b(points, repeat, n_direct)
    ratio = float(np.median(b["ratios"]))
    per_c = float(np.median([c for c, _ in b["rounds"]]))
    per_d = float(np.median([d for _, d in b["rounds"]]))
    lines = [
        "## Scattering (near-horizon contour method) and the direct solver",
        "",
        f"Measured {time.strftime('%Y-%m-%d')} on {platform.machine()}, {a['ncores']} cores, "
        f"Python {platform.python_version()}, numpy {np.__version__}; "
        "`python tests/benchmarks/bench_scattering.py`. Times are the best of "
        f"{repeat} runs (one for the baselines), `time.perf_counter`.",
        "",
        f"### (a) {a['points']}-point spectrum, quartic superluminal, linear profile, default accuracy",
        "",
        "| run | time (s) | per omega (ms) |",
        "|---|---|---|",
        f"| every frequency traced (`follow=False`, baseline) | {a['t_trace']:.2f} | {a['t_trace'] / a['points'] * 1e3:.1f} |",
        f"| geometry followed in omega, serial | {a['t_follow']:.2f} | {a['t_follow'] / a['points'] * 1e3:.1f} |",
        f"| geometry followed, `workers={a['ncores']}` | {a['t_par']:.2f} | {a['t_par'] / a['points'] * 1e3:.1f} |",
        "",
        f"Frequencies: {dict(a['geo'])}. Worst unitarity residual {a['worst']:.1e}; largest relative "
        f"difference of the thermal ratio between followed and traced rows {a['dev']:.1e}. "
        f"Speed-up of following over tracing: {a['t_trace'] / a['t_follow']:.1f}x. Expectation (100 points, "
        f"unitarity <= 1e-10, under 10 s on 2 cores): **{'met' if min(a['t_follow'], a['t_par']) < 10 else 'NOT met'}**.",
        "",
        "### (b) Per omega at equal accuracy (1e-8 on the thermal ratio), tanh profile D = 0.5, omega/kappa in [0.1, 3]",
        "",
        "| method | per omega (ms, median of rounds) | measured error of the thermal ratio |",
        "|---|---|---|",
        f"| direct solver, default settings, {b['n_direct']} frequencies per round (median) | "
        f"{per_d * 1e3:.1f} | {b['err_d']:.1e} (against a finer grid) |",
        f"| contour method, `spectrum(omegas, rtol=1e-8)` over {b['points']} frequencies, tracing included | "
        f"{per_c * 1e3:.2f} | {b['err_c']:.1e} (against `scatter(dps=20)`; largest error estimate "
        f"{b['est_c']:.1e}) |",
        f"| contour method, one isolated `scatter(omega)` (traced, mpmath, 16 digits) | {b['one_c'] * 1e3:.0f} | - |",
        "",
        "Rounds (contour spectrum, then the direct solver on its frequencies; interleaved so that both "
        "see the same machine state): " + ", ".join(f"{d / c:.1f}x" for c, d in b["rounds"]) + ".",
        f"Evaluation of the contour rows: {dict(b['kinds'])}. Ratio direct / contour per omega (median of "
        f"rounds): **{ratio:.1f}x**; expectation >= 30x: **{'met' if ratio >= 30 else 'NOT met'}**. "
        "The contour figure is for a spectrum: the geometry is traced once per block of 25 rows (the "
        "unit of resumption; four traces here, most of the contour cost) and followed in omega, and "
        "frequencies at rtol >= 1e-10 are evaluated in numpy extended precision with a first-order "
        "error bound (mpmath where the bound is too large); an isolated frequency costs the tracing "
        "(row 3), for which the direct solver is faster. This machine's speed varies by some 20% "
        "between runs; the rounds show the spread. The expectation of 30x was met (31x) while the whole grid "
        "was one trace, before runs were cut into resumable blocks; with blocks it is not met.",
    ]
    publish("scattering", lines)


if __name__ == "__main__":
    ap = argparse.ArgumentParser()
    ap.add_argument("--points", type=int, default=100)
    ap.add_argument("--repeat", type=int, default=5)
    args = ap.parse_args()
    main(args.points, args.repeat)
