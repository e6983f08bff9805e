"""The argument parser of the ``contourkit`` command line."""
import argparse
import math

from .source import UsageError

DESCRIPTION = """\
contourkit: exact near-horizon mode solutions and Bogoliubov coefficients from model files.

A model is a TOML model file (docs/model-files.md), a shipped example (--example NAME)
or a catalogue model (--catalogue NAME --param KEY=VALUE ...).  Conventions:
phi ~ exp(-i omega t + i k x), horizon at x = 0, exterior x > 0, T_H = kappa/(2 pi).
"""

EPILOG = """\
examples:
  contourkit derive --example quartic_superluminal --latex
  contourkit spectrum MODEL.toml --omega-min 0.004 --omega-max 0.06 --points 12 --out spectrum.csv
  contourkit figures MODEL.toml --omega 0.02 --x -20 20 --out-dir figures
  contourkit check --example quartic_superluminal --omega 0.01 0.03
  contourkit greybody MODEL.toml --omega-min 0.004 --omega-max 0.05 --points 8 --k-perp 0.01 --out far.csv
Run 'contourkit COMMAND --help' for the options of each command.
"""


class Parser(argparse.ArgumentParser):
    """An ArgumentParser whose usage errors become one-line :class:`UsageError` exceptions."""

    def error(self, message):
        raise UsageError(f"{message} (see '{self.prog} --help')")


def _number(text, what):
    try:
        v = float(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"{what}, got {text!r}") from None
    if not math.isfinite(v):
        raise argparse.ArgumentTypeError(f"{what}, got {text!r}")
    return v


def positive_float(text):
    """A finite number > 0 (frequencies)."""
    v = _number(text, "must be a positive number")
    if v <= 0:
        raise argparse.ArgumentTypeError(f"must be a positive number (frequencies are > 0), got {text!r}")
    return v


def finite_float(text):
    """A finite number (positions)."""
    return _number(text, "must be a finite number")


def positive_int(text):
    """An integer >= 1."""
    try:
        v = int(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"must be a positive integer, got {text!r}") from None
    if v < 1:
        raise argparse.ArgumentTypeError(f"must be a positive integer (at least 1), got {text!r}")
    return v


def _common():
    p = Parser(add_help=False)
    g = p.add_argument_group("model (give one)")
    g.add_argument("model", nargs="?", metavar="MODEL.toml", help="a model file (docs/model-files.md)")
    g.add_argument("--example", metavar="NAME",
                   help="a model file shipped with contourkit: quartic_superluminal, airy")
    g.add_argument("--catalogue", metavar="NAME",
                   help="a ready model of contourkit.catalogue: quartic_flow, nondispersive_flow, "
                        "dielectric_front")
    g.add_argument("--param", action="append", metavar="KEY=VALUE",
                   help="a parameter of the --catalogue model (repeatable), e.g. --param branch=subluminal")
    p.add_argument("--debug", action="store_true", help="show the full traceback of any error")
    return p


def _range_options(p, *, points):
    p.add_argument("--omega-min", type=positive_float, metavar="A",
                   help="lowest frequency (default: T_H/2)")
    p.add_argument("--omega-max", type=positive_float, metavar="B",
                   help="highest frequency (default: 8 T_H, kept below the model's cut-off)")
    p.add_argument("--points", type=positive_int, default=points, metavar="N",
                   help=f"number of frequencies (default {points})")
    p.add_argument("--log", action="store_true", help="geometric spacing of the frequencies")


def _parallel_options(p):
    p.add_argument("--workers", type=positive_int, metavar="N",
                   help="local worker processes (default: all cores)")
    p.add_argument("--scheduler", metavar="ADDRESS",
                   help="run on an existing Dask cluster, e.g. tcp://host:8786 (needs contourkit[dask])")


