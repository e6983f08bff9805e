"""Model files: a TOML description of a mode equation, loaded without eval.

A model file names the kind of model, its equation as a quoted expression, its
numeric parameters, its profile functions and, optionally, where the horizon
is.  Every expression goes through the whitelist parser
:func:`contourkit.symbolic.safeparse.parse_expression`; every key and value is checked,
and a mistake is reported as a :class:`~contourkit.errors.ModelFileError`
naming the file, the section and the key.  The format is described in
``docs/model-files.md``; two examples ship with the package (see
:func:`example_path`).

Examples
--------
>>> import contourkit as ck
>>> m = ck.load_model(example_path("quartic_superluminal"))
>>> m.horizon, m.kappa
(0.0, 0.05)
"""
import difflib
import importlib.resources
import keyword
import math
import os
import pathlib
import re

try:
    import tomllib
except ModuleNotFoundError:  # pragma: no cover - Python < 3.11
    import tomli as tomllib

import mpmath
import sympy as sp

from ._sym import exact
from ..errors import ContourkitError, HorizonError, InputError, ModelFileError, ModelFileHorizonError
from .horizon import HorizonModel
from .equation import ModeEquation
from .safeparse import CONSTANTS, FUNCTIONS, MAX_EXPONENT, parse_expression

MAX_FILE_BYTES = 100_000
KINDS = ("dispersion", "ode")
SECTIONS = {"model": ("name", "kind", "equation", "description"), "parameters": None,
            "profiles": None, "horizon": ("position", "window")}
RESERVED = frozenset({"x", "k", "omega", "y", "der", *CONSTANTS, *FUNCTIONS})
_NAME = re.compile(r"[A-Za-z][A-Za-z0-9_]{0,31}\Z")
_X, _K, _W = sp.symbols("x k omega")
_Y = sp.Function("y")


def _describe(value):
    """How a TOML value is called in a message."""
    if isinstance(value, bool):
        return f"the boolean {str(value).lower()}"
    if isinstance(value, str):
        return f"the string {value[:40]!r}"
    if isinstance(value, (int, float)):
        return f"the number {value!r}"
    kinds = {list: "a list", dict: "a table"}
    return kinds.get(type(value), f"a {type(value).__name__} value")


def _unknown(key, allowed, where):
    close = difflib.get_close_matches(key, list(allowed), n=1)
    hint = f" (did you mean '{close[0]}'?)" if close else ""
    return f"unknown {where} '{key}'{hint}; the allowed ones are {', '.join(allowed)}"


