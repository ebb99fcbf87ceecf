"""The in-house allowable-stress method: allowable = min(k_y fy / n_y, k_u fu / n_u) per check.

It has no published source; the checks here are the method's own definition (documented in
pinchk.methods.allowable, defaults marked common practice), the textbook nominal stresses of a pin
joint (shear V/A, bending M/(π d³/32), bearing F/(d t)), strengths from their standards (S355 per
EN 10025-2, 42CrMo4+QT per EN 10083-3) and the exact-ratio property of a user's safety factor.
"""

from __future__ import annotations

import math
import tomllib

import pytest

from pinchk import run
from pinchk.errors import InputError
from pinchk.jobfile import parse_job
from pinchk.methods import allowable, factors_for


def _job(factors: str = "") -> str:
    """A lug hanging in a clevis (an invented test geometry), 8 t straight down along the lug axis."""
    return f"""
[job]
title = "allowable"
[units]
length = "mm"
force = "kN"
[method]
name = "allowable stress"
[method.factors]
{factors}
[body.lug]
points = {{ A = [0, 0], B = [0, -1000] }}
[support.clevis]
at = "P"
kind = "pinned"
[support.guide]
at = "lug.B"
kind = "roller"
normal = [1, 0]
[case.lift]
[[load]]
case = "lift"
at = "lug.B"
mass = "8 t"
[pin.P]
joins = ["lug.A"]
diameter = 40
hole = 42
material = "42CrMo4+QT"
secured = true
[[pin.P.plate]]
member = "ground"
thickness = 15
material = "S355"
width = 120
end = 60
[[pin.P.plate]]
member = "lug"
thickness = 20
material = "S355"
width = 140
end = 70
gap = 2
[[pin.P.plate]]
member = "ground"
thickness = 15
material = "S355"
width = 120
end = 60
gap = 2
"""


def _rows(text):
    res = run(parse_job(tomllib.loads(text), "allow.toml", text))
    return {(r["part"], r["check"]): r for r in res.rows()}, res


W = 8000 * 9.80665
# strengths: 42CrMo4+QT 16 < d <= 40: Re 750, Rm 1000 MPa (EN 10083-3); S355 16 < t <= 40: 345 / 470 MPa and
# t <= 16: 355 / 470 MPa (EN 10025-2)
FYP, FUP = 750e6, 1000e6


def test_defaults_are_documented_and_marked_common_practice():
    f = factors_for(allowable, {})
    for key in allowable.CHECKS:
        for s in ("ky", "ny", "ku", "nu"):
            assert f"{key}_{s}" in f
            assert "common practice" in allowable.FACTORS[f"{key}_{s}"][1]
    assert f["pin_shear_ky"] == pytest.approx(1 / math.sqrt(3), abs=5e-4)  # von Mises shear yield


def test_stresses_and_allowables_by_definition():
    rows, res = _rows(_job())
    d, t = 0.040, 0.020
    # pin shear: two planes of W/2; allowable min(0.577 fy/2, 0.6 fu/3)
    r = rows[("pin", "pin shear")]
    assert r["demand"] == pytest.approx(W / 2 / (math.pi * d**2 / 4), rel=1e-9)
    assert r["capacity"] == pytest.approx(min(0.577 * FYP / 2, 0.6 * FUP / 3), rel=1e-12)
    r = rows[("pin", "pin bending")]
    M = W * (0.020 + 4 * 0.002 + 2 * 0.015) / 8  # clevis, EN 1993-1-8 Fig. 3.11 (same uniform-bearing model)
    assert r["demand"] == pytest.approx(M / (math.pi * d**3 / 32), rel=1e-9)
    assert r["capacity"] == pytest.approx(min(FYP / 2, FUP / 3), rel=1e-12)
    r = rows[("lug", "bearing")]
    assert r["demand"] == pytest.approx(W / (d * t), rel=1e-9)
    assert r["capacity"] == pytest.approx(min(345e6 / 2, 470e6 / 3), rel=1e-12)  # lower of plate and pin
    r = rows[("lug", "net tension")]
    assert r["demand"] == pytest.approx(W / (t * (0.140 - 0.042)), rel=1e-9)
    r = rows[("lug", "tear-out")]
    assert r["demand"] == pytest.approx(W / (2 * t * (0.070 - 0.021)), rel=1e-9)
    assert r["capacity"] == pytest.approx(min(0.577 * 345e6 / 2, 0.6 * 470e6 / 3), rel=1e-12)
    detailing = ("pin secured", "pin-to-hole clearance")
    assert all(row["kind"] == "stress" for k, row in rows.items() if k[1] not in detailing)
    for row in res.rows():
        assert row["clause"] and row["formula"]


@pytest.mark.parametrize("factor, check, parts", [
    ("pin_shear_ny", "pin shear", ("pin",)),
    ("pin_bending_ny", "pin bending", ("pin",)),
    ("bearing_ny", "bearing", ("lug", "ground 1/2", "ground 2/2")),
    ("net_tension_ny", "net tension", ("lug", "ground 1/2", "ground 2/2")),
    ("tear_out_ny", "tear-out", ("lug", "ground 1/2", "ground 2/2")),
])
def test_changing_a_safety_factor_changes_that_capacity_by_exactly_the_ratio(factor, check, parts):
    # make yield govern everywhere (n_u very small pushes the ultimate branch out of the way) then raise n_y
    base_f = "\n".join(f"{k}_nu = 0.01" for k in allowable.CHECKS)
    a, _ = _rows(_job(base_f))
    b, _ = _rows(_job(base_f + f"\n{factor} = 2.6"))
    for key in a:
        ratio = b[key]["capacity"] / a[key]["capacity"] if a[key]["capacity"] else 1.0
        if key[1] == check and key[0] in parts:
            assert ratio == pytest.approx(2.0 / 2.6, rel=1e-13), key
            assert "n_y = 2.6" in b[key]["factors"]
        else:
            assert ratio == 1.0, key


def test_ultimate_factor_where_ultimate_governs():
    # defaults: for S355 bearing, 470/3 = 156.7 < 345/2 = 172.5 MPa: the ultimate branch governs
    a, _ = _rows(_job())
    b, _ = _rows(_job("bearing_nu = 3.3"))
    assert b[("lug", "bearing")]["capacity"] / a[("lug", "bearing")]["capacity"] == pytest.approx(3.0 / 3.3, rel=1e-13)


def test_unknown_or_bad_factor_is_an_input_error():
    with pytest.raises(InputError, match="did you mean 'pin_shear_ny'"):
        text = _job("pin_shear_nyy = 2")
        parse_job(tomllib.loads(text), "allow.toml", text)
    with pytest.raises(InputError, match="greater than zero"):
        text = _job("pin_shear_ny = 0")
        parse_job(tomllib.loads(text), "allow.toml", text)
