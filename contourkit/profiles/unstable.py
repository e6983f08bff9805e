"""Unstable modes of a full profile: complex omega, Im omega > 0, no incoming waves.

A dynamical instability (the black-hole laser of a horizon pair with
superluminal dispersion) is a solution ``exp(-i omega t) phi(x)`` of the full
mode equation with ``Im omega > 0`` that contains, on each asymptotic side,
only waves that decay away from the profile.  For Im omega > 0 these are the
continuations of the out-going modes and of the decaying evanescent modes
(a wave emitted earlier, when the mode was smaller, is smaller further out),
so the condition is "no incoming mode" on either side.

Method
------
*Matching function.*  On the direct solver's discretisation (Chebyshev
multiple shooting, :mod:`contourkit.direct`) at a complex frequency, the
unknowns are the scaled states at all segment ends and the amplitudes of the
allowed plane waves at the two window ends (``Im k < 0`` at the left end,
``Im k > 0`` at the right end); the continuity conditions and the two end
conditions form one square sparse matrix ``A(omega)``.  It is singular exactly
at the modes.  The matching function is

    f(omega) = det A(omega) / [V_L V_R] * exp(i sum_L k (a - x_c) - i sum_R' k (b - x_c)),

with ``V_L, V_R`` the Vandermonde products of the allowed wavenumbers at each
end (so that f does not depend on their order and is analytic where two of
them merge), ``sum_L`` over the allowed left roots and ``sum_R'`` over the
excluded right roots (this factor removes most of the phase that the plane
waves accumulate across the window).  ``det A`` comes from the sparse LU
factors (product of the pivots and the permutation signs), kept as a
logarithm.  With the segment nodes frozen, f is analytic in the upper half
plane (no root crosses the real k axis there).

*Counting* (:mod:`contourkit.profiles.boxzeros`).  The argument principle on the
boundary of the search box (each edge sampled adaptively until the phase of f
changes by less than 0.5 rad and log|f| by less than 2 between neighbours)
gives the number of modes inside.

*Locating.*  The contour moments ``s_p = (1/2 pi i) oint omega^p f'/f`` give
first estimates (Delves and Lyness [1]_), each polished by a secant iteration
on ``log f`` deflated by the modes already found (no mode twice); when fewer
modes than the count are found the box is bisected and each half counted.

*Checking.*  Each mode's profile is the null vector of ``A`` (inverse
iteration); its residual is that of the mode equation ``L_omega phi = 0``
evaluated between the collocation nodes, where the discretisation did not
impose it, relative to the size of its terms, and of the global system.  The
search runs with ``points`` Chebyshev nodes per segment; each mode is then
located again with ``points + 8`` and ``points + 16``: the last gives the
reported omega and profile, the change between the two the error estimate.

The equation is real in position and time, so with omega also ``-conj(omega)``
is a mode (the same real field).  The default box reaches slightly into
``Re omega < 0`` so that modes on the imaginary axis (non-oscillating growth)
are inside it; only modes with ``Re omega >= 0`` are reported.

References
----------
.. [1] L. M. Delves, J. N. Lyness, Math. Comp. 21 (1967) 543 (zeros of an
   analytic function from contour integrals).
.. [2] S. Corley, T. Jacobson, Phys. Rev. D 59 (1999) 124011 (black-hole laser).
.. [3] A. Coutant, R. Parentani, Phys. Rev. D 81 (2010) 084042 (the unstable
   modes of a horizon pair: discrete complex frequencies; that some have
   Re omega = 0 is recalled from memory and seen here).

Examples
--------
>>> from contourkit.catalogue import horizon_pair
>>> m = horizon_pair(kappa=0.25, Lambda=1.0, D=0.5, L=1.0)
>>> found = unstable_modes(m)
>>> len(found), found.count
(0, 0)
"""
import math
import warnings
from dataclasses import dataclass, field

import numpy as np
import scipy.sparse as sps
import scipy.sparse.linalg as spla
from threadpoolctl import threadpool_limits

from .boxzeros import make_box, polish, search
from .cutoff import cutoffs
from .collocation import _cheb, _nodes, _transfer, _window, left_form
from ..errors import AccuracyWarning, InputError, ScatteringError
from .planewaves import X, asymptotic_dispersion, local_roots

