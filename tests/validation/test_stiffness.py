"""The stiffness solve (pinchk.stiffness) against closed-form handbook cases, sympy's Beam and statics.

Sources of the check values (each case names its own):

- AISC, Steel Construction Manual, 15th ed. (2017), Part 3, Table 3-23 "Shears, Moments and
  Deflections", the diagrams titled "beam fixed at one end, supported at other" (uniform load,
  concentrated load at centre, concentrated load at any point) and "continuous beam, two equal spans"
  (uniform load; concentrated load at centre of one span; of both spans). The formulas are from memory
  and the diagram numbers are not given because I could not fix them without the Manual at hand; every
  formula used is also checked against sympy's Beam or against equilibrium below.
- A. Kleinlogel, Rigid Frame Formulas (Ungar, 1958), the rectangular single-bay portal with fixed feet
  and with hinged feet, under a horizontal load at beam level and a vertical load at mid-span, with
  k = (I_beam / I_column) (h / L). Formulas from memory, and re-derived in the docstrings below by the
  slope-deflection method (common practice), so a misremembered formula would show.
- sympy.physics.continuum_mechanics.beam.Beam (sympy 1.14): an independent solver of statically
  indeterminate beams by singularity functions.
- pinchk.frame (rigid-body statics): on determinate frames the two solvers must agree to round-off,
  since equilibrium alone fixes the forces whatever the stiffness.

Every stiffness solution is also checked for equilibrium of every body and pin from its own forces
(pinchk.frame.equilibrium_residual).
"""

from __future__ import annotations

import dataclasses
import json
import subprocess
import sys
import tomllib
from pathlib import Path

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from numpy.testing import assert_allclose

from pinchk import frame, stiffness
from pinchk.errors import InputError, StructureError
from pinchk.jobfile import load_job, parse_job
from pinchk.solve import solve

ROOT = Path(__file__).resolve().parents[2]

HEAD = """
[job]
title = "test frame (invented)"
solver = "{solver}"
[units]
length = "m"
force = "kN"
[method]
name = "EN 1993-1-8"
[section.beam]
E = "200 GPa"
A = "{A}"
I = "{I}"
[section.stiff]
E = "200 GPa"
A = "1 m^2"
I = "1 m^4"
"""


def job_of(src: str, solver: str = "auto", A: str = "8000 mm^2", I: str = "1.2e8 mm^4"):
    text = HEAD.format(solver=solver, A=A, I=I) + src
    return parse_job(tomllib.loads(text), "test.toml", text)


def beam_job(xs: dict[str, float], supports: dict[str, str], loads: list[tuple[str, float, float]],
             solver: str = "auto", **kw):
    """A straight beam along x: points at ``xs`` [m], supports {point: kind}, loads (point, Fy kN, M kN*m)."""
    pts = ", ".join(f"{k} = [{x}, 0]" for k, x in xs.items())
    src = f"[body.b]\npoints = {{ {pts} }}\nsection = \"beam\"\n[case.c]\n"
    for k, kind in supports.items():
        src += f"[support.S{k}]\nat = \"b.{k}\"\nkind = \"{kind}\"\n"
        if kind == "roller":
            src += "normal = [0, 1]\n"
    for p, fy, mz in loads:
        src += f"[[load]]\ncase = \"c\"\nat = \"b.{p}\"\nforce = [0, {fy}]\n"
        if mz:
            src += f"moment = \"{mz} kN*m\"\n"
    return job_of(src, solver, **kw)


def check_equilibrium(job, sol):
    assert frame.equilibrium_residual(job, sol) <= 1e-9
    assert sol.residual <= 1e-9


# ---------------------------------------------------------------- determinate: both solvers agree

DETERMINATE = {
    "simple beam, load and moment": """
[body.b]
points = { A = [0, 0], C = [1.3, 0], B = [5, 0] }
section = "beam"
[support.left]
at = "b.A"
kind = "pinned"
[support.right]
at = "b.B"
kind = "roller"
normal = [0.2, 1]
[case.c]
[[load]]
case = "c"
at = "b.C"
force = [3, -40]
moment = "12 kN*m"
""",
    "three-hinged portal, pins at feet and crown": """
[body.left]
points = { F = [0, 0], K = [0, 4], T = [3, 5] }
section = "beam"
[body.right]
points = { F = [6, 0], K = [6, 4], T = [3, 5] }
section = "beam"
[pin.PT]
joins = ["left.T", "right.T"]
[pin.PL]
joins = ["left.F"]
[pin.PR]
joins = ["right.F"]
[support.SL]
at = "PL"
kind = "pinned"
[support.SR]
at = "PR"
kind = "pinned"
[case.wind]
[case.crane]
[[load]]
case = "wind"
at = "left.K"
force = [15, 0]
[[load]]
case = "crane"
at = "PT"
force = [0, -80]
[[load]]
case = "crane"
at = "right.K"
force = [-5, -20]
""",
    "boom on a wall pin held by a tie cable, hook at the tip": """
[body.boom]
points = { W = [0, 0], M = [2, 0], T = [4, 0] }
section = "beam"
[body.post]
points = { G = [-0.5, 0], H = [-0.5, 3] }
section = "stiff"
[pin.PW]
joins = ["boom.W"]
[support.wall]
at = "PW"
kind = "pinned"
[support.base]
at = "post.G"
kind = "fixed"
[link.tie]
ends = ["post.H", "boom.T"]
kind = "cable"
EA = "150000 kN"
[case.c]
[[load]]
case = "c"
at = "boom.M"
force = [0, -30]
[[load]]
case = "c"
at = "boom.T"
force = [0, -10]
""",
    "bell crank with explicit members on a pivot and a rod": """
[body.crank]
points = { O = [0, 0], A = [0.4, 0], B = [0, 0.3] }
section = "beam"
members = [["O", "A"], ["A", "B"], ["B", "O"]]
[pin.PO]
joins = ["crank.O"]
[pin.PB]
joins = ["crank.B"]
[support.pivot]
at = "PO"
kind = "pinned"
[support.rod_end]
at = "PB"
kind = "roller"
normal = [1, 0]
[case.c]
[[load]]
case = "c"
at = "crank.A"
force = [0, -5]
""",
}


