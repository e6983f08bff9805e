"""Former module path, kept for users' imports: its contents live in :mod:`contourkit.symbolic.kspace`."""
from .symbolic import kspace as _moved
from .symbolic.kspace import *  # noqa: F401,F403


def __getattr__(name):
    return getattr(_moved, name)
