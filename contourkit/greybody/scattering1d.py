"""Transmission through a 1D potential: Gamma, |R|^2 and their checks.

Method.  The transmitted solution is started at one end ("E1") with a purely
outgoing wave (the asymptotic series of an end at infinity, or the Frobenius
series at a horizon), integrated in the potential's own coordinate to the
other end ("E2") and decomposed there into the incident and reflected waves
of E2 by Wronskians with E2's two asymptotic solutions:

    psi = A psi_in + B psi_out,  A = W(psi, psi_out)/W(psi_in, psi_out),
    T = 1/A,  R = B/A,  Gamma = (k_1/k_2) |T|^2.

Gamma = k_1/(k_2 |A|^2) is computed from the growing solution's amplitude
itself: no difference of nearly equal numbers is formed, so an exponentially
small Gamma (a thick barrier: A ~ exp(+S)) keeps its relative accuracy; the
state is rescaled during the integration and ln Gamma is returned as well.
Where one end is evanescent (omega^2 below its limit) Gamma = 0 exactly and
the integration starts there with the decaying solution (|R| = 1 is then the
check).  The error estimate is the difference between two resolutions: the
step density raised by 1.6 and both start points moved outwards
(so a start point too near the potential shows up in the error).
"""
import cmath
import math
import numbers

import mpmath
import numpy as np

from ..errors import InputError
from ._odes import integrate_gl, integrate_mp, path_mesh
from .results import TransmissionResult

__all__ = ["transmission_sweep", "transmission_at"]


def _check_omega(omega):
    arr = np.asarray(omega)
    if arr.dtype == object:
        try:
            arr = arr.astype(complex)
        except (TypeError, ValueError):
            raise InputError("omega must be a real number or an array of real numbers.") from None
    if arr.dtype.kind == "b" or arr.dtype.kind not in "iufc":
        raise InputError(f"omega must be a real number or an array of real numbers (got {type(omega).__name__}).")
    if arr.dtype.kind == "c":
        if np.any(arr.imag != 0):
            raise InputError("omega must be real for transmission (got a complex value); complex "
                             "frequencies are the business of quasinormal_modes().")
        arr = arr.real
    arr = arr.astype(float)
    if not np.all(np.isfinite(arr)):
        raise InputError("omega must be finite (got NaN or infinity).")
    return arr


def _wave_number(omega2, V_end):
    d = omega2 - V_end
    if d >= 0:
        return complex(math.sqrt(d), 0.0)
    return complex(0.0, math.sqrt(-d))


def _W(a, b):
    return a[0] * b[1] - a[1] * b[0]


def _decompose(end, k, y, psi, tol, mp):
    out, _, ok1 = end.state(k, y, tol=tol, with_phase=True, mp=mp, which="out")
    inn, _, ok2 = end.state(k, y, tol=tol, with_phase=True, mp=mp, which="in")
    w0 = _W(inn, out)
    A = _W(psi, out) / w0
    B = _W(inn, psi) / w0
    return A, B


_MP_STAGES = 8


def _mp_density(rtol):
    """Step density of the raised-precision engine for a target error rtol/100.

    Measured with 8 Gauss-Legendre stages (order 16): density 1 gives about
    1e-16 relative error, and each doubling of the density gains about five
    digits (tests/greybody/test_transmission.py checks the result, not this rule).
    """
    q = -math.log10(rtol) + 2
    return max(1.0, 2.0 ** ((q - 16) / 5))


def _one_resolution(pot, omega, e1, e2, k1, k2, density, push, dps):
    """One solve; returns dict with A, B (scaled), log_scale and the mesh."""
    tol_series = 1e-17 if dps is None else 10.0 ** (-dps - 3)
    y1 = e1.start_point(k1, tol_series)
    y2 = e2.start_point(k2, tol_series)
    if push != 1.0:
        if e1.kind == "asymptotic":
            y1 = e1.y_base + (y1 - e1.y_base) * push
        if e2.kind == "asymptotic":
            y2 = e2.y_base + (y2 - e2.y_base) * push
    real1 = k1.imag == 0
    om2 = omega * omega
    if dps is None:
        psi0, _, _ = e1.state(k1, y1, tol=tol_series, with_phase=real1, which="out")
        (u, w), ls, mesh = integrate_gl(pot._coef_vec, om2, y1, y2, psi0, density=density)
        A, B = _decompose(e2, k2, y2, (u, w), tol_series, False)
        return {"A": complex(A), "B": complex(B), "ls": ls, "y": (y1, y2)}
    ts = path_mesh(pot._coef_vec, om2, y1, y2, density=density)
    mesh = [complex(y1) + t * (complex(y2) - complex(y1)) for t in ts]
    with mpmath.workdps(dps + 5):
        psi0, _, _ = e1.state(mpmath.mpc(k1), mpmath.mpc(y1), tol=tol_series, with_phase=real1,
                              mp=True, which="out")
        (u, w), ls_mp = integrate_mp(pot._coef_mp, mpmath.mpf(omega) ** 2, mesh, psi0,
                                     stages=_MP_STAGES, dps=dps + 5)
        A, B = _decompose(e2, mpmath.mpc(k2), mpmath.mpc(y2), (u, w), tol_series, True)
        return {"A": A, "B": B, "ls": ls_mp, "y": (y1, y2)}


