"""pinchk.materials and pinchk/data/materials.csv against the standards' tables.

Sources (values as restated in the project's REFERENCE.md, each tagged [seen] there):
    EN 10025-2:2004, Hot rolled products of structural steels, Part 2: non-alloy structural steels,
        mechanical properties: minimum yield strength ReH by nominal thickness (≤ 16, > 16 ≤ 40,
        > 40 ≤ 63, > 63 ≤ 80, > 80 ≤ 100 mm) and tensile strength Rm for 3 ≤ t ≤ 100 mm.
    EN 10083-3:2006, Steels for quenching and tempering, Part 3: alloy steels, 42CrMo4 +QT, minimum
        yield Re and tensile Rm by diameter (≤ 16, > 16 ≤ 40, > 40 ≤ 100, > 100 ≤ 160, > 160 ≤ 250 mm).
    ASTM A36/A36M, tensile requirements: Fy 36 ksi (32 ksi over 8 in), Fu 58-80 ksi.
    ASTM A572/A572M, Grade 50: Fy 50 ksi, Fu 65 ksi.
    ASTM A193/A193M, Grade B7: ≤ 2-1/2 in 125/105 ksi (tensile/yield), over 2-1/2 to 4 in 115/95,
        over 4 to 7 in 100/75.
    E: EN 1993-1-1:2005 §3.2.6(1), 210000 MPa; AISC 360-16 (Symbols), 29000 ksi.
The library holds minimum values: fu is the lower end of each Rm range. Units as in the source (MPa,
mm; ksi, in).
"""

from __future__ import annotations

import pytest

from pinchk.materials import at_size, library, read_rows

MPA, MM = 1e6, 1e-3
IN = 0.0254
KSI = 4448.2216152605 / IN**2

# EN 10025-2: ReH [MPa] by thickness band, and the lower bound of Rm for 3-100 mm
EN10025 = {
    "S235": ((235, 225, 215, 215, 215), 360),
    "S275": ((275, 265, 255, 245, 235), 410),
    "S355": ((355, 345, 335, 325, 315), 470),
}
EN10025_BANDS = ((3, 16), (16, 40), (40, 63), (63, 80), (80, 100))  # mm

# EN 10083-3, 42CrMo4 +QT: (d_min, d_max] mm -> (Re min, Rm min) MPa
CRMO = [((0, 16), (900, 1100)), ((16, 40), (750, 1000)), ((40, 100), (650, 900)),
        ((100, 160), (550, 800)), ((160, 250), (500, 750))]

# ASTM, ksi: (size_min, size_max] in -> (Fy, Fu)
ASTM = {
    "A36": [((0, 8), (36, 58)), ((8, 15), (32, 58))],
    "A572-50": [((0, 4), (50, 65))],
    "A193-B7": [((0, 2.5), (105, 125)), ((2.5, 4), (95, 115)), ((4, 7), (75, 100))],
}


@pytest.mark.parametrize("grade", list(EN10025))
def test_en10025_2_by_thickness(grade):
    reh, rm = EN10025[grade]
    rows = library()[grade]
    assert len(rows) == len(EN10025_BANDS)
    for row, (lo, hi), fy in zip(rows, EN10025_BANDS, reh, strict=True):
        assert (row.size_min, row.size_max) == pytest.approx((lo * MM, hi * MM), rel=1e-12)
        assert row.fy == pytest.approx(fy * MPA, rel=1e-12)
        assert row.fu == pytest.approx(rm * MPA, rel=1e-12)
        assert row.E == pytest.approx(210000 * MPA, rel=1e-12)
        assert "EN 10025-2" in row.source


def test_en10083_3_42crmo4_qt():
    rows = library()["42CrMo4+QT"]
    assert len(rows) == len(CRMO)
    for row, ((lo, hi), (re, rm)) in zip(rows, CRMO, strict=True):
        assert (row.size_min, row.size_max) == pytest.approx((lo * MM, hi * MM), rel=1e-12, abs=1e-15)
        assert (row.fy, row.fu) == pytest.approx((re * MPA, rm * MPA), rel=1e-12)
        assert "EN 10083-3" in row.source