@pytest.mark.parametrize("name", list(DETERMINATE))
def test_determinate_frames_agree_with_statics(name):
    """Determinate: equilibrium alone fixes every force, so stiffness and statics agree to round-off."""
    job = job_of(DETERMINATE[name])
    a = frame.solve(job)
    b = stiffness.solve(job)
    check_equilibrium(job, b)
    scale = max(np.abs(pf.force).max() for pf in a.pins.values()) if a.pins else 1.0
    scale = max([scale] + [np.abs(r).max() for r in a.supports.values()])
    for p in a.pins:
        assert a.pins[p].members == b.pins[p].members
        assert_allclose(b.pins[p].force, a.pins[p].force, rtol=0, atol=1e-10 * scale)
    for s in a.supports:
        assert_allclose(b.supports[s], a.supports[s], rtol=0, atol=1e-10 * scale)
    for ln in a.links:
        assert_allclose(b.links[ln], a.links[ln], rtol=0, atol=1e-10 * scale)
    assert solve(job).solver == frame.FrameSolution.solver  # auto: determinate -> statics
    assert b.solver == stiffness.SOLVER


def test_example_gantry_with_sections_agrees():
    """The bundled A-frame example (determinate) with sections added: both solvers, both cases."""
    text = (ROOT / "examples" / "a_frame_gantry.toml").read_text()
    text = text.replace("[body.leg_left]", '[section.leg]\nE = "210 GPa"\nA = "5000 mm^2"\nI = "3e7 mm^4"\n'
                        '[body.leg_left]\nsection = "leg"')
    text = text.replace("[body.leg_right]", '[body.leg_right]\nsection = "leg"')
    job = parse_job(tomllib.loads(text), "gantry.toml", text)
    a, b = frame.solve(job), stiffness.solve(job)
    check_equilibrium(job, b)
    for p in a.pins:
        assert_allclose(b.pins[p].force, a.pins[p].force, rtol=0, atol=1e-9 * 1.5e5)


def test_example_jib_bracket_with_a_section_agrees():
    """The bundled jib bracket example (determinate; a pin at a place of its own, US units) with a
    section on its arm and EA on its strut: both solvers agree."""
    text = (ROOT / "examples" / "jib_bracket_aisc.toml").read_text()
    text = text.replace("[body.arm]", '[section.arm]\nE = "29000 ksi"\nA = "5.9 in^2"\nI = "46 in^4"\n'
                        '[body.arm]\nsection = "arm"', 1)
    text = text.replace("[link.strut]", '[link.strut]\nEA = "100000 kip"', 1)
    job = parse_job(tomllib.loads(text), "jib.toml", text)
    a, b = frame.solve(job), stiffness.solve(job)
    check_equilibrium(job, b)
    scale = max(np.abs(pf.force).max() for pf in a.pins.values())
    for p in a.pins:
        assert_allclose(b.pins[p].force, a.pins[p].force, rtol=0, atol=1e-9 * scale)


# ---------------------------------------------------------------- propped cantilever

def test_propped_cantilever_centre_load_aisc():
    """AISC Manual Table 3-23, beam fixed at one end, supported at other, concentrated load at centre
    (from memory): R_prop = 5P/16, R_fixed = 11P/16, M_fixed = 3PL/16."""
    P, L = 40.0e3, 6.0
    job = beam_job({"A": 0, "C": L / 2, "B": L}, {"A": "fixed", "B": "roller"}, [("C", -P / 1e3, 0)])
    sol = solve(job)  # auto: statics finds it indeterminate to degree 1
    assert sol.solver == stiffness.SOLVER
    check_equilibrium(job, sol)
    assert_allclose(sol.supports["SB"][0, 1], 5 * P / 16, rtol=1e-9)
    assert_allclose(sol.supports["SA"][0, 1], 11 * P / 16, rtol=1e-9)
    assert_allclose(sol.supports["SA"][0, 2], 3 * P * L / 16, rtol=1e-9)  # counter-clockwise on the beam


@settings(max_examples=30, deadline=None)
@given(L=st.floats(1.0, 20.0), frac=st.floats(0.05, 0.95), P=st.floats(1.0, 500.0),
       I=st.sampled_from(["2e7 mm^4", "1.2e8 mm^4", "9e8 mm^4"]))
def test_propped_cantilever_load_anywhere_aisc(L, frac, P, I):
    """P at a from the fixed end (b = L - a): R_prop = P a²(3L - a)/(2L³), M_fixed = P a b (L + b)/(2L²)
    (AISC Manual Table 3-23, beam fixed at one end, supported at other, concentrated load at any point,
    from memory, written with a from the fixed end; it gives 5P/16 at a = L/2, as the centre-load case).
    E and I do not enter: only one stiffness shares the load."""
    a = frac * L
    job = beam_job({"A": 0, "C": a, "B": L}, {"A": "fixed", "B": "roller"}, [("C", -P, 0)], I=I)
    sol = solve(job)
    check_equilibrium(job, sol)
    Pn, b = P * 1e3, L - a
    assert_allclose(sol.supports["SB"][0, 1], Pn * a**2 * (3 * L - a) / (2 * L**3), rtol=1e-9)
    assert_allclose(sol.supports["SA"][0, 2], Pn * a * b * (L + b) / (2 * L**2), rtol=1e-9)


def test_propped_cantilever_udl_lumped_converges_to_handbook():
    """UDL w on a propped cantilever: R_prop = 3wL/8, M_fixed = wL²/8 (AISC Table 3-23, fixed at one end,
    supported at other, uniformly distributed load; from memory). The job format has point loads only,
    so w is lumped as n equal loads at segment midpoints; the lumped answer differs from the UDL by
    O(1/n²), hence the 1e-3 tolerance."""
    w, L, n = 10.0, 8.0, 40
    xs = {"A": 0.0}
    loads = []
    for i in range(n):
        xs[f"m{i}"] = (i + 0.5) * L / n
        loads.append((f"m{i}", -w * L / n, 0))
    xs["B"] = L
    sol = solve(beam_job(xs, {"A": "fixed", "B": "roller"}, loads))
    assert_allclose(sol.supports["SB"][0, 1], 3 * w * L / 8 * 1e3, rtol=1e-3)
    assert_allclose(sol.supports["SA"][0, 2], w * L**2 / 8 * 1e3, rtol=1e-3)