@dataclass
class UnstableMode:
    """One unstable mode ``exp(-i omega t) phi(x)`` of a full profile.

    Attributes
    ----------
    omega : complex
        The frequency, ``Im omega > 0``.
    growth_rate : float
        ``Im omega``.
    residual : float
        Relative residual of ``L_omega phi = 0`` for the returned profile,
        evaluated between the collocation nodes (and of the global linear
        system), independent of the matching function used in the search.
    error_estimate : float
        ``|omega(points + 8) - omega(points + 16)|`` (search resolution ``points``).
    profile : tuple (x, phi)
        Positions (the collocation nodes of all segments) and the mode there,
        normalised to ``max |phi| = 1`` and real positive at its maximum.
    oscillating : bool
        False for a mode on the imaginary axis (``|Re omega|`` within ten times
        the error estimate, or 1e-10 omega_max, of zero): a growth without
        oscillation, its own mirror image.  True otherwise (then
        ``-conj(omega)`` is a second, mirror mode of the same real field).
    points : int
        Chebyshev nodes per segment.
    window : (float, float)
    dps : None
        Double precision.
    success : bool
        Residual and error estimate below the requested tolerances.
    message : str
    """
    omega: complex
    growth_rate: float
    residual: float
    error_estimate: float
    profile: tuple = field(repr=False)
    oscillating: bool = True
    points: int = 24
    window: tuple = None
    dps: int = None
    success: bool = True
    message: str = ""

    def __repr__(self):
        return (f"UnstableMode(omega={self.omega.real:.10g}{self.omega.imag:+.10g}j, "
                f"growth_rate={self.growth_rate:.6g},\n             residual={self.residual:.1e}, "
                f"error_estimate={self.error_estimate:.1e}, success={self.success})")


class ModeList(list):
    """The modes found (a list of :class:`UnstableMode`, by decreasing growth rate) and the search record.

    Attributes
    ----------
    box : (re_min, re_max, im_min, im_max)
        The search box in the complex omega plane.
    count : int
        Number of zeros of the matching function inside the box (argument principle).
    mirrors : int
        Zeros with Re omega < 0 (mirror images ``-conj(omega)`` of reported modes).
    evaluations : int
        Matching-function evaluations.
    success : bool
        Every counted zero was located and every mode is accurate.
    message : str
    """

    def __init__(self, modes, *, box, count, mirrors, evaluations, success, message):
        super().__init__(modes)
        self.box, self.count, self.mirrors = box, count, mirrors
        self.evaluations, self.success, self.message = evaluations, success, message

    @property
    def multiplicity(self):
        """Zeros in the whole upper half plane: oscillating modes twice (with their mirrors), the others once."""
        return sum(2 if md.oscillating else 1 for md in self)

    @property
    def dominant(self):
        """The mode with the largest growth rate (None if the list is empty)."""
        return self[0] if self else None

    def __repr__(self):
        return f"ModeList({len(self)} modes, count={self.count}, success={self.success})\n  {self.message}"


