"""Direct position-space S-matrix of a full (not linearised) profile.

The independent check of the near-horizon contour method (DESIGN.md, step 9):
for a profile that joins two uniform asymptotic regions, integrate the full
mode equation ``L = sum_n c_n(x) d^n/dx^n`` (left form of the symmetric
operator, :func:`contourkit.symbolic.symmetric.from_symmetric`) across the window and
decompose the solutions into the plane-wave modes of the window ends.

Method (chosen for stability against growing and decaying modes)
-------------------------------------------------------------------
*Multiple shooting with spectral segments and a global boundary-value solve.*

1. The window ``[a, b]`` is cut into short segments whose length h obeys
   ``h * max|k(x)| <= step`` (k: the local roots of ``D(omega, k; x)``, so
   that every solution, oscillating or evanescent, changes by at most
   ``e^step`` over a segment).
2. On each segment the first-order system ``Y' = A(x) Y`` for the scaled
   state ``Y_c = phi^(c) / K^c`` is solved for the identity initial
   condition by Chebyshev collocation (``points`` nodes; spectrally
   accurate), giving a well-conditioned transfer matrix ``Phi_s``.
3. The transfer matrices are never multiplied together (their product
   would be swamped by the growing modes, exp(|Im k| L) ~ 1e190 over a window
   of a few hundred).  Instead the unknown states at all segment ends, the
   mode amplitudes at the two window ends, the continuity conditions
   ``Y_{s+1} = Phi_s Y_s`` and the boundary conditions (no growing mode at
   either end; unit amplitude on one in-mode, zero on the others) form one
   sparse, block-banded linear system solved by sparse LU.  Posed with the
   dichotomy-respecting boundary conditions this system is well conditioned
   (it is a discretised boundary-value problem, not an initial-value one).
4. The window ends must be uniform: the modes there are the local plane
   waves (roots of D at the actual end positions, i.e. first-order WKB
   modes), flux normalised ``|a|^2 |dD/dk| = 1/(2 pi)``, with phases
   referred to the horizon.  The default window puts each end where the
   profile is uniform to 1e-16 relative (40-digit evaluation), which for a
   tanh profile is ``kappa |x| / D ~ 20``; the long-wavelength modes, whose
   wavelength may exceed the window, are then exact plane waves at the ends.
5. The computation is repeated with ``points + 8`` nodes per segment; the
   difference estimates the error and more nodes are added until it is below
   ``rtol``.

References
----------
.. [1] U. M. Ascher, R. M. M. Mattheij, R. D. Russell, Numerical Solution of
   Boundary Value Problems for ODEs, SIAM (1995), ch. 4 (multiple shooting,
   dichotomy and conditioning).
.. [2] L. N. Trefethen, Spectral Methods in MATLAB, SIAM (2000), ch. 6
   (Chebyshev differentiation matrices).
.. [3] J. Macher, R. Parentani, Phys. Rev. D 79 (2009) 124008 (tanh flows with
   quartic dispersion; the direct numerical S-matrix).

Examples
--------
>>> from contourkit.catalogue import quartic_flow
>>> from contourkit.direct import scatter
>>> m = quartic_flow(kappa=0.05, Lambda=2.5, branch="superluminal", D=0.5)
>>> res = scatter(m, 0.05)
>>> res.unitarity_residual < 1e-8, len(res.in_modes)
(True, 3)
>>> abs(res.effective_temperature / res.hawking_temperature - 1) < 0.03
True
"""
import math
import warnings

import numpy as np
import scipy.sparse as sps
from threadpoolctl import threadpool_limits
import scipy.sparse.linalg as spla

from ..scattering.oriented import oriented_figures
from .cutoff import model_cutoffs
from ..errors import AccuracyWarning, InputError, ScatteringError
from .planewaves import (asymptotic_dispersion, centre, default_window, deviation, dispersion_callables,
                         local_modes, local_roots)
from ..scattering.results import Mode, ScatteringResult, pseudo_unitarity_residual
from .collocation import _nodes, _transfer, _window, left_form
from .unstable import unstable_modes  # noqa: F401  (ck.direct.unstable_modes, DESIGN.md)