class _File:
    """The path of the file being read, for messages."""

    def __init__(self, path):
        self.path = path

    def fail(self, msg):
        raise ModelFileError(f"{self.path}: {msg}")

    def read(self):
        p = self.path
        if not p.exists():
            raise ModelFileError(f"no model file at {p} (the path does not exist); check the name and the "
                                 f"working directory, or use contourkit.symbolic.modelfile.example_path(...)")
        if not p.is_file():
            raise ModelFileError(f"{p} is not a file; give the path of a .toml model file")
        try:
            size = p.stat().st_size
            if size > MAX_FILE_BYTES:
                self.fail(f"the file has {size} bytes, more than the {MAX_FILE_BYTES} a model file may have")
            raw = p.read_bytes()
        except OSError as exc:
            raise ModelFileError(f"cannot read the model file {p}: {exc.strerror or exc}") from None
        try:
            text = raw.decode("utf-8")
        except UnicodeDecodeError as exc:
            self.fail(f"the file is not UTF-8 text (bad byte at position {exc.start}); save it as UTF-8")
        try:
            data = tomllib.loads(text)
        except tomllib.TOMLDecodeError as exc:
            self.fail(f"not valid TOML: {exc}. Strings need quotes (equation = \"...\"), each key goes on its "
                      f"own line as key = value, and sections are written [model]")
        if not data:
            self.fail("the file is empty; a model file needs at least a [model] section with kind and equation "
                      "(see docs/model-files.md or contourkit.symbolic.modelfile.example_path('airy'))")
        return data

    # -- tables and values -------------------------------------------
    def table(self, data, name, *, required=False):
        if name not in data:
            if required:
                self.fail(f"the [{name}] section is missing; it needs kind = \"dispersion\" or \"ode\" and "
                          f"equation = \"...\"")
            return {}
        t = data[name]
        if not isinstance(t, dict):
            self.fail(f"'{name}' must be a section [{name}], got {_describe(t)}")
        allowed = SECTIONS[name]
        for key in t:
            if allowed is not None and key not in allowed:
                self.fail(_unknown(key, allowed, f"key in [{name}]:"))
        return t

    def string(self, table, key, section, *, required=False):
        if key not in table:
            if required:
                value = '"dispersion" or "ode"' if key == "kind" else '"..."'
                self.fail(f"[{section}] has no '{key}'; add {key} = {value}")
            return None
        v = table[key]
        if not isinstance(v, str):
            self.fail(f"[{section}] {key} must be a quoted string, got {_describe(v)}")
        return v

    def number(self, value, where):
        if isinstance(value, bool) or not isinstance(value, (int, float)):
            self.fail(f"{where} must be a number, got {_describe(value)}; write e.g. 0.5 without quotes "
                      f"(TOML numbers; expressions are allowed only in [profiles] and the equation)")
        try:
            ok = math.isfinite(float(value)) and abs(value) <= 1e300
        except OverflowError:
            ok = False
        if not ok:
            self.fail(f"{where} must be a finite number of magnitude <= 1e300, got {value!r}")
        return value

    def name(self, key, where):
        if not _NAME.match(key) or keyword.iskeyword(key):
            self.fail(f"{where} name '{key}' is not usable in expressions; names start with a letter, use "
                      f"letters, digits and _ (at most 32 characters) and are not Python keywords "
                      f"(write Lambda, not lambda)")
        if key in RESERVED:
            self.fail(f"{where} name '{key}' is reserved (x, k, omega, y, der, the constants pi, E, I and "
                      f"the function names); rename it")
        return key

    def expression(self, text, symbols, where, values, *, outside=(), why=""):
        """Parse `text`; the symbols in `outside` may not appear inside functions or non-integer powers."""
        try:
            expr = parse_expression(text, symbols=symbols)
        except ModelFileError as exc:
            self.fail(f"{where}: {exc}")
        _check_exponents(self, expr, values, where)
        for node in sp.preorder_traversal(expr):
            inner = (isinstance(node, sp.Function) and not isinstance(node, sp.core.function.AppliedUndef)) \
                or (isinstance(node, sp.Pow) and not node.exp.is_Integer)
            bad = [str(s) for s in outside if inner and node.has(s)]
            if bad:
                self.fail(f"{where}: {bad[0]} appears inside '{str(node)[:60]}'; {why}")
        return expr


def _check_exponents(src, expr, values, where):
    """Refuse symbolic exponents that become too large once the parameters are known."""
    for p in expr.atoms(sp.Pow):
        if not p.exp.free_symbols:
            continue
        e = p.exp.subs(values)
        if e.is_number:
            try:
                big = abs(complex(e)) > MAX_EXPONENT
            except (TypeError, ValueError, OverflowError):
                big = True
            if big:
                src.fail(f"{where}: the exponent of {p} is {e} with the parameters of the file; "
                         f"exponents must stay within |b| <= {MAX_EXPONENT}")


def _parameters(src, data, *, allow_omega):
    out = {}
    for key, value in src.table(data, "parameters").items():
        if key == "omega" and allow_omega:
            out[key] = src.number(value, "[parameters] omega")
            continue
        if key == "omega":
            src.fail("[parameters] omega: the frequency stays symbolic in a horizon model (a dispersion "
                     "model, or an ode model with [profiles]); remove it and choose the frequency later, "
                     "with model.mode_equation(omega) or model.scatter(omega)")
        src.name(key, "the parameter")
        out[key] = src.number(value, f"[parameters] {key}")
    return out


def _profiles(src, data, params, values):
    table = src.table(data, "profiles")
    symbols = {"x": _X, **{n: sp.Symbol(n) for n in params if n != "omega"}}
    out = {}
    for key, text in table.items():
        src.name(key, "the profile")
        if key in params:
            src.fail(f"'{key}' is both a parameter and a profile; give it one meaning")
        if not isinstance(text, str):
            src.fail(f"[profiles] {key} must be a quoted expression in x and the parameters, "
                     f"got {_describe(text)}")
        out[key] = src.expression(text, symbols, f"[profiles] {key} (a profile may use only x and the "
                                  f"parameters)", values)
    return out


