"""The commands of the ``contourkit`` command line: derive, spectrum, figures, check, greybody.

Each command is declared once, with :func:`contourkit.cli.registry.command`,
beside the function that runs it and the function that adds its options.
"""
import argparse
import os
import pathlib

from ..errors import ContourError, InputError
from .parser import parallel_options, positive_float, positive_int, range_options, finite_float, tolerance
from .registry import COMMANDS, command
from .source import UsageError, check_frequencies, load, require_horizon


#: largest |x| of a figure position (beyond it the profile's functions overflow in double precision)
MAX_POSITION = 1e12


class CommandFailed(Exception):
    """A command ran but could not do all it was asked (one-line message, exit code 1)."""


def _fmt(v, spec=".4e"):
    if v is None:                       # a missing value, right-aligned in the column's width
        width = spec.split(".")[0]
        return "-".rjust(int(width)) if width.isdigit() else "-"
    return format(v, spec)


def _writable(path, what):
    """Refuse early an output path whose folder is missing or not writable."""
    p = pathlib.Path(path)
    if p.is_dir():
        raise InputError(f"{what} {path} is a directory; give a file name")
    parent = p.parent if str(p.parent) else pathlib.Path(".")
    if not parent.is_dir():
        raise InputError(f"cannot write {what} {path}: the folder {parent} does not exist")
    if not os.access(parent, os.W_OK):
        raise InputError(f"cannot write {what} {path}: the folder {parent} is not writable")
    return path


def omega_range(model, args):
    """The frequency grid of --omega-min/--omega-max/--points/--log (defaults from T_H and the cut-off)."""
    from ..scans.resumable import omega_grid
    T_H = model.hawking_temperature
    lo = args.omega_min if args.omega_min is not None else T_H / 2
    hi = args.omega_max
    if hi is None:
        hi = 8 * T_H
        cut = model.omega_max
        if cut is not None:
            hi = min(hi, 0.9 * cut)
        if args.points > 1 and hi <= lo:
            raise InputError(f"--omega-min {lo!r} is above the default upper frequency {hi:.6g}; give --omega-max")
    if args.points > 1 and not hi > lo:
        raise InputError(f"the frequency range is empty or reversed: --omega-min {lo!r} must be below "
                         f"--omega-max {hi!r}")
    return check_frequencies(model, omega_grid(lo, hi, points=args.points, log=args.log))


def _derive_options(p):
    p.add_argument("--omega", type=positive_float, metavar="W",
                   help="frequency of the near-horizon equation (default: omega = kappa)")
    p.add_argument("--latex", action="store_true", help="print LaTeX (an align* block) instead of text")
    p.add_argument("--symbolic", action="store_true",
                   help="keep the parameters and omega as symbols: horizon, kappa, T_H, k-space equation, "
                        "exponent and singular points as formulas")


@command("derive", help="print the derived k-space equation and constants", options=_derive_options,
         description="Print the dispersion relation, horizon, kappa, T_H and cut-off of a model and, at one "
                     "frequency, the near-horizon ODE, its k-space equation, the closed-form exponent, the "
                     "branch points with their exponents and the valleys at infinity.")
def run_derive(args):
    """``contourkit derive``: print the derivation (text or LaTeX)."""
    from .derive import report
    model, _ = load(args)
    print(report(model, omega=args.omega, latex=args.latex, symbolic=getattr(args, "symbolic", False)), end="")
    return 0


def _print_rows(rows, T_H):
    # the column names of docs/vocabulary.md
    print(f"{'omega':>12} {'omega/T_H':>10} {'occupation':>12} {'thermal_ratio':>15} {'temperature_ratio':>17} "
          f"{'unitarity_residual':>18}  success")
    for r in rows:
        w = r["omega"]
        print(f"{w:12.6g} {w / T_H:10.4f} {_fmt(r['occupation'], '12.5e')} {_fmt(r['thermal_ratio'], '15.6e')} "
              f"{_fmt(r['temperature_ratio'], '17.6f')} {_fmt(r['unitarity_residual'], '18.1e')}  "
              f"{'yes' if r['success'] else 'NO: ' + (r['message'] or '')}")


