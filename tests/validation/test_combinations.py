"""Load combinations and the lifting factor stack.

Checks against things outside the combination code: the superposition principle of linear statics (a
combination's forces equal the same sum of separately solved cases, and equal a frame solved directly
under the combined loads); the loads' own sums (support reactions balance the combined loads); and
standard gravity g0 = 9.80665 m/s² (CGPM 1901, exact) for loads given as a mass.
"""

from __future__ import annotations

import tomllib

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from pinchk import run
from pinchk.errors import InputError
from pinchk.frame import solve
from pinchk.jobfile import parse_job

G0 = 9.80665  # CGPM 1901, exact


def frame(extra: str = "", loads: str | None = None) -> str:
    """An invented two-bar bracket: a boom pinned to a wall and held by a tie, hook load at its tip."""
    default_loads = """
[[load]]
case = "dead"
at = "boom.M"
mass = "0.5 t"
[[load]]
case = "hook"
at = "P_tip"
mass = "4 t"
[[load]]
case = "side"
at = "P_tip"
force = ["3 kN", "0 kN"]
"""
    return f"""
[job]
title = "bracket"
[units]
length = "mm"
force = "kN"
[method]
name = "ASME BTH-1"
[body.boom]
points = {{ W = [0, 0], M = [1000, 0], T = [2000, 0] }}
[body.tie]
points = {{ W = [0, 1500], T = [2000, 0] }}
[pin.P_tip]
joins = ["boom.T", "tie.T"]
diameter = 40
hole = 42
material = "42CrMo4+QT"
secured = true
[[pin.P_tip.plate]]
member = "boom"
thickness = 15
material = "S355"
width = 120
end = 60
[[pin.P_tip.plate]]
member = "tie"
thickness = 20
material = "S355"
width = 120
end = 60
gap = 2
[[pin.P_tip.plate]]
member = "load"
thickness = 20
gap = 2
[[pin.P_tip.plate]]
member = "boom"
thickness = 15
material = "S355"
width = 120
end = 60
gap = 2
[support.wall_low]
at = "boom.W"
kind = "pinned"
[support.wall_high]
at = "tie.W"
kind = "pinned"
[case.dead]
[case.hook]
[case.side]
{default_loads if loads is None else loads}
{extra}
"""


def job_of(text: str):
    return parse_job(tomllib.loads(text), "combo.toml", text)


COMBOS = """
[combination.lift]
cases = { dead = 1.1, hook = 1.0 }
[combination.lift_side]
cases = { dead = 1.1, hook = 1.0, side = 1.0 }
[combination.side_back]
cases = { dead = 1.0, side = -1.0 }
limit_state = "SLS"
"""


def test_combination_is_the_linear_sum_of_the_solved_cases():
    per_case = run(job_of(frame()))
    combined = run(job_of(frame(COMBOS)))
    sol = per_case.solution
    assert combined.solution.cases == ("lift", "lift_side", "side_back")
    W = {"lift": {"dead": 1.1, "hook": 1.0}, "lift_side": {"dead": 1.1, "hook": 1.0, "side": 1.0},
         "side_back": {"dead": 1.0, "side": -1.0}}
    for k, comb in enumerate(combined.solution.cases):
        expect = sum(v * sol.pins["P_tip"].force[sol.cases.index(c)] for c, v in W[comb].items())
        np.testing.assert_allclose(combined.solution.pins["P_tip"].force[k], expect, rtol=1e-12, atol=1e-9)
        for s in sol.supports:
            ex = sum(v * sol.supports[s][sol.cases.index(c)] for c, v in W[comb].items())
            np.testing.assert_allclose(combined.solution.supports[s][k], ex, rtol=1e-12, atol=1e-9)
    assert combined.solution.residual < 1e-12
    assert set(combined.columns["case"]) == {"lift", "lift_side", "side_back"}


def test_combination_equals_a_direct_solve_of_the_combined_loads():
    # superposition: solving once with the combined loads gives the same joint forces
    direct = frame(loads="""
[[load]]
case = "dead"
at = "boom.M"
mass = "0.55 t"
[[load]]
case = "dead"
at = "P_tip"
mass = "4 t"
[[load]]
case = "dead"
at = "P_tip"
force = ["3 kN", "0 kN"]
""")
    d = solve(job_of(direct))
    c = run(job_of(frame(COMBOS))).solution
    np.testing.assert_allclose(c.pins["P_tip"].force[1], d.pins["P_tip"].force[0], rtol=1e-12, atol=1e-9)


def test_reactions_balance_the_combined_loads_and_mass_uses_standard_gravity():
    c = run(job_of(frame(COMBOS))).solution
    k = c.cases.index("lift_side")
    total = sum(r[k, :2] for r in c.supports.values())
    # loads: 1.1 × 0.5 t and 4 t down, 3 kN along +x
    np.testing.assert_allclose(total, [-3000.0, (1.1 * 500 + 4000) * G0], rtol=1e-12)


