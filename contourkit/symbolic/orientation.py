"""Orientation of a sonic horizon: black or white hole, flow towards -x or +x, subsonic side.

At a horizon x_H the low-frequency part of the dispersion function is the
quadratic form ``c0(x) k^2 + c1(x) omega k + c2(x) omega^2`` (for a flow
``D = (omega - v k)^2 - c^2 k^2``: ``c0 = v^2 - c^2``, ``c1 = -2 v``,
``c2 = 1``).  Its two low-frequency branches are ``omega = lambda k`` with

* ``lambda_0 ~ -c0/c1``: the counter-propagating wave, at rest at x_H; its
  signed slope ``s = d lambda_0/dx = -c0'/c1`` at x_H gives the surface
  gravity ``kappa = |s|``;
* ``lambda_1 = -c1/c2``: the co-propagating wave (``2 v`` for a flow), whose
  sign is the flow direction.

The subsonic side is where the counter-propagating wave moves against the
flow (``sign lambda_0 = -sign lambda_1``), i.e. the side
``sign(x - x_H) = -sign(lambda_1) sign(s)``.  A black hole is a flow from the
subsonic (upstream) side into the supersonic one: that happens exactly when
``s > 0``, whatever the flow direction; a white hole has ``s < 0``.

The near-horizon machinery works in one canonical orientation (black hole,
flow towards -x, subsonic side x > 0, as in ``v = -1 + kappa x``).  Every other
orientation is mapped onto it by parity P (``x -> -x``, ``k -> -k``), time
reversal T (complex conjugation of the stationary modes: ``k -> -k``, in and out
exchanged, norms kept) or both:

    black, towards -x : identity      D'(omega, k, x) = D(omega, k, x)
    black, towards +x : P             D'(omega, k, x) = D(omega, -k, -x)
    white, towards -x : P T           D'(omega, k, x) = D(omega, k, -x)
    white, towards +x : T             D'(omega, k, x) = D(omega, -k, x)

In terms of the symmetric coefficients (``D = sum_m g_m (i k)^m``):
``g'_m(x) = sk^m g_m(sx x)`` with ``(sk, sx)`` the signs of the table.  T maps
a real D onto a real D (its conjugate solutions solve ``D(omega, -k, x)``).

References
----------
.. [1] W. G. Unruh, Phys. Rev. Lett. 46 (1981) 1351 (sonic horizons).
.. [2] J. Macher, R. Parentani, Phys. Rev. D 79 (2009) 124008 (black and
   white hole flows related by time reversal).

Examples
--------
>>> o = Orientation.from_signs(slope=-0.05, flow=-1)
>>> o.hole, o.flow, o.subsonic_side, o.transform
('white', '-x', '-x', (1, -1))
"""
from dataclasses import dataclass, replace

import sympy as sp

_TRANSFORMS = {("black", -1): (1, 1), ("black", 1): (-1, -1),
               ("white", -1): (1, -1), ("white", 1): (-1, 1)}


@dataclass(frozen=True)
class Orientation:
    """How a horizon sits in the user's coordinate x.

    Attributes
    ----------
    hole : {"black", "white", "none"}
        black: the fluid flows from the subsonic into the supersonic region;
        white: the reverse; none: a horizonless flow.
    flow : {"-x", "+x"}
        Direction of the flow at the horizon (for a horizonless model: at the
        reference position).
    subsonic_side : {"+x", "-x", "both"}
        Side of the horizon (``x > x_H``: "+x") where the flow is subsonic;
        contourkit calls it the exterior (``Mode.side == "exterior"``).
    upstream_side : {"+x", "-x"}
        Side the fluid comes from (opposite to ``flow``).
    slope : float
        Signed ``d lambda_0/dx`` at the horizon (kappa = |slope|).
    transform : (int, int)
        ``(sk, sx)``: the canonical model is ``D(omega, sk k, sx x)``.
    note : str
        How the flow direction was determined.
    """
    hole: str
    flow: str
    subsonic_side: str
    upstream_side: str
    slope: float
    transform: tuple
    note: str = ""

    @classmethod
    def from_signs(cls, slope, flow, note=""):
        hole = "black" if slope > 0 else "white"
        sub = -flow * (1 if slope > 0 else -1)
        return cls(hole=hole, flow="+x" if flow > 0 else "-x", subsonic_side="+x" if sub > 0 else "-x",
                   upstream_side="-x" if flow > 0 else "+x", slope=float(slope),
                   transform=_TRANSFORMS[(hole, 1 if flow > 0 else -1)], note=note)

    @classmethod
    def horizonless(cls, flow, note=""):
        return cls(hole="none", flow="+x" if flow > 0 else "-x", subsonic_side="both",
                   upstream_side="-x" if flow > 0 else "+x", slope=0.0, transform=(1, 1), note=note)

    def at_turning_point(self, real_side):
        """A horizonless flow's orientation with the transform onto the one the contour method uses.

        At a dispersive turning point the contour method works for a flow towards
        -x whose blocked wave is real on the -x side (``real_side``), like a black
        hole's subsonic exterior; the transform is the table's, with "black"
        where the blocked wave lives on the side the flow goes to and "white"
        where it lives upstream.
        """
        hole = "black" if real_side == self.flow else "white"
        return replace(self, transform=_TRANSFORMS[(hole, 1 if self.flow == "+x" else -1)])

    @property
    def canonical(self):
        """True for a black hole flowing towards -x (subsonic exterior at x > x_H)."""
        return self.transform == (1, 1) and self.hole == "black"

    @property
    def parity(self):
        """True if the canonical model is the mirror image (x -> -x) of this one."""
        return self.transform[1] == -1

    @property
    def time_reversed(self):
        """True if the canonical model is the time reverse of this one (a white hole)."""
        return self.transform[0] != self.transform[1]

    def describe(self):
        """One line: the convention of results for this orientation."""
        if self.hole == "none":
            return (f"horizonless flow towards {self.flow}; exterior = the x -> +infinity side, interior = "
                    f"the x -> -infinity side; in-modes move towards the flow's inhomogeneity; x is the user's x")
        sub = "x > x_H" if self.subsonic_side == "+x" else "x < x_H"
        up = "x > x_H" if self.upstream_side == "+x" else "x < x_H"
        return (f"{self.hole} hole, flow towards {self.flow}; exterior = subsonic side ({sub}), upstream side "
                f"{up}; in-modes move towards the horizon; x and k are the user's")

    def __str__(self):
        return self.describe()


def transform_coefficients(g, x, transform):
    """Symmetric coefficients of ``D(omega, sk k, sx x)``: ``g'_m(x) = sk^m g_m(sx x)``.

    Examples
    --------
    >>> X = sp.Symbol("x")
    >>> transform_coefficients([X, 2 * X, 3], X, (-1, -1))
    [-x, 2*x, 3]
    """
    sk, sx = transform
    out = []
    for m, gm in enumerate(g):
        e = sp.sympify(gm)
        if sx == -1:
            e = e.subs(x, -x)
        out.append(sp.expand(e * sk ** m))
    return out


def transformed_model(model, transform, horizon):
    """The model ``D(omega, sk k, sx x)`` (same class, parameters and name); its window mirrored if sx = -1.

    ``horizon`` is the new model's horizon position (or ``"none"`` for a
    horizonless flow).
    """
    a, b = model.window
    return type(model)(transform_coefficients(model.g, model.x, transform), omega=model.omega, x=model.x,
                       name=model.name, horizon=horizon, window=(a, b) if transform[1] == 1 else (-b, -a),
                       parameters=model.parameters, description=model.description)
