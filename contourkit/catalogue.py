"""Ready models, each a :class:`contourkit.symbolic.horizon.HorizonModel`.

Conventions (all models): ``phi ~ exp(-i omega t + i k x)``; units with the
low-frequency wave speed c = 1; the fluid (or the front) moves towards -x
near the horizon, ``v(x) = -1 + kappa x + ...``; horizon at x = 0, exterior
(subsonic) side x > 0.  ``hole="white"`` gives the time reverse with the same
flow direction (``v(x) -> v(-x)``: subsonic side x < 0; ``model.orientation``).
Each dispersion function is normalised so that positive-norm modes have
``dD/domega > 0``.

References
----------
.. [1] W. G. Unruh, Phys. Rev. Lett. 46 (1981) 1351 (sonic analogue).
.. [2] W. G. Unruh, Phys. Rev. D 51 (1995) 2827; S. Corley, T. Jacobson,
   Phys. Rev. D 54 (1996) 1568 (quartic dispersion at a horizon).
.. [3] J. Macher, R. Parentani, Phys. Rev. D 79 (2009) 124008 (tanh profiles).
"""
import sympy as sp

from .symbolic._sym import exact
from .profiles.cutoff import omega_max_uniform
from .errors import InputError
from .symbolic.horizon import HorizonModel

_w, _k, _x = sp.symbols("omega k x")


def _positive(name, value):
    try:
        v = float(value)
    except (TypeError, ValueError):
        raise InputError(f"{name} must be a positive number, got {value!r}")
    if not (v > 0) or v != v or v == float("inf"):
        raise InputError(f"{name} must be a positive finite number, got {value!r}")
    return exact(value)


def _flow_profile(kappa, D):
    if D is None:
        return -1 + kappa * _x, (-1e300, 1e300)
    D = _positive("D", D)
    if D >= 2:
        raise InputError(f"D = {D} >= 2 makes v = -1 + D tanh(kappa x / D) reach +1 on the exterior side (a second "
                         f"horizon, of the fluid moving towards +x); take 0 < D < 2")
    return -1 + D * sp.tanh(kappa * _x / D), None


def _hole_sign(hole):
    """+1 for a black hole (v = -1 + kappa x + ...), -1 for a white hole (v = -1 - kappa x + ...)."""
    if hole not in ("black", "white"):
        raise InputError(f"hole must be 'black' or 'white', got {hole!r}")
    return 1 if hole == "black" else -1


def nondispersive_flow(kappa=0.05, *, D=None, hole="black"):
    """Sound in a flow without dispersion: ``D = (omega - v k)^2 - k^2``.

    Parameters
    ----------
    kappa : float
        Surface gravity (flow gradient at the horizon), > 0.
    D : float, optional
        None: linear profile ``v = -1 + kappa x`` (exactly the near-horizon
        model); else ``v = -1 + D tanh(kappa x / D)``.
    hole : {"black", "white"}
        "white": the time reverse with the same flow direction,
        ``v = -1 - kappa x`` (or ``-1 - D tanh(kappa x / D)``): the fluid flows
        from the supersonic side x > 0 into the subsonic side x < 0.  Its
        S-matrix is the black hole's time reversed
        (:mod:`contourkit.scattering.oriented`); ``model.orientation`` states
        the convention.

    Notes
    -----
    Regime of validity: all omega > 0.  Without dispersion the near-horizon
    stationary S-matrix has no dispersive in-mode: the two out-going modes
    on either side (k -> 0 and k -> -omega) and the in-going one are all
    long-wavelength modes, and the thermal factor follows from the analytic
    structure at the branch point k = 0 (exponent sum ``-1 - i omega/kappa``).

    Examples
    --------
    >>> m = nondispersive_flow(kappa=0.05)
    >>> m.kappa
    0.05
    """
    kappa = _positive("kappa", kappa)
    v, _ = _flow_profile(kappa, D)
    v = v.subs(_x, _hole_sign(hole) * _x)
    m = HorizonModel.from_dispersion((_w - v * _k) ** 2 - _k ** 2, omega=_w, k=_k, x=_x, horizon=0.0,
                                     name="nondispersive flow" + (" (white hole)" if hole == "white" else ""),
                                     description="(omega - v k)^2 = k^2 with v = " + str(v))
    m.branch = None
    m.Lambda = None
    m.flow_D = D
    return m