def _sympy_reactions(L, supports, loads):
    """Reactions by sympy's Beam: supports {x: kind}, loads [(x, Fy up [N], M ccw [N*m])].

    sympy's sign for moments is clockwise-positive (seen from its fixed-end reaction of a beam under
    downward loads, which comes out negative for the hogging, counter-clockwise wall moment), so
    pinchk's counter-clockwise moments enter with a minus sign, and sympy's M come back negated.
    """
    from sympy import nsimplify, symbols
    from sympy.physics.continuum_mechanics.beam import Beam

    E, I = symbols("E I", positive=True)
    b = Beam(nsimplify(L), E, I)
    unknowns, names = [], {}
    for x, kind in supports.items():
        r = b.apply_support(nsimplify(x), kind)
        r = r if isinstance(r, tuple) else (r,)
        unknowns += list(r)
        names[x] = r
    for x, fy, mz in loads:
        if fy:
            b.apply_load(nsimplify(fy), nsimplify(x), -1)
        if mz:
            b.apply_load(-nsimplify(mz), nsimplify(x), -2)
    b.solve_for_reaction_loads(*unknowns)
    out = {}
    for x, r in names.items():
        vals = [float(b.reaction_loads[s]) for s in r]
        out[x] = (vals[0], -vals[1] if len(vals) > 1 else 0.0)
    return out


def test_propped_cantilever_against_sympy_beam():
    """Arbitrary loads and a moment on a propped cantilever: reactions equal sympy's Beam."""
    L = 5.0
    loads = [(1.0, -12e3, 0.0), (2.5, 0.0, 7e3), (3.7, -30e3, 0.0)]
    ref = _sympy_reactions(L, {0.0: "fixed", L: "roller"}, loads)
    xs = {"A": 0.0, "P0": 1.0, "P1": 2.5, "P2": 3.7, "B": L}
    job = beam_job(xs, {"A": "fixed", "B": "roller"},
                   [("P0", -12, 0), ("P1", 0, 7), ("P2", -30, 0)])
    sol = solve(job)
    check_equilibrium(job, sol)
    assert_allclose(sol.supports["SA"][0, 1], ref[0.0][0], rtol=1e-9)
    assert_allclose(sol.supports["SA"][0, 2], ref[0.0][1], rtol=1e-9)
    assert_allclose(sol.supports["SB"][0, 1], ref[L][0], rtol=1e-9)


# ---------------------------------------------------------------- continuous beams

def test_two_span_point_loads_aisc():
    """Two equal spans L, P at the centre of each: R_mid = 11P/8, R_end = 5P/16 (AISC Table 3-23
    continuous beam, two equal spans, concentrated load at centre of each span; from memory); P on one
    span only: R_loaded end = 13P/32, R_mid = 11P/16, R_far = -3P/32 (same table, concentrated load at
    centre of one span; from memory, confirmed here with sympy's Beam)."""
    P, L = 50.0, 4.0
    xs = {"A": 0, "D": L / 2, "B": L, "E": 1.5 * L, "C": 2 * L}
    sup = {"A": "pinned", "B": "roller", "C": "roller"}
    both = solve(beam_job(xs, sup, [("D", -P, 0), ("E", -P, 0)]))
    assert_allclose(both.supports["SB"][0, 1], 11 * P / 8 * 1e3, rtol=1e-9)
    assert_allclose(both.supports["SA"][0, 1], 5 * P / 16 * 1e3, rtol=1e-9)
    assert_allclose(both.supports["SC"][0, 1], 5 * P / 16 * 1e3, rtol=1e-9)
    ref = _sympy_reactions(2 * L, {0.0: "pin", L: "roller", 2 * L: "roller"}, [(L / 2, -P * 1e3, 0.0)])
    assert_allclose([ref[0.0][0], ref[L][0], ref[2 * L][0]], [13 * P / 32 * 1e3, 11 * P / 16 * 1e3,
                                                               -3 * P / 32 * 1e3], rtol=1e-12)
    one = solve(beam_job(xs, sup, [("D", -P, 0)]))
    assert_allclose(one.supports["SA"][0, 1], 13 * P / 32 * 1e3, rtol=1e-9)
    assert_allclose(one.supports["SB"][0, 1], 11 * P / 16 * 1e3, rtol=1e-9)
    assert_allclose(one.supports["SC"][0, 1], -3 * P / 32 * 1e3, rtol=1e-9)


def test_two_span_udl_lumped_converges_to_handbook():
    """Two equal spans under UDL w: R_mid = 10wL/8 = 1.25wL, R_end = 3wL/8 (AISC Table 3-23, continuous
    beam, two equal spans, uniform load,
    from memory). Lumped as point loads (see the propped-cantilever UDL test): tolerance 1e-3."""
    w, L, n = 5.0, 6.0, 30
    xs, loads = {"A": 0.0}, []
    for span in range(2):
        for i in range(n):
            k = f"s{span}m{i}"
            xs[k] = span * L + (i + 0.5) * L / n
            loads.append((k, -w * L / n, 0))
        xs["B" if span == 0 else "C"] = (span + 1) * L
    sol = solve(beam_job(xs, {"A": "pinned", "B": "roller", "C": "roller"}, loads))
    assert_allclose(sol.supports["SB"][0, 1], 1.25 * w * L * 1e3, rtol=1e-3)
    assert_allclose(sol.supports["SA"][0, 1], 3 * w * L / 8 * 1e3, rtol=1e-3)


