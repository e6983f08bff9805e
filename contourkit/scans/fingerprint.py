"""Run fingerprints: what a spectrum file was computed from, and what differs from a new run.

A fingerprint is a JSON-able dict of four parts and the package version:

``model``
    The model's content: the symmetric-form coefficients of the full
    operator (which hold the equation, the parameters and the profiles),
    the parameters and profiles as given, the horizon and kappa; each part
    is hashed (SHA-256, first 16 hex digits) and a short summary (name,
    kappa, parameters) is kept for messages.  The name and the file the
    model came from are not part of it: the same model read from a renamed
    or reformatted file has the same fingerprint.
``grid``
    The frequencies in grid order (their count, first and last values and
    the hash of their ``repr``).
``method``
    "contour" or "direct".
``options``
    The options that change the numbers: accuracy (rtol, dps), following,
    the direct solver's options, and the block length of the following.
``version``
    contourkit's version.

:func:`differences` names every part in which two fingerprints differ, in
words a user can act on.

Examples
--------
>>> import contourkit as ck
>>> m = ck.catalogue.nondispersive_flow(kappa=0.05)
>>> a = fingerprint(m, [0.01, 0.02], method="contour", options={"rtol": 1e-12})
>>> b = fingerprint(m, [0.01, 0.03], method="contour", options={"rtol": 1e-12})
>>> differences(a, b)[0].startswith("the frequency grid differs")
True
"""
import hashlib
import json

from .._version import __version__


def _hash(text):
    return hashlib.sha256(text.encode("utf-8")).hexdigest()[:16]


def _text(v):
    try:
        import sympy as sp
        if isinstance(v, sp.Basic):
            return sp.srepr(v)
    except ImportError:  # pragma: no cover - sympy is a dependency
        pass
    return repr(v)


def _short(v, width=60):
    text = " ".join(str(v).split())
    return text if len(text) <= width else text[:width - 3] + "..."


def model_part(model):
    """The content of a model as hashes of its parts and a summary.

    Parameters
    ----------
    model : HorizonModel or any object with a ``scatter`` method

    Returns
    -------
    dict
        ``{"hash", "equation", "parameters", "profiles", "horizon", "summary"}``.
    """
    g = getattr(model, "g", None)
    equation = "|".join(_text(c) for c in g) if g is not None else f"{type(model).__module__}.{type(model).__name__}"
    params = {str(k): _text(v) for k, v in sorted(getattr(model, "parameters", {}).items(), key=lambda kv: str(kv[0]))}
    profiles = {str(k): _text(v) for k, v in sorted(getattr(model, "profiles", {}).items(), key=lambda kv: str(kv[0]))}
    horizon = f"{getattr(model, 'horizon', None)!r}|{getattr(model, 'kappa', None)!r}|{getattr(model, 'window', None)!r}"
    parts = {"equation": _hash(equation), "parameters": _hash(json.dumps(params, sort_keys=True)),
             "profiles": _hash(json.dumps(profiles, sort_keys=True)), "horizon": _hash(horizon)}
    kappa = getattr(model, "kappa", None)
    summary = {"name": str(getattr(model, "name", "") or ""),
               "equation": _short(getattr(model, "dispersion", ""), 80),
               "kappa": float(kappa) if isinstance(kappa, (int, float)) else None,
               "parameters": {str(k): _short(v, 24) for k, v in getattr(model, "parameters", {}).items()}}
    return dict(parts, hash=_hash(json.dumps(parts, sort_keys=True)), summary=summary)


def grid_part(omegas):
    """The frequency grid: count, first and last value, hash of the values in order."""
    ws = [float(w) for w in omegas]
    return {"points": len(ws), "first": ws[0] if ws else None, "last": ws[-1] if ws else None,
            "hash": _hash(",".join(repr(w) for w in ws))}


def fingerprint(model, omegas, *, method, options):
    """The fingerprint of a run (see the module docstring).

    Parameters
    ----------
    model : HorizonModel
    omegas : sequence of float
        The grid, in the order its rows are written.
    method : str
    options : dict
        JSON-able options that change the numbers.

    Returns
    -------
    dict
        With ``"hash"`` over all parts.
    """
    fp = {"model": model_part(model), "grid": grid_part(omegas), "method": str(method),
          "options": json.loads(json.dumps(options, sort_keys=True)), "version": __version__}
    fp["hash"] = _hash(json.dumps({"model": fp["model"]["hash"], "grid": fp["grid"]["hash"], "method": fp["method"],
                                   "options": fp["options"], "version": fp["version"]}, sort_keys=True))
    return fp


def _grid_words(g):
    return f"{g.get('points')} points from {g.get('first')!r} to {g.get('last')!r}"


def _model_words(m):
    s = m.get("summary", {})
    name = s.get("name") or "unnamed"
    params = ", ".join(f"{k}={v}" for k, v in sorted(s.get("parameters", {}).items())) or "no parameters"
    eq = f", D = {s['equation']}" if s.get("equation") else ""
    return f"{name}, kappa = {s.get('kappa')!r}, {params}{eq}"


def differences(old, new):
    """What differs between the fingerprint of a file (``old``) and of a new run (``new``).

    Returns
    -------
    list of str
        One phrase per differing part (empty when the runs agree).
    """
    out = []
    om, nm = old.get("model", {}), new.get("model", {})
    if om.get("hash") != nm.get("hash"):
        which = [p for p in ("equation", "parameters", "profiles", "horizon") if om.get(p) != nm.get(p)]
        out.append(f"the model differs in its {' and '.join(which) or 'content'} (file: {_model_words(om)}; "
                   f"this run: {_model_words(nm)})")
    og, ng = old.get("grid", {}), new.get("grid", {})
    if og.get("hash") != ng.get("hash"):
        out.append(f"the frequency grid differs (file: {_grid_words(og)}; this run: {_grid_words(ng)})")
    if old.get("method") != new.get("method"):
        out.append(f"the method differs (file: {old.get('method')}; this run: {new.get('method')})")
    oo, no = old.get("options", {}), new.get("options", {})
    for key in sorted(set(oo) | set(no)):
        if oo.get(key) != no.get(key):
            out.append(f"the option {key} differs (file: {oo.get(key)!r}; this run: {no.get(key)!r})")
    if old.get("version") != new.get("version"):
        out.append(f"the contourkit version differs (file: {old.get('version')}; this run: {new.get('version')})")
    return out


__all__ = ["fingerprint", "differences", "model_part", "grid_part"]