def _parallel(args):
    if args.scheduler is not None and args.workers is not None:
        raise UsageError("--workers and --scheduler exclude each other (a Dask cluster has its own workers)")
    if args.scheduler is not None:
        from ..scans.workers import check_address
        check_address(args.scheduler)
        return {"workers": None, "scheduler": args.scheduler}
    if args.workers is None:
        from ..scans.resumable import default_workers
        return {"workers": default_workers(), "scheduler": None}
    return {"workers": args.workers, "scheduler": None}


def _spectrum_options(p):
    range_options(p, points=12)
    p.add_argument("--method", choices=("contour", "direct"), default="contour",
                   help="contour: near-horizon S-matrix, geometry followed in omega (default); direct: the "
                        "full-profile solver")
    p.add_argument("--out", metavar="FILE.csv", help="the table (written row by row; resumed if it exists)")
    p.add_argument("--restart", action="store_true",
                   help="start --out afresh instead of resuming it (its rows are dropped)")
    p.add_argument("--json", metavar="FILE.json", help="also write the finished table as JSON")
    parallel_options(p)
    p.add_argument("--rtol", type=tolerance, metavar="R",
                   help="relative accuracy of thermal_ratio and occupation (contour default 1e-12, direct 1e-10)")
    p.add_argument("--digits", type=positive_int, metavar="N",
                   help="contour method: correct significant digits of each S-matrix (overrides --rtol)")
    p.add_argument("--on-error", choices=("raise", "record", "stop"), default="raise",
                   help="a failing frequency stops the run (raise, the default; 'stop' is the same) or is "
                        "recorded as a failed row (record)")
    p.add_argument("--progress", action=argparse.BooleanOptionalAction, default=None,
                   help="progress bar on stderr: rows done, resumed, failed, time left (default: when stderr "
                        "is a terminal and --quiet is not given)")
    p.add_argument("--quiet", action="store_true", help="print neither the table nor the progress bar")


@command("spectrum", help="Hawking spectrum over a frequency range, to CSV", options=_spectrum_options,
         description="Compute occupation |beta|^2, thermal_ratio |beta/alpha|^2, temperature_ratio T_eff/T_H and "
                     "the unitarity residual on a frequency grid, with the engine of model.spectrum.  Rows are "
                     "written to --out as they finish, after a fingerprint line of the run; running the same "
                     "command again resumes an interrupted run, and a file of another run is refused (--restart "
                     "starts it afresh).")
def run_spectrum(args):
    """``contourkit spectrum``: the spectrum engine to CSV (and JSON)."""
    from ..scans.engine import spectrum
    from ..scans.resumable import write_json
    model, label = load(args)
    require_horizon(model, label, "spectrum")
    parallel = _parallel(args)
    if args.digits is not None and args.method == "direct":
        raise UsageError("--digits is an option of the contour method; give --rtol for the direct solver")
    if args.restart and args.out is None:
        raise UsageError("--restart starts the file of --out afresh; give --out FILE.csv")
    if args.out is not None:
        _writable(args.out, "the table")
    if args.json is not None:
        _writable(args.json, "the JSON file")
    ws = omega_range(model, args)
    progress = args.progress if args.progress is not None else (False if args.quiet else None)
    res = spectrum(model, ws, method=args.method, out=args.out, restart=args.restart, progress=progress,
                   rtol=args.rtol, dps=args.digits, on_error="record" if args.on_error == "record" else "raise",
                   **parallel)
    if args.json is not None:
        write_json(res, args.json, metadata={"source": label, "name": model.name, "kappa": model.kappa,
                                             "hawking_temperature": model.hawking_temperature})
    if not args.quiet:
        print(f"# {model.name or label}: kappa = {model.kappa:.6g}, T_H = {model.hawking_temperature:.6g}, "
              f"method = {args.method}")
        _print_rows(res.rows, model.hawking_temperature)
    where = f" in {args.out}" if args.out else ""
    failed = sum(not r["success"] for r in res.rows)
    print(f"# {len(res.rows)} rows{where} ({res.computed} computed, {res.resumed} from an earlier run"
          f"{f', {failed} failed' if failed else ''})")
    return 0


