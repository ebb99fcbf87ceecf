"""Joint forces from anywhere: read a forces file (CSV or JSON) into a FrameSolution, and write one.

A forces file holds, for every load case, pin and member at the pin, the force that member receives from
the pin: ``fx``, ``fy`` in the frame's plane and optionally ``fz`` along the pin. That is the quantity
``pinchk.frame.PinForces`` holds, so the checks run unchanged on forces from another analysis, a hand
calculation or a test; and a frame solve written out here reads back to the same utilizations.
The format is described in docs/jobfile.md ("Forces files").

Reading maps every row onto the job: a row naming a case, pin or member the job does not have, a
duplicate row, and a member at a pin without its row are input errors, all reported at once with their
line numbers. Member forces at a pin that do not sum to zero are flagged (``FrameSolution.warnings``):
that is how a sign or axis mistake shows.
"""

from __future__ import annotations

import bisect
import csv
import difflib
import json
import math
import os
import re
from dataclasses import dataclass, replace
from functools import lru_cache

import numpy as np

from .errors import InputError, Problem
from .frame import FrameSolution, PinForces
from .model import ForcesSource
from .units import QuantityError, check_unit, from_si, to_si

#: A forces file may be written by a program: larger than a job file, still bounded.
MAX_FILE_BYTES = 64 * 1024 * 1024
#: Problems listed one by one; beyond this many the rest are counted.
MAX_LISTED = 100
#: Warnings of unbalanced pins listed one by one; beyond this many the rest are counted.
MAX_WARNINGS = 20
#: Default limit of the sum of the member forces at a pin, as a share of its largest member force.
#: A choice of pinchk (not a code value): loose enough for forces rounded to three or four figures,
#: tight enough that a sign or axis mistake (an imbalance of the order of the force itself) shows.
DEFAULT_BALANCE_TOL = 0.01
#: JSON format tag (optional in a file; if given it must be this).
FORMAT_TAG = "pinchk-forces/1"

NAME_COLUMNS = ("case", "pin", "member")
FORCE_COLUMNS = ("fx", "fy", "fz")
REQUIRED = ("case", "pin", "member", "fx", "fy")
COLUMNS = NAME_COLUMNS + FORCE_COLUMNS + ("note",)
JSON_KEYS = ("format", "units", "rows", "job", "solver", "convention", "source", "note")
CONVENTION = ("force each member receives from the pin: fx, fy in the frame's plane, fz along the pin; "
              "at each pin the members' forces sum to zero, member 'load' carrying a load hung on the pin")

_HEADING = re.compile(r"^\s*([A-Za-z_][A-Za-z_0-9]*)\s*(?:\[\s*([^\]]*?)\s*\])?\s*$")
_WS = re.compile(r"[ \t\n\r]*")


@dataclass(frozen=True)
class ForceRow:
    """One row of a forces file, in SI [N]; ``fz`` is None where the file gives no axial component."""

    line: int | None
    case: str
    pin: str
    member: str
    fx: float
    fy: float
    fz: float | None
    ok: bool = True  # False: a force could not be read (the row still counts for the mapping)


@dataclass(frozen=True)
class ForcesTable:
    """The rows of one forces file, read and checked on their own (not yet against a job)."""

    path: str
    name: str  # how messages and the solver string call the file
    rows: tuple[ForceRow, ...]
    unit: str  # the force unit the file mostly uses, for messages about it
    header_line: int | None
    problems: tuple[Problem, ...] = ()  # found reading the file on its own


def _suggest(word: str, choices) -> str:
    near = difflib.get_close_matches(word, list(choices), n=1, cutoff=0.6)
    return f" (did you mean '{near[0]}'?)" if near else ""


def _lines_text(lines: list[int]) -> str:
    shown = ", ".join(str(n) for n in lines[:8])
    return shown + (f" and {len(lines) - 8} more" if len(lines) > 8 else "")


def _capped(problems: list[Problem], path: str) -> list[Problem]:
    if len(problems) <= MAX_LISTED:
        return problems
    rest = len(problems) - MAX_LISTED
    return problems[:MAX_LISTED] + [Problem(path, "", "", f"... and {rest} more problems like those above")]


# ----------------------------------------------------------------------------------------------- reading


@lru_cache(maxsize=64)
def _factor(unit: str) -> float:
    return to_si(1.0, "force", unit)


