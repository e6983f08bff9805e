"""Critical points followed continuously in x (their order from a root finder is arbitrary).

``critical_points(rep, x)`` returns the roots of ``A(k) + x B(k)`` in the order
of the polynomial root finder, which can change between two positions: two
decompositions at x and 2x must be compared point by point along the
continuous motion of the points, not by index.  :func:`track` follows the
points along a geometric ladder of positions from x0 to x1 and matches each
step by the assignment of least total displacement.

Examples
--------
>>> import contourkit as ck
>>> rep = ck.ModeEquation.from_coefficients([0, 0, 1], [-1, 0, 0]).fourier()   # Airy
>>> from contourkit.geometry.saddles import critical_points
>>> c0, c1 = critical_points(rep, 4.0), critical_points(rep, 8.0)
>>> perm = track(rep, 4.0, 8.0)
>>> bool(all(abs(c1[perm[i]] - c0[i] * 2 ** 0.5) < 1e-9 for i in range(2)))
True
"""
import numpy as np
from scipy.optimize import linear_sum_assignment

from .saddles import critical_points


def _match(a, b):
    """perm with b[perm[i]] the partner of a[i] (least total distance)."""
    cost = np.abs(a[:, None] - b[None, :])
    rows, cols = linear_sum_assignment(cost)
    perm = np.empty(len(a), dtype=int)
    perm[rows] = cols
    return perm


def track(rep, x0, x1, *, steps=16, crit0=None, crit1=None):
    """Indices ``perm`` such that ``critical_points(rep, x1)[perm[i]]`` continues ``critical_points(rep, x0)[i]``.

    Parameters
    ----------
    rep : KSpaceRepresentation
    x0, x1 : positions of the same sign (complex allowed: the geometry points of decompose.py)
    steps : int, number of geometric steps of the ladder
    crit0, crit1 : the critical points at x0 and x1 if already computed (same order is kept)

    Returns
    -------
    numpy int array, or None when the numbers of points differ.
    """
    a = np.asarray(critical_points(rep, x0) if crit0 is None else crit0)
    end = np.asarray(critical_points(rep, x1) if crit1 is None else crit1)
    if a.size != end.size:
        return None
    ratio = complex(x1) / complex(x0)
    cur = a.copy()
    for j in range(1, steps):
        x = complex(x0) * ratio ** (j / steps)
        b = np.asarray(critical_points(rep, x.real if x.imag == 0 else x))
        if b.size != a.size:
            return None
        p = _match(cur, b)
        cur = b[p]
    return _match(cur, end)