def test_three_span_against_sympy_beam():
    """Three unequal spans, loads and a moment anywhere: reactions equal sympy's Beam."""
    sup_x = {"A": 0.0, "B": 3.0, "C": 7.5, "D": 10.0}
    loads = [("p", 1.2, -20.0, 0.0), ("q", 5.0, -45.0, 0.0), ("r", 6.1, 0.0, -9.0), ("s", 8.8, -15.0, 0.0)]
    xs = dict(sup_x)
    xs.update({k: x for k, x, _, _ in loads})
    xs = dict(sorted(xs.items(), key=lambda kv: kv[1]))
    job = beam_job(xs, {"A": "pinned", "B": "roller", "C": "roller", "D": "roller"},
                   [(k, fy, m) for k, _, fy, m in loads])
    sol = solve(job)
    check_equilibrium(job, sol)
    ref = _sympy_reactions(10.0, {0.0: "pin", 3.0: "roller", 7.5: "roller", 10.0: "roller"},
                           [(x, fy * 1e3, m * 1e3) for _, x, fy, m in loads])
    for k, x in sup_x.items():
        assert_allclose(sol.supports[f"S{k}"][0, 1], ref[x][0], rtol=1e-9, atol=1e-6)


# ---------------------------------------------------------------- portal frames

def portal(h, L, feet, I_col, I_beam, loads):
    """Single-bay portal, one body A (left foot) - B - M - C - D (right foot): rigid knees.

    The columns and the beam have their own sections (per-member sections); A = 100 m² makes axial
    strain negligible, as the closed forms assume (with 10 m² the beam's axial shortening still moved
    the foot shears by 4.5e-6 relative, with 100 m² by about 5e-7, hence rtol 1e-6; a larger A makes
    the member end forces lose digits to cancellation).
    """
    src = f"""
[section.col]
E = "200 GPa"
A = "100 m^2"
I = "{I_col} mm^4"
[section.bm]
E = "200 GPa"
A = "100 m^2"
I = "{I_beam} mm^4"
[body.frame]
points = {{ A = [0, 0], B = [0, {h}], M = [{L / 2}, {h}], C = [{L}, {h}], D = [{L}, 0] }}
members = [["A", "B", "col"], ["B", "M", "bm"], ["M", "C", "bm"], ["C", "D", "col"]]
[support.SA]
at = "frame.A"
kind = "{feet}"
[support.SD]
at = "frame.D"
kind = "{feet}"
[case.c]
"""
    for p, fx, fy in loads:
        src += f"[[load]]\ncase = \"c\"\nat = \"frame.{p}\"\nforce = [{fx}, {fy}]\n"
    return job_of(src)


@pytest.mark.parametrize("h, L, I_col, I_beam", [(4.0, 8.0, 1.2e8, 2.4e8), (6.0, 5.0, 3e8, 1e8)])
def test_fixed_base_portal_sway_kleinlogel(h, L, I_col, I_beam):
    """Fixed feet, horizontal H at the left knee (Kleinlogel, fixed-base portal, from memory):
    H_A = H_D = H/2, M_A = M_D = (Hh/2)(3k+1)/(6k+1), M_knee = (Hh/2) 3k/(6k+1), V = 3Hhk/(L(6k+1)).

    Slope-deflection check (antisymmetric sway, knee rotation θ, chord rotation ψ = Δ/h, a = 2EI_c/h):
    knee balance a(2θ - 3ψ) + 3akθ = 0 gives θ = 3ψ/(2+3k); base moment a(3ψ - θ) and knee moment
    a(3ψ - 2θ) are in the ratio (1+3k) : 3k and add up to the column shear times h, (H/2) h.
    """
    H = 20.0  # kN
    k = (I_beam / I_col) * (h / L)
    job = portal(h, L, "fixed", I_col, I_beam, [("B", H, 0)])
    res = stiffness.analyse(job)
    sol = res.solution
    check_equilibrium(job, sol)
    Hn = H * 1e3
    assert_allclose(sol.supports["SA"][0, 0], -Hn / 2, rtol=1e-6)
    assert_allclose(sol.supports["SD"][0, 0], -Hn / 2, rtol=1e-6)
    M_base = Hn * h / 2 * (3 * k + 1) / (6 * k + 1)
    assert_allclose(sol.supports["SA"][0, 2], M_base, rtol=1e-6)  # both feet resist the sway alike
    assert_allclose(sol.supports["SD"][0, 2], M_base, rtol=1e-6)
    V = 3 * Hn * h * k / (L * (6 * k + 1))
    assert_allclose(sol.supports["SA"][0, 1], -V, rtol=1e-6)  # the windward foot is pulled up... held down
    assert_allclose(sol.supports["SD"][0, 1], V, rtol=1e-6)
    M_knee = Hn * h / 2 * 3 * k / (6 * k + 1)
    assert_allclose(abs(res.member_forces[("frame", "A", "B")][0, 5]), M_knee, rtol=1e-6)


@pytest.mark.parametrize("h, L, I_col, I_beam", [(4.0, 8.0, 1.2e8, 2.4e8), (6.0, 5.0, 3e8, 1e8)])
def test_fixed_base_portal_centre_load_kleinlogel(h, L, I_col, I_beam):
    """Fixed feet, P down at mid-span (Kleinlogel, fixed-base portal, from memory):
    M_knee = PL/(4(k+2)), M_base = PL/(8(k+2)), H = 3PL/(8h(k+2)) inward, V = P/2.

    Slope-deflection check (symmetric, knee rotation θ): 4EI_c θ/h + 2EI_b θ/L = PL/8, so the column
    takes the share (4EI_c/h)/(4EI_c/h + 2EI_b/L) = 2/(2+k) of the fixed-end moment PL/8; half of it
    carries over to the fixed foot, and H = (M_knee + M_base)/h.
    """
    P = 60.0
    k = (I_beam / I_col) * (h / L)
    job = portal(h, L, "fixed", I_col, I_beam, [("M", 0, -P)])
    sol = solve(job)
    assert sol.solver == stiffness.SOLVER
    check_equilibrium(job, sol)
    Pn = P * 1e3
    Hx = 3 * Pn * L / (8 * h * (k + 2))
    assert_allclose(sol.supports["SA"][0, :2], [Hx, Pn / 2], rtol=1e-6)  # the feet are pushed apart
    assert_allclose(sol.supports["SD"][0, :2], [-Hx, Pn / 2], rtol=1e-6)
    M_base = Pn * L / (8 * (k + 2))
    assert_allclose(abs(sol.supports["SA"][0, 2]), M_base, rtol=1e-6)
    assert_allclose(sol.supports["SD"][0, 2], -sol.supports["SA"][0, 2], rtol=1e-9)  # symmetry


