"""pinchk.frame: hand-solvable frames, pin equilibrium, the equilibrium check, and structures statics
cannot solve (a mechanism, an indeterminate structure, a cable in compression).

Each hand case writes its closed-form solution beside the assertion; the formulas are those of any
statics text (sum of forces and of moments about a support, method of joints for the bracket, the
three-hinged arch with its crown moment zero). Units as in the job files: m and kN.
"""

from __future__ import annotations

import dataclasses
import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from pinchk import frame
from pinchk.errors import StructureError
from pinchk.frame import equilibrium_residual, solve
from pinchk.jobfile import load_job
from pinchk.solve import solve as run_solve

from .conftest import EXAMPLES

HEAD = """
    [job]
    title = "test frame"
    [units]
    length = "m"
    force = "kN"
    [method]
    name = "EN 1993-1-8"
    """


def force(sol, pin, member, case=0):
    pf = sol.pins[pin]
    return pf.force[case, pf.members.index(member)]


# ----------------------------------------------------------------------------------------------------
# hand-solvable cases

BEAM = HEAD + """
    [body.beam]
    points = { A = [0, 0], C = [2, 0], B = [6, 0] }
    [pin.PA]
    joins = ["beam.A"]
    [support.sa]
    at = "PA"
    kind = "pinned"
    [support.sb]
    at = "beam.B"
    kind = "roller"
    normal = [0, 1]
    [case.c]
    [[load]]
    case = "c"
    at = "beam.C"
    force = [0, -30]
    """


def test_simply_supported_beam(make_job):
    """Span L = 6 m, P = 30 kN at a = 2 m from A: R_A = P (L - a) / L = 20 kN, R_B = P a / L = 10 kN,
    no horizontal reaction; the pin at A hands R_A to the beam."""
    P, L, a = 30e3, 6.0, 2.0
    sol = solve(make_job(BEAM))
    np.testing.assert_allclose(sol.supports["sa"][0], [0.0, P * (L - a) / L, 0.0], atol=1e-9 * P)
    np.testing.assert_allclose(sol.supports["sb"][0], [0.0, P * a / L, 0.0], atol=1e-9 * P)
    np.testing.assert_allclose(force(sol, "PA", "beam"), [0.0, P * (L - a) / L], atol=1e-9 * P)
    np.testing.assert_allclose(force(sol, "PA", "ground"), [0.0, -P * (L - a) / L], atol=1e-9 * P)


BRACKET_LINKS = HEAD + """
    [pin.W1]
    at = [0, 0]
    [pin.W2]
    at = [0, 3]
    [pin.J]
    at = [4, 0]
    [link.horizontal]
    ends = ["W1", "J"]
    [link.diagonal]
    ends = ["W2", "J"]
    [support.s1]
    at = "W1"
    kind = "pinned"
    [support.s2]
    at = "W2"
    kind = "pinned"
    [case.c]
    [[load]]
    case = "c"
    at = "J"
    force = [0, -12]
    """

BRACKET_BODIES = HEAD + """
    [body.bar_h]
    points = { W = [0, 0], J = [4, 0] }
    [body.bar_d]
    points = { W = [0, 3], J = [4, 0] }
    [pin.W1]
    joins = ["bar_h.W"]
    [pin.W2]
    joins = ["bar_d.W"]
    [pin.J]
    joins = ["bar_h.J", "bar_d.J"]
    [support.s1]
    at = "W1"
    kind = "pinned"
    [support.s2]
    at = "W2"
    kind = "pinned"
    [case.c]
    [[load]]
    case = "c"
    at = "J"
    force = [0, -12]
    """


def test_two_bar_bracket_of_links(make_job):
    """Method of joints at J: the diagonal (rise h = 3 m over b = 4 m, length 5 m) carries
    T_d = P / sin θ = P · 5/3 = 20 kN tension, the horizontal bar T_h = -P cot θ = -P · 4/3 = -16 kN
    (compression). Wall reactions: W2 (-16, 12) kN, W1 (16, 0) kN."""
    P = 12e3
    sol = solve(make_job(BRACKET_LINKS))
    np.testing.assert_allclose(sol.links["diagonal"][0], P * 5 / 3, rtol=1e-12)
    np.testing.assert_allclose(sol.links["horizontal"][0], -P * 4 / 3, rtol=1e-12)
    np.testing.assert_allclose(sol.supports["s2"][0, :2], [-P * 4 / 3, P], rtol=1e-12, atol=1e-9 * P)
    np.testing.assert_allclose(sol.supports["s1"][0, :2], [P * 4 / 3, 0.0], rtol=1e-12, atol=1e-9 * P)


