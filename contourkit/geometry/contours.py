"""Contours in the complex k plane and their representative paths.

A :class:`Contour` is a formal linear combination of elementary contours:

* ``Contour.real_axis(indent="above" | "below")``: the real k axis, passing
  above (or below) every real singular point; its ends at infinity must lie in
  valleys or on valley boundaries (then they are turned into the adjacent
  valley, the usual Abel/Jordan reading of an oscillatory integral);
* ``Contour.between(a, b, winding="ccw")``: from valley a to valley b along
  an arc outside every singular point, counter-clockwise (or clockwise);
* ``Contour.loop(point, valley=None)``: from a valley around the singular
  point and back to the same valley, counter-clockwise (a Hankel loop);
* ``Contour.half_line(point, valley=None)``: from the branch point to the
  valley (``Re nu > -1``), equal to ``loop / (exp(2 pi i nu) - 1)``; from an
  essential singular point it leaves through the local valley ``sector``
  (``Singularity.valleys``), where ``exp(c_p (k - k_j)^-p)`` vanishes;
* ``Contour.segment(p, q, valley=None)``: the straight segment between two
  branch points, as ``half_line(p) - half_line(q)``.

Branches: the integrand on a contour is the cut-plane branch (cuts from each
singular point in the direction ``rep.cut_angle``, downwards by default) at
the contour's starting point, continued analytically along the contour.  On
a loop's incoming leg that runs along a cut, the branch with
``arg(k - k_j) = cut_angle + 2 pi`` is taken.

For deg Q <= 1 the only valley is the half-plane where ``Re((i x + Q_1) k)
< 0``; it depends on the sign of x, so a loop contour defines a solution on
one side of x = 0 only.
"""
import cmath
import math

import numpy as np

from . import phase
from ..errors import ContourError

_TOL = 1e-12


def _reduce(angle, lo):
    """Angle reduced into (lo, lo + 2 pi]."""
    a = (angle - lo) % (2 * math.pi)
    if a <= 1e-6:      # on the cut (within the geometry's perturbation): the top of the interval
        a += 2 * math.pi
    return lo + a


class Contour:
    """A linear combination of elementary contours (see module docstring).

    Attributes
    ----------
    terms : list of (coefficient, kind, params)
    name : str

    Examples
    --------
    >>> Contour.real_axis()
    Contour(real axis, indented above)
    """

    def __init__(self, terms, name):
        self.terms = list(terms)
        self.name = name
        self.owner = None

    def __repr__(self):
        return f"Contour({self.name})"

    def __add__(self, other):
        if not isinstance(other, Contour):
            return NotImplemented
        c = Contour(self.terms + other.terms, f"{self.name} + {other.name}")
        c.owner = self.owner or other.owner
        return c

    def __neg__(self):
        c = Contour([(-a, k, p) for a, k, p in self.terms], f"-({self.name})")
        c.owner = self.owner
        return c

    def __sub__(self, other):
        return self + (-other)

    def __rmul__(self, s):
        if isinstance(s, Contour):
            return NotImplemented
        c = Contour([(s * a, k, p) for a, k, p in self.terms], f"{s}*({self.name})")
        c.owner = self.owner
        return c

    __mul__ = __rmul__

    # -- constructors ---------------------------------------------------
    @classmethod
    def real_axis(cls, indent="above"):
        if indent not in ("above", "below"):
            raise ContourError(f"indent must be 'above' or 'below', got {indent!r}")
        return cls([(1, "real", {"indent": indent})], f"real axis, indented {indent}")

    @classmethod
    def between(cls, a, b, winding="ccw"):
        for v in (a, b):
            if isinstance(v, bool) or not isinstance(v, (int, np.integer)):
                raise ContourError(f"valleys are named by their index (an int), got {v!r}; see rep.valleys")
        if winding not in ("ccw", "cw"):
            raise ContourError(f"winding must be 'ccw' or 'cw', got {winding!r}")
        if a == b:
            raise ContourError("a contour from a valley to itself is zero (or a loop: use Contour.loop)")
        return cls([(1, "between", {"a": int(a), "b": int(b), "winding": winding})],
                   f"valley {a} -> valley {b} ({winding})")

    @classmethod
    def loop(cls, point, valley=None, *, sheet=0):
        """Loop around a singular point from a valley; ``sheet`` adds 2 pi sheet to arg(k - point) on entry."""
        if isinstance(sheet, bool) or not isinstance(sheet, (int, np.integer)):
            raise ContourError(f"sheet must be an integer, got {sheet!r}")
        return cls([(1, "loop", {"point": point, "valley": valley, "sheet": int(sheet)})],
                   f"loop around {point} from valley {valley}" + (f", sheet {sheet}" if sheet else ""))

    @classmethod
    def half_line(cls, point, valley=None, *, sector=0):
        """From a singular point (or an ordinary zero of B) to a valley at infinity.

        ``sector`` numbers the local valley through which the path leaves an
        essential singular point (``rep.singularities[j].valleys``); it is
        ignored elsewhere.

        Examples
        --------
        ``x y'' + y = 0``: B = k^2, so f = k^-2 exp(i/k) has an essential
        singular point at 0, with one local valley (below it).

        >>> import sympy as sp, contourkit as ck
        >>> x, y = sp.Symbol("x"), sp.Function("y")
        >>> rep = ck.ModeEquation.from_ode(x * y(x).diff(x, 2) + y(x), y, x).fourier()
        >>> rep.singularities[0].kind, len(rep.singularities[0].valleys)
        ('essential', 1)
        >>> rep.basis()
        [Contour(loop around 0 from valley None), Contour(half-line from 0 to valley None)]
        """
        if isinstance(sector, bool) or not isinstance(sector, (int, np.integer)) or sector < 0:
            raise ContourError(f"sector must be a non-negative integer (a local valley of an essential singular "
                               f"point, see Singularity.valleys), got {sector!r}")
        params = {"point": point, "valley": valley}
        if sector:
            params["sector"] = int(sector)
        return cls([(1, "half", params)], f"half-line from {point}" + (f" (sector {sector})" if sector else "")
                   + f" to valley {valley}")

    @classmethod
    def segment(cls, p, q, valley=None):
        c = cls.half_line(p, valley) - cls.half_line(q, valley)
        c.name = f"segment {p} -> {q}"
        return c


