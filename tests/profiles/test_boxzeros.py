"""Zeros of analytic functions in a box (contourkit.profiles.boxzeros): argument principle and deflation.

Check values: the zeros of sin(z) are n pi (DLMF 4.14: sin z = 0 iff z = n pi); polynomial zeros
are given by construction.
"""
import math

import numpy as np
import pytest

from contourkit.profiles.boxzeros import make_box, polish, search


def _log_sin(shift, scale):
    # log of sin(scale (z - i shift)): zeros at z = n pi/scale + i shift (DLMF 4.14)
    return lambda z: complex(np.log(np.sin(scale * (z - 1j * shift)) + 0j))


def test_sine_zeros_all_found_once():
    f = _log_sin(0.1, 7.0)
    box = make_box(f, 0.05, 2.0, 0.02, 0.5)
    zeros, _ = search(f, box, 2.0)
    expected = [n * math.pi / 7 + 0.1j for n in range(1, 5)]      # n pi/7 in (0.05, 2.0)
    assert box.count == 4 and len(zeros) == 4
    for e in expected:
        assert min(abs(z - e) for z in zeros) < 1e-12


def test_clustered_zeros_need_bisection_and_deflation():
    roots = [0.3 + 0.2j, 0.3001 + 0.2j, 0.7 + 0.05j]
    f = lambda z: complex(np.sum([np.log(z - r) for r in roots]) + 4j * z)
    box = make_box(f, 0.0, 1.0, 0.01, 0.4)
    zeros, _ = search(f, box, 1.0)
    assert box.count == 3 and len(zeros) == 3
    for r in roots:
        assert min(abs(z - r) for z in zeros) < 1e-10


def test_empty_box_and_zero_on_an_edge():
    f = lambda z: complex(np.log(z - (0.5 + 0.2j)))
    assert make_box(f, 0.0, 0.4, 0.05, 0.5).count == 0
    assert search(f, make_box(f, 0.0, 0.4, 0.05, 0.5), 1.0)[0] == []
    # the zero on the right edge x = 0.5: the edge is moved outwards and the zero counted once
    box = make_box(f, 0.0, 0.5, 0.05, 0.5)
    assert box.count == 1 and box.re1 > 0.5


def test_polish_converges_from_nearby_and_deflates():
    f = lambda z: complex(np.log((z - 0.4j) * (z - 0.41j)))
    z1 = polish(f, 0.39j, [], 1.0)
    assert abs(z1 - 0.4j) < 1e-12
    z2 = polish(f, 0.39j, [z1], 1.0)          # deflated: goes to the other zero
    assert abs(z2 - 0.41j) < 1e-12