def _formats(text):
    fmts = [f.strip().lower().lstrip(".") for f in text.split(",") if f.strip()]
    known = {"png", "pdf", "svg", "eps", "jpg", "jpeg", "tif", "tiff", "webp", "ps"}
    bad = [f for f in fmts if f not in known]
    if not fmts or bad:
        raise InputError(f"--formats takes a comma-separated list of {', '.join(sorted(known))}, got {text!r}")
    return fmts


def _save(plotting, fig, stem, formats):
    import matplotlib.pyplot as plt
    try:
        out = plotting.save(fig, stem, formats)
    finally:
        plt.close(fig)
    if isinstance(out, (list, tuple)):
        return [str(p) for p in out]
    return [f"{stem}.{f}" for f in formats]


def _figures_options(p):
    p.add_argument("--omega", type=positive_float, metavar="W",
                   help="frequency of the landscape and dispersion figures (default: omega = kappa)")
    p.add_argument("--x", type=finite_float, nargs="+", metavar="X",
                   help="position(s) of the landscape figures (default: x = -1/kappa and 1/kappa)")
    p.add_argument("--out-dir", default="figures", metavar="DIR", help="where the figures go (default: figures)")
    p.add_argument("--formats", default="png", metavar="LIST", help="comma-separated, e.g. png,pdf (default png)")
    p.add_argument("--table", metavar="FILE.csv",
                   help="draw the spectrum from this table (from 'contourkit spectrum') instead of computing it")
    range_options(p, points=6)
    parallel_options(p)


@command("figures", help="complex-plane landscape, dispersion and spectrum figures", options=_figures_options,
         description="Draw the complex-k landscape of the near-horizon integrand at each --x, the dispersion "
                     "diagram and the spectrum, into --out-dir.")
def run_figures(args):
    """``contourkit figures``: landscapes, dispersion diagrams and spectrum into --out-dir.

    The positions --x are near-horizon coordinates (horizon at x = 0); the
    dispersion diagram at each is drawn for the full profile at x_H + x.
    """
    import matplotlib
    matplotlib.use("Agg")
    from .. import plotting
    from ..symbolic.horizon import HorizonModel
    from ..scans.engine import spectrum
    from ..scans.table import read_table
    model, label = load(args)
    formats = _formats(args.formats)
    parallel = _parallel(args)
    horizon = isinstance(model, HorizonModel)
    if horizon:
        require_horizon(model, label, "figures")
    if args.table is not None and not os.path.isfile(args.table):
        raise InputError(f"no table at {args.table}; give a CSV written by 'contourkit spectrum'")
    out_dir = pathlib.Path(args.out_dir)
    if out_dir.exists() and not out_dir.is_dir():
        raise InputError(f"--out-dir {out_dir} exists and is not a folder")
    out_dir.mkdir(parents=True, exist_ok=True)
    if horizon:
        omega = args.omega if args.omega is not None else float(model.kappa)
        check_frequencies(model, [omega])
        xs = args.x if args.x is not None else [-1 / model.kappa, 1 / model.kappa]
        eq = model.mode_equation(omega)
    else:
        omega, eq = None, model
        xs = args.x if args.x is not None else [-2.0, 2.0]
    far = [x for x in xs if abs(x) > MAX_POSITION]
    if far:
        raise InputError(f"--x {far[0]:g} is too far from the horizon for a figure: give positions with "
                         f"|x| <= {MAX_POSITION:g} (near-horizon coordinates, horizon at x = 0)")
    rep = eq.fourier()
    written = []
    from ..geometry.contours import Contour
    w_title = f", $\\omega = {omega:g}$" if omega is not None else ""
    for x in xs:
        # the real-axis contour, then each basis contour, on its steepest-descent paths
        try:
            fig, _ = plotting.landscape(rep, x, Contour.real_axis(), omega=omega)
        except ContourError:      # the real axis runs into a hill there: the plane without it
            fig, _ = plotting.landscape(rep, x, omega=omega,
                                        title=f"$x = {x:g}${w_title} (real axis diverges)")
        written += _save(plotting, fig, out_dir / f"landscape_x{x:+g}", formats)
        for i, c in enumerate(rep.basis(), start=1):
            fig, _ = plotting.landscape(rep, x, c, omega=omega, title=f"$x = {x:g}${w_title}: $C_{i}$")
            written += _save(plotting, fig, out_dir / f"landscape_x{x:+g}_C{i}", formats)
    if horizon:
        for x in xs:
            fig, _ = plotting.dispersion(model, x=model.horizon + x, omega=omega)
            written += _save(plotting, fig, out_dir / f"dispersion_x{x:+g}", formats)
        rows = (read_table(args.table) if args.table is not None else
                spectrum(model, omega_range(model, args), progress=False, on_error="record", **parallel).rows)
        if not any(r["success"] for r in rows):
            raise CommandFailed("no frequency of the spectrum succeeded; nothing to draw")
        fig, _ = plotting.spectrum(rows, model=model)      # failed rows are left out, the cut-off is marked
        written += _save(plotting, fig, out_dir / "spectrum", formats)
    for p in written:
        print(p)
    return 0


