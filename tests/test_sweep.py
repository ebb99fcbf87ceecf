"""Tests of pinchk.alternatives: compare, size and rate.

Sources of the check values:
- EN 1993-1-8:2005 Table 3.10 (pin shear Fv,Rd = 0.6 A fup / γM2, bending MRd = 1.5 Wel fyp / γM0 and
  their interaction (MEd/MRd)² + (Fv,Ed/Fv,Rd)² ≤ 1), Fig. 3.11 (clevis moment MEd = F (b + 4c + 2a)/8),
  Table 3.9 type A (a ≥ F γM0/(2 t fy) + 2 d0/3); γM0 = 1.00 (EN 1993-1-1 §6.1), γM2 = 1.25 (§2.2).
- EN 10083-3 (42CrMo4 +QT: Re/Rm 900/1100 MPa for d ≤ 16 mm, 750/1000 MPa for 16 < d ≤ 40 mm) and
  ISO 898-1:2013 Table 3 (class 4.6: fub 400, fyb 240 MPa), as in data/materials.csv and data/bolt_grades.csv.
- ASME BTH-1 §3-3.3.3 bearing Fp = 1.25 Fy / Nd on Dp t (the value the project marks "from memory").
- sympy's nsolve as an independent solver of the governing equation.
The frames are the invented demo jobs of examples/.
"""

from __future__ import annotations

import json
import math
import os
from dataclasses import replace
from pathlib import Path

import numpy as np
import pytest
import sympy as sp
from hypothesis import given, settings
from hypothesis import strategies as st

from pinchk import alternatives as alt
from pinchk import load_job, run
from pinchk.cli import main

HERE = os.path.dirname(__file__)
EX = os.path.join(HERE, "..", "examples")
GANTRY = os.path.join(EX, "a_frame_gantry.toml")
SPREADER = os.path.join(EX, "spreader_frame_bth1.toml")


@pytest.fixture(scope="module")
def gantry():
    return load_job(GANTRY)


@pytest.fixture(scope="module")
def spreader():
    return load_job(SPREADER)


def _pin_max(res, name):
    sel = [i for i in range(len(res)) if res.columns["pin"][i] == name]
    return float(res.columns["utilization"][sel].max())


# ------------------------------------------------------------------------------------- the engine itself


BOOM = os.path.join(EX, "boom_head_joint.toml")


@pytest.mark.parametrize("path", [GANTRY, SPREADER, os.path.join(EX, "jib_bracket_aisc.toml"), BOOM,
                                  os.path.join(EX, "portal_gantry_fixed.toml"), os.path.join(EX, "padeye_forces.toml")])
def test_as_the_job_equals_the_ordinary_run(path):
    """The recorded columns, re-evaluated unchanged, give run_checks' utilization for every pin."""
    job = load_job(path)
    base = alt.prepare(job)
    res = run(job)
    sw = alt.evaluate(base, {n: [alt.Option("job")] for n in base.pin_rows})
    for n, s in sw.items():
        assert s.util[0] == pytest.approx(_pin_max(res, n), rel=1e-12)


def test_options_agree_with_the_ordinary_path(gantry):
    """Changed diameter, grade, thickness and plate material: the vectorized sweep equals a full run of the
    job rebuilt with that option (apply_option), pin by pin."""
    base = alt.prepare(gantry)
    opts = [alt.Option("a", diameter=0.036),
            alt.Option("b", diameter=0.024, grade="8.8"),
            alt.Option("c", thickness=(("tie", 0.010),)),
            alt.Option("d", diameter=0.027, thickness=(("tie", 0.015), ("leg_left", 0.025)), plate_material=(
                ("tie", "S275"),)),
            alt.Option("e", method="AISC 360-16")]
    sw = alt.evaluate(base, {"PL": opts})["PL"]
    for i, o in enumerate(opts):
        job2 = alt.apply_option(gantry, "PL", o, sw.geometry(i))
        if o.method:
            job2 = replace(job2, method=replace(job2.method, name=o.method, variant="ASD", factors={}))
        assert sw.util[i] == pytest.approx(_pin_max(run(job2), "PL"), rel=1e-9), o.label