class _Matching:
    """The sparse matching system at one resolution, with frozen segment nodes."""

    def __init__(self, model, a, b, nodes, N, K):
        self.model, self.a, self.b, self.nodes, self.N, self.K = model, a, b, nodes, N, K
        self.coeffs = left_form(model)
        self.n = n = model.order
        self.xc = 0.5 * (a + b)
        self.M = M = len(nodes) - 1
        self.evaluations = 0
        nY = n * (M + 1)
        ii, jj = np.meshgrid(np.arange(n), np.arange(n), indexing="ij")
        s = np.arange(M)
        r_id = (n * s[:, None] + np.arange(n)[None]).ravel()
        c_id = (n * (s[:, None] + 1) + np.arange(n)[None]).ravel()
        r_phi = (n * s[:, None, None] + ii[None]).ravel()
        c_phi = (n * s[:, None, None] + jj[None]).ravel()
        self._base = (r_id, c_id, r_phi, c_phi, nY)

    def split(self, omega):
        """Allowed left roots (Im k < 0), allowed and excluded right roots (Im k > 0, < 0)."""
        kL = local_roots(self.model, omega, self.a)
        kR = local_roots(self.model, omega, self.b)
        scale = max(np.max(np.abs(kL)), np.max(np.abs(kR)), 1e-300)
        if min(np.min(np.abs(kL.imag)), np.min(np.abs(kR.imag))) <= 1e-13 * scale:
            raise ScatteringError(f"at omega = {omega:.6g} a plane-wave root at a window end is real to rounding: "
                                  f"the allowed modes are not defined there; keep Im omega away from 0 (im_min)")
        aL = sorted((k for k in kL if k.imag < 0), key=lambda k: (k.real, k.imag))
        aR = sorted((k for k in kR if k.imag > 0), key=lambda k: (k.real, k.imag))
        fR = [k for k in kR if k.imag < 0]
        if len(aL) + len(aR) != self.n:
            raise ScatteringError(f"{len(aL)} decaying modes at the left end and {len(aR)} at the right end do "
                                  f"not add up to the order {self.n}: no square matching problem at omega = "
                                  f"{omega:.6g}")
        return aL, aR, fR

    def matrix(self, omega, Phi=None):
        n, K, M = self.n, self.K, self.M
        aL, aR, fR = self.split(omega)
        if Phi is None:
            Phi = _transfer(self.coeffs, omega, self.nodes, self.N, K)
        r_id, c_id, r_phi, c_phi, nY = self._base
        pL, pR = len(aL), len(aR)
        EL = np.array([(1j * k / K) ** np.arange(n) for k in aL]).T.reshape(n, pL)
        ER = np.array([(1j * k / K) ** np.arange(n) for k in aR]).T.reshape(n, pR)
        r0 = n * M
        rows = [r_id, r_phi, r0 + np.arange(n), r0 + np.repeat(np.arange(n), pL),
                r0 + n + np.arange(n), r0 + n + np.repeat(np.arange(n), pR)]
        cols = [c_id, c_phi, np.arange(n), nY + np.tile(np.arange(pL), n),
                n * M + np.arange(n), nY + pL + np.tile(np.arange(pR), n)]
        vals = [np.ones(len(r_id)), -Phi.ravel(), np.ones(n), -EL.ravel(), np.ones(n), -ER.ravel()]
        nz = nY + pL + pR
        A = sps.csc_matrix((np.concatenate(vals).astype(complex), (np.concatenate(rows), np.concatenate(cols))),
                           shape=(nz, nz))
        return A, (aL, aR, fR)

    def logf(self, omega):
        """log f(omega) (complex; the imaginary part is defined modulo 2 pi)."""
        self.evaluations += 1
        A, (aL, aR, fR) = self.matrix(omega)
        try:
            lu = spla.splu(A)
        except RuntimeError:
            return complex(-np.inf, 0.0)
        d = lu.U.diagonal()
        if np.any(d == 0):
            return complex(-np.inf, 0.0)
        ld = complex(np.sum(np.log(d.astype(complex))))
        if _parity(lu.perm_r) != _parity(lu.perm_c):
            ld += 1j * math.pi
        for ks in (aL, aR):
            for i in range(len(ks)):
                for j in range(i + 1, len(ks)):
                    ld -= np.log(complex(ks[i] - ks[j]))
        ld += 1j * complex(sum(aL)) * (self.a - self.xc) - 1j * complex(sum(fR)) * (self.b - self.xc)
        return ld

    def mode(self, omega):
        """Null vector of A at omega (inverse iteration), the profile and its residual."""
        Phi, every = _transfer(self.coeffs, omega, self.nodes, self.N, self.K, full=True)
        A, _ = self.matrix(omega, Phi)
        try:
            lu = spla.splu(A)
            z = np.random.default_rng(1).standard_normal(A.shape[0]) + 0j
            for _ in range(3):
                z = lu.solve(z)
                z /= np.max(np.abs(z))
        except RuntimeError:          # exactly singular: the null vector from a dense SVD
            z = np.linalg.svd(A.toarray())[2][-1].conj()
            z /= np.max(np.abs(z))
        sys_res = float(np.max(np.abs(A @ z)) / (spla.norm(A, np.inf) * np.max(np.abs(z))))
        n, M, N = self.n, self.M, self.N
        Ys = z[:n * (M + 1)].reshape(M + 1, n)
        states = np.einsum("sicj,sj->sic", every, Ys[:M])            # (M, N, n)
        t, Dt = _cheb(N)
        h = np.diff(self.nodes)
        xi = self.nodes[:-1, None] + h[:, None] * (1 - t[None, :]) / 2
        ode_res = self._offnode_residual(omega, states, t, Dt, h)
        x = np.concatenate([xi[:, :-1].ravel(), [self.nodes[-1]]])
        phi = np.concatenate([states[:, :-1, 0].ravel(), [states[-1, -1, 0]]])
        i = int(np.argmax(np.abs(phi)))
        phi = phi * (abs(phi[i]) / phi[i]) / abs(phi[i])
        return x, phi, max(sys_res, ode_res)

    def _offnode_residual(self, omega, states, t, Dt, h):
        """``L_omega phi`` and the closure ``Y_j' = K Y_{j+1}`` between the nodes, relative."""
        n, K, N = self.n, self.K, self.N
        tm = np.cos(np.pi * (np.arange(N - 1) + 0.5) / (N - 1))        # between the nodes
        w = (-1.0) ** np.arange(N)
        w[0] *= 0.5
        w[-1] *= 0.5
        C = w[None, :] / (tm[:, None] - t[None, :])
        C /= C.sum(axis=1, keepdims=True)                             # barycentric interpolation
        Y = np.einsum("mi,sic->smc", C, states)                       # (M, N-1, n)
        dY = np.einsum("mi,ij,sjc->smc", C, Dt, states) * (-2.0 / h)[:, None, None]
        xm = self.nodes[:-1, None] + h[:, None] * (1 - tm[None, :]) / 2
        c = self.coeffs(xm.ravel(), omega).reshape(n + 1, *xm.shape)
        derivs = [K ** j * Y[..., j] for j in range(n)] + [K ** (n - 1) * dY[..., n - 1]]
        terms = np.array([c[j] * derivs[j] for j in range(n + 1)])
        ode = np.max(np.abs(terms.sum(axis=0))) / max(np.max(np.abs(terms).sum(axis=0)), 1e-300)
        clo = np.max(np.abs(dY[..., :n - 1] - K * Y[..., 1:])) / max(np.max(np.abs(K * Y[..., 1:])), 1e-300)
        return float(max(ode, clo))


