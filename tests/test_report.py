"""pinchk.report: every view is the same results table, converted to the units the job asks for.

Conversion factors are exact by definition (1 in = 25.4 mm, 1 lbf = 4.4482216152605 N; NIST SP 811
Appendix B)."""

from __future__ import annotations

import json

import pytest

from pinchk import run
from pinchk.jobfile import load_job
from pinchk.report import render

from .conftest import DEMO

IN, KIP = 0.0254, 4448.2216152605
PER_UNIT = {"kN": 1e3, "kN·m": 1e3, "mm": 1e-3, "MPa": 1e6, "kip": KIP, "kip·in": KIP * IN, "in": IN,
            "ksi": KIP / IN**2, "-": 1.0}


@pytest.fixture(scope="module")
def si():
    return run(load_job(DEMO))


@pytest.mark.parametrize("system", ["SI", "US"])
def test_json_figures_are_si_values_in_output_units(si, write_job, system):
    res = si if system == "SI" else run(load_job(write_job(DEMO.read_text().replace(
        'output_units = "SI"', 'output_units = "US"'))))
    d = json.loads(render(res, "json"))
    assert len(d["checks"]) == len(si)
    for row, i in zip(d["checks"], range(len(si)), strict=True):
        k = PER_UNIT[row["unit"]]
        assert row["demand"] * k == pytest.approx(si.columns["demand"][i], rel=1e-12)
        assert row["capacity"] * k == pytest.approx(si.columns["capacity"][i], rel=1e-12)
        assert row["utilization"] == pytest.approx(si.columns["utilization"][i], rel=1e-12)
    units = set(d["units"].values())
    assert units == ({"kN", "kN·m", "mm", "MPa"} if system == "SI" else {"kip", "kip·in", "in", "ksi"})


def _columns(lines):
    """Split a tabulate "simple" table into rows of cells, by the dash rule under its header."""
    import re

    spans = [m.span() for m in re.finditer(r"-+", lines[1])]
    head = [lines[0][a:b].strip() for a, b in spans]
    return [dict(zip(head, (ln[a:b].strip() for a, b in spans), strict=True)) for ln in lines[2:] if ln.strip()]


def test_table_sorted_by_utilization_governing_first(si):
    text = render(si, "table", all_cases=True, forces=False)
    lines = text.split("Checks, every case\n", 1)[1].split("\n\n", 1)[0].splitlines()
    rows = _columns(lines)
    assert len(rows) == len(si)
    utils = [float(r["util"]) for r in rows]
    assert utils == sorted(utils, reverse=True)
    g = si.row(si.governing)
    assert (rows[0]["pin"], rows[0]["part"], rows[0]["check"], rows[0]["case"]) == \
        (g["pin"], g["part"], g["check"], g["case"])


def test_every_view_ends_with_the_caution(si):
    assert render(si, "table").rstrip().splitlines()[-1].startswith("caution:")
    assert "qualified engineer" in json.loads(render(si, "json"))["caution"]
