"""How far a near-horizon result can be trusted for the full profile; cut-offs of every model.

The contour method (:func:`contourkit.scattering.smatrix.scatter`) solves the
*linearised* near-horizon model exactly.  Its figures are those of the
physical system only where the profile is linear over the region in which the
modes are converted and where the dispersive branches of the full profile
exist.  For every model that has a full profile joining two uniform regions
(catalogue tanh flows, dielectric fronts, model files with such profiles) this
module attaches to each near-horizon result

* ``res.hawking_channel``: False above a cut-off, where the full profile has
  no in-mode of opposite norm to the Hawking out-mode (or no Hawking
  out-mode).  The figures are then the full profile's, ``thermal_ratio = 0.0``,
  ``occupation = 0.0``, ``effective_temperature = None``, with a
  ContourkitWarning;
* ``res.validity`` (:class:`Validity`): the estimated relative deviations of
  the thermal ratio and of the occupation from the full profile's values,
  ``reliable`` (both below ``tolerance``, default 1e-2) and a one-line
  ``reason``; a :class:`~contourkit.errors.ValidityWarning` when not reliable.

Method (docs/method.md, "How far a near-horizon result holds")
--------------------------------------------------------------
The estimate is a *cheap full-profile solve*: the direct position-space
solver (:mod:`contourkit.profiles.direct`, ~0.05-0.5 s per frequency) at a
relaxed tolerance ``rtol = 1e-8``, and the relative differences of the two
thermal ratios and occupations, plus the direct solver's own error estimate.
A single ``scatter`` solves at its frequency.  A spectrum solves at no more
than ``max_solves`` reference frequencies (default 6, spread over the sorted
frequencies, both ends included) and gives every other frequency the larger
of the two deviations measured at the reference frequencies that bracket it
(the deviations vary smoothly and mostly monotonically in omega: growing
towards the cut-off for the thermal ratio, falling like
``exp(-pi omega/kappa)`` for the occupation of a linearised flow).  Solves
are cached on the model, so a repeated frequency costs nothing.

Non-dispersive models (no dispersive term, deg Q <= 1) have no full-profile
correction in this estimate: the u and v modes decouple, the near-horizon
thermal factor ``exp(-2 pi omega/kappa)`` holds for every profile with the
same kappa (common practice, 1+1 dimensions); the estimate says so and is 0.
Where the direct solver cannot be used (it raises), the errors are ``inf``
and ``reliable`` is False, with the solver's message in ``reason``.

Layering: this module belongs to the profiles layer (it needs the direct
solver); the scattering layer calls it through the registry
(``extensions.call("full_profile", model, results, tolerance=...)``,
registered in ``contourkit/profiles/__init__.py``), never by import.

References
----------
.. [1] J. Macher, R. Parentani, Phys. Rev. D 79 (2009) 124008 (tanh
   profiles; the cut-off omega_max governs the deviations from thermality).
.. [2] A. Coutant, R. Parentani, S. Finazzi, Phys. Rev. D 85 (2012) 024021
   (validity of the near-horizon S-matrix).

Examples
--------
>>> import warnings, contourkit as ck
>>> m = ck.catalogue.quartic_flow(kappa=0.05, Lambda=2.5, D=0.5)
>>> with warnings.catch_warnings():
...     warnings.simplefilter("ignore", ck.ValidityWarning)
...     res = m.scatter(0.05)
>>> res.validity.thermal_ratio_error < 1e-2
True
>>> ck.catalogue.quartic_flow(kappa=0.05, Lambda=2.5).scatter(0.05).validity is None
True
"""
import bisect
import math
import warnings
from dataclasses import dataclass, field

from ..errors import ContourkitError, ContourkitWarning, InputError, ValidityWarning
from .cutoff import model_cutoffs
from .planewaves import _store, asymptotic_dispersion, asymptotic_modes

#: default tolerance of ``reliable``
TOLERANCE = 1e-2
#: accuracy asked of the reference solves of the direct solver
REFERENCE_RTOL = 1e-8


