"""The commands of the ``contourkit`` command line: derive, spectrum, figures, check, greybody."""
import os
import pathlib

from ..errors import InputError
from .source import UsageError, check_frequencies, load, require_horizon


class CommandFailed(Exception):
    """A command ran but could not do all it was asked (one-line message, exit code 1)."""


def _fmt(v, spec=".4e"):
    return "-" if v is None else format(v, spec)


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


def run_derive(args):
    """``contourkit derive``: print the derivation (text or LaTeX)."""
    from .derive import report
    model, _ = load(args)
    print(report(model, omega=args.omega, latex=args.latex), end="")
    return 0


def _print_rows(rows, T_H):
    print(f"{'omega':>12} {'omega/T_H':>10} {'|beta|^2':>12} {'|beta/alpha|^2':>15} {'T_eff/T_H':>10} "
          f"{'unitarity':>10}  ok")
    for r in rows:
        w = r["omega"]
        print(f"{w:12.6g} {w / T_H:10.4f} {_fmt(r['occupation'], '12.5e')} {_fmt(r['thermal_ratio'], '15.6e')} "
              f"{_fmt(r['temperature_ratio'], '10.6f')} {_fmt(r['unitarity_residual'], '10.1e')}  "
              f"{'yes' if r['success'] else 'NO: ' + (r['message'] or '')}")


def _parallel(args):
    if args.scheduler is not None and args.workers is not None:
        raise UsageError("--workers and --scheduler exclude each other (a Dask cluster has its own workers)")
    return {"workers": args.workers, "scheduler": args.scheduler}


def run_spectrum(args):
    """``contourkit spectrum``: a resumable scan to CSV (and JSON)."""
    from ..scans.resumable import scan, write_json
    model, label = load(args)
    require_horizon(model, label, "spectrum")
    parallel = _parallel(args)
    if args.out is not None:
        _writable(args.out, "the table")
    if args.json is not None:
        _writable(args.json, "the JSON file")
    ws = omega_range(model, args)
    res = scan(model, ws, out=args.out, progress=args.progress, dps=args.digits, on_error=args.on_error,
               **parallel)
    if args.json is not None:
        write_json(res, args.json, metadata={"source": label, "name": model.name, "kappa": model.kappa,
                                             "hawking_temperature": model.hawking_temperature})
    if not args.quiet:
        print(f"# {model.name or label}: kappa = {model.kappa:.6g}, T_H = {model.hawking_temperature:.6g}")
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


def run_figures(args):
    """``contourkit figures``: landscapes, dispersion diagrams and spectrum into --out-dir.

    The positions --x are near-horizon coordinates (horizon at x = 0); the
    dispersion diagram at each is drawn for the full profile at x_H + x.
    """
    import matplotlib
    matplotlib.use("Agg")
    from .. import plotting
    from ..symbolic.horizon import HorizonModel
    from ..scans.resumable import read_table, scan
    model, label = load(args)
    formats = _formats(args.formats)
    parallel = _parallel(args)
    horizon = isinstance(model, HorizonModel)
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
    rep = eq.fourier()
    written = []
    for x in xs:
        fig, _ = plotting.landscape(rep, x)
        written += _save(plotting, fig, out_dir / f"landscape_x{x:+g}", formats)
    if horizon:
        for x in xs:
            fig, _ = plotting.dispersion(model, x=model.horizon + x, omega=omega)
            written += _save(plotting, fig, out_dir / f"dispersion_x{x:+g}", formats)
        rows = (read_table(args.table) if args.table is not None else
                scan(model, omega_range(model, args), progress=False, on_error="record", **parallel).rows)
        rows = [r for r in rows if r["success"]]
        if not rows:
            raise CommandFailed("no frequency of the spectrum succeeded; nothing to draw")
        fig, _ = plotting.spectrum(rows)
        written += _save(plotting, fig, out_dir / "spectrum", formats)
    for p in written:
        print(p)
    return 0


def run_check(args):
    """``contourkit check``: near-horizon contour method against the direct solver."""
    from ..profiles.comparison import compare
    model, label = load(args)
    require_horizon(model, label, "check")
    if args.out is not None:
        _writable(args.out, "the table")
    ws = check_frequencies(model, list(args.omega))
    table = compare(model, ws, on_error="record")
    print(f"# {model.name or label}: kappa = {model.kappa:.6g}, T_H = {model.hawking_temperature:.6g}")
    print(f"{'omega':>12} {'omega/kappa':>11} {'T_eff/T_H':>10} {'T_eff/T_H':>10} {'rel. diff':>10} "
          f"{'unitarity':>10} {'unitarity':>10}")
    print(f"{'':>12} {'':>11} {'contour':>10} {'direct':>10} {'|b/a|^2':>10} {'contour':>10} {'direct':>10}")
    notes = []
    for r in table.rows:
        print(f"{r['omega']:12.6g} {r['omega_over_kappa']:11.4f} {_fmt(r['temperature_ratio_contour'], '10.6f')} "
              f"{_fmt(r['temperature_ratio_direct'], '10.6f')} {_fmt(r['rel_diff_thermal_ratio'], '10.2e')} "
              f"{_fmt(r['unitarity_residual_contour'], '10.1e')} {_fmt(r['unitarity_residual_direct'], '10.1e')}")
        for m in ("contour", "direct"):
            if not r[f"success_{m}"]:
                notes.append(f"omega = {r['omega']:.6g}, {m}: {r[f'message_{m}']}")
    for n in notes:
        print(f"# note: {n}")
    if args.out is not None:
        table.to_csv(args.out)
        print(f"# table written to {args.out}")
    if notes:
        raise CommandFailed(f"{len(notes)} of {2 * len(table.rows)} computations did not succeed (see the notes "
                            f"on stdout)")
    return 0


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


COMMANDS = {"derive": run_derive, "spectrum": run_spectrum, "figures": run_figures, "check": run_check,
            "greybody": run_greybody}
