"""EN 1993-1-8 §3.13 pin connections: every check of pinchk.methods.en1993_1_8 against its equation.

Sources:
    EN 1993-1-8:2005, Eurocode 3: Design of steel structures, Part 1-8: Design of joints. CEN, Brussels,
    May 2005 (incorporating corrigenda). §3.13.1 Table 3.9 (geometrical requirements for pin-ended
    members, type A: given thickness, type B: given geometry); §3.13.2 Table 3.10 (design criteria for
    pin connections); eqs (3.14), (3.15), (3.16) (contact stress of replaceable pins); Fig. 3.11 (bending
    moment in a pin); §2.2 Table 2.1 note (recommended γM2 = 1.25, γM6,ser = 1.0).
    EN 1993-1-1:2005 §6.1(1) note 2B (recommended γM0 = 1.00).
    The equations as restated in the project's REFERENCE.md, each tagged [seen] there.

Every expected value is computed in the test from the published equation with numbers chosen in the
test; the clause is named beside each. Units as in the source: N, mm, MPa (the tests convert to SI).
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from pinchk import run
from pinchk.frame import PinForces
from pinchk.jobfile import load_job
from pinchk.methods import en1993_1_8 as en
from pinchk.methods import factors_for
from pinchk.model import Material, Pin, Plate
from pinchk.stack import solve_stack

from ..conftest import DEMO

MM, MPA, KN = 1e-3, 1e6, 1e3
DEFAULTS = factors_for(en, {})


def by_name(checks):
    return {c.name: c for c in checks}


def pin_cols(n=1, **kw):
    """Pin columns: d = 40 mm, fup = 800 MPa, fyp = 640 MPa, V = 150 kN, M = 2.0 kN·m (chosen here)."""
    cols = dict(d=40 * MM, fup=800 * MPA, fyp=640 * MPA, V=150 * KN, M=2.0 * KN, uls=True, ser=False)
    cols.update(kw)
    return {k: np.full(n, v) for k, v in cols.items()}


def plate_cols(n=1, **kw):
    """Plate columns: F = 150 kN, t = 20 mm, d = 40 mm, d0 = 41 mm, fy = 355 MPa, fyp = 640 MPa,
    E = 210000 MPa, hole centre to end 60 mm, width 120 mm (chosen here)."""
    cols = dict(F=150 * KN, t=20 * MM, d=40 * MM, d0=41 * MM, fy=355 * MPA, fu=470 * MPA, fyp=640 * MPA,
                E=210000 * MPA, a_end=60 * MM, width=120 * MM, type_b=False, rot=False, uls=True, ser=False)
    cols.update(kw)
    return {k: np.full(n, v) for k, v in cols.items()}


# ----------------------------------------------------------------------------------------------------
# Table 3.10

def test_pin_shear_table_3_10():
    """Table 3.10, shear resistance of the pin: Fv,Rd = 0.6 A fup / γM2, A = π d²/4.
    d = 40 mm, fup = 800 MPa, γM2 = 1.25: 0.6 · 1256.6 mm² · 800 MPa / 1.25 = 482.5 kN."""
    c = by_name(en.pin_checks(pin_cols(), DEFAULTS))["pin shear"]
    A = math.pi * (40 * MM) ** 2 / 4
    assert c.capacity[0] == pytest.approx(0.6 * A * 800 * MPA / 1.25, rel=1e-14)
    assert c.capacity[0] == pytest.approx(482.5 * KN, rel=1e-3)  # the figure above, rounded to 4 digits
    assert c.demand[0] == 150 * KN
    assert "Table 3.10" in c.clause


def test_pin_bending_table_3_10():
    """Table 3.10, bending resistance of the pin: MRd = 1.5 Wel fyp / γM0, Wel = π d³/32.
    d = 40 mm, fyp = 640 MPa: 1.5 · 6283 mm³ · 640 MPa = 6.032 kN·m."""
    c = by_name(en.pin_checks(pin_cols(), DEFAULTS))["pin bending"]
    Wel = math.pi * (40 * MM) ** 3 / 32
    assert c.capacity[0] == pytest.approx(1.5 * Wel * 640 * MPA / 1.00, rel=1e-14)
    assert c.capacity[0] == pytest.approx(6.032 * KN, rel=1e-3)
    assert "Table 3.10" in c.clause


def test_pin_shear_and_bending_table_3_10():
    """Table 3.10, combined shear and bending: (MEd/MRd)² + (Fv,Ed/Fv,Rd)² ≤ 1."""
    c = by_name(en.pin_checks(pin_cols(), DEFAULTS))["pin shear + bending"]
    A, Wel = math.pi * (40 * MM) ** 2 / 4, math.pi * (40 * MM) ** 3 / 32
    Fv_Rd, M_Rd = 0.6 * A * 800 * MPA / 1.25, 1.5 * Wel * 640 * MPA / 1.0
    assert c.demand[0] == pytest.approx((2.0 * KN / M_Rd) ** 2 + (150 * KN / Fv_Rd) ** 2, rel=1e-14)
    assert c.capacity[0] == 1.0


def test_pin_bending_serviceability_table_3_10():
    """Table 3.10, replaceable pin: MRd,ser = 0.8 Wel fyp / γM6,ser; only on serviceability rows."""
    P = pin_cols(2)
    P["ser"] = np.array([False, True])
    c = by_name(en.pin_checks(P, DEFAULTS))["pin bending (serviceability)"]
    Wel = math.pi * (40 * MM) ** 3 / 32
    np.testing.assert_allclose(c.capacity, 0.8 * Wel * 640 * MPA / 1.0, rtol=1e-14)
    assert list(c.mask) == [False, True]


def test_bearing_table_3_10():
    """Table 3.10, bearing of plate and pin: Fb,Rd = 1.5 t d fy / γM0, fy the lower of pin and plate.
    t = 20 mm, d = 40 mm, fy = 355 MPa: 1.5 · 20 · 40 · 355 N = 426.0 kN."""
    c = by_name(en.plate_checks(plate_cols(), DEFAULTS))["bearing"]
    assert c.capacity[0] == pytest.approx(1.5 * 20 * MM * 40 * MM * 355 * MPA / 1.0, rel=1e-14)
    assert c.capacity[0] == pytest.approx(426.0 * KN, rel=1e-12)
    # a pin softer than the plate (fyp = 300 MPa < 355 MPa): the pin's yield strength governs
    c = by_name(en.plate_checks(plate_cols(fyp=300 * MPA), DEFAULTS))["bearing"]
    assert c.capacity[0] == pytest.approx(1.5 * 20 * MM * 40 * MM * 300 * MPA, rel=1e-14)


def test_bearing_serviceability_table_3_10():
    """Table 3.10, replaceable pin: Fb,Rd,ser = 0.6 t d fy / γM6,ser."""
    Q = plate_cols(ser=True)
    c = by_name(en.plate_checks(Q, DEFAULTS))["bearing (serviceability)"]
    assert c.capacity[0] == pytest.approx(0.6 * 20 * MM * 40 * MM * 355 * MPA / 1.0, rel=1e-14)
    assert c.mask[0]


def test_contact_stress_eqs_3_14_to_3_16():
    """Eq (3.14) σh,Ed ≤ fh,Rd; eq (3.15) σh,Ed = 0.591 √(E FEd,ser (d0 − d) / (d² t));
    eq (3.16) fh,Rd = 2.5 fy / γM6,ser.
    E = 210000 MPa, F = 150 kN, d0 − d = 1 mm, d = 40 mm, t = 20 mm (in N and mm):
    0.591 √(210000 · 150000 · 1 / (1600 · 20)) = 586.4 MPa; fh,Rd = 2.5 · 355 = 887.5 MPa."""
    Q = plate_cols(ser=True)
    c = by_name(en.plate_checks(Q, DEFAULTS))["contact stress"]
    sigma = 0.591 * math.sqrt(210000 * MPA * 150 * KN * (1 * MM) / ((40 * MM) ** 2 * 20 * MM))
    assert c.demand[0] == pytest.approx(sigma, rel=1e-14)
    assert c.demand[0] == pytest.approx(586.4 * MPA, rel=1e-3)
    assert c.capacity[0] == pytest.approx(2.5 * 355 * MPA / 1.0, rel=1e-14)
    assert "(3.15)" in c.clause or "3.14" in c.clause


def test_serviceability_checks_only_on_serviceability_rows():
    """Table 3.10 and eqs (3.14)-(3.16): the replaceable-pin checks apply to SLS rows only."""
    Q = plate_cols(3)
    Q["ser"] = np.array([True, False, True])
    ch = by_name(en.plate_checks(Q, DEFAULTS))
    for name in ("bearing (serviceability)", "contact stress"):
        assert list(ch[name].mask) == [True, False, True]


# ----------------------------------------------------------------------------------------------------
# Table 3.9

def test_table_3_9_type_a():
    """Table 3.9 type A, given thickness t: a ≥ FEd γM0 / (2 t fy) + 2 d0 / 3 and
    c ≥ FEd γM0 / (2 t fy) + d0 / 3, with a the hole edge to plate end along the force and c the hole
    edge to side edge. F = 150 kN, t = 20 mm, fy = 355 MPa, d0 = 41 mm:
    F/(2 t fy) = 10.56 mm, so a ≥ 37.90 mm and c ≥ 24.23 mm; the plate has a = 60 − 20.5 = 39.5 mm
    and c = 60 − 20.5 = 39.5 mm."""
    ch = by_name(en.plate_checks(plate_cols(), DEFAULTS))
    base = 150 * KN * 1.0 / (2 * 20 * MM * 355 * MPA)
    a, c = ch["end distance (type A)"], ch["edge distance (type A)"]
    assert a.demand[0] == pytest.approx(base + 2 * 41 * MM / 3, rel=1e-14)
    assert a.demand[0] == pytest.approx(37.90 * MM, rel=1e-3)
    assert a.capacity[0] == pytest.approx(60 * MM - 41 * MM / 2, rel=1e-14)
    assert c.demand[0] == pytest.approx(base + 41 * MM / 3, rel=1e-14)
    assert c.capacity[0] == pytest.approx(120 * MM / 2 - 41 * MM / 2, rel=1e-14)
    assert "Table 3.9" in a.clause and "Table 3.9" in c.clause


def test_table_3_9_uses_plate_yield_strength():
    """Table 3.9 works with the plate's fy (not the lower of pin and plate, as bearing does)."""
    ch = by_name(en.plate_checks(plate_cols(fyp=300 * MPA), DEFAULTS))
    base = 150 * KN / (2 * 20 * MM * 355 * MPA)
    assert ch["end distance (type A)"].demand[0] == pytest.approx(base + 2 * 41 * MM / 3, rel=1e-14)