def test_two_bar_bracket_of_bodies_gives_two_force_members(make_job):
    """The same bracket with each bar a rigid body: a body loaded only at its two pins is a two-force
    member, so the rigid-body solve must find the forces of the link model: at J, bar_d receives
    20 kN · (4, -3)/5 = (16, -12) kN (pulled, tension) and bar_h (-16, 0) kN (pushed, compression)."""
    P = 12e3
    sol = solve(make_job(BRACKET_BODIES))
    np.testing.assert_allclose(force(sol, "J", "bar_d"), [P * 4 / 3, -P], rtol=1e-12)
    np.testing.assert_allclose(force(sol, "J", "bar_h"), [-P * 4 / 3, 0.0], rtol=1e-12, atol=1e-9 * P)
    np.testing.assert_allclose(force(sol, "J", "load"), [0.0, P], rtol=1e-12, atol=1e-9 * P)
    np.testing.assert_allclose(force(sol, "W2", "bar_d"), [-P * 4 / 3, P], rtol=1e-12)


ARCH = HEAD + """
    [body.left]
    points = { A = [0, 0], K = [2, 2], C = [4, 3] }
    [body.right]
    points = { C = [4, 3], B = [8, 0] }
    [pin.C]
    joins = ["left.C", "right.C"]
    [support.sa]
    at = "left.A"
    kind = "pinned"
    [support.sb]
    at = "right.B"
    kind = "pinned"
    [case.crown]
    [case.quarter]
    [[load]]
    case = "crown"
    at = "C"
    force = [0, -24]
    [[load]]
    case = "quarter"
    at = "left.K"
    force = [0, -24]
    """


def test_three_hinged_arch(make_job):
    """Span L = 8 m, rise h = 3 m, P = 24 kN. The crown hinge takes no moment, so the thrust is
    H = M0(crown) / h, M0 the simple-beam moment there.
    Crown load: V = P/2 = 12 kN each side, H = P L / (4 h) = 16 kN.
    Load at x = 2 m (quarter span): V_A = P (L - 2)/L = 18 kN, V_B = 6 kN, H = V_B (L/2) / h = 8 kN."""
    P, L, h = 24e3, 8.0, 3.0
    sol = solve(make_job(ARCH))
    crown, quarter = sol.cases.index("crown"), sol.cases.index("quarter")
    H = P * L / (4 * h)
    np.testing.assert_allclose(sol.supports["sa"][crown], [H, P / 2, 0], rtol=1e-12)
    np.testing.assert_allclose(sol.supports["sb"][crown], [-H, P / 2, 0], rtol=1e-12)
    VA, VB = P * (L - 2) / L, P * 2 / L
    H = VB * (L / 2) / h
    np.testing.assert_allclose(sol.supports["sa"][quarter], [H, VA, 0], rtol=1e-12)
    np.testing.assert_allclose(sol.supports["sb"][quarter], [-H, VB, 0], rtol=1e-12)
    # the unloaded half is a two-force member: at C it receives the force along B -> C, compression
    np.testing.assert_allclose(force(sol, "C", "right", quarter), [H, -VB], rtol=1e-12)


# ----------------------------------------------------------------------------------------------------
# pins: equal and opposite, and in equilibrium; superposition of cases

FRAMES = {"beam": BEAM, "bracket_links": BRACKET_LINKS, "bracket_bodies": BRACKET_BODIES, "arch": ARCH}


def _framed_examples():
    """The examples whose frame pinchk solves (not those that read their joint forces from a file)."""
    return [p for p in sorted(EXAMPLES.glob("*.toml")) if load_job(p).forces is None]


