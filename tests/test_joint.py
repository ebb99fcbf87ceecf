"""Real joints end to end: rotation invariance, cheek plates, bushings, wear, lateral loads, the sweep.

Check values come from the clauses they implement (EN 1993-1-8:2005 Table 3.10 and eq (3.15),
EN 1993-1-1:2005 eq (6.13), AISC 360-16 §D5.2) worked by hand in the test, or from an identity
(a rigid rotation of the whole structure and its loads changes no utilization). The jobs are invented.
"""

import math
import tomllib
from dataclasses import replace
from pathlib import Path

import numpy as np
import pytest
from numpy.testing import assert_allclose

from pinchk import load_job, run
from pinchk.errors import InputError
from pinchk.jobfile import parse_job

FY_20 = 345e6  # S355, EN 10025-2 ReH for 16 < t <= 40 mm (the bundled material library)
EXAMPLES = Path(__file__).resolve().parent.parent / "examples"


def rot(v, phi):
    c, s = math.cos(phi), math.sin(phi)
    return (c * v[0] - s * v[1], s * v[0] + c * v[1])


def rotate_job(job, phi):
    """The whole job turned by ``phi`` about the origin: points, pins, loads, roller normals, lug axes."""
    place = lambda p: replace(p, xy=rot(p.xy, phi))  # noqa: E731
    bodies = {n: replace(b, points={k: rot(xy, phi) for k, xy in b.points.items()}) for n, b in job.bodies.items()}
    pins = {n: replace(p, xy=rot(p.xy, phi), stack=tuple(
        replace(pl, axis=None if pl.axis is None else rot(pl.axis, phi)) for pl in p.stack))
        for n, p in job.pins.items()}
    links = {n: replace(lk, ends=tuple(place(e) for e in lk.ends)) for n, lk in job.links.items()}
    sups = {n: replace(s, at=place(s.at), normal=None if s.normal is None else rot(s.normal, phi))
            for n, s in job.supports.items()}
    loads = tuple(replace(ld, at=place(ld.at), force=rot(ld.force, phi)) for ld in job.loads)
    return replace(job, bodies=bodies, pins=pins, links=links, supports=sups, loads=loads)


@pytest.mark.parametrize("example", ["a_frame_gantry.toml", "boom_head_joint.toml", "jib_bracket_aisc.toml",
                                     "spreader_frame_bth1.toml", "portal_gantry_fixed.toml"])
@pytest.mark.parametrize("phi_deg", [37.0, 180.0, -101.5])
def test_rotating_everything_changes_no_utilization(example, phi_deg):
    job = load_job(EXAMPLES / example)
    a = run(job)
    b = run(rotate_job(job, math.radians(phi_deg)))
    assert a.columns["check"] == b.columns["check"] and a.columns["case"] == b.columns["case"]
    assert_allclose(b.columns["utilization"], a.columns["utilization"], rtol=1e-7, atol=1e-10)
    for sa, sb in zip(a.sweeps, b.sweeps, strict=True):  # the sweep turns with the structure
        assert_allclose(sb.case_util, sa.case_util, rtol=1e-7, atol=1e-10)
        assert_allclose(np.nanmax(sb.util), np.nanmax(sa.util), rtol=0.02)  # 5° grid shifted by φ


def test_rotation_helper_really_rotates():
    # guard for the test above: the rotated job's joint forces are the turned forces, not the same ones
    job = load_job(EXAMPLES / "boom_head_joint.toml")
    a, b = run(job), run(rotate_job(job, math.radians(37.0)))
    fa, fb = a.solution.pins["H"].force[0, 0], b.solution.pins["H"].force[0, 0]
    assert not np.allclose(fa, fb)
    assert_allclose(fb, rot(fa, math.radians(37.0)), rtol=1e-9)


BASE = """
[job]
title = "test joint"
[units]
length = "mm"
force = "kN"
[method]
name = "{method}"
[body.arm]
points = {{ A = [0, 0], B = [1000, 0] }}
[support.wall]
at = "arm.A"
kind = "fixed"
[case.pull]
[[load]]
case = "pull"
at = "P"
force = ["{fx}", "{fy}"]
[pin.P]
joins = ["arm.B"]
diameter = 40
hole = 41
material = "S355"
{pin_extra}
[[pin.P.plate]]
member = "load"
thickness = 20
[[pin.P.plate]]
member = "arm"
thickness = 20
material = "S355"
width = 120
end = 60
gap = 2
{plate_extra}
"""