def test_table_3_9_type_b():
    """Table 3.9 type B, given geometry: t ≥ 0.7 √(FEd γM0 / fy) and d0 ≤ 2.5 t.
    F = 150 kN, fy = 355 MPa: 0.7 √(150000 / 355) mm = 14.39 mm; 2.5 t = 50 mm."""
    Q = plate_cols(2)
    Q["type_b"] = np.array([False, True])
    ch = by_name(en.plate_checks(Q, DEFAULTS))
    tb, hb = ch["thickness (type B)"], ch["hole to thickness (type B)"]
    assert tb.demand[1] == pytest.approx(0.7 * math.sqrt(150 * KN * 1.0 / (355 * MPA)), rel=1e-14)
    assert tb.demand[1] == pytest.approx(14.39 * MM, rel=1e-3)
    assert tb.capacity[1] == 20 * MM
    assert hb.demand[1] == 41 * MM and hb.capacity[1] == pytest.approx(2.5 * 20 * MM, rel=1e-14)
    # each type's rules only on its rows
    assert list(tb.mask) == [False, True] and list(hb.mask) == [False, True]
    assert list(ch["end distance (type A)"].mask) == [True, False]


# ----------------------------------------------------------------------------------------------------
# partial factors

@pytest.mark.parametrize("factor, value, checks", [
    ("gamma_M2", 1.5, {"pin shear", "bolt shear (shank)", "bolt shear (thread)"}),  # Tables 3.10, 3.4
    ("gamma_M0", 1.1, {"pin bending", "bearing"}),
    ("gamma_M6_ser", 1.2, {"pin bending (serviceability)", "bearing (serviceability)", "contact stress"}),
])
def test_partial_factor_scales_capacity_by_its_ratio(factor, value, checks):
    """§2.2 / EN 1993-1-1 §6.1: a resistance divided by γM changes by exactly γM,default / γM,new; the
    checks that do not use that factor do not change."""
    new = factors_for(en, {factor: value})
    ratio = DEFAULTS[factor] / value
    P, Q = pin_cols(ser=True), plate_cols(ser=True)
    for fn, cols in ((en.pin_checks, P), (en.plate_checks, Q)):
        old_c, new_c = by_name(fn(cols, DEFAULTS)), by_name(fn(cols, new))
        for name in old_c:
            if old_c[name].kind not in ("force", "moment", "stress"):
                continue
            expect = ratio if name in checks else 1.0
            np.testing.assert_allclose(new_c[name].capacity, old_c[name].capacity * expect, rtol=1e-14,
                                       err_msg=name)


