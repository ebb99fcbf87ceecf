"""Forces files: checks run from joint forces given in a file, the round trip, the mapping errors.

Sources of the check values:
  - EN 1993-1-8:2005 Table 3.10 (pin shear Fv,Rd = 0.6 A fup / γM2, bearing Fb,Rd = 1.5 t d fy / γM0,
    pin bending MRd = 1.5 Wel fyp / γM0) and Fig. 3.11 (clevis pin moment M = F (b + 4c + 2a) / 8).
  - EN 10025-2:2004 Table 7: S355, 16 < t <= 40 mm, ReH = 345 MPa (as in pinchk/data/materials.csv).
  - EN 10083-3:2006 Table: 42CrMo4 +QT, 16 < d <= 40 mm, Re = 750 MPa, Rm = 1000 MPa (min).
  - NIST SP 811 (2008) App. B: 1 lbf = 4.448 221 615 260 5 N exactly, so 1 kip = 4448.2216152605 N.
The round trip is an identity: the frame solve written out and read back must give the same
utilizations to round-off (rtol 1e-12: the forces pass once through a decimal text in kN or kip).
"""

from __future__ import annotations

import json
import math
import os
import re
import shutil
from pathlib import Path

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from pinchk import cli, load_job, run
from pinchk.errors import InputError
from pinchk.forcesfile import parse_csv, parse_json, render_forces, to_solution
from pinchk.frame import FrameSolution, PinForces

ROOT = Path(__file__).resolve().parents[1]
EXAMPLES = ROOT / "examples"
GANTRY = EXAMPLES / "a_frame_gantry.toml"
KIP = 4448.2216152605  # N, NIST SP 811 (exact by definition of the pound-force)

# A small forces-only job (invented): one clevis pin, a lug "lug" between the two plates of "clevis".
CLEVIS_JOB = """\
[job]
title = "clevis from forces (test, invented)"
[units]
length = "mm"
[method]
name = "EN 1993-1-8"
[forces]
file = "{file}"
[case.up]
[case.side]
[pin.P1]
diameter = 30
hole = 32
material = "42CrMo4+QT"
[[pin.P1.plate]]
member = "clevis"
thickness = 12
material = "S355"
width = 90
end = 50
[[pin.P1.plate]]
member = "lug"
thickness = 20
material = "S355"
width = 100
end = 55
gap = 1
[[pin.P1.plate]]
member = "clevis"
thickness = 12
material = "S355"
width = 90
end = 50
gap = 1
[pin.P2]
diameter = 30
hole = 32
material = "42CrMo4+QT"
[[pin.P2.plate]]
member = "lug"
thickness = 20
material = "S355"
width = 100
end = 55
[[pin.P2.plate]]
member = "ground"
thickness = 20
material = "S355"
width = 100
end = 55
"""

CLEVIS_CSV = """\
# invented forces for a test
case,pin,member,fx [kN],fy [kN]
up,P1,lug,0,100
up,P1,clevis,0,-100
up,P2,lug,0,-100
up,P2,ground,0,100
side,P1,lug,30,100
side,P1,clevis,-30,-100
side,P2,lug,-30,-100
side,P2,ground,30,100
"""


def write(tmp_path: Path, csv_text: str = CLEVIS_CSV, name: str = "f.csv", job: str = CLEVIS_JOB) -> Path:
    (tmp_path / name).write_text(csv_text, encoding="utf-8")
    p = tmp_path / "job.toml"
    p.write_text(job.format(file=name), encoding="utf-8")
    return p


def problems_of(job_path: Path) -> list:
    with pytest.raises(InputError) as e:
        load_job(job_path)
    return e.value.problems


def utils(results) -> np.ndarray:
    return np.asarray(results.columns["utilization"])


def frameless(toml: str) -> str:
    """The gantry job without its frame: no bodies, links, supports, loads, nor pins' joins."""
    out, skip = [], False
    for ln in toml.splitlines():
        s = ln.strip()
        if s.startswith("["):
            skip = bool(re.match(r"\[\[?(body|link|support|load)[\].]", s))
        if not skip and not s.startswith("joins"):
            out.append(ln)
    return "\n".join(out) + "\n"


# ------------------------------------------------------------------------------ run from a forces file