def _horizon(src, data):
    t = src.table(data, "horizon")
    kw = {}
    if "position" in t and t["position"] == "none":
        kw["horizon"] = "none"          # a horizonless flow (direct solver, turning points)
    elif "position" in t:
        kw["horizon"] = float(src.number(t["position"], "[horizon] position"))
    if "window" in t:
        w = t["window"]
        if not (isinstance(w, list) and len(w) == 2):
            src.fail(f"[horizon] window must be a list of two numbers [a, b], got {_describe(w)}")
        a, b = (float(src.number(v, "each end of [horizon] window")) for v in w)
        if not a < b:
            src.fail(f"[horizon] window = [{a}, {b}] needs a < b")
        kw["window"] = (a, b)
    return kw


#: a given [horizon] position must be a zero of the low-frequency coefficient within this (times 1 + |x|)
POSITION_TOL = 1e-6


def _fail_horizon(src, msg):
    raise ModelFileHorizonError(f"{src.path}: {msg}")


def _verify_horizon(src, model, kw):
    """The horizon of a loaded model: a given position is a horizon, a window's horizon is of the supported kind.

    With ``c0(x)`` the coefficient of ``k^d`` and ``a(x)`` that of ``omega^d`` in the
    lowest-degree part of D (the low-frequency branch), the horizon is a zero
    of c0 (a given position must be one, within a tolerance).  Its kind (black
    or white hole, flow towards -x or +x) is the model's ``orientation``; every
    kind is supported and kappa must be finite and nonzero
    (:func:`contourkit.symbolic.horizon.checked_kappa`).
    """
    if not isinstance(model, HorizonModel) or model.horizon is None:   # no equation, or a horizonless flow
        return model
    x = model.x
    xh = float(model.horizon)
    try:
        d, c0, c1, *_ = model._low_frequency_part()
        g = sp.lambdify(x, c0, "mpmath")
        dg = sp.lambdify(x, sp.diff(c0, x), "mpmath")
        with mpmath.workdps(30):
            val, slope = complex(g(mpmath.mpf(xh))), complex(dg(mpmath.mpf(xh)))
    except (TypeError, ValueError, ZeroDivisionError, sp.PolynomialError):
        return model
    if "horizon" in kw:
        dist = abs(val / slope) if slope != 0 else math.inf
        if not (dist <= POSITION_TOL * (1 + abs(xh))):
            hint = ""
            try:
                root = float(mpmath.findroot(lambda t: mpmath.re(g(t)), mpmath.mpf(xh)))
                hint = f" (a horizon lies at x = {root if abs(root) > 1e-12 else 0.0:.12g})"
            except (ValueError, ZeroDivisionError, TypeError):
                pass
            _fail_horizon(src, f"[horizon] position = {xh:g} is not a horizon of the profile: the coefficient of "
                     f"k^{d} at omega = 0, {c0}, is {val.real:.6g} there, not 0{hint}; give the position where it vanishes, or "
                     f"remove position and give window = [a, b] around the horizon")
    return model


def _construct(src, build, kw=None):
    """Run a model constructor; contourkit errors pass, anything else gets context."""
    try:
        model = build()
    except HorizonError as exc:
        raise ModelFileHorizonError(f"{src.path}: {exc}") from None
    except ContourkitError:
        raise
    except Exception as exc:  # sympy or numpy failures deep inside the constructors
        src.fail(f"the model could not be built ({type(exc).__name__}: {exc}); check that the equation is "
                 f"polynomial in k (dispersion) or linear in y (ode) and that the profiles are smooth")
    return _verify_horizon(src, model, kw or {})