#: BLAS threads of the dense solves: the matrices are small (at most a few hundred rows), for which
#: one thread is fastest, and a thread per core slows down badly when other programs run (common practice)
BLAS_THREADS = 1
#: relative distance from a cut-off inside which scatter() refuses to work
CUTOFF_GUARD = 1e-9

#: largest |Im omega| / Re omega for which scatter() continues the real-frequency mode labels
COMPLEX_LIMIT = 0.5



def _check_omega(omega):
    """A real omega > 0 (float), or a complex omega with Re omega > 0 and a small Im omega (complex)."""
    if isinstance(omega, (complex, np.complexfloating)) and complex(omega).imag != 0:
        w = complex(omega)
        if not (math.isfinite(w.real) and math.isfinite(w.imag)) or w.real <= 0:
            raise InputError(f"omega must be a positive real number, or complex with Re omega > 0, got {omega!r}; "
                             f"the in/out labels of a complex frequency are continued from real Re omega > 0 "
                             f"(for modes with Re omega = 0 use ck.direct.unstable_modes)")
        if abs(w.imag) > COMPLEX_LIMIT * w.real:
            raise InputError(f"|Im omega| = {abs(w.imag):g} is more than {COMPLEX_LIMIT:g} Re omega: scatter() "
                             f"continues the in/out labels from the real frequency Re omega only for small "
                             f"|Im omega|; use ck.direct.unstable_modes to find modes further from "
                             f"the real axis")
        return w
    try:
        w = float(omega.real if isinstance(omega, (complex, np.complexfloating)) else omega)
    except (TypeError, ValueError):
        raise InputError(f"omega must be a positive real number, got {omega!r}")
    if not math.isfinite(w) or w <= 0:
        raise InputError(f"omega must be a positive finite real number, got {omega!r}; the direct solver "
                         f"works at one frequency with Re omega > 0")
    return w


def _continued_modes(model, w, x, side, *, steps=16):
    """Plane-wave modes at complex w, each root continued from its labelled root at Re w.

    The roots are followed along the straight path from Re w to w; a step in
    which some root moves by more than a quarter of its distance to the other
    roots is halved (down to 1/1024 of the path), else the labels are refused.
    Each mode keeps the side, direction, norm and kind of its real-frequency
    root; propagating modes get the analytic continuation of the unit-flux
    amplitude, ``(2 pi sigma dD/dk)^(-1/2)`` with sigma the sign of dD/dk at Re w.
    """
    base = local_modes(model, w.real, x, side)
    ks = np.array([md.k for md in base], dtype=complex)
    t, dt_ = 0.0, 1.0 / steps
    while t < 1.0:
        h = min(dt_, 1.0 - t)
        roots = local_roots(model, complex(w.real, w.imag * (t + h)), x)
        d = np.abs(ks[:, None] - roots[None, :])
        j = np.argmin(d, axis=1)
        sep = np.abs(roots[:, None] - roots[None, :]) + np.diag(np.full(len(roots), np.inf))
        moved = d[np.arange(len(ks)), j]
        if len(set(j.tolist())) == len(ks) and np.all(moved <= 0.25 * sep.min(axis=1)[j]):
            ks, t = roots[j], t + h
            continue
        if h < 1.0 / 1024:
            raise InputError(f"the plane-wave roots at x = {x:g} come too close between Re omega and omega = {w:g} "
                             f"for the in/out labels to continue from the real axis; take a smaller |Im omega| "
                             f"or use ck.direct.unstable_modes")
        dt_ = h / 2
    cD, _ = dispersion_callables(model)
    c = np.array([complex(f(w, x)) for f in cD])
    out = []
    for md, k in zip(base, ks):
        data = dict(md.data)
        if md.kind == "propagating":
            Dk = complex(sum(n * c[n] * k ** (n - 1) for n in range(1, len(c))))
            data["amplitude"] = 1.0 / np.sqrt(2 * math.pi * math.copysign(1.0, md.data["dD_dk"]) * Dk)
            data["dD_dk"] = Dk
        elif (k.imag < 0) != (md.k.imag < 0):
            raise InputError(f"the evanescent root at x = {x:g} crosses the real k axis between Re omega and "
                             f"omega = {w:g}; take a smaller |Im omega|")
        out.append(Mode(side=md.side, direction=md.direction, norm=md.norm, kind=md.kind, k=complex(k),
                        group_velocity=md.group_velocity, origin=md.origin, x=md.x, data=data))
    return out