def job_of(method="EN 1993-1-8", fx="100 kN", fy="0 kN", pin_extra="", plate_extra="", head="", drop=()):
    """The test job with extra pin and plate fields, ``head`` text before it, the ``drop`` lines removed."""
    text = head + "\n" + BASE.format(method=method, fx=fx, fy=fy, pin_extra=pin_extra, plate_extra=plate_extra)
    for line in drop:
        text = text.replace(line + "\n", "", 1)
    return parse_job(tomllib.loads(text), "test.toml", text)


def rows(res, check, part=None):
    c = res.columns
    return [i for i in range(len(res)) if c["check"][i] == check and (part is None or c["part"][i] == part)]


def test_cheek_plates_bear_on_their_combined_thickness():
    cheek = '''group = "main"
[[pin.P.plate]]
member = "arm"
thickness = 10
material = "S355"
width = 100
end = 50
group = "main"
'''
    res = run(job_of(plate_extra=cheek))
    (i,) = rows(res, "bearing")
    # EN 1993-1-8 Table 3.10: Fb,Rd = 1.5 t d fy / γM0 with t = 20 + 10 mm, d = 40 mm and fy the lowest
    # of the parts: S355 of 20 mm, ReH = 345 MPa (EN 10025-2, 16 < t <= 40 mm)
    assert res.columns["capacity"][i] == pytest.approx(1.5 * 0.030 * 0.040 * FY_20, rel=1e-12)
    assert res.columns["part"][i] == "arm main (2 plates)"
    # Table 3.9 A end distance with the combined thickness and the cheek's smaller end (a = 50 - 20.5 mm)
    (j,) = rows(res, "end distance (type A)")
    assert res.columns["capacity"][j] == pytest.approx(0.050 - 0.0205, rel=1e-12)
    assert res.columns["demand"][j] == pytest.approx(100e3 / (2 * 0.030 * FY_20) + 2 * 0.041 / 3, rel=1e-12)
    assert any("cheek plates" in a and "not checked" in a for a in res.assumptions)


def test_bushing_has_its_own_material_and_the_plate_bears_on_its_outside():
    bush = 'hole = 41\nbushing_od = 56\nbushing_material = "bronze"'
    extra = '[material.bronze]\nfy = "240 MPa"\nfu = "400 MPa"\nE = "110 GPa"\nsource = "invented for the test"'
    res = run(job_of(plate_extra=bush, head=extra))
    (b,) = rows(res, "bearing", "arm bushing")
    (p,) = rows(res, "bearing", "arm")
    # EN 1993-1-8 Table 3.10, fy the lower of pin (S355) and bushing (240 MPa): on the bore, d = 40 mm
    assert res.columns["capacity"][b] == pytest.approx(1.5 * 0.020 * 0.040 * 240e6, rel=1e-12)
    # the plate behind: the bushing's outside diameter as its pin, fy the lower of plate and bushing
    assert res.columns["capacity"][p] == pytest.approx(1.5 * 0.020 * 0.056 * 240e6, rel=1e-12)
    # the bushing has no end distance of its own
    assert not rows(res, "end distance (type A)", "arm bushing")


def test_wear_widens_every_clearance():
    replaceable = "replaceable = true"
    r0 = run(job_of(pin_extra=replaceable))
    r1 = run(job_of(pin_extra=replaceable + '\nwear = "1 mm"'))
    (i,) = rows(r0, "contact stress")
    (j,) = rows(r1, "contact stress")
    # EN 1993-1-8 eq (3.15): σh = 0.591 √(E F (d0 - d) / (d² t)), d0 - d = 1 mm, then 2 mm with wear
    E, F, d, t = 210e9, 100e3, 0.040, 0.020
    assert r0.columns["demand"][i] == pytest.approx(0.591 * math.sqrt(E * F * 0.001 / (d**2 * t)), rel=1e-9)
    assert r1.columns["demand"][j] == pytest.approx(0.591 * math.sqrt(E * F * 0.002 / (d**2 * t)), rel=1e-9)
    # the end distance from the worn hole's edge: a = 60 - 42/2 mm
    (k,) = rows(r1, "end distance (type A)")
    assert r1.columns["capacity"][k] == pytest.approx(0.060 - 0.021, rel=1e-12)


