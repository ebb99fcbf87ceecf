"""ASME BTH-1 pinned connections: every equation of pinchk.methods.bth1 against its published form.

Source: ASME BTH-1-2017, Design of Below-the-Hook Lifting Devices, §3-1.3 (design factor Nd), §3-2.2 and
§3-2.3 (pin shear and bending), §3-3.3 (pinned connections). The forms below are written out from the
standard as restated in the project's reference notes; those tagged "from memory" there (Nd for
Category B, the Pb form, the angle φ, the bearing and pin allowables, the clearance limit) are marked
"from memory" here too, so a failing test may mean the recollection, not the code, is wrong.
Each expected value is computed here by hand from the printed form, in the units "as in the source"
where that helps (inches and ksi), not by calling pinchk.
"""

from __future__ import annotations

import math
import tomllib

import numpy as np
import pytest

from pinchk import run
from pinchk.jobfile import parse_job
from pinchk.methods import METHODS, bth1, factors_for

IN = 0.0254
KSI = 1000 * 4.4482216152605 / IN**2  # 1 ksi = 1000 lbf/in², lbf and in exact by definition


# --- the equations, one by one -----------------------------------------------------------------------

def test_cr_published_form_and_permission():
    # §3-3.3.1: Cr = 1 - 0.275 sqrt(1 - Dp^2/Dh^2); Cr may be taken as 1.0 when Dp/Dh > 0.90
    Dp, Dh = 3.0, 4.0  # in, Dp/Dh = 0.75
    expected = 1 - 0.275 * math.sqrt(1 - (3.0 / 4.0) ** 2)  # = 0.8181 (hand: sqrt(0.4375) = 0.6614)
    assert bth1.cr(Dp * IN, Dh * IN) == pytest.approx(expected, rel=1e-12)
    assert expected == pytest.approx(0.81811, abs=1e-5)
    assert bth1.cr(60.0, 62.0) == 1.0  # Dp/Dh = 0.968 > 0.90
    assert bth1.cr(45.0, 50.0) == pytest.approx(1 - 0.275 * math.sqrt(1 - 0.81), rel=1e-12)  # exactly 0.90: formula


def test_beff_strength_limit():
    # §3-3.3.1: beff = be * 0.6 (Fu/Fy) sqrt(Dh/be), not more than be. A36: Fy 36, Fu 58 ksi (ASTM A36).
    be, Dh = 3.0, 2.0
    expected = 3.0 * 0.6 * (58 / 36) * math.sqrt(2.0 / 3.0)  # = 2.368 in (< be)
    assert bth1.b_eff_strength(be * IN, Dh * IN, 36 * KSI, 58 * KSI) / IN == pytest.approx(expected, rel=1e-12)
    # narrow plate: the formula would exceed be, so be governs
    assert bth1.b_eff_strength(0.5 * IN, 2.0 * IN, 36 * KSI, 58 * KSI) / IN == pytest.approx(0.5, rel=1e-12)


def test_tension_through_pin_hole():
    # §3-3.3.1: Pt = Cr Fu 2 t beff / (1.20 Nd); Cr 0.9, Fu 58 ksi, t 1 in, beff 2 in, Nd 2.00 (Category A)
    expected_kip = 0.9 * 58 * 2 * 1.0 * 2.0 / (1.20 * 2.00)  # = 87.0 kip
    got = bth1.tension_pt(58 * KSI, 1 * IN, 2 * IN, 0.9, 2.00)
    assert got / (KSI * IN**2) == pytest.approx(expected_kip, rel=1e-12)
    assert expected_kip == pytest.approx(87.0, rel=1e-12)