# -- representative paths (used for intersection numbers) ---------------
def _singular_index(rep, point):
    if isinstance(point, (int, np.integer)) and not isinstance(point, bool) and 0 <= point < len(rep.singularities) \
            and not any(abs(s.k - point) < 1e-12 for s in rep.singularities):
        return int(point)
    try:
        p = complex(point)
    except (TypeError, ValueError):
        raise ContourError(f"{point!r} is not a singular point; the singular points are "
                           f"{[s.point for s in rep.singularities]}")
    for j, s in enumerate(rep.singularities):
        if abs(s.k - p) <= 1e-9 * max(1.0, abs(p)):
            return j
    raise ContourError(f"{point} is not a singular point of this representation; the singular points are "
                       f"{[s.point for s in rep.singularities]}")


def half_line_start(rep, point):
    """(index j or None, k_j, straight) for the start of a half-line.

    ``j`` is None for an ordinary zero of B (``rep.ordinary_zeros``, exponent
    0).  ``straight`` is True where the half-line is represented by itself (a
    ray from k_j), not by the loop ``/ (exp(2 pi i nu) - 1)``: at an integer
    exponent the loop vanishes, and around an essential singular point the
    loop cannot be shrunk onto the half-line.
    """
    for z in getattr(rep, "ordinary_zeros", ()):
        try:
            p = complex(point)
        except (TypeError, ValueError):
            break
        if not isinstance(point, bool) and abs(complex(z) - p) <= 1e-9 * max(1.0, abs(p)):
            return None, complex(z), True
    j = _singular_index(rep, point)
    # an integer exponent (Singularity.kind): f is single-valued around k_j; a pole's half-line is refused later
    return j, complex(rep._kj[j]), rep.singularities[j].kind in ("zero", "pole", "essential")


def _valley(rep, x, valley, j=None):
    vs = rep.valleys_at(x)
    if valley is None:
        if len(vs) == 1:
            return vs[0]
        # default: the valley containing (or nearest to) the cut direction
        c = rep.cut_angle
        return min(vs, key=lambda v: abs((c - v.center + math.pi) % (2 * math.pi) - math.pi))
    if isinstance(valley, bool) or not isinstance(valley, (int, np.integer)) or not 0 <= valley < len(vs):
        raise ContourError(f"unknown valley {valley!r}: this representation has {len(vs)} valley(s) at infinity, "
                           f"numbered 0..{len(vs) - 1} (see rep.valleys)")
    return vs[valley]


def scales(rep, crit):
    pts = list(crit) + list(rep._kj)
    R0 = 1.5 * max([1.0] + [abs(p) for p in pts])
    return R0


