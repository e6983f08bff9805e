"""Former module path, kept for users' imports: its contents live in :mod:`contourkit.scattering.modes`."""
from .scattering import modes as _moved
from .scattering.modes import *  # noqa: F401,F403


def __getattr__(name):
    return getattr(_moved, name)