def test_bolt_pin_options_agree_with_the_ordinary_path(spreader):
    """The spreader's M36 class 10.9 bolt pin P_B at other grades and sizes (the thread stress area from the
    ISO 898-1 formula at the new size) and made a plain pin of 42CrMo4: against full runs."""
    base = alt.prepare(spreader)
    opts = [alt.Option("a", grade="8.8"), alt.Option("b", diameter=0.030), alt.Option("c", diameter=0.024,
            grade="12.9"), alt.Option("d", pin_material="42CrMo4+QT"), alt.Option("e", diameter=0.021)]
    sw = alt.evaluate(base, {"P_B": opts})["P_B"]
    assert "thread" in sw.reason[4]  # M21 is no coarse thread of data/thread_sizes.csv
    for i, o in enumerate(opts[:4]):
        job2 = alt.apply_option(spreader, "P_B", o)
        assert (job2.pins["P_B"].bolt is None) == (o.pin_material is not None)
        assert sw.util[i] == pytest.approx(_pin_max(run(job2), "P_B"), rel=1e-9), o.label


def test_outline_plates_and_groups_agree_with_the_ordinary_path():
    """The boom head joint (lug outlines along the force, a main plate with cheeks checked as one group,
    a bushed lug): a bigger pin in the same outlines, and thicker boom plates, against full runs."""
    job = load_job(BOOM)
    base = alt.prepare(job)
    opts = [alt.Option("d", diameter=0.075), alt.Option("t", thickness=(("boom", 0.025),)),
            alt.Option("r", diameter=0.065, thickness=(("rocker", 0.020),))]
    sw = alt.evaluate(base, {"H": opts})["H"]
    res = run(job)
    for i, o in enumerate(opts):
        r2 = run(alt.apply_option(job, "H", o))
        # the bushing rows are left out of a sweep (docs/sweeps.md): compare the plate and pin rows
        keep = [k for k in range(len(r2)) if r2.columns["pin"][k] == "H" and "bush" not in r2.columns["part"][k]
                and r2.columns["part"][k] in ("pin",) + sw.parts[1:]]
        assert sw.util[i] == pytest.approx(float(r2.columns["utilization"][keep].max()), rel=1e-9), o.label
    assert len(res)


@settings(max_examples=25, deadline=None)
@given(d_mm=st.integers(16, 60), t_tie=st.sampled_from([None, 8, 10, 15, 20]),
       t_leg=st.sampled_from([None, 16, 25, 30]), grade=st.sampled_from([None, "4.6", "8.8", "10.9"]),
       mat=st.sampled_from([None, "S235", "S275"]))
def test_any_option_agrees_with_the_ordinary_path(d_mm, t_tie, t_leg, grade, mat):
    """Property: for any diameter, thicknesses, grade and plate material of the tie pin PL, the sweep's
    utilization is that of a full run of the job rebuilt with the option."""
    job = _GANTRY_JOB
    th = tuple(x for x in (("tie", t_tie and t_tie / 1e3), ("leg_left", t_leg and t_leg / 1e3)) if x[1])
    o = alt.Option("h", diameter=d_mm / 1e3, grade=grade if d_mm <= 39 else None, thickness=th,
                   plate_material=(("tie", mat),) if mat else ())
    sw = alt.evaluate(_GANTRY_BASE, {"PL": [o]})["PL"]
    if sw.reason[0]:
        with pytest.raises(ValueError):
            alt.apply_option(job, "PL", o)
        return
    assert sw.util[0] == pytest.approx(_pin_max(run(alt.apply_option(job, "PL", o)), "PL"), rel=1e-9)


_GANTRY_JOB = load_job(GANTRY)
_GANTRY_BASE = alt.prepare(_GANTRY_JOB)


# ------------------------------------------------------------------------------------------------ compare


