"""Which model a command works on: a model file, a shipped example or a catalogue function."""
import inspect
import math

from ..errors import InputError


class UsageError(Exception):
    """A command line that cannot be run as written (reported in one line, exit code 2)."""


def catalogue_functions():
    """The ready models of :mod:`contourkit.catalogue`, by name.

    Returns
    -------
    dict of str to callable
    """
    from .. import catalogue
    return {name: fn for name, fn in inspect.getmembers(catalogue, inspect.isfunction)
            if fn.__module__ == catalogue.__name__ and not name.startswith("_")}


def _value(text):
    low = text.strip().lower()
    if low in ("true", "false"):
        return low == "true"
    if low in ("none", ""):
        return None
    try:
        return int(text)
    except ValueError:
        pass
    try:
        v = float(text)
    except ValueError:
        return text.strip()
    if not math.isfinite(v):
        raise InputError(f"the parameter value {text!r} is not a finite number")
    return v


def parse_params(items):
    """``["kappa=0.05", "branch=subluminal"]`` -> ``{"kappa": 0.05, "branch": "subluminal"}``."""
    out = {}
    for item in items or ():
        name, sep, text = item.partition("=")
        if not sep or not name.strip():
            raise UsageError(f"--param takes NAME=VALUE (e.g. --param kappa=0.05), got {item!r}")
        out[name.strip()] = _value(text)
    return out


def _from_catalogue(name, params):
    funcs = catalogue_functions()
    if name not in funcs:
        raise InputError(f"no catalogue model {name!r}; the catalogue has {', '.join(sorted(funcs))}")
    sig = inspect.signature(funcs[name])
    allowed = [p for p in sig.parameters]
    for key in params:
        if key not in allowed:
            raise InputError(f"unknown parameter {key!r} for the catalogue model {name}; its parameters are "
                             f"{', '.join(allowed)}")
    try:
        return funcs[name](**params)
    except TypeError as exc:
        raise InputError(f"the catalogue model {name} does not take these parameters ({exc})") from None


def load(args):
    """The model named on the command line.

    Parameters
    ----------
    args : argparse.Namespace
        With ``model`` (a path or None), ``example``, ``catalogue`` and ``param``.

    Returns
    -------
    (model, label)
        A HorizonModel or ModeEquation, and how it was named (for messages
        and table metadata).
    """
    from ..symbolic.modelfile import example_path, load_model
    given = [v for v in (args.model, args.example, args.catalogue) if v is not None]
    if len(given) != 1:
        raise UsageError("give exactly one model: a model file MODEL.toml, --example NAME or --catalogue NAME"
                         if given else "no model given: name a model file MODEL.toml, or use --example NAME "
                         "or --catalogue NAME")
    if args.param and args.catalogue is None:
        raise UsageError("--param sets parameters of a --catalogue model; a model file sets its own "
                         "in [parameters]")
    if args.catalogue is not None:
        return _from_catalogue(args.catalogue, parse_params(args.param)), f"catalogue:{args.catalogue}"
    if args.example is not None:
        path = example_path(args.example)
        return load_model(path), f"example:{args.example}"
    return load_model(args.model), str(args.model)


def require_horizon(model, label, command, *, horizonless=False):
    """Refuse an equation without a horizon for commands that need one (and a horizonless flow unless allowed)."""
    from ..symbolic.horizon import HorizonModel
    if not isinstance(model, HorizonModel):
        raise InputError(f"{label} is a single mode equation without a horizon (kind = \"ode\" without "
                         f"[profiles]); '{command}' needs a horizon model (a dispersion relation, or an ODE "
                         f"with [profiles]); 'contourkit derive' works on it")
    if model.horizon is None and not horizonless:
        raise InputError(f"{label} is a horizonless flow ([horizon] position = \"none\"): it has no Hawking "
                         f"spectrum, so '{command}' does not apply; 'contourkit check {label} --omega W ...' "
                         f"compares its S-matrix at the dispersive turning point with the direct solver, and "
                         f"'contourkit derive {label} --omega W' lists its turning points")
    return model


def check_frequencies(model, omegas):
    """Every frequency below the model's cut-off (when it has one; a horizonless flow has none)."""
    if getattr(model, "horizon", 0) is None:
        # above the far threshold of its faster side a horizonless flow blocks the wave: no cut-off
        return omegas
    cut = model.omega_max
    if cut is not None:
        over = [w for w in omegas if w >= cut]
        if over:
            raise InputError(f"omega = {over[0]!r} is at or above the cut-off omega_max = {cut:.6g} of this "
                             f"model, where the dispersive modes stop existing; choose frequencies below it")
    return omegas