def test_two_hinged_portal_centre_load_kleinlogel():
    """Hinged feet, P down at mid-span (Kleinlogel, two-hinged portal, from memory): H = 3PL/(8h(2k+3)).

    Slope-deflection check: with the far end hinged the column's stiffness is 3EI_c/h, so the column
    takes (3EI_c/h)/(3EI_c/h + 2EI_b/L) = 3/(3+2k) of PL/8, and H = M_knee / h.
    """
    h, L, I_col, I_beam, P = 5.0, 10.0, 1.5e8, 3e8, 80.0
    k = (I_beam / I_col) * (h / L)
    job = portal(h, L, "pinned", I_col, I_beam, [("M", 0, -P)])
    sol = solve(job)
    check_equilibrium(job, sol)
    Hx = 3 * P * 1e3 * L / (8 * h * (2 * k + 3))
    assert_allclose(sol.supports["SA"][0, 0], Hx, rtol=1e-6)
    assert_allclose(sol.supports["SD"][0, 0], -Hx, rtol=1e-6)


# ---------------------------------------------------------------- cables, mechanisms, choices

CABLE_PROP = """
[body.b]
points = { A = [0, 0], C = [3, 0], B = [6, 0] }
section = "beam"
[body.anchor]
points = { K = [6, 4], K2 = [7, 4] }
section = "stiff"
[support.wall]
at = "b.A"
kind = "fixed"
[support.roof]
at = "anchor.K"
kind = "fixed"
[link.hanger]
ends = ["anchor.K", "b.B"]
kind = "cable"
[case.down]
[case.up]
[[load]]
case = "down"
at = "b.C"
force = [0, -40]
[[load]]
case = "up"
at = "b.C"
force = [0, 40]
"""


def test_cable_prop_taut_and_slack():
    """A cantilever whose tip hangs from an axially rigid cable to a fixed anchor.

    Down: the cable is a rigid prop, so the propped-cantilever result holds, T = 5P/16 (AISC Table
    3-23, centre load, from memory). Up: the cable would push, so it goes slack and the beam is a plain
    cantilever: R = P, M = PL/2 at the wall (statics).
    """
    job = job_of(CABLE_PROP)
    res = stiffness.analyse(job)
    sol = res.solution
    check_equilibrium(job, sol)
    P, a = 40e3, 3.0
    assert_allclose(sol.links["hanger"][0], 5 * P / 16, rtol=1e-9)
    assert not res.slack["hanger"][0]
    assert res.slack["hanger"][1]
    assert sol.links["hanger"][1] == 0.0
    assert "cable hanger is slack (carries nothing) in load case(s) up" in sol.warnings
    assert_allclose(sol.supports["wall"][1], [0, -P, -P * a], rtol=1e-12, atol=1e-6)
    assert solve(job).solver == stiffness.SOLVER


def test_cable_iteration_that_cannot_settle_errors():
    """With no round allowed the slack case cannot settle: a clear error that names the cable."""
    job = job_of(CABLE_PROP)
    with pytest.raises(StructureError, match="did not settle.*hanger"):
        stiffness.analyse(job, max_cable_rounds=0)


def test_slack_cable_leaving_a_mechanism_errors():
    """A beam held only by a pin and a cable: pushed up, the cable goes slack and the beam swings."""
    src = """
[body.b]
points = { A = [0, 0], B = [4, 0] }
section = "beam"
[body.anchor]
points = { K = [4, 3], K2 = [5, 3] }
section = "stiff"
[support.pivot]
at = "b.A"
kind = "pinned"
[support.roof]
at = "anchor.K"
kind = "fixed"
[link.hanger]
ends = ["anchor.K", "b.B"]
kind = "cable"
[case.up]
[[load]]
case = "up"
at = "b.B"
force = [0, 10]
"""
    with pytest.raises(StructureError, match="slack.*mechanism"):
        stiffness.analyse(job_of(src))


def test_mechanism_gets_a_clear_error_from_both_solvers():
    """Two vertical rollers: nothing holds the beam along x."""
    job = beam_job({"A": 0, "C": 2, "B": 4}, {"A": "roller", "B": "roller"}, [("C", -10, 0)])
    with pytest.raises(StructureError, match="mechanism"):
        solve(job)
    with pytest.raises(StructureError, match="mechanism.*point b\\.A"):
        solve(job, "stiffness")


def test_indeterminate_and_mechanism_at_once():
    """Three vertical rollers: indeterminate vertically and free along x; auto tries stiffness and
    reports the mechanism together with the statics finding."""
    job = beam_job({"A": 0, "B": 4, "C": 8}, {"A": "roller", "B": "roller", "C": "roller"}, [("B", -10, 0)])
    with pytest.raises(StructureError, match="(?s)indeterminate.*mechanism"):
        solve(job)


def test_rigid_links_fighting_each_other():
    """Two rigid links side by side between the same pins: no stiffness can share the force."""
    src = """
[body.b]
points = { A = [0, 0], B = [2, 0] }
section = "beam"
[body.c]
points = { A = [0, 1], B = [2, 1] }
section = "beam"
[pin.P1]
joins = ["b.B"]
[pin.P2]
joins = ["c.B"]
[support.S1]
at = "b.A"
kind = "fixed"
[support.S2]
at = "c.A"
kind = "fixed"
[link.r1]
ends = ["P1", "P2"]
[link.r2]
ends = ["P1", "P2"]
[case.c]
[[load]]
case = "c"
at = "P1"
force = [0, -5]
"""
    with pytest.raises(StructureError, match="fight each other.*link r"):
        stiffness.analyse(job_of(src))


