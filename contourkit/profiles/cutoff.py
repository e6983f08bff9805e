"""Cut-off frequencies of dispersive branches in uniform asymptotic regions.

In a uniform region the dispersion relation ``D(omega, k) = 0`` has, for each
real omega, a fixed number of real roots k.  That number changes only where
two real roots merge: ``D = dD/dk = 0`` with k real.  For omega > 0 this is a
cut-off: a dispersive branch ceases to exist above it.  For the quartic flow

* superluminal, supersonic interior (``v = -u``, u > 1): the negative-norm
  dispersive in-mode merges with the negative-norm partner out-mode at
  ``omega_max = Lambda (u - s) sqrt(s^2 - 1)``, ``s = (u + sqrt(u^2 + 8))/4``;
* subluminal, subsonic exterior (u < 1): the positive-norm dispersive in-mode
  merges with the Hawking out-mode at ``omega_max = Lambda (s - u) sqrt(1 - s^2)``.

The cut-offs are found generally and exactly: the discriminant of D with
respect to k is a polynomial in omega (exact, for the rational coefficients of
a catalogue model), whose positive roots with a real double root k are the
cut-offs; mpmath at 40 digits locates them.

References
----------
.. [1] J. Macher, R. Parentani, Phys. Rev. D 79 (2009) 124008 (the cut-off
   omega_max of a superluminal tanh flow).
.. [2] A. Coutant, R. Parentani, S. Finazzi, Phys. Rev. D 85 (2012) 024021
   (cut-off and mode content of dispersive flows).

Examples
--------
>>> round(omega_max_uniform(2.0, 1.0, "superluminal"), 6)
0.58998
"""
from dataclasses import dataclass

import mpmath
import sympy as sp

from ..symbolic._sym import exact
from ..errors import InputError
from ..symbolic._sym import OMEGA, KS



@dataclass(frozen=True)
class Cutoff:
    """A frequency where two real roots of a uniform-region dispersion relation merge.

    Attributes
    ----------
    omega : float
        The cut-off frequency (> 0).
    k : float
        The double root.
    norm : int
        ``sign(dD/domega)`` of the merging pair (the branch that ceases to exist).
    side : str or None
        "exterior" or "interior" when found for a model's region.
    """
    omega: float
    k: float
    norm: int
    side: str = None