def _parity(p):
    p = np.asarray(p)
    seen = np.zeros(len(p), dtype=bool)
    swaps = 0
    for i in range(len(p)):
        if not seen[i]:
            j, length = i, 0
            while not seen[j]:
                seen[j] = True
                j = p[j]
                length += 1
            swaps += length - 1
    return swaps % 2


def cavity_cutoff(model, window=None, *, samples=33):
    """Largest local cut-off frequency of the dispersion relation over the window, or None.

    For a horizon pair this is the cut-off of the deepest point of the cavity
    (the unstable modes have ``0 < Re omega`` below it).  A model built by
    :func:`contourkit.catalogue.horizon_pair` carries it as
    ``cavity_omega_max``, which is used when present; otherwise the local
    cut-offs (:func:`contourkit.profiles.cutoff.cutoffs` of ``D(omega, k; x)`` at fixed
    x) are sampled at ``samples`` points and the largest is refined by a
    bounded scalar maximisation.

    Examples
    --------
    >>> from contourkit.catalogue import horizon_pair
    >>> m = horizon_pair(kappa=0.25, Lambda=1.0, D=0.5, L=5.0)
    >>> round(cavity_cutoff(m), 6) == round(m.cavity_omega_max, 6)
    True
    """
    known = getattr(model, "cavity_omega_max", None)
    if known is not None:
        return float(known)
    import sympy as sp
    from scipy.optimize import minimize_scalar
    a, b = _window(model, window)

    def local(x0):
        D = sp.expand(sp.N(model.dispersion.subs(X, sp.Float(float(x0), 20)), 20))
        D = D.xreplace({f: sp.Rational(str(f)) for f in D.atoms(sp.Float)})   # exact: sympy's discriminant
        cs = cutoffs(D)
        return cs[0].omega if cs else 0.0

    xs = np.linspace(a, b, samples)
    vals = np.array([local(x0) for x0 in xs])
    if not np.any(vals > 0):
        return None
    i = int(np.argmax(vals))
    lo, hi = xs[max(i - 1, 0)], xs[min(i + 1, samples - 1)]
    res = minimize_scalar(lambda x0: -local(x0), bounds=(lo, hi), method="bounded",
                          options={"xatol": 1e-6 * (b - a)})
    return float(max(vals[i], -res.fun))


