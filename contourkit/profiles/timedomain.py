"""Time-domain evolution of a full profile's mode equation: growth rates of instabilities.

The independent check of :func:`contourkit.profiles.unstable.unstable_modes`.  The
stationary operator of a model, ``L_omega = sum_n c_n(x; omega) d^n/dx^n``
(left form of the symmetric operator, the same one the direct solver uses),
is a polynomial of degree two in omega.  With ``phi ~ exp(-i omega t)`` the
frequency is ``omega -> i d/dt``, so

    sum_n [c_n0(x) + c_n1(x) i d_t - c_n2(x) d_t^2] d_x^n phi = 0,

with ``c_n(x; omega) = c_n0 + c_n1 omega + c_n2 omega^2`` (only c_02 may be
non-zero at second order).  For the flows of the catalogue this is
``(d_t + d_x v)(d_t + v d_x) phi - d_x^2 phi + s d_x^4 phi / Lambda^2 = 0`` up to
the symmetric ordering of the products of v and d_x.

Method
------
* Space: a uniform grid on the window of the direct solver (ends uniform to
  1e-16), extended on both sides by a uniform absorbing layer; the
  derivatives are central finite differences on an 11-point stencil
  (Fornberg weights; order 10 for d_x and d_x^2, 8 for d_x^3 and d_x^4).
* Absorbing layers: inside them ``d_t`` is replaced by ``d_t + sigma(x)``
  (every wave then decays as exp(-sigma t), whatever its wavenumber), with
  ``sigma`` rising smoothly as the cube of the depth into the layer, so that
  the layer reflects little.
* Time: the first-order system for ``(phi, d_t phi)`` is advanced by the
  implicit midpoint (Crank-Nicolson) rule, A-stable, with one sparse LU
  factorisation; its relative error on a growth rate is ``~ (|omega| dt)^2/12``.
* Growth rate: the field at a few points of the cavity is sampled at late
  times; a matrix pencil fit (sum of a few complex exponentials) gives the
  dominant exponent ``-i omega`` of the time-stepped system, and the
  inverse of the Crank-Nicolson map ``z = (1 + lambda dt/2)/(1 - lambda dt/2)``
  gives the exponent of the semi-discrete system exactly.  The fit is
  repeated on an earlier late window and with layers 3/4 as thick; the
  larger change is the error estimate.

The geometry is the same open profile as in the frequency domain; only the
outer boundary treatment (layers instead of exact plane waves) differs.

References
----------
.. [1] B. Fornberg, Math. Comp. 51 (1988) 699 (finite-difference weights).
.. [2] Y. Hua, T. K. Sarkar, IEEE Trans. Acoust. Speech Signal Process. 38
   (1990) 814 (matrix pencil method).
.. [3] J. Macher, R. Parentani, Phys. Rev. D 79 (2009) 124008 (time-domain
   integration of wave equations on tanh flows; from memory).

Examples
--------
>>> from contourkit.catalogue import horizon_pair
>>> m = horizon_pair(kappa=0.25, Lambda=1.0, D=0.5, L=2.5)
>>> g = growth_rate(m, t_max=700.0)
>>> g.success, round(g.growth_rate, 3)
(True, 0.038)
"""
import math
from dataclasses import dataclass, field

import numpy as np
import scipy.sparse as sps
import scipy.sparse.linalg as spla
import sympy as sp
from threadpoolctl import threadpool_limits

from .collocation import _window
from ..errors import InputError, ModelError
from .planewaves import OMEGA, X


@dataclass
class GrowthResult:
    """Dominant exponential growth of a time-domain evolution.

    Attributes
    ----------
    growth_rate : float
        Im omega of the dominant exponent.
    omega : complex
        The dominant complex frequency, with ``Re omega >= 0`` (the real
        field also holds ``-conj(omega)``).
    error_estimate : float
        Difference of the growth rates fitted on two late time windows.
    times : ndarray
        Sample times.
    samples : ndarray, shape (len(times), n_probes)
        The field at the probe points, rescaled by a common factor.
    probes : ndarray
        Probe positions.
    grid : (dx, dt, number of grid points)
    domain : (float, float)
        Grid ends (window plus layers).
    dps : None
        Double precision.
    success : bool
        A growing exponent was found and the two fits agree to ``rtol``.
    message : str
    """
    growth_rate: float
    omega: complex
    error_estimate: float
    times: np.ndarray = field(repr=False)
    samples: np.ndarray = field(repr=False)
    probes: np.ndarray = field(repr=False)
    grid: tuple = field(repr=False, default=None)
    domain: tuple = field(repr=False, default=None)
    dps: int = None
    success: bool = True
    message: str = ""

    def __repr__(self):
        return (f"GrowthResult(growth_rate={self.growth_rate:.8g}, omega={self.omega:.8g}, "
                f"error_estimate={self.error_estimate:.1e},\n             success={self.success})")