def test_compare_marks_the_lowest_grade_that_passes_at_the_smallest_diameter(gantry):
    """Grade comparison of the tie clevis pin PL; the mark is checked against an ordinary run of every option."""
    cmp = alt.compare(gantry, pins=["PL"], grades=alt.Every(alt.bolt_grade_names()),
                      diameters=[0.020, 0.024, 0.030])
    sw = cmp.sweeps["PL"]
    assert cmp.skipped["PL"]  # ASTM A307 has no yield strength: left out, and said so
    passing = []
    for i, o in enumerate(sw.options):
        job2 = alt.apply_option(gantry, "PL", o, sw.geometry(i))
        u = _pin_max(run(job2), "PL")
        assert sw.util[i] == pytest.approx(u, rel=1e-9)
        if u <= 1.0:
            mat = job2.pins["PL"].material
            passing.append((round(o.diameter, 9), mat.fu, i))
    expect = min(passing)[2]
    assert cmp.marked["PL"] == (expect,)
    assert sw.options[expect].diameter == 0.020


def test_grade_4_6_interaction_by_hand(gantry):
    """PL with an ISO 898-1 class 4.6 pin of 24 mm: EN 1993-1-8 Table 3.10 interaction by hand.

    Clevis: tie plates a = 12 mm outside, leg plate b = 20 mm inside, gaps c = 1 mm (the example's stack);
    MEd = F (b + 4c + 2a)/8 (Fig. 3.11), Fv,Ed = F/2; fub = 400, fyb = 240 MPa (ISO 898-1 Table 3).
    """
    cmp = alt.compare(gantry, pins=["PL"], grades=["4.6"], diameters=[0.024])
    sw = cmp.sweeps["PL"]
    F = float(np.linalg.norm(run(gantry).solution.pins["PL"].force, axis=-1).max())
    d, a, b, c = 0.024, 0.012, 0.020, 0.001
    M, V = F * (b + 4 * c + 2 * a) / 8, F / 2
    M_Rd = 1.5 * (math.pi * d**3 / 32) * 240e6 / 1.00
    Fv_Rd = 0.6 * (math.pi * d**2 / 4) * 400e6 / 1.25
    assert sw.check[0] == "pin shear + bending"
    assert sw.util[0] == pytest.approx((M / M_Rd) ** 2 + (V / Fv_Rd) ** 2, rel=1e-9)
    assert cmp.marked["PL"] == ()  # it fails, and it is the only option


def test_method_variants_agree_with_the_ordinary_path(gantry):
    """'AISC 360-16:LRFD' and 'ASME BTH-1:B' are those methods with that variant (default factors)."""
    base = alt.prepare(gantry)
    opts = [alt.Option("l", method="AISC 360-16:LRFD"), alt.Option("b", method="ASME BTH-1:B")]
    sw = alt.evaluate(base, {"PL": opts})["PL"]
    for i, (name, var) in enumerate((("AISC 360-16", "LRFD"), ("ASME BTH-1", "B"))):
        job2 = replace(gantry, method=replace(gantry.method, name=name, variant=var, factors={}))
        assert sw.util[i] == pytest.approx(_pin_max(run(job2), "PL"), rel=1e-12)


def test_json_has_no_infinity(capsys, tmp_path):
    """BTH-1's 'pin secured' rule has capacity 0 where the job does not say the pin is secured: its
    utilization is infinite, which JSON (RFC 8259 §6) cannot hold; it is written as null, as run does."""
    unsecured = tmp_path / "gantry_unsecured.toml"
    unsecured.write_text(Path(GANTRY).read_text().replace("secured = true", "secured = false"))
    assert main(["compare", str(unsecured), "--pin", "PL", "--method", "ASME BTH-1", "--format", "json"]) == 0
    text = capsys.readouterr().out
    d = json.loads(text, parse_constant=lambda c: pytest.fail(f"non-JSON constant {c}"))
    row = d["pins"][0]["alternatives"][0]
    assert row["governing_check"] == "pin secured" and row["utilization"] is None and row["status"] == "FAIL"


def test_method_comparison_is_not_ranked(gantry):
    cmp = alt.compare(gantry, pins=["PL"], methods=["EN 1993-1-8", "AISC 360-16", "ASME BTH-1"])
    assert [o.method for o in cmp.sweeps["PL"].options] == ["EN 1993-1-8", "AISC 360-16", "ASME BTH-1"]
    assert cmp.marked["PL"] == () and not cmp.ranked
    assert any("same joint forces" in n for n in cmp.notes)