def _force(value, unit: str | None) -> float:
    """One force cell to N. ``unit`` is the column's unit (None: the cell must carry its own)."""
    if unit is not None and isinstance(value, str):
        try:  # the common case, a plain number in the column's unit, without the general parser
            v = float(value)
        except ValueError:
            pass
        else:
            si = v * _factor(unit)
            if math.isfinite(si) and abs(si) <= 1e30:  # else to_si below says what is wrong
                return si
    if unit is None:
        bare = isinstance(value, (int, float)) and not isinstance(value, bool)
        if isinstance(value, str):
            try:
                float(value)
                bare = True
            except ValueError:
                pass
        if bare:
            raise QuantityError(
                f"{value!r} has no unit and its column has none: give the unit in the heading "
                f"(e.g. fx [kN]), in a units row under the headings, or in the cell (e.g. \"{value} kN\")")
        return to_si(value, "force")
    return to_si(value, "force", unit)


def _force_values(line, raw_of: dict, unit_of, bad, absent: str) -> tuple[dict[str, float | None], bool]:
    """The force components of one row: ``raw_of[col]`` is the cell ("" or None when absent), read in
    ``unit_of(col)``; problems go to ``bad``. A bad or absent required component is NaN and the row not ok."""
    vals: dict[str, float | None] = {}
    ok = True
    for col in FORCE_COLUMNS:
        raw = raw_of[col]
        if raw is None or raw == "":
            if col in REQUIRED:
                bad(line, col, f"{absent}: give the force component {col} (0 if there is none)")
                ok = False
            vals[col] = math.nan if col in REQUIRED else None
            continue
        try:
            vals[col] = _force(raw, unit_of(col))
        except QuantityError as exc:
            bad(line, col, str(exc))
            ok = False
            vals[col] = math.nan
    return vals, ok


def read_table(path: str, name: str | None = None) -> tuple[ForcesTable | None, list[Problem]]:
    """Read a forces file (CSV or JSON by its extension) on its own, without a job.

    Returns the table (None if it cannot be read at all) and every problem found.
    """
    name = name or path
    ext = os.path.splitext(path)[1].lower()
    if ext not in (".csv", ".json"):
        return None, [Problem(path, "", "", f"a forces file is a .csv or a .json file; cannot tell the format "
                                            f"of '{os.path.basename(path)}' from its extension")]
    try:
        size = os.path.getsize(path)
        if size > MAX_FILE_BYTES:
            return None, [Problem(path, "", "", f"the file is {size} bytes; a forces file may be at most "
                                                f"{MAX_FILE_BYTES} bytes")]
        with open(path, "rb") as fh:
            text = fh.read().decode("utf-8-sig")
    except UnicodeDecodeError:
        return None, [Problem(path, "", "", "the file is not UTF-8 text; save the forces file as UTF-8 CSV or JSON")]
    except OSError as exc:
        return None, [Problem(path, "", "", f"cannot read the forces file: {exc.strerror}")]
    if ext == ".csv":
        return parse_csv(text, path, name)
    return parse_json(text, path, name)