def test_rotating_joint_takes_the_aisc_clearance_rule_with_wear():
    r = run(job_of(method="AISC 360-16", pin_extra='rotates = true\nwear = "0.5 mm"'))
    (i,) = rows(r, "hole clearance (rotating)")
    # AISC 360-16 §D5.2: d0 ≤ d + 1/32 in where the pin turns under load; 41.5 - 40 = 1.5 mm > 0.79 mm
    assert r.columns["demand"][i] == pytest.approx(0.0015, rel=1e-9)
    assert r.columns["status"][i] == "FAIL"
    assert not rows(run(job_of(method="AISC 360-16")), "hole clearance (rotating)")


def test_lateral_load_bends_the_base_about_its_weak_axis():
    lat = 'lateral = "5 %"\nbase = 150\naxis = [1, 0]'
    r = run(job_of(plate_extra=lat, pin_extra='retainer = "10 kN"'))
    (i,) = rows(r, "base weak-axis bending")
    # H = 5 % of 100 kN at the hole centre, 150 mm above the base: Mz = 5 kN × 0.15 m = 0.75 kN·m;
    # EN 1993-1-1 eq (6.13): Mz,Rd = Wpl fy / γM0, Wpl = b t²/4 = 120 × 20² / 4 mm³
    assert r.columns["demand"][i] == pytest.approx(5e3 * 0.150, rel=1e-12)
    assert r.columns["capacity"][i] == pytest.approx(0.120 * 0.020**2 / 4 * FY_20, rel=1e-12)
    (k,) = rows(r, "base N + M interaction")
    # eq (6.2): N/NRd + Mz/Mz,Rd (no in-plane moment: the force is along the axis)
    N_Rd, Mz_Rd = 0.120 * 0.020 * FY_20, 0.120 * 0.020**2 / 4 * FY_20
    assert r.columns["demand"][k] == pytest.approx(100e3 / N_Rd + 750 / Mz_Rd, rel=1e-9)
    (j,) = rows(r, "pin axial force (retainer)")
    assert r.columns["demand"][j] == pytest.approx(5e3, rel=1e-12)
    assert_allclose(r.pin_axial["P"], [5e3])


def test_lateral_force_per_case_and_its_errors():
    r = run(job_of(plate_extra='lateral_force = { pull = "7 kN" }\nbase = 150'))
    (i,) = rows(r, "base weak-axis bending")
    assert r.columns["demand"][i] == pytest.approx(7e3 * 0.150, rel=1e-12)
    with pytest.raises(InputError, match="base section"):
        job_of(plate_extra='lateral = 0.05')
    with pytest.raises(InputError, match="no load case 'pul'"):
        job_of(plate_extra='lateral_force = { pul = "7 kN" }\nbase = 150')
    with pytest.raises(InputError, match="percentage"):
        job_of(plate_extra='lateral = "150 %"\nbase = 150')


def test_off_axis_force_uses_the_outline_along_it_and_says_so():
    # force at 30° to a square lug's axis: end distance a = 60/cos 30° - 20.5 mm (hand geometry)
    r = run(job_of(fx="86.6025404 kN", fy="50 kN", plate_extra='shape = "square"\naxis = [1, 0]'))
    (i,) = rows(r, "end distance (type A)")
    assert r.columns["capacity"][i] == pytest.approx(0.060 / math.cos(math.radians(30)) - 0.0205, rel=1e-6)
    assert "30.0° off the lug axis" in r.columns["note"][i]
    (j,) = rows(r, "bearing")
    assert "off the lug axis" not in r.columns["note"][j]
    # the same force along a lug with no axis: geometry straight ahead, as before
    r0 = run(job_of(fx="86.6025404 kN", fy="50 kN", plate_extra='shape = "square"'))
    (k,) = rows(r0, "end distance (type A)")
    assert r0.columns["capacity"][k] == pytest.approx(0.060 - 0.0205, rel=1e-12)


def test_force_into_the_body_leaves_no_end_distance_row():
    r = run(job_of(fx="-100 kN", plate_extra='axis = [1, 0]\nbase = 100'))
    assert not rows(r, "end distance (type A)")
    assert rows(r, "edge distance (type A)")  # across it the sides still limit the net section
    assert any("left out" in a for a in r.assumptions)