# ------------------------------------------------------------------------------------------------ size


@pytest.mark.parametrize("path,what", [(GANTRY, ("pin",)), (SPREADER, ("pin", "plates"))])
def test_size_passes_and_next_smaller_fails(path, what):
    """Every pin of the demo: the job rebuilt at the sizes found passes every check (ordinary run), and each
    pin at its next smaller series diameter fails."""
    job = load_job(path)
    sz = alt.size(job, what=what)
    assert sz.found
    res = run(alt.sized_job(job, sz))
    assert res.passed
    for n, s in sz.sized.items():
        assert s.smaller is not None, n
        assert s.smaller.diameter < s.option.diameter
        D, _ = alt.series_values("pin", alt.default_series(job, "pin"))
        assert D[D.index(s.option.diameter) - 1] == s.smaller.diameter
        u = _pin_max(run(alt.sized_job(job, sz, smaller=True, name=n)), n)
        assert u > 1.0, n
        assert u == pytest.approx(s.smaller_util, rel=1e-9)
        if job.pins[n].bolt is not None:  # a bolt: thread sizes only, no diameter in between
            assert s.d_exact is None and "thread sizes" in s.d_exact_check
        else:
            assert s.d_exact is not None and s.smaller.diameter < s.d_exact <= s.option.diameter


def test_sized_diameter_solves_the_interaction_equation_by_hand(gantry):
    """P_foot_left, pin only (plates as the job): the exact diameter is where EN 1993-1-8 Table 3.10
    (MEd/MRd)² + (Fv,Ed/Fv,Rd)² = 1, solved here with sympy for d.

    Clevis of the example: ground plates a = 16 mm, leg b = 25 mm, gaps c = 2 mm; MEd = F (b + 4c + 2a)/8,
    Fv,Ed = F/2; 42CrMo4+QT at 16 < d ≤ 40 mm: fyp = 750, fup = 1000 MPa (EN 10083-3); γM0 = 1.00, γM2 = 1.25.
    """
    sz = alt.size(gantry, pins=["P_foot_left"], what=("pin",))
    s = sz.sized["P_foot_left"]
    F = float(np.linalg.norm(run(gantry).solution.pins["P_foot_left"].force, axis=-1).max())
    a, b, c = 0.016, 0.025, 0.002
    x = sp.symbols("x", positive=True)  # d in mm, so the solver sees numbers near 1
    d = x / 1000
    M, V = F * (b + 4 * c + 2 * a) / 8, F / 2
    eq = (M / (1.5 * sp.pi * d**3 / 32 * 750e6 / 1.00)) ** 2 + (V / (0.6 * sp.pi * d**2 / 4 * 1000e6 / 1.25)) ** 2 - 1
    d_hand = float(sp.nsolve(eq, x, 18)) / 1000
    assert 0.016 < d_hand <= 0.040  # inside the size band whose strengths were used
    assert s.d_exact_check == "pin shear + bending"
    assert s.d_exact == pytest.approx(d_hand, rel=1e-8)
    assert s.option.diameter == 0.018  # the next diameter of the ISO 2341 series above it (16 fails)


def test_pin_shear_limit_by_hand(gantry):
    """The diameter at which EN 1993-1-8 Table 3.10 pin shear alone reaches 1: 0.6 (π d²/4) fup / γM2 = V,
    d = √(4 V γM2 / (0.6 π fup)), with V = F/2 in the clevis and fup = 1100 MPa (42CrMo4+QT, d ≤ 16 mm)."""
    base = alt.prepare(gantry)
    F = float(np.linalg.norm(base.sol.pins["P_foot_left"].force, axis=-1).max())
    d_hand = math.sqrt(4 * (F / 2) * 1.25 / (0.6 * math.pi * 1100e6))
    assert d_hand <= 0.016
    d = alt.diameter_limit(base, "P_foot_left", alt.Option("pin", detail=True), check="pin shear")
    assert d == pytest.approx(d_hand, rel=1e-8)


