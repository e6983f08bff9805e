"""Critical points followed in x (geometry/tracking.py)."""
import numpy as np

import contourkit as ck
from contourkit.geometry.saddles import critical_points
from contourkit.geometry.tracking import track


def test_airy_saddles_follow_sqrt_x():
    """y'' - x y = 0: the saddles solve k^2 + x = 0, k = +-i sqrt(x) (DLMF 9.7: the saddle points of
    the Airy integral, common practice), so each saddle at 4x is twice the one it continues at x."""
    rep = ck.ModeEquation.from_coefficients([0, 0, 1], [-1, 0, 0]).fourier()
    for x in (0.5, 3.0, 40.0):
        a, b = critical_points(rep, x), critical_points(rep, 4 * x)
        perm = track(rep, x, 4 * x)
        assert sorted(perm.tolist()) == [0, 1]
        assert np.allclose(b[perm], 2 * a, rtol=1e-10)


def test_reordered_input_is_matched():
    """Handing the points at x1 in reversed order gives the reversed permutation (the matching
    does not rely on the root finder's order)."""
    rep = ck.ModeEquation.from_coefficients([0, 0, 1], [-1, 0, 0]).fourier()
    a, b = critical_points(rep, 2.0), critical_points(rep, 8.0)
    perm = track(rep, 2.0, 8.0, crit0=a, crit1=b[::-1])
    assert np.allclose(b[::-1][perm], 2 * a, rtol=1e-10)