def _ray_out(rep, x, start, angle, level, R0):
    """Points from `start` outwards along `angle` until Re Phi < level (logs not needed: far from all)."""
    pts = []
    d = cmath.exp(1j * angle)
    t = 0.0
    step = 0.25 * R0
    for _ in range(400):
        t += step
        p = start + t * d
        pts.append(p)
        val = phase.phi(rep, x, p, phase.cut_plane_logs(rep, p)[0] if rep._kj.size else np.zeros(0)).real
        if val < level and t > R0:
            break
        step *= 1.4
    return pts


def _arc(center, radius, a0, a1, max_step=0.08):
    n = max(2, int(math.ceil(abs(a1 - a0) / max_step)) + 1)
    return [center + radius * cmath.exp(1j * a) for a in np.linspace(a0, a1, n)]


def _end_valley(rep, x, angle):
    """The valley whose closure contains the direction `angle`, for a real-axis end.

    The valleys are those at the real position: the geometry's perturbation of
    x (decompose.geometry_x) turns a half-plane valley (deg Q <= 1) by about
    1e-7 rad, which would put one end of the real axis just outside it.
    """
    x = complex(x).real
    best = None
    for v in rep.valleys_at(x):
        d = abs((angle - v.center + math.pi) % (2 * math.pi) - math.pi)
        if d < v.halfwidth - 1e-9:
            return v, False
        if abs(d - v.halfwidth) <= 1e-9:
            best = v
    if best is None:
        raise ContourError(f"the real-axis contour does not converge at x = {x:.6g}: the direction "
                           f"{'+' if abs(angle) < 1 else '-'}infinity lies in a hill of the integrand; use valley-to-valley "
                           f"contours (Contour.between) or loops instead")
    if rep.degree_Q < 2 and rep.sum_of_exponents.real >= 0:
        raise ContourError(f"the real-axis contour does not converge: along the real axis |f| ~ |k|^"
                           f"{rep.sum_of_exponents.real:.3g} does not decay; use loops from the valley instead")
    return best, True


def _leg(rep, x, kj, j, r, d, th, level, R0):
    """Points of a loop's leg from ``kj + r d`` out to the valley along direction d.

    A singular point k_i within ``rho_i`` of the straight leg (``rho_i`` = 0.3
    times its distance to the nearest other singular point) is passed on the
    right of the leg (seen from k_j outwards) by a half circle of radius
    ``rho_i + |offset|`` centred on the leg, which keeps k_i on the left:
    the bent loop is a solution as good as the straight one (its ends are in
    the same valley); it differs from the loop passed on the other side by a
    multiple of the loop around k_i.
    """
    pts = [kj + r * d]
    blockers = []
    for i, ki in enumerate(rep._kj):
        if i == j:
            continue
        z = (ki - kj) / d
        others = [abs(ki - p) for m, p in enumerate(rep._kj) if m != i]
        rho = 0.3 * min(others + [1.0])
        if z.real > r and abs(z.imag) < rho:
            blockers.append((z.real, rho + abs(z.imag)))
    for t, R in sorted(blockers):
        c = kj + t * d
        if abs(c - pts[-1]) <= R:          # two blockers close together: one wider detour
            continue
        pts += [c + R * d * cmath.exp(1j * phi) for phi in np.linspace(-math.pi, 0.0,
                                                                        max(8, int(math.pi / 0.1)))]
    start = pts[-1]
    return pts + _ray_out(rep, x, start + 1e-3 * R0 * d, th, level, R0)


def ray_from(rep, x, j, kj, valley, level, R0, sheet=0, sector=0):
    """A half-line drawn as itself: the ray from k_j to the valley, (vertices, logs at the first one).

    ``j`` is the singular index of k_j, or None for an ordinary zero of B.
    At a singular point the ray starts 1e-9 of the scale away from it (the
    integrand vanishes or is integrable there), with ``arg(k - k_j)`` on the
    cut-plane branch plus ``2 pi sheet``; at an ordinary zero it starts at k_j.
    From an essential singular point see :func:`_essential_exit`.
    """
    th = _valley(rep, x, valley, j).center
    if j is not None and rep.singularities[j].kind == "essential":
        verts, ths = _essential_exit(rep, x, j, kj, sector, th, level, R0)
        start_logs = phase.cut_plane_logs(rep, verts[0])[0]
        start_logs[j] = math.log(abs(verts[0] - kj)) + 1j * (_reduce(ths, rep.cut_angle) + 2 * math.pi * sheet)
        return verts, start_logs
    d = cmath.exp(1j * th)
    delta = 0.0 if j is None else 1e-9 * max(1.0, abs(kj))
    verts = _leg(rep, x, kj, -1 if j is None else j, delta, d, th, level, R0)
    if j is None:
        verts = [kj] + verts[1:]
    start_logs = phase.cut_plane_logs(rep, verts[0])[0] if rep._kj.size else np.zeros(0, complex)
    if j is not None:
        start_logs[j] = math.log(abs(verts[0] - kj)) + 1j * (_reduce(th, rep.cut_angle) + 2 * math.pi * sheet)
    return verts, start_logs