def test_padeye_example_runs_from_forces_alone():
    job = load_job(EXAMPLES / "padeye_forces.toml")
    assert not job.bodies and not job.links and not job.supports and not job.loads
    res = run(job)
    assert res.solution.solver == "forces file padeye_forces.csv"
    assert res.solution.links == {} and res.solution.supports == {}
    rows = {(r["part"], r["check"], r["case"]): r for r in res.rows()}

    # Fig. 3.11: the three padeye plates (12 + 30 + 12 = 54 mm, share by thickness) bear like one inner
    # plate b = 54 mm; the shackle jaws a = 20 mm each take F/2; gap c = 1.5 mm; F = |(90, 155.88)| kN
    F = math.hypot(90.0e3, 155.88e3)
    M = F * (54 + 4 * 1.5 + 2 * 20) * 1e-3 / 8
    assert rows[("pin", "pin bending", "lift")]["demand"] == pytest.approx(M, rel=1e-12)
    # Table 3.10: MRd = 1.5 Wel fyp / γM0, fyp = 750 MPa (EN 10083-3, 16 < d <= 40)
    assert rows[("pin", "pin bending", "lift")]["capacity"] == pytest.approx(
        1.5 * math.pi * 0.036**3 / 32 * 750e6, rel=1e-12)
    # Table 3.10: Fv,Rd = 0.6 A fup / γM2, fup = 1000 MPa, γM2 = 1.25; each shear plane takes F/2
    assert rows[("pin", "pin shear", "lift")]["capacity"] == pytest.approx(
        0.6 * math.pi * 0.036**2 / 4 * 1000e6 / 1.25, rel=1e-12)
    assert rows[("pin", "pin shear", "lift")]["demand"] == pytest.approx(F / 2, rel=1e-12)
    # Table 3.10: Fb,Rd = 1.5 t d fy / γM0 for the 30 mm main plate, fy = 345 MPa (EN 10025-2), share 30/54
    main = rows[("padeye 2/3", "bearing", "lift")]
    assert main["capacity"] == pytest.approx(1.5 * 0.030 * 0.036 * 345e6, rel=1e-12)
    assert main["demand"] == pytest.approx(F * 30 / 54, rel=1e-12)
    # the axial component is reported (and said not to be checked)
    assert res.solution.pins["PE1"].axial[1].tolist() == pytest.approx([-9.0e3, 9.0e3])
    assert any("along the pin" in w and "not checked" in w for w in res.solution.warnings)
    assert not any("do not balance" in w for w in res.solution.warnings)


def test_padeye_cli_json_reports_fz_and_warnings(tmp_path, capsys):
    out = tmp_path / "r.json"
    rc = cli.main(["run", str(EXAMPLES / "padeye_forces.toml"), "--format", "json", "--output", str(out)])
    assert rc == 0
    d = json.loads(out.read_text(encoding="utf-8"))
    assert d["solver"] == "forces file padeye_forces.csv"
    fz = {(r["case"], r["member"]): r["fz"] for r in d["joint_forces"]}
    assert fz[("lift_skew", "padeye")] == pytest.approx(9.0)
    assert any("not checked" in w for w in d["warnings"])
    assert "warning:" in capsys.readouterr().err


def test_frame_and_forces_file_in_one_job_uses_the_file(tmp_path):
    """A job with a frame and [forces]: the frame names the members, the file gives the forces."""
    shutil.copy(GANTRY, tmp_path / "g.toml")
    assert cli.main(["run", str(tmp_path / "g.toml"), "--forces-out", str(tmp_path / "f.csv")]) == 0
    text = (tmp_path / "f.csv").read_text(encoding="utf-8").replace(
        "lift,PL,tie,-73.549875,0.0", "lift,PL,tie,-80.0,0.0")
    (tmp_path / "f.csv").write_text(text, encoding="utf-8")
    (tmp_path / "g.toml").write_text(GANTRY.read_text(encoding="utf-8") + '\n[forces]\nfile = "f.csv"\n',
                                     encoding="utf-8")
    res = run(tmp_path / "g.toml")
    pf = res.solution.pins["PL"]
    assert pf.force[0, pf.members.index("tie"), 0] == pytest.approx(-80e3)
    assert any("pin PL, case 'lift'" in w and "do not balance" in w for w in res.solution.warnings)


