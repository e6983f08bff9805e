"""The command table of the ``contourkit`` command line: one declaration per subcommand.

A subcommand is declared once, with :func:`command`, next to the function that
runs it::

    @command("spectrum", help="...", description="...", options=spectrum_options)
    def run_spectrum(args): ...

``options(parser)`` adds the subcommand's own arguments (the model arguments
and ``--debug`` are added to every command that takes a model).  The parser
(:func:`contourkit.cli.parser.build_parser`) and the dispatcher
(:func:`contourkit.cli.main`) read :data:`COMMANDS`; a new subcommand needs
nothing else than its declaration in a module that ``contourkit.cli``
imports.
"""
from dataclasses import dataclass
from typing import Callable


@dataclass(frozen=True)
class Command:
    """One subcommand: its name, how it is run, its options and its help texts."""
    name: str
    run: Callable
    options: Callable
    help: str
    description: str
    model: bool = True


#: the subcommands in the order of ``contourkit --help``
COMMANDS = {}


def command(name, *, help, description, options, model=True):
    """Declare a subcommand (a decorator of its run function ``run(args) -> exit code``)."""
    def register(run):
        COMMANDS[name] = Command(name=name, run=run, options=options, help=help, description=description,
                                 model=model)
        return run
    return register


__all__ = ["Command", "COMMANDS", "command"]