def test_single_plane_fracture_from_memory_form():
    # §3-3.3.1 (form from memory): Pb = Cr Fu [1.13 (R - Dh/2) + 0.92 be/(1 + be/Dh)] t / (1.20 Nd)
    Cr, Fu, R, Dh, be, t, Nd = 1.0, 58.0, 3.0, 2.0, 2.5, 1.0, 3.00
    expected = Cr * Fu * (1.13 * (R - Dh / 2) + 0.92 * be / (1 + be / Dh)) * t / (1.20 * Nd)
    got = bth1.fracture_pb(Fu * KSI, t * IN, R * IN, Dh * IN, be * IN, Cr, Nd) / (KSI * IN**2)
    assert got == pytest.approx(expected, rel=1e-12)
    # hand arithmetic: 1.13*2 = 2.26; 0.92*2.5/2.25 = 1.02222; sum 3.28222; *58 = 190.369; /(1.2*3) = 52.880 kip
    assert expected == pytest.approx(52.880, abs=1e-3)


def test_double_plane_shear_area_and_strength():
    # §3-3.3.1: Av = 2 [a + (Dp/2)(1 - cos φ)] t, φ = 55 Dp/Dh degrees (φ from memory); Pv = 0.70 Fu Av/(1.20 Nd)
    a, Dp, Dh, t = 1.5, 1.9, 2.0, 0.75
    phi = math.radians(55 * 1.9 / 2.0)  # 52.25 deg
    Av = 2 * (a + Dp / 2 * (1 - math.cos(phi))) * t
    assert bth1.shear_av(a * IN, Dp * IN, Dh * IN, t * IN) / IN**2 == pytest.approx(Av, rel=1e-12)
    assert Av == pytest.approx(2 * (1.5 + 0.95 * (1 - 0.61222)) * 0.75, rel=1e-4)  # cos 52.25° = 0.61222
    Pv = 0.70 * 58 * Av / (1.20 * 2.00)
    assert bth1.shear_pv(58 * KSI, Av * IN**2, 2.00) / (KSI * IN**2) == pytest.approx(Pv, rel=1e-12)


def test_bearing_allowables():
    # §3-3.3.3 (from memory): Fp = 1.25 Fy/Nd; 0.63 Fy/Nd for a pin rotating under load for many cycles
    assert bth1.bearing_fp(36 * KSI, 2.0, False) / KSI == pytest.approx(1.25 * 36 / 2.0, rel=1e-12)
    assert bth1.bearing_fp(36 * KSI, 2.0, True) / KSI == pytest.approx(0.63 * 36 / 2.0, rel=1e-12)


def test_pin_allowables_low_confidence():
    # §3-2.2: Fv = Fy/(Nd sqrt 3); §3-2.3 round bars: Fb = 1.25 Fy/Nd (both from memory, LOW confidence)
    assert bth1.pin_shear_fv(100 * KSI, 2.0) / KSI == pytest.approx(100 / (2 * math.sqrt(3)), rel=1e-12)
    assert bth1.pin_bending_fb(100 * KSI, 3.0) / KSI == pytest.approx(1.25 * 100 / 3.0, rel=1e-12)


def test_design_factors_by_category():
    # §3-1.3: Nd = 2.00 for Design Category A [seen]; 3.00 for Design Category B [from memory]
    f = factors_for(bth1, {})
    assert bth1.design_factor(f, "A") == 2.00
    assert bth1.design_factor(f, "B") == 3.00
    assert bth1.design_factor(f, None) == 2.00
    assert "ASME BTH-1" in METHODS


# --- through the whole path --------------------------------------------------------------------------

def _job(method_extra: str = "", plate_extra: str = "", pin_extra: str = "secured = true") -> str:
    """A lug hanging in a clevis (an invented test geometry): 10 t straight down along the lug axis."""
    return f"""
[job]
title = "test clevis"
[units]
length = "mm"
force = "kN"
[method]
name = "ASME BTH-1"
{method_extra}
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
mass = "10 t"
[pin.P]
joins = ["lug.A"]
diameter = 40
hole = 42
material = "42CrMo4+QT"
{pin_extra}
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
{plate_extra}
[[pin.P.plate]]
member = "ground"
thickness = 15
material = "S355"
width = 120
end = 60
gap = 2
"""


def _results(text: str):
    return run(parse_job(tomllib.loads(text), "test.toml", text))


def _rows(res, part=None):
    return {(r["part"], r["check"]): r for r in res.rows() if part is None or r["part"] == part}


