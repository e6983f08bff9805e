"""Benchmark: direct full-profile solver, time per omega at 1e-8 accuracy on the thermal ratio.

Not a test (pytest does not collect bench_*.py).  Run::

    python tests/benchmarks/bench_direct.py [--branch superluminal|subluminal] [--repeat 3]

For each omega/kappa the solver runs with its default settings (rtol=1e-10 on
the unit-flux S-matrix entries) and is timed (best of ``--repeat`` warm runs;
the first, cold call also pays for sympy limits, the automatic window and the
cut-off search, and is reported separately).  The accuracy of the thermal ratio
|beta/alpha|^2 is measured against a reference run on a finer grid (step=1.5,
32 to 48 Chebyshev nodes per segment, a longer window); a row whose measured
relative error exceeds 1e-8 is flagged.  The contour-method column is left for
the lead to add.
"""
import argparse
import time
import warnings

from contourkit.catalogue import quartic_flow
from contourkit.direct import scatter
from contourkit.errors import AccuracyWarning

TARGET = 1e-8


def main(argv=None):
    p = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    p.add_argument("--branch", default="superluminal", choices=["superluminal", "subluminal"])
    p.add_argument("--kappa", type=float, default=0.05)
    p.add_argument("--Lambda", type=float, default=2.5)
    p.add_argument("--D", type=float, default=0.5)
    p.add_argument("--repeat", type=int, default=3)
    p.add_argument("--wk", type=float, nargs="*", default=[0.1, 0.5, 1.0, 2.0, 3.0])
    a = p.parse_args(argv)
    m = quartic_flow(kappa=a.kappa, Lambda=a.Lambda, branch=a.branch, D=a.D)
    t0 = time.perf_counter()
    scatter(m, a.wk[0] * a.kappa)
    cold = time.perf_counter() - t0
    print(f"model: {m.name}, kappa={a.kappa}, Lambda={a.Lambda}, D={a.D}; cold first call {cold:.2f} s")
    print(f"{'omega/kappa':>11} {'time/s':>8} {'segments':>8} {'nodes':>5} {'thermal ratio':>14} "
          f"{'rel.err':>9} {'estimate':>9} {'unitarity':>9}  ok")
    for wk in a.wk:
        w = wk * a.kappa
        best = float("inf")
        for _ in range(max(1, a.repeat)):
            t0 = time.perf_counter()
            res = scatter(m, w)
            best = min(best, time.perf_counter() - t0)
        lo, hi = res.extra["window"]
        with warnings.catch_warnings():      # the reference may stop at its round-off floor (~1e-12)
            warnings.simplefilter("ignore", AccuracyWarning)
            ref = scatter(m, w, step=1.5, points=32, max_points=48, rtol=1e-12, window=(1.2 * lo, 1.2 * hi))
        err = abs(res.thermal_ratio - ref.thermal_ratio) / ref.thermal_ratio if ref.thermal_ratio else 0.0
        ok = "yes" if err <= TARGET else "NO"
        print(f"{wk:11.3g} {best:8.3f} {res.extra['segments']:8d} {res.extra['points']:5d} "
              f"{res.thermal_ratio:14.8e} {err:9.1e} {res.error_estimate:9.1e} {res.unitarity_residual:9.1e}  {ok}")


if __name__ == "__main__":
    main()
