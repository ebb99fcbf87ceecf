"""The pin as a beam through its stack (pinchk.stack), against outside references.

- EN 1993-1-8:2005 Fig. 3.11: the clevis moment MEd = FEd (b + 4c + 2a) / 8 (a outer plate thickness,
  b inner plate thickness, c gap), here with the force at any angle in the plane.
- An independent beam solution: sympy.physics.continuum_mechanics.beam.Beam, one beam per component,
  loaded with each plate's force spread uniformly over its thickness, for the shear and bending moment
  along the pin.
- Hand statics for the point-load model (loads at the plate centres).
Dimensions and forces are invented for the tests.
"""

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from numpy.testing import assert_allclose

from pinchk.frame import PinForces
from pinchk.model import Material, Pin, Plate
from pinchk.stack import solve_stack

STEEL = Material("S355", 355e6, 490e6, 210e9, "test")


def make_pin(members, thick, gaps, model="uniform", shares=None):
    plates = tuple(Plate(m, t, g, None if shares is None else shares[i], STEEL, 0.2, 0.1, "round", 0.051, "A")
                   for i, (m, t, g) in enumerate(zip(members, thick, gaps, strict=True)))
    return Pin("P", (0.0, 0.0), tuple(sorted(set(members))), 0.05, STEEL, plates, pin_model=model)


def forces(members, per_member):
    """PinForces for one case: per_member = {member: (Fx, Fy)} the force each member receives."""
    names = tuple(dict.fromkeys(members))
    f = np.array([[per_member[m] for m in names]], float)
    return PinForces("P", names, f)


@pytest.mark.parametrize("a,b,c,angle", [(0.02, 0.03, 0.002, 0.0), (0.012, 0.04, 0.005, 37.0),
                                         (0.025, 0.025, 0.0, 200.0)])
def test_symmetric_clevis_is_fig_3_11(a, b, c, angle):
    F = 180e3
    u = (math.cos(math.radians(angle)), math.sin(math.radians(angle)))
    pin = make_pin(["fork", "eye", "fork"], [a, b, a], [0.0, c, c])
    pf = forces(["fork", "eye"], {"eye": (F * u[0], F * u[1]), "fork": (-F * u[0], -F * u[1])})
    st = solve_stack(pin, pf)
    # EN 1993-1-8:2005 Fig. 3.11: MEd = FEd (b + 4c + 2a) / 8
    assert_allclose(st.moment, F * (b + 4 * c + 2 * a) / 8, rtol=1e-12)
    assert_allclose(st.shear, F / 2, rtol=1e-12)  # two shear planes, F/2 each (Table 3.10 per plane)
    assert_allclose(st.moment_at, a + c + b / 2, rtol=1e-9)  # at the middle of the eye, by symmetry
    assert st.parts[st.moment_plate[0]] == "eye"
    # the vector moment lies along the force, as every load does
    assert_allclose(abs(st.moment_vec[0] @ np.array([-u[1], u[0]])), 0.0, atol=1e-9 * F * b)


def test_point_load_model_is_the_conservative_alternative():
    a, b, c, F = 0.02, 0.03, 0.002, 100e3
    pf = forces(["fork", "eye"], {"eye": (F, 0.0), "fork": (-F, 0.0)})
    pt = solve_stack(make_pin(["fork", "eye", "fork"], [a, b, a], [0.0, c, c], model="point"), pf)
    un = solve_stack(make_pin(["fork", "eye", "fork"], [a, b, a], [0.0, c, c]), pf)
    # hand statics: F/2 at the outer plate's centre, lever arm to the eye's centre a/2 + c + b/2
    assert_allclose(pt.moment, F / 2 * (a / 2 + c + b / 2), rtol=1e-12)
    assert pt.model == "point" and np.all(pt.moment > un.moment)
    assert_allclose(pt.shear, un.shear, rtol=1e-12)  # shear at the planes does not depend on the model


def _sympy_moment(stack_z0, t, load, zs):
    """Bending moment and shear of a free beam loaded uniformly over each plate: sympy Beam, per component."""
    import sympy as sp
    from sympy.physics.continuum_mechanics.beam import Beam

    L = float(stack_z0[-1] + t[-1])
    out_M, out_V = [], []
    for k in range(2):
        beam = Beam(sp.nsimplify(L), 1, 1)
        for z0, ti, f in zip(stack_z0, t, load, strict=True):
            beam.apply_load(sp.Float(f[k] / ti, 30), sp.Float(z0, 30), 0, end=sp.Float(z0 + ti, 30))
        M = beam.bending_moment()
        V = beam.shear_force()
        x = beam.variable
        out_M.append([float(M.subs(x, z)) for z in zs])
        out_V.append([float(V.subs(x, z)) for z in zs])
    return np.array(out_M).T, np.array(out_V).T