def _essential_exit(rep, x, j, kj, sector, th, level, R0):
    """The path out of the essential singular point k_j through its local valley ``sector``.

    It starts on the sector's centre line where Re Phi is below ``level`` (the
    integrand is negligible there and vanishes towards k_j), runs out along
    that line to the radius r of a loop, turns along the circle of radius r
    the short way to the direction ``th`` of the valley at infinity and
    leaves along it (bent around singular points, see :func:`_leg`).
    Returns (vertices, direction of the start).
    """
    vs = rep.singularities[j].valleys
    if sector >= len(vs):                   # an integer >= 0 (Contour.half_line checks it)
        raise ContourError(f"unknown sector {sector!r}: the essential singular point {rep.singularities[j].point} "
                           f"has {len(vs)} local valley(s), numbered 0..{len(vs) - 1} (Singularity.valleys)")
    ths = vs[sector].center
    e = cmath.exp(1j * ths)
    others = [abs(kj - p) for p in list(rep._kj) if abs(kj - p) > 1e-12]
    r = 0.3 * min(others + [1.0, 0.3 * R0])
    delta = r
    for _ in range(200):
        p = kj + delta * e
        if phase.phi(rep, x, p, phase.cut_plane_logs(rep, p)[0]).real < level or delta < 1e-250:
            break
        delta *= 0.5
    n = int(math.ceil(math.log(r / delta) / 0.2)) + 1
    radial = [kj + t * e for t in np.geomspace(delta, r, n)] if n > 1 else [kj + r * e]
    turn = (th - ths + math.pi) % (2 * math.pi) - math.pi
    arc = _arc(kj, r, ths, ths + turn) if abs(turn) > 1e-12 else [kj + r * e]
    far = _leg(rep, x, kj, j, r, cmath.exp(1j * th), th, level, R0)
    return radial + arc[1:] + far[1:], ths


def representative(rep, x, kind, params, crit, level):
    """A polyline (vertices, start logs) representing an elementary contour at x.

    `level` is the value of Re Phi below which a valley ray may stop.
    """
    R0 = scales(rep, crit)
    start = half_line_start(rep, params["point"]) if kind == "half" else None
    if kind == "real":
        sing = [s.k for s in rep.singularities if abs(s.k.imag) <= 1e-12 * max(1.0, abs(s.k))]
        sing = sorted(sing, key=lambda z: z.real)
        allp = list(rep._kj)
        pts = []
        for kj in sing:
            others = [abs(kj - p) for p in allp if abs(kj - p) > 1e-12]
            r = 0.3 * min(others + [1.0])
            sign = 1 if params["indent"] == "above" else -1
            pts += _arc(kj.real, r, math.pi, math.pi - sign * math.pi, max_step=0.2)
        vl, _ = _end_valley(rep, x, math.pi)
        vr, _ = _end_valley(rep, x, 0.0)
        # left end: come in from valley vl along its centre, arc at R0 to angle pi
        al = _reduce(vl.center, 0.0)           # in (0, 2pi]
        start_arc = _arc(0, R0, al, math.pi) if abs(al - math.pi) > 1e-12 else [complex(-R0)]
        ar = vr.center
        end_arc = _arc(0, R0, 0.0, ar) if abs(ar) > 1e-12 else [complex(R0)]
        far_l = _ray_out(rep, x, start_arc[0], al, level, R0)[::-1]
        far_r = _ray_out(rep, x, end_arc[-1], ar, level, R0)
        verts = far_l + start_arc + pts + end_arc + far_r
        start_logs = None
    elif kind == "between":
        vs = rep.valleys_at(x)
        for v in (params["a"], params["b"]):
            if not 0 <= v < len(vs):
                raise ContourError(f"unknown valley {v}: this representation has {len(vs)} valley(s) at infinity, "
                                   f"numbered 0..{len(vs) - 1}")
        a, b = vs[params["a"]].center, vs[params["b"]].center
        if params["winding"] == "ccw":
            b = a + ((b - a) % (2 * math.pi))
        else:
            b = a - ((a - b) % (2 * math.pi))
        arc = _arc(0, R0, a, b)
        verts = _ray_out(rep, x, arc[0], a, level, R0)[::-1] + arc + _ray_out(rep, x, arc[-1], b, level, R0)
        start_logs = None
    elif kind == "half" and start[2]:
        # a ray from k_j itself (integer exponent, ordinary zero of B or essential singular point)
        verts, start_logs = ray_from(rep, x, start[0], start[1], params["valley"], level, R0,
                                     sector=params.get("sector", 0))
    elif kind in ("loop", "half"):
        j = _singular_index(rep, params["point"])
        kj = rep._kj[j]
        v = _valley(rep, x, params["valley"], j)
        th = v.center
        d = cmath.exp(1j * th)
        others = [abs(kj - p) for p in list(rep._kj) if abs(kj - p) > 1e-12]
        r = 0.3 * min(others + [1.0, 0.3 * R0])
        # where the straight leg meets another singular point, the leg bends around it (see _leg)
        far = _leg(rep, x, kj, j, r, d, th, level, R0)
        leg_in = far[::-1]
        circle = _arc(kj, r, th, th + 2 * math.pi, max_step=0.15)
        verts = leg_in + circle[1:] + far[1:]
        # start logs: cut-plane branch; for k_j itself arg = th reduced into (cut, cut + 2 pi]
        p0 = verts[0]
        start_logs = phase.cut_plane_logs(rep, p0)[0]
        arg = _reduce(th, rep.cut_angle) + 2 * math.pi * params.get("sheet", 0)
        start_logs[j] = math.log(abs(p0 - kj)) + 1j * arg
    else:  # pragma: no cover
        raise ContourError(f"unknown contour kind {kind!r}")
    verts = np.array(verts, dtype=complex)
    if start_logs is None:
        start_logs = phase.cut_plane_logs(rep, verts[0])[0] if rep._kj.size else np.zeros(0, complex)
    return verts, start_logs


