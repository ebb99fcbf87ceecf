"""pinchk.units: quantities read to SI once, at the boundary.

Conversion factors are the exact definitions: 1 in = 25.4 mm and 1 lb = 0.45359237 kg (International
Yard and Pound Agreement, 1959; NIST SP 811 (2008) Appendix B), standard gravity gn = 9.80665 m/s²
(3rd CGPM, 1901), so 1 lbf = 4.4482216152605 N, 1 kip = 1000 lbf, 1 ksi = 1 kip/in², 1 t = 1000 kg.
"""

from __future__ import annotations

import math

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from pinchk.units import G0, QuantityError, check_unit, from_si, to_si

IN = 0.0254  # m, exact
LBF = 0.45359237 * 9.80665  # N, exact by definition
KIP = 1000 * LBF


@pytest.mark.parametrize("text, dim, si", [
    ("40 mm", "length", 0.040),
    ("1.25 in", "length", 1.25 * IN),
    ("12 kip", "force", 12 * KIP),
    ("355 MPa", "stress", 355e6),
    ("50 ksi", "stress", 50 * KIP / IN**2),
    ("2.5 t", "mass", 2500.0),
    ("5 kN*m", "moment", 5000.0),
    ("100 kip*in", "moment", 100 * KIP * IN),
    ("30 deg", "angle", math.pi / 6),
    ("40mm", "length", 0.040),
    ("  40 mm ", "length", 0.040),
    ("-1.5e3 N", "force", -1500.0),
    (".5 m", "length", 0.5),
])
def test_parse(text, dim, si):
    assert to_si(text, dim) == pytest.approx(si, rel=1e-14)


def test_standard_gravity_exact():
    assert G0 == 9.80665


@pytest.mark.parametrize("value, dim, default, si", [
    (40, "length", "mm", 0.040),
    (40.0, "length", "mm", 0.040),
    ("40", "length", "mm", 0.040),  # a number written as text, still no unit
    (12, "force", "kip", 12 * KIP),
    (2.5, "mass", "t", 2500.0),
])
def test_bare_number_takes_the_default_unit(value, dim, default, si):
    assert to_si(value, dim, default) == pytest.approx(si, rel=1e-14)


def test_bare_number_without_default_is_refused():
    with pytest.raises(QuantityError, match=r"no unit.*default length unit"):
        to_si(40, "length")
    with pytest.raises(QuantityError, match="no unit"):
        to_si("40", "length")


def test_unit_given_overrides_default():
    assert to_si("2 in", "length", "mm") == pytest.approx(2 * IN, rel=1e-14)


@pytest.mark.parametrize("text, dim, found", [
    ("12 kN", "length", "force"),
    ("40 mm", "force", "length"),
    ("2.5 t", "force", "mass"),  # a mass is not a force: the job must say mass = where it means one
    ("355 MPa", "moment", "stress"),
])
def test_wrong_dimension(text, dim, found):
    with pytest.raises(QuantityError) as exc:
        to_si(text, dim)
    msg = str(exc.value)
    assert f"unit of {found}" in msg and f"a {dim} is needed" in msg


def test_wrong_default_unit():
    with pytest.raises(QuantityError, match="unit of force"):
        to_si(40, "length", "kN")
    with pytest.raises(QuantityError):
        check_unit("kN", "length")
    assert check_unit("mm", "length") == "mm"


@pytest.mark.parametrize("value", [math.nan, math.inf, -math.inf])
def test_nan_and_inf_numbers_refused(value):
    with pytest.raises(QuantityError, match="finite"):
        to_si(value, "length", "mm")


@pytest.mark.parametrize("text", ["nan mm", "inf mm", "-inf mm", "NaN m", "1e999 m", "Infinity kN"])
def test_nan_and_inf_text_refused(text):
    dim = "force" if "kN" in text else "length"
    with pytest.raises(QuantityError):
        to_si(text, dim)


@pytest.mark.parametrize("text, dim", [("1e308 km", "length"), ("1e307 GN", "force")])
def test_overflow_after_conversion_refused(text, dim):
    """A finite number whose SI value overflows to inf must be refused, not returned as inf."""
    with pytest.raises(QuantityError, match="finite"):
        to_si(text, dim)