@pytest.mark.parametrize("path", _framed_examples(), ids=lambda p: p.stem)
def test_examples_pins_balance_and_two_member_pins_are_opposite(path):
    """Newton's third law at every pin: the forces its members receive sum to zero; at a pin where two
    members meet they are equal and opposite (solved as a run solves it: statics, or the stiffness
    method for an indeterminate example)."""
    sol = run_solve(load_job(path))
    big = max(np.abs(pf.force).max() for pf in sol.pins.values())
    for name, pf in sol.pins.items():
        np.testing.assert_allclose(pf.force.sum(axis=1), 0.0, atol=1e-12 * big, err_msg=name)
        if len(pf.members) == 2:
            np.testing.assert_allclose(pf.force[:, 0], -pf.force[:, 1], rtol=1e-12, atol=1e-12 * big)


def test_demo_has_loaded_two_member_pins():
    """So that the test above has two-member pins to look at (the demo's tie ends and feet)."""
    sol = solve(load_job(EXAMPLES / "a_frame_gantry.toml"))
    two = [pf for pf in sol.pins.values() if len(pf.members) == 2]
    assert len(two) == 4 and all(np.abs(pf.force).max() > 1e3 for pf in two)


def test_two_body_pin_equal_and_opposite(make_job):
    """The arch's crown pin joins two bodies; with no load on the pin itself (case 'quarter') each body
    receives the opposite of the other's force."""
    sol = solve(make_job(ARCH))
    q = sol.cases.index("quarter")
    np.testing.assert_allclose(force(sol, "C", "left", q), -force(sol, "C", "right", q), rtol=1e-13)


def test_cases_superpose(make_job):
    """Statics is linear: the case with both loads is the sum of the cases with one each."""
    text = ARCH + """
    [case.both]
    [[load]]
    case = "both"
    at = "C"
    force = [0, -24]
    [[load]]
    case = "both"
    at = "left.K"
    force = [0, -24]
    """
    sol = solve(make_job(text))
    a, b, ab = (sol.cases.index(c) for c in ("crown", "quarter", "both"))
    for pf in sol.pins.values():
        np.testing.assert_allclose(pf.force[ab], pf.force[a] + pf.force[b], rtol=1e-12, atol=1e-6)
    for r in sol.supports.values():
        np.testing.assert_allclose(r[ab], r[a] + r[b], rtol=1e-12, atol=1e-6)


# ----------------------------------------------------------------------------------------------------
# the equilibrium check of every solved body

@pytest.mark.parametrize("name", list(FRAMES))
def test_residual_at_round_off(make_job, name):
    job = make_job(FRAMES[name])
    sol = solve(job)
    assert equilibrium_residual(job, sol) < 1e-13
    assert sol.residual < 1e-13


@pytest.mark.parametrize("path", _framed_examples(), ids=lambda p: p.stem)
def test_examples_residual_at_round_off(path):
    job = load_job(path)
    sol = run_solve(job)
    assert equilibrium_residual(job, sol) < 1e-13
    # never a negative zero (the table would print "-0.0e+00")
    assert math.copysign(1.0, sol.residual) == 1.0 and math.copysign(1.0, equilibrium_residual(job, sol)) == 1.0


def test_residual_sees_a_wrong_solution(make_job):
    """The check works from the solved forces, so a wrong force shows: 1 % off on one link."""
    job = make_job(BRACKET_LINKS)
    sol = solve(job)
    links = dict(sol.links)
    links["diagonal"] = links["diagonal"] * 1.01
    bad = dataclasses.replace(sol, links=links)
    assert equilibrium_residual(job, bad) > 1e-3


def test_residual_sees_a_wrong_pin_force(make_job):
    job = make_job(ARCH)
    sol = solve(job)
    pf = sol.pins["C"]
    f = pf.force.copy()
    f[:, pf.members.index("left"), 0] += 100.0  # 0.1 kN too much on one body
    bad = dataclasses.replace(sol, pins={**sol.pins, "C": dataclasses.replace(pf, force=f)})
    assert equilibrium_residual(job, bad) > 1e-4


def test_run_stops_when_equilibrium_fails(make_job, monkeypatch):
    """A solution that does not satisfy equilibrium stops the run with an error (forced here by a
    tolerance no residual can meet)."""
    job = make_job(ARCH)
    monkeypatch.setattr(frame, "RESIDUAL_TOL", -1.0)
    with pytest.raises(StructureError, match="does not satisfy equilibrium"):
        solve(job)


# ----------------------------------------------------------------------------------------------------
# what statics cannot solve