def quartic_flow(kappa=0.05, Lambda=2.5, branch="superluminal", D=None, *, hole="black"):
    """Flow with quartic dispersion: ``(omega - v k)^2 = k^2 (1 +- k^2/Lambda^2)``.

    Parameters
    ----------
    kappa : float
        Surface gravity, > 0.
    Lambda : float
        Dispersive wavenumber scale, > 0; the near-horizon model is thermal
        for ``kappa << Lambda`` and ``omega << Lambda``.
    branch : {"superluminal", "subluminal"}
        Sign s = +1 (superluminal, like a condensate) or -1 (subluminal, like
        surface waves on deep water at long wavelength).
    D : float, optional
        None: ``v = -1 + kappa x``; else ``v = -1 + D tanh(kappa x / D)``
        with 0 < D < 2 (uniform asymptotic regions v -> -1 +- D; D = 1 makes
        the far exterior static, 1 < D < 2 reverses its flow, still subsonic).
    hole : {"black", "white"}
        "white": ``v(x) -> v(-x)`` (``v = -1 - kappa x`` near x = 0), the time
        reverse of the black hole with the same flow direction; subsonic side
        x < 0 (``model.orientation``).

    Notes
    -----
    ``D(omega, k; x) = (omega - v k)^2 - k^2 - s k^4/Lambda^2``.
    Superluminal: three in-modes (two dispersive ones of opposite norm from
    the interior, one counter-propagating from the exterior).  Subluminal:
    the dispersive in-modes arrive from the exterior.  Dispersive branches
    exist up to a cut-off ``omega_max`` in the asymptotic region (see
    ``model.omega_max``).

    Examples
    --------
    >>> m = quartic_flow(kappa=0.05, Lambda=2.5)
    >>> round(m.hawking_temperature, 6)
    0.007958
    """
    kappa = _positive("kappa", kappa)
    Lambda = _positive("Lambda", Lambda)
    if branch not in ("superluminal", "subluminal"):
        raise InputError(f"branch must be 'superluminal' or 'subluminal', got {branch!r}")
    s = 1 if branch == "superluminal" else -1
    v, _ = _flow_profile(kappa, D)
    v = v.subs(_x, _hole_sign(hole) * _x)
    Dfun = (_w - v * _k) ** 2 - _k ** 2 - s * _k ** 4 / Lambda ** 2
    m = HorizonModel.from_dispersion(Dfun, omega=_w, k=_k, x=_x, horizon=0.0,
                                     name=f"quartic {branch} flow" + (" (white hole)" if hole == "white" else ""),
                                     description=f"(omega - v k)^2 = k^2 (1 {'+' if s > 0 else '-'} k^2/Lambda^2), v = {v}")
    m.branch = branch
    m.Lambda = Lambda
    m.flow_D = None if D is None else exact(D)
    return m