def test_bare_number_overflow_refused():
    with pytest.raises(QuantityError, match="finite"):
        to_si(1e308, "length", "km")


@pytest.mark.parametrize("value", [True, None, [40, "mm"], {"v": 1}, b"40 mm"])
def test_not_a_quantity(value):
    with pytest.raises(QuantityError):
        to_si(value, "length", "mm")


def test_long_string_refused_before_parsing():
    """A string past the 40-character bound is refused by its length, before any unit parsing."""
    with pytest.raises(QuantityError, match="at most 40 characters"):
        to_si("1 " + "m*" * 500_000 + "m", "length")


POWER_TOWERS = [
    "1 m^(9^9^9)",  # a tower of powers: a number of some 370 million digits if evaluated
    "1 m^9^9^9",
    "1 m**9**9**9",
    "1 m*(99^99)^99",
    "1 mm^(9**99)",
    "1 m^999999",
]


def test_power_towers_refused():
    """Exponents are small whole powers of a unit; anything else is refused without evaluating it.
    Run in a child process with a time limit, so that a regression fails here instead of hanging the
    suite (a big-integer power cannot be interrupted in-process)."""
    import subprocess
    import sys

    code = (
        "import sys\n"
        "from pinchk.units import to_si, QuantityError\n"
        "for text in sys.argv[1:]:\n"
        "    try:\n"
        "        to_si(text, 'length')\n"
        "    except QuantityError:\n"
        "        continue\n"
        "    sys.exit('read: ' + text)\n"
    )
    from .conftest import ROOT

    p = subprocess.run([sys.executable, "-c", code, *POWER_TOWERS], cwd=ROOT, capture_output=True, text=True,
                       timeout=60)
    assert p.returncode == 0, p.stderr


@pytest.mark.parametrize("text, si", [("1 kip/in^2", KIP / IN**2), ("1 kip/in**2", KIP / IN**2),
                                      ("2 N/mm^2", 2e6), ("1 kN*m^-1*m^2", 1000.0)])
def test_small_powers_still_read(text, si):
    dim = "moment" if "m^2" in text and "kN" in text else "stress"
    assert to_si(text, dim) == pytest.approx(si, rel=1e-14)


@pytest.mark.parametrize("text", ["1 m)", "1 (m", "1 ()", "1 m^", "1 **m", "1 /", "1 m//m"])
def test_malformed_units_give_a_quantity_error(text):
    """Malformed unit text is an input error (QuantityError), never another exception."""
    with pytest.raises(QuantityError):
        to_si(text, "length")


@pytest.mark.parametrize("text", ["40 furlongz", "40 mmm", "1 _", "40 mm; rm", "４０ mm"])
def test_unknown_or_foreign_text(text):
    with pytest.raises(QuantityError):
        to_si(text, "length")


@settings(max_examples=300, deadline=None)
@given(st.text(alphabet="0123456789 .+-*/^()emkMNPainftlbsµ°", max_size=40))
def test_any_short_text_is_read_or_refused_cleanly(text):
    """Whatever a person types, the answer is a finite SI float or a QuantityError."""
    try:
        v = to_si(text, "length")
    except QuantityError:
        return
    assert math.isfinite(v)


@settings(max_examples=100, deadline=None)
@given(st.floats(min_value=-1e6, max_value=1e6, allow_nan=False))
def test_round_trip(x):
    """to_si then from_si returns the number in its unit (US and SI output units)."""
    for unit, dim in (("mm", "length"), ("in", "length"), ("kip", "force"), ("ksi", "stress"),
                      ("kip*in", "moment"), ("kN*m", "moment")):
        assert from_si(to_si(f"{x!r} {unit}", dim), dim, unit) == pytest.approx(x, rel=1e-13, abs=1e-300)


def test_an_angle_must_be_in_an_angle_unit():
    """pint takes angles as dimensionless: "30 percent" must not pass as 0.3 rad (common practice)."""
    import math

    import pytest

    from pinchk.units import QuantityError, to_si

    assert to_si("30 deg", "angle") == pytest.approx(math.radians(30), rel=1e-15)
    assert to_si("0.5 rad", "angle") == 0.5
    for bad in ("30 percent", "30", "30 dimensionless"):
        with pytest.raises(QuantityError):
            to_si(bad, "angle")