def build_parser():
    """The parser with its commands: derive, spectrum, figures, check, greybody.

    Returns
    -------
    Parser
    """
    common = _common()
    top = Parser(prog="contourkit", description=DESCRIPTION, epilog=EPILOG,
                 formatter_class=argparse.RawDescriptionHelpFormatter)
    from .._version import __version__
    top.add_argument("--version", action="version", version=f"contourkit {__version__}")
    sub = top.add_subparsers(dest="command", metavar="COMMAND", parser_class=Parser)

    p = sub.add_parser("derive", parents=[common], help="print the derived k-space equation and constants",
                       description="Print the dispersion relation, horizon, kappa, T_H and cut-off of a model "
                                   "and, at one frequency, the near-horizon ODE, its k-space equation, the "
                                   "closed-form exponent, the branch points with their exponents and the "
                                   "valleys at infinity.")
    p.add_argument("--omega", type=positive_float, metavar="W",
                   help="frequency of the near-horizon equation (default: omega = kappa)")
    p.add_argument("--latex", action="store_true", help="print LaTeX (an align* block) instead of text")

    p = sub.add_parser("spectrum", parents=[common], help="Hawking spectrum over a frequency range, to CSV",
                       description="Compute |beta|^2, |beta/alpha|^2, T_eff/T_H and the pseudo-unitarity "
                                   "residual on a frequency grid.  Rows are written to --out as they finish; "
                                   "running the same command again resumes an interrupted scan.")
    _range_options(p, points=12)
    p.add_argument("--out", metavar="FILE.csv", help="the table (written row by row; resumed if it exists)")
    p.add_argument("--json", metavar="FILE.json", help="also write the finished table as JSON")
    _parallel_options(p)
    p.add_argument("--digits", type=positive_int, metavar="N",
                   help="correct significant digits of each S-matrix (default 16)")
    p.add_argument("--on-error", choices=("stop", "record"), default="stop",
                   help="a failing frequency stops the scan (default) or is recorded as a failed row")
    p.add_argument("--progress", action=argparse.BooleanOptionalAction, default=None,
                   help="progress bar on stderr (default: when stderr is a terminal; needs tqdm)")
    p.add_argument("--quiet", action="store_true", help="do not print the table")

    p = sub.add_parser("figures", parents=[common], help="complex-plane landscape, dispersion and spectrum figures",
                       description="Draw the complex-k landscape of the near-horizon integrand at each --x, "
                                   "the dispersion diagram and the spectrum, into --out-dir.")
    p.add_argument("--omega", type=positive_float, metavar="W",
                   help="frequency of the landscape and dispersion figures (default: omega = kappa)")
    p.add_argument("--x", type=finite_float, nargs="+", metavar="X",
                   help="position(s) of the landscape figures (default: x = -1/kappa and 1/kappa)")
    p.add_argument("--out-dir", default="figures", metavar="DIR", help="where the figures go (default: figures)")
    p.add_argument("--formats", default="png", metavar="LIST", help="comma-separated, e.g. png,pdf (default png)")
    p.add_argument("--table", metavar="FILE.csv",
                   help="draw the spectrum from this table (from 'contourkit spectrum') instead of computing it")
    _range_options(p, points=6)
    _parallel_options(p)

    p = sub.add_parser("check", parents=[common], help="near-horizon result versus the direct full-profile solver",
                       description="Compare the near-horizon contour S-matrix with the direct position-space "
                                   "solver of the full profile, one row per frequency.  The model needs "
                                   "uniform asymptotic regions (e.g. a tanh profile).")
    p.add_argument("--omega", type=positive_float, nargs="+", required=True, metavar="W",
                   help="frequencies to compare")
    p.add_argument("--out", metavar="FILE.csv", help="also write the comparison table as CSV")

    p = sub.add_parser("greybody", parents=[common], help="greybody factor and far-region occupation, to CSV",
                       description="The effective potential of the model's long-wavelength equation, its "
                                   "transmission Gamma(omega) and the far-region occupation "
                                   "Gamma/(exp(omega/T_eff) - 1) beside the near-horizon figures, one row per "
                                   "frequency.  The model needs a uniform exterior region (e.g. a tanh profile).")
    _range_options(p, points=12)
    p.add_argument("--k-perp", type=finite_float, default=0.0, metavar="Q",
                   help="transverse wavenumber added to the effective potential (default 0)")
    p.add_argument("--out", metavar="FILE.csv", help="write the table as CSV")
    p.add_argument("--quiet", action="store_true", help="do not print the table")
    return top
