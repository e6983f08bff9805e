"""Symmetric (formally self-adjoint) form of a linear ODE and its linearisation.

Every linear operator ``L = sum_n c_n(x) d^n/dx^n`` is written uniquely as

    L = sum_m S_m[g_m],   S_{2j}[g] = d^j g d^j,
                          S_{2j+1}[g] = (d^j g d^{j+1} + d^{j+1} g d^j) / 2,

with coefficient functions g_m(x).  With real g_m (times the factor i^m that
the symbol (i k)^m carries) the operator is formally self-adjoint.  The
near-horizon model truncates each g_m to first order in x; because the pieces
S_m stay symmetric, the truncated operator is still formally self-adjoint, and
for coefficients linear in x the symmetric form coincides with Weyl ordering:
the Weyl symbol of ``S_m[g0 + g1 x]`` is ``(g0 + g1 x) (i k)^m`` exactly.

References
----------
.. [1] F. W. J. Olver, Asymptotics and Special Functions, Academic Press
   (1974), ch. 6 (formally self-adjoint forms of linear differential
   operators).
"""
from math import comb

import sympy as sp


def symmetric_piece(m, g, x):
    """Left-form coefficients of ``S_m[g]``: a dict ``n -> coefficient of d^n``.

    Examples
    --------
    >>> import sympy as sp
    >>> x = sp.Symbol("x"); g = sp.Function("g")(x)
    >>> symmetric_piece(1, g, x)[0]
    Derivative(g(x), x)/2
    """
    out = {}
    j = m // 2
    for i in range(0, m // 2 + 1 + (m % 2)):
        gi = sp.diff(g, x, i) if i else g
        if m % 2 == 0:
            if i > j:
                continue
            c = comb(j, i)
        else:
            c = sp.Rational(comb(j, i) + comb(j + 1, i), 2)
        if c:
            out[m - i] = out.get(m - i, 0) + c * gi
    return out


def to_symmetric(coeffs, x):
    """Symmetric-form coefficients ``g_m`` of ``L = sum_n coeffs[n] d^n``.

    Parameters
    ----------
    coeffs : sequence of sympy expressions
        ``coeffs[n]`` multiplies the n-th derivative (x on the left).
    x : sympy Symbol

    Returns
    -------
    list of sympy expressions, ``g[m]`` for m = 0..N.

    Examples
    --------
    >>> import sympy as sp
    >>> x = sp.Symbol("x")
    >>> to_symmetric([0, 1, x], x)     # x y'' + y' = (x y')'
    [0, 0, x]
    """
    n_top = len(coeffs) - 1
    rem = [sp.sympify(c) for c in coeffs]
    g = [sp.Integer(0)] * (n_top + 1)
    for m in range(n_top, -1, -1):
        g[m] = sp.simplify(rem[m])
        if g[m] == 0:
            continue
        for n, c in symmetric_piece(m, g[m], x).items():
            rem[n] = rem[n] - c
    return g


def from_symmetric(g, x):
    """Left-form coefficients of ``sum_m S_m[g_m]`` (inverse of to_symmetric)."""
    out = [sp.Integer(0)] * len(g)
    for m, gm in enumerate(g):
        if gm == 0:
            continue
        for n, c in symmetric_piece(m, gm, x).items():
            out[n] += c
    return [sp.expand(c) for c in out]


def linearise(g, x, x0):
    """Truncate every symmetric coefficient to first order about x0, shifted to 0.

    Returns the pairs ``(g_m(x0), g_m'(x0))`` so that the truncated coefficient
    is ``g_m(x0) + g_m'(x0) * x`` in the shifted coordinate.
    """
    out = []
    for gm in g:
        gm = sp.sympify(gm)
        out.append((sp.simplify(gm.subs(x, x0)), sp.simplify(sp.diff(gm, x).subs(x, x0))))
    return out
