"""The one unit registry of pinchk: quantities are parsed to SI floats here and formatted here.

Everything past this module works on plain SI floats and numpy arrays (m, N, Pa, N*m, kg, rad).
"""

from __future__ import annotations

import math
import os
import re
from functools import lru_cache

import pint


def _registry() -> pint.UnitRegistry:
    """pint's full default registry, read from pint's own cache of its parsed definitions if it can.

    Parsing pint's definitions file is most of a short run's start-up (about 0.15 s); pint keeps the
    parsed result in a cache folder of the user's (cache_folder=":auto:", keyed by the definitions'
    content, so a new pint version parses afresh). The registry is the same either way. Set the
    environment variable PINCHK_UNIT_CACHE=0 to parse every time; any failure of the cache (a folder
    that cannot be written, a damaged file) falls back to parsing.
    """
    if os.environ.get("PINCHK_UNIT_CACHE", "1") != "0":
        try:
            return pint.UnitRegistry(cache_folder=":auto:")
        except Exception:  # noqa: BLE001 - the cache is only an optimisation
            pass
    return pint.UnitRegistry()


ureg = _registry()
ureg.formatter.default_format = "~"

#: SI unit of each dimension pinchk reads.
SI_UNIT = {
    "length": "m",
    "force": "N",
    "stress": "Pa",
    "moment": "N*m",
    "mass": "kg",
    "angle": "rad",
    "section area": "m^2",  # section area of a member (stiffness solve)
    "second moment of area": "m^4",  # second moment of area of a member's section (stiffness solve)
}

#: The units an angle may be written in (pint holds angles dimensionless, so they are named here).
ANGLE_UNITS = frozenset({"deg", "degree", "degrees", "rad", "radian", "radians", "°"})

#: Output unit systems: the unit printed for each kind of figure.
UNIT_SYSTEMS = {
    "SI": {"length": "mm", "force": "kN", "stress": "MPa", "moment": "kN*m", "mass": "t", "angle": "deg"},
    "US": {"length": "in", "force": "kip", "stress": "ksi", "moment": "kip*in", "mass": "lb", "angle": "deg"},
}

#: Standard acceleration of gravity, CGPM 1901 (exact), used only where a job gives a load as a mass.
G0 = 9.80665

# A quantity string is a number and a short unit expression: bounded so a crafted string cannot make
# the parser work for long (at most 40 characters, digits, letters, space and . + - * / ^ ( ) only).
_MAX_LEN = 40
_ALLOWED = re.compile(r"^[0-9A-Za-z.+\-*/^() µ°]+$")
# A unit expression starts with a unit name or a bracket, and holds no '.' (no unit name has one)
_UNIT_START = re.compile(r"^[A-Za-zµ°(]")
# Products of a few SI magnitudes must stay finite in double precision, so every magnitude read is
# bounded ("1e306 t" is a finite number but its weight overflows to infinity); sizes, which divide,
# are also bounded below (MIN_SIZE, applied by the job-file reader).
_MAX_SI = 1e30
MIN_SIZE = 1e-30


class QuantityError(ValueError):
    """A quantity could not be read; the message says what was expected."""


# A power is a unit name raised to a small whole number (mm^2, in**-1). pint evaluates exponent
# expressions, so a tower such as m^(9^9^9), short as it is, would compute a number of millions of
# digits: every power operator must match this before pint sees the text.
_POWER_OP = re.compile(r"\^|\*\*")
_POWER_OK = re.compile(r"[A-Za-zµ°]\s*(?:\^|\*\*)\s*[+-]?\d{1,2}(?![\d.])(?!\s*(?:\^|\*\*))")


@lru_cache(maxsize=256)
def _unit_factor(unit_text: str, dim: str) -> float:
    """SI factor of a unit expression, checked for dimension (cached: a job repeats its units)."""
    packed = "".join(unit_text.split())
    if "." in packed or not _UNIT_START.match(packed):  # pint reads ".m" and "..mm" as m and mm
        raise QuantityError(f"'{unit_text}' is not a unit pinchk reads; write for example {_example(dim)}")
    if len(_POWER_OP.findall(unit_text)) != len(_POWER_OK.findall(unit_text)):
        raise QuantityError(
            f"'{unit_text}': a power must be a unit raised to a whole number of at most two digits, "
            f"such as mm^2 or in**2"
        )
    q = ureg.Quantity(1.0, unit_text)
    if dim == "angle" and unit_text.strip() not in ANGLE_UNITS:
        # pint takes an angle as dimensionless, so "30 percent" would pass as 0.3 rad: name the unit
        raise QuantityError(f"'{unit_text}' is not a unit of angle; write the angle in "
                            f"{' or '.join(sorted(ANGLE_UNITS)[:4])}, for example \"30 deg\"")
    try:
        return float(q.to(SI_UNIT[dim]).magnitude)
    except pint.DimensionalityError:
        raise QuantityError(
            f"'{unit_text}' is a unit of {_dim_name(q)}, but a {dim} is needed (for example "
            f"{_example(dim)})"
        ) from None


