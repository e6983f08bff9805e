"""Time-domain evolution (contourkit.profiles.timedomain): the independent check of the unstable modes.

Scenario (our own values): horizon_pair(kappa=0.25, Lambda=1, D=0.5, L).  The growth rate of the
dominant unstable mode of the black-hole laser must agree with the frequency-domain search to 2%
(issue 16; the black-hole laser: S. Corley, T. Jacobson, Phys. Rev. D 59 (1999) 124011; A. Coutant,
R. Parentani, Phys. Rev. D 81 (2010) 084042).
"""
import math

import numpy as np
import pytest
import scipy.sparse as sps
import sympy as sp

from contourkit import errors
from contourkit.catalogue import horizon_pair
from contourkit.symbolic.horizon import HorizonModel
from contourkit.profiles.timedomain import (_derivatives, _matrices, evolve, fd_weights, growth_rate, matrix_pencil,
                                   time_domain_operator)
from contourkit.profiles.unstable import unstable_modes

KAPPA, LAMBDA, D = 0.25, 1.0, 0.5
_cache = {}


def _pair(L):
    if L not in _cache:
        _cache[L] = horizon_pair(kappa=KAPPA, Lambda=LAMBDA, D=D, L=L)
    return _cache[L]


def test_fd_weights_against_tables():
    # B. Fornberg, Math. Comp. 51 (1988) 699, Table 1 (centred weights)
    assert np.allclose(fd_weights(2, [-1, 0, 1]), [1, -2, 1], atol=1e-14)
    assert np.allclose(fd_weights(1, [-2, -1, 0, 1, 2]), [1 / 12, -2 / 3, 0, 2 / 3, -1 / 12], atol=1e-14)
    assert np.allclose(fd_weights(4, [-2, -1, 0, 1, 2]), [1, -4, 6, -4, 1], atol=1e-12)
    # a 10-point staggered first difference is exact on polynomials of degree 9 (common practice)
    half = np.arange(-5, 5) + 0.5
    w = fd_weights(1, half)
    assert abs(np.dot(w, half ** 9) - 0.0) < 1e-9 and abs(np.dot(w, half) - 1.0) < 1e-13


def test_difference_matrices_structure_and_accuracy():
    Ds, D1 = _derivatives(200, 0.2)
    x = 0.2 * np.arange(200)
    xm = 0.5 * (x[1:] + x[:-1])
    f = np.sin(0.7 * x)
    inner = slice(8, -8)
    # derivative of sin (exact: 0.7 cos); order-10 stencils on k dx = 0.14
    assert np.max(np.abs((Ds @ f - 0.7 * np.cos(0.7 * xm))[inner])) < 1e-9
    assert np.max(np.abs((D1 @ f - 0.7 * np.cos(0.7 * x))[inner])) < 1e-8
    assert abs(D1 + D1.T).max() == 0          # antisymmetric (no source needed)


def test_discrete_energy_is_conserved_without_layers():
    # E = 1/2 |psi|^2 - 1/2 <phi, P phi> is conserved by the symmetric discretisation, and the implicit
    # midpoint rule conserves quadratic invariants of linear systems exactly (common practice)
    m = _pair(2.5)
    x = np.arange(-40.0, 40.0, 0.25)
    A = _matrices(m, x, 0.25, np.zeros_like(x))
    n = len(x)
    P = A[n:, :n]
    Q = A[n:, n:]
    assert abs(P - P.T).max() <= 1e-12 * abs(P).max()
    assert abs(Q + Q.T).max() <= 1e-12 * abs(Q).max()
    y = np.concatenate([np.exp(-(x - 1.0) ** 2), np.zeros(n)])
    Id = sps.identity(2 * n, format="csc")
    lu = sps.linalg.splu((Id - 0.25 * A).tocsc())
    B = Id + 0.25 * A

    def energy(v):
        return 0.5 * v[n:] @ v[n:] - 0.5 * v[:n] @ (P @ v[:n])
    e0 = energy(y)
    for _ in range(200):
        y = lu.solve(B @ y)
    assert abs(energy(y) - e0) <= 1e-10 * (abs(e0) + np.max(np.abs(y)) ** 2)


def test_matrix_pencil_recovers_exponents():
    # a sum of known exponentials (exact data)
    t = np.arange(0.0, 80.0, 0.5)
    lam_true = [0.02 - 0.3j, 0.02 + 0.3j, -0.05 - 1.1j]
    s = sum(a * np.exp(l * t) for a, l in zip([1.0, 1.0, 0.3], lam_true))
    lam, w = matrix_pencil(t, s, 6)
    for l in lam_true:
        assert np.min(np.abs(lam - l)) < 1e-9


@pytest.mark.parametrize("L", [2.5, pytest.param(6.5, marks=pytest.mark.slow)])
def test_growth_rate_agrees_with_unstable_modes(L):
    dominant = unstable_modes(_pair(L)).dominant
    g = growth_rate(_pair(L), t_max=1500.0)
    assert g.success
    # issue 16: the two growth rates agree to 2% (measured: ~1e-6 relative)
    assert g.growth_rate == pytest.approx(dominant.growth_rate, rel=2e-2)
    assert g.growth_rate == pytest.approx(dominant.growth_rate, rel=1e-4)
    assert abs(g.omega.real - dominant.omega.real) <= 1e-4 * abs(dominant.omega)
    # the error estimate covers the difference
    assert abs(g.growth_rate - dominant.growth_rate) <= 10 * g.error_estimate + 1e-9


def test_stable_cavity_does_not_grow():
    # L = 1: the frequency-domain search finds no mode; the evolution decays
    assert len(unstable_modes(_pair(1.0))) == 0
    g = growth_rate(_pair(1.0), t_max=900.0, check_layer=False)
    assert not g.success and "no growing exponent" in g.message
    assert np.max(np.abs(g.samples[-1])) <= 1e-3 * np.max(np.abs(g.samples[0])) or g.growth_rate < 0


def test_bad_input():
    m = _pair(2.5)
    with pytest.raises(errors.InputError, match="t_max"):
        growth_rate(m, t_max=-1.0)
    with pytest.raises(errors.InputError, match="fit_span"):
        growth_rate(m, t_max=100.0, fit_span=90.0)
    with pytest.raises(errors.InputError, match="probe"):
        evolve(m, t_max=10.0, probes=[1e4])
    with pytest.raises(errors.InputError, match="dt"):
        evolve(m, t_max=10.0, dt=float("nan"))
    w, k, x, v = sp.symbols("omega k x v")
    first_order = HorizonModel.from_dispersion(-2 * w * v * k + (v ** 2 - 1) * k ** 2 - k ** 4, omega=w, k=k, x=x,
                                               profiles={v: -1 + sp.Rational(1, 2) * sp.tanh(x)}, horizon=0.0)
    with pytest.raises(errors.ModelError, match="omega\\^2"):
        time_domain_operator(first_order)