def test_partial_factor_from_the_job_file(write_job):
    """[method.factors] gamma_M2 = 1.5 in the demo job: every pin shear capacity is 1.25/1.5 of the
    default, end to end."""
    base = run(load_job(DEMO))
    text = DEMO.read_text().replace("gamma_M2 = 1.25", "gamma_M2 = 1.5")
    assert text != DEMO.read_text()
    changed = run(load_job(write_job(text)))
    c0, c1 = base.columns, changed.columns
    rows = [i for i in range(len(base)) if c0["check"][i] == "pin shear"]
    assert rows
    for i in rows:
        assert c1["check"][i] == "pin shear"
        assert c1["capacity"][i] == pytest.approx(c0["capacity"][i] * 1.25 / 1.5, rel=1e-14)


def test_recommended_factors():
    """EN 1993-1-1 §6.1(1) γM0 = 1.00; EN 1993-1-8 §2.2 γM2 = 1.25, γM6,ser = 1.0."""
    assert DEFAULTS == {"gamma_M0": 1.00, "gamma_M2": 1.25, "gamma_M6_ser": 1.00}


# ----------------------------------------------------------------------------------------------------
# Fig. 3.11: the pin moment of a clevis from the general pin-as-a-beam model

S355 = Material("S355", 355 * MPA, 470 * MPA, 210000 * MPA, "test")