def _mode_columns(modes, xe, xh, K):
    n = len(modes)
    E = np.empty((n, n), dtype=complex)
    for j, md in enumerate(modes):
        k = md.k
        vec = (1j * k / K) ** np.arange(n)
        if md.kind == "propagating":
            kk = k.real if k.imag == 0 else k          # complex k: a label continued to complex omega
            vec = vec * md.data["amplitude"] * np.exp(1j * kk * (xe - xh))
        E[:, j] = vec
    return E


def _solve(Phi, EL, ER, fixed_zero, in_idx):
    """Global sparse solve; returns all 2n end amplitudes for each in-mode (columns)."""
    M, n, _ = Phi.shape
    nY = n * (M + 1)
    nz = nY + 2 * n
    rows, cols, vals = [], [], []

    def put(r, c, v):
        rows.append(r), cols.append(c), vals.append(v)

    r0 = 0
    ii, jj = np.meshgrid(np.arange(n), np.arange(n), indexing="ij")
    for s in range(M):
        rows.extend((r0 + np.arange(n)).tolist()); cols.extend((n * (s + 1) + np.arange(n)).tolist())
        vals.extend([1.0] * n)
        rows.extend((r0 + ii).ravel().tolist()); cols.extend((n * s + jj).ravel().tolist())
        vals.extend((-Phi[s]).ravel().tolist())
        r0 += n
    for E, yoff, aoff in ((EL, 0, nY), (ER, n * M, nY + n)):
        for c in range(n):
            put(r0 + c, yoff + c, 1.0)
        rows.extend((r0 + ii).ravel().tolist()); cols.extend((aoff + jj).ravel().tolist())
        vals.extend((-E).ravel().tolist())
        r0 += n
    rhs_rows = []
    for z in fixed_zero:
        put(r0, nY + z, 1.0); r0 += 1
    for z in in_idx:
        put(r0, nY + z, 1.0); rhs_rows.append(r0); r0 += 1
    if r0 != nz:
        raise ScatteringError(f"internal error: {r0} equations for {nz} unknowns")
    Amat = sps.csc_matrix((np.array(vals, dtype=complex), (rows, cols)), shape=(nz, nz))
    B = np.zeros((nz, len(in_idx)), dtype=complex)
    for j, r in enumerate(rhs_rows):
        B[r, j] = 1.0
    try:
        sol = spla.splu(Amat).solve(B)
    except RuntimeError as exc:
        raise ScatteringError(f"the boundary-value system is singular ({exc}); omega may be at a bound state "
                              f"or a cut-off: move omega slightly") from exc
    return sol[nY:]


