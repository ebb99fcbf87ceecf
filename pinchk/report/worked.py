"""Worked lines of a check: its formula with each row's values put in, in the output units.

A method module gives each check its ``terms`` (symbol, kind, SI values) and its demand and capacity as
expressions in ``{symbol}`` placeholders (see pinchk.methods). This module puts one row's values into
those expressions; it computes nothing, so the figure after the last "=" is the demand or capacity the
check itself computed.
"""

from __future__ import annotations

import re

from .common import convert, fmt, unit_of

_PLACEHOLDER = re.compile(r"\{([^{}]+)\}")


def value_text(value: float, kind: str, units: dict[str, str]) -> str:
    """A figure with its unit ("20.00 mm"); ratios and factors bare; kind "area" in length units squared."""
    if kind in ("ratio", ""):
        return fmt(value)
    if kind == "area":  # an area term (a thread stress area): in the output length unit squared
        return f"{fmt(convert(convert(value, 'length', units), 'length', units))} {unit_of('length', units)}²"
    return f"{fmt(convert(value, kind, units))} {unit_of(kind, units)}"


def substitute(expr: str, terms, units: dict[str, str]) -> str:
    """``expr`` with every ``{symbol}`` replaced by that term's value in the output units."""
    vals = {sym: (kind, v) for sym, kind, v in terms}

    def put(m: re.Match) -> str:
        sym = m.group(1)
        if sym not in vals:
            return m.group(0)
        kind, v = vals[sym]
        return value_text(v, kind, units)

    return _PLACEHOLDER.sub(put, expr)


def symbolic(expr: str) -> str:
    """``expr`` with the braces of its placeholders removed: the formula in symbols."""
    return _PLACEHOLDER.sub(lambda m: m.group(1), expr)


def worked_line(expr: str, terms, result: float, kind: str, units: dict[str, str]) -> str:
    """"lhs = values put in = result" (or "lhs = result" when the right side is one term).

    Empty when the check gives no expression.
    """
    if not expr:
        return ""
    res = value_text(result, kind, units)
    lhs, eq, rhs = expr.partition(" = ")
    if not eq:
        lhs, rhs = "", expr
    rhs = rhs.strip()
    if _PLACEHOLDER.fullmatch(rhs) or rhs == fmt(result) or rhs == "1":
        body = res
    else:
        body = f"{substitute(rhs, terms, units)} = {res}"
    return f"{lhs} = {body}" if lhs else body