def cutoffs(dispersion, *, omega=OMEGA, k=KS, side=None, dps=40):
    """Every positive cut-off frequency of a uniform-region dispersion relation.

    Parameters
    ----------
    dispersion : sympy expression
        ``D(omega, k)``, polynomial in omega and k with numeric coefficients
        (no x: one uniform region).
    omega, k : sympy Symbols
    side : str, optional
        Label stored in the returned :class:`Cutoff` objects.
    dps : int
        Working precision (mpmath.workdps) for the roots.

    Returns
    -------
    list of Cutoff, sorted by frequency (empty if none).

    Examples
    --------
    >>> w, k = sp.symbols("omega k")
    >>> [round(c.omega, 7) for c in cutoffs((w + 6*k/5)**2 - k**2 - k**4)]
    [0.0494999]
    """
    D = sp.expand(sp.sympify(dispersion))
    extra = D.free_symbols - {omega, k}
    if extra:
        raise InputError(f"the dispersion relation contains {sorted(map(str, extra))} besides omega and k; "
                         f"substitute the uniform values of the profile first")
    try:
        P = sp.Poly(D, k)
    except sp.PolynomialError:
        raise InputError(f"the dispersion relation is not polynomial in k: {D}")
    if P.degree() < 2:
        return []
    disc = sp.Poly(sp.expand(sp.discriminant(P.as_expr(), k)), omega)
    if disc.is_zero or disc.degree() < 1:
        return []
    Dk = sp.diff(D, k)
    Dw = sp.diff(D, omega)
    fD = sp.lambdify((omega, k), D, "mpmath")
    fDw = sp.lambdify((omega, k), Dw, "mpmath")
    out = []
    with mpmath.workdps(dps):
        coeffs = [mpmath.mpmathify(complex(sp.N(c, dps + 10))) for c in disc.all_coeffs()]
        # strip the factor omega^j (the trivial double root k = 0 at omega = 0)
        while coeffs and abs(coeffs[-1]) == 0:
            coeffs = coeffs[:-1]
        if len(coeffs) < 2:
            return []
        wroots = mpmath.polyroots(coeffs, maxsteps=400, extraprec=4 * dps)
        tol = mpmath.mpf(10) ** (-dps // 2)
        for wr in wroots:
            if abs(mpmath.im(wr)) > tol * max(1, abs(wr)) or mpmath.re(wr) <= tol:
                continue
            wr = mpmath.re(wr)
            kpoly = sp.Poly(Dk.subs(omega, sp.Float(mpmath.nstr(wr, dps), dps)), k)
            kc = [mpmath.mpmathify(complex(sp.N(c, dps))) for c in kpoly.all_coeffs()]
            if len(kc) < 2:
                continue
            for kr in mpmath.polyroots(kc, maxsteps=400, extraprec=4 * dps):
                scale = max(1, abs(kr))
                if abs(mpmath.im(kr)) > mpmath.sqrt(tol) * scale:
                    continue
                kr = mpmath.re(kr)
                if abs(fD(wr, kr)) > mpmath.sqrt(tol) * scale ** P.degree():
                    continue
                dw = fDw(wr, kr)
                out.append(Cutoff(omega=float(wr), k=float(kr), norm=int(mpmath.sign(mpmath.re(dw))), side=side))
    out.sort(key=lambda c: c.omega)
    uniq = []
    for c in out:
        if not uniq or abs(c.omega - uniq[-1].omega) > 1e-12 * c.omega or abs(c.k - uniq[-1].k) > 1e-9:
            uniq.append(c)
    return uniq


def quartic_dispersion(u, Lambda, branch):
    """``(omega + u k)^2 - k^2 - s k^4/Lambda^2`` of a uniform flow ``v = -u`` (exact)."""
    if branch not in ("superluminal", "subluminal"):
        raise InputError(f"branch must be 'superluminal' or 'subluminal', got {branch!r}")
    s = 1 if branch == "superluminal" else -1
    u, L = exact(u), exact(Lambda)
    if not (float(L) > 0):
        raise InputError(f"Lambda must be positive, got {Lambda!r}")
    return sp.expand((OMEGA + u * KS) ** 2 - KS ** 2 - s * KS ** 4 / L ** 2)


def omega_max_uniform(u, Lambda, branch="superluminal"):
    """Lowest cut-off of the quartic dispersion in a uniform flow of speed u (towards -x).

    Parameters
    ----------
    u : float
        Flow speed ``|v|`` (u > 1: supersonic, as in the interior; u < 1: subsonic).
    Lambda : float
    branch : {"superluminal", "subluminal"}

    Returns
    -------
    float or None
        None when every branch exists at all omega > 0.

    Examples
    --------
    >>> round(omega_max_uniform(1.2, 1.0, "superluminal"), 7)
    0.0494999
    >>> omega_max_uniform(0.5, 1.0, "superluminal") is None
    True
    """
    cs = cutoffs(quartic_dispersion(u, Lambda, branch))
    return cs[0].omega if cs else None


def model_cutoffs(model):
    """Every cut-off of both asymptotic regions of a HorizonModel (empty list if none).

    Raises
    ------
    InputError
        If the profile has no uniform asymptotic regions.
    """
    from .planewaves import _store, asymptotic_dispersion
    st = _store(model)
    if "cutoffs" not in st:
        out = []
        for side in ("exterior", "interior"):
            out += cutoffs(asymptotic_dispersion(model, side), side=side)
        st["cutoffs"] = sorted(out, key=lambda c: c.omega)
    return list(st["cutoffs"])


def omega_max(model):
    """The lowest frequency at which a dispersive branch ceases to exist, or None.

    Parameters
    ----------
    model : HorizonModel

    Returns
    -------
    float or None
        None for profiles without uniform asymptotic regions (the linear
        profile ``D=None``) and for models where every branch exists at all
        omega > 0 (the non-dispersive flow).

    Examples
    --------
    >>> from contourkit.catalogue import quartic_flow
    >>> round(omega_max(quartic_flow(kappa=0.05, Lambda=2.5, branch="superluminal", D=0.5)), 6)
    0.501271
    >>> omega_max(quartic_flow(kappa=0.05, Lambda=2.5, branch="superluminal")) is None
    True
    """
    try:
        cs = model_cutoffs(model)
    except InputError:
        return None
    return cs[0].omega if cs else None


def mode_counts(model, omega):
    """Counts of in-, out-, growing and decaying modes in each asymptotic region at omega.

    Returns
    -------
    dict
        ``{"exterior": {...}, "interior": {...}, "total": {...}}`` with the keys
        of :func:`contourkit.profiles.planewaves.mode_count`.

    Examples
    --------
    >>> from contourkit.catalogue import quartic_flow
    >>> m = quartic_flow(kappa=0.05, Lambda=2.5, branch="superluminal", D=0.5)
    >>> mode_counts(m, 0.1)["total"]["in"], mode_counts(m, 0.7)["total"]["in"]
    (3, 2)
    """
    from .planewaves import asymptotic_modes, mode_count
    out = {side: mode_count(asymptotic_modes(model, float(omega), side)) for side in ("exterior", "interior")}
    out["total"] = {key: out["exterior"][key] + out["interior"][key] for key in out["exterior"]}
    return out


def cutoff_summary(model, *, below=0.5, above=1.5):
    """omega_max and the mode counts below and above it.

    Returns
    -------
    dict with keys ``omega_max`` (float or None), ``cutoffs`` (list of Cutoff),
    ``below`` and ``above`` (mode counts at ``below*omega_max`` and
    ``above*omega_max``, or None), and a human-readable ``message``.
    """
    cs = model_cutoffs(model)
    if not cs:
        return {"omega_max": None, "cutoffs": [], "below": None, "above": None,
                "message": "no cut-off: every branch exists at all omega > 0"}
    wm = cs[0].omega
    b, a = mode_counts(model, below * wm), mode_counts(model, above * wm)
    lost = {key: b["total"][key] - a["total"][key] for key in ("in+", "in-", "out+", "out-")}
    gone = ", ".join(f"{v} {key} mode(s)" for key, v in lost.items() if v > 0) or "no mode"
    return {"omega_max": wm, "cutoffs": cs, "below": b, "above": a,
            "message": f"omega_max = {wm:.10g} ({cs[0].side}); above it {gone} are absent"}


__all__ = ["Cutoff", "cutoffs", "quartic_dispersion", "omega_max_uniform", "model_cutoffs",
           "omega_max", "mode_counts", "cutoff_summary"]