@settings(max_examples=20, deadline=None)
@given(st.lists(st.floats(-3, 3, allow_nan=False).filter(lambda v: abs(v) > 1e-3), min_size=3, max_size=3))
def test_linearity_for_any_factors(f):
    text = frame(f"[combination.any]\ncases = {{ dead = {f[0]!r}, hook = {f[1]!r}, side = {f[2]!r} }}")
    c = run(job_of(text))
    base = solve(job_of(frame()))
    expect = sum(v * base.pins["P_tip"].force[i] for i, v in enumerate(f))
    np.testing.assert_allclose(c.solution.pins["P_tip"].force[0], expect, rtol=1e-10, atol=1e-6)


def test_governing_combination_is_reported_per_check():
    from pinchk.report.common import governing_by_check

    res = run(job_of(frame(COMBOS)))
    rows = res.rows()
    for i in governing_by_check(res):
        g = rows[i]
        same = [r for r in rows if (r["pin"], r["part"], r["check"]) == (g["pin"], g["part"], g["check"])]
        assert g["utilization"] == max(r["utilization"] for r in same)
    from pinchk.report.data import to_dict

    d = to_dict(res)
    assert d["governing_by_check"]
    assert {r["case"] for r in d["governing_by_check"]} <= {"lift", "lift_side", "side_back"}
    assert d["combinations"]["lift"]["cases"] == {"dead": 1.1, "hook": 1.0}


def test_factors_column_names_the_combination():
    res = run(job_of(frame(COMBOS)))
    row = next(r for r in res.rows() if r["case"] == "lift_side" and r["check"] == "bearing")
    assert "lift_side = 1.1 dead + 1 hook + 1 side" in row["factors"]


# --- the factor stack ----------------------------------------------------------------------------------

def _demands(res):
    return {(r["pin"], r["part"], r["check"], r["case"]): r for r in res.rows()}


def test_dynamic_factor_scales_every_force_demand_exactly():
    a = _demands(run(job_of(frame(COMBOS))))
    b = _demands(run(job_of(frame(COMBOS + "\n[lift_factors]\ndynamic = 1.25\n"))))
    assert a.keys() == b.keys()
    for k in a:
        if k[2] in ("pin-to-hole clearance", "pin secured"):
            assert b[k]["demand"] == a[k]["demand"]
        else:
            assert b[k]["demand"] == pytest.approx(1.25 * a[k]["demand"], rel=1e-13), k
            assert "dynamic 1.25 on the forces" in b[k]["factors"]
        assert b[k]["capacity"] == a[k]["capacity"]


def test_factor_limited_to_a_combination_and_members():
    extra = COMBOS + """
[lift_factors]
consequence = { value = 1.3, combinations = ["lift"], members = ["tie"] }
skew = { value = 1.1, pins = ["P_tip"], combinations = ["lift_side"] }
"""
    a = _demands(run(job_of(frame(COMBOS))))
    b = _demands(run(job_of(frame(extra))))
    for k in a:
        if k[2] in ("pin-to-hole clearance", "pin secured"):
            continue
        pin, part, check, case = k
        want = 1.0
        if case == "lift" and part in ("tie", "pin"):  # the pin joins the tie, so its checks are in scope
            want *= 1.3
        if case == "lift_side":
            want *= 1.1
        assert b[k]["demand"] == pytest.approx(want * a[k]["demand"], rel=1e-13), k
        if want != 1.0:
            assert "on the forces" in b[k]["factors"]


def test_stack_factor_on_a_job_without_combinations():
    a = _demands(run(job_of(frame())))
    b = _demands(run(job_of(frame("[lift_factors]\ndynamic = { value = 1.2, combinations = [\"hook\"] }"))))
    for k in a:
        if k[2] in ("pin-to-hole clearance", "pin secured"):
            continue
        assert b[k]["demand"] == pytest.approx((1.2 if k[3] == "hook" else 1.0) * a[k]["demand"], rel=1e-13)


@pytest.mark.parametrize("extra, where, words", [
    ("[combination.c]\ncases = { deadd = 1.0 }", "combination.c", "did you mean 'dead'"),
    ("[combination.c]\ncases = { dead = \"x\" }", "combination.c", "finite number"),
    ("[combination.c]\ndescription = \"no cases\"", "combination.c", "missing or empty"),
    ("[lift_factors]\ndynamc = 1.2", "lift_factors", "did you mean 'dynamic'"),
    ("[lift_factors]\ndynamic = -1", "lift_factors", "greater than zero"),
    ("[lift_factors]\nskew = { value = 1.2, pins = [\"P_tp\"] }", "lift_factors", "pins: there is no pin 'P_tp' "
     "(did you mean 'P_tip'?)"),
    ("[lift_factors]\nskew = { value = 1.2, combinations = [\"lift\"] }", "lift_factors", "no combination 'lift'"),
    ("[lift_factors.skew]\nvalue = 1.2\nmembers = [\"tei\"]", "lift_factors.skew", "did you mean 'tie'"),
])
def test_input_errors_name_table_and_field(extra, where, words):
    text = frame(extra)
    with pytest.raises(InputError) as exc:
        job_of(text)
    msg = str(exc.value)
    assert f"[{where}]" in msg and words in msg