def test_frame_present_checks_each_body_balances(tmp_path):
    """Forces that balance at the pin but not on the bodies (leg_left and the tie at PL, case 'lift')."""
    shutil.copy(GANTRY, tmp_path / "g.toml")
    assert cli.main(["run", str(tmp_path / "g.toml"), "--forces-out", str(tmp_path / "f.csv")]) == 0
    text = (tmp_path / "f.csv").read_text(encoding="utf-8")
    text = text.replace("lift,PL,leg_left,73.549875,0.0", "lift,PL,leg_left,80.0,0.0").replace(
        "lift,PL,tie,-73.549875,0.0", "lift,PL,tie,-80.0,0.0")
    (tmp_path / "f.csv").write_text(text, encoding="utf-8")
    (tmp_path / "g.toml").write_text(GANTRY.read_text(encoding="utf-8") + '\n[forces]\nfile = "f.csv"\n',
                                     encoding="utf-8")
    w = run(tmp_path / "g.toml").solution.warnings
    assert not any(x.startswith("pin ") for x in w)  # PL itself still balances
    # leg_left gets 80 - 73.549875 = 6.450125 kN more along +x at PL (1, 2) m. Its moment is taken about
    # the mean of its force points: the apex (2, 4) twice (pin and the side pull), PL (1, 2), the foot
    # (0, 0) -> (1.25, 2.5) m; M = -(2 - 2.5) m × 6.450125 kN = 3.225 kN·m. The tie: -6.450125 kN along x
    # at PL, on its own line through (2, 2) m, so no moment.
    body = [x for x in w if x.startswith("body leg_left, case 'lift':")]
    link = [x for x in w if x.startswith("link tie, case 'lift':")]
    assert len(body) == 1 and "(Fx, Fy) = (6.45, 0) kN and M = 3.225 kN·m about (1.25, 2.5) m" in body[0]
    assert len(link) == 1 and "(Fx, Fy) = (-6.45, 0) kN and M = 0 kN·m about (2, 2) m" in link[0]
    assert not any("case 'lift_side'" in x for x in w)


# ------------------------------------------------------------------------------ round trip


@pytest.mark.parametrize("ext", ["csv", "json"])
@pytest.mark.parametrize("units", ["SI", "US"])
@pytest.mark.parametrize("keep_frame", [True, False])
def test_round_trip_gives_identical_utilizations(tmp_path, ext, units, keep_frame):
    toml = GANTRY.read_text(encoding="utf-8").replace('output_units = "SI"', f'output_units = "{units}"')
    src = tmp_path / "gantry.toml"
    src.write_text(toml, encoding="utf-8")
    out = tmp_path / f"forces.{ext}"
    assert cli.main(["run", str(src), "--forces-out", str(out), "--format", "csv",
                     "--output", str(tmp_path / "r.csv")]) == 0
    solved = run(src)

    back = tmp_path / "back.toml"
    body = toml if keep_frame else frameless(toml)
    back.write_text(body + f'\n[forces]\nfile = "forces.{ext}"\n', encoding="utf-8")
    read = run(back)
    assert bool(load_job(back).bodies) is keep_frame
    assert read.solution.solver == f"forces file forces.{ext}"
    assert read.columns["check"] == solved.columns["check"]
    assert read.columns["pin"] == solved.columns["pin"] and read.columns["case"] == solved.columns["case"]
    # one pass through a decimal text (repr of the kN or kip value): round-off only
    np.testing.assert_allclose(utils(read), utils(solved), rtol=1e-12, atol=1e-15)
    for p, pf in solved.solution.pins.items():
        got = read.solution.pins[p]
        assert sorted(got.members) == sorted(pf.members)  # without a frame, in the order of the pin's plates
        order = [got.members.index(m) for m in pf.members]
        scale = np.abs(pf.force).max()
        np.testing.assert_allclose(got.force[:, order], pf.force, rtol=0, atol=1e-12 * scale)
    assert not [w for w in read.solution.warnings if "do not balance" in w]
    noted = [w for w in read.solution.warnings if w.startswith("the frame is not solved")]
    assert len(noted) == (1 if keep_frame else 0)
    assert read.solution.warnings == tuple(noted)  # every body balances: nothing else to say
    assert read.solution.residual < 1e-12
    assert not [f for f in os.listdir(tmp_path) if f.startswith(".pinchk-")]  # no temporary file left


