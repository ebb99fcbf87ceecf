"""Lug outline geometry along a direction (pinchk.lug) against hand geometry.

Every expected value is worked by hand in the test from plane geometry: the intersection of a ray from
the hole centre with a circle (law of cosines) or with a straight edge (trigonometry of a right
triangle). Dimensions are invented for the test.
"""

import math

import numpy as np
import pytest
from numpy.testing import assert_allclose

from pinchk.lug import Outline, along, base_section, polygon_simple


def d(deg):
    return np.array([[math.cos(math.radians(deg)), math.sin(math.radians(deg))]])


def test_round_lug_about_hole_centre():
    # width 180 = 2 R: a semicircle of R = 90 ahead of the hole, sides at n = ±90 behind it
    o = Outline("round", width=0.18, end=0.09, base=0.2)
    for th in (0, 25, 60, 89):
        assert_allclose(o.reach(d(th)), 0.09, rtol=1e-12)  # on the arc: the radius
    # behind the hole centre line the ray meets a side: t = (w/2) / sin θ (right triangle)
    assert_allclose(o.reach(d(120)), 0.09 / math.sin(math.radians(120)), rtol=1e-12)
    # straight back it meets the base, where the plate runs on into its body: no free edge
    assert np.isinf(o.reach(d(180))).all()
    # ray at 160°: side at t = 0.09/sin 160° = 0.263 m lies beyond the base at s = -0.2, reached at
    # t = 0.2/cos 20° = 0.213 m, so it leaves through the base
    assert np.isinf(o.reach(d(160))).all()


def test_round_lug_arc_about_another_point():
    # arc of R = 100 about (s_c, 0) = (-20, 0): along θ the ray meets the circle where
    # t² - 2 t s_c cos θ + s_c² - R² = 0, t = s_c cos θ + √(R² - s_c² sin² θ) (law of cosines)
    sc, R = -0.02, 0.10
    o = Outline("round", width=0.30, end=R, centre=(sc, 0.0))
    for th in (0.0, 30.0, 70.0):
        c, s = math.cos(math.radians(th)), math.sin(math.radians(th))
        assert_allclose(o.reach(d(th)), sc * c + math.sqrt(R**2 - sc**2 * s**2), rtol=1e-12)
    # at 90° the ray runs along s = 0, ahead of the arc centre's line s = s_c, so only the disc holds
    # it: t = √(R² - s_c²)
    assert_allclose(o.reach(d(90)), math.sqrt(R**2 - sc**2), rtol=1e-12)


def test_round_lug_narrower_than_its_arc_and_shoulders():
    # width 120 < 2R = 180: flat sides at n = ±60 cut the arc; at 60° the side comes first:
    # t = 0.06 / sin 60° = 0.0693 < R
    o = Outline("round", width=0.12, end=0.09)
    assert_allclose(o.reach(d(60)), 0.06 / math.sin(math.radians(60)), rtol=1e-12)
    assert_allclose(o.reach(d(20)), 0.09, rtol=1e-12)  # sin 20° * 0.09 = 0.031 < 0.06: on the arc
    # width 240 > 2R: shoulders at s = 0; straight across the ray runs to the side at 0.12
    o2 = Outline("round", width=0.24, end=0.09)
    assert_allclose(o2.reach(d(90)), 0.12, rtol=1e-12)
    assert_allclose(o2.reach(d(45)), 0.09, rtol=1e-12)


def test_square_lug_edge_distance_along_30_degrees():
    # square end 60 mm ahead, width 100: at 30° the end is met at 0.06/cos 30° = 69.28 mm, the side
    # would be at 0.05/sin 30° = 100 mm: the end governs
    o = Outline("square", width=0.10, end=0.06, base=0.15)
    assert_allclose(o.reach(d(30)), 0.06 / math.cos(math.radians(30)), rtol=1e-12)
    # at 60° the side governs: 0.05/sin 60° = 57.7 mm < 0.06/cos 60° = 120 mm
    assert_allclose(o.reach(d(60)), 0.05 / math.sin(math.radians(60)), rtol=1e-12)
    g = along(o, 0.032, d(30), (1.0, 0.0))
    # material beyond the hole along the force: a = 69.28 - 16 mm; across the force, the ligaments run
    # at 120° (toward the side: 0.05/sin 120°) and at -60° (0.05/sin 60°), less the hole radius
    assert_allclose(g.a, 0.06 / math.cos(math.radians(30)) - 0.016, rtol=1e-12)
    assert_allclose(g.c_pos, 0.05 / math.sin(math.radians(120)) - 0.016, rtol=1e-12)
    assert_allclose(g.c_neg, 0.05 / math.sin(math.radians(60)) - 0.016, rtol=1e-12)
    assert_allclose(g.angle, math.radians(30), rtol=1e-12)