def parse_csv(text: str, path: str = "<forces>", name: str | None = None) -> tuple[ForcesTable | None, list[Problem]]:
    """Read forces-file CSV text (see docs/jobfile.md): headings, an optional units row, one row per force."""
    probs: list[Problem] = []

    def bad(line, field, msg):
        probs.append(Problem(path, "", field, msg, line))

    lines = text.splitlines(keepends=True)
    # comment lines become blank lines, so csv's line numbers stay those of the file
    clean = ["\n" if ln.lstrip().startswith("#") else ln for ln in lines]
    first = next((ln for ln in clean if ln.strip()), "")
    delim = ";" if (";" in first and "," not in first) else ","
    reader = csv.reader(clean, delimiter=delim)
    records: list[tuple[int, list[str]]] = []
    try:
        for cells in reader:
            if any(c.strip() for c in cells):
                records.append((reader.line_num, cells))
    except csv.Error as exc:
        return None, [Problem(path, "", "", f"not a readable CSV file: {exc}", reader.line_num)]
    if not records:
        return None, [Problem(path, "", "", "the forces file is empty; it needs a heading row "
                                            "case,pin,member,fx [unit],fy [unit] and one row per force")]

    head_line, head = records[0]
    cols: dict[str, int] = {}
    unit: dict[str, str | None] = {}
    blank_cols: list[int] = []
    for i, cell in enumerate(head):
        if not cell.strip():
            blank_cols.append(i)
            continue
        m = _HEADING.match(cell)
        if not m:
            bad(head_line, cell.strip(), f"'{cell.strip()}' is not a column heading: write a name, with the unit "
                                         f"of a force column in brackets, e.g. fx [kN]")
            continue
        col, u = m.group(1).lower(), m.group(2)
        if col not in COLUMNS:
            bad(head_line, col, f"unknown column '{col}'{_suggest(col, COLUMNS)}; columns are: {', '.join(COLUMNS)}")
            continue
        if col in cols:
            bad(head_line, col, f"the column '{col}' is given twice")
            continue
        cols[col] = i
        if u is not None:
            if col not in FORCE_COLUMNS:
                bad(head_line, col, f"only the force columns ({', '.join(FORCE_COLUMNS)}) take a unit; "
                                    f"remove '[{u}]'")
                u = None
            else:
                try:
                    u = check_unit(u, "force")
                except QuantityError as exc:
                    bad(head_line, col, str(exc))
                    u = None
        unit[col] = u
    missing = [c for c in REQUIRED if c not in cols]
    if missing:
        bad(head_line, missing[0], f"missing column(s) {', '.join(missing)}: the first row must name the columns "
                                   f"case,pin,member,fx [unit],fy [unit] (fz [unit] and note are optional)")
        return None, probs

    def cell(cells: list[str], col: str) -> str:
        i = cols.get(col)
        return cells[i].strip() if i is not None and i < len(cells) else ""

    body = records[1:]
    # a units row: right under the headings, with empty case, pin and member cells
    if body and not any(cell(body[0][1], c) for c in NAME_COLUMNS):
        u_line, u_cells = body.pop(0)
        for col in FORCE_COLUMNS:
            text_u = cell(u_cells, col)
            if col not in cols or not text_u:
                continue
            try:
                text_u = check_unit(text_u, "force")
            except QuantityError as exc:
                bad(u_line, col, f"{exc} (a row with empty case, pin and member right under the headings is "
                                 f"read as the units row)")
                continue
            if unit.get(col) is not None and unit[col] != text_u:
                bad(u_line, col, f"the heading gives the unit {unit[col]} and the units row {text_u}; give it once")
                continue
            unit[col] = text_u

    rows: list[ForceRow] = []
    for line, cells in body:
        ok = True
        for i in blank_cols:
            if i < len(cells) and cells[i].strip():
                bad(line, f"column {i + 1}", f"'{cells[i].strip()}' is in a column with no heading; "
                                             "name the column or remove the value")
                ok = False
        if len(cells) > len(head) and any(c.strip() for c in cells[len(head):]):
            bad(line, f"column {len(head) + 1}", f"the row has {len(cells)} cells but there are {len(head)} "
                                                 f"headings; check for a stray '{delim}'")
            ok = False
        names = {}
        named = True
        for col in NAME_COLUMNS:
            names[col] = cell(cells, col)
            if not names[col]:
                bad(line, col, f"empty: every row names its {', '.join(NAME_COLUMNS)}")
                named = False
        vals, vals_ok = _force_values(line, {col: cell(cells, col) for col in FORCE_COLUMNS}, unit.get, bad,
                                      "empty")
        ok = ok and vals_ok
        if named:
            rows.append(ForceRow(line, names["case"], names["pin"], names["member"], vals["fx"], vals["fy"],
                                 vals["fz"], ok))
    if not body and not probs:
        bad(head_line, "", "the forces file has headings but no rows of forces")
    probs = _capped(probs, path)
    return ForcesTable(path, name or path, tuple(rows), unit.get("fx") or "N", head_line, tuple(probs)), probs


def _json_row_lines(text: str) -> list[int]:
    """Line number of each element of the top-level "rows" array (json keeps none). ``text`` is valid JSON."""
    newlines = [m.start() for m in re.finditer("\n", text)]

    def line_at(i: int) -> int:
        return bisect.bisect_left(newlines, i) + 1

    dec = json.JSONDecoder()
    i = _WS.match(text, 0).end()
    out: list[int] = []
    if text[i:i + 1] != "{":
        return out
    i += 1
    while True:
        i = _WS.match(text, i).end()
        if text[i] == "}":
            return out
        key, i = json.decoder.scanstring(text, i + 1)
        i = _WS.match(text, i).end() + 1  # the colon
        i = _WS.match(text, i).end()
        if key == "rows" and text[i] == "[":
            found: list[int] = []
            i += 1
            while True:
                i = _WS.match(text, i).end()
                if text[i] == "]":
                    i += 1
                    break
                found.append(line_at(i))
                _, i = dec.raw_decode(text, i)
                i = _WS.match(text, i).end()
                if text[i] == ",":
                    i += 1
            out = found  # a repeated key: json keeps the last one, and so does this
        else:
            _, i = dec.raw_decode(text, i)
        i = _WS.match(text, i).end()
        if text[i] == ",":
            i += 1