def test_write_read_reproduces_axial(tmp_path):
    job = write(tmp_path, CLEVIS_CSV.replace("fy [kN]", "fy [kN],fz [kN]").replace(
        "side,P1,lug,30,100", "side,P1,lug,30,100,4").replace("side,P1,clevis,-30,-100", "side,P1,clevis,-30,-100,-4")
        .replace(",100\n", ",100,\n").replace(",-100\n", ",-100,\n"))
    sol = run(job).solution
    assert sol.pins["P1"].axial is not None and sol.pins["P2"].axial is None
    for fmt, parse in (("csv", parse_csv), ("json", parse_json)):
        table, probs = parse(render_forces(sol, fmt, "kip", "t"), f"x.{fmt}")
        assert probs == []
        fz = {(r.case, r.pin, r.member): r.fz for r in table.rows}
        assert fz[("side", "P1", "lug")] == pytest.approx(4e3, rel=1e-14)
        assert fz[("up", "P2", "lug")] is None  # left empty where the pin has no axial component


def test_forces_out_refuses_to_overwrite_the_inputs(tmp_path, capsys):
    job = write(tmp_path)
    before = job.read_bytes()
    for target in (job, tmp_path / "f.csv"):
        target_bytes = target.read_bytes()
        assert cli.main(["run", str(job), "--forces-out", str(target)]) == cli.EXIT_INPUT
        assert target.read_bytes() == target_bytes
    assert job.read_bytes() == before
    assert "refusing to overwrite" in capsys.readouterr().err
    assert cli.main(["run", str(job), "--forces-out", str(tmp_path / "x.txt")]) == cli.EXIT_INPUT
    assert "end the name with .csv or .json" in capsys.readouterr().err
    assert not (tmp_path / "x.txt").exists()
    same = str(tmp_path / "o.json")
    assert cli.main(["run", str(job), "--forces-out", same, "--output", same, "--format", "json"]) == cli.EXIT_INPUT
    assert not os.path.exists(same)


# ------------------------------------------------------------------------------ mapping errors


def _one(probs, field):
    hits = [p for p in probs if p.field == field]
    assert len(hits) == 1, probs
    return hits[0]


def test_row_naming_an_unknown_pin(tmp_path):
    p = _one(problems_of(write(tmp_path, CLEVIS_CSV.replace("up,P2,lug", "up,P9,lug"))), "pin")
    assert p.file.endswith("f.csv") and p.line == 5
    assert "the job has no pin 'P9'" in p.message and "P1, P2" in p.message


def test_row_naming_an_unknown_member(tmp_path):
    probs = problems_of(write(tmp_path, CLEVIS_CSV.replace("side,P1,clevis", "side,P1,clevs")))
    p = [q for q in probs if "does not meet pin" in q.message]
    assert len(p) == 1 and p[0].line == 8 and p[0].field == "member"
    assert "'clevs' does not meet pin P1" in p[0].message and "did you mean 'clevis'" in p[0].message
    # the clevis then has no row in case 'side': the other half of the same mistake, also reported
    assert any("no force given for member(s) clevis" in q.message for q in probs)


def test_row_naming_a_case_the_job_lacks(tmp_path):
    extra = CLEVIS_CSV + "dwn,P1,lug,0,-10\ndwn,P1,clevis,0,10\n"
    p = _one(problems_of(write(tmp_path, extra)), "case")
    assert p.line == 11 and "no load case 'dwn'" in p.message and "rows at lines 11, 12" in p.message


def test_a_job_case_missing_from_the_file(tmp_path):
    only_up = "".join(ln + "\n" for ln in CLEVIS_CSV.splitlines() if not ln.startswith("side"))
    probs = problems_of(write(tmp_path, only_up))
    assert len(probs) == 1
    p = probs[0]
    assert p.file.endswith("job.toml") and p.table == "case.side" and p.line == 10  # [case.side] in CLEVIS_JOB
    assert "load case 'side' has no rows in the forces file f.csv" in p.message


def test_duplicate_row(tmp_path):
    dup = CLEVIS_CSV + "up,P1,lug,0,100\n"
    probs = problems_of(write(tmp_path, dup))
    assert len(probs) == 1
    assert probs[0].line == 11 and probs[0].field == "member"
    assert "duplicate row: case 'up', pin 'P1', member 'lug' is already given at line 3" in probs[0].message