@dataclass
class Validity:
    """How far a near-horizon result holds for the full profile.

    Attributes
    ----------
    thermal_ratio_error : float
        Estimated relative deviation of ``thermal_ratio`` from the full
        profile's value (``inf`` where no estimate could be made).
    occupation_error : float
        Estimated relative deviation of ``occupation`` from the full profile's.
    reliable : bool
        Both errors below ``tolerance``.
    reason : str
        One line: what limits the result, or that it holds.
    tolerance : float
    reference_omegas : tuple of float
        Frequencies of the full-profile solves the estimate rests on.
    method : str
        "full-profile solve at this frequency", "bracketing full-profile
        solves", "non-dispersive" or "above cut-off".
    """
    thermal_ratio_error: float
    occupation_error: float
    reliable: bool
    reason: str
    tolerance: float = TOLERANCE
    reference_omegas: tuple = ()
    method: str = ""
    extra: dict = field(default_factory=dict, repr=False)

    def __repr__(self):
        return (f"Validity(reliable={self.reliable}, thermal_ratio_error={self.thermal_ratio_error:.2g}, "
                f"occupation_error={self.occupation_error:.2g})\n  {self.reason}")


def check_tolerance(tolerance):
    """The validity tolerance as a float in (0, 1); None switches the estimate off."""
    if tolerance is None:
        return None
    if isinstance(tolerance, bool) or not isinstance(tolerance, (int, float)) or not 0 < tolerance < 1:
        raise InputError(f"validity_tol must be a number in (0, 1) (the relative deviation from the full "
                         f"profile accepted as reliable, default 1e-2) or None to skip the estimate, "
                         f"got {tolerance!r}")
    return float(tolerance)


def has_full_profile(model):
    """True if the model's profile joins two uniform regions (so the direct solver applies)."""
    st = _store(model)
    if "full_profile" not in st:
        try:
            for side in ("exterior", "interior"):
                asymptotic_dispersion(model, side)
            st["full_profile"] = True
        except (InputError, ContourkitError):
            st["full_profile"] = False
    return st["full_profile"]


def hawking_channel(model, omega):
    """Whether the full profile has a Hawking channel at omega (mode content between cut-offs).

    Below the lowest cut-off it exists.  Above a cut-off it exists when the
    exterior has a propagating out-mode and some in-mode of the uniform regions
    has the opposite norm to it.  The mode content changes only at cut-offs,
    so it is found once per interval between consecutive cut-offs.
    """
    cuts = sorted({c.omega for c in model_cutoffs(model)})
    i = bisect.bisect_right(cuts, omega)
    if i == 0:
        # below every cut-off the horizon radiates (for a non-dispersive flow the partner in-modes
        # come from the horizon itself and are not plane waves of the uniform regions)
        return True
    st = _store(model).setdefault("channel", {})
    if i not in st:
        lo = cuts[i - 1] if i else 0.0
        hi = cuts[i] if i < len(cuts) else (2 * lo if lo else 1.0)
        probe = math.sqrt(lo * hi) if lo else 0.5 * hi
        ext = asymptotic_modes(model, probe, "exterior")
        inte = asymptotic_modes(model, probe, "interior")
        outs = [m for m in ext if m.kind == "propagating" and m.direction == "out"]
        if not outs:
            st[i] = False
        else:
            h = min(outs, key=lambda m: abs(m.k))
            st[i] = any(m.kind == "propagating" and m.direction == "in" and m.norm == -h.norm
                        for m in ext + inte)
    return st[i]


def _reference(model, omega):
    """Cached full-profile solve at omega: dict(thermal_ratio, occupation, error, channel) or dict(failed)."""
    from . import direct
    st = _store(model).setdefault("validity_refs", {})
    if omega not in st:
        try:
            with warnings.catch_warnings():
                warnings.simplefilter("ignore")
                d = direct.scatter(model, omega, rtol=REFERENCE_RTOL)
            st[omega] = {"thermal_ratio": float(d.thermal_ratio), "occupation": float(d.occupation),
                         "error": float(d.error_estimate), "channel": bool(d.hawking_channel)}
        except ContourkitError as exc:
            st[omega] = {"failed": f"{type(exc).__name__}: {exc}"}
    return st[omega]