def test_cable_in_compression_in_a_combination_is_an_input_error():
    from pinchk.errors import StructureError

    text = frame("[combination.up]\ncases = { hook = -1.0 }").replace(
        '[body.tie]\npoints = { W = [0, 1500], T = [2000, 0] }', "").replace(
        'joins = ["boom.T", "tie.T"]', 'joins = ["boom.T"]')
    text = text.replace('[support.wall_high]\nat = "tie.W"\nkind = "pinned"',
                        '[body.wall]\npoints = { W = [0, 1500] }\n[support.wall_high]\nat = "wall.W"\nkind = "fixed"\n'
                        '[link.tie]\nends = ["wall.W", "P_tip"]\nkind = "cable"')
    with pytest.raises(StructureError, match="cable tie would be in compression .* combination 'up'"):
        run(job_of(text))


def test_detailing_rows_carry_no_load_factors():
    res = run(job_of(frame(COMBOS + "\n[lift_factors]\ndynamic = 1.25\n")))
    for r in res.rows():
        if r["check"] in ("pin-to-hole clearance", "pin secured"):
            assert "dynamic" not in r["factors"] and "lift" not in r["factors"]
        else:
            assert "dynamic 1.25" in r["factors"]


def test_combinations_and_lift_factors_on_forces_read_from_a_file(tmp_path):
    # forces from another analysis (the padeye demo's forces file) combine and factor the same way
    import shutil
    from pathlib import Path

    ex = Path(__file__).resolve().parents[2] / "examples"
    shutil.copy(ex / "padeye_forces.csv", tmp_path / "padeye_forces.csv")
    text = (ex / "padeye_forces.toml").read_text(encoding="utf-8")
    text += ('\n[combination.both]\ncases = { lift = 0.5, lift_skew = 0.5 }\n[lift_factors]\ndynamic = 1.1\n'
             'consequence = { value = 1.3, members = ["padeye"] }\n')  # a plate group of a frameless job
    job_path = tmp_path / "padeye.toml"
    job_path.write_text(text, encoding="utf-8")
    base = run(str(ex / "padeye_forces.toml"))
    res = run(str(job_path))
    b = base.solution
    expect = 0.5 * b.pins["PE1"].force[b.cases.index("lift")] + 0.5 * b.pins["PE1"].force[b.cases.index("lift_skew")]
    np.testing.assert_allclose(res.solution.pins["PE1"].force[0], expect, rtol=1e-12)
    assert res.solution.cases == ("both",)
    assert all("dynamic 1.1" in r["factors"] for r in res.rows() if r["check"] in ("bearing", "pin shear"))
    assert any("consequence 1.3" in r["factors"] for r in res.rows() if r["part"].startswith("padeye"))


def test_forces_out_writes_cases_and_reads_back_into_the_combined_job(tmp_path):
    from pinchk.cli import main

    job = tmp_path / "bracket.toml"
    job.write_text(frame(COMBOS + "\n[lift_factors]\ndynamic = 1.2\n"), encoding="utf-8")
    out = tmp_path / "forces.csv"
    view = str(tmp_path / "r.csv")
    assert main(["run", str(job), "--format", "csv", "--output", view, "--forces-out", str(out)]) == 0
    lines = out.read_text(encoding="utf-8")
    assert "\ndead,P_tip,boom," in lines and "\nlift," not in lines  # per case, not per combination
    again = tmp_path / "again.toml"
    again.write_text(job.read_text(encoding="utf-8") + f'\n[forces]\nfile = "{out.name}"\n', encoding="utf-8")
    a, b = run(str(job)), run(str(again))
    np.testing.assert_allclose(b.columns["utilization"], a.columns["utilization"], rtol=1e-9)
    assert b.columns["case"] == a.columns["case"]


def test_json_keeps_the_per_case_forces_beside_the_combined_ones():
    from pinchk.report.data import to_dict

    d = to_dict(run(job_of(frame(COMBOS))))
    assert {r["case"] for r in d["case_joint_forces"]} == {"dead", "hook", "side"}
    assert {r["case"] for r in d["joint_forces"]} == {"lift", "lift_side", "side_back"}
    assert to_dict(run(job_of(frame())))["case_joint_forces"] == []