def test_member_at_a_pin_with_no_force(tmp_path):
    probs = problems_of(write(tmp_path, CLEVIS_CSV.replace("side,P2,ground,30,100\n", "")))
    assert len(probs) == 1
    p = probs[0]
    assert p.line == 9 and p.field == "member"
    assert "pin P2, case 'side': no force given for member(s) ground" in p.message


def test_checked_pin_without_any_rows(tmp_path):
    no_p2 = "".join(ln + "\n" for ln in CLEVIS_CSV.splitlines() if ",P2," not in ln)
    probs = problems_of(write(tmp_path, no_p2))
    assert len(probs) == 1
    assert probs[0].table == "pin.P2" and probs[0].line == 35  # [pin.P2] in CLEVIS_JOB
    assert "pin P2 has plates to check but no rows" in probs[0].message


def test_all_mapping_errors_are_listed_at_once(tmp_path):
    bad = """\
case,pin,member,fx [kN],fy [kN]
up,P1,lug,0,100
up,P1,lug,0,100
up,P9,lug,0,-100
up,P1,clevs,0,-100
dwn,P2,lug,0,-100
up,P2,lug,0,-100
up,P2,ground,0,abc
"""
    probs = problems_of(write(tmp_path, bad))
    got = sorted((p.line, p.field) for p in probs)
    # dup (3), unknown pin (4), unknown member (5), unknown case (6), bad number (8), clevis with no row in
    # case 'up' (reported at the pin's first row, 2), and the job's case 'side' without rows
    assert got == [(2, "member"), (3, "member"), (4, "pin"), (5, "member"), (6, "case"), (8, "fy"), (10, "")]
    text = InputError(probs).text()
    assert text.startswith("input error: 7 problems")
    assert "f.csv, line 8, field 'fy'" in text


def test_json_errors_carry_line_numbers(tmp_path):
    doc = """{
  "units": {"force": "kN"},
  "rows": [
    {"case": "up", "pin": "P1", "member": "lug", "fx": 0, "fy": 100},
    {"case": "up", "pin": "P1", "member": "clevis", "fx": 0, "fy": -100},
    {"case": "up", "pin": "P2", "member": "lug", "fx": 0, "fy": -100},
    {"case": "up",
     "pin": "P2", "member": "ground", "fx": 0, "fy": 100},
    {"case": "up", "pin": "P2", "member": "ground", "fx": 0, "fy": 100},
    {"case": "side", "pin": "P1", "member": "lug", "fx": 30, "fy": 100},
    {"case": "side", "pin": "P1", "member": "clevis", "fx": -30, "fy": -100},
    {"case": "side", "pin": "P2", "member": "lug", "fx": -30, "fy": -100},
    {"case": "side", "pin": "P2", "member": "ground", "fx": 30, "fy": "100 kilo"}
  ]
}
"""
    probs = problems_of(write(tmp_path, doc, "f.json"))
    assert sorted((p.line, p.field) for p in probs) == [(9, "member"), (13, "fy")]
    dup = next(p for p in probs if p.line == 9)
    assert "already given at line 7" in dup.message
    table, _ = parse_json(doc.replace('"100 kilo"', "100"), "x.json")
    assert [r.line for r in table.rows] == [4, 5, 6, 7, 9, 10, 11, 12, 13]


# ------------------------------------------------------------------------------ balance


def test_unbalanced_pin_is_flagged_with_its_imbalance(tmp_path):
    # the lug's fx sign flipped in case 'side' at P1: the sum is 2 × 30 kN = 60 kN along x
    res = run(write(tmp_path, CLEVIS_CSV.replace("side,P1,lug,30,100", "side,P1,lug,-30,100")))
    w = [x for x in res.solution.warnings if "do not balance" in x]
    assert len(w) == 1
    assert "pin P1, case 'side'" in w[0] and "lines 7, 8" in w[0]
    assert "(fx, fy) = (-60, 0) kN" in w[0] and "|sum| 60 kN" in w[0]
    assert f"{100 * 60 / math.hypot(30, 100):.3g}%" in w[0]
    assert res.solution.residual == pytest.approx(60 / math.hypot(30, 100), rel=1e-12)
    # in the views: a line of the table, and the JSON's warnings
    from pinchk.report import render

    assert "WARNING: pin P1, case 'side'" in render(res, "table")
    assert json.loads(render(res, "json"))["warnings"] == list(res.solution.warnings)


