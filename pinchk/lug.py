"""Lug outline geometry along any direction: the material a pin pushes against, and the section across it.

A lug plate is described in its own coordinates: ``s`` along its axis (from the hole centre toward the
lug's end) and ``n`` across it (``s`` turned 90° counter-clockwise), the hole centre at the origin. Three
outlines are exact:

- ``round``:  the strip |n| <= width/2, cut off at the base s >= -base, ending in a circular arc of radius
  ``radius`` about ``centre`` (by default the hole centre): the region
  {|n| <= w/2} ∩ {s >= -base} ∩ ({s <= s_c} ∪ disc(centre, radius)).
  A width larger than the arc's diameter leaves shoulders at s = s_c; a smaller one flattens the sides.
- ``square``: {|n| <= w/2} ∩ {s >= -base} ∩ {s <= end}.
- ``polygon``: the vertices (s, n) in order around the outline; the closing edge (last vertex back to the
  first) is the base, where the lug joins its body.

The base is where the plate continues into its body, so a ray that leaves the outline through the base
meets no free edge: its reach is infinite (no tear-out toward the body). ``base = None`` runs the sides of a
round or square lug back without end.

For a force on the plate along the unit vector u (the pin pushes the plate that way), the checks use:
``a``: hole edge to the outline along u (material beyond the hole along the force), and ``c+``, ``c-``:
hole edge to the outline along ±u turned 90° (the two ligaments of the net section across the force,
through the hole centre). Every figure is the exact intersection of a ray with straight edges and arcs.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import numpy.typing as npt

Array = npt.NDArray[np.float64]

#: Force directions closer than this to the axis [deg] count as along it (no off-axis note).
AXIS_TOL_DEG = 1.0


@dataclass(frozen=True)
class Outline:
    """A lug outline in lug coordinates (s along the axis, n across), hole centre at the origin [m]."""

    kind: str  # "round", "square" or "polygon"
    width: float | None = None  # round, square: width across the axis
    end: float | None = None  # square: hole centre to the end; round: the arc radius
    centre: tuple[float, float] = (0.0, 0.0)  # round: centre of the end arc (s, n)
    base: float | None = None  # round, square: hole centre to the base line behind it (None: no end)
    vertices: tuple[tuple[float, float], ...] | None = None  # polygon, the closing edge is the base

    def __post_init__(self) -> None:
        if self.kind not in OUTLINES:
            raise ValueError(f"unknown outline '{self.kind}'; one of {', '.join(OUTLINES)}")

    def reach(self, u: Array) -> Array:
        """Distance from the hole centre to the outline along each local unit vector ``u`` (n, 2) [m].

        ``inf`` where the ray leaves through the base (the plate runs on into its body).
        """
        u = np.atleast_2d(np.asarray(u, float))
        t, attached = OUTLINES[self.kind](self, u[:, 0], u[:, 1])
        return np.where(attached, np.inf, t)

    def min_reach(self, samples: int = 720) -> float:
        """Smallest reach over ``samples`` directions (to check the hole fits inside)."""
        th = np.linspace(0.0, 2 * np.pi, samples, endpoint=False)
        return float(self.reach(np.column_stack([np.cos(th), np.sin(th)])).min())


def _halfplane(us: Array, un: Array, ms: float, mn: float, h: float) -> tuple[Array, Array]:
    """Ray parameters t >= 0 inside {ms s + mn n <= h}: one interval (lo, hi); empty as (inf, -inf)."""
    um = us * ms + un * mn
    um = np.where(np.abs(um) < 1e-12, 0.0, um)  # a ray parallel to the edge (round-off of cos 90°)
    with np.errstate(divide="ignore", invalid="ignore"):
        r = h / um
    lo = np.where(um < 0, np.maximum(0.0, r), 0.0)
    hi = np.where(um > 0, r, np.inf)
    empty = (hi < lo) | ((um == 0) & (h < 0))
    return np.where(empty, np.inf, lo), np.where(empty, -np.inf, hi)


def _disc(us: Array, un: Array, cs: float, cn: float, R: float) -> tuple[Array, Array]:
    """Ray parameters t >= 0 inside the disc |p - c| <= R: t² - 2 t (u·c) + |c|² - R² <= 0."""
    b = us * cs + un * cn
    disc = b * b - (cs * cs + cn * cn - R * R)
    root = np.sqrt(np.maximum(disc, 0.0))
    lo, hi = np.maximum(0.0, b - root), b + root
    empty = (disc < 0) | (hi < 0)
    return np.where(empty, np.inf, lo), np.where(empty, -np.inf, hi)


def _strip_and_base(o: Outline, us: Array, un: Array) -> tuple[Array, Array]:
    """Exit of the strip |n| <= w/2 cut at the base: (t, leaves through the base)."""
    w2 = o.width / 2
    hi = np.minimum(_halfplane(us, un, 0.0, 1.0, w2)[1], _halfplane(us, un, 0.0, -1.0, w2)[1])
    if o.base is None:
        return hi, np.isinf(hi)  # running back between the sides without end
    back = _halfplane(us, un, -1.0, 0.0, o.base)[1]
    return np.minimum(hi, back), back <= hi


def _round(o: Outline, us: Array, un: Array) -> tuple[Array, Array]:
    t_side, attached = _strip_and_base(o, us, un)
    cs, cn = o.centre
    a0, a1 = _halfplane(us, un, 1.0, 0.0, cs)  # the straight part, up to the arc centre's line
    b0, b1 = _disc(us, un, cs, cn, o.end)
    # the stretch of the union {s <= s_c} ∪ disc that starts at the hole centre (t = 0)
    e = np.maximum(np.where(a0 <= 0, a1, -np.inf), np.where(b0 <= 0, b1, -np.inf))
    for _ in range(2):  # two convex pieces: two passes join every overlap
        e = np.where((a0 <= e) & (a1 > e), a1, e)
        e = np.where((b0 <= e) & (b1 > e), b1, e)
    return np.minimum(e, t_side), attached & (t_side <= e)


def _square(o: Outline, us: Array, un: Array) -> tuple[Array, Array]:
    t_side, attached = _strip_and_base(o, us, un)
    t_end = _halfplane(us, un, 1.0, 0.0, o.end)[1]
    return np.minimum(t_end, t_side), attached & (t_side <= t_end)


def _polygon(o: Outline, us: Array, un: Array) -> tuple[Array, Array]:
    p = np.asarray(o.vertices, float)
    e = np.roll(p, -1, axis=0) - p  # edge k from vertex k to k+1; the last one closes back: the base
    # ray t u meets p_k + λ e_k: cross products give t and λ
    den = us[:, None] * e[None, :, 1] - un[:, None] * e[None, :, 0]
    with np.errstate(divide="ignore", invalid="ignore"):
        t = (p[None, :, 0] * e[None, :, 1] - p[None, :, 1] * e[None, :, 0]) / den
        lam = (p[None, :, 0] * un[:, None] - p[None, :, 1] * us[:, None]) / den
    scale = float(np.abs(p).max())
    ok = (den != 0) & (t > 1e-12 * scale) & (lam >= -1e-12) & (lam <= 1 + 1e-12)
    t = np.where(ok, t, np.inf)
    base = np.zeros(len(p), bool)
    base[-1] = True
    # a ray through a vertex shared by the base and a free edge is taken to meet the free edge
    key = t + np.where(base, 1e-12 * scale, 0.0)[None, :]
    k = np.argmin(key, axis=1)
    tk = t[np.arange(len(us)), k]
    return tk, base[k] | np.isinf(tk)


OUTLINES = {"round": _round, "square": _square, "polygon": _polygon}


def polygon_area(vertices) -> float:
    """Signed area of a polygon (shoelace formula) [m²]."""
    p = np.asarray(vertices, float)
    q = np.roll(p, -1, axis=0)
    return 0.5 * float(np.sum(p[:, 0] * q[:, 1] - q[:, 0] * p[:, 1]))


def polygon_simple(vertices) -> bool:
    """True when no two non-adjacent edges of the polygon cross."""
    p = np.asarray(vertices, float)
    n = len(p)

    def cross(o, a, b):
        return (a[0] - o[0]) * (b[1] - o[1]) - (a[1] - o[1]) * (b[0] - o[0])

    for i in range(n):
        a, b = p[i], p[(i + 1) % n]
        for j in range(i + 2, n):
            if i == 0 and j == n - 1:
                continue
            c, d = p[j], p[(j + 1) % n]
            if (cross(a, b, c) * cross(a, b, d) < 0) and (cross(c, d, a) * cross(c, d, b) < 0):
                return False
    return True


def unit(v) -> Array:
    """Unit vectors of the rows of ``v`` (n, 2); a zero row stays zero."""
    v = np.atleast_2d(np.asarray(v, float))
    n = np.linalg.norm(v, axis=-1, keepdims=True)
    return np.divide(v, n, out=np.zeros_like(v), where=n > 0)


@dataclass(frozen=True)
class LugGeometry:
    """Geometry of one lug along each of n force directions [m, rad]."""

    reach: Array  # hole centre to the outline along the force (inf: into the body)
    a: Array  # hole edge to the outline along the force
    c_pos: Array  # hole edge to the outline across the force, on its left (u turned +90°)
    c_neg: Array  # the same on its right
    angle: Array  # angle from the lug axis to the force, (-pi, pi]
    width: Array  # symmetric width about the hole inside the outline across the force: d0 + 2 min(c)

    @property
    def c(self) -> Array:
        return np.minimum(self.c_pos, self.c_neg)


def along(outline: Outline, d0: float, u_frame, axis: tuple[float, float] | None) -> LugGeometry:
    """The lug's geometry for forces along the frame unit vectors ``u_frame`` (n, 2).

    Args:
        outline: the lug outline in its own coordinates.
        d0: hole diameter [m] (with any wear allowance).
        u_frame: direction of the force on the plate, frame coordinates (zero rows: along the axis).
        axis: the lug axis in frame coordinates; None takes the axis along the force in every row.
    """
    u = unit(u_frame)
    n = len(u)
    if axis is None:
        loc = np.tile([1.0, 0.0], (n, 1))
    else:
        ax = unit(axis)[0]
        zero = ~np.any(u != 0, axis=1)
        u = np.where(zero[:, None], ax, u)
        # rotate into lug coordinates: s = u·axis, n = u·(axis turned +90°)
        loc = np.column_stack([u @ ax, u @ np.array([-ax[1], ax[0]])])
    perp = np.column_stack([-loc[:, 1], loc[:, 0]])
    r = outline.reach(loc)
    cp = outline.reach(perp) - d0 / 2
    cn = outline.reach(-perp) - d0 / 2
    ang = np.arctan2(loc[:, 1], loc[:, 0])
    return LugGeometry(r, r - d0 / 2, cp, cn, ang, d0 + 2 * np.minimum(cp, cn))


def base_section(outline: Outline) -> tuple[float | None, float | None]:
    """Distance from the hole centre to the base section and the section's width, where the outline has them.

    Round and square: the base line at s = -base, as wide as the lug. Polygon: the closing edge (the
    base); its distance is measured from the hole centre perpendicular to it.
    """
    if outline.kind == "polygon":
        p = np.asarray(outline.vertices, float)
        a, b = p[-1], p[0]
        e = b - a
        L = float(np.hypot(*e))
        dist = abs(float(a[0] * e[1] - a[1] * e[0])) / L
        return dist, L
    return outline.base, outline.width