def scatter(model, omega, *, window=None, rtol=1e-10, points=16, max_points=64, step=3.0,
            uniform_tol=1e-9):
    """S-matrix of the full profile at one frequency by a stable position-space solve.

    Parameters
    ----------
    model : HorizonModel
        A model whose profile joins two uniform regions (e.g.
        ``quartic_flow(..., D=0.5)``) and whose leading coefficient does not
        vanish in the window (a dispersive model).
    omega : float or complex
        Frequency, > 0, not within 1e-9 (relative) of a cut-off.  A complex
        omega with ``Re omega > 0`` and ``|Im omega| <= 0.5 Re omega`` gives the
        analytic continuation of the S-matrix: every plane-wave root at the
        window ends is followed from ``Re omega`` to omega and keeps its
        real-frequency label (in/out, norm, growing/decaying), the unit-flux
        amplitudes are continued analytically, and the boundary conditions
        are those of real omega (unit amplitude on one in-mode, none on the
        others and on the growing modes).  The continuation is refused when
        two roots come too close on the way.  Its poles in ``Im omega > 0``
        are the unstable modes (:func:`contourkit.profiles.unstable.unstable_modes`);
        ``unitarity_residual`` is then
        ``max |S(conj omega)^dagger eta S(omega) - eta|`` (pseudo-unitarity
        continued off the real axis) and ``effective_temperature`` is None.
    window : (float, float), optional
        Integration window ``(a, b)`` containing the horizon, with uniform ends.
        Default: ends where the profile is uniform to 1e-16 (relative).
    rtol : float
        Target accuracy of the S-matrix entries (unit-flux normalised).
    points : int
        Initial Chebyshev nodes per segment; the S-matrix is computed with
        ``points`` and ``points + 8`` nodes and, while the two differ by more
        than ``rtol``, again with 8 more, up to ``max_points``.
    step : float
        Segment length times the largest local |k|.
    uniform_tol : float
        Largest accepted relative deviation of the profile from uniform at a
        user-given window end.

    Returns
    -------
    ScatteringResult
        ``method="direct"``; ``extra`` holds the window, segment count, nodes
        per segment, the end deviations and the resolution difference.

    Raises
    ------
    InputError
        Bad omega, rtol or window; a profile that is not uniform at the
        window ends; omega at a cut-off.
    HorizonError
        A window that does not contain the horizon.
    ScatteringError
        A singular mode equation (leading coefficient vanishing) or a mode
        count that does not allow an S-matrix.

    Examples
    --------
    >>> from contourkit.catalogue import quartic_flow
    >>> m = quartic_flow(kappa=0.05, Lambda=2.5, branch="subluminal", D=0.5)
    >>> r = scatter(m, 0.05)
    >>> [md.name for md in r.in_modes]
    ['ext-in-', 'ext-in+', 'ext-in+']
    """
    from ..symbolic.horizon import HorizonModel
    if not isinstance(model, HorizonModel):
        raise InputError(f"direct.scatter needs a horizon model with a full profile (catalogue model with D=..., "
                         f"dielectric_front(), a model file or HorizonModel), got {type(model).__name__}; a bare "
                         f"ModeEquation has no frequency or profile: use rep.evaluate for its solutions")
    w = _check_omega(omega)
    cplx = isinstance(w, complex)
    wr = w.real if cplx else w
    if not (isinstance(rtol, (int, float)) and 0 < rtol < 1):
        raise InputError(f"rtol must be a number in (0, 1), got {rtol!r}")
    if not (isinstance(points, int) and points >= 8):
        raise InputError(f"points must be an integer >= 8, got {points!r}")
    if not (isinstance(max_points, int) and max_points >= points + 8):
        raise InputError(f"max_points must be an integer >= points + 8 = {points + 8} (two resolutions are "
                         f"compared for the error estimate), got {max_points!r}")
    if not (isinstance(step, (int, float)) and 0 < step <= 20):
        raise InputError(f"step (segment length times max |k|) must be in (0, 20], got {step!r}")
    for side in ("exterior", "interior"):
        asymptotic_dispersion(model, side)      # InputError for a profile without uniform regions
    for c in model_cutoffs(model):
        if abs(wr - c.omega) <= CUTOFF_GUARD * c.omega:
            raise InputError(f"omega = {w!r} is at the cut-off omega_max = {c.omega!r} ({c.side} region, within "
                             f"{CUTOFF_GUARD:g} relative): two modes merge there and their flux normalisation "
                             f"diverges; move omega away from the cut-off (e.g. by 1e-6 relative)")
    a, b = _window(model, window)
    xh = centre(model)
    dev = {"interior": deviation(model, a, "interior"), "exterior": deviation(model, b, "exterior")}
    if window is not None:
        for side, d in dev.items():
            if d > uniform_tol:
                raise InputError(
                    f"the profile is not uniform at the window ends: at the {side} end it deviates by {d:.1e} "
                    f"(relative) from its asymptotic value (accepted: uniform_tol={uniform_tol:g}); widen the "
                    f"window (window=None chooses {tuple(round(v, 1) for v in default_window(model))}), use a "
                    f"tanh profile (D=...) or the near-horizon contour method")
    coeffs = left_form(model)
    n = model.order
    xs = np.linspace(a, b, 2001)
    lead = np.abs(coeffs(xs, w)[n])
    if lead.min() <= 1e-12 * max(lead.max(), 1e-300):
        xbad = xs[int(np.argmin(lead))]
        raise ScatteringError(
            f"the leading coefficient of the mode equation vanishes near x = {xbad:.4g} (a singular point, as "
            f"at the horizon of a non-dispersive flow); the direct solver integrates through the horizon and "
            f"needs a dispersive model (e.g. quartic_flow); use the contour method model.scatter(omega)")
    orientation = getattr(model, "orientation", None)
    # sides are physical: "exterior" is the subsonic side (x -> +infinity for a horizonless flow)
    if cplx:
        mL = _physical(_continued_modes(model, w, a, "interior"), orientation)
        mR = _physical(_continued_modes(model, w, b, "exterior"), orientation)
    else:
        mL = _physical(local_modes(model, w, a, "interior"), orientation)
        mR = _physical(local_modes(model, w, b, "exterior"), orientation)
    ends = mL + mR
    fixed_zero = [j for j, md in enumerate(ends) if md.kind == "growing"]
    in_idx = [j for j, md in enumerate(ends) if md.direction == "in"]
    out_idx = [j for j, md in enumerate(ends) if md.direction == "out"]
    if len(fixed_zero) + len(in_idx) != n:
        raise ScatteringError(
            f"mode count {len(in_idx)} in + {len(fixed_zero)} growing != order {n} at omega = {w:g}; the "
            f"bounded solutions cannot be labelled by in-modes (check omega against the cut-offs "
            f"{[round(c.omega, 8) for c in model_cutoffs(model)]})")
    in_idx = sorted(in_idx, key=lambda j: (ends[j].side != "exterior", ends[j].k.real))
    out_idx = sorted(out_idx, key=lambda j: (ends[j].side != "exterior", ends[j].k.real))
    nodes, kmax = _nodes(model, wr, a, b, step)
    K = max(kmax, 1e-3)
    EL = _mode_columns(mL, a, xh, K)
    ER = _mode_columns(mR, b, xh, K)
    def solve(N):
        return _solve(_transfer(coeffs, w, nodes, N, K), EL, ER, fixed_zero, in_idx)[out_idx, :]

    N = points
    with threadpool_limits(limits=BLAS_THREADS, user_api="blas"):     # restored on leaving
        prev = solve(N)
        while True:
            N += 8
            S = solve(N)
            err = float(np.max(np.abs(S - prev)))
            if err <= rtol or N + 8 > max_points:
                break
            prev = S
    in_modes = [ends[j] for j in in_idx]
    out_modes = [ends[j] for j in out_idx]
    eta_in = [md.norm for md in in_modes]
    eta_out = [md.norm for md in out_modes]
    message = f"{len(in_modes)} in-modes, {len(out_modes)} out-modes; window ({a:.6g}, {b:.6g})"
    if cplx:
        # analytic continuation of pseudo-unitarity: S(conj omega)^dagger eta S(omega) = eta
        wc = w.conjugate()
        ends_c = (_physical(_continued_modes(model, wc, a, "interior"), orientation)
                  + _physical(_continued_modes(model, wc, b, "exterior"), orientation))
        Sc = _solve(_transfer(coeffs, wc, nodes, N, K), _mode_columns(ends_c[:n], a, xh, K),
                    _mode_columns(ends_c[n:], b, xh, K), fixed_zero, in_idx)[out_idx, :]
        resid = float(np.max(np.abs(Sc.conj().T @ np.diag(np.asarray(eta_out, float)) @ S - np.diag(
            np.asarray(eta_in, float)))))
        message += ("; complex omega: S is the analytic continuation of the real-frequency S-matrix (labels "
                    "continued from Re omega; its poles in Im omega > 0 are the unstable modes, see "
                    "ck.direct.unstable_modes); unitarity_residual is max|S(conj omega)^dagger eta "
                    "S(omega) - eta|; the thermal figures of a complex frequency are not a spectrum "
                    "(effective_temperature None)")
    else:
        resid = pseudo_unitarity_residual(S, eta_out, eta_in)
    cuts = model_cutoffs(model)
    kappa = float(model.kappa) if model.kappa is not None else 0.0
    channel = True
    try:
        if model.horizon is None:
            raise _Horizonless()
        fig = oriented_figures(S, in_modes, out_modes, wr, kappa, orientation)
        # the Hawking mode is an out-mode (a column of S, an in-mode, for a white hole)
        reverse = orientation is not None and orientation.time_reversed
        hawking = (in_modes if reverse else out_modes)[fig["hawking_index"]]
        partners = out_modes if reverse else in_modes
        if not any(md.norm == -hawking.norm for md in partners):
            channel = False
            fig["effective_temperature"] = None
            where = ("omega is above the cut-off omega_max: " if cuts and wr > cuts[0].omega else "")
            message += (f"; {where}no mode of opposite norm to the Hawking mode exists in the asymptotic "
                        f"regions (no Hawking channel), so beta = 0, thermal_ratio = 0 and "
                        f"effective_temperature = None")
    except _Horizonless:
        channel = False
        fig = dict(hawking_index=None, alpha=0j, beta=0j, others={}, thermal_ratio=0.0, occupation=0.0,
                   effective_temperature=None, hawking_temperature=0.0)
        message += ("; horizonless flow: no Hawking channel (kappa = 0, thermal_ratio = 0, "
                    "effective_temperature = None); the mode conversion is in S")
    except ScatteringError:
        channel = False
        fig = dict(hawking_index=None, alpha=0j, beta=0j, others={}, thermal_ratio=0.0, occupation=0.0,
                   effective_temperature=None, hawking_temperature=kappa / (2 * math.pi))
        message += ("; omega is above the cut-off omega_max: there is no propagating out-going mode on the "
                    "exterior side (no Hawking channel), so beta = 0, thermal_ratio = 0 and "
                    "effective_temperature = None are reported")
    ratio_prev = _ratio(prev, in_modes, out_modes, fig, orientation)
    if fig["thermal_ratio"]:
        # resolution change of the ratio, and the noise floor of S (seen in the unitarity residual)
        # propagated to |beta/alpha|^2: 2 delta/|beta| + 2 delta/|alpha|
        floor = max(err, resid)
        ratio_err = max(abs(ratio_prev - fig["thermal_ratio"]) / fig["thermal_ratio"],
                        2 * floor / abs(fig["beta"]) + 2 * floor / abs(fig["alpha"]))
    else:
        ratio_err = err
    if fig["thermal_ratio"] > 0 and ratio_err > 1e-2:
        message += (f"; the thermal ratio {fig['thermal_ratio']:.2e} is at the level of the S-matrix error "
                    f"{err:.1e}: only its order of magnitude is meaningful")
    if cplx:
        fig["effective_temperature"] = None
    success = err <= rtol
    if not success:
        warnings.warn(f"direct.scatter: resolution difference {err:.2e} > rtol = {rtol:g} at omega = {w:g} "
                      f"with {N} Chebyshev nodes per segment; lower step= or raise max_points=",
                      AccuracyWarning, stacklevel=2)
        message += f"; accuracy {err:.1e} not reached rtol {rtol:g}"
    return ScatteringResult(
        omega=w, in_modes=in_modes, out_modes=out_modes, S=S, unitarity_residual=resid,
        hawking_index=fig["hawking_index"], alpha=fig["alpha"], beta=fig["beta"], others=fig["others"],
        thermal_ratio=fig["thermal_ratio"], occupation=fig["occupation"],
        effective_temperature=fig["effective_temperature"], hawking_temperature=fig["hawking_temperature"],
        kappa=kappa, dps=None, error_estimate=float(max(ratio_err, max(dev.values()))),
        success=success, message=message, method="direct",
        extra={"window": (a, b), "segments": len(nodes) - 1, "points": N, "resolution_difference": err,
               "end_deviation": dev, "step": step,
               **({"hawking_channel_of_S": "column"} if orientation is not None and orientation.time_reversed
                  else {})}, convention=orientation, hawking_channel=channel)


class _Horizonless(Exception):
    pass


def _physical(modes, orientation):
    """Side labels by physics: swap exterior/interior where the subsonic side is x < x_H."""
    if orientation is None or orientation.subsonic_side != "-x":
        return modes
    swap = {"exterior": "interior", "interior": "exterior"}
    for m in modes:
        m.side = swap[m.side]
    return modes


def _ratio(S, in_modes, out_modes, fig, orientation=None):
    """Thermal ratio of an S-matrix at another resolution (for the error estimate)."""
    if S is None or fig["hawking_index"] is None:
        return fig["thermal_ratio"]
    return oriented_figures(S, in_modes, out_modes, 1.0, 1.0, orientation)["thermal_ratio"]
