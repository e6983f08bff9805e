"""Greybody figures (plotting._greybody) and the far-region curve of the spectrum figure.

Checks that the drawn data are the computed ones (common practice for figure tests).
"""
import matplotlib

matplotlib.use("Agg")

import numpy as np
import pytest

import contourkit as ck
from contourkit import plotting


@pytest.fixture(scope="module")
def pot():
    return ck.catalogue.nondispersive_flow(kappa=0.05, D=0.5).effective_potential(k_perp=0.01)


def test_greybody_figure_draws_the_computed_data(pot):
    r = pot.transmission(np.array([0.009, 0.01, 0.02]))
    fig, (top, bottom) = plotting.greybody_figure(pot, r)
    line = [l for l in bottom.get_lines() if l.get_gid() == "greybody"][0]
    assert np.allclose(line.get_ydata(), r.transmission)
    thr = [l for l in bottom.get_lines() if l.get_gid() == "threshold"][0]
    assert np.isclose(thr.get_xdata()[0], np.sqrt(pot.limits[1]))
    V = [l for l in top.get_lines() if l.get_gid() == "potential"][0].get_ydata()
    # V = k_perp^2 (1 - v^2) lies between its horizon value 0 and its far value
    assert V.min() >= -1e-15 and V.max() <= pot.limits[1] * (1 + 1e-9)


def test_plot_method_and_bad_input(pot):
    fig, ax = pot.plot()
    assert ax.get_lines()[0].get_gid() == "potential"
    with pytest.raises(ck.InputError):
        plotting.greybody_figure("not a potential", [])
    with pytest.raises(ck.InputError):
        plotting.greybody_figure(pot, [{"omega": 0.1}])


def test_spectrum_figure_gains_the_far_region(pot):
    m = ck.catalogue.quartic_flow(kappa=0.05, Lambda=2.5, D=0.5)
    tab = m.far_spectrum([0.01, 0.02], k_perp=0.01)
    fig, (top, bottom) = plotting.spectrum(tab)
    far = [l for l in top.get_lines() if l.get_gid() == "occupation-far"][0]
    assert np.allclose(far.get_ydata(), tab.column("occupation_far"))