def test_sweep_marks_the_cases_on_its_curve():
    r = run(job_of(fx="86.6025404 kN", fy="50 kN", plate_extra='shape = "square"\naxis = [1, 0]'))
    (sw,) = r.sweeps
    assert sw.force == pytest.approx(100e3, rel=1e-9)
    assert sw.case_angle_deg[0] == pytest.approx(30.0, abs=1e-6)
    # at the swept magnitude (the case's own, one case) the mark equals the row of the results table
    k = sw.checks.index("end distance (type A)")
    (i,) = rows(r, "end distance (type A)")
    assert sw.case_util[k, 0] == pytest.approx(r.columns["utilization"][i], rel=1e-9)
    j = int(np.argmin(np.abs(sw.angle_deg - 30.0)))
    assert sw.util[k, j] == pytest.approx(sw.case_util[k, 0], rel=1e-6)
    assert len(sw.to_frame()) == len(sw.checks) * len(sw.angle_deg)
    # a lug with no axis turns with its force: its sweep is flat
    (flat,) = run(job_of()).sweeps
    assert np.allclose(np.nanmax(flat.util, axis=1), np.nanmin(flat.util, axis=1))


def test_polygon_and_offset_arc_inputs():
    no_wh = ("width = 120", "end = 60")
    corners = 'outline = [[-80, -60], [60, -40], [60, 40], [-80, 60]]'
    r = run(job_of(drop=no_wh, plate_extra=f'shape = "polygon"\naxis = [1, 0]\n{corners}'))
    (i,) = rows(r, "end distance (type A)")
    assert r.columns["capacity"][i] == pytest.approx(0.060 - 0.0205, rel=1e-12)
    with pytest.raises(InputError, match="needs its axis"):
        job_of(drop=no_wh, plate_extra=f'shape = "polygon"\n{corners}')
    with pytest.raises(InputError, match="does not fit"):
        job_of(drop=no_wh, plate_extra='shape = "polygon"\naxis = [1, 0]\n'
               'outline = [[-80, -60], [15, -40], [15, 40], [-80, 60]]')
    arc = job_of(plate_extra="").pins["P"]
    assert arc.stack[1].outline is None  # no outline field: the default round end about the hole centre


def test_json_carries_the_joint_views():
    import json

    from pinchk.report import render

    r = run(load_job(EXAMPLES / "boom_head_joint.toml"))
    d = json.loads(render(r, "json"), parse_constant=lambda c: pytest.fail(f"non-finite {c} in JSON"))
    j = d["joints"]
    st = [s for s in j["stacks"] if s["pin"] == "H"]
    assert len(st) == 3 and len(st[0]["planes"]) == 6
    assert {g["case"] for g in j["governing_plate_check"]} == {"reach_out", "slew_stop", "jib_raised"}
    assert j["load_angle_sweep"] and len(j["load_angle_sweep"][0]["angle_deg"]) == 72


def test_aisc_lateral_base_bending():
    r = run(job_of(method="AISC 360-16", plate_extra='lateral = 0.05\nbase = 150'))
    (i,) = rows(r, "base weak-axis bending")
    # AISC 360-16 §F11.1: Mn = Fy Z ≤ 1.6 Fy S; for a b × t bar about its weak axis Z = b t²/4 and
    # 1.6 S = 1.6 b t²/6 > Z, so Mn = Fy b t²/4; ASD with Ω = 1.67 (§F1)
    assert r.columns["capacity"][i] == pytest.approx(FY_20 * 0.120 * 0.020**2 / 4 / 1.67, rel=1e-12)
    assert r.columns["demand"][i] == pytest.approx(0.05 * 100e3 * 0.150, rel=1e-12)


def test_cheek_group_must_sit_together():
    split = '''group = "main"
[[pin.P.plate]]
member = "load"
thickness = 5
gap = 1
[[pin.P.plate]]
member = "arm"
thickness = 10
material = "S355"
width = 100
end = 50
group = "main"
'''
    with pytest.raises(InputError, match="not next to each other"):
        job_of(plate_extra=split)


def test_sweep_plot_draws():
    pytest.importorskip("matplotlib")
    from pinchk.report.plot import sweep_figure

    r = run(load_job(EXAMPLES / "boom_head_joint.toml"))
    fig = sweep_figure(r.sweeps[0])
    assert len(fig.axes[0].lines) == len(r.sweeps[0].checks) + 2