def _zero_frequency(pot, rtol):
    """Gamma at omega = 0 exactly, when both limits vanish (a limit of omega -> 0)."""
    for e in (pot.left, pot.right):
        if e.kind == "asymptotic" and e.power_law:
            lead = next(((j, c) for j, c in enumerate(e.Uc) if j > 0 and abs(c) > 0), None)
            if lead is not None and lead[0] <= 2:
                if lead[1].real > 0:
                    return 0.0, 1.0, ("omega = 0: the repulsive 1/x^%d tail makes Gamma -> 0; "
                                      "the limit is returned" % lead[0])
                raise InputError("omega = 0 exactly with an attractive 1/x^%d tail: the zero-frequency "
                                 "limit is not computed; use a small omega instead." % lead[0])
    # bounded zero-energy solution from the left end, read a + b x* at the right end
    tol = 1e-17
    e1, e2 = pot.left, pot.right
    y1 = e1.start_point(1e-3, tol) if e1.kind == "horizon" else e1.y_base - 10 * pot.scale
    y2 = e2.y_base + 10 * pot.scale
    if e1.kind == "horizon":
        psi0, _, _ = e1.state(0.0, y1, tol=tol, with_phase=False, which="out")
    else:
        psi0 = (1.0 + 0j, 0j)
    (u, w), ls, _ = integrate_gl(pot._coef_vec, 0.0, y1, y2, psi0, density=1.6)
    length = abs(complex(pot.xstar_func(np.array([y2.real]))[0] - pot.xstar_func(np.array([y1.real]))[0])) \
        if e1.kind != "horizon" else abs(y2 - y1) / pot.right.D0
    if abs(w) * length < 1e-7 * abs(u):
        a = abs(u)
        g = 4 * a * a / (1 + a * a) ** 2
        return g, 1 - g, ("omega = 0: a bounded zero-frequency solution exists (zero-energy resonance); "
                          "Gamma(0) = 4 a^2/(1 + a^2)^2 with a its ratio of end values")
    return 0.0, 1.0, "omega = 0: no bounded zero-frequency solution, Gamma -> 0 (limit returned)"


