"""The command line (pinchk.cli) against the contract of DESIGN.md: views, exit status, input errors,
and writing output files.

The contract (DESIGN.md, "Command line"): ``pinchk run JOB [--format table|json|csv] [--output PATH]``;
exit 0 every check passes, 1 a check fails, 2 the input is wrong (one clear message, no traceback),
other non-zero only for a bug (3). JSON: "governing" {pin, part, check, case, utilization, status},
"checks" rows {pin, part, check, case, demand, capacity, unit, utilization, status, clause}, the solved
joint forces and the units used.
"""

from __future__ import annotations

import csv
import io
import json
import math
import os
import subprocess
import sys

import pytest

from pinchk import cli

from .conftest import DEMO, EXAMPLES, ROOT

GOVERNING_KEYS = {"pin", "part", "check", "case", "utilization", "status"}
ROW_KEYS = {"pin", "part", "check", "case", "demand", "capacity", "unit", "utilization", "status", "clause"}


def run_cli(*args):
    """``python -m pinchk`` in a child process, from the repository root."""
    return subprocess.run([sys.executable, "-m", "pinchk", *map(str, args)], cwd=ROOT, capture_output=True,
                          text=True, timeout=120)


def main(capsys, *args):
    rc = cli.main([str(a) for a in args])
    out, err = capsys.readouterr()
    return rc, out, err


@pytest.fixture(scope="module")
def demo_json():
    p = run_cli("run", DEMO, "--format", "json")
    assert p.returncode == 0, p.stderr
    return json.loads(p.stdout)


def test_table_view(demo_json):
    p = run_cli("run", DEMO.relative_to(ROOT))
    assert p.returncode == 0, p.stderr
    out = p.stdout
    assert "Checks, governing case of each (highest first)" in out
    assert "Force each member receives from each pin" in out
    g = demo_json["governing"]
    # the first row of the checks table is the governing row
    table = out.split("Checks, governing case of each (highest first)\n", 1)[1].splitlines()
    first = table[2]  # header, rule, first row
    assert first.split()[:2] == [g["pin"], g["part"].split()[0]]
    assert g["check"] in first and g["case"] in first and f"{g['utilization']:.3f}" in first
    lines = [ln for ln in out.splitlines() if ln.strip()]
    assert lines[-2].startswith("PASS: all ") and f"governing {g['pin']} {g['part']}" in lines[-2]
    assert lines[-1].startswith("caution:")
    assert "qualified engineer" in lines[-1] and "licensed practice govern" in lines[-1]


def test_json_contract(demo_json):
    d = demo_json
    assert set(d["governing"]) == GOVERNING_KEYS
    assert d["checks"] and all(ROW_KEYS <= set(r) for r in d["checks"])
    top = max(d["checks"], key=lambda r: r["utilization"])
    assert d["governing"]["utilization"] == top["utilization"]
    assert {k: top[k] for k in ("pin", "part", "check", "case")} == \
        {k: d["governing"][k] for k in ("pin", "part", "check", "case")}
    assert d["governing"]["status"] == "pass"
    for r in d["checks"]:
        assert r["status"] == ("pass" if r["utilization"] <= 1 else "FAIL")
        if r["capacity"]:
            assert r["utilization"] == pytest.approx(r["demand"] / r["capacity"], rel=1e-12)
        assert r["clause"]
    assert d["units"] == {"force": "kN", "moment": "kN·m", "length": "mm", "stress": "MPa"}
    jf = d["joint_forces"]
    assert jf and {"case", "pin", "member", "fx", "fy", "resultant", "unit"} <= set(jf[0])
    assert {(r["pin"], r["member"]) for r in jf} >= {("P_apex", "leg_left"), ("P_apex", "load"), ("PL", "tie")}
    for r in jf:  # components, resultant and its angle from +x, counter-clockwise
        assert r["resultant"] == pytest.approx(math.hypot(r["fx"], r["fy"]), rel=1e-12, abs=1e-12)
        if r["resultant"] > 1e-9:
            assert r["angle_deg"] == pytest.approx(math.degrees(math.atan2(r["fy"], r["fx"])), abs=1e-9)
    assert "caution" in d and "qualified engineer" in d["caution"]


def test_json_hook_force_in_output_units(demo_json):
    """The apex pin's hook member receives 15 t × 9.80665 m/s² = 147.1 kN, printed in kN."""
    r = next(r for r in demo_json["joint_forces"]
             if r["case"] == "lift" and r["pin"] == "P_apex" and r["member"] == "load")
    assert r["unit"] == "kN"
    assert r["fy"] == pytest.approx(15 * 9.80665, rel=1e-12)