def test_elastic_links_share_in_proportion_to_ea():
    """Two parallel bars with EA between the same two pins share the load in proportion to EA
    (common practice: springs in parallel stretch alike). The hanger is held along x by two rollers
    on a vertical line, so it hangs on the bars alone."""
    src = """
[body.top]
points = { A = [0, 2], B = [1, 2] }
section = "stiff"
[body.hang]
points = { A = [0, 0], B = [0, -0.5] }
section = "stiff"
[pin.PT]
joins = ["top.A"]
[pin.PH]
joins = ["hang.A"]
[support.S1]
at = "top.B"
kind = "fixed"
[support.S2]
at = "PH"
kind = "roller"
normal = [1, 0]
[support.S3]
at = "hang.B"
kind = "roller"
normal = [1, 0]
[link.bar1]
ends = ["PT", "PH"]
EA = "1000 kN"
[link.bar2]
ends = ["PT", "PH"]
EA = "3000 kN"
[case.c]
[[load]]
case = "c"
at = "PH"
force = [0, -8]
"""
    job = job_of(src)
    sol = solve(job)
    check_equilibrium(job, sol)
    assert_allclose(sol.links["bar1"][0], 2e3, rtol=1e-6)
    assert_allclose(sol.links["bar2"][0], 6e3, rtol=1e-6)


def test_indeterminate_without_sections_says_what_to_add():
    src = """
[body.b]
points = { A = [0, 0], B = [4, 0] }
[support.SA]
at = "b.A"
kind = "fixed"
[support.SB]
at = "b.B"
kind = "roller"
normal = [0, 1]
[case.c]
[[load]]
case = "c"
at = "b.B"
moment = "3 kN*m"
"""
    with pytest.raises(StructureError, match="(?s)indeterminate.*no section"):
        solve(job_of(src))


def test_forced_solvers():
    job = beam_job({"A": 0, "C": 2, "B": 4}, {"A": "fixed", "B": "roller"}, [("C", -10, 0)], solver="statics")
    with pytest.raises(StructureError, match="(?s)indeterminate.*solver = .auto."):
        solve(job)
    det = beam_job({"A": 0, "C": 2, "B": 4}, {"A": "pinned", "B": "roller"}, [("C", -10, 0)], solver="stiffness")
    assert solve(det).solver == stiffness.SOLVER
    assert_allclose(solve(det).supports["SB"][0, 1], 5e3, rtol=1e-12)


def test_job_file_fields_are_checked():
    with pytest.raises(InputError, match="solver.*not one of"):
        job_of(DETERMINATE["simple beam, load and moment"], solver="elastic")
    bad = DETERMINATE["simple beam, load and moment"].replace('section = "beam"', 'section = "HEA"')
    with pytest.raises(InputError, match="'HEA' is not a section"):
        job_of(bad)
    bad = DETERMINATE["simple beam, load and moment"].replace(
        'section = "beam"', 'section = "beam"\nmembers = [["A", "Q"]]')
    with pytest.raises(InputError, match="no point 'Q'"):
        job_of(bad)
    bad = DETERMINATE["simple beam, load and moment"].replace(
        'section = "beam"', 'section = "beam"\nmembers = [["A", "C"], ["C", "B"], ["B", "C"]]')
    with pytest.raises(InputError, match="listed twice"):
        job_of(bad)
    with pytest.raises(InputError, match="area"):
        job_of(DETERMINATE["simple beam, load and moment"], A="8000 mm")


def test_bare_section_numbers_take_the_length_unit():
    text = HEAD.format(solver="auto", A=5380, I=8.36e7).replace('A = "5380"', "A = 5380").replace(
        'I = "83600000.0"', "I = 83600000.0").replace('length = "m"', 'length = "mm"')
    text += DETERMINATE["bell crank with explicit members on a pivot and a rod"].replace("0.4", "400").replace(
        "0.3", "300")
    job = parse_job(tomllib.loads(text), "t.toml", text)
    sec = job.bodies["crank"].section
    assert_allclose([sec.A, sec.I], [5380e-6, 8.36e7 * 1e-12], rtol=1e-12)


def test_body_point_not_on_a_member_is_reported():
    bad = DETERMINATE["bell crank with explicit members on a pivot and a rod"].replace(
        'members = [["O", "A"], ["A", "B"], ["B", "O"]]', 'members = [["O", "A"]]')
    with pytest.raises(StructureError, match="point\\(s\\) B are on no member"):
        stiffness.solve(job_of(bad))


def test_portal_gantry_example_runs():
    """The bundled fixed-base portal gantry (invented) is solved by stiffness and checked."""
    path = ROOT / "examples" / "portal_gantry_fixed.toml"
    job = load_job(path)
    sol = solve(job)
    assert sol.solver == stiffness.SOLVER
    check_equilibrium(job, sol)
    out = subprocess.run([sys.executable, "-m", "pinchk", "run", str(path)], capture_output=True, text=True,
                         cwd=ROOT)
    assert out.returncode in (0, 1), out.stderr
    assert "direct stiffness" in out.stdout


@settings(max_examples=25, deadline=None)
@given(xs=st.lists(st.floats(0.2, 0.8), min_size=1, max_size=3, unique=True),
       fy=st.lists(st.floats(-100, 100), min_size=3, max_size=3),
       nx=st.floats(-0.8, 0.8), hinge=st.floats(0.25, 0.75))