def test_lug_plate_capacities_match_the_clause_forms():
    res = _results(_job())
    rows = _rows(res, "lug")
    W = 10_000 * 9.80665  # 10 t with standard gravity
    t, Dp, Dh, w, R = 0.020, 0.040, 0.042, 0.140, 0.070
    fy, fu = 345e6, 470e6  # S355, 16 < t <= 40 mm, EN 10025-2
    be = w / 2 - Dh / 2
    Nd, k = 2.00, 1.20
    Cr = 1.0  # Dp/Dh = 0.952 > 0.90
    beff = min(be, 0.6 * fu / fy * math.sqrt(Dh / be) * be)
    Pt = Cr * fu * 2 * t * beff / (k * Nd)
    assert rows[("lug", "tension at pin hole")]["capacity"] == pytest.approx(Pt, rel=1e-12)
    assert rows[("lug", "dishing width limit")]["capacity"] == pytest.approx(fu * 2 * t * min(4 * t, be) / (k * Nd),
                                                                           rel=1e-12)
    Pb = fu * (1.13 * (R - Dh / 2) + 0.92 * be / (1 + be / Dh)) * t / (k * Nd)
    assert rows[("lug", "single-plane fracture")]["capacity"] == pytest.approx(Pb, rel=1e-12)
    Av = 2 * ((R - Dh / 2) + Dp / 2 * (1 - math.cos(math.radians(55 * Dp / Dh)))) * t
    assert rows[("lug", "double-plane shear")]["capacity"] == pytest.approx(0.70 * fu * Av / (k * Nd), rel=1e-12)
    assert rows[("lug", "bearing")]["capacity"] == pytest.approx(1.25 * 345e6 / Nd * Dp * t, rel=1e-12)
    assert rows[("lug", "bearing")]["demand"] == pytest.approx(W, rel=1e-9)
    assert rows[("lug", "pin-to-hole clearance")]["capacity"] == pytest.approx(0.10 * Dp, rel=1e-12)
    # the pin: 42CrMo4+QT, 16 < d <= 40 mm: Re 750 MPa (EN 10083-3); two shear planes of W/2 each
    pin = _rows(res, "pin")
    assert pin[("pin", "pin shear")]["demand"] == pytest.approx(W / 2, rel=1e-9)
    assert pin[("pin", "pin shear")]["capacity"] == pytest.approx(750e6 / (Nd * math.sqrt(3)) * math.pi * Dp**2 / 4,
                                                                  rel=1e-12)
    # clevis moment F (b + 4c + 2a)/8, EN 1993-1-8 Fig. 3.11 (the same uniform-bearing model)
    M = W * (0.020 + 4 * 0.002 + 2 * 0.015) / 8
    assert pin[("pin", "pin bending")]["demand"] == pytest.approx(M, rel=1e-9)
    assert pin[("pin", "pin bending")]["capacity"] == pytest.approx(1.25 * 750e6 / Nd * math.pi * Dp**3 / 32,
                                                                    rel=1e-12)


@pytest.mark.parametrize("category, nd_field, new", [("A", "Nd_A", 2.5), ("B", "Nd_B", 4.0)])
def test_changing_the_design_factor_scales_capacities_by_exactly_that_ratio(category, nd_field, new):
    base = _results(_job(f'design = "{category}"'))
    changed = _results(_job(f'design = "{category}"\n[method.factors]\n{nd_field} = {new}'))
    old = 2.0 if category == "A" else 3.0
    a, b = _rows(base), _rows(changed)
    assert a.keys() == b.keys()
    untouched = {"pin-to-hole clearance", "pin secured"}
    for key in a:
        ratio = b[key]["capacity"] / a[key]["capacity"] if a[key]["capacity"] else 1.0
        if key[1] in untouched:
            assert ratio == 1.0, key
        else:
            assert ratio == pytest.approx(old / new, rel=1e-13), key
        assert b[key]["demand"] == a[key]["demand"]
        assert nd_field[:2] in b[key]["factors"] or key[1] in untouched