def test_stack_against_sympy_beam():
    # six plates of four members in an unsymmetric stack; each member's plates share its force by
    # thickness (the default). Members 1 and 2 push in their own directions; 3 and 4 are solved so that
    # the forces balance (sum F = 0) and leave no net couple (sum F zbar = 0, zbar the member's
    # thickness-weighted centre), so the free beam needs no end couples and sympy's Beam can be loaded
    # with the plates alone.
    t = np.array([0.015, 0.02, 0.03, 0.012, 0.025, 0.018])
    gaps = [0.0, 0.002, 0.003, 0.001, 0.004, 0.002]
    members = ["boom", "jib", "rocker", "jib", "tie", "boom"]
    z0 = np.concatenate([[0.0], np.cumsum(t[:-1] + np.array(gaps[1:]))])
    zc = z0 + t / 2
    names = ["boom", "jib", "rocker", "tie"]
    zbar = [np.average(zc[[i for i, m in enumerate(members) if m == n]],
                       weights=t[[i for i, m in enumerate(members) if m == n]]) for n in names]
    F1, F2 = np.array([-60e3, -35e3]), np.array([90e3, -20e3])
    A = np.array([[1.0, 1.0], [zbar[2], zbar[3]]])
    F34 = np.linalg.solve(A, -np.array([F1 + F2, F1 * zbar[0] + F2 * zbar[1]]))
    pin = make_pin(members, t, gaps)
    pf = forces(members, dict(zip(names, [F1, F2, F34[0], F34[1]], strict=True)))
    st = solve_stack(pin, pf)
    assert_allclose(st.end_couple, 0.0, atol=1e-9 * 1e5)
    assert_allclose(st.imbalance, 0.0, atol=1e-6)
    assert len({tuple(np.round(f / np.linalg.norm(f), 6)) for f in st.plate_force[0]}) >= 4  # not collinear
    load = -st.plate_force[0]
    zs = np.linspace(0.0, st.length, 61)[1:-1]
    M_ref, _ = _sympy_moment(st.z0, st.thickness, load, zs)
    M = st.moment_along(zs)[0]
    # sympy's sign convention for the moment may differ from ours: compare with the one sign that fits
    sign = np.sign(np.sum(M_ref * M))
    assert_allclose(M, sign * M_ref, rtol=1e-9, atol=1e-9 * np.abs(M_ref).max())
    # shear at each plane (mid-gap) against the sympy shear force there, by magnitude
    _, Vp = _sympy_moment(st.z0, st.thickness, load, st.plane_z)
    assert_allclose(st.plane_shear[0], np.linalg.norm(Vp, axis=1), rtol=1e-9)
    # the exact largest |M| (cubic roots) is at least every sampled value and matches a fine sampling
    fine = np.linspace(0.0, st.length, 4001)
    Mf = np.linalg.norm(st.moment_along(fine)[0], axis=1)
    assert st.moment[0] >= Mf.max() * (1 - 1e-12)
    assert_allclose(st.moment[0], Mf.max(), rtol=1e-5)
    assert_allclose(np.linalg.norm(st.moment_along([st.moment_at[0]])[0, 0]), st.moment[0], rtol=1e-9)
    assert_allclose(np.linalg.norm(st.moment_vec[0]), st.moment[0], rtol=1e-12)


def test_unsymmetric_stack_uses_end_couples():
    # single lap of two plates, thickness t1, t2, gap g: the end-couple model gives F (t1 + 2g + t2) / 4
    # (worked by hand from M(0) = C/2 with C = F (t1/2 + g + t2/2) the couple of the two plate forces)
    t1, t2, g, F = 0.02, 0.03, 0.004, 50e3
    pin = make_pin(["a", "b"], [t1, t2], [0.0, g])
    st = solve_stack(pin, forces(["a", "b"], {"a": (F, 0.0), "b": (-F, 0.0)}))
    assert_allclose(st.moment, F * (t1 + 2 * g + t2) / 4, rtol=1e-12)


def test_causes_name_the_plates():
    pin = make_pin(["fork", "eye", "fork"], [0.02, 0.03, 0.02], [0.0, 0.002, 0.002])
    st = solve_stack(pin, forces(["fork", "eye"], {"eye": (1e5, 0.0), "fork": (-1e5, 0.0)}))
    assert "fork 1/2" in st.shear_cause(0) and "eye" in st.moment_cause(0)
    assert st.share_note == "load share in proportion to plate thickness"
    given = solve_stack(make_pin(["fork", "eye", "fork"], [0.02, 0.03, 0.02], [0.0, 0.002, 0.002],
                                 shares=[0.7, None, 0.3]),
                        forces(["fork", "eye"], {"eye": (1e5, 0.0), "fork": (-1e5, 0.0)}))
    assert given.share_note == "load share as given"
    assert_allclose(given.plate_force[0, [0, 2], 0], [-0.7e5, -0.3e5], rtol=1e-12)


@settings(max_examples=40, deadline=None)
@given(st_n=st.integers(2, 6), seed=st.integers(0, 2**31 - 1))
def test_point_model_never_below_uniform(st_n, seed):
    # inside each plate the uniform-bearing moment is a quadratic Bézier curve whose control points are
    # the moments at the plate's faces and the point-load moment at its centre (the tangents at the faces
    # meet there), so it stays in their convex hull and its |M| never exceeds the point model's
    # (a property of Bézier curves; any stack and any forces in equilibrium)
    rng = np.random.default_rng(seed)
    members = [f"m{i}" for i in range(st_n)]
    f = rng.normal(size=(st_n, 2)) * 1e5
    f[-1] = -f[:-1].sum(axis=0)
    t = rng.uniform(0.005, 0.05, st_n)
    gaps = np.concatenate([[0.0], rng.uniform(0.0, 0.01, st_n - 1)])
    pf = forces(members, {m: tuple(fi) for m, fi in zip(members, f, strict=True)})
    un = solve_stack(make_pin(members, t, gaps), pf)
    pt = solve_stack(make_pin(members, t, gaps, model="point"), pf)
    assert pt.moment[0] >= un.moment[0] * (1 - 1e-12)
    assert_allclose(pt.plane_shear, un.plane_shear, rtol=1e-12)