def parse_json(text: str, path: str = "<forces>", name: str | None = None) -> tuple[ForcesTable | None, list[Problem]]:
    """Read forces-file JSON text: {"units": {"force": "kN"}, "rows": [{case, pin, member, fx, fy}, ...]}."""
    probs: list[Problem] = []

    def bad(line, field, msg, table=""):
        probs.append(Problem(path, table, field, msg, line))

    try:
        data = json.loads(text)
    except json.JSONDecodeError as exc:
        return None, [Problem(path, "", "", f"not valid JSON: {exc.msg} (column {exc.colno})", exc.lineno)]
    except RecursionError:
        return None, [Problem(path, "", "", "not a forces file: the JSON is nested too deeply")]
    if not isinstance(data, dict):
        return None, [Problem(path, "", "", "expected a JSON object {\"units\": {...}, \"rows\": [...]}")]
    for k in data:
        if k not in JSON_KEYS:
            bad(None, k, f"unknown key '{k}'{_suggest(k, JSON_KEYS)}; keys are: {', '.join(JSON_KEYS)}")
    if "format" in data and data["format"] != FORMAT_TAG:
        bad(None, "format", f"expected \"{FORMAT_TAG}\", got {data['format']!r}: is this a forces file?")
    unit: dict[str, str | None] = dict.fromkeys(FORCE_COLUMNS)
    ut = data.get("units", {})
    if not isinstance(ut, dict):
        bad(None, "units", f"expected an object such as {{\"force\": \"kN\"}}, got {ut!r}")
        ut = {}
    for k, u in ut.items():
        if k not in ("force",) + FORCE_COLUMNS:
            bad(None, f"units.{k}", f"unknown unit key '{k}'; give \"force\" (for fx, fy, fz) or fx, fy, fz")
            continue
        try:
            u = check_unit(u, "force")
        except QuantityError as exc:
            bad(None, f"units.{k}", str(exc))
            continue
        for col in (FORCE_COLUMNS if k == "force" else (k,)):
            if k == "force" and ut.get(col) is not None:
                continue  # a column's own unit wins over "force"
            unit[col] = u
    rows_t = data.get("rows")
    if not isinstance(rows_t, list):
        bad(None, "rows", "missing or not a list: give \"rows\": [{\"case\": ..., \"pin\": ..., \"member\": ..., "
                          "\"fx\": ..., \"fy\": ...}, ...]")
        return None, probs
    if not rows_t:
        bad(None, "rows", "the forces file has no rows of forces")
    lines = _json_row_lines(text)
    if len(lines) != len(rows_t):
        lines = [None] * len(rows_t)
    rows: list[ForceRow] = []
    for n, (t, line) in enumerate(zip(rows_t, lines, strict=True), start=1):
        where = f"rows[{n - 1}]"
        if not isinstance(t, dict):
            bad(line, where, f"expected an object with case, pin, member, fx, fy; got {t!r}"[:200])
            continue
        ok = named = True
        for k in t:
            if k not in COLUMNS:
                bad(line, k, f"unknown key '{k}'{_suggest(k, COLUMNS)}; a row has: {', '.join(COLUMNS)}")
                ok = False
        names = {}
        for col in NAME_COLUMNS:
            v = t.get(col)
            if not isinstance(v, str) or not v.strip():
                bad(line, col, f"missing or not a name: every row names its {', '.join(NAME_COLUMNS)}, got {v!r}")
                named = False
            else:
                names[col] = v.strip()
        raw = {col: (v.strip() if isinstance(v, str) else v) for col in FORCE_COLUMNS for v in [t.get(col)]}
        vals, vals_ok = _force_values(line, raw, unit.get, bad, "missing")
        ok = ok and vals_ok
        if named:
            rows.append(ForceRow(line, names["case"], names["pin"], names["member"], vals["fx"], vals["fy"],
                                 vals["fz"], ok))
    probs = _capped(probs, path)
    return ForcesTable(path, name or path, tuple(rows), unit["fx"] or "N", None, tuple(probs)), probs


# ----------------------------------------------------------------------------------------------- mapping


