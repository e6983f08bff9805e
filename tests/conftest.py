"""Shared fixtures: the k-space representations of the Airy and Bessel equations.

Airy: y'' - x y = 0 (DLMF 9.2.1); Bessel of order 0: x y'' + y' + x y = 0 (DLMF 10.2.1).
"""
import pytest
import sympy as sp

import contourkit as ck

_X = sp.Symbol("x")
_Y = sp.Function("y")


@pytest.fixture(scope="session")
def airy_rep():
    return ck.ModeEquation.from_ode(_Y(_X).diff(_X, 2) - _X * _Y(_X), _Y, _X).fourier()


@pytest.fixture(scope="session")
def bessel_rep():
    return ck.ModeEquation.from_ode(_X * _Y(_X).diff(_X, 2) + _Y(_X).diff(_X) + _X * _Y(_X), _Y, _X).fourier()


@pytest.fixture(scope="session")
def airy(airy_rep):
    return airy_rep


@pytest.fixture(scope="session")
def bessel(bessel_rep):
    return bessel_rep