@pytest.mark.parametrize("grade", list(ASTM))
def test_astm(grade):
    rows = library()[grade]
    assert len(rows) == len(ASTM[grade])
    for row, ((lo, hi), (fy, fu)) in zip(rows, ASTM[grade], strict=True):
        assert (row.size_min, row.size_max) == pytest.approx((lo * IN, hi * IN), rel=1e-12, abs=1e-15)
        assert (row.fy, row.fu) == pytest.approx((fy * KSI, fu * KSI), rel=1e-12)
        assert row.E == pytest.approx(29000 * KSI, rel=1e-12)
        assert "ASTM " + grade.split("-")[0] in row.source


def test_every_row_names_its_source():
    for r in read_rows("materials.csv"):
        assert r["source"].strip(), r
        assert float(r["fy"]) <= float(r["fu"]), r


@pytest.mark.parametrize("name, size, fy", [
    # EN 10025-2 bands: "≤ 16", "> 16 ≤ 40": the boundary belongs to the thinner band
    ("S355", 3 * MM, 355), ("S355", 16 * MM, 355), ("S355", 16.001 * MM, 345), ("S355", 40 * MM, 345),
    ("S355", 40.5 * MM, 335), ("S355", 63 * MM, 335), ("S355", 80 * MM, 325), ("S355", 100 * MM, 315),
    ("S235", 16 * MM, 235), ("S235", 17 * MM, 225), ("S275", 63.5 * MM, 245),
    # EN 10083-3: "≤ 16", "> 16 ≤ 40", "> 40 ≤ 100"
    ("42CrMo4+QT", 10 * MM, 900), ("42CrMo4+QT", 16 * MM, 900), ("42CrMo4+QT", 16.5 * MM, 750),
    ("42CrMo4+QT", 40 * MM, 750), ("42CrMo4+QT", 60 * MM, 650), ("42CrMo4+QT", 250 * MM, 500),
])
def test_size_selection_at_band_edges_si(name, size, fy):
    assert at_size(name, size).fy == pytest.approx(fy * MPA, rel=1e-12)


@pytest.mark.parametrize("name, size, fy", [
    ("A36", 8 * IN, 36), ("A36", 8.25 * IN, 32), ("A193-B7", 2.5 * IN, 105), ("A193-B7", 2.75 * IN, 95),
    ("A193-B7", 4 * IN, 95), ("A193-B7", 4.5 * IN, 75), ("A572-50", 4 * IN, 50),
])
def test_size_selection_at_band_edges_us(name, size, fy):
    assert at_size(name, size).fy == pytest.approx(fy * KSI, rel=1e-12)


@pytest.mark.parametrize("name, size", [
    ("S355", 2.9 * MM), ("S355", 101 * MM), ("42CrMo4+QT", 251 * MM), ("A572-50", 4.1 * IN), ("A193-B7", 7.5 * IN),
])
def test_size_outside_the_table_is_refused(name, size):
    with pytest.raises(ValueError, match="is listed for sizes"):
        at_size(name, size)


def test_unknown_material():
    with pytest.raises(KeyError):
        at_size("S9000", 10 * MM)


def test_job_picks_the_band_of_each_plate(make_job):
    """Through the job file: a 20 mm S355 plate gets ReH 345 MPa, a 60 mm 42CrMo4 pin Re 650 MPa
    (EN 10025-2 > 16 ≤ 40 mm; EN 10083-3 > 40 ≤ 100 mm)."""
    from .conftest import DEMO

    job = make_job(DEMO.read_text())
    pin = job.pins["P_apex"]
    assert pin.material.fy == pytest.approx(650 * MPA) and pin.material.fu == pytest.approx(900 * MPA)
    plate = pin.stack[0]
    assert plate.thickness == pytest.approx(20 * MM)
    assert plate.material.fy == pytest.approx(345 * MPA) and plate.material.fu == pytest.approx(470 * MPA)
    foot_plate = job.pins["P_foot_left"].stack[1]  # 25 mm
    assert foot_plate.material.fy == pytest.approx(345 * MPA)