def test_csv_view(demo_json, capsys):
    rc, out, err = main(capsys, "run", DEMO, "--format", "csv")
    assert rc == 0 and not err
    rows = list(csv.DictReader(io.StringIO(out)))
    assert ROW_KEYS <= set(rows[0])
    assert len(rows) == len(demo_json["checks"])
    for r, j in zip(rows, demo_json["checks"], strict=True):
        assert float(r["utilization"]) == j["utilization"]
        assert r["pin"] == j["pin"] and r["check"] == j["check"] and r["unit"] == j["unit"]


def test_us_units_example(capsys):
    rc, out, _ = main(capsys, "run", EXAMPLES / "jib_bracket_aisc.toml", "--format", "json")
    d = json.loads(out)
    assert d["units"]["force"] == "kip" and d["units"]["length"] == "in"
    assert rc == (0 if d["governing"]["status"] == "pass" else 1)


# ----------------------------------------------------------------------------------------------------
# input errors: exit 2, one clear message

def _one_clear_line(p_or_err, path, table, field):
    err = p_or_err
    lines = [ln for ln in err.splitlines() if ln.strip()]
    assert len(lines) == 1, err
    assert "Traceback" not in err
    line = lines[0]
    assert line.startswith("input error:") and str(path) in line
    assert f"table [{table}]" in line and f"field '{field}'" in line
    return line


def test_misspelt_field(write_job):
    path = write_job(DEMO.read_text().replace("\ndiameter = 60\n", "\ndiamter = 60\n"))
    p = run_cli("run", path)
    assert p.returncode == 2 and not p.stdout
    line = _one_clear_line(p.stderr, path, "pin.P_apex", "diamter")
    assert "did you mean 'diameter'" in line


def test_wrong_unit(write_job, capsys):
    path = write_job(DEMO.read_text().replace("\nhole = 62\n", '\nhole = "62 kN"\n'))
    rc, out, err = main(capsys, "run", path)
    assert rc == 2 and not out
    line = _one_clear_line(err, path, "pin.P_apex", "hole")
    assert "force" in line and "a length is needed" in line


def test_malformed_unit_is_an_input_error(write_job, capsys):
    path = write_job(DEMO.read_text().replace("\nhole = 62\n", '\nhole = "62 mm)"\n'))
    rc, out, err = main(capsys, "run", path)
    assert rc == 2
    _one_clear_line(err, path, "pin.P_apex", "hole")


def test_not_toml(write_job, capsys):
    path = write_job("this is = = not toml\n")
    rc, _, err = main(capsys, "run", path)
    assert rc == 2 and "not a valid TOML file" in err and "Traceback" not in err


def test_missing_job_file(tmp_path, capsys):
    rc, _, err = main(capsys, "run", tmp_path / "nope.toml")
    assert rc == 2 and "cannot read the job file" in err


def test_structure_error_is_exit_2(write_job, capsys):
    """A frame statics cannot solve is wrong input (exit 2), with its reason."""
    text = DEMO.read_text().replace('kind = "roller"\nnormal = [0, 1]', 'kind = "pinned"')
    rc, _, err = main(capsys, "run", write_job(text))
    assert rc == 2 and "indeterminate" in err and "Traceback" not in err


def test_failing_check_is_exit_1(write_job, capsys):
    """The demo with 150 t on the hook: checks fail, the verdict says so, exit 1."""
    path = write_job(DEMO.read_text().replace('mass = "15 t"', 'mass = "150 t"'))
    rc, out, _ = main(capsys, "run", path)
    assert rc == 1
    assert "FAIL: " in out and "FAIL" in out.split("Checks, governing")[1]
    rc, out, _ = main(capsys, "run", path, "--format", "json")
    assert rc == 1 and json.loads(out)["governing"]["status"] == "FAIL"


def test_bug_is_exit_3(monkeypatch, capsys):
    import pinchk

    def broken(job):
        raise RuntimeError("deliberate")

    monkeypatch.setattr(pinchk, "run", broken)
    rc, _, err = main(capsys, "run", DEMO)
    assert rc == 3 and "internal error" in err


# ----------------------------------------------------------------------------------------------------
# --output

def test_output_writes_the_view(tmp_path, capsys):
    out_path = tmp_path / "result.json"
    rc, out, _ = main(capsys, "run", DEMO, "--format", "json", "--output", out_path)
    assert rc == 0
    written = json.loads(out_path.read_text(encoding="utf-8"))
    assert set(written["governing"]) == GOVERNING_KEYS
    assert f"wrote {out_path}" in out and out.splitlines()[0].startswith("PASS")
    assert "caution:" in out
    assert [p.name for p in tmp_path.iterdir()] == ["result.json"]  # no temporary file left


