"""Unstable-mode figures (contourkit.plotting._modes): plane and profile of a horizon pair's modes."""
import matplotlib

matplotlib.use("Agg")
import numpy as np
import pytest

from contourkit import errors
from contourkit.catalogue import horizon_pair
from contourkit.plotting._modes import _residual_size, mode_plane, mode_profile, modes_figure
from contourkit.plotting._style import save
from contourkit.profiles.unstable import unstable_modes


@pytest.fixture(scope="module")
def laser():
    m = horizon_pair(kappa=0.25, Lambda=1.0, D=0.5, L=3.5)
    return m, unstable_modes(m)


def test_plane_marks_every_mode_sized_by_residual(laser):
    m, found = laser
    fig, ax = mode_plane(found)
    coll = {c.get_gid(): c for c in ax.collections}
    pts = coll["mode"].get_offsets()
    assert len(pts) == len(found) == 1
    assert np.allclose(pts[0], [found[0].omega.real, found[0].omega.imag])
    assert coll["mode"].get_sizes()[0] == pytest.approx(_residual_size(found[0].residual))
    # the mirror image -conj(omega) of an oscillating mode (the equation is real)
    assert np.allclose(coll["mirror"].get_offsets()[0], [-found[0].omega.real, found[0].omega.imag])
    assert any(l.get_gid() == "search-box" for l in ax.lines)
    # smaller residual -> larger marker
    assert _residual_size(1e-14) > _residual_size(1e-8) > _residual_size(1e-5)


def test_profile_and_two_panel_figure(laser, tmp_path):
    m, found = laser
    fig, ax = mode_profile(found[0], horizons=(m.white_horizon, m.horizon))
    gids = [l.get_gid() for l in ax.lines]
    assert gids.count("horizon") == 2 and {"re", "im", "abs"} <= set(gids)
    x, phi = found[0].profile
    absline = [l for l in ax.lines if l.get_gid() == "abs"][0]
    assert np.allclose(absline.get_ydata(), np.abs(phi))
    fig2, (a, b) = modes_figure(found, horizons=(m.white_horizon, m.horizon))
    paths = save(fig2, tmp_path / "laser", formats=("pdf", "png"))
    assert all(p.stat().st_size > 1000 for p in paths)


def test_empty_list_and_refusals():
    empty = []
    fig, ax = mode_plane(empty)
    assert any("no unstable mode" in t.get_text() for t in ax.texts)
    with pytest.raises(errors.InputError, match="no mode"):
        modes_figure(empty)
    with pytest.raises(errors.InputError, match="omega"):
        mode_plane([object()])
    with pytest.raises(errors.InputError, match="profile"):
        mode_profile(object())