def test_bth1_bearing_thickness_by_hand(spreader):
    """Spreader pin P_A, sized: the exact thickness of the strut plates is where ASME BTH-1 bearing
    Fp Dp t = F, Fp = 1.25 Fy / Nd (Nd = 3.00, Design Category B; Fy = 355 MPa, S355 t ≤ 16 mm, EN 10025-2),
    so t = F Nd / (1.25 Fy Dp), with F the force on one strut plate (from the sized job's run)."""
    sz = alt.size(spreader, pins=["P_A"])
    s = sz.sized["P_A"]
    assert s.t_exact_check["strut_left"] == "bearing"
    job2 = alt.sized_job(spreader, sz)
    res = run(job2)
    rows = [i for i in range(len(res)) if res.columns["pin"][i] == "P_A" and res.columns["check"][i] == "bearing"
            and res.columns["part"][i].startswith("strut_left")]
    F = float(res.columns["demand"][rows].max())
    t_hand = F * 3.00 / (1.25 * 355e6 * s.option.diameter)
    assert s.t_exact["strut_left"] == pytest.approx(t_hand, rel=1e-8)


# ------------------------------------------------------------------------------------------------ rate


def test_rate_linear_case_is_the_hand_limit(spreader):
    """Every load of the BTH-1 spreader scaled: the governing bearing check is proportional to the load, so
    the limit is capacity / demand of that row (ASME BTH-1 bearing, 1.25 Fy/Nd Dp t with Fy 355 MPa,
    Nd 3.00, Dp 36 mm, t 16 mm)."""
    rt = alt.rate(spreader)
    res = run(spreader)
    g = res.row(res.governing)
    assert g["check"] == "bearing" and g["pin"] == "P_B"
    cap = 1.25 * 355e6 / 3.00 * 0.036 * 0.016
    assert g["capacity"] == pytest.approx(cap, rel=1e-12)
    assert rt.factor == pytest.approx(cap / g["demand"], rel=1e-7)
    assert rt.factor == pytest.approx(rt.linear_estimate, rel=1e-7)
    assert rt.limit == "check" and rt.governing["check"] == "bearing"


def test_rate_affine_detailing_rule_is_not_a_division(gantry):
    """Only case 'lift' scaled. The limit is the EN 1993-1-8 Table 3.9 type A end distance of a tie plate,
    whose demand F γM0/(2 t fy) + 2 d0/3 is affine in the load: the factor is (a − 2 d0/3)/(F γM0/(2 t fy))
    by hand, not 1/utilization."""
    rt = alt.rate(gantry, case="lift")
    assert rt.governing["check"] == "end distance (type A)"
    assert rt.governing["case"] == "lift"
    res = run(gantry)
    i = next(i for i in range(len(res)) if res.columns["pin"][i] == rt.governing["pin"]
             and res.columns["part"][i] == rt.governing["part"] and res.columns["check"][i] == "end distance (type A)"
             and res.columns["case"][i] == "lift")
    plate = next(p for p in gantry.pins[rt.governing["pin"]].stack
                 if rt.governing["part"].startswith(p.member) and p.checked)
    d0 = plate.hole
    a = plate.end - d0 / 2
    load_part = res.columns["demand"][i] - 2 * d0 / 3  # F γM0 / (2 t fy) at factor 1
    lam_hand = (a - 2 * d0 / 3) / load_part
    assert rt.factor == pytest.approx(lam_hand, rel=1e-7)
    plain = res.columns["capacity"][i] / res.columns["demand"][i]
    assert abs(rt.factor - plain) > 0.1  # a plain division would be far off
    assert any("affine" in r for r in rt.reasons)


def test_rate_interaction_is_solved_not_divided(gantry):
    """With pin PL at 20 mm (grade 4.6) the EN 1993-1-8 interaction governs; it is quadratic in the load,
    so the limit factor is 1/√u, not 1/u (every load scaled, the frame linear)."""
    job = alt.apply_option(gantry, "PL", alt.Option("x", diameter=0.020, grade="4.6"))
    res = run(job)
    g = res.row(res.governing)
    assert g["check"] == "pin shear + bending"
    rt = alt.rate(job)
    assert rt.factor == pytest.approx(1 / math.sqrt(g["utilization"]), rel=1e-7)
    assert any("nonlinearly" in r for r in rt.reasons)