def _check_options(p):
    p.add_argument("--omega", type=positive_float, nargs="+", required=True, metavar="W",
                   help="frequencies to compare")
    p.add_argument("--out", metavar="FILE.csv", help="also write the comparison table as CSV")


@command("check", help="near-horizon result versus the direct full-profile solver", options=_check_options,
         description="Compare the near-horizon contour S-matrix with the direct position-space solver of the "
                     "full profile, one row per frequency.  The model needs uniform asymptotic regions (e.g. a "
                     "tanh profile).")
def run_check(args):
    """``contourkit check``: near-horizon contour method against the direct solver."""
    from ..profiles.comparison import compare
    model, label = load(args)
    require_horizon(model, label, "check", horizonless=True)
    if args.out is not None:
        _writable(args.out, "the table")
    ws = check_frequencies(model, list(args.omega))
    table = compare(model, ws, on_error="record")
    if model.horizon is None:
        return _finish_check(args, table, _print_turning(model, label, table))
    print(f"# {model.name or label}: kappa = {model.kappa:.6g}, T_H = {model.hawking_temperature:.6g}")
    # the column names of docs/vocabulary.md, per method
    print(f"{'omega':>12} {'omega_over':>11} {'temperature':>12} {'temperature':>12} {'rel_diff':>14} "
          f"{'unitarity':>12} {'unitarity':>12}")
    print(f"{'':>12} {'_kappa':>11} {'_ratio':>12} {'_ratio':>12} {'_thermal_ratio':>14} {'_residual':>12} "
          f"{'_residual':>12}")
    print(f"{'':>12} {'':>11} {'contour':>12} {'direct':>12} {'':>14} {'contour':>12} {'direct':>12}")
    for r in table.rows:
        print(f"{r['omega']:12.6g} {r['omega_over_kappa']:11.4f} {_fmt(r['temperature_ratio_contour'], '12.6f')} "
              f"{_fmt(r['temperature_ratio_direct'], '12.6f')} {_fmt(r['rel_diff_thermal_ratio'], '14.2e')} "
              f"{_fmt(r['unitarity_residual_contour'], '12.1e')} {_fmt(r['unitarity_residual_direct'], '12.1e')}")
    notes = _notes(table)
    return _finish_check(args, table, notes)


def _notes(table):
    return [f"omega = {r['omega']:.6g}, {m}: {r[f'message_{m}']}" for r in table.rows for m in ("contour", "direct")
            if not r[f"success_{m}"]]


def _print_turning(model, label, table):
    """The rows of a horizonless model: the blocked mode's reflection and anomalous conversion, both methods."""
    print(f"# {model.name or label}: horizonless flow; contour method at the dispersive turning point "
          f"(linearised there), direct solver on the full profile")
    print(f"{'omega':>12} {'reflection':>12} {'reflection':>12} {'anomalous':>12} {'anomalous':>12} "
          f"{'max_abs':>10} {'unitarity':>12} {'unitarity':>12}")
    print(f"{'':>12} {'_contour':>12} {'_direct':>12} {'_contour':>12} {'_direct':>12} {'_diff_S':>10} "
          f"{'_residual':>12} {'_residual':>12}")
    for r in table.rows:
        print(f"{r['omega']:12.6g} {_fmt(r['reflection_contour'], '12.8f')} {_fmt(r['reflection_direct'], '12.8f')} "
              f"{_fmt(r['anomalous_contour'], '12.2e')} {_fmt(r['anomalous_direct'], '12.2e')} "
              f"{_fmt(r['max_abs_diff_S'], '10.1e')} {_fmt(r['unitarity_residual_contour'], '12.1e')} "
              f"{_fmt(r['unitarity_residual_direct'], '12.1e')}")
    print("# anomalous: |S|^2 of the blocked mode into the opposite norm; the contour method's is the "
          "linearised turning point's, far below the full profile's (docs/limitations.md)")
    return _notes(table)


