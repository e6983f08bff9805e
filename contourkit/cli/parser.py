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
  contourkit spectrum --example quartic_superluminal --points 100 --workers 2 --out s.csv --restart
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


def tolerance(text):
    """A relative tolerance: a number strictly between 0 and 1."""
    v = _number(text, "must be a number between 0 and 1, e.g. 1e-10")
    if not 0 < v < 1:
        raise argparse.ArgumentTypeError(f"must be a number between 0 and 1 (exclusive), e.g. 1e-10, got {text!r}")
    return v


def positive_int(text):
    """An integer >= 1."""
    try:
        v = int(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"must be a positive integer, got {text!r}") from None
    if v < 1:
        raise argparse.ArgumentTypeError(f"must be a positive integer (at least 1), got {text!r}")
    return v


def common_options():
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


def range_options(p, *, points):
    p.add_argument("--omega-min", type=positive_float, metavar="A",
                   help="lowest frequency (default: T_H/2)")
    p.add_argument("--omega-max", type=positive_float, metavar="B",
                   help="highest frequency (default: 8 T_H, kept below the model's cut-off)")
    p.add_argument("--points", type=positive_int, default=points, metavar="N",
                   help=f"number of frequencies (default {points})")
    p.add_argument("--log", action="store_true", help="geometric spacing of the frequencies")


def parallel_options(p):
    p.add_argument("--workers", type=positive_int, metavar="N",
                   help="local worker processes (default: all cores); they end with this command")
    p.add_argument("--scheduler", metavar="ADDRESS",
                   help="run on an existing Dask cluster, e.g. tcp://host:8786 (needs contourkit[dask])")


def build_parser():
    """The parser with every subcommand of :data:`contourkit.cli.registry.COMMANDS`.

    Returns
    -------
    Parser
    """
    from .registry import COMMANDS
    common = common_options()
    top = Parser(prog="contourkit", description=DESCRIPTION, epilog=EPILOG,
                 formatter_class=argparse.RawDescriptionHelpFormatter)
    from .._version import __version__
    top.add_argument("--version", action="version", version=f"contourkit {__version__}")
    sub = top.add_subparsers(dest="command", metavar="COMMAND", parser_class=Parser)
    for cmd in COMMANDS.values():
        p = sub.add_parser(cmd.name, parents=[common] if cmd.model else [], help=cmd.help,
                           description=cmd.description)
        if not cmd.model:
            p.add_argument("--debug", action="store_true", help="show the full traceback of any error")
        cmd.options(p)
    return top