def fd_weights(order, offsets):
    """Finite-difference weights of the derivative ``order`` on the stencil ``offsets`` (Fornberg 1988)."""
    z = np.asarray(offsets, dtype=float)
    n = len(z)
    c = np.zeros((n, order + 1))
    c1, c4 = 1.0, z[0]
    c[0, 0] = 1.0
    for i in range(1, n):
        mn = min(i, order)
        c2, c5, c4 = 1.0, c4, z[i]
        for j in range(i):
            c3 = z[i] - z[j]
            c2 *= c3
            if j == i - 1:
                for k in range(mn, 0, -1):
                    c[i, k] = c1 * (k * c[i - 1, k - 1] - c5 * c[i - 1, k]) / c2
                c[i, 0] = -c1 * c5 * c[i - 1, 0] / c2
            for k in range(mn, 0, -1):
                c[j, k] = (c4 * c[j, k] - k * c[j, k - 1]) / c3
            c[j, 0] = c4 * c[j, 0] / c3
        c1 = c2
    return c[:, order]


def time_domain_operator(model):
    """Coefficient callables ``{(m, p): g_mp(x)}`` of the symmetric form ``g_m(x; omega) = sum_p g_mp omega^p``.

    Raises
    ------
    ModelError
        If the operator is not a polynomial of degree <= 2 in omega with the
        omega^2 term only on the undifferentiated field.
    """
    out = {}
    for m, g in enumerate(model.g):
        poly = sp.Poly(sp.expand(g), OMEGA)
        if poly.degree() > 2:
            raise ModelError(f"the symmetric coefficient g_{m} is of degree {poly.degree()} in omega; the "
                             f"time-domain evolution handles equations of second order in time only")
        for (p,), cp in poly.terms():
            if p == 2 and m > 0:
                raise ModelError("omega^2 multiplies a derivative in x: the time-domain evolution needs the "
                                 "second time derivative on the undifferentiated field")
            out[(m, p)] = sp.lambdify(X, cp, "numpy")
    if (0, 2) not in out:
        raise ModelError("the mode equation has no omega^2 term: it is not second order in time")
    return out


def _derivatives(npts, dx, radius=5):
    """Staggered first difference Ds (nodes -> midpoints) and centred D1 (nodes -> nodes), zero outside."""
    half = np.arange(-radius, radius) + 0.5                        # 2 radius points, order 2 radius
    ws = fd_weights(1, half) / dx
    ws = 0.5 * (ws - ws[::-1])                                     # exactly antisymmetric
    # midpoint j + 1/2 uses nodes j + 1/2 + half
    Ds = sps.diags([np.full(npts - 1 - abs(int(h - 0.5)) if h > 0 else npts - 1 - abs(int(h + 0.5)), w)
                    for h, w in zip(half, ws)], [int(h + 0.5) for h in half], shape=(npts - 1, npts), format="csr")
    offs = np.arange(-radius, radius + 1)
    w1 = fd_weights(1, offs) / dx
    w1 = 0.5 * (w1 - w1[::-1])
    D1 = sps.diags([np.full(npts - abs(o), w1[i]) for i, o in enumerate(offs) if o != 0],
                   [o for o in offs if o != 0], shape=(npts, npts), format="csr")
    return Ds, D1


