"""Bound states of wells: the Poschl-Teller well (Landau and Lifshitz, QM section 23 problem 4)."""
import math

import numpy as np
import pytest
import sympy as sp

import contourkit.greybody as gb
from contourkit.errors import InputError

x = sp.Symbol("x", real=True)
y = sp.Symbol("y", real=True)


def pt_levels(U0, a):
    """E_n = -(a^2/4) (sqrt(1 + 4 U0/a^2) - (2n + 1))^2 for 2n + 1 < sqrt(1 + 4 U0/a^2)."""
    s = math.sqrt(1 + 4 * U0 / a ** 2)
    return [-(a * a / 4) * (s - (2 * n + 1)) ** 2 for n in range(50) if s - (2 * n + 1) > 0]


@pytest.mark.parametrize("U0,a", [(10.0, 1.0), (0.3, 2.0), (7.0, 0.8)])
def test_poschl_teller_well(U0, a):
    pot = gb.potential(-U0 / sp.cosh(a * x) ** 2, x)
    states = pot.bound_states()
    exact = pt_levels(U0, a)
    assert states.count == len(exact) == len(states)           # the count is right (L&L 23.4)
    for n, (st, e) in enumerate(zip(states, exact)):
        assert abs(st.energy - e) < 1e-10                      # L&L 23.4
        assert st.node_count == n
        assert st.residual < 1e-10 and st.error < 1e-10
        p = st.profile
        norm = np.trapezoid(p.psi ** 2, p.xstar)               # normalised in x*
        assert abs(norm - 1) < 1e-6
        signs = np.sign(p.psi[np.abs(p.psi) > 1e-6])
        assert np.count_nonzero(signs[1:] != signs[:-1]) == n  # Sturm oscillation: n nodes
    assert [s.energy for s in states] == sorted(s.energy for s in states)


def test_state_at_threshold_not_counted():
    # U0 = 6, a = 1: sqrt(1 + 24) = 5, so 2n + 1 = 5 gives E = 0: a zero-energy resonance,
    # not a bound state; the two below are -4 and -1 (L&L 23.4)
    states = gb.potential(-6 / sp.cosh(x) ** 2, x).bound_states()
    assert [round(s.energy, 10) for s in states] == [-4.0, -1.0]
    assert "threshold" in states.message


def test_well_in_another_coordinate():
    # the same well written in a coordinate y with x* = y + tanh y (general constructor)
    pot = gb.TortoisePotential(-6 / sp.cosh(y + sp.tanh(y)) ** 2, y, 1 + 1 / sp.cosh(y) ** 2)
    e = [s.energy for s in pot.bound_states()]
    assert len(e) == 2 and abs(e[0] + 4) < 1e-10 and abs(e[1] + 1) < 1e-10


def test_barrier_has_none_and_asymmetric_well():
    assert len(gb.potential(1 / sp.cosh(x) ** 2, x).bound_states()) == 0
    # well on a step: thresholds 0 and 1, states only below 0; the count comes from the
    # oscillation theorem, the energies are checked by the Wronskian residual
    states = gb.potential(-8 / sp.cosh(x) ** 2 + (1 + sp.tanh(x)) / 2, x).bound_states()
    assert states.threshold == 0.0
    assert all(s.energy < 0 and s.residual < 1e-10 for s in states)
    assert [s.node_count for s in states] == list(range(len(states)))


def test_refusals():
    with pytest.raises(InputError):
        gb.potential(-2 / (1 + x ** 2), x).bound_states()     # power-law tail
    with pytest.raises(InputError):
        gb.potential(-1 / sp.cosh(x) ** 2, x).bound_states(rtol=2.0)