def test_axis_turns_the_outline_into_the_frame():
    # the same square lug with its axis at 90° in the frame: a force at 120° is 30° off the axis
    o = Outline("square", width=0.10, end=0.06)
    g = along(o, 0.032, d(120), (0.0, 2.0))
    assert_allclose(g.angle, math.radians(30), rtol=1e-12)
    assert_allclose(g.reach, 0.06 / math.cos(math.radians(30)), rtol=1e-12)
    # without an axis the axis follows the force: straight ahead
    g0 = along(o, 0.032, d(120), None)
    assert_allclose(g0.reach, 0.06, rtol=1e-12)
    assert_allclose(g0.width, 0.10, rtol=1e-12)


def test_polygon_padeye():
    # a trapezoid padeye listed from one end of its base round to the other: the base from (-0.1, 0.08)
    # back to (-0.1, -0.08) is the closing edge; top edge at s = 0.05 between n = ±0.04, slanted sides
    v = ((-0.1, -0.08), (0.05, -0.04), (0.05, 0.04), (-0.1, 0.08))
    o = Outline("polygon", vertices=v)
    assert_allclose(o.reach(d(0)), 0.05, rtol=1e-12)
    # at 90° the ray meets the slanted side from (-0.1, 0.08) to (0.05, 0.04): on s = 0 that side has
    # n = 0.08 - 0.04 * (0.1 / 0.15) = 0.05333
    assert_allclose(o.reach(d(90)), 0.08 - 0.04 * 0.1 / 0.15, rtol=1e-12)
    # to the top-right corner direction (0.05, 0.04): the corner itself, √(0.05² + 0.04²)
    ang = math.degrees(math.atan2(0.04, 0.05))
    assert_allclose(o.reach(d(ang)), math.hypot(0.05, 0.04), rtol=1e-9)
    assert np.isinf(o.reach(d(180))).all()  # the base (closing edge)
    assert base_section(o) == pytest.approx((0.1, 0.16))
    assert polygon_simple(v)
    assert not polygon_simple(((0, 0), (1, 1), (1, 0), (0, 1)))


def test_outline_kind_is_checked():
    with pytest.raises(ValueError, match="unknown outline"):
        Outline("oval", width=1.0, end=1.0)


def test_convex_polygon_reach_against_scipy_hull():
    # independent reference: scipy.spatial.ConvexHull gives the hull as half-planes n·x + h <= 0; from the
    # hole centre (origin, inside) a ray along u leaves it at t = min over n·u > 0 of (-h / n·u)
    from scipy.spatial import ConvexHull

    rng = np.random.default_rng(7)
    for _ in range(20):
        pts = rng.normal(size=(12, 2)) * 0.1 + rng.normal(size=2) * 0.01
        hull = ConvexHull(pts)
        eq = hull.equations  # rows (nx, ny, h)
        if not np.all(eq[:, 2] < -1e-3):  # the origin must lie inside, clear of the edges
            continue
        verts = pts[hull.vertices]  # counter-clockwise corners
        o = Outline("polygon", vertices=tuple(map(tuple, verts)))
        th = np.linspace(0, 2 * np.pi, 97, endpoint=False)
        u = np.column_stack([np.cos(th), np.sin(th)])
        nu = u @ eq[:, :2].T
        with np.errstate(divide="ignore"):
            t_ref = np.where(nu > 0, -eq[None, :, 2] / nu, np.inf).min(axis=1)
        # which edge each ray leaves through: the base is the closing edge, last corner to first
        hit = u * t_ref[:, None]
        a, b = verts[-1], verts[0]
        e = b - a
        on_base = np.abs((hit[:, 0] - a[0]) * e[1] - (hit[:, 1] - a[1]) * e[0]) / np.hypot(*e) < 1e-9
        got = o.reach(u)
        assert_allclose(got[~on_base], t_ref[~on_base], rtol=1e-9)
        assert np.isinf(got[on_base]).all()