def transmission_at(pot, omega, *, rtol=1e-10, dps=None):
    """Fields of the transmission at one real omega (dict)."""
    VL, VR = pot.limits
    om2 = omega * omega
    kL = _wave_number(om2, VL)
    kR = _wave_number(om2, VR)
    base = {"omega": omega, "k_left": kL, "k_right": kR, "dps": 15 if dps is None else dps}
    zero = lambda m, g=0.0, r=1.0, ok=True: dict(base, transmission=g, reflection=r, T=0j, R=complex(math.sqrt(r)),
                                                 log_transmission=math.log(g) if g > 0 else -math.inf,
                                                 residual=abs(g + r - 1), error=0.0, relative_error=0.0,
                                                 success=ok, message=m)
    if kL == 0 and kR == 0:
        g, r, m = _zero_frequency(pot, rtol)
        return zero(m, g, r)
    if kL.imag > 0 and kR.imag > 0:
        return zero("omega^2 is below both limits of V: no propagating wave at either end, no "
                    "scattering (see bound_states())", 0.0, 0.0, False)
    if kL == 0 or kR == 0:
        return zero("omega^2 equals the limit of V at one end: the wave number vanishes there and "
                    "Gamma = 0 (the limit omega -> threshold)")
    # choose the end to start from: an evanescent end, else a horizon, else the right end
    if kL.imag > 0:
        e1, e2, k1, k2 = pot.left, pot.right, kL, kR
    elif kR.imag > 0:
        e1, e2, k1, k2 = pot.right, pot.left, kR, kL
    elif pot.left.kind == "horizon":
        e1, e2, k1, k2 = pot.left, pot.right, kL, kR
    else:
        e1, e2, k1, k2 = pot.right, pot.left, kR, kL
    d = 2.0 if dps is None else _mp_density(rtol)
    ra = _one_resolution(pot, omega, e1, e2, k1, k2, d, 1.0, dps)
    rb = _one_resolution(pot, omega, e1, e2, k1, k2, 2 * d, 1.5, dps)
    res = []
    for r in (ra, rb):
        A, B, ls = r["A"], r["B"], r["ls"]
        if dps is None:
            Rr = B / A
            refl = abs(Rr) ** 2
            if k1.imag > 0:
                logg, g, T = -math.inf, 0.0, 0j
            else:
                logg = math.log(k1.real / k2.real) - 2 * (math.log(abs(A)) + ls)
                g = math.exp(logg) if logg > -745 else 0.0
                T = cmath.exp(-cmath.log(A) - ls)
        else:
            with mpmath.workdps(dps + 5):
                Rr = B / A
                refl = abs(Rr) ** 2
                if k1.imag > 0:
                    logg, g, T = -mpmath.inf, mpmath.mpf(0), mpmath.mpc(0)
                else:
                    logg = mpmath.log(mpmath.mpf(k1.real) / mpmath.mpf(k2.real)) - 2 * (mpmath.log(abs(A)) + ls)
                    g = mpmath.exp(logg)
                    T = mpmath.exp(-mpmath.log(A) - ls)
        res.append((g, refl, T, Rr, logg))
    (ga, rfa, _, _, _), (g, refl, T, Rr, logg) = res
    err = max(abs(g - ga), (2.2e-16 if dps is None else mpmath.mpf(10) ** (-dps)) * g)
    rel = float(err / g) if g > 0 else 0.0
    resid = abs(refl + g - 1)
    ok = rel <= rtol and float(resid) <= max(100 * rtol, 1e-12) and abs(refl - rfa) <= max(rtol, 1e-12)
    msg = "converged" if ok else (f"accuracy not reached: relative error {rel:.2g}, residual "
                                  f"{float(resid):.2g} (rtol {rtol:g}); try dps= or a larger rtol")
    if k1.imag > 0:
        msg = ("evanescent at the " + ("left" if e1 is pot.left else "right")
               + " end: Gamma = 0 exactly, |R| = 1; " + msg)
    if dps is None:
        T, Rr = complex(T), complex(Rr)
        logg = float(logg)
    else:
        logg = float(logg)
    if e1 is pot.left:
        # T was defined for incidence from the right: amplitudes are symmetric in |.|
        pass
    return dict(base, transmission=g, reflection=refl, T=T, R=Rr, log_transmission=logg,
                residual=resid if dps is not None else float(resid), error=err, relative_error=rel,
                success=bool(ok), message=msg)


def transmission_sweep(pot, omega, *, rtol=1e-10, dps=None):
    """Transmission at one omega or at an array of omegas (one ODE sweep each)."""
    if isinstance(rtol, bool) or not isinstance(rtol, numbers.Real) or not (0 < rtol < 1):
        raise InputError(f"rtol must be a number in (0, 1) (got {rtol!r}).")
    if dps is not None and (isinstance(dps, bool) or not isinstance(dps, numbers.Integral) or not 15 <= dps <= 200):
        raise InputError(f"dps must be an integer between 15 and 200 (got {dps!r}).")
    arr = _check_omega(omega)
    scalar = arr.ndim == 0
    flat = np.atleast_1d(arr).ravel()
    rows = [transmission_at(pot, float(w), rtol=rtol, dps=dps) for w in flat]
    keys = ["omega", "transmission", "reflection", "T", "R", "log_transmission", "residual", "error",
            "relative_error", "success", "message", "k_left", "k_right"]
    if scalar:
        r = rows[0]
        return TransmissionResult(dps=r["dps"], **{k: r[k] for k in keys})
    out = {}
    for k in keys:
        vals = [r[k] for r in rows]
        if k == "message":
            out[k] = vals
        elif dps is not None and k in ("transmission", "reflection", "T", "R", "residual", "error"):
            out[k] = np.array(vals, dtype=object).reshape(arr.shape)
        else:
            out[k] = np.array(vals).reshape(arr.shape)
    return TransmissionResult(dps=rows[0]["dps"], **out)