def _finish_check(args, table, notes):
    for n in notes:
        print(f"# note: {n}")
    if args.out is not None:
        table.to_csv(args.out)
        print(f"# table written to {args.out}")
    if notes:
        raise CommandFailed(f"{len(notes)} of {2 * len(table.rows)} computations did not succeed (see the notes "
                            f"on stdout)")
    return 0



def _greybody_options(p):
    range_options(p, points=12)
    p.add_argument("--k-perp", type=finite_float, default=0.0, metavar="Q",
                   help="transverse wavenumber added to the effective potential (default 0)")
    p.add_argument("--out", metavar="FILE.csv", help="write the table as CSV")
    p.add_argument("--quiet", action="store_true", help="do not print the table")


@command("greybody", help="greybody factor and far-region occupation, to CSV", options=_greybody_options,
         description="The effective potential of the model's long-wavelength equation, its transmission "
                     "Gamma(omega) and the far-region occupation Gamma/(exp(omega/T_eff) - 1) beside the "
                     "near-horizon figures, one row per frequency.  The model needs a uniform exterior "
                     "region (e.g. a tanh profile).")
def run_greybody(args):
    """``contourkit greybody``: greybody factor and far-region occupation on a frequency grid."""
    model, label = load(args)
    require_horizon(model, label, "greybody")
    if args.out is not None:
        _writable(args.out, "the table")
    if args.omega_min is None or args.omega_max is None:
        raise UsageError("give the frequency range: --omega-min A --omega-max B (a transverse wavenumber "
                         "opens the far region only above its threshold, so there is no safe default)")
    if args.points > 1 and not args.omega_max > args.omega_min:
        raise InputError(f"the frequency range is empty or reversed: --omega-min {args.omega_min!r} must be "
                         f"below --omega-max {args.omega_max!r}")
    from ..scans.resumable import omega_grid
    # no cut-off check here: a mass-like term makes the far region's threshold look like a cut-off
    # (modes merge there) although the modes exist above it; frequencies where the near-horizon
    # method fails are recorded rows (method "hawking-temperature", success False)
    ws = omega_grid(args.omega_min, args.omega_max, points=args.points, log=args.log)
    table = model.far_spectrum(ws, k_perp=args.k_perp)
    if not args.quiet:
        T_H = model.hawking_temperature
        print(f"# {model.name or label}: kappa = {model.kappa:.6g}, T_H = {T_H:.6g}, k_perp = {args.k_perp:g}")
        print(f"{'omega':>12} {'omega/T_H':>10} {'|beta|^2':>12} {'greybody':>10} {'occupation_far':>15} "
              f"{'residual':>9}  ok")
        for r in table.rows:
            print(f"{r['omega']:12.6g} {r['omega'] / T_H:10.4f} {_fmt(r['occupation'], '12.5e')} "
                  f"{r['greybody']:10.6f} {_fmt(r['occupation_far'], '15.6e')} {r['greybody_residual']:9.1e}  "
                  f"{'yes' if r['success'] else 'NO: ' + r['message']}")
    if args.out is not None:
        table.to_csv(args.out)
        print(f"# table written to {args.out}")
    return 0


__all__ = ["COMMANDS", "CommandFailed", "omega_range"]