def test_dishing_limit_is_its_own_check_and_waived_when_stiffened():
    res = _results(_job())
    checks = {r["check"] for r in res.rows() if r["part"] == "lug"}
    assert "dishing width limit" in checks and "tension at pin hole" in checks
    stiff = _results(_job(plate_extra="stiffened = true"))
    assert "dishing width limit" not in {r["check"] for r in stiff.rows() if r["part"] == "lug"}
    # the two tension checks together are the clause's beff = min(4t, be, 0.6 (Fu/Fy) sqrt(Dh/be) be)
    r = _rows(res, "lug")
    t, be, Dh, fy, fu = 0.020, 0.049, 0.042, 345e6, 470e6
    beff = min(4 * t, be, 0.6 * fu / fy * math.sqrt(Dh / be) * be)
    pt = fu * 2 * t * beff / 2.4
    assert min(r[("lug", "tension at pin hole")]["capacity"], r[("lug", "dishing width limit")]["capacity"]) == \
        pytest.approx(pt, rel=1e-12)


def test_wide_thin_plate_dishing_limit_governs():
    # t = 8 mm (S355, fy 355 MPa): 4t = 32 mm < 0.6 (470/355) sqrt(42/49) 49 = 36.0 mm (< be = 49 mm), so the
    # dishing limit gives the smaller tension capacity
    lug = 'thickness = 20\nmaterial = "S355"\nwidth = 140'
    text = _job().replace(lug, lug.replace("20", "8"))
    assert text != _job()
    r = _rows(_results(text), "lug")
    assert r[("lug", "dishing width limit")]["capacity"] < r[("lug", "tension at pin hole")]["capacity"]


def test_rotating_pin_uses_the_lower_bearing_allowable():
    r = _rows(_results(_job(pin_extra="secured = true\nrotates = true")), "lug")
    assert ("lug", "bearing") not in r
    assert r[("lug", "bearing (rotating)")]["capacity"] == pytest.approx(0.63 * 345e6 / 2.0 * 0.040 * 0.020, rel=1e-12)


def test_pin_not_stated_secured_fails_the_detailing_check():
    res = _results(_job(pin_extra=""))
    row = next(r for r in res.rows() if r["check"] == "pin secured")
    assert row["status"] == "FAIL" and not res.passed
    ok = next(r for r in _results(_job()).rows() if r["check"] == "pin secured")
    assert ok["status"] == "pass"


def test_clearance_limit_fails_for_a_loose_hole():
    text = _job().replace("hole = 42", "hole = 45")  # 5 mm over a 40 mm pin: more than 0.10 Dp (from memory)
    row = _rows(_results(text), "lug")[("lug", "pin-to-hole clearance")]
    assert row["status"] == "FAIL"
    assert row["demand"] == pytest.approx(0.005) and row["capacity"] == pytest.approx(0.004)


def test_every_bth1_check_names_a_clause_and_marks_memory():
    res = _results(_job())
    for r in res.rows():
        assert r["clause"].startswith("ASME BTH-1"), r
        assert r["formula"]
    low = [r for r in res.rows() if r["check"] in ("pin shear", "pin bending")]
    assert low and all("from memory" in r["formula"] for r in low)
    assert np.all(np.isfinite(res.columns["utilization"]))


def test_the_bth1_demo_runs_and_shows_its_factors(capsys):
    from pathlib import Path

    from pinchk.cli import main

    demo = Path(__file__).resolve().parents[2] / "examples" / "spreader_frame_bth1.toml"
    assert main(["run", str(demo), "--no-forces"]) == 0
    out = capsys.readouterr().out
    assert "ASME BTH-1 (B)" in out and "lift factor dynamic = 1.15" in out
    assert "bolt shear (shank)" in out and "WARNING: P_B: bolt used as a pin" in out
    res = run(demo)
    assert any("dynamic 1.15" in r["factors"] and "Nd = 3" in r["factors"] for r in res.rows())
    assert abs(res.solution.supports["sway"]).max() < 1e-6  # the notional restraint carries nothing