CABLE_JOB = """\
# invented test frame: a boom held by a cable, a dead load and an uplift
[job]
title = "boom on a cable (test, invented)"
output_units = "SI"
[units]
length = "mm"
force = "kN"
[method]
name = "EN 1993-1-8"
[body.boom]
points = { R = [0, 0], T = [2000, 0] }
[pin.P_root]
secured = true
joins = ["boom.R"]
[pin.P_wall]
secured = true
at = [0, 1500]
[pin.P_tip]
secured = true
joins = ["boom.T"]
diameter = 30
hole = 32
material = "42CrMo4+QT"
[[pin.P_tip.plate]]
member = "stay"
thickness = 12
material = "S355"
width = 100
end = 60
[[pin.P_tip.plate]]
member = "boom"
thickness = 20
material = "S355"
width = 100
end = 60
gap = 1
[[pin.P_tip.plate]]
member = "stay"
thickness = 12
material = "S355"
width = 100
end = 60
gap = 1
[link.stay]
ends = ["P_wall", "P_tip"]
kind = "cable"
[support.root]
at = "P_root"
kind = "pinned"
[support.wall]
at = "P_wall"
kind = "pinned"
[case.both]
[[load]]
case = "both"
at = "P_tip"
body = "boom"
force = ["0 kN", "-10 kN"]
[[load]]
case = "both"
at = "P_tip"
body = "boom"
force = ["0 kN", "4 kN"]
label = "uplift"
"""


def test_rate_stops_where_a_cable_goes_slack(tmp_path):
    """An invented boom held by a cable, a 10 kN dead load down and a labelled 4 kN uplift at the tip (one
    case). The cable's tension is linear in the uplift factor and vanishes at 10/4 = 2.5 (statics by hand:
    the vertical load at the tip is what the cable holds); beyond it the cable would push, so the limit is
    2.5 although every check still passes there, not 1/utilization."""
    path = tmp_path / "cable.toml"
    path.write_text(CABLE_JOB, encoding="utf-8")
    job = load_job(str(path))
    rt = alt.rate(job, label="uplift")
    assert rt.limit == "cable"
    assert rt.factor == pytest.approx(10 / 4, rel=1e-7)
    assert rt.governing["utilization"] < 1.0
    assert abs(rt.factor - rt.linear_estimate) > 0.1
    assert any("cable stay" in r for r in rt.reasons)


ROLLER_JOB = """\
# invented test frame: a beam on a pin and a wheel, with an overhang lifted by a labelled load
[job]
title = "beam on a pin and a wheel (test, invented)"
output_units = "SI"
[units]
length = "mm"
force = "kN"
[method]
name = "EN 1993-1-8"
[body.beam]
points = { A = [0, 0], M = [1000, 0], B = [2000, 0], C = [3000, 0] }
[pin.PA]
secured = true
joins = ["beam.A"]
diameter = 30
hole = 32
material = "42CrMo4+QT"
[[pin.PA.plate]]
member = "ground"
thickness = 12
material = "S355"
width = 100
end = 60
[[pin.PA.plate]]
member = "beam"
thickness = 20
material = "S355"
width = 100
end = 60
gap = 1
[[pin.PA.plate]]
member = "ground"
thickness = 12
material = "S355"
width = 100
end = 60
gap = 1
[pin.PB]
secured = true
joins = ["beam.B"]
[support.pin]
at = "PA"
kind = "pinned"
[support.wheel]
at = "PB"
kind = "roller"
normal = [0, 1]
[case.service]
[[load]]
case = "service"
at = "beam.M"
force = ["0 kN", "-10 kN"]
[[load]]
case = "service"
at = "beam.C"
force = ["0 kN", "1 kN"]
label = "lift"
"""


def test_rate_stops_where_a_roller_lifts_off(tmp_path):
    """An invented beam on a pin at A (x = 0) and a wheel at B (x = 2 m), 10 kN down at 1 m and a labelled
    1 kN up at the overhang end (3 m). Moments about A (hand statics): R_B = (10 × 1 − λ × 3)/2 kN, zero at
    λ = 10/3; beyond it the wheel would have to pull, so the rating stops there."""
    path = tmp_path / "roller.toml"
    path.write_text(ROLLER_JOB, encoding="utf-8")
    rt = alt.rate(load_job(str(path)), label="lift")
    assert rt.limit == "support"
    assert rt.factor == pytest.approx(10 / 3, rel=1e-7)
    assert any("roller wheel" in r for r in rt.reasons)