def to_solution(table: ForcesTable, cases: tuple[str, ...], pins: dict[str, tuple[str, ...] | None],
                required: set[str], balance_tol: float = DEFAULT_BALANCE_TOL, job_path: str = "<job>",
                line_of=lambda table: None) -> tuple[FrameSolution | None, list[Problem]]:
    """Map the rows of ``table`` onto a job's cases and pins.

    Args:
        cases: the job's load cases, in order.
        pins: each pin of the job, with the members meeting it in order (None: any members).
        required: pins that must have rows (those with plates to check).
        balance_tol: flag a pin whose member forces sum to more than this share of its largest one.
        job_path, line_of: the job file and a function giving the line of one of its tables, for the
            problems that are about the job (a case or a pin with no rows).

    Returns:
        The solution (None if there are problems) and the problems, all of them.
    """
    probs: list[Problem] = list(table.problems)
    path = table.path
    unknown: dict[tuple[str, str], list[int | None]] = {}  # (field, message) -> lines
    seen: dict[tuple[str, str, str], int | None] = {}
    got: dict[tuple[str, str], dict[str, ForceRow]] = {}
    case_line: dict[str, int | None] = {}
    pin_cases: dict[str, set[str]] = {}
    for row in table.rows:
        if row.case not in cases:
            key = ("case", f"there is no load case '{row.case}' in the job{_suggest(row.case, cases)}; its cases: "
                           f"{', '.join(cases) or '(none)'}; declare [case.{row.case}] in the job file or correct "
                           f"the name")
        elif row.pin not in pins:
            key = ("pin", f"the job has no pin '{row.pin}'{_suggest(row.pin, pins)}; its pins: "
                          f"{', '.join(pins) or '(none)'}")
        elif pins[row.pin] is not None and row.member not in pins[row.pin]:
            there = pins[row.pin]
            key = ("member", f"'{row.member}' does not meet pin {row.pin} in the job{_suggest(row.member, there)}; "
                             f"members there: {', '.join(there)}")
        else:
            key = None
        if key is not None:
            unknown.setdefault(key, []).append(row.line)
            continue
        k3 = (row.case, row.pin, row.member)
        if k3 in seen:
            first = f" at line {seen[k3]}" if seen[k3] is not None else ""
            probs.append(Problem(path, "", "member", (
                f"duplicate row: case '{row.case}', pin '{row.pin}', member '{row.member}' is already given{first}; "
                f"give each member's force once per pin and case (add up its parts if it has several)"), row.line))
            continue
        seen[k3] = row.line
        got.setdefault((row.pin, row.case), {})[row.member] = row
        case_line.setdefault(row.case, row.line)
        pin_cases.setdefault(row.pin, set()).add(row.case)
    for (field, msg), lines in unknown.items():
        also = f" (rows at lines {_lines_text(lines)})" if len(lines) > 1 and lines[0] is not None else ""
        probs.append(Problem(path, "", field, msg + also, lines[0]))

    if table.rows:
        for c in cases:
            if c not in case_line:
                probs.append(Problem(job_path, f"case.{c}", "", (
                    f"load case '{c}' has no rows in the forces file {table.name}; add its rows or remove the "
                    f"case"), line_of(f"case.{c}")))
    for p in pins:
        if p not in pin_cases:
            if p in required:
                need = f" ({', '.join(pins[p])})" if pins[p] else ""
                probs.append(Problem(job_path, f"pin.{p}", "", (
                    f"pin {p} has plates to check but no rows in the forces file {table.name}; give the force of "
                    f"each of its members{need} in every load case"), line_of(f"pin.{p}")))
            continue
        for c in cases:
            if c not in case_line:
                continue  # reported once for the case
            have = got.get((p, c), {})
            if not have:
                probs.append(Problem(path, "", "pin", (
                    f"load case '{c}' has no rows for pin {p}, which has rows in other cases; give the force of each "
                    f"of its members in every case"), case_line[c]))
                continue
            want = pins[p] if pins[p] is not None else _order(got, p, cases)
            miss = [m for m in want if m not in have]
            if miss:
                at = sorted(r.line for r in have.values() if r.line is not None)
                at = f"line {at[0]}" if len(at) == 1 else f"lines {_lines_text(at)}"
                probs.append(Problem(path, "", "member", (
                    f"pin {p}, case '{c}': no force given for member(s) {', '.join(miss)} (this pin's rows in this "
                    f"case: {at}); every member at a pin needs its row, with 0 if it carries nothing"),
                    min((r.line for r in have.values() if r.line is not None), default=None)))
    probs.sort(key=lambda q: (q.file != path, q.line if q.line is not None else 0))  # stable: file-wide first
    if probs:
        return None, _capped(probs, path)
    return _build(table, cases, pins, got, pin_cases, balance_tol), []


def _order(got, pin: str, cases) -> tuple[str, ...]:
    """Members of a pin the job leaves open, in the order the file first gives them."""
    rows = sorted((r for c in cases for r in got.get((pin, c), {}).values()),
                  key=lambda r: r.line if r.line is not None else 0)
    return tuple(dict.fromkeys(r.member for r in rows))


def _build(table, cases, pins, got, pin_cases, tol) -> FrameSolution:
    nc = len(cases)
    out: dict[str, PinForces] = {}
    for p in pins:
        if p not in pin_cases:
            continue
        members = pins[p] if pins[p] is not None else _order(got, p, cases)
        f = np.zeros((nc, len(members), 2))
        fz = np.zeros((nc, len(members)))
        has_axial = False
        for j, c in enumerate(cases):
            for k, m in enumerate(members):
                r = got[(p, c)][m]
                f[j, k] = (r.fx, r.fy)
                if r.fz is not None:
                    fz[j, k] = r.fz
                    has_axial = True
        out[p] = PinForces(p, tuple(members), f, fz if has_axial else None)
    warnings, residual = balance(out, cases, tol, table.unit, table.name, got)
    warnings += axial_notes(out, cases, table.unit)
    return FrameSolution(tuple(cases), out, {}, {}, residual, f"forces file {table.name}", tuple(warnings))