def _deviation(res, ref):
    """(thermal_ratio_error, occupation_error) of a contour result against a reference solve."""
    if "failed" in ref:
        return math.inf, math.inf

    def rel(a, b):
        if b == 0:
            return 0.0 if a == 0 else math.inf
        return abs(a - b) / abs(b)
    return (rel(float(res.thermal_ratio), ref["thermal_ratio"]) + ref["error"],
            rel(float(res.occupation), ref["occupation"]) + ref["error"])


def _reason(tre, oce, tol, kappa, omega, where):
    if not math.isfinite(tre):
        return f"no full-profile estimate ({where}); treat the near-horizon figures as those of the linear model"
    bad = []
    if tre >= tol:
        bad.append(f"thermal ratio off by ~{tre:.1e}")
    if oce >= tol:
        why = " (the linearised profile mixes the Hawking mode with the counter-propagating in-mode, " \
              "~exp(-pi omega/kappa))" if omega < 3 * kappa and oce > 3 * tre else ""
        bad.append(f"occupation off by ~{oce:.1e}{why}")
    if not bad:
        return (f"within {max(tre, oce):.1e} of the full profile ({where}; tolerance {tol:g})")
    return (f"{' and '.join(bad)} against the full profile ({where}; tolerance {tol:g}): the near-horizon "
            f"model does not describe the flow here; use contourkit.direct.scatter")


def _validity(pairs, refs, tol, kappa, omega):
    """Validity from (contour result, reference solve) pairs at the reference frequencies `refs`."""
    devs = [_deviation(r, ref) for r, ref in pairs]
    tre = max(d[0] for d in devs)
    oce = max(d[1] for d in devs)
    failed = [ref["failed"] for _, ref in pairs if "failed" in ref]
    if failed:
        where, method = failed[0][:200], "full-profile solve failed"
    elif refs == [omega]:
        where, method = f"solved at omega = {omega:.6g}", "full-profile solve at this frequency"
    else:
        where = "bracketing solves at omega = " + ", ".join(f"{w:.6g}" for w in refs)
        method = "bracketing full-profile solves"
    return Validity(tre, oce, tre < tol and oce < tol, _reason(tre, oce, tol, kappa, omega, where), tol,
                    tuple(refs), method)