def _matrices(model, x, dx, sigma, radius=5):
    """Sparse operator of the first-order system ``d_t (phi, psi) = A (phi, psi)``.

    The symmetric pieces are discretised so that the discrete operator keeps
    the symmetry of the continuous one: with the staggered difference Ds
    (nodes to midpoints) and ``Lap = -Ds^T Ds``, ``d^j`` is ``R_j = Lap^(j/2)``
    (j even) or ``Ds Lap^((j-1)/2)`` (j odd), and

        S_2j[g]   -> (-1)^j R_j^T G R_j          (G = diag(g) at nodes or midpoints),
        S_2j+1[g] -> (E D1 + D1 E)/2,   E = the discrete S_2j[g],

    with the centred node difference D1 (antisymmetric).  The stiffness is
    then symmetric and the gyroscopic part skew (the discrete energy is
    conserved), and the even pieces have monotone symbols (no spurious
    short-wave copies of the long waves, which a centred D1^2 would have).
    """
    funcs = time_domain_operator(model)
    npts = len(x)
    Ds, D1 = _derivatives(npts, dx, radius)
    xm = 0.5 * (x[1:] + x[:-1])
    Lap = (-(Ds.T @ Ds)).tocsr()
    I = sps.identity(npts, format="csr")

    def R(j):
        out = I
        for _ in range(j // 2):
            out = Lap @ out
        return (Ds @ out).tocsr() if j % 2 else out.tocsr()

    def coef(m, p, at):
        f = funcs.get((m, p))
        return None if f is None else np.broadcast_to(np.asarray(f(at), dtype=complex), at.shape).astype(complex)

    def even(j, p, m):
        g = coef(m, p, xm if j % 2 else x)
        if g is None:
            return None
        Rj = R(j)
        return (-1) ** j * (Rj.T @ sps.diags(g) @ Rj)

    def op(p):
        total = sps.csr_matrix((npts, npts), dtype=complex)
        for m in range(model.order + 1):
            E = even(m // 2, p, m)
            if E is None:
                continue
            total = total + (E if m % 2 == 0 else 0.5 * (E @ D1 + D1 @ E))
        return total

    g02 = coef(0, 2, x)
    if np.min(np.abs(g02)) <= 1e-12 * np.max(np.abs(g02)):
        raise ModelError("the coefficient of omega^2 vanishes somewhere on the grid")
    inv = sps.diags(1.0 / g02)
    # K0 phi + K1 (i d_t phi) - g02 d_t^2 phi = 0
    P = inv @ op(0)
    Q = inv @ (1j * op(1))
    # phi_t = psi;  psi_t = P phi + Q psi - sigma psi: friction on d_t phi in the layers; the energy
    # 1/2 |psi|^2 - 1/2 <phi, P phi> is conserved without it and can only decrease with it
    A = sps.bmat([[None, I], [P, Q - sps.diags(sigma)]], format="csc")
    big = abs(A).max()
    if A.nnz and np.max(np.abs(A.imag.data)) <= 1e-13 * big:
        A = A.real.tocsc()
    return A


def evolve(model, *, t_max, dx=None, dt=None, window=None, layer=200.0, sigma_max=0.3, probes=None,
           sample_every=1.0, initial=None):
    """Evolve an initial perturbation of the full profile and sample the field at probe points.

    Parameters
    ----------
    model : HorizonModel
        A full profile with uniform ends and a mode equation of second order in time.
    t_max : float
        Final time.
    dx : float, optional
        Grid spacing; default ``0.3 / max|k|`` with k the largest local root
        at the cavity cut-off (or ``1/Lambda``-like scale of the model).
    dt : float, optional
        Time step; default 0.5 (the implicit midpoint rule is A-stable, and
        :func:`growth_rate` undoes its map of the exponents, so dt only needs
        to resolve the sampling).
    window : (float, float), optional
        Physical window (default: the direct solver's).
    layer : float
        Thickness of each absorbing layer beyond the window.
    sigma_max : float
        Damping rate at the outer end of each layer.
    probes : sequence of float, optional
        Positions where the field is sampled (default: three points between the horizons).
    sample_every : float
        Sampling interval in time.
    initial : callable, optional
        ``phi(x)`` at t = 0 (with ``d_t phi = 0``); default a Gaussian of width 1
        centred 30% of the way from the white to the black horizon.

    Returns
    -------
    (times, samples, info)
    """
    if not all(hasattr(model, a) for a in ("g", "dispersion", "horizon", "order", "x")):
        raise InputError(f"expected a HorizonModel (e.g. contourkit.catalogue.horizon_pair(...)), got "
                         f"{type(model).__name__}")
    t_max = _positive("t_max", t_max)
    dt = 0.5 if dt is None else _positive("dt", dt)
    layer = _positive("layer", layer)
    sigma_max = _positive("sigma_max", sigma_max)
    sample_every = _positive("sample_every", sample_every)
    a, b = _window(model, window)
    xw = float(getattr(model, "white_horizon", a + 0.5 * (float(model.horizon) - a)))
    xb = float(model.horizon)
    if dx is None:
        from .planewaves import max_root_modulus
        w_ref = float(getattr(model, "cavity_omega_max", None) or 0.1)
        kmax = float(np.max(max_root_modulus(model, w_ref, np.linspace(a, b, 401))))
        dx = 0.3 / max(kmax, 1e-3)
    dx = _positive("dx", dx)
    lo, hi = a - layer, b + layer
    npts = int(math.ceil((hi - lo) / dx)) + 1
    if npts > 400_000:
        raise InputError(f"the grid would have {npts} points; raise dx or shorten the window/layers")
    x = lo + dx * np.arange(npts)
    depth = np.maximum(np.maximum(a - x, x - b), 0.0) / layer
    sigma = sigma_max * np.clip(depth, 0, 1) ** 3
    A = _matrices(model, x, dx, sigma)
    if probes is None:
        probes = [xw + f * (xb - xw) for f in (0.25, 0.5, 0.75)]
    probes = np.asarray([float(p) for p in probes])
    if np.any((probes < a) | (probes > b)):
        raise InputError(f"probe points must lie inside the window ({a:g}, {b:g}), got {probes}")
    if initial is None:
        x0 = xw + 0.3 * (xb - xw)
        phi0 = np.exp(-((x - x0) ** 2))
    else:
        phi0 = np.asarray(initial(x), dtype=A.dtype)
    y = np.concatenate([phi0, np.zeros(npts)]).astype(A.dtype)
    Id = sps.identity(2 * npts, format="csc", dtype=A.dtype)
    lu = spla.splu((Id - 0.5 * dt * A).tocsc())
    B = (Id + 0.5 * dt * A).tocsr()
    idx = [int(round((p - lo) / dx)) for p in probes]
    every = max(1, int(round(sample_every / dt)))
    nsteps = int(math.ceil(t_max / dt))
    times, samples, log_scale = [], [], 0.0
    for step in range(nsteps + 1):
        if step % every == 0:
            times.append(step * dt)
            samples.append(y[idx] * math.exp(log_scale) if log_scale < 700 else y[idx])
            big = np.max(np.abs(y))
            if not np.isfinite(big):
                raise InputError("the evolution overflowed; lower dt or check the model")
            if big > 1e100:
                y /= big
                log_scale += math.log(big)
        if step < nsteps:
            y = lu.solve(B @ y)
    info = {"dx": dx, "dt": dt, "npts": npts, "domain": (lo, hi), "probes": probes, "log_scale": log_scale}
    return np.array(times), np.array(samples), info


def _positive(name, v):
    if isinstance(v, bool) or not isinstance(v, (int, float, np.floating, np.integer)) or not math.isfinite(v) \
            or v <= 0:
        raise InputError(f"{name} must be a positive finite number, got {v!r}")
    return float(v)


def matrix_pencil(t, s, order, *, sv_tol=1e-9):
    """Exponents and late-time weights of ``s(t) ~ sum_j a_j exp(lambda_j t)`` (Hua and Sarkar 1990).

    Parameters
    ----------
    t : ndarray
        Uniform sample times.
    s : ndarray, shape (len(t),) or (len(t), n_probes)
        Samples (several probes share the exponents).
    order : int
        Largest number of exponentials; fewer are kept when the singular
        values of the data matrix fall below ``sv_tol`` times the largest
        (noise must not produce exponents).

    Returns
    -------
    (lam, weight) : exponents and ``max_probe |a_j exp(lambda_j t_end)|``.

    Examples
    --------
    >>> t = np.arange(0.0, 50.0, 0.5)
    >>> lam, w = matrix_pencil(t, np.exp((0.1 - 0.3j) * t) + 0.5 * np.exp(-0.2j * t), 4)
    >>> [complex(z) for z in sorted(np.round(lam, 10), key=lambda z: z.real)]
    [-0.2j, (0.1-0.3j)]
    """
    s = np.asarray(s, dtype=complex)
    s = s.reshape(len(t), -1)
    dt = t[1] - t[0]
    nt = len(t)
    Lp = nt // 2
    Y = np.vstack([np.array([s[i:i + Lp + 1, c] for i in range(nt - Lp)]) for c in range(s.shape[1])])
    _, sv, Vh = np.linalg.svd(Y, full_matrices=False)
    keep = max(1, min(order, int(np.sum(sv > sv_tol * sv[0]))))
    V = Vh[:keep].T
    z = np.linalg.eigvals(np.linalg.pinv(V[:-1]) @ V[1:])
    z = z[np.abs(z) > 0]
    lam = np.log(z.astype(complex)) / dt
    Vand = np.exp(np.outer(t - t[-1], lam))                       # referred to the last sample
    amp = np.linalg.lstsq(Vand, s, rcond=None)[0]                 # (keep, n_probes)
    return lam, np.max(np.abs(amp), axis=1)


def growth_rate(model, *, t_max=None, fit_span=None, order=6, rtol=1e-3, check_layer=True, **evolve_kw):
    """Dominant growth rate of an initial perturbation, from a time-domain evolution.

    Parameters
    ----------
    model : HorizonModel
    t_max : float
        Length of the evolution (default 1500).
    fit_span : float, optional
        Length of the late time window fitted (default ``t_max / 3``); a second
        fit on the window ending ``fit_span/2`` earlier gives the error estimate.
    order : int
        Number of complex exponentials in the matrix pencil fit.
    rtol : float
        Largest accepted relative error estimate.
    check_layer : bool
        Evolve a second time with absorbing layers 3/4 as thick and include
        the change of the growth rate in the error estimate (the layers'
        reflection is the leading error; the finite differences and, after
        the inversion of the Crank-Nicolson map, the time step add far less).
    **evolve_kw
        Passed to :func:`evolve` (dx, dt, window, layer, sigma_max, probes, ...).

    Returns
    -------
    GrowthResult
    """
    t_max = 1500.0 if t_max is None else _positive("t_max", t_max)
    fit_span = t_max / 3 if fit_span is None else _positive("fit_span", fit_span)
    if fit_span * 1.5 > t_max:
        raise InputError(f"fit_span = {fit_span:g} is too long for t_max = {t_max:g} (need 1.5 fit_span <= t_max)")
    with threadpool_limits(limits=1, user_api="blas"):
        w1, w2, t, s, info = _fit_run(model, t_max, fit_span, order, evolve_kw)
        err = abs(w1.imag - w2.imag)
        note = ""
        if check_layer:
            kw = dict(evolve_kw)
            kw["layer"] = 0.75 * float(evolve_kw.get("layer", 200.0))
            w3 = _fit_run(model, t_max, fit_span, order, kw)[0]
            err = max(err, abs(w3.imag - w1.imag))
            note = f"; with layers of {kw['layer']:g} the growth rate is {w3.imag:.8g}"
    ok = w1.imag > 0 and err <= rtol * abs(w1.imag)
    msg = (f"dominant omega = {w1:.8g} from a matrix pencil fit on t in [{t[-1] - fit_span:g}, {t[-1]:g}]; grid "
           f"dx = {info['dx']:.3g}, dt = {info['dt']:g}, {info['npts']} points" + note)
    if w1.imag <= 0:
        amp = np.max(np.abs(s[-1])) / max(np.max(np.abs(s[0])), 1e-300)
        msg += (f"; no growing exponent: the evolution is stable (or t_max is too short); the field at the "
                f"probes changed by a factor {amp:.1e} from t = 0 to t_max")
    elif not ok:
        msg += f"; error estimate {err:.1e} (relative {err / abs(w1.imag):.1e}) > rtol = {rtol:g}"
    return GrowthResult(growth_rate=float(w1.imag), omega=w1, error_estimate=float(err), times=t, samples=s,
                        probes=info["probes"], grid=(info["dx"], info["dt"], info["npts"]),
                        domain=info["domain"], success=ok, message=msg)


def _fit_run(model, t_max, fit_span, order, evolve_kw):
    """One evolution and the dominant omega fitted on the last two late windows."""
    t, s, info = evolve(model, t_max=t_max, **evolve_kw)
    s = s / max(np.max(np.abs(s[-1])), 1e-300)
    dt = info["dt"]

    def fit(t_end):
        sel = (t > t_end - fit_span) & (t <= t_end + 1e-9)
        lam, weight = matrix_pencil(t[sel], s[sel], order)
        j = int(np.argmax(weight))                       # the exponent that dominates at late times
        # undo the Crank-Nicolson map z = (1 + lambda dt/2)/(1 - lambda dt/2) of each eigenvalue of the
        # semi-discrete system: the time step then adds no error to the fitted exponent
        z = np.exp(lam[j] * dt)
        return complex(1j * (2 / dt) * (z - 1) / (z + 1))      # omega = i lambda

    w1 = fit(t[-1])
    w2 = fit(t[-1] - 0.5 * fit_span)
    return complex(abs(w1.real), w1.imag), complex(abs(w2.real), w2.imag), t, s, info