def balance(pins: dict[str, PinForces], cases, tol: float, unit: str = "N", name: str = "",
            got=None) -> tuple[list[str], float]:
    """Warnings for every pin and case whose member forces do not sum to zero, and the largest imbalance.

    The imbalance is |sum of the members' forces| (with fz where given) over the largest member force
    at that pin and case.
    """
    warnings: list[str] = []
    worst = 0.0
    flagged = 0
    for p, pf in pins.items():
        s = pf.force.sum(axis=1)  # (n_case, 2)
        mag2 = (pf.force ** 2).sum(axis=-1)
        sz = np.zeros(len(cases))
        if pf.axial is not None:
            sz = pf.axial.sum(axis=1)
            mag2 = mag2 + pf.axial ** 2
        big = np.sqrt(mag2.max(axis=1, initial=0.0))
        off = np.sqrt((s ** 2).sum(axis=-1) + sz ** 2)
        rel = np.where(big > 0, off / np.where(big > 0, big, 1.0), 0.0)
        worst = max(worst, float(rel.max(initial=0.0)))
        for j in np.flatnonzero(rel > tol):
            flagged += 1
            if flagged > MAX_WARNINGS:
                continue
            c = cases[j]
            comps = f"(fx, fy) = ({_g(s[j, 0], unit)}, {_g(s[j, 1], unit)})"
            if pf.axial is not None:
                comps = f"(fx, fy, fz) = ({_g(s[j, 0], unit)}, {_g(s[j, 1], unit)}, {_g(sz[j], unit)})"
            lines = ""
            if got is not None:
                ln = sorted(r.line for r in got[(p, c)].values() if r.line is not None)
                lines = f" (forces file {name}, lines {_lines_text(ln)})" if ln else f" (forces file {name})"
            warnings.append(
                f"pin {p}, case '{c}': the member forces do not balance{lines}: they sum to {comps} {unit}, "
                f"|sum| {_g(off[j], unit)} {unit} = {100 * rel[j]:.3g}% of the largest member force "
                f"(limit {100 * tol:g}%). At a pin the members' forces sum to zero, member 'load' carrying any "
                f"load hung on the pin; check the signs (force each member receives from the pin) and the axes")
    if flagged > MAX_WARNINGS:
        warnings.append(f"... and {flagged - MAX_WARNINGS} more pins and cases whose member forces do not balance")
    return warnings, worst


def axial_notes(pins: dict[str, PinForces], cases, unit: str = "N") -> list[str]:
    """A note for every pin given an axial force: it is reported, and no method here checks it."""
    out = []
    for p, pf in pins.items():
        if pf.axial is None or not np.any(pf.axial):
            continue
        j, k = np.unravel_index(np.argmax(np.abs(pf.axial)), pf.axial.shape)
        out.append(
            f"pin {p}: the forces file gives forces along the pin (largest |fz| {_g(abs(pf.axial[j, k]), unit)} "
            f"{unit}, member {pf.members[k]}, case '{cases[j]}'); they are reported but not checked, since no "
            f"method here covers them (EN 1993-1-8 §3.13 and AISC 360-16 §D5 check in-plane forces): secure the "
            f"pin against working loose (EN 1993-1-8 §3.13.1), and check its retainer and the plates' "
            f"out-of-plane bending separately")
    return out


def _g(v: float, unit: str) -> str:
    return f"{float(from_si(v, 'force', unit)):.4g}"


def source_pins(job, pin_tables: dict, frame_known: bool) -> tuple[dict[str, tuple[str, ...] | None], set[str]]:
    """Members expected at each pin of ``job`` and the pins that must have rows.

    With a frame (bodies), the members are those the frame puts at the pin (bodies, links, "ground",
    "load"); without one, those the pin's plates name. ``pin_tables`` are the job's raw [pin.*] tables,
    so a pin whose stack failed to read still counts. ``frame_known`` False: the frame had problems of
    its own, so its members are not trusted (any member is accepted until those are fixed).
    """
    pins: dict[str, tuple[str, ...] | None] = {}
    required: set[str] = set()
    frame_members: dict[str, list[str]] = {}
    if job.bodies and frame_known:
        from .frame import members_at_pins

        frame_members = members_at_pins(job)
    for name, t in pin_tables.items():
        plates = t.get("plate", []) if isinstance(t, dict) else []
        plates = plates if isinstance(plates, list) else []
        if plates:
            required.add(name)
        if job.bodies:
            pins[name] = tuple(frame_members[name]) if name in frame_members else None
        elif plates:
            named = [p.get("member") for p in plates if isinstance(p, dict)]
            pins[name] = (tuple(dict.fromkeys(m for m in named if isinstance(m, str)))
                          if all(isinstance(m, str) for m in named) else None)
        else:
            pins[name] = None
    return pins, required