def _dim_name(q: pint.Quantity) -> str:
    for name, unit in SI_UNIT.items():
        if q.check(ureg.Quantity(1.0, unit).dimensionality):
            return name
    return str(q.dimensionality)


def _example(dim: str) -> str:
    return {
        "length": '"40 mm" or "1.5 in"',
        "force": '"120 kN" or "25 kip"',
        "stress": '"355 MPa" or "50 ksi"',
        "moment": '"12 kN*m" or "100 kip*in"',
        "mass": '"2.5 t" or "5000 lb"',
        "angle": '"30 deg"',
        "section area": '"5380 mm^2" or "8.34 in^2"',
        "second moment of area": '"8.36e7 mm^4" or "201 in^4"',
    }[dim]


_NUMBER = re.compile(r"^\s*([+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?)\s*(.*?)\s*$")


def to_si(value: object, dim: str, default_unit: str | None = None) -> float:
    """Read one quantity into an SI float.

    Args:
        value: a string with a unit ("40 mm"), or a bare number taken in ``default_unit``.
        dim: the dimension the field needs, a key of ``SI_UNIT``.
        default_unit: the job's declared unit for bare numbers of this dimension, if any.

    Raises:
        QuantityError: the value is not a finite quantity of the right dimension.
    """
    if isinstance(value, bool):
        raise QuantityError(f"expected a {dim} such as {_example(dim)}, got {value!r}")
    if isinstance(value, (int, float)):
        number = float(value)
        if default_unit is None:
            raise QuantityError(
                f"the bare number {value!r} has no unit and the job declares no default {dim} unit; "
                f"write it with its unit, for example {_example(dim)}, or set [units] {dim}"
            )
        unit_text = default_unit
    elif isinstance(value, str):
        if len(value) > _MAX_LEN or not _ALLOWED.match(value):
            shown = value if len(value) <= _MAX_LEN else value[:_MAX_LEN] + "..."
            raise QuantityError(
                f"{shown!r} is not a quantity pinchk reads: write a number and a unit, "
                f"for example {_example(dim)} (at most {_MAX_LEN} characters)"
            )
        m = _NUMBER.match(value)
        if not m:
            raise QuantityError(f"{value!r} does not start with a number; write for example {_example(dim)}")
        number = float(m.group(1))
        unit_text = m.group(2)
        if not unit_text:
            if default_unit is None:
                raise QuantityError(
                    f"{value!r} has no unit and the job declares no default {dim} unit; "
                    f"write for example {_example(dim)}"
                )
            unit_text = default_unit
    else:
        raise QuantityError(f"expected a {dim} such as {_example(dim)}, got {value!r}")
    if not math.isfinite(number):
        raise QuantityError(f"{value!r} is not a finite number")
    try:
        factor = _unit_factor(unit_text.strip(), dim)
    except QuantityError:
        raise
    except Exception as exc:  # pint's parser raises many kinds (TokenError, AssertionError, ...)
        raise QuantityError(
            f"{unit_text!r} is not a unit pinchk knows ({type(exc).__name__}); write for example {_example(dim)}"
        ) from None
    si = number * factor
    if not math.isfinite(si) or abs(si) > _MAX_SI:
        raise QuantityError(
            f"{value!r} is too large: pinchk computes with finite magnitudes of at most 1e30 "
            f"{SI_UNIT[dim]}; check the value and its unit"
        )
    return si


def check_unit(unit_text: str, dim: str) -> str:
    """Validate a unit name given for a dimension (the job's default units); returns it."""
    if not isinstance(unit_text, str) or len(unit_text) > _MAX_LEN or not _ALLOWED.match(unit_text):
        raise QuantityError(f"expected a unit of {dim} such as {_example(dim).split()[1]}..., got {unit_text!r}")
    try:
        _unit_factor(unit_text, dim)
    except QuantityError:
        raise
    except Exception:
        raise QuantityError(f"{unit_text!r} is not a unit pinchk knows") from None
    return unit_text


def from_si(value, dim: str, unit: str):
    """Convert an SI float or array to ``unit`` (a unit of ``dim``)."""
    return value / _unit_factor(unit, dim)


def unit_label(unit: str) -> str:
    """Short printed form of a unit name ("kN*m" -> "kN·m")."""
    return unit.replace("*", "·")
