"""Registry through which upper layers provide convenience methods of lower-layer objects.

The symbolic layer's objects (:class:`~contourkit.symbolic.horizon.HorizonModel`,
:class:`~contourkit.symbolic.kspace.KSpaceRepresentation`) offer methods such as
``model.scatter(omega)`` or ``rep.evaluate(contour, x)`` whose work is done by the
scattering, geometry and evaluation layers.  Importing those layers here would
make data flow both ways, so the dependency is inverted: each upper layer calls
:func:`provide` when it is imported (the package's front door imports every
layer), and the lower method calls :func:`call`.

Examples
--------
>>> from contourkit.symbolic import extensions
>>> "scatter" in extensions.provided()
True
"""
from ..errors import ContourkitError

_PROVIDERS = {}
_LOADERS = []


def provide(name, func):
    """Register `func` as the implementation of the convenience method `name`."""
    _PROVIDERS[name] = func
    return func


def add_loader(func):
    """Register a callable that imports optional layers on first use (set by the front door)."""
    _LOADERS.append(func)


def provided():
    """Names of the methods registered so far."""
    return sorted(_PROVIDERS)


def lookup(name):
    """The registered implementation of `name`; runs the loaders once if it is missing."""
    if name not in _PROVIDERS:
        for load in list(_LOADERS):
            load(name)
    try:
        return _PROVIDERS[name]
    except KeyError:
        raise ContourkitError(f"the method {name!r} is provided by a layer of contourkit that is not "
                              f"loaded; import contourkit (the package) before calling it") from None


def call(name, *args, **kwargs):
    """Call the registered implementation of `name`."""
    return lookup(name)(*args, **kwargs)