def attach(job, table: ForcesTable, pin_tables: dict, frame_known: bool, line_of) -> tuple[object, list[Problem]]:
    """The job with its forces mapped from ``table`` (``job.forces`` names the file): (job, problems)."""
    pins, required = source_pins(job, pin_tables, frame_known)
    sol, probs = to_solution(table, tuple(job.cases), pins, required, job.forces.balance_tol, job.path, line_of)
    if sol is None:
        return job, probs
    if job.bodies:
        extra, checked = body_balance(job, sol, job.forces.balance_tol, table.unit)
        if job.loads or job.supports:  # never leave input unused without a word
            extra.append(
                f"the frame is not solved: the forces come from the forces file {table.name}; the job's bodies, "
                f"links, supports and loads ({len(job.loads)} given) say which members meet each pin, and serve "
                f"only to check that each body whose every force is known balances (checked: "
                f"{', '.join(checked) or 'none'})")
        sol = replace(sol, warnings=sol.warnings + tuple(extra))
    return replace(job, forces=replace(job.forces, solution=sol)), []


def body_balance(job, sol: FrameSolution, tol: float, unit: str = "N") -> tuple[list[str], list[str]]:
    """Warnings for every body or link of ``job`` that the forces of ``sol`` leave out of balance, and the
    names of the bodies and links checked.

    A body is checked when every force on it is known: those it receives at its pins (from ``sol``)
    and the job's loads on it. A body with a support or a link end at one of its points is skipped
    (the forces file does not give those). Moments are taken about the centre of the body's forces.
    """
    nc = len(sol.cases)
    case_ix = {c: j for j, c in enumerate(sol.cases)}
    parts: dict[str, list] = {}  # name -> [(xy, F (nc, 2), M (nc,))]; None once a force is unknown

    def add(name, xy, f, m=None):
        if parts.get(name, []) is not None:
            parts.setdefault(name, []).append((np.asarray(xy, float), f, np.zeros(nc) if m is None else m))

    for pname, pin in job.pins.items():
        pf = sol.pins.get(pname)
        for b in pin.bodies:
            if pf is None:
                parts[b] = None
            else:
                add(b, pin.xy, pf.force[:, pf.members.index(b)])
    for lname, link in job.links.items():
        for end in link.ends:
            if end.pin is None:
                parts[end.body] = None
                parts[lname] = None
            elif end.pin in sol.pins:
                pf = sol.pins[end.pin]
                add(lname, end.xy, pf.force[:, pf.members.index(lname)])
            else:
                parts[lname] = None
    for s in job.supports.values():
        if s.at.pin is None:
            parts[s.at.body] = None
    for ld in job.loads:
        body = ld.body if ld.body is not None else ld.at.body
        if body is None:
            continue  # a load hung on a pin is member "load" there
        f = np.zeros((nc, 2))
        m = np.zeros(nc)
        f[case_ix[ld.case]] = ld.force
        m[case_ix[ld.case]] = ld.moment
        add(body, ld.at.xy, f, m)

    out: list[str] = []
    checked: list[str] = []
    for name, items in parts.items():
        if not items or name not in job.bodies and name not in job.links:
            continue
        checked.append(name)
        xy = np.array([it[0] for it in items])
        o = xy.mean(axis=0)
        size = max(float(np.linalg.norm(xy - o, axis=1).max()), 1e-9)
        F = sum(it[1] for it in items)
        M = sum((it[0][0] - o[0]) * it[1][:, 1] - (it[0][1] - o[1]) * it[1][:, 0] + it[2] for it in items)
        scale = np.max([np.linalg.norm(it[1], axis=1) for it in items] + [np.abs(it[2]) / size for it in items],
                       axis=0)
        off = np.maximum(np.linalg.norm(F, axis=1), np.abs(M) / size)
        rel = np.where(scale > 0, off / np.where(scale > 0, scale, 1.0), 0.0)
        what = "body" if name in job.bodies else "link"
        for j in np.flatnonzero(rel > tol):
            out.append(
                f"{what} {name}, case '{sol.cases[j]}': the forces it receives at its pins (from the forces file), "
                f"with the job's loads on it, do not balance: they sum to (Fx, Fy) = ({_g(F[j, 0], unit)}, "
                f"{_g(F[j, 1], unit)}) {unit} and M = {_g(M[j], unit)} {unit}·m about ({o[0]:g}, {o[1]:g}) m, "
                f"{100 * rel[j]:.3g}% of its largest force (limit {100 * tol:g}%); check the file against the frame")
    return out, checked