def test_mechanism_names_degree_and_bodies(make_job):
    """An A-frame on a pin and a roller without its tie: the legs spread freely (one degree of
    freedom)."""
    text = HEAD + """
    [body.leg_left]
    points = { F = [0, 0], A = [2, 4] }
    [body.leg_right]
    points = { F = [4, 0], A = [2, 4] }
    [pin.apex]
    joins = ["leg_left.A", "leg_right.A"]
    [support.base]
    at = "leg_left.F"
    kind = "pinned"
    [support.wheel]
    at = "leg_right.F"
    kind = "roller"
    normal = [0, 1]
    [case.c]
    [[load]]
    case = "c"
    at = "apex"
    force = [0, -10]
    """
    with pytest.raises(StructureError) as exc:
        solve(make_job(text))
    msg = str(exc.value)
    assert "mechanism with 1 degree" in msg
    assert "leg_left" in msg and "leg_right" in msg
    assert "indeterminate" not in msg


def test_indeterminate_names_degree_and_supports(make_job):
    """A beam on two pinned supports is indeterminate to degree 1 (the horizontal reactions)."""
    text = BEAM.replace('kind = "roller"\n    normal = [0, 1]', 'kind = "pinned"')
    with pytest.raises(StructureError) as exc:
        solve(make_job(text))
    msg = str(exc.value)
    assert "indeterminate to degree 1" in msg
    assert "support sa" in msg and "support sb" in msg


def test_propped_cantilever_is_indeterminate(make_job):
    text = BEAM.replace('[pin.PA]\n    joins = ["beam.A"]\n', "").replace(
        'at = "PA"\n    kind = "pinned"', 'at = "beam.A"\n    kind = "fixed"')
    with pytest.raises(StructureError, match=r"indeterminate to degree 1.*support sa.*support sb"):
        solve(make_job(text))


def test_both_mechanism_and_indeterminate_reported(make_job):
    """A loose body beside an over-supported one: both faults are reported, each with where it is."""
    text = BEAM.replace('kind = "roller"\n    normal = [0, 1]', 'kind = "pinned"') + """
    [body.loose]
    points = { P = [10, 0], Q = [11, 0] }
    [support.s_loose]
    at = "loose.P"
    kind = "pinned"
    """
    with pytest.raises(StructureError) as exc:
        solve(make_job(text))
    msg = str(exc.value)
    assert "mechanism" in msg and "body loose" in msg
    assert "indeterminate" in msg and "support sa" in msg


CABLE = HEAD + """
    [body.post]
    points = { A = [0, 0], B = [0, 3], C = [0, 5] }
    [body.arm]
    points = { B = [0, 3], D = [4, 3] }
    [pin.B]
    joins = ["post.B", "arm.B"]
    [link.stay]
    ends = ["post.C", "arm.D"]
    kind = "cable"
    [support.base]
    at = "post.A"
    kind = "fixed"
    [case.down]
    [case.uplift]
    [[load]]
    case = "down"
    at = "arm.D"
    force = [0, -12]
    [[load]]
    case = "uplift"
    at = "arm.D"
    force = [0, 5]
    """


def test_cable_in_compression_is_an_error(make_job):
    with pytest.raises(StructureError) as exc:
        solve(make_job(CABLE))
    msg = str(exc.value)
    assert "cable stay" in msg and "compression" in msg and "'uplift'" in msg
    assert exc.value.problems[0].table == "link.stay"


def test_cable_in_tension_solves(make_job):
    """Without the uplift case the stay is in tension: moments about B on the arm,
    T · (2/√20) · 4 m = 12 kN · 4 m, T = 12 √20 / 2 = 26.83 kN."""
    text = CABLE.replace("[case.uplift]\n", "").split("    [[load]]\n    case = \"uplift\"")[0]
    sol = solve(make_job(text))
    np.testing.assert_allclose(sol.links["stay"][0], 12e3 * np.sqrt(20) / 2, rtol=1e-12)


def test_residual_sees_a_wrong_reaction_at_a_pin(make_job):
    """A support standing at a pin: its reported reaction is checked against the pin too."""
    job = make_job(BRACKET_LINKS)
    sol = solve(job)
    sup = dict(sol.supports)
    sup["s1"] = sup["s1"] * 1.01
    assert equilibrium_residual(job, dataclasses.replace(sol, supports=sup)) > 1e-3


