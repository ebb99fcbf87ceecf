"""AISC 360-16 pin-connected members: every check of pinchk.methods.aisc360_16 against its equation.

Sources:
    ANSI/AISC 360-16, Specification for Structural Steel Buildings. American Institute of Steel
    Construction, Chicago, July 7, 2016. §D5.1 (a) tensile rupture on the net effective area,
    eq (D5-1), with be = 2t + 0.63 in (2t + 16 mm) not more than the actual distance from the hole edge
    to the plate edge perpendicular to the force; (b) shear rupture on the effective area, eq (D5-2),
    Asf = 2t(a + d/2); (c) bearing, by §J7; (d) yielding on the gross section, by §D2(a), eq (D2-1).
    §D5.2 dimensional requirements. §J7 bearing on pins in reamed, drilled or bored holes, eq (J7-1),
    Rn = 1.8 Fy Apb. §D2 and §J7 resistance and safety factors. All [seen] per the project's
    REFERENCE.md.
    Pin shear and pin bending have no AISC 360 clause. Common practice (REFERENCE.md): shear as
    0.6 Fu on each plane with φ = 0.75, Ω = 2.00; bending as a solid round bar per §F11.1,
    Mn = Fy Z ≤ 1.6 Fy S, φ = 0.90, Ω = 1.67 (the §F11.1 wording from memory, REFERENCE.md [memory]).

No published worked example is reproduced here: none could be cited from memory with confidence.

Numbers are chosen in the test, in the units of the source (kips, in, ksi) and converted to SI.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from pinchk.methods import aisc360_16 as aisc
from pinchk.methods import factors_for

IN = 0.0254  # m, exact
KIP = 4448.2216152605  # N, exact
KSI = KIP / IN**2
DEFAULTS = factors_for(aisc, {})
VARIANTS = {"ASD": lambda Rn, phi, omega: Rn / omega, "LRFD": lambda Rn, phi, omega: phi * Rn}


def by_name(checks):
    return {c.name: c for c in checks}


def plate_cols(n=1, **kw):
    """A572 Gr 50 plate (Fy 50 ksi, Fu 65 ksi), t = 1 in, 3 in pin (Fy 105 ksi) in a 3-1/32 in hole,
    width 8 in, hole centre to end 4.5 in, force 60 kips (chosen here)."""
    cols = dict(F=60 * KIP, t=1 * IN, d=3 * IN, d0=(3 + 1 / 32) * IN, fy=50 * KSI, fu=65 * KSI,
                fyp=105 * KSI, E=29000 * KSI, a_end=4.5 * IN, width=8 * IN, type_b=False, rot=False,
                uls=True, ser=False)
    cols.update(kw)
    return {k: np.full(n, v) for k, v in cols.items()}


def pin_cols(n=1, **kw):
    """A 3 in pin, A193 B7 (Fy 105 ksi, Fu 125 ksi), V = 90 kips, M = 40 kip·in (chosen here)."""
    cols = dict(d=3 * IN, fup=125 * KSI, fyp=105 * KSI, V=90 * KIP, M=40 * KIP * IN, uls=True, ser=False)
    cols.update(kw)
    return {k: np.full(n, v) for k, v in cols.items()}


@pytest.mark.parametrize("variant", list(VARIANTS))
def test_tensile_rupture_d5_1a(variant):
    """§D5.1(a), eq (D5-1): Pn = Fu (2 t be), φt = 0.75, Ωt = 2.00.
    w = 8 in: the edge distance (8 − 3.03125)/2 = 2.484 in is less than 2t + 0.63 in = 2.63 in, so
    be = 2.484 in and Pn = 65 · 2 · 1 · 2.484 = 323.0 kips."""
    c = by_name(aisc.plate_checks(plate_cols(), DEFAULTS, variant))["tensile rupture"]
    be = (8 - (3 + 1 / 32)) / 2
    Pn = 65 * 2 * 1 * be  # kips
    assert Pn == pytest.approx(323.0, rel=1e-3)
    assert c.capacity[0] == pytest.approx(VARIANTS[variant](Pn, 0.75, 2.00) * KIP, rel=1e-12)
    assert c.demand[0] == 60 * KIP
    assert "§D5.1(a)" in c.clause


@pytest.mark.parametrize("variant", list(VARIANTS))
def test_tensile_rupture_be_limit_d5_1a(variant):
    """§D5.1(a): with a wide plate (w = 12 in) be = 2t + 0.63 in (2t + 16 mm). pinchk takes the SI
    16 mm (0.62992 in) for both, the smaller of the two; it agrees with 0.63 in to 1e-4."""
    Q = plate_cols(width=12 * IN)
    c = by_name(aisc.plate_checks(Q, DEFAULTS, variant))["tensile rupture"]
    t = 1 * IN
    be_si = 2 * t + 0.016
    Pn = 65 * KSI * 2 * t * be_si
    assert c.capacity[0] == pytest.approx(VARIANTS[variant](Pn, 0.75, 2.00), rel=1e-12)
    Pn_us = 65 * 2 * 1 * (2 * 1 + 0.63) * KIP
    assert c.capacity[0] == pytest.approx(VARIANTS[variant](Pn_us, 0.75, 2.00), rel=1e-4)
    assert c.capacity[0] <= VARIANTS[variant](Pn_us, 0.75, 2.00)


@pytest.mark.parametrize("variant", list(VARIANTS))
def test_shear_rupture_d5_1b(variant):
    """§D5.1(b), eq (D5-2): Pn = 0.6 Fu Asf, Asf = 2 t (a + d/2), a from the hole edge to the plate end
    along the force: a = 4.5 − 3.03125/2 = 2.984 in; Asf = 2 · 1 · (2.984 + 1.5) = 8.969 in²;
    Pn = 0.6 · 65 · 8.969 = 349.8 kips. φsf = 0.75, Ωsf = 2.00."""
    c = by_name(aisc.plate_checks(plate_cols(), DEFAULTS, variant))["shear rupture"]
    a = 4.5 - (3 + 1 / 32) / 2
    Pn = 0.6 * 65 * 2 * 1 * (a + 3 / 2)
    assert Pn == pytest.approx(349.8, rel=1e-3)
    assert c.capacity[0] == pytest.approx(VARIANTS[variant](Pn, 0.75, 2.00) * KIP, rel=1e-12)
    assert "§D5.1(b)" in c.clause


@pytest.mark.parametrize("variant", list(VARIANTS))
def test_bearing_j7(variant):
    """§J7, eq (J7-1): Rn = 1.8 Fy Apb, Apb = t d = 3 in²; Fy = 50 ksi (the plate, softer than the pin;
    pinchk takes the lower of the two): Rn = 1.8 · 50 · 3 = 270 kips. φ = 0.75, Ω = 2.00."""
    c = by_name(aisc.plate_checks(plate_cols(), DEFAULTS, variant))["bearing"]
    assert c.capacity[0] == pytest.approx(VARIANTS[variant](1.8 * 50 * 3, 0.75, 2.00) * KIP, rel=1e-12)
    # a pin softer than the plate (Fy 36 ksi): the lower yield strength is used
    c = by_name(aisc.plate_checks(plate_cols(fyp=36 * KSI), DEFAULTS, variant))["bearing"]
    assert c.capacity[0] == pytest.approx(VARIANTS[variant](1.8 * 36 * 3, 0.75, 2.00) * KIP, rel=1e-12)
    assert "§J7" in c.clause


@pytest.mark.parametrize("variant", list(VARIANTS))
def test_gross_yielding_d5_1d_d2a(variant):
    """§D5.1(d) by §D2(a), eq (D2-1): Pn = Fy Ag, Ag = t w = 8 in², Pn = 400 kips; φt = 0.90,
    Ωt = 1.67."""
    c = by_name(aisc.plate_checks(plate_cols(), DEFAULTS, variant))["gross yielding"]
    assert c.capacity[0] == pytest.approx(VARIANTS[variant](50 * 1 * 8, 0.90, 1.67) * KIP, rel=1e-12)
    assert "§D2(a)" in c.clause


def test_dimensional_requirements_d5_2():
    """§D5.2: a ≥ 1.33 be; w ≥ 2 be + d; where the pin turns under load, hole ≤ d + 1/32 in."""
    Q = plate_cols(2)
    Q["rot"] = np.array([False, True])
    ch = by_name(aisc.plate_checks(Q, DEFAULTS, "ASD"))
    be = (8 - (3 + 1 / 32)) / 2 * IN
    a = (4.5 - (3 + 1 / 32) / 2) * IN
    e, w, h = ch["end distance"], ch["width"], ch["hole clearance (rotating)"]
    np.testing.assert_allclose(e.demand, 1.33 * be, rtol=1e-12)
    np.testing.assert_allclose(e.capacity, a, rtol=1e-12)
    np.testing.assert_allclose(w.demand, 2 * be + 3 * IN, rtol=1e-12)
    np.testing.assert_allclose(w.capacity, 8 * IN, rtol=1e-12)
    np.testing.assert_allclose(h.demand, (1 / 32) * IN, rtol=1e-9)
    np.testing.assert_allclose(h.capacity, (1 / 32) * IN, rtol=1e-12)
    assert list(h.mask) == [False, True]
    assert all("§D5.2" in c.clause for c in (e, w, h))


def test_hole_clearance_fails_when_too_loose():
    """§D5.2: a 3 in pin in a 3-1/16 in hole that turns under load exceeds d + 1/32 in."""
    Q = plate_cols(d0=(3 + 1 / 16) * IN, rot=True)
    h = by_name(aisc.plate_checks(Q, DEFAULTS, "ASD"))["hole clearance (rotating)"]
    assert h.demand[0] / h.capacity[0] == pytest.approx(2.0, rel=1e-9)


@pytest.mark.parametrize("variant", list(VARIANTS))
def test_pin_shear_common_practice(variant):
    """Common practice (no AISC 360 clause): Vn = 0.6 Fu A per shear plane, φ = 0.75, Ω = 2.00.
    3 in pin, Fu = 125 ksi: 0.6 · 125 · 7.069 in² = 530.1 kips."""
    c = by_name(aisc.pin_checks(pin_cols(), DEFAULTS, variant))["pin shear"]
    Vn = 0.6 * 125 * math.pi * 3**2 / 4
    assert Vn == pytest.approx(530.1, rel=1e-3)
    assert c.capacity[0] == pytest.approx(VARIANTS[variant](Vn, 0.75, 2.00) * KIP, rel=1e-12)
    assert "common practice" in c.clause


@pytest.mark.parametrize("variant", list(VARIANTS))
def test_pin_bending_common_practice_f11(variant):
    """Common practice, by §F11.1 for a solid round: Mn = Fy Z ≤ 1.6 Fy S, Z = d³/6, S = π d³/32.
    For any round 1.6 S = 0.1571 d³ < Z = 0.1667 d³, so 1.6 Fy S governs: 3 in, Fy = 105 ksi:
    1.6 · 105 · 2.651 in³ = 445.3 kip·in. φb = 0.90, Ωb = 1.67."""
    c = by_name(aisc.pin_checks(pin_cols(), DEFAULTS, variant))["pin bending"]
    Z, S = 3**3 / 6, math.pi * 3**3 / 32
    Mn = min(105 * Z, 1.6 * 105 * S)
    assert Mn == 1.6 * 105 * S
    assert Mn == pytest.approx(445.3, rel=1e-3)
    assert c.capacity[0] == pytest.approx(VARIANTS[variant](Mn, 0.90, 1.67) * KIP * IN, rel=1e-12)
    assert "common practice" in c.clause


def test_default_factors():
    """§D5.1 φt = φsf = 0.75, Ω = 2.00; §D2(a) 0.90, 1.67; §J7 0.75, 2.00; pins per common practice;
    a bolt used as a pin, §J3.6 φ = 0.75, Ω = 2.00 (from memory)."""
    assert DEFAULTS == {"phi_tr": 0.75, "omega_tr": 2.00, "phi_sr": 0.75, "omega_sr": 2.00,
                        "phi_ty": 0.90, "omega_ty": 1.67, "phi_br": 0.75, "omega_br": 2.00,
                        "phi_pv": 0.75, "omega_pv": 2.00, "phi_pb": 0.90, "omega_pb": 1.67,
                        "phi_bv": 0.75, "omega_bv": 2.00}  # bolts as pins, §J3.6 (from memory)


@pytest.mark.parametrize("key, checks", [
    ("tr", {"tensile rupture"}), ("sr", {"shear rupture"}), ("br", {"bearing"}), ("ty", {"gross yielding"}),
    ("pv", {"pin shear"}), ("pb", {"pin bending"}), ("bv", {"bolt shear (shank)", "bolt shear (thread)"}),
])
def test_factor_overrides_scale_exactly(key, checks):
    """A φ or Ω override changes only its own check, by exactly the ratio of the factors."""
    for variant, name, new in (("LRFD", f"phi_{key}", 0.6), ("ASD", f"omega_{key}", 2.5)):
        f = factors_for(aisc, {name: new})
        ratio = new / DEFAULTS[name] if variant == "LRFD" else DEFAULTS[name] / new
        for fn, cols in ((aisc.pin_checks, pin_cols()), (aisc.plate_checks, plate_cols())):
            old_c, new_c = by_name(fn(cols, DEFAULTS, variant)), by_name(fn(cols, f, variant))
            for n in old_c:
                expect = ratio if n in checks else 1.0
                np.testing.assert_allclose(new_c[n].capacity, old_c[n].capacity * expect, rtol=1e-14,
                                           err_msg=f"{variant} {name} {n}")


def test_lrfd_over_asd_is_phi_times_omega():
    """For each strength check, LRFD φ Rn over ASD Rn/Ω is φ Ω."""
    ratio = {"tensile rupture": 0.75 * 2.00, "shear rupture": 0.75 * 2.00, "bearing": 0.75 * 2.00,
             "gross yielding": 0.90 * 1.67, "pin shear": 0.75 * 2.00, "pin bending": 0.90 * 1.67,
             "bolt shear (shank)": 0.75 * 2.00, "bolt shear (thread)": 0.75 * 2.00}
    for fn, cols in ((aisc.pin_checks, pin_cols()), (aisc.plate_checks, plate_cols())):
        asd, lrfd = by_name(fn(cols, DEFAULTS, "ASD")), by_name(fn(cols, DEFAULTS, "LRFD"))
        for n, r in ratio.items():
            if n in asd:
                assert lrfd[n].capacity[0] / asd[n].capacity[0] == pytest.approx(r, rel=1e-14)


def test_every_check_names_its_clause():
    for c in [*aisc.pin_checks(pin_cols(), DEFAULTS, "ASD"), *aisc.plate_checks(plate_cols(), DEFAULTS, "ASD")]:
        assert c.clause.startswith("AISC 360-16") or c.clause.startswith("common practice"), c.name
        assert c.formula
