"""The ``contourkit`` command line (also ``python -m contourkit``).

Commands: ``derive`` (the derived k-space equation and constants of a model),
``spectrum`` (a resumable, parallel frequency scan to CSV/JSON), ``figures``
(landscape, dispersion and spectrum figures) and ``check`` (near-horizon
contour method against the direct full-profile solver).  Run
``contourkit --help`` and ``contourkit COMMAND --help`` for the options.

Errors in the input (a missing or malformed model file, a bad option, an
unwritable output path, ...) end the command with exit code 2 (usage) or 1
(everything else) and one line on stderr, ``contourkit: error: ...``; with
``--debug`` the traceback is shown instead.  An error that contourkit did not
foresee is reported in the same single line (with its type, and the advice to
rerun with ``--debug``), never as a Python traceback.

The subcommands are declared in one table (:mod:`contourkit.cli.registry`);
:mod:`contourkit.cli.commands` declares the four above.
"""
import sys
import warnings

from ..errors import ContourkitError
from .commands import CommandFailed
from .parser import build_parser
from .registry import COMMANDS
from .source import UsageError

__all__ = ["main", "build_parser"]


def _one_line(exc):
    if isinstance(exc, OSError) and exc.strerror:
        text = f"{exc.strerror}: {exc.filename}" if exc.filename else exc.strerror
    else:
        text = str(exc) or type(exc).__name__
    return " ".join(text.split())


def _fail(message, code):
    print(f"contourkit: error: {message}", file=sys.stderr)
    return code


def main(argv=None):
    """Run the command line.

    Parameters
    ----------
    argv : list of str, optional
        The arguments (default: ``sys.argv[1:]``).

    Returns
    -------
    int
        The exit code: 0 on success, 1 for a failed command or bad input,
        2 for a command line that cannot be parsed, 130 when interrupted.
    """
    argv = list(sys.argv[1:] if argv is None else argv)
    debug = "--debug" in argv
    parser = build_parser()
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("default")
        try:
            args = parser.parse_args(argv)
            if args.command is None:
                raise UsageError(f"give a command: {', '.join(COMMANDS)} (see 'contourkit --help')")
            code = COMMANDS[args.command].run(args)
        except UsageError as exc:
            return _fail(_one_line(exc), 2)
        except KeyboardInterrupt:
            return _fail("interrupted; rows already written are kept, and running the same command again "
                         "resumes a spectrum scan", 130)
        except BrokenPipeError:
            return 0
        except CommandFailed as exc:
            return _fail(_one_line(exc), 1)
        except (ContourkitError, OSError, ValueError) as exc:
            if debug:
                raise
            return _fail(_one_line(exc), 1)
        except Exception as exc:            # not foreseen: still one line, the traceback with --debug
            if debug:
                raise
            return _fail(f"unexpected {type(exc).__name__}: {_one_line(exc)} (run again with --debug for the "
                         f"traceback, and please report it)", 1)
    for text in dict.fromkeys(f"{w.category.__name__}: {w.message}" for w in caught):
        print(f"contourkit: warning: {' '.join(text.split())}", file=sys.stderr)
    return code