# ----------------------------------------------------------------------------------------------------
# the three-hinged arch over random geometry (hypothesis, bounded)

@settings(max_examples=40, deadline=None)
@given(L=st.floats(2, 50), xc_frac=st.floats(0.2, 0.8), h=st.floats(0.5, 20), a_frac=st.floats(0.05, 0.95),
       P=st.floats(1, 1e4), Q=st.floats(-1e4, 1e4))
def test_three_hinged_arch_any_geometry(L, xc_frac, h, a_frac, P, Q):
    """Supports A (0, 0) and B (L, 0), crown hinge C (xc, h), a vertical load P [kN] at x = a on the
    left part and a horizontal load Q [kN] at the crown pin. Reactions on the structure
    R_A = (H_A, V_A), R_B = (-H_B, V_B). Moments about A: V_B = (P a + Q h) / L, and V_A = P - V_B.
    The crown hinge takes no moment, so moments about C of the right part: H_B = V_B (L - xc) / h.
    Horizontal forces: H_A = H_B - Q."""
    import tomllib

    from pinchk.jobfile import parse_job

    xc, a = xc_frac * L, a_frac * xc_frac * L
    text = f"""
    [job]
    title = "arch"
    [units]
    length = "m"
    force = "kN"
    [method]
    name = "EN 1993-1-8"
    [body.left]
    points = {{ A = [0, 0], K = [{a!r}, {a * h / xc!r}], C = [{xc!r}, {h!r}] }}
    [body.right]
    points = {{ C = [{xc!r}, {h!r}], B = [{L!r}, 0] }}
    [pin.C]
    joins = ["left.C", "right.C"]
    [support.sa]
    at = "left.A"
    kind = "pinned"
    [support.sb]
    at = "right.B"
    kind = "pinned"
    [case.c]
    [[load]]
    case = "c"
    at = "left.K"
    force = [0, {-P!r}]
    [[load]]
    case = "c"
    at = "C"
    force = [{Q!r}, 0]
    """
    job = parse_job(tomllib.loads(text))
    sol = solve(job)
    VB = (P * a + Q * h) / L
    VA = P - VB
    HB = VB * (L - xc) / h
    HA = -Q + HB
    scale = max(P, abs(Q), abs(HA), abs(HB)) * 1e3
    np.testing.assert_allclose(sol.supports["sa"][0, :2], [HA * 1e3, VA * 1e3], rtol=1e-9, atol=1e-9 * scale)
    np.testing.assert_allclose(sol.supports["sb"][0, :2], [-HB * 1e3, VB * 1e3], rtol=1e-9, atol=1e-9 * scale)
    assert equilibrium_residual(job, sol) < 1e-12


# ----------------------------------------------------------------------------------------------------
# large structures: past the dense rank limit the sparse factorization decides

def _warren(panels: int, drop: int | None = None, both_pinned: bool = False):
    """A Warren truss of links: bottom joints B0..Bn at x = i m, top joints at x = i + 0.5, y = 1 m;
    1 kN down at every inner bottom joint; pinned at B0, roller (or pinned) at Bn."""
    import tomllib

    from pinchk.jobfile import parse_job

    lines = ['[job]', 'title = "warren"', '[units]', 'length = "m"', 'force = "kN"', '[method]',
             'name = "EN 1993-1-8"', '[case.c]']
    for i in range(panels + 1):
        lines += [f"[pin.B{i}]", f"at = [{i}, 0]"]
    for i in range(panels):
        lines += [f"[pin.T{i}]", f"at = [{i + 0.5}, 1]"]
    bars = [(f"B{i}", f"B{i + 1}") for i in range(panels)] + [(f"B{i}", f"T{i}") for i in range(panels)]
    bars += [(f"T{i}", f"B{i + 1}") for i in range(panels)] + [(f"T{i}", f"T{i + 1}") for i in range(panels - 1)]
    for k, (a, b) in enumerate(bars):
        if k != drop:
            lines += [f"[link.m{k}]", f'ends = ["{a}", "{b}"]']
    lines += ['[support.s0]', 'at = "B0"', 'kind = "pinned"', '[support.s1]', f'at = "B{panels}"']
    lines += ['kind = "pinned"'] if both_pinned else ['kind = "roller"', 'normal = [0, 1]']
    for i in range(1, panels):
        lines += ['[[load]]', 'case = "c"', f'at = "B{i}"', 'force = [0, -1]']
    return parse_job(tomllib.loads("\n".join(lines)))