def _check_model(model):
    if not all(hasattr(model, a) for a in ("g", "dispersion", "horizon", "order", "x")):
        raise InputError(f"expected a HorizonModel (e.g. contourkit.catalogue.horizon_pair(...)), got "
                         f"{type(model).__name__}")


def _number(name, v, *, positive=False, allow_none=True):
    if v is None and allow_none:
        return None
    if isinstance(v, bool) or not isinstance(v, (int, float, np.floating, np.integer)):
        raise InputError(f"{name} must be a real number, got {v!r}")
    v = float(v)
    if not math.isfinite(v) or (positive and v <= 0):
        raise InputError(f"{name} must be a {'positive ' if positive else ''}finite number, got {v!r}")
    return v


def unstable_modes(model, *, omega_max=None, im_min=None, im_max=None, re_min=None, window=None,
                   points=16, step=3.0, tol=1e-8, uniform_tol=1e-9):
    """Every complex omega with Im omega > 0 in a box, with no incoming wave on either side.

    Parameters
    ----------
    model : HorizonModel
        A full profile that joins two uniform regions, with a dispersive
        (non-vanishing) leading coefficient, e.g.
        :func:`contourkit.catalogue.horizon_pair`.
    omega_max : float, optional
        Right edge of the search box, Re omega < omega_max.  Default: the
        cavity cut-off (:func:`cavity_cutoff`), beyond which no mode is trapped.
    im_min, im_max : float, optional
        Range of Im omega searched: default ``1e-6 omega_max`` and
        ``omega_max``.  Modes with a growth rate below im_min are not seen.
    re_min : float, optional
        Left edge, default ``-0.05 omega_max`` (so that modes on the
        imaginary axis lie inside; only Re omega >= 0 is reported).
    window : (float, float), optional
        Integration window with uniform ends (default as in
        :func:`contourkit.direct.scatter`).
    points : int
        Chebyshev nodes per segment in the search (>= 8); each mode is then
        located again with ``points + 8`` and ``points + 16`` nodes: the latter
        gives the reported values and profile, the difference the error estimate.
    step : float
        Segment length times the largest local |k|.
    tol : float
        Largest accepted residual and error estimate (relative to omega_max).
    uniform_tol : float
        Largest relative deviation from uniform at a user-given window end.

    Returns
    -------
    ModeList
        A list of :class:`UnstableMode` sorted by decreasing growth rate (empty
        when the box holds no mode; then ``message`` says so), with the box,
        the argument-principle count and the search record.

    Raises
    ------
    InputError
        Bad box, window, points or step; a profile without uniform ends.
    ScatteringError
        A singular mode equation (vanishing leading coefficient).
    AccuracyError
        A box whose boundary count cannot be made an integer.

    References
    ----------
    .. [1] L. M. Delves, J. N. Lyness, Math. Comp. 21 (1967) 543.
    .. [2] A. Coutant, R. Parentani, Phys. Rev. D 81 (2010) 084042.

    Examples
    --------
    >>> from contourkit.catalogue import horizon_pair
    >>> m = horizon_pair(kappa=0.25, Lambda=1.0, D=0.5, L=5.0)
    >>> modes = unstable_modes(m)
    >>> len(modes) >= 1 and all(md.residual < 1e-8 for md in modes)
    True
    """
    from .planewaves import default_window, deviation
    _check_model(model)
    for side in ("exterior", "interior"):
        asymptotic_dispersion(model, side)
    wmax = _number("omega_max", omega_max, positive=True)
    if wmax is None:
        wmax = cavity_cutoff(model, window)
        if wmax is None:
            raise InputError("the profile has no cut-off frequency anywhere in the window (no trapped band): "
                             "give the search box explicitly with omega_max=...")
    im_min = _number("im_min", im_min, positive=True)
    im_max = _number("im_max", im_max, positive=True)
    re_min = _number("re_min", re_min)
    im_min = 1e-6 * wmax if im_min is None else im_min
    im_max = wmax if im_max is None else im_max
    re_min = -0.05 * wmax if re_min is None else re_min
    if not im_min < im_max:
        raise InputError(f"im_min = {im_min:g} must be below im_max = {im_max:g}")
    if not re_min < wmax:
        raise InputError(f"re_min = {re_min:g} must be below omega_max = {wmax:g}")
    if not (isinstance(points, int) and not isinstance(points, bool) and points >= 8):
        raise InputError(f"points must be an integer >= 8, got {points!r}")
    if not (isinstance(step, (int, float)) and 0 < step <= 20):
        raise InputError(f"step (segment length times max |k|) must be in (0, 20], got {step!r}")
    tol = _number("tol", tol, positive=True, allow_none=False)
    a, b = _window(model, window)
    if window is not None:
        for side, x in (("interior", a), ("exterior", b)):
            d = deviation(model, x, side)
            if d > uniform_tol:
                raise InputError(f"the profile is not uniform at the {side} window end (relative deviation "
                                 f"{d:.1e} > uniform_tol={uniform_tol:g}); widen the window or use window=None "
                                 f"({tuple(round(v, 1) for v in default_window(model))})")
    coeffs = left_form(model)
    n = model.order
    xs = np.linspace(a, b, 2001)
    lead = np.abs(coeffs(xs, complex(0.5 * wmax, im_min))[n])
    if lead.min() <= 1e-12 * max(lead.max(), 1e-300):
        raise ScatteringError(f"the leading coefficient of the mode equation vanishes near x = "
                              f"{xs[int(np.argmin(lead))]:.4g}; unstable_modes needs a dispersive model")
    with threadpool_limits(limits=1, user_api="blas"):     # small dense blocks: one thread is fastest
        return _unstable(model, a, b, wmax, re_min, im_min, im_max, points, step, tol)