def polyline_logs(rep, verts, start_logs):
    """Continued logs at every vertex of a polyline."""
    if not rep._kj.size:
        return np.zeros((len(verts), 0), complex)
    out = np.empty((len(verts), rep._kj.size), complex)
    out[0] = start_logs
    for i in range(1, len(verts)):
        out[i] = phase.continue_logs(rep, verts[i - 1], out[i - 1], verts[i])
    return out


def _winding(rep, a, b):
    """The winding of a valley-to-valley arc from a to b that does not cross the cut direction.

    An arc that crosses the cuts carries the sheet factors ``exp(2 pi i nu_j)``
    of every cut it crosses; with ``|Im nu|`` large that term swamps the rest
    and the contour becomes numerically parallel to the loops (whose values
    carry the same factor).  The counter-clockwise arc and the clockwise one
    together go once around, so exactly one of them avoids the cut direction.
    """
    vs = rep.valleys
    ca, cb = vs[a].center, vs[b].center
    span = (cb - ca) % (2 * math.pi)
    cut = (rep.cut_angle - ca) % (2 * math.pi)
    return "cw" if 0 < cut < span else "ccw"


def basis(rep, *, x=1.0):
    """Independent contours, as many as the ODE's order.

    Valley-to-valley contours between consecutive valleys (on the arc that
    does not cross the cut direction: counter-clockwise unless that arc would),
    one loop around every branch point, pole and essential singularity, from
    the default valley, a half-line from every zero of B with an exponent
    that is a non-negative integer (where the loop vanishes), and a
    half-line out of every local valley of an essential singular point.  For deg Q <= 1 the valley depends on the sign of
    x: the basis is for the side of x given (default x > 0).

    Raises
    ------
    ContourError if the count differs from the order (degenerate exponents).
    """
    nv = len(rep.valleys) if rep.degree_Q >= 2 else 1
    out = [Contour.between(i, i + 1, _winding(rep, i, i + 1)) for i in range(nv - 1)] if rep.degree_Q >= 2 else []
    for s in rep.singularities:
        if s.kind in ("branch point", "pole", "essential"):
            out.append(Contour.loop(s.point))
        elif s.kind == "zero":                 # integer exponent >= 1: the loop vanishes, the ray does not
            out.append(Contour.half_line(s.point))
        for m in range(len(s.valleys)):        # essential: the integrand vanishes into each local valley
            out.append(Contour.half_line(s.point, sector=m))
    for z in getattr(rep, "ordinary_zeros", ()):
        out.append(Contour.half_line(z))        # exponent 0: f is analytic there, B f vanishes
    if len(out) != rep.order:
        raise ContourError(f"found {len(out)} independent contours for an equation of order {rep.order}; "
                           f"build the missing solutions from Contour.between, Contour.loop and "
                           f"Contour.half_line by hand")
    for c in out:
        c.owner = rep
    return out