def test_output_refuses_to_overwrite_the_job_file(write_job, capsys, tmp_path):
    path = write_job(DEMO.read_text())
    before = path.read_bytes()
    for target in (path, tmp_path / "." / path.name, tmp_path / "sub" / ".." / path.name):
        (tmp_path / "sub").mkdir(exist_ok=True)
        rc, out, err = main(capsys, "run", path, "--format", "csv", "--output", target)
        assert rc == 2 and "refusing to overwrite" in err, err
        assert path.read_bytes() == before


def test_output_refuses_the_job_file_through_a_link(write_job, capsys, tmp_path):
    path = write_job(DEMO.read_text())
    link = tmp_path / "alias.toml"
    link.symlink_to(path)
    before = path.read_bytes()
    rc, _, err = main(capsys, "run", path, "--output", link)
    assert rc == 2 and "refusing to overwrite" in err
    assert path.read_bytes() == before


def test_output_into_missing_folder(tmp_path, capsys):
    target = tmp_path / "no" / "such" / "out.txt"
    rc, _, err = main(capsys, "run", DEMO, "--output", target)
    assert rc == 2 and "Traceback" not in err
    assert err.strip() == f"error: cannot write {target}: No such file or directory"
    assert not (tmp_path / "no").exists()


def test_output_onto_a_folder(tmp_path, capsys):
    """The message names the output path given, not the temporary file; nothing is left behind."""
    target = tmp_path / "results"
    target.mkdir()
    rc, _, err = main(capsys, "run", DEMO, "--output", target)
    assert rc == 2 and f"cannot write {target}" in err and ".pinchk-" not in err
    assert [p.name for p in tmp_path.iterdir()] == ["results"] and not list(target.iterdir())


def test_output_is_atomic(tmp_path, capsys, monkeypatch):
    """If the final rename fails, the old output stays whole and no temporary file is left."""
    target = tmp_path / "out.csv"
    target.write_text("old content\n")

    def fail(src, dst):
        raise OSError(28, "No space left on device")

    monkeypatch.setattr(os, "replace", fail)
    rc, _, err = main(capsys, "run", DEMO, "--format", "csv", "--output", target)
    assert rc == 2 and f"cannot write {target}: No space left" in err
    assert target.read_text() == "old content\n"
    assert [p.name for p in tmp_path.iterdir()] == ["out.csv"]


def test_help_and_no_command(capsys):
    assert cli.main([]) == 2
    with pytest.raises(SystemExit) as exc:
        cli.main(["run", DEMO.as_posix(), "--format", "xml"])
    assert exc.value.code == 2


def _strict_json(text):
    """Parse as RFC 8259 JSON: NaN and Infinity are not JSON and must not appear."""
    def refuse(token):
        raise ValueError(f"{token} is not JSON")

    return json.loads(text, parse_constant=refuse)


def test_json_is_strict_json_for_every_method(write_job, capsys):
    """Every registered method's JSON view of the demo parses as strict JSON; a figure with no finite
    value (a capacity of zero gives an infinite utilization) is null, and its status says FAIL."""
    from pinchk.methods import METHODS

    for name in METHODS:
        text = DEMO.read_text().replace('name = "EN 1993-1-8"', f'name = "{name}"')
        text = text.replace("gamma_M0 = 1.00\ngamma_M2 = 1.25\n", "")
        rc, out, err = main(capsys, "run", write_job(text, name=f"{name.replace(' ', '_')}.toml"), "--format", "json")
        assert rc in (0, 1), err
        d = _strict_json(out)
        for row in d["checks"]:
            if row["utilization"] is None:
                assert row["status"] == "FAIL"


def test_readme_states_the_demo_verdict(capsys):
    """The README's description of the demo's output quotes the verdict the demo really prints."""
    import re

    readme = " ".join((ROOT / "README.md").read_text(encoding="utf-8").split())
    quoted = re.search(r"\(here `(PASS: [^`]*)`\)", readme)
    assert quoted, "README no longer quotes the demo's verdict"
    rc, out, _ = main(capsys, "run", DEMO)
    assert quoted.group(1) in out.splitlines()


def test_methods_and_materials_commands(capsys):
    from pinchk.materials import library
    from pinchk.methods import METHODS

    rc, out, _ = main(capsys, "methods")
    assert rc == 0
    for name, m in METHODS.items():
        assert f"{name}: {m.EDITION}" in out
        for k, (v, _what) in m.FACTORS.items():
            assert f"  {k} = {v:g}" in out
    rc, out, _ = main(capsys, "materials")
    assert rc == 0
    rows = [r for rs in library().values() for r in rs]
    lines = out.splitlines()
    for r in rows:  # every row of the material library, with its source (bolt grades are listed too)
        assert any(ln.startswith(r.name) and ln.endswith(r.source) for ln in lines), r


def test_all_cases_and_no_forces(capsys):
    rc, out, _ = main(capsys, "run", DEMO, "--all-cases", "--no-forces")
    assert rc == 0
    assert "Checks, every case" in out and "Force each member receives" not in out