def dielectric_front(u=0.6, resonances=((1.2, 1.0), (5.2, 3.0)), *, modulated=0, shift=0.05, width=20.0,
                     linear=False):
    """Light at a moving refractive-index front in a dielectric with oscillator resonances.

    The polarisation is a set of lossless oscillators, so the permittivity in
    the rest frame of the medium is
    ``eps(w) = 1 + sum_j s_j / (w_j^2 - w^2)`` (strength s_j, resonance w_j).
    The front moves through the medium; in the front's rest frame (c = 1) the
    medium moves towards -x with speed u, and the medium-frame frequency and
    wavenumber are ``w_L = g (omega + u k)``, ``k_L = g (k + u omega)`` with
    ``g = 1/sqrt(1 - u^2)``.  The front shifts one resonance frequency,
    ``w_m(x) = w_m (1 + shift tanh(x/width))``, which changes the
    low-frequency index ``n0^2 = 1 + sum_j s_j/w_j^2``; the horizon is where
    ``u n0(x) = 1``.  The dispersion function (polynomial after multiplying by
    the resonance denominators, normalised to positive-norm dD/domega > 0 on
    the low-frequency branch) is

        D = -[(k_L^2 - w_L^2) prod_j (w_j^2 - w_L^2) - w_L^2 sum_j s_j prod_{i != j} (w_i^2 - w_L^2)].

    Parameters
    ----------
    u : float in (0, 1)       front speed relative to the medium (units of c)
    resonances : sequence of (s_j, w_j) with s_j > 0, w_j > 0
    modulated : int           index of the resonance that the front shifts
    shift : float             relative shift of that resonance across the front
    width : float             width of the front (so kappa ~ shift/width)
    linear : bool             use the linearised profile (exact near-horizon model)

    Notes
    -----
    Our own scenario; the default values are not those of any experiment.
    The Hawking temperature refers to the low-frequency branch; the
    near-horizon model is thermal where kappa is small against the
    resonance frequencies.  Experiments with intense laser pulses that make
    such fronts are hazardous: follow your laboratory's laser-safety rules,
    the advice of its laser safety officer and local regulations (see
    docs/safety.md).

    Examples
    --------
    >>> m = dielectric_front()
    >>> m.kappa > 0
    True
    """
    u = _positive("u", u)
    if u >= 1:
        raise InputError(f"the front speed u = {u} must be below the speed of light (u < 1)")
    res = []
    try:
        for s_j, w_j in resonances:
            res.append((_positive("oscillator strength", s_j), _positive("resonance frequency", w_j)))
    except (TypeError, ValueError):
        raise InputError("resonances must be a sequence of (strength, frequency) pairs of positive numbers")
    if not res:
        raise InputError("give at least one resonance")
    if isinstance(modulated, bool) or not isinstance(modulated, int) or not 0 <= modulated < len(res):
        raise InputError(f"modulated must be the index of a resonance (0..{len(res) - 1}), got {modulated!r}")
    shift = _positive("shift", shift)
    width = _positive("width", width)
    g = 1 / sp.sqrt(1 - u ** 2)
    wL = g * (_w + u * _k)
    kL = g * (_k + u * _w)
    prof = (shift * _x / width) if linear else shift * sp.tanh(_x / width)
    ws = [w_j * (1 + prof) if j == modulated else w_j for j, (s_j, w_j) in enumerate(res)]
    prod_all = sp.Integer(1)
    for wj in ws:
        prod_all *= (wj ** 2 - wL ** 2)
    pol = sp.Integer(0)
    for j, (s_j, _) in enumerate(res):
        term = s_j
        for i, wi in enumerate(ws):
            if i != j:
                term *= (wi ** 2 - wL ** 2)
        pol += term
    D = -((kL ** 2 - wL ** 2) * prod_all - wL ** 2 * pol)
    D = sp.expand(D)
    n0sq = 1 + sum(s_j / w_j ** 2 for s_j, w_j in res)
    m = HorizonModel.from_dispersion(D, omega=_w, k=_k, x=_x, window=(-5 * width, 5 * width),
                                     name="dielectric front",
                                     description=f"oscillator dielectric, front speed u = {u}, "
                                                 f"{len(res)} resonances, resonance {modulated} shifted")
    m.front_speed = u
    m.resonances = res
    m.low_frequency_index = float(sp.sqrt(n0sq))
    return m