def test_rounded_forces_within_the_limit_are_not_flagged(tmp_path):
    # a 0.5% rounding difference passes the default 1% limit, and is flagged with balance_tol = 0.001
    csv_text = CLEVIS_CSV.replace("up,P1,clevis,0,-100", "up,P1,clevis,0,-99.5")
    assert run(write(tmp_path, csv_text)).solution.warnings == ()
    tight = CLEVIS_JOB.replace('file = "{file}"', 'file = "{file}"\nbalance_tol = 0.001')
    w = run(write(tmp_path, csv_text, job=tight)).solution.warnings
    assert len(w) == 1 and "pin P1, case 'up'" in w[0] and "limit 0.1%" in w[0]


def test_axial_components_enter_the_balance(tmp_path):
    text = CLEVIS_CSV.replace("fy [kN]", "fy [kN],fz [kN]").replace("up,P1,lug,0,100", "up,P1,lug,0,100,10")
    w = run(write(tmp_path, text)).solution.warnings
    assert any("pin P1, case 'up'" in x and "(fx, fy, fz) = (0, 0, 10) kN" in x for x in w)


# ------------------------------------------------------------------------------ units


def _forces_of(text: str) -> dict:
    table, probs = parse_csv(text, "u.csv")
    assert probs == []
    return {(r.case, r.pin, r.member): (r.fx, r.fy) for r in table.rows}


def test_units_in_the_header_a_units_row_or_the_cells_agree():
    header = "case,pin,member,fx [kip],fy [kip]\nc,P,a,1.5,-2\n"
    units_row = "case,pin,member,fx,fy\n,,,kip,kip\nc,P,a,1.5,-2\n"
    cells = "case,pin,member,fx,fy\nc,P,a,1.5 kip,-2 kip\n"
    semicolons = "case;pin;member;fx [kip];fy [kip]\nc;P;a;1500 lbf;-2\n"
    want = (1.5 * KIP, -2 * KIP)  # NIST SP 811: 1 kip = 4448.2216152605 N
    for text in (header, units_row, cells, semicolons):
        got = _forces_of(text)[("c", "P", "a")]
        assert got == pytest.approx(want, rel=1e-14)


def test_units_problems():
    none = "case,pin,member,fx,fy\nc,P,a,1.5,2\n"
    _, probs = parse_csv(none, "u.csv")
    assert [(p.line, p.field) for p in probs] == [(2, "fx"), (2, "fy")]
    assert "has no unit and its column has none" in probs[0].message
    both = "case,pin,member,fx [kN],fy [kN]\n,,,kip,kN\nc,P,a,1.5,2\n"
    _, probs = parse_csv(both, "u.csv")
    assert [(p.line, p.field) for p in probs] == [(2, "fx")]
    assert "the heading gives the unit kN and the units row kip" in probs[0].message
    wrong = "case,pin,member,fx [MPa],fy [kN]\nc,P,a,1.5,2\n"
    _, probs = parse_csv(wrong, "u.csv")
    assert probs[0].line == 1 and probs[0].field == "fx" and "a force is needed" in probs[0].message


def test_csv_format_problems():
    _, probs = parse_csv("case,pin,membr,fx [kN],fy [kN]\nc,P,a,1,2\n", "u.csv")
    assert probs[0].line == 1 and "unknown column 'membr' (did you mean 'member'?)" in probs[0].message
    _, probs = parse_csv("case,pin,member,fx [kN],fy [kN]\nc,P,a,1,2,3\n,P,a,1,\n", "u.csv")
    assert [(p.line, p.field) for p in probs] == [(2, "column 6"), (3, "case"), (3, "fy")]


def test_to_solution_without_a_job_file():
    """The mapping on its own: members left open keep the order the file gives them."""
    table, _ = parse_csv("case,pin,member,fx [N],fy [N]\nc,P,b,1,0\nc,P,a,-1,0\n", "u.csv")
    sol, probs = to_solution(table, ("c",), {"P": None}, set())
    assert probs == [] and sol.pins["P"].members == ("b", "a")
    assert sol.pins["P"].force[0].tolist() == [[1.0, 0.0], [-1.0, 0.0]]


# ------------------------------------------------------------------------------ the job file's [forces]