# ------------------------------------------------------------------------------------------------ CLI


def test_cli_compare_json_and_csv(tmp_path, capsys):
    out = tmp_path / "cmp.json"
    rc = main(["compare", GANTRY, "--pin", "PL", "--grade", "4.6,8.8", "--diameter", "20,24 mm", "--format", "json",
               "--output", str(out)])
    assert rc == 0
    d = json.loads(out.read_text())
    alts = d["pins"][0]["alternatives"]
    assert len(alts) == 4 and sum(a["marked"] for a in alts) == 1
    assert d["pins"][0]["marked"] == ["d 20 mm · grade 8.8"]
    capsys.readouterr()
    rc = main(["compare", GANTRY, "--pin", "PL", "--grade", "4.6", "--diameter", "16", "--format", "csv"])
    assert rc == 1  # none passes
    lines = capsys.readouterr().out.strip().splitlines()
    assert lines[0].startswith("pin,alternative") and len(lines) == 2


def test_size_detailing_aisc_d5_2():
    """AISC 360-16 §D5.1(a)/§D5.2 for the sized plates of the (US units) jib bracket: be = 2t + 0.63 in
    (the module uses the smaller SI form, 16 mm), end a + d0/2 with a = 1.33 be, width w = 2 be + d0, rounded
    up to 1/16 in."""
    job = load_job(os.path.join(EX, "jib_bracket_aisc.toml"))
    sz = alt.size(job)
    step = 0.0254 / 16
    for n, s in sz.sized.items():
        d = s.option.diameter
        for part, (t, end, width) in s.geometry.items():
            plate = next(p for p in job.pins[n].stack if p.checked and part.startswith(p.member))
            d0 = plate.hole + d - job.pins[n].diameter
            be = 2 * t + 0.016
            assert end == pytest.approx(math.ceil((1.33 * be + d0 / 2) * (1 + 1e-7) / step - 1e-9) * step, rel=1e-12)
            assert width == pytest.approx(math.ceil((2 * be + d0) * (1 + 1e-7) / step - 1e-9) * step, rel=1e-12)
    assert run(alt.sized_job(job, sz)).passed


def test_size_detailing_en_table_3_9():
    """EN 1993-1-8 Table 3.9 type A for the sized plates of the gantry: end = F γM0/(2 t fy) + 2 d0/3 + d0/2,
    width = 2 (F γM0/(2 t fy) + d0/3) + d0, with F the largest force on the plate (the sized job's bearing
    rows), rounded up to 1 mm; fy of S355 at the thickness (EN 10025-2: 355 MPa to 16 mm, 345 to 40 mm)."""
    job = load_job(GANTRY)
    sz = alt.size(job, pins=["PL"])
    s = sz.sized["PL"]
    res = run(alt.sized_job(job, sz))
    for part, (t, end, width) in s.geometry.items():
        rows = [i for i in range(len(res)) if res.columns["pin"][i] == "PL" and res.columns["part"][i] == part
                and res.columns["check"][i] == "bearing"]
        F = float(res.columns["demand"][rows].max())
        fy = 355e6 if t <= 0.016 else 345e6
        d0 = 0.032 + s.option.diameter - 0.030
        base = F * 1.00 / (2 * t * fy)
        assert end == pytest.approx(math.ceil((base + 2 * d0 / 3 + d0 / 2) * (1 + 1e-7) / 1e-3 - 1e-9) * 1e-3)
        assert width == pytest.approx(math.ceil((2 * (base + d0 / 3) + d0) * (1 + 1e-7) / 1e-3 - 1e-9) * 1e-3)


def test_size_not_found_exits_1(capsys):
    """The spreader's hook pin needs 40 mm; the inch clevis-pin series stops at 1 in (25.4 mm)."""
    assert main(["size", SPREADER, "--pin", "P_top", "--pin-series", "inch"]) == 1
    out = capsys.readouterr().out
    assert "no size in the series passes" in out and "NOT FOUND" in out