def attach(model, results, *, tolerance=TOLERANCE, max_solves=6, stacklevel=4):
    """Set ``hawking_channel`` and ``validity`` on near-horizon results of one model (in place).

    Parameters
    ----------
    model : HorizonModel
    results : list of ScatteringResult (method "contour")
    tolerance : float in (0, 1) or None (None: no validity estimate)
    max_solves : int
        Largest number of full-profile solves for a list of results.

    Returns
    -------
    list of ScatteringResult (the same objects)
    """
    tol = check_tolerance(tolerance)
    if not results or not has_full_profile(model):
        return results
    kappa = float(model.kappa)
    wmax = model.omega_max
    above = []
    for res in results:
        if not hawking_channel(model, res.omega):
            res.hawking_channel = False
            res.thermal_ratio = 0.0 * res.thermal_ratio
            res.occupation = 0.0 * res.occupation
            res.effective_temperature = None
            res.message += ("; above the cut-off of the full profile: no Hawking channel, so thermal_ratio = 0, "
                            "occupation = 0, effective_temperature = None (res.S is the linearised model's)")
            res.validity = None if tol is None else Validity(
                0.0, 0.0, True, "above the cut-off: the figures are the full profile's (no Hawking channel)",
                tol, (), "above cut-off")
            above.append(res.omega)
    if wmax is not None and any(r.omega >= wmax for r in results):
        ws = sorted(r.omega for r in results if r.omega >= wmax)
        warnings.warn(f"omega = {ws[0]:.6g}{' and above' if len(ws) > 1 else ''} is at or above the cut-off "
                      f"omega_max = {wmax:.6g} of the full profile: dispersive branches merge there and the "
                      f"near-horizon result no longer describes the system"
                      f"{' (no Hawking channel: thermal_ratio = 0 reported)' if above else ''}; use "
                      f"contourkit.direct.scatter for the full profile", ContourkitWarning, stacklevel=stacklevel)
    todo = [r for r in results if r.hawking_channel]
    if tol is None or not todo:
        return results
    ws = sorted({r.omega for r in todo})
    if len(ws) <= max_solves:
        nodes = ws
    else:
        idx = sorted({round(i * (len(ws) - 1) / (max_solves - 1)) for i in range(max_solves)})
        nodes = [ws[i] for i in idx]
    by_w = {r.omega: r for r in todo}
    if model.mode_equation(nodes[0]).fourier().degree_Q < 2:
        for res in todo:
            res.validity = Validity(0.0, 0.0, True, "non-dispersive model: the u and v modes decouple and the "
                                    "thermal factor depends on kappa only (common practice)", tol, (),
                                    "non-dispersive")
        return results
    refs = {w: _reference(model, w) for w in nodes}
    for res in todo:
        i = bisect.bisect_left(nodes, res.omega)
        if nodes[i] == res.omega:
            res.validity = _validity([(res, refs[res.omega])], [res.omega], tol, kappa, res.omega)
        else:
            # the deviations measured at the two bracketing reference frequencies (their own results)
            near = [nodes[i - 1], nodes[i]]
            res.validity = _validity([(by_w[w], refs[w]) for w in near], near, tol, kappa, res.omega)
    bad = [r for r in todo if r.validity is not None and not r.validity.reliable]
    if bad:
        first = bad[0]
        more = f" ({len(bad)} of {len(todo)} frequencies)" if len(todo) > 1 else ""
        warnings.warn(f"near-horizon result at omega = {first.omega:.6g} is not reliable for the full profile"
                      f"{more}: {first.validity.reason}", ValidityWarning, stacklevel=stacklevel)
    return results


def attach_turning(model, res, *, stacklevel=4):
    """Check a turning-point result's mode content against the full profile's uniform regions (in place).

    The contour method at a dispersive turning point scatters the profile
    linearised there: its in-modes are those of that linear model.  Where the
    full profile's two uniform regions hold another number of in-modes of
    either norm (a second conversion between them, e.g. a point where
    ``omega = v k`` on a branch, at which that mode's norm changes sign, or a
    mode that is blocked elsewhere), the result is not the S-matrix of the
    flow: ``res.validity`` is then not reliable (errors ``inf``), the reason is
    given and a ValidityWarning is issued.  Where the content agrees,
    ``res.validity`` stays None (the turning-point coefficients carry no
    error estimate against the full profile; docs/limitations.md).

    Returns
    -------
    ScatteringResult (the same object)
    """
    try:
        full = asymptotic_modes(model, res.omega, "exterior") + asymptotic_modes(model, res.omega, "interior")
    except ContourkitError:                    # no uniform regions to compare with
        return res
    count = lambda ms, s: sum(1 for m in ms if m.kind == "propagating" and m.direction == "in" and m.norm == s)  # noqa: E731
    have = (count(res.in_modes, 1), count(res.in_modes, -1))
    want = (count(full, 1), count(full, -1))
    if have == want:
        return res
    reason = (f"the full profile's uniform regions hold {want[0]} positive-norm and {want[1]} negative-norm "
              f"in-modes at omega = {res.omega:.6g}, the profile linearised at the turning point {have[0]} and "
              f"{have[1]}: another conversion lies between the turning point and the uniform regions, so this is "
              f"not the flow's S-matrix (contourkit.direct.scatter solves the full profile where its mode count "
              f"closes)")
    res.validity = Validity(math.inf, math.inf, False, reason, TOLERANCE, (), "mode content")
    res.message += "; " + reason
    warnings.warn(f"turning-point result at omega = {res.omega:.6g} does not describe the flow: {reason}",
                  ValidityWarning, stacklevel=stacklevel)
    return res


__all__ = ["Validity", "attach", "attach_turning", "hawking_channel", "has_full_profile", "check_tolerance",
           "TOLERANCE"]