def source_of(r, data: dict, path: str):
    """[forces] of a job file: the forces file the job reads instead of solving a frame.

    ``r`` is the job-file reader (pinchk.jobfile), which collects the problems. Returns the
    ForcesSource and the file's table (both None when the job names no forces file).
    """
    if "forces" not in data:
        return None, None
    ft = r.table(data, "forces", "")
    r.keys("forces", ft, "forces")
    file = r.text_field("forces", ft, "file", required=True)
    tol = ft.get("balance_tol", DEFAULT_BALANCE_TOL)
    if isinstance(tol, bool) or not isinstance(tol, (int, float)) or not 0 < tol < 1:
        r.bad("forces", "balance_tol", f"a share of the largest member force, 0 < balance_tol < 1 (e.g. 0.01 "
              f"for 1%); got {tol!r}")
        tol = DEFAULT_BALANCE_TOL
    if file is None:
        return ForcesSource("", "", float(tol)), None
    full = os.path.join(os.path.dirname(path), file)
    if any(k in data for k in ("link", "support", "load")) and "body" not in data:
        r.bad("forces", "file", "the job has links, supports or loads but no bodies to attach them to; a job "
              "that reads a forces file needs no frame: remove them, or describe the bodies")
    table, problems = read_table(full, file)
    if table is None:  # else attach() reports the file's problems with those of the mapping
        for p in problems:  # say where the file was named
            r.c.problems.append(p if p.line is not None or p.field else
                                Problem(p.file, p.table, p.field, f"{p.message} (named in [forces] file of {path})"))
    return ForcesSource(file, full, float(tol)), table


def joint_forces(job) -> FrameSolution:
    """The joint forces of ``job``: read from its forces file if it names one, else solved from its frame."""
    if job.forces is not None:
        return job.forces.solution
    from .solve import solve  # statics, or stiffness for an indeterminate frame

    return solve(job)


# ----------------------------------------------------------------------------------------------- writing


def format_of(path: str) -> str:
    """"csv" or "json" from a file name's extension; InputError for any other."""
    ext = os.path.splitext(path)[1].lower()
    if ext in (".csv", ".json"):
        return ext[1:]
    raise InputError(Problem(path, "", "--forces-out", (
        f"cannot tell the format of '{os.path.basename(path)}' from its extension; end the name with .csv or "
        f".json")))


def _values(sol: FrameSolution, unit: str):
    """Rows (case, pin, member, fx, fy, fz | None) in ``unit``; solver round-off below 1e-12 of the
    largest force is written as 0, and -0 as 0."""
    scale = max([float(np.abs(pf.force).max(initial=0.0)) for pf in sol.pins.values()] + [0.0])
    tiny = 1e-12 * scale

    def clean(v: float) -> float:
        return float(from_si(v, "force", unit)) + 0.0 if abs(v) > tiny else 0.0

    for j, c in enumerate(sol.cases):
        for p, pf in sol.pins.items():
            for k, m in enumerate(pf.members):
                fz = None if pf.axial is None else clean(pf.axial[j, k])
                yield c, p, m, clean(pf.force[j, k, 0]), clean(pf.force[j, k, 1]), fz


def render_forces(sol: FrameSolution, fmt: str, unit: str = "kN", title: str = "") -> str:
    """The joint forces of ``sol`` as a forces file (``fmt`` "csv" or "json") in the force ``unit``."""
    axial = any(pf.axial is not None for pf in sol.pins.values())
    title = " ".join(str(title).split())
    if fmt == "json":
        rows = []
        for c, p, m, fx, fy, fz in _values(sol, unit):
            r = {"case": c, "pin": p, "member": m, "fx": fx, "fy": fy}
            if fz is not None:
                r["fz"] = fz
            rows.append(json.dumps(r, ensure_ascii=False))
        head = {"format": FORMAT_TAG, "job": title, "solver": sol.solver, "convention": CONVENTION,
                "units": {"force": unit}}
        text = json.dumps(head, indent=2, ensure_ascii=False)[:-2]
        return text + ',\n  "rows": [\n    ' + ",\n    ".join(rows) + "\n  ]\n}\n"
    import io

    buf = io.StringIO()
    buf.write("# pinchk joint forces (a forces file: see docs/jobfile.md, \"Forces files\")\n")
    buf.write(f"# job: {title}; from: {' '.join(sol.solver.split())}\n")
    buf.write(f"# {CONVENTION}\n")
    plain = csv.writer(buf, lineterminator="\n")
    quoted = csv.writer(buf, lineterminator="\n", quoting=csv.QUOTE_ALL)
    plain.writerow(["case", "pin", "member", f"fx [{unit}]", f"fy [{unit}]"] + ([f"fz [{unit}]"] if axial else []))
    for c, p, m, fx, fy, fz in _values(sol, unit):
        row = [c, p, m, repr(fx), repr(fy)] + ([repr(fz) if fz is not None else ""] if axial else [])
        # a case name starting with '#' or a space would read back as a comment or lose its space
        (quoted if c[:1] in ("#", " ") else plain).writerow(row)
    return buf.getvalue()