def load_model(path):
    """Load a model file (TOML), parsing every expression by whitelist.

    Parameters
    ----------
    path : str or os.PathLike
        The model file; see ``docs/model-files.md`` for the format.

    Returns
    -------
    HorizonModel or ModeEquation
        ``kind = "dispersion"``, or ``kind = "ode"`` with ``[profiles]``: a
        :class:`~contourkit.symbolic.horizon.HorizonModel` (omega symbolic).
        ``kind = "ode"`` without profiles: a
        :class:`~contourkit.symbolic.equation.ModeEquation`, used as given.

    Raises
    ------
    ModelFileError
        For a missing or malformed file, naming the file, section and key.
    ModelError, HorizonError
        From the model constructors, unchanged (e.g. an ODE not linear in y).

    Examples
    --------
    >>> eq = load_model(example_path("airy"))
    >>> eq.A, eq.B
    (-k**2, -1)
    """
    if not isinstance(path, (str, os.PathLike)):
        raise InputError(f"path must be a string or a path, got {type(path).__name__}")
    src = _File(pathlib.Path(path))
    data = src.read()
    for key in data:
        if key not in SECTIONS:
            hint = " (it belongs under [model])" if key in SECTIONS["model"] else ""
            src.fail(_unknown(key, [f"[{s}]" for s in SECTIONS], "section") + hint
                     if isinstance(data[key], dict) else
                     f"the key '{key}' is outside any section{hint}; the sections are "
                     f"{', '.join(f'[{s}]' for s in SECTIONS)}")
    model = src.table(data, "model", required=True)
    kind = src.string(model, "kind", "model", required=True)
    if kind not in KINDS:
        src.fail(f"[model] kind = {kind!r} is not known; use kind = \"dispersion\" (a dispersion relation "
                 f"D(omega, k; profiles)) or kind = \"ode\" (an ODE in y(x))")
    equation = src.string(model, "equation", "model", required=True)
    kw = {"name": src.string(model, "name", "model") or src.path.stem,
          "description": src.string(model, "description", "model") or f"{kind}: {equation}"}
    has_profiles = bool(src.table(data, "profiles"))
    params = _parameters(src, data, allow_omega=(kind == "ode" and not has_profiles))
    values = {sp.Symbol(n): exact(v) for n, v in params.items()}
    profiles = _profiles(src, data, params, values)
    kw.update(_horizon(src, data))
    psyms = {n: sp.Symbol(n) for n in params if n != "omega"}
    where = "[model] equation"
    if kind == "dispersion":
        symbols = {"omega": _W, "k": _K, "x": _X, **psyms, **{n: sp.Symbol(n) for n in profiles}}
        D = src.expression(equation, symbols, where, values, outside=(_K, _W),
                           why="a dispersion relation must be a polynomial in k and omega (no k or omega "
                               "inside functions, roots or symbolic powers)")
        return _construct(src, lambda: HorizonModel.from_dispersion(
            D, omega=_W, k=_K, x=_X, profiles={sp.Symbol(n): e for n, e in profiles.items()},
            parameters=values, **kw), kw)
    symbols = {"x": _X, "y": _Y(_X), "omega": _W, **psyms, **{n: sp.Function(n)(_X) for n in profiles}}
    expr = src.expression(equation, symbols, where, values, outside=(_Y(_X), _W) if profiles else (_Y(_X),),
                          why="the equation must be linear in y (and, with profiles, polynomial in omega): keep "
                              "y, der(y, n) and omega out of functions, roots and symbolic powers")
    if profiles:
        return _construct(src, lambda: HorizonModel.from_ode(
            expr, _Y, _X, profiles={sp.Function(n): e for n, e in profiles.items()},
            parameters=values, frequency=_W, **kw), kw)
    if "horizon" in data:
        src.fail("[horizon] applies to horizon models only; an ode model without [profiles] is used as "
                 "given (coefficients linear in x); remove [horizon] or add [profiles]")
    if expr.has(_W) and "omega" not in params:
        src.fail("the equation uses omega; an ode model without [profiles] is one equation at one frequency, "
                 "so give it a value in [parameters], e.g. omega = 0.3")
    return _construct(src, lambda: ModeEquation.from_ode(expr, _Y, _X, parameters=values))


def example_path(name):
    """Path of a model file shipped with contourkit.

    Parameters
    ----------
    name : str
        ``"quartic_superluminal"`` or ``"airy"`` (with or without ``.toml``).

    Examples
    --------
    >>> example_path("airy").name
    'airy.toml'
    """
    folder = pathlib.Path(str(importlib.resources.files("contourkit") / "models"))
    names = sorted(p.stem for p in folder.glob("*.toml"))
    stem = name[:-5] if isinstance(name, str) and name.endswith(".toml") else name
    if stem not in names:
        raise ModelFileError(f"no example model {name!r}; the shipped examples are {', '.join(names)}")
    return folder / f"{stem}.toml"


__all__ = ["load_model", "example_path"]