@pytest.mark.parametrize("extra,match", [
    ('axis = [0, 0]', "not both zero"),
    ('axis = "30 kN"', "angle"),
    ('arc_centre = [-5, 0]\nradius = 70', "not end"),
    ('bushing_od = 40\nbushing_material = "S355"', "must exceed its bore"),
    ('bushing_od = 50', "needs its material"),
    ('base_width = 100', "give lateral too"),
    ('lateral = 0.05\nlateral_force = { pull = "1 kN" }\nbase = 100', "not both"),
    ('axs = [1, 0]', "did you mean 'axis'"),
])
def test_joint_field_errors_name_the_field(extra, match):
    with pytest.raises(InputError, match=match):
        job_of(plate_extra=extra)


def test_axis_as_an_angle_and_offset_arc():
    job = job_of(plate_extra='axis = "90 deg"')
    assert_allclose(job.pins["P"].stack[1].axis, (0.0, 1.0), atol=1e-15)
    r = run(job_of(plate_extra='arc_centre = [-10, 0]\nradius = 70', drop=("end = 60",)))
    (i,) = rows(r, "end distance (type A)")
    # the end arc of R = 70 about a point 10 mm behind the hole: 60 mm ahead of the hole centre, less 20.5
    assert r.columns["capacity"][i] == pytest.approx(0.060 - 0.0205, rel=1e-12)


def test_lateral_force_per_case_enters_combinations_with_their_factors():
    extra = '''lateral_force = { pull = "4 kN", side = "2 kN" }
base = 150
[case.side]
[[load]]
case = "side"
at = "P"
force = ["0 kN", "20 kN"]
[combination.c1]
cases = { pull = 1.5, side = 1.0 }
'''
    r = run(job_of(plate_extra=extra))
    (i,) = rows(r, "base weak-axis bending")
    assert r.columns["case"][i] == "c1"
    # H in c1 = 1.5 × 4 kN + 1.0 × 2 kN = 8 kN, at 150 mm from the base
    assert r.columns["demand"][i] == pytest.approx(8e3 * 0.150, rel=1e-12)


def test_lift_factors_scale_the_parts_their_lateral_load_and_their_sweep():
    lat = 'lateral = "5 %"\nbase = 150\n[lift_factors]\ndynamic = 1.2'
    r1 = run(job_of(plate_extra='lateral = "5 %"\nbase = 150'))
    r2 = run(job_of(plate_extra=lat))
    for check in ("bearing", "base weak-axis bending"):
        (i,) = rows(r1, check, "arm")
        (j,) = rows(r2, check, "arm")
        assert r2.columns["demand"][j] == pytest.approx(1.2 * r1.columns["demand"][i], rel=1e-12)
        assert "dynamic 1.2" in r2.columns["factors"][j]
    assert r2.sweeps[0].force == pytest.approx(1.2 * r1.sweeps[0].force, rel=1e-12)


def test_forces_file_fz_is_the_lateral_load_of_a_lug_with_a_base(tmp_path):
    # the padeye demo's forces file gives fz = 9 kN on the padeye in case lift_skew; with a base section
    # on its plates (a group: main plate and cheeks) the base is checked for it, and the retainer takes it
    src = (EXAMPLES / "padeye_forces.toml").read_text()
    tag = 'member = "padeye"'
    text = src.replace(tag, tag + '\ngroup = "pe"\nbase = 200')  # every padeye plate: one group with a base
    text = text.replace('file = "padeye_forces.csv"', f'file = "{EXAMPLES / "padeye_forces.csv"}"')
    text = text.replace('material = "42CrMo4+QT"', 'material = "42CrMo4+QT"\nretainer = "20 kN"', 1)
    job_path = tmp_path / "padeye.toml"
    job_path.write_text(text)
    r = run(load_job(job_path))
    ix = rows(r, "base weak-axis bending")
    got = {r.columns["case"][i]: r.columns["demand"][i] for i in ix}
    assert {r.columns["part"][i] for i in ix} == {"padeye pe (3 plates)"}
    # Mz = fz h: 9 kN at 200 mm from the base in lift_skew; fz = 0 in lift, so Mz = 0 there
    assert got["lift_skew"] == pytest.approx(9e3 * 0.200, rel=1e-9)
    assert got.get("lift", 0.0) == pytest.approx(0.0, abs=1e-9)
    (j,) = [i for i in rows(r, "pin axial force (retainer)") if r.columns["case"][i] == "lift_skew"]
    assert r.columns["demand"][j] == pytest.approx(9e3, rel=1e-9)