def _plate(member, t, gap=0.0):
    return Plate(member, t, gap, None, S355, 100 * MM, 60 * MM, "round", 41 * MM, "A")


def _clevis(a, b, c):
    stack = (_plate("fork", a), _plate("eye", b, c), _plate("fork", a, c))
    return Pin("P", (0.0, 0.0), ("fork", "eye"), 40 * MM, S355, stack)


def _forces(members, per_case):
    """PinForces with ``per_case`` = list of {member: (Fx, Fy)} in N, the force each member receives."""
    f = np.array([[case[m] for m in members] for case in per_case], dtype=float)
    return PinForces("P", tuple(members), f)


@pytest.mark.parametrize("a, b, c", [
    (20, 30, 0), (12, 20, 1), (16, 25, 2), (10, 40, 5), (30, 15, 3.5), (8, 8, 0.5),
])
def test_clevis_moment_fig_3_11(a, b, c):
    """Fig. 3.11: MEd = FEd (b + 4c + 2a) / 8 for an eye of thickness b carrying F between two fork
    plates of thickness a each carrying F/2, with gaps c; plate and gap sizes in mm (chosen here).
    The force in any direction of the plane; the largest plane shear is F/2."""
    pin = _clevis(a * MM, b * MM, c * MM)
    cases = [{"eye": (F * math.cos(th), F * math.sin(th)), "fork": (-F * math.cos(th), -F * math.sin(th))}
             for F, th in ((100 * KN, 0.0), (250 * KN, 1.0), (37.5 * KN, -2.5))]
    st = solve_stack(pin, _forces(("fork", "eye"), cases))
    F = np.array([100, 250, 37.5]) * KN
    np.testing.assert_allclose(st.moment, F * (b + 4 * c + 2 * a) * MM / 8, rtol=1e-12)
    np.testing.assert_allclose(st.shear, F / 2, rtol=1e-12)
    np.testing.assert_allclose(st.imbalance, 0.0, atol=1e-9 * F.max())
    # the largest moment is at the middle of the eye
    np.testing.assert_allclose(st.moment_at, (a + c + b / 2) * MM, rtol=1e-9)