def test_large_structure_sparse_path(monkeypatch):
    """With the dense rank limit lowered, the sparse path solves a 40-panel truss: by symmetry each
    support carries half of the 39 kN; the bottom chord under top joint T19 (x = 19.5 m) carries the
    beam moment there over the depth h = 1 m (method of sections about T19):
    M = 19.5 · 19.5 − Σ_{i=1..19} (19.5 − i) = 380.25 − 180.5 = 199.75 kN·m, so 199.75 kN tension."""
    monkeypatch.setattr(frame, "DENSE_RANK_LIMIT", 50)
    job = _warren(40)
    sol = solve(job)
    np.testing.assert_allclose(sol.supports["s1"][0, 1], 19.5e3, rtol=1e-12)
    np.testing.assert_allclose(sol.supports["s0"][0, :2], [0.0, 19.5e3], rtol=1e-12, atol=1e-6)
    np.testing.assert_allclose(sol.links["m19"][0], 199.75e3, rtol=1e-12)  # m19: B19-B20
    assert equilibrium_residual(job, sol) < 1e-13


def test_large_three_hinged_truss(monkeypatch):
    """The same truss without bottom bar B5-B6 and with both supports pinned is a three-hinged arch,
    hinge at T5 (x = 5.5 m, h = 1 m): the thrust is H = M0(5.5) / h with the simple-beam moment
    M0 = 19.5 · 5.5 − Σ_{i=1..5} (5.5 − i) = 107.25 − 12.5 = 94.75 kN·m, so H = 94.75 kN."""
    monkeypatch.setattr(frame, "DENSE_RANK_LIMIT", 50)
    sol = solve(_warren(40, drop=5, both_pinned=True))
    np.testing.assert_allclose(sol.supports["s0"][0, :2], [94.75e3, 19.5e3], rtol=1e-9)
    np.testing.assert_allclose(sol.supports["s1"][0, :2], [-94.75e3, 19.5e3], rtol=1e-9)


def test_large_singular_structure_is_refused(monkeypatch):
    """Past the dense limit, without diagonal T5-B6 panel 5 is a four-bar mechanism: with an extra
    support (unknowns and equations equal in number, the equations singular), and alone (one equation
    too many), both are StructureErrors."""
    monkeypatch.setattr(frame, "DENSE_RANK_LIMIT", 50)
    diagonal = 2 * 40 + 5  # bars: 40 bottom, 40 B_i-T_i, then T_i-B_i+1
    with pytest.raises(StructureError, match="singular"):
        solve(_warren(40, drop=diagonal, both_pinned=True))
    with pytest.raises(StructureError, match="mechanism"):
        solve(_warren(40, drop=diagonal))


def test_a_roller_that_pulls_is_flagged():
    """Overhanging beam: R_B = -P (a + b) / a by moments about A (hand statics): -10 kN × 1.5 / 1.0 = -15 kN."""
    from pathlib import Path

    import pinchk

    job = pinchk.load_job(Path(__file__).parent / "data" / "roller_uplift.toml")
    from pinchk.solve import solve

    sol = solve(job)
    assert sol.supports["b"][0, 1] == pytest.approx(-15e3, rel=1e-12)
    assert len(sol.warnings) == 1 and "roller b pulls" in sol.warnings[0] and "-15 kN" in sol.warnings[0]


def test_forces_that_dwarf_the_loads_are_flagged():
    """Two links sagging 1 mm over 1 m each under 1 kN: T = P / (2 sin θ), sin θ = 1/√(1000² + 1)
    (hand statics of the pin), so T ≈ 500 kN, 500 times the load; the run warns (common practice)."""
    import math
    from pathlib import Path

    import pinchk
    from pinchk.solve import solve

    sol = solve(pinchk.load_job(Path(__file__).parent / "data" / "near_collinear.toml"))
    sin = 1 / math.hypot(1000, 1)
    assert sol.links["left"][0] == pytest.approx(1e3 / (2 * sin), rel=1e-9)
    assert any("500 times the largest load" in w for w in sol.warnings)
