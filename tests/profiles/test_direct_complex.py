"""Complex omega in contourkit.direct.scatter: the S-matrix continued off the real axis.

Scenario (our own values): horizon_pair(kappa=0.25, Lambda=1, D=0.5, L=2.5).  Conservation law,
no source needed: pseudo-unitarity S(w)^dagger eta S(w) = eta on the real axis continues
analytically to S(conj w)^dagger eta S(w) = eta.
"""
import numpy as np
import pytest

from contourkit import errors
from contourkit.catalogue import horizon_pair
from contourkit.direct import scatter


@pytest.fixture(scope="module")
def pair():
    return horizon_pair(kappa=0.25, Lambda=1.0, D=0.5, L=2.5)


def test_complex_scatter_pseudo_unitarity_continued(pair):
    # S(conj w)^dagger eta S(w) = eta holds off the real axis (continuation of pseudo-unitarity,
    # no source needed); the real-frequency result is unchanged by the continuation code path
    m = pair
    r = scatter(m, 0.05 + 0.002j)
    assert r.unitarity_residual <= 1e-9 and r.effective_temperature is None
    assert "analytic continuation" in r.message
    real = scatter(m, 0.05)
    near = scatter(m, 0.05 + 1e-9j)
    assert np.max(np.abs(near.S - real.S)) < 1e-7


@pytest.mark.parametrize("omega", [0.05 + 0.1j, -0.05 + 0.001j])
def test_complex_scatter_refusals(omega, pair):
    with pytest.raises(errors.InputError, match="Im omega|Re omega"):
        scatter(pair, omega)


def test_single_horizon_continued_pseudo_unitarity():
    # a single dispersive black hole (three in-modes, two of negative norm): the continued 3x3 S-matrix
    from contourkit.catalogue import quartic_flow
    m = quartic_flow(kappa=0.05, Lambda=2.5, branch="superluminal", D=0.5)
    r = scatter(m, 0.05 + 0.001j)
    assert r.S.shape == (3, 3) and r.unitarity_residual <= 1e-8
    real = scatter(m, 0.05)
    assert np.max(np.abs(r.S - real.S)) < 0.1 * np.max(np.abs(real.S))    # continuous in omega


def test_complex_result_row(pair):
    row = scatter(pair, 0.05 + 0.002j).as_row()
    assert row["omega"] == 0.05 + 0.002j and row["effective_temperature"] is None