def test_demo_clevis_pin_moment_fig_3_11():
    """The demo's tie-end pin PL: tie plates a = 12 mm, leg lug b = 20 mm, gaps c = 1 mm (from
    examples/a_frame_gantry.toml). The pin bending demand equals Fig. 3.11's F (b + 4c + 2a) / 8,
    with F the force the leg's lug receives there."""
    res = run(load_job(DEMO))
    sol = res.solution
    pf = sol.pins["PL"]
    F = np.linalg.norm(pf.force[:, pf.members.index("leg_left")], axis=-1)
    c = res.columns
    for j, case in enumerate(sol.cases):
        i = next(i for i in range(len(res)) if c["pin"][i] == "PL" and c["check"][i] == "pin bending"
                 and c["case"][i] == case)
        assert c["demand"][i] == pytest.approx(F[j] * (20 + 4 * 1 + 2 * 12) * MM / 8, rel=1e-12)


@pytest.mark.parametrize("t1, g, t2", [(20, 0, 20), (12, 2, 25), (30, 5, 10)])
def test_single_lap_moment(t1, g, t2):
    """Single lap (two plates, single shear): M = F (t1 + 2g + t2) / 4. This is pinchk's stated
    assumption (pinchk.stack docstring): the lap's net couple F (t1/2 + g + t2/2) is held by equal end
    couples at the outer faces. Common practice; EN 1993-1-8 gives no figure for a single lap. Shear
    F on the one plane. Sizes in mm, chosen here."""
    stack = (_plate("p1", t1 * MM), _plate("p2", t2 * MM, g * MM))
    pin = Pin("P", (0.0, 0.0), ("p1", "p2"), 40 * MM, S355, stack)
    F = 80 * KN
    st = solve_stack(pin, _forces(("p1", "p2"), [{"p1": (0.0, F), "p2": (0.0, -F)}]))
    assert st.moment[0] == pytest.approx(F * (t1 + 2 * g + t2) * MM / 4, rel=1e-12)
    assert st.shear[0] == pytest.approx(F, rel=1e-12)


def test_every_check_names_its_clause():
    """Contract: every check of the method names EN 1993-1-8 and a table or equation."""
    P, Q = pin_cols(ser=True), plate_cols(ser=True)
    for c in [*en.pin_checks(P, DEFAULTS), *en.plate_checks(Q, DEFAULTS)]:
        assert c.clause.startswith("EN 1993-1-8") and c.formula, c.name