def test_random_determinate_frames_agree(xs, fy, nx, hinge):
    """Random two-body frames, each determinate (a Gerber beam: a cantilever and a hung span joined by a
    pin, the span's far end on a sloping roller): statics and stiffness agree to round-off."""
    L = 10.0
    xh = hinge * L
    pts1 = {"A": 0.0, "H": xh}
    pts2 = {"H": xh, "B": L}
    loads = []
    for i, x in enumerate(sorted(xs)):
        x = x * L
        if abs(x - xh) < 0.3 or any(abs(x - p) < 0.3 for p in (*pts1.values(), *pts2.values())):
            continue  # members shorter than ~L/30 cost digits: see test_short_member_costs_digits
        (pts1 if x < xh else pts2)[f"q{i}"] = x
        loads.append(("b1" if x < xh else "b2", f"q{i}", fy[i]))

    def body(name, pts):
        pts = dict(sorted(pts.items(), key=lambda kv: kv[1]))
        return (f"[body.{name}]\npoints = {{ " + ", ".join(f"{k} = [{x}, 0]" for k, x in pts.items())
                + " }\nsection = \"beam\"\n")
    src = body("b1", pts1) + body("b2", pts2) + f"""
[pin.PH]
joins = ["b1.H", "b2.H"]
[support.wall]
at = "b1.A"
kind = "fixed"
[support.end]
at = "b2.B"
kind = "roller"
normal = [{nx}, 1]
[case.c]
[[load]]
case = "c"
at = "PH"
force = [{fy[0] / 3}, {fy[1]}]
"""
    for b, p, f in loads:
        src += f"[[load]]\ncase = \"c\"\nat = \"{b}.{p}\"\nforce = [0, {f}]\n"
    job = job_of(src)
    a, b = frame.solve(job), stiffness.solve(job)
    check_equilibrium(job, b)
    scale = max(1.0, max(np.abs(r).max() for r in a.supports.values()))
    for p in a.pins:
        assert_allclose(b.pins[p].force, a.pins[p].force, rtol=0, atol=1e-9 * scale)
    for s in a.supports:
        assert_allclose(b.supports[s], a.supports[s], rtol=0, atol=1e-9 * scale)


def test_indeterminate_forces_do_not_depend_on_a_common_modulus():
    """Scaling E of every member alike leaves the forces of a linear structure unchanged (common practice:
    only stiffness ratios share the load); a changed ratio does change them, so the check can fail."""
    base = portal(4.0, 8.0, "fixed", 1.2e8, 2.4e8, [("B", 20, 0), ("M", 0, -60)])
    r0 = solve(base).supports["SA"]

    def scaled(job, f_col, f_beam):
        b = job.bodies["frame"]
        ms = {k: dataclasses.replace(v, E=v.E * (f_col if v.name == "col" else f_beam))
              for k, v in b.member_sections.items()}
        bodies = {"frame": dataclasses.replace(b, member_sections=ms)}
        return dataclasses.replace(job, bodies=bodies)
    assert_allclose(solve(scaled(base, 7.0, 7.0)).supports["SA"], r0, rtol=1e-9, atol=1e-6)
    assert not np.allclose(solve(scaled(base, 1.0, 3.0)).supports["SA"], r0, rtol=1e-3)


THREE_BARS = """
[body.ceiling]
points = {{ L = [{xl}, 0], C = [0, 0], R = [{xr}, 0] }}
section = "stiff"
{supports}
[pin.K]
at = [0, -2]
[link.left]
ends = ["ceiling.L", "K"]
EA = "50000 kN"
{right}
[case.c]
[[load]]
case = "c"
at = "K"
force = [0, -30]
"""


def test_three_bar_hanger_closed_form():
    """Three bars of equal EA meet at a pin on its own place: the middle one vertical, length L, the
    outer ones at θ either side. N_mid = P/(1 + 2cos³θ), N_side = P cos²θ/(1 + 2cos³θ) (the classic
    statically indeterminate three-bar system: S. Timoshenko, Strength of Materials, Part I, ch. 1,
    from memory; compatibility δ_side = δ_mid cos θ). The ceiling is a stiff body on two fixed points."""
    x = 2.0 * np.tan(np.radians(35.0))
    right = ('[link.mid]\nends = ["ceiling.C", "K"]\nEA = "50000 kN"\n'
             '[link.right]\nends = ["ceiling.R", "K"]\nEA = "50000 kN"')
    sup = "".join(f'[support.S{p}]\nat = "ceiling.{p}"\nkind = "fixed"\n' for p in "LCR")
    job = job_of(THREE_BARS.format(xl=-x, xr=x, right=right, supports=sup))
    sol = solve(job)
    assert sol.solver == stiffness.SOLVER
    check_equilibrium(job, sol)
    c = np.cos(np.radians(35.0))
    P = 30e3
    # the ceiling is fixed at every anchor, so only the bars stretch
    assert_allclose(sol.links["mid"][0], P / (1 + 2 * c**3), rtol=1e-9)
    assert_allclose(sol.links["left"][0], P * c**2 / (1 + 2 * c**3), rtol=1e-9)
    assert_allclose(sol.links["right"][0], P * c**2 / (1 + 2 * c**3), rtol=1e-9)
    assert sol.pins["K"].members == ("left", "mid", "right", "load")


def test_two_bar_pin_on_its_own_place_agrees_with_statics():
    """Two bars from a ceiling fixed at one point to a pin at its own place: determinate, so the
    solvers agree."""
    right = '[link.right]\nends = ["ceiling.R", "K"]\nEA = "50000 kN"'
    sup = '[support.SC]\nat = "ceiling.C"\nkind = "fixed"\n'
    job = job_of(THREE_BARS.format(xl=-1.5, xr=1.0, right=right, supports=sup))
    a, b = frame.solve(job), stiffness.solve(job)
    check_equilibrium(job, b)
    for ln in a.links:
        assert_allclose(b.links[ln], a.links[ln], rtol=1e-10)
    assert_allclose(b.pins["K"].force, a.pins["K"].force, rtol=0, atol=1e-9 * 3e4)


def test_short_member_costs_digits_but_stays_in_equilibrium():
    """A 11 mm member beside a 4.3 m one (found by hypothesis): the short member's stiffness swamps the
    long one's at their shared node, so about (4.3/0.011)³·eps ≈ 1e-8 of the force is lost. The result
    is still in equilibrium within pinchk.stiffness.RESIDUAL_TOL and agrees with statics to 1e-7."""
    src = """
[body.b1]
points = { A = [0, 0], q1 = [4.285980312618945, 0], q0 = [4.296875, 0], H = [5, 0] }
section = "beam"
[body.b2]
points = { H = [5, 0], B = [10, 0] }
section = "beam"
[pin.PH]
joins = ["b1.H", "b2.H"]
[support.wall]
at = "b1.A"
kind = "fixed"
[support.end]
at = "b2.B"
kind = "roller"
normal = [0, 1]
[case.c]
[[load]]
case = "c"
at = "PH"
force = [0, 1]
"""
    job = job_of(src)
    a, b = frame.solve(job), stiffness.solve(job)
    assert 1e-10 < b.residual <= stiffness.RESIDUAL_TOL  # digits are lost, as the docstring says
    assert_allclose(b.supports["wall"], a.supports["wall"], rtol=1e-7, atol=1e-6)