def _modes_options(p):
    p.add_argument("--kind", choices=("unstable", "quasinormal"), default="unstable",
                   help="unstable: complex omega with Im omega > 0 of the full dispersive equation with no "
                        "incoming wave (a horizon pair: the black-hole laser; default); quasinormal: the "
                        "ringing frequencies of the model's long-wavelength effective potential")
    p.add_argument("--omega-max", type=positive_float, metavar="W",
                   help="unstable: right edge Re omega < W of the search box (default: the cavity cut-off)")
    p.add_argument("--im-max", type=positive_float, metavar="G",
                   help="unstable: top Im omega < G of the search box (default from the cavity cut-off)")
    p.add_argument("--n-max", type=positive_int, metavar="N",
                   help="quasinormal: overtones n = 0..N (default 2)")
    p.add_argument("--k-perp", type=finite_float, metavar="Q",
                   help="quasinormal: transverse wavenumber of the effective potential (default 0)")
    p.add_argument("--out", metavar="FILE.csv", help="write the modes as CSV")
    p.add_argument("--figure", metavar="FILE", help="draw the complex-omega plane (and the dominant unstable "
                                                   "mode's profile) into FILE (.png, .pdf or .svg)")
    p.add_argument("--quiet", action="store_true", help="do not print the table")


def _mode_rows(modes, kind):
    rows = []
    for i, md in enumerate(modes):
        w = complex(md.omega)
        err = getattr(md, "error_estimate", getattr(md, "error", None))
        rows.append({"index": i if kind == "unstable" else getattr(md, "overtone", i),
                     "omega_real": w.real, "omega_imag": w.imag,
                     "residual": float(md.residual), "error": None if err is None else float(err)})
    return rows


@command("modes", help="complex frequencies: unstable modes or quasinormal modes, to CSV", options=_modes_options,
         description="Search the complex frequency plane of a model: the unstable modes of the full dispersive "
                     "equation (Im omega > 0, no incoming wave on either side; found by the argument principle "
                     "on the direct solver's system, with deflation) or the quasinormal modes of the "
                     "long-wavelength effective potential (outgoing at both ends).")
def run_modes(args):
    """``contourkit modes``: a table (and a figure) of the complex frequencies of a model."""
    model, label = load(args)
    require_horizon(model, label, "modes")
    for path, what in ((args.out, "the table"), (args.figure, "the figure")):
        if path is not None:
            _writable(path, what)
    if args.figure is not None and pathlib.Path(args.figure).suffix.lower() not in (".png", ".pdf", ".svg"):
        raise UsageError(f"--figure {args.figure!r}: give a file name ending in .png, .pdf or .svg")
    given = {"--n-max": args.n_max, "--k-perp": args.k_perp, "--omega-max": args.omega_max,
             "--im-max": args.im_max}
    foreign = [o for o in (("--n-max", "--k-perp") if args.kind == "unstable" else ("--omega-max", "--im-max"))
               if given[o] is not None]
    if foreign:
        raise UsageError(f"{foreign[0]} does not apply to --kind {args.kind}; leave it out, or choose the other "
                         f"--kind")
    if args.kind == "unstable":
        from ..profiles.unstable import unstable_modes
        modes = unstable_modes(model, omega_max=args.omega_max, im_max=args.im_max)
    else:
        pot = model.effective_potential(k_perp=args.k_perp or 0.0)
        if not hasattr(pot, "quasinormal_modes"):
            raise InputError(f"the effective potential of {label} offers no quasinormal-mode search in this "
                             f"version; use ck.greybody.potential(V, x) with its V(x*)")
        modes = pot.quasinormal_modes(n_max=args.n_max or 2)
    rows = _mode_rows(modes, args.kind)
    message = getattr(modes, "message", "")
    if not args.quiet:
        print(f"# {model.name or label}: {args.kind} modes; {message}")
        print(f"{'n':>3} {'Re omega':>14} {'Im omega':>14} {'residual':>9} {'error':>9}")
        for r in rows:
            print(f"{r['index']:3d} {r['omega_real']:14.8g} {r['omega_imag']:14.8g} {r['residual']:9.1e} "
                  f"{_fmt(r['error'], '9.1e')}")
    if args.out is not None:
        from ..scattering.results import RowTable
        RowTable(rows).to_csv(args.out)
        print(f"# table written to {args.out}")
    if args.figure is not None:
        from .. import plotting
        if args.kind == "unstable" and len(modes):
            fig, _ = plotting.modes_figure(modes, horizons=_horizon_pair_positions(model))
        else:
            fig, _ = plotting.mode_plane(modes)
        fig.savefig(args.figure, dpi=300)
        print(f"# figure written to {args.figure}")
    return 0


def _horizon_pair_positions(model):
    white = getattr(model, "white_horizon", None)
    return None if white is None else (float(white), float(model.horizon))