def test_rate_of_a_forces_file_job_scales_its_cases():
    """The padeye job reads its joint forces from a file: every case scaled, the limit found on them."""
    job = load_job(os.path.join(EX, "padeye_forces.toml"))
    rt = alt.rate(job)
    res = run(alt._scaled_job(job, rt.factor * (1 - 1e-6), None, None))
    assert res.passed
    assert not run(alt._scaled_job(job, rt.factor * (1 + 1e-6), None, None)).passed


def test_cli_size_and_rate_json(capsys):
    assert main(["size", SPREADER, "--pin", "P_top", "--format", "json"]) == 0
    d = json.loads(capsys.readouterr().out)
    p = d["pins"][0]
    assert p["pin"] == "P_top" and p["found"] and p["diameter"] == 40 and p["next_smaller_diameter"] == 36
    assert p["next_smaller_utilization"] > 1 >= p["utilization"] and p["plates"]
    assert d["series"]["pin"][0]["source"].startswith("ISO 2341") and "caution" in d
    assert main(["rate", SPREADER, "--format", "json"]) == 0
    r = json.loads(capsys.readouterr().out)
    assert r["limit"] == "check" and r["governing"]["check"] == "bearing" and r["factor"] > 1


def test_cli_markdown_views(capsys):
    for argv in (["compare", GANTRY, "--pin", "PL", "--grade", "8.8"], ["size", SPREADER, "--pin", "P_A"],
                 ["rate", GANTRY, "--load", "hook"]):
        assert main(argv + ["--format", "md"]) == 0
        text = capsys.readouterr().out
        assert text.startswith("# pinchk ") and "|---" in text and "- caution:" in text
        blocks, cur = [], []
        for line in text.splitlines() + [""]:  # every row of a table has as many cells as its header
            if line.startswith("|"):
                cur.append(line.count("|"))
            elif cur:
                blocks.append(cur)
                cur = []
        assert blocks and all(len(set(b)) == 1 for b in blocks)


def test_cli_size_and_rate(tmp_path, capsys):
    assert main(["size", SPREADER, "--pin", "P_A"]) == 0
    text = capsys.readouterr().out
    assert "P_A" in text and "exact d" in text and "caution" in text
    out = tmp_path / "rate.csv"
    assert main(["rate", GANTRY, "--load", "hook", "--format", "csv", "--output", str(out)]) == 0
    assert out.read_text().startswith("scaled,factor")


@pytest.mark.parametrize("argv,word", [
    (["compare", GANTRY, "--grade", "9.9"], "--grade"),
    (["compare", GANTRY, "--method", "AISC 360-16:XX"], "--method"),
    (["compare", GANTRY, "--pin", "nope"], "--pin"),
    (["compare", GANTRY, "--diameter", "abc"], "--diameter"),
    (["compare", GANTRY, "--diameter", "-3 mm"], "--diameter"),
    (["size", GANTRY, "--pin-series", "imperial"], "series"),
    (["rate", GANTRY, "--case", "nope"], "--case"),
    (["rate", GANTRY, "--load", "nope"], "--load"),
])
def test_cli_input_errors(argv, word, capsys):
    assert main(argv) == 2
    err = capsys.readouterr().err
    assert word in err and "Traceback" not in err


def test_cli_compare_with_every_alternative_left_out_exits_1(capsys):
    """Bare sizes are in the job's length unit: inches for the US-units jib bracket, so 20 to 40 in; no
    bolt grade of the library covers such a size."""
    rc = main(["compare", os.path.join(EX, "jib_bracket_aisc.toml"), "--pin", "P_root", "--diameter", "20:40:10",
               "--grade", "all"])
    assert rc == 1
    assert "every one was left out" in capsys.readouterr().out


def test_cli_refuses_to_overwrite_the_job(tmp_path, capsys):
    job = tmp_path / "j.toml"
    job.write_text(open(GANTRY, encoding="utf-8").read())
    before = job.read_text()
    assert main(["rate", str(job), "--output", str(job)]) == 2
    assert job.read_text() == before