def horizon_pair(kappa=0.25, Lambda=1.0, D=0.5, L=5.0, branch="superluminal"):
    """A black-hole and a white-hole horizon a distance 2L apart: a supersonic cavity.

    The flow (towards -x, c = 1) is

        v(x) = -1 + D tanh(kappa (x - L)/D) tanh(kappa (x + L)/D),

    uniform and subsonic outside, ``v -> -1 + D`` as ``x -> +-infinity``, and
    supersonic inside the cavity ``|x| < L``, with ``v(0) = -1 - D tanh^2(kappa L/D)``.
    The horizons (``v = -1``) are exactly at ``x = +L`` (black hole: the fluid
    enters the supersonic region there) and ``x = -L`` (white hole).  The
    dispersion function is

        D(omega, k; x) = (omega - v(x) k)^2 - k^2 - s k^4/Lambda^2,

    with s = +1 (superluminal), quantised in symmetric (Weyl) order like
    :func:`quartic_flow`.

    Parameters
    ----------
    kappa : float
        Steepness of each tanh step, > 0.  The surface gravity of both horizons
        is ``kappa tanh(2 kappa L/D)`` (-> kappa for ``L >> D/kappa``).
    Lambda : float
        Dispersive wavenumber scale, > 0.
    D : float
        Step height, 0 < D < 1 (D >= 1 would stop or reverse the outer flow).
    L : float
        Half the distance between the horizons, > 0.
    branch : {"superluminal"}
        Only superluminal dispersion makes the cavity a laser (negative-norm
        modes are trapped between the horizons and grow).  "subluminal" is
        refused: there the dispersive modes escape through the subsonic
        outer regions and the cavity has no trapped negative-norm band.

    Returns
    -------
    HorizonModel
        ``horizon = L`` (the black-hole horizon, with the exterior x > L, as
        in every contourkit model), ``kappa`` as above, and the extra
        attributes ``branch``, ``Lambda``, ``flow_D``, ``L``, ``white_horizon = -L``,
        ``cavity_speed = 1 + D tanh^2(kappa L/D)`` and ``cavity_omega_max``:
        the cut-off of a uniform flow at the cavity speed (the unstable modes
        of the laser have ``0 < Re omega < cavity_omega_max``).

    Notes
    -----
    Regime: for ``0 < omega < cavity_omega_max`` the cavity holds four real
    roots, two of them negative-norm dispersive modes that bounce between the
    horizons; they make the discrete complex frequencies with Im omega > 0
    (black-hole laser), whose number grows with L [1]_, [2]_.  The outer
    regions (speed 1 - D) have no cut-off, so ``model.omega_max`` is None.
    For small L the cavity is shallow (depth ``D tanh^2(kappa L/D)``).

    References
    ----------
    .. [1] S. Corley, T. Jacobson, Phys. Rev. D 59 (1999) 124011.
    .. [2] A. Coutant, R. Parentani, Phys. Rev. D 81 (2010) 084042.

    Examples
    --------
    >>> m = horizon_pair(kappa=0.25, Lambda=1.0, D=0.5, L=5.0)
    >>> m.horizon, m.white_horizon
    (5.0, -5.0)
    >>> round(m.kappa, 6), round(m.cavity_speed, 6)
    (0.249977, 1.486704)
    """
    kappa = _positive("kappa", kappa)
    Lambda = _positive("Lambda", Lambda)
    L = _positive("L", L)
    Dh = _positive("D", D)
    if Dh >= 1:
        raise InputError(f"D = {Dh} >= 1 makes the outer flow speed 1 - D vanish or reverse; take 0 < D < 1 "
                         f"(the cavity speed is 1 + D tanh^2(kappa L/D))")
    if branch == "subluminal":
        raise InputError("horizon_pair supports branch='superluminal' only: with subluminal dispersion the "
                         "supersonic cavity traps no negative-norm band (the dispersive modes leave through the "
                         "subsonic outer regions), so it is not a laser; use quartic_flow(branch='subluminal', "
                         "hole=...) for single horizons")
    if branch != "superluminal":
        raise InputError(f"branch must be 'superluminal', got {branch!r}")
    v = -1 + Dh * sp.tanh(kappa * (_x - L) / Dh) * sp.tanh(kappa * (_x + L) / Dh)
    Dfun = (_w - v * _k) ** 2 - _k ** 2 - _k ** 4 / Lambda ** 2
    m = HorizonModel.from_dispersion(Dfun, omega=_w, k=_k, x=_x, horizon=float(L),
                                     name="superluminal horizon pair",
                                     description=f"(omega - v k)^2 = k^2 (1 + k^2/Lambda^2), v = {v}")
    m.branch = "superluminal"
    m.Lambda = Lambda
    m.flow_D = Dh
    m.L = L
    m.white_horizon = -float(L)
    m.cavity_speed = float(1 + Dh * sp.tanh(kappa * L / Dh) ** 2)
    m.cavity_omega_max = omega_max_uniform(m.cavity_speed, float(Lambda), "superluminal")
    return m