def test_job_without_frame_refuses_frame_items(tmp_path):
    job = CLEVIS_JOB.replace("[pin.P1]\n", '[pin.P1]\njoins = ["a.A", "b.A"]\n') + (
        '[support.s]\nat = "P2"\nkind = "pinned"\n')
    probs = problems_of(write(tmp_path, job=job))
    assert any(p.table == "pin.P1" and p.field == "joins" and "remove 'joins'" in p.message for p in probs)
    assert any(p.table == "forces" and "no bodies to attach them to" in p.message for p in probs)


def test_missing_forces_file_names_it(tmp_path):
    p = tmp_path / "job.toml"
    p.write_text(CLEVIS_JOB.format(file="nowhere.csv"), encoding="utf-8")
    probs = problems_of(p)
    assert len(probs) == 1
    assert probs[0].file.endswith("nowhere.csv") and "cannot read the forces file" in probs[0].message
    assert "named in [forces] file of" in probs[0].message


def test_bad_balance_tol_and_unknown_forces_field(tmp_path):
    job = CLEVIS_JOB.replace('file = "{file}"', 'file = "{file}"\nbalance_tol = 2\nbalanse = 1')
    probs = problems_of(write(tmp_path, job=job))
    assert {(p.table, p.field) for p in probs} == {("forces", "balance_tol"), ("forces", "balanse")}


def test_job_without_forces_still_needs_its_frame(tmp_path):
    p = tmp_path / "job.toml"
    p.write_text(CLEVIS_JOB.replace('[forces]\nfile = "{file}"\n', ""), encoding="utf-8")
    probs = problems_of(p)
    assert any(q.table == "body" and "no bodies" in q.message for q in probs)


# ------------------------------------------------------------------------------ write and read, any figures

_force = st.floats(min_value=-1e8, max_value=1e8, allow_nan=False, allow_infinity=False)


@settings(max_examples=40, deadline=None)
@given(st.lists(st.tuples(_force, _force, _force), min_size=2, max_size=5),
       st.sampled_from(["N", "kN", "kip", "lbf", "MN"]), st.sampled_from(["csv", "json"]))
def test_render_then_parse_keeps_every_figure(forces, unit, fmt):
    """Any forces, in any force unit, written and read back: equal to round-off (one decimal text pass)."""
    f = np.array([[fx, fy] for fx, fy, _ in forces])[None]
    fz = np.array([[z for _, _, z in forces]])
    members = tuple(f"m{i}" for i in range(len(forces)))
    sol = FrameSolution(("c",), {"P": PinForces("P", members, f, fz)}, {}, {}, 0.0)
    table, probs = (parse_csv if fmt == "csv" else parse_json)(render_forces(sol, fmt, unit, "t"), f"x.{fmt}")
    assert probs == []
    back, probs = to_solution(table, ("c",), {"P": members}, {"P"})
    assert probs == []
    scale = max(np.abs(f).max(), np.abs(fz).max())
    tiny = 1e-12 * np.abs(f).max()  # solver round-off below this is written as 0
    np.testing.assert_allclose(back.pins["P"].force, f, rtol=1e-14, atol=max(tiny, 1e-300))
    np.testing.assert_allclose(back.pins["P"].axial, fz, rtol=1e-14, atol=max(1e-12 * scale, 1e-300))


def test_json_units_by_column_and_in_values():
    doc = {"units": {"force": "kN", "fy": "kip"},
           "rows": [{"case": "c", "pin": "P", "member": "a", "fx": 1.5, "fy": -2, "fz": "3 lbf"}]}
    table, probs = parse_json(json.dumps(doc), "u.json")
    assert probs == []
    r = table.rows[0]
    # kN by definition; kip and lbf per NIST SP 811 (1 lbf = 4.4482216152605 N)
    assert (r.fx, r.fy, r.fz) == pytest.approx((1500.0, -2 * KIP, 3 * KIP / 1000), rel=1e-14)
    _, probs = parse_json(json.dumps({"format": "other/2", "rows": [], "extra": 1}), "u.json")
    assert {p.field for p in probs} == {"format", "extra", "rows"}
    _, probs = parse_json("{\n  \"rows\": [\n    {\"case\": 1}\n", "u.json")
    assert probs[0].line == 4 and "not valid JSON" in probs[0].message