def _unstable(model, a, b, wmax, re_min, im_min, im_max, points, step, tol):
    nodes, kmax = _nodes(model, wmax, a, b, step)
    K = max(kmax, 1e-3)
    coarse = _Matching(model, a, b, nodes, points, K)
    box = make_box(coarse.logf, re_min, wmax, im_min, im_max)
    found, boxes = search(coarse.logf, box, wmax)
    middle = _Matching(model, a, b, nodes, points + 8, K)
    fine = _Matching(model, a, b, nodes, points + 16, K)
    modes, mirrors = [], 0
    for r in found:
        r1 = polish(middle.logf, r, [], wmax)
        r2 = None if r1 is None else polish(fine.logf, r1, [], wmax)
        if r2 is None:
            r2, err = r, math.inf
        else:
            err = abs(r2 - r1)
        axis = max(10 * err, 1e-10 * wmax)
        if r2.real < -axis:
            mirrors += 1
            continue
        x, phi, res = fine.mode(r2)
        ok = res <= tol and err <= tol * wmax
        msg = "" if ok else (f"residual {res:.1e} or error estimate {err:.1e} above tol = {tol:g}: lower step= or "
                             f"raise points=")
        modes.append(UnstableMode(omega=complex(r2), growth_rate=float(r2.imag), residual=res,
                                  error_estimate=float(err), profile=(x, phi), oscillating=abs(r2.real) > axis,
                                  points=points + 16,
                                  window=(a, b), success=ok, message=msg))
    modes.sort(key=lambda md: -md.growth_rate)
    complete = len(found) == box.count
    success = complete and all(md.success for md in modes)
    where = (f"Re omega in [{box.re0:.4g}, {box.re1:.4g}], Im omega in [{box.im0:.4g}, {box.im1:.4g}]")
    if box.count == 0:
        message = (f"no unstable mode in the box {where} (argument principle: 0 zeros); modes with growth rate "
                   f"below im_min = {box.im0:.3g} are not searched")
    else:
        message = (f"{len(modes)} unstable mode(s) with Re omega >= 0 ({mirrors} mirror image(s) -conj(omega) "
                   f"with Re omega < 0 not listed) in the box {where}; argument principle: {box.count} zero(s)")
        if not complete:
            message += f"; only {len(found)} of them located"
    if not success:
        warnings.warn("unstable_modes: " + message + "; some mode is not accurate to tol or not located",
                      AccuracyWarning, stacklevel=2)
    return ModeList(modes, box=(box.re0, box.re1, box.im0, box.im1), count=box.count, mirrors=mirrors,
                    evaluations=coarse.evaluations + middle.evaluations + fine.evaluations, success=success,
                    message=message)