def test_spreader_on_four_slings_rigid_beam_distribution():
    """A very stiff spreader hung on four equal elastic hangers with an eccentric load e: the hangers
    share the load as a rigid beam on equal springs, F_i = P/n + P e x_i / Σx_i² (common practice: the
    pile-group or bolt-group formula for a rigid cap on equal supports). Indeterminate to degree 2."""
    xs = [-3.0, -1.0, 1.0, 3.0]
    e, P = 0.8, 100.0
    src = f"""
[body.spreader]
points = {{ H0 = [-3, 0], H1 = [-1, 0], E = [{e}, 0], H2 = [1, 0], H3 = [3, 0] }}
section = "stiff"
[body.ceiling]
points = {{ {", ".join(f"K{i} = [{x}, 2]" for i, x in enumerate(xs))} }}
section = "stiff"
[support.guide]
at = "spreader.H0"
kind = "roller"
normal = [1, 0]
[case.c]
[[load]]
case = "c"
at = "spreader.E"
force = [0, {-P}]
"""
    for i in range(4):
        src += f'[support.A{i}]\nat = "ceiling.K{i}"\nkind = "fixed"\n'
        src += f'[link.sling{i}]\nends = ["ceiling.K{i}", "spreader.H{i}"]\nkind = "cable"\nEA = "1000 kN"\n'
    job = job_of(src)
    sol = solve(job)
    assert sol.solver == stiffness.SOLVER
    # a stiff body on soft springs costs digits (its rigid motion dwarfs its strain): 7e-9 here
    assert sol.residual <= stiffness.RESIDUAL_TOL
    s2 = sum(x * x for x in xs)
    for i, x in enumerate(xs):
        # the formula takes the spreader as rigid; its own bending (1 m^4) against the slings' stretch
        # (EA 1000 kN over 2 m) moves the shares by 1.7e-5 (1.7e-3 with EA 100 000 kN: it is physical)
        assert_allclose(sol.links[f"sling{i}"][0], (P / 4 + P * e * x / s2) * 1e3, rtol=1e-4)


def test_combination_over_a_slack_cable_is_flagged():
    """Combinations are sums of solved cases (pinchk.combine): not exact for a cable that is slack in
    one of the cases summed, so the stiffness solve warns; a combination of one taut case does not."""
    src = CABLE_PROP + """
[combination.mix]
cases = { down = 1.0, up = 0.5 }
[combination.only_down]
cases = { down = 1.35 }
"""
    sol = solve(job_of(src))
    notes = [w for w in sol.warnings if w.startswith("combination")]
    assert len(notes) == 1 and "combination mix: cable hanger" in notes[0]


def test_maxwell_betti_reciprocity():
    """Betti's reciprocal theorem (any linear-elastic text, e.g. Timoshenko & Young, Theory of
    Structures; common practice): the work of one load set on the displacements of another equals the
    reverse. Checked on an unsymmetric fixed portal with a force at a knee, a force at mid-beam and a
    moment at the other knee; the stiffness matrix must be right, not merely symmetric in form."""
    src = """
[section.col]
E = "200 GPa"
A = "9000 mm^2"
I = "1.1e8 mm^4"
[section.bm]
E = "200 GPa"
A = "6000 mm^2"
I = "2.3e8 mm^4"
[body.frame]
points = { A = [0, 0], B = [0.5, 4], M = [3, 4.5], C = [7, 4], D = [7, -1] }
members = [["A", "B", "col"], ["B", "M", "bm"], ["M", "C", "bm"], ["C", "D", "col"]]
[support.SA]
at = "frame.A"
kind = "fixed"
[support.SD]
at = "frame.D"
kind = "pinned"
[case.one]
[case.two]
[case.three]
[[load]]
case = "one"
at = "frame.B"
force = [12, 0]
[[load]]
case = "two"
at = "frame.M"
force = [0, -30]
[[load]]
case = "three"
at = "frame.C"
moment = "8 kN*m"
"""
    res = stiffness.analyse(job_of(src))
    d = res.displacement
    uB, uM, uC = d[("frame", "B")], d[("frame", "M")], d[("frame", "C")]
    F1, F2, M3 = 12e3, -30e3, 8e3
    assert_allclose(F1 * uB[1, 0], F2 * uM[0, 1], rtol=1e-9)  # cases one and two
    assert_allclose(F1 * uB[2, 0], M3 * uC[0, 2], rtol=1e-9)  # one and three
    assert_allclose(F2 * uM[2, 1], M3 * uC[1, 2], rtol=1e-9)  # two and three
    assert abs(uB[1, 0]) > 1e-6  # the cases do move each other: the check is not 0 = 0


def test_cli_json_names_the_solver_and_an_unsolvable_job_exits_2(tmp_path):
    """The JSON view says which solve ran; an indeterminate job without sections is an input error
    (exit 2) with both findings, never a traceback."""
    path = ROOT / "examples" / "portal_gantry_fixed.toml"
    out = subprocess.run([sys.executable, "-m", "pinchk", "run", str(path), "--format", "json"],
                         capture_output=True, text=True, cwd=ROOT)
    data = json.loads(out.stdout)
    assert data["solver"] == stiffness.SOLVER
    bad = tmp_path / "no_sections.toml"
    bad.write_text(path.read_text().replace('section = "column"', ""))
    out = subprocess.run([sys.executable, "-m", "pinchk", "run", str(bad)], capture_output=True, text=True,
                         cwd=ROOT)
    assert out.returncode == 2
    assert "statically indeterminate" in out.stderr and "has no section" in out.stderr
    assert "Traceback" not in out.stderr
