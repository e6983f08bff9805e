"""Former module path, kept for users' imports: its contents live in :mod:`contourkit.evaluation.asymptotics`."""
from .evaluation import asymptotics as _moved
from .evaluation.asymptotics import *  # noqa: F401,F403


def __getattr__(name):
    return getattr(_moved, name)
