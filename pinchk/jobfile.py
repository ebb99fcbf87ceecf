"""Read a TOML job file into the model, reporting every problem with its file, table and field.

The format is described in docs/jobfile.md. Quantities are parsed to SI here and nowhere else.
"""

from __future__ import annotations

import difflib
import math
import os
import tomllib
from typing import Any

from . import materials, sections
from .errors import Collector, InputError, Problem
from .model import (
    GROUND,
    PIN_LOAD,
    Body,
    Bushing,
    Case,
    Job,
    Lateral,
    Link,
    Load,
    Material,
    MethodChoice,
    Pin,
    Place,
    Plate,
    Support,
)
from .units import G0, MIN_SIZE, UNIT_SYSTEMS, QuantityError, check_unit, to_si

MAX_FILE_BYTES = 4 * 1024 * 1024  # a job file is text typed by a person; anything larger is refused

KEYS = {
    "": {"job", "units", "method", "material", "section", "body", "pin", "link", "support", "case", "load",
         "forces", "combination", "lift_factors"},
    "forces": {"file", "balance_tol"},
    "job": {"title", "output_units", "number", "revision", "prepared_by", "checked_by", "date", "client",
            "solver"},
    "units": set(UNIT_SYSTEMS["SI"]),
    "method": {"name", "design", "factors"},
    "material": {"fy", "fu", "E", "source"},
    "body": {"points", "description", "section", "members"},
    "pin": {"joins", "at", "diameter", "hole", "material", "replaceable", "rotates", "plate", "description",
            "secured", "bolt", "thread_pitch", "thread_planes", "thread_plates", "pin_model", "wear", "retainer"},
    "plate": {"member", "thickness", "material", "width", "end", "shape", "gap", "hole", "share", "en_type",
              "stiffened", "axis", "arc_centre", "radius", "outline", "base", "base_width", "group", "bushing_od",
              "bushing_material", "lateral", "lateral_force"},
    "link": {"ends", "kind", "description", "EA"},
    "support": {"at", "kind", "normal", "description"},
    "case": {"description", "limit_state"},
    "load": {"case", "at", "body", "force", "angle", "mass", "moment", "label"},
}
RESERVED = {GROUND, PIN_LOAD}


def suggest(word: str, choices) -> str:
    near = difflib.get_close_matches(word, list(choices), n=1, cutoff=0.6)
    return f" (did you mean '{near[0]}'?)" if near else ""


def _line_of(text: str, table: str, field: str) -> int | None:
    """Best-effort line number of ``field`` in its table (tomllib keeps none).

    ``table`` is a table's dotted name, or "NAME #k" for the k-th of an array of tables [[NAME]]. The
    field is looked for from the table's header up to the next header; if it is not there (a missing
    field), the header's line is given.
    """
    lines = text.splitlines()
    name, _, nth = table.partition(" #")
    k = int(nth) if nth.isdigit() else 1
    start = -1
    if name:
        seen = 0
        for i, ln in enumerate(lines):
            s = ln.split("#", 1)[0].replace(" ", "").replace("\t", "")
            if s in (f"[{name}]", f"[[{name}]]"):
                seen += 1
                if seen == k:
                    start = i
                    break
        else:
            return None
    key = field.split(".", 1)[0]
    for i in range(start + 1, len(lines)):
        s = lines[i].lstrip()
        if s.startswith("["):
            break
        if key and (s.startswith(key + " ") or s.startswith(key + "=")):
            return i + 1
    return start + 1 if name else None


class _Reader:
    """Reads one job file; every helper records a problem instead of raising."""

    def __init__(self, path: str, text: str):
        self.path = path
        self.text = text
        self.c = Collector(path)
        self.default_units: dict[str, str] = {}
        # names ("body", "body.point", "pin") whose own table had a problem already reported: a reference
        # to one is not reported again, so one mistake gives one message, not a cascade
        self.unreadable: set[str] = set()
        self.misspelt: set[tuple[str, str]] = set()  # (table, field) a misspelt name stands for

    def bad(self, table: str, field: str, message: str) -> None:
        if message.startswith("missing") and (table, field) in self.misspelt:
            return  # already reported: the field is there, misspelt, and the message says so
        self.c.add(table, field, message, _line_of(self.text, table, field))

    def keys(self, table: str, data: dict, kind: str) -> None:
        for k in data:
            if k not in KEYS[kind]:
                near = difflib.get_close_matches(k, list(KEYS[kind]), n=1, cutoff=0.6)
                if near and near[0] not in data:
                    self.misspelt.add((table, near[0]))
                self.bad(table, k, f"unknown field '{k}'{suggest(k, KEYS[kind])}; "
                         f"fields here are: {', '.join(sorted(KEYS[kind]))}")

    def table(self, data: dict, key: str, where: str) -> dict:
        v = data.get(key, {})
        if not isinstance(v, dict):
            self.bad(where, key, f"expected a table [{key}], got {type(v).__name__}")
            return {}
        return v

    def qty(self, table: str, data: dict, field: str, dim: str, required: bool = True,
            positive: bool = False, nonneg: bool = False) -> float | None:
        if field not in data:
            if required:
                self.bad(table, field, f"missing required field '{field}' (a {dim})")
            return None
        try:
            v = to_si(data[field], dim, self.default_units.get(dim))
        except QuantityError as exc:
            self.bad(table, field, str(exc))
            return None
        if positive and not v > 0:
            self.bad(table, field, f"must be greater than zero, got {data[field]!r}")
            return None
        if positive and v < MIN_SIZE:  # sizes divide: 1e-200 mm would make d**2 vanish
            self.bad(table, field, f"{data[field]!r} is too small for pinchk to compute with "
                     f"(at least {MIN_SIZE:g} in SI units); check the value and its unit")
            return None
        if nonneg and v < 0:
            self.bad(table, field, f"must not be negative, got {data[field]!r}")
            return None
        return v

    def text_field(self, table: str, data: dict, field: str, choices=None, default=None, required=False):
        if field not in data:
            if required:
                self.bad(table, field, f"missing required field '{field}'"
                         + (f"; one of: {', '.join(choices)}" if choices else ""))
            return default
        v = data[field]
        if not isinstance(v, str):
            self.bad(table, field, f"expected text, got {v!r}")
            return default
        if choices is not None and v not in choices:
            self.bad(table, field, f"'{v}' is not one of: {', '.join(choices)}{suggest(v, choices)}")
            return default
        return v

    def flag(self, table: str, data: dict, field: str) -> bool:
        v = data.get(field, False)
        if not isinstance(v, bool):
            self.bad(table, field, f"expected true or false, got {v!r}")
            return False
        return v

    def name_ok(self, table: str, name: str) -> bool:
        if name in RESERVED:
            self.bad(table, "", f"'{name}' is a reserved member name; choose another name")
            return False
        if "." in name:
            self.bad(table, "", f"a name may not contain '.', got '{name}'")
            return False
        return True


def load_job(path: str | os.PathLike) -> Job:
    """Read and validate a job file.

    Raises:
        InputError: listing every problem found, each with file, table and field.
    """
    path = str(path)
    try:
        size = os.path.getsize(path)
    except OSError as exc:
        raise InputError(Problem(path, "", "", f"cannot read the job file: {exc.strerror}")) from None
    if size > MAX_FILE_BYTES:
        raise InputError(Problem(path, "", "", f"the file is {size} bytes; a job file may be at most "
                                 f"{MAX_FILE_BYTES} bytes"))
    try:
        with open(path, "rb") as fh:
            raw = fh.read()
        text = raw.decode("utf-8")
    except UnicodeDecodeError:
        raise InputError(Problem(path, "", "", "the file is not UTF-8 text; a job file is a TOML text file")) from None
    except OSError as exc:
        raise InputError(Problem(path, "", "", f"cannot read the job file: {exc.strerror}")) from None
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise InputError(Problem(path, "", "", f"not a valid TOML file: {exc}")) from None
    if not data:
        raise InputError(Problem(path, "", "", "the file is empty; a job needs at least [job], [method], "
                                 "[body.*], [case.*] and [[load]] (see docs/jobfile.md)"))
    return parse_job(data, path, text)


def parse_job(data: dict[str, Any], path: str = "<job>", text: str = "") -> Job:
    """Build a Job from the parsed TOML tables (see ``load_job``)."""
    r = _Reader(path, text)
    r.keys("", data, "")

    # [units]: default units of bare numbers
    units = r.table(data, "units", "")
    r.keys("units", units, "units")
    for dim, u in units.items():
        if dim in KEYS["units"]:
            try:
                r.default_units[dim] = check_unit(u, dim)
            except QuantityError as exc:
                r.bad("units", dim, str(exc))

    # [job]
    jt = r.table(data, "job", "")
    if "job" not in data:
        r.bad("job", "", "missing table [job] (with at least title = \"...\")")
    r.keys("job", jt, "job")
    title = r.text_field("job", jt, "title", default="(untitled job)")
    output_units = r.text_field("job", jt, "output_units", choices=list(UNIT_SYSTEMS), default="SI")
    info = {k: str(v) for k, v in jt.items() if k in KEYS["job"] - {"title", "output_units", "solver"}}
    solver = r.text_field("job", jt, "solver", choices=list(sections.SOLVER_CHOICES), default="auto")

    method = _method(r, data)
    job_materials = _materials(r, data)
    # a job that names a forces file needs no frame; without bodies its pins join nothing
    from .forcesfile import attach, source_of

    forces, forces_table = source_of(r, data, path)
    frameless = forces is not None and "body" not in data
    bodies = sections.attach_to_bodies(r, data, _bodies(r, data, required=forces is None),
                                       sections.read_sections(r, data))
    cases = _cases(r, data)
    pin_tables = r.table(data, "pin", "")
    pins_partial = _pins_frame(r, pin_tables, bodies) if not frameless else _pins_frameless(r, pin_tables)
    links = sections.attach_to_links(r, data, _links(r, data, bodies, pins_partial)) if not frameless else {}
    supports = _supports(r, data, bodies, pins_partial, required=forces is None) if not frameless else {}
    loads = _loads(r, data, bodies, pins_partial, cases, required=forces is None) if not frameless else []
    pins = _pins_stack(r, pin_tables, pins_partial, links, supports, loads, job_materials, frameless, cases)
    _names_and_connections(r, data, solved_here=forces is None)
    _modulus_where_needed(r, data, method, pins)
    from . import jobfile_lifting

    combos = jobfile_lifting.combinations(r, data, cases)
    members = set(bodies) | set(links) | {GROUND, PIN_LOAD} | {pl.member for p in pins.values() for pl in p.stack}
    stack_factors = jobfile_lifting.stack_factors(r, data, combos, cases, pins, members)

    job = Job(path=path, title=title, method=method, output_units=output_units, bodies=bodies, pins=pins,
              links=links, supports=supports, loads=tuple(loads), cases=cases, info=info, forces=forces,
              combinations=combos, stack_factors=stack_factors, solver=solver)
    if forces_table is not None:
        job, problems = attach(job, forces_table, pin_tables, not r.c.problems,
                               lambda table: _line_of(text, table, ""))
        r.c.problems += problems
    r.c.raise_if_any()
    return job


def _modulus_where_needed(r: _Reader, data: dict, method: MethodChoice, pins: dict[str, Pin]) -> None:
    """A job material must give E where the method uses it, not take steel's 210 GPa unasked.

    EN 1993-1-8 eq (3.15) (contact stress of a replaceable pin) is the only check that uses E.
    """
    own = data.get("material") if isinstance(data.get("material"), dict) else {}
    if method.name != "EN 1993-1-8":
        return
    told: set[str] = set()
    for pname, pin in pins.items():
        if not pin.replaceable:
            continue
        for i, plate in enumerate(pin.stack, start=1):
            m = plate.material
            t = own.get(m.name) if m is not None else None
            if isinstance(t, dict) and "E" not in t and m.name not in told:
                told.add(m.name)
                r.bad(f"material.{m.name}", "E", f"material {m.name} gives no modulus E, and the contact "
                      f"stress check of EN 1993-1-8 eq (3.15) needs it (replaceable pin {pname}, plate #{i}); "
                      "give it, e.g. E = \"210 GPa\" for steel")


def _names_and_connections(r: _Reader, data: dict, solved_here: bool = True) -> None:
    """A pin's name must not be a body's or a link's; every body and pin must be held by something
    (when the frame is solved here: a job that reads its forces from a file needs no connections).

    Read from the raw tables, so a body whose pin or link has some other mistake is not reported
    again as unconnected.
    """
    def names(kind: str) -> list[str]:
        t = data.get(kind)
        return [k for k, v in t.items() if isinstance(v, dict)] if isinstance(t, dict) else []

    bodies, links = set(names("body")), set(names("link"))
    for pin in names("pin"):
        for other, kind in ((bodies, "body"), (links, "link")):
            if pin in other:
                r.bad(f"pin.{pin}", "", f"the name '{pin}' is used by a {kind} too; names of bodies, links "
                      "and pins must be unique")
    cases = set(names("case"))
    for combo in names("combination"):  # the results' case column would not say which is meant
        if combo in cases:
            r.bad(f"combination.{combo}", "", f"the name '{combo}' is used by a load case too; name the "
                  "combination differently")
    if not solved_here:
        return
    used: set[str] = set()
    refs: list[object] = []
    for kind, field in (("pin", "joins"), ("link", "ends"), ("support", "at")):
        t = data.get(kind)
        for v in (t.values() if isinstance(t, dict) else []):
            if isinstance(v, dict):
                ref = v.get(field)
                refs += ref if isinstance(ref, list) else [ref]
    for ref in refs:
        if isinstance(ref, str) and "." in ref:
            used.add(ref.partition(".")[0])
    for body in names("body"):
        if body not in used:
            r.bad(f"body.{body}", "", f"body {body} is connected to nothing: no pin joins it, no link ends "
                  "on it and no support holds it; join it to the structure or remove it")
    met = {ref for ref in refs if isinstance(ref, str) and "." not in ref}
    for pin in names("pin"):
        if not data["pin"][pin].get("joins") and pin not in met:
            r.bad(f"pin.{pin}", "", f"pin {pin} is connected to nothing: it joins no body, and no link or "
                  "support meets it")


def _method(r: _Reader, data: dict) -> MethodChoice:
    from .methods import METHODS

    mt = r.table(data, "method", "")
    if "method" not in data:
        r.bad("method", "name", f"missing table [method]; name one of: {', '.join(METHODS)}")
        return MethodChoice("EN 1993-1-8", None, {})
    r.keys("method", mt, "method")
    name = r.text_field("method", mt, "name", choices=list(METHODS), required=True)
    if name is None:
        return MethodChoice("EN 1993-1-8", None, {})
    m = METHODS[name]
    design = None
    if m.VARIANTS:
        design = r.text_field("method", mt, "design", choices=list(m.VARIANTS), default=m.VARIANTS[0])
    elif "design" in mt:
        r.bad("method", "design", f"{name} has no design variants; remove 'design'")
    factors: dict[str, float] = {}
    ft = r.table(mt, "factors", "method")
    for k, v in ft.items():
        if k not in m.FACTORS:
            r.bad("method.factors", k, f"unknown factor '{k}' for {name}{suggest(k, m.FACTORS)}; "
                  f"factors: {', '.join(m.FACTORS)}")
        elif isinstance(v, bool) or not isinstance(v, (int, float)) or not math.isfinite(v) or v <= 0:
            r.bad("method.factors", k, f"a factor must be a finite number greater than zero, got {v!r}")
        elif not 1e-3 <= v <= 1e3:  # a typo, not a factor: 1e308 made every capacity overflow
            r.bad("method.factors", k, f"a factor must lie between 0.001 and 1000, got {v!r}")
        else:
            factors[k] = float(v)
    return MethodChoice(name, design, factors)


def _materials(r: _Reader, data: dict) -> dict[str, Material]:
    out: dict[str, Material] = {}
    for name, t in r.table(data, "material", "").items():
        where = f"material.{name}"
        if not isinstance(t, dict):
            r.bad(where, "", "expected a table with fy, fu, E and source")
            continue
        r.keys(where, t, "material")
        fy = r.qty(where, t, "fy", "stress", positive=True)
        fu = r.qty(where, t, "fu", "stress", positive=True)
        E = r.qty(where, t, "E", "stress", required=False, positive=True)
        source = r.text_field(where, t, "source", required=True)
        if fy is not None and fu is not None and fy > fu:
            r.bad(where, "fy", "the yield strength fy exceeds the tensile strength fu; check the values")
        if None not in (fy, fu, source):
            out[name] = Material(name, fy, fu, E if E is not None else 210e9, source)
    return out


def _xy(r: _Reader, where: str, field: str, v) -> tuple[float, float] | None:
    if not isinstance(v, list) or len(v) != 2:
        r.bad(where, field, f"expected a pair of coordinates [x, y], got {v!r}")
        return None
    out = []
    for comp in v:
        try:
            out.append(to_si(comp, "length", r.default_units.get("length")))
        except QuantityError as exc:
            r.bad(where, field, str(exc))
            return None
    return (out[0], out[1])


def _bodies(r: _Reader, data: dict, required: bool = True) -> dict[str, Body]:
    out: dict[str, Body] = {}
    bt = r.table(data, "body", "")
    pt = data.get("pin")
    own_place = isinstance(pt, dict) and any(isinstance(t, dict) and "at" in t for t in pt.values())
    if not bt and required and not own_place:
        r.bad("body", "", "no bodies: describe at least one [body.NAME] with its points (or, for links "
              "only, pins at places of their own, at = [x, y])")
    for name, t in bt.items():
        where = f"body.{name}"
        if not isinstance(t, dict):
            r.bad(where, "", "expected a table with points = { NAME = [x, y], ... }")
            continue
        r.name_ok(where, name)
        r.keys(where, t, "body")
        pts = t.get("points")
        if not isinstance(pts, dict) or not pts:
            r.bad(where, "points", "missing or empty: give points = { A = [x, y], B = [x, y] }")
            continue
        points = {}
        for pn, v in pts.items():
            xy = _xy(r, where, f"points.{pn}", v)
            if xy is not None:
                points[pn] = xy
            else:
                r.unreadable.add(f"{name}.{pn}")
        out[name] = Body(name, points)
    r.unreadable.update(n for n in bt if n not in out)
    return out


def _cases(r: _Reader, data: dict) -> dict[str, Case]:
    out: dict[str, Case] = {}
    ct = r.table(data, "case", "")
    if not ct:
        r.bad("case", "", "no load cases: declare at least one [case.NAME]")
    for name, t in ct.items():
        where = f"case.{name}"
        if not isinstance(t, dict):
            r.bad(where, "", "expected a table (it may be empty)")
            continue
        r.keys(where, t, "case")
        out[name] = Case(name, r.text_field(where, t, "description", default=""),
                         r.text_field(where, t, "limit_state", choices=["ULS", "SLS"], default="ULS"))
    return out


def _ref(r: _Reader, where: str, field: str, ref, bodies: dict[str, Body], pins: dict | None) -> Place | None:
    """Resolve "body.point" or a pin name to a Place."""
    if not isinstance(ref, str):
        r.bad(where, field, f"expected \"body.point\" or a pin name, got {ref!r}")
        return None
    if ref in r.unreadable or ref.partition(".")[0] in r.unreadable:
        return None
    if "." in ref:
        bname, _, pname = ref.partition(".")
        if bname not in bodies:
            r.bad(where, field, f"'{ref}': there is no body '{bname}'{suggest(bname, bodies)}")
            return None
        if pname not in bodies[bname].points:
            r.bad(where, field, f"'{ref}': body {bname} has no point '{pname}'"
                  f"{suggest(pname, bodies[bname].points)}; its points: {', '.join(bodies[bname].points)}")
            return None
        return Place(bname, pname, None, bodies[bname].points[pname])
    if pins is not None and ref in pins:
        return Place(None, None, ref, pins[ref]["xy"])
    what = "\"body.point\" or a pin name" if pins is not None else "\"body.point\""
    r.bad(where, field, f"'{ref}' is not a {what}{suggest(ref, list(pins or {}))}")
    return None


def _pins_frame(r: _Reader, pt: dict, bodies: dict[str, Body]) -> dict[str, dict]:
    """First pass over pins: where each is and which bodies it joins."""
    out: dict[str, dict] = {}
    for name, t in pt.items():
        where = f"pin.{name}"
        if not isinstance(t, dict):
            r.bad(where, "", "expected a table with joins = [\"body.point\", ...]")
            continue
        r.name_ok(where, name)
        r.keys(where, t, "pin")
        joins = t.get("joins", [])
        if not isinstance(joins, list) or not (joins or "at" in t):
            r.bad(where, "joins", "missing: list the body points this pin joins, e.g. joins = [\"boom.C\", "
                  "\"strut.C\"], or give the pin's place as at = [x, y] when only links and supports meet it")
            continue
        places = [_ref(r, where, "joins", j, bodies, None) for j in joins]
        if any(p is None for p in places):
            continue
        if "at" in t:
            xy = _xy(r, where, "at", t["at"])
            if xy is None:
                continue
        else:
            xy = places[0].xy
        size = max([1.0, *map(abs, xy)] + [abs(c) for p in places for c in p.xy])
        for p in places:
            if math.dist(p.xy, xy) > 1e-9 * size:
                r.bad(where, "joins", f"the points it joins are not at one place: the pin is at "
                      f"({xy[0]:g}, {xy[1]:g}) m and {p.label} at ({p.xy[0]:g}, {p.xy[1]:g}) m")
                break
        names = [p.body for p in places]
        if len(set(names)) != len(names):
            r.bad(where, "joins", "a body is listed twice; a pin joins each body once")
            continue
        out[name] = {"xy": xy, "bodies": tuple(names)}
    for name, t in pt.items():
        if name not in out:
            r.unreadable.add(name)
            if isinstance(t, dict):  # its place could not be read; its sizes still can be
                r.qty(f"pin.{name}", t, "diameter", "length", required=False, positive=True)
                r.qty(f"pin.{name}", t, "hole", "length", required=False, positive=True)
    return out


def _pins_frameless(r: _Reader, pt: dict) -> dict[str, dict]:
    """Pins of a job without a frame (it reads a forces file): each joins nothing; its members are named
    by its plates and by the forces file."""
    out: dict[str, dict] = {}
    for name, t in pt.items():
        where = f"pin.{name}"
        if not isinstance(t, dict):
            r.bad(where, "", "expected a table with diameter, hole, material and [[pin.NAME.plate]]")
            continue
        r.name_ok(where, name)
        r.keys(where, t, "pin")
        if "joins" in t:
            r.bad(where, "joins", "this job has no bodies (it reads its forces from a forces file), so a pin "
                  "joins nothing; remove 'joins': the members at the pin are named by its plates")
        xy = _xy(r, where, "at", t["at"]) if "at" in t else (0.0, 0.0)  # where it is, for the record only
        out[name] = {"xy": xy or (0.0, 0.0), "bodies": ()}
    return out


def _links(r: _Reader, data: dict, bodies, pins) -> dict[str, Link]:
    out: dict[str, Link] = {}
    for name, t in r.table(data, "link", "").items():
        where = f"link.{name}"
        if not isinstance(t, dict):
            r.bad(where, "", "expected a table with ends = [A, B]")
            continue
        r.name_ok(where, name)
        if name in bodies:
            r.bad(where, "", f"the name '{name}' is used by a body too; names must be unique")
        r.keys(where, t, "link")
        kind = r.text_field(where, t, "kind", choices=["link", "cable"], default="link")
        ends = t.get("ends")
        if not isinstance(ends, list) or len(ends) != 2:
            r.bad(where, "ends", "expected two ends, e.g. ends = [\"boom.B\", \"P4\"]")
            continue
        places = [_ref(r, where, "ends", e, bodies, pins) for e in ends]
        if None in places:
            continue
        if math.dist(places[0].xy, places[1].xy) <= 1e-9:
            r.bad(where, "ends", "the two ends are at the same place; a link needs a length")
            continue
        out[name] = Link(name, kind, (places[0], places[1]))
    r.unreadable.update(n for n in r.table(data, "link", "") if n not in out)
    return out


def _supports(r: _Reader, data: dict, bodies, pins, required: bool = True) -> dict[str, Support]:
    out: dict[str, Support] = {}
    at_pin: dict[str, str] = {}
    st = r.table(data, "support", "")
    for name, t in st.items():
        where = f"support.{name}"
        if not isinstance(t, dict):
            r.bad(where, "", "expected a table with at = ... and kind = ...")
            continue
        r.keys(where, t, "support")
        kind = r.text_field(where, t, "kind", choices=["pinned", "roller", "fixed"], required=True)
        place = _ref(r, where, "at", t.get("at"), bodies, pins) if "at" in t else None
        if "at" not in t:
            r.bad(where, "at", "missing: where the support is, \"body.point\" or a pin name")
        if kind is None or place is None:
            continue
        normal = None
        if kind == "roller":
            n = t.get("normal")
            if (not isinstance(n, list) or len(n) != 2
                    or not all(isinstance(c, (int, float)) and not isinstance(c, bool) and math.isfinite(c) for c in n)
                    or math.hypot(*n) == 0):
                r.bad(where, "normal", f"a roller needs normal = [nx, ny], the direction of its reaction, "
                      f"not zero; got {n!r}")
                continue
            h = math.hypot(*n)
            normal = (n[0] / h, n[1] / h)
        elif "normal" in t:
            r.bad(where, "normal", f"only a roller has a normal; a {kind} support takes none")
        if place.pin is not None:
            if kind == "fixed":
                r.bad(where, "kind", "a pin turns freely, so a support at a pin cannot be fixed; "
                      "fix a body point instead, or make it pinned")
                continue
            if place.pin in at_pin:
                r.bad(where, "at", f"pin {place.pin} already has support {at_pin[place.pin]}; one support per pin")
                continue
            at_pin[place.pin] = name
        out[name] = Support(name, kind, place, normal)
    for name, t_ in st.items():  # a support that could not be read leaves its pin's "ground" unchecked
        if name not in out and isinstance(t_, dict) and isinstance(t_.get("at"), str):
            r.unreadable.add(f"{GROUND}@{t_['at']}")
    if not st and (bodies or pins) and required:
        r.bad("support", "", "no supports: a frame needs at least one [support.NAME] to stand on")
    return out


def _loads(r: _Reader, data: dict, bodies, pins, cases, required: bool = True) -> list[Load]:
    out: list[Load] = []
    lt = data.get("load", [])
    if not isinstance(lt, list):
        r.bad("load", "", "expected an array of tables [[load]]")
        return out
    if not lt and required:
        r.bad("load", "", "no loads: add at least one [[load]]")
    for i, t in enumerate(lt, start=1):
        where = f"load #{i}"
        if not isinstance(t, dict):
            r.bad(where, "", "expected a table")
            continue
        r.keys(where, t, "load")
        case = r.text_field(where, t, "case", required=True)
        if case is not None and case not in cases:
            r.bad(where, "case", f"there is no load case '{case}'{suggest(case, cases)}; "
                  f"declared cases: {', '.join(cases) or '(none)'}")
            case = None
        place = _ref(r, where, "at", t.get("at"), bodies, pins) if "at" in t else None
        if "at" not in t:
            r.bad(where, "at", "missing: where the load acts, \"body.point\" or a pin name")
        body = r.text_field(where, t, "body")
        if body is not None and place is not None:
            if place.pin is None:
                r.bad(where, "body", "'body' is only for a load at a pin; at a body point the body is already named")
            elif body not in pins[place.pin]["bodies"]:
                r.bad(where, "body", f"body '{body}' is not joined by pin {place.pin}; it joins "
                      f"{', '.join(pins[place.pin]['bodies'])}")
        given = [k for k in ("force", "mass") if k in t]
        if len(given) > 1:
            r.bad(where, "mass", "give either force or mass, not both")
        fx = fy = 0.0
        ok = True
        if "force" in t:
            f = t["force"]
            if isinstance(f, list):
                if len(f) != 2 or "angle" in t:
                    r.bad(where, "force", "give force = [Fx, Fy], or force = \"F\" with angle = \"θ deg\"")
                    ok = False
                else:
                    try:
                        fx, fy = (to_si(c, "force", r.default_units.get("force")) for c in f)
                    except QuantityError as exc:
                        r.bad(where, "force", str(exc))
                        ok = False
            else:
                mag = r.qty(where, t, "force", "force", nonneg=True)
                ang = r.qty(where, t, "angle", "angle")
                if mag is None or ang is None:
                    ok = False
                else:
                    fx, fy = mag * math.cos(ang), mag * math.sin(ang)
        elif "mass" in t:
            m = r.qty(where, t, "mass", "mass", nonneg=True)
            if m is None:
                ok = False
            else:
                fy = -m * G0  # weight of the mass, straight down (-y), standard gravity
            if "angle" in t:
                r.bad(where, "angle", "a mass loads straight down (-y); remove 'angle' or give a force")
        moment = r.qty(where, t, "moment", "moment", required=False) or 0.0
        if "force" not in t and "mass" not in t and "moment" not in t:
            r.bad(where, "force", "a load needs a force, a mass or a moment")
            ok = False
        if moment and place is not None and place.pin is not None and body is None:
            r.bad(where, "moment", "a pin turns freely and takes no moment; put the moment on a body")
            ok = False
        if ok and case is not None and place is not None:
            out.append(Load(case, place, (fx, fy), moment, body, str(t.get("label", ""))))
    return out


def _material(r: _Reader, where: str, field: str, name, size: float, own: dict[str, Material]) -> Material | None:
    if not isinstance(name, str):
        r.bad(where, field, f"expected a material name, got {name!r}")
        return None
    if name in own:
        return own[name]
    lib = materials.library()
    if name not in lib:
        r.bad(where, field, f"unknown material '{name}'{suggest(name, list(lib) + list(own))}; define it "
              f"under [material.{name}] or use one of: {', '.join(lib)}")
        return None
    try:
        return materials.at_size(name, size)
    except ValueError as exc:
        r.bad(where, field, str(exc))
        return None


def _pins_stack(r: _Reader, pt: dict, frame: dict, links, supports, loads, own, frameless=False,
                cases=None) -> dict[str, Pin]:
    """Second pass over pins: size, material and the stack of plates, checked against the frame (without
    a frame, pinchk.forcesfile checks the plates' members against the forces file)."""
    at_pin: dict[str, set[str]] = {n: set(f["bodies"]) for n, f in frame.items()}
    for ln, link in links.items():
        for e in link.ends:
            if e.pin in at_pin:
                at_pin[e.pin].add(ln)
    for s in supports.values():
        if s.at.pin in at_pin:
            at_pin[s.at.pin].add(GROUND)
    for ld in loads:
        if ld.at.pin in at_pin and ld.body is None:
            at_pin[ld.at.pin].add(PIN_LOAD)

    out: dict[str, Pin] = {}
    for name, f in frame.items():
        t = pt[name]
        where = f"pin.{name}"
        plates_t = t.get("plate", [])
        if not isinstance(plates_t, list):
            r.bad(where, "plate", f"expected [[pin.{name}.plate]] tables, one per plate in stack order")
            plates_t = []
        d = r.qty(where, t, "diameter", "length", required=bool(plates_t), positive=True)
        hole = r.qty(where, t, "hole", "length", required=bool(plates_t), positive=True)
        if d is not None and hole is not None and hole < d:
            r.bad(where, "hole", f"the hole ({t['hole']}) is smaller than the pin ({t['diameter']}); "
                  "the hole must be at least the pin diameter")
        mat = grade = None
        if "bolt" in t and "material" in t:
            r.bad(where, "bolt", "give either material (a pin) or bolt (a bolt grade), not both")
        elif "bolt" in t and d is not None:
            from .jobfile_lifting import bolt_material

            grade, mat = bolt_material(r, where, t, d)
        elif "bolt" not in t and any(k in t for k in ("thread_pitch", "thread_planes", "thread_plates")):
            r.bad(where, "bolt", "thread fields are for a bolt used as a pin: give bolt = \"GRADE\" too")
        elif plates_t:
            if "material" not in t:
                r.bad(where, "material", "missing: the pin's material, or bolt = \"GRADE\" for a bolt")
            elif d is not None:
                mat = _material(r, where, "material", t["material"], d, own)
        stack: list[Plate] = []
        for i, p in enumerate(plates_t, start=1):
            pw = f"pin.{name}.plate #{i}"
            if not isinstance(p, dict):
                r.bad(pw, "", "expected a table")
                continue
            r.keys(pw, p, "plate")
            member = r.text_field(pw, p, "member", required=True)
            if member is not None and (member in r.unreadable or f"{member}@{name}" in r.unreadable):
                member = None  # its own table had a problem, already reported
            elif member is not None and not frameless and member not in at_pin[name]:
                r.bad(pw, "member", f"'{member}' does not meet pin {name}{suggest(member, at_pin[name])}; "
                      f"members here: {', '.join(sorted(at_pin[name]))}")
                member = None
            th = r.qty(pw, p, "thickness", "length", positive=True)
            gap = r.qty(pw, p, "gap", "length", required=False) or 0.0
            if gap < 0:
                r.bad(pw, "gap", f"a negative gap ({p['gap']!r}) would make this plate overlap the one before "
                      "it; plates are listed in order along the pin and the gap is the clear space to the "
                      "previous plate, zero or more")
            ph = r.qty(pw, p, "hole", "length", required=False, positive=True)
            ph = ph if ph is not None else hole
            if ph is not None and d is not None and ph < d:
                r.bad(pw, "hole", "the plate's hole is smaller than the pin")
            share = None
            if "share" in p:
                s = p["share"]
                if isinstance(s, bool) or not isinstance(s, (int, float)) or not 0 < s <= 1:
                    r.bad(pw, "share", f"a share is a fraction of the member's force, 0 < share <= 1; got {s!r}")
                else:
                    share = float(s)
            checked = member != PIN_LOAD
            pmat = width = end = None
            shape, en_type = "round", "A"
            extra: dict = {}
            if checked and member is not None:
                if "material" not in p:
                    r.bad(pw, "material", "missing: the plate's material")
                elif th is not None:
                    pmat = _material(r, pw, "material", p["material"], th, own)
                shape = r.text_field(pw, p, "shape", choices=["round", "square", "polygon"], default="round")
                offset = shape == "round" and ("arc_centre" in p or "radius" in p)
                width = r.qty(pw, p, "width", "length", required=shape != "polygon", positive=True)
                end = r.qty(pw, p, "end", "length", required=shape != "polygon" and not offset, positive=True)
                en_type = r.text_field(pw, p, "en_type", choices=["A", "B"], default="A")
                if ph is not None and width is not None and width <= ph:
                    r.bad(pw, "width", f"the plate ({p['width']}) is not wider than its hole; "
                          "nothing is left beside it")
                if ph is not None and end is not None and end <= ph / 2 and not offset:
                    r.bad(pw, "end", f"the end distance ({p['end']}) lies inside the hole; it is measured from "
                          "the hole centre and must exceed half the hole diameter")
                extra = _lug_fields(r, pw, p, shape, width, end, ph, th, own, cases or {})
                if shape == "polygon":
                    width = end = 0.0  # the outline gives the geometry
                elif extra is not None and extra["outline"] is not None:
                    end = extra["outline"].end
            elif member is not None:
                for k in KEYS["plate"] - {"member", "thickness", "gap", "hole", "share"}:
                    if k in p:
                        r.bad(pw, k, f"'{k}' is for a checked plate; the '{PIN_LOAD}' member is not checked")
            if None in (member, th, ph) or (checked and None in (pmat, width, end)) or extra is None:
                continue
            stack.append(Plate(member, th, gap, share, pmat, width, end, shape, ph, en_type,
                               r.flag(pw, p, "stiffened"), **extra))
        if plates_t and len(stack) == len(plates_t):
            members = [pl.member for pl in stack]
            for m in at_pin[name] if not frameless else ():
                if m not in members:
                    r.bad(where, "plate", f"member '{m}' meets pin {name} but has no plate in its stack; "
                          "every member at a checked pin needs its plate")
            if len(stack) < 2:
                r.bad(where, "plate", "a stack needs at least two plates")
            for m in dict.fromkeys(members):
                given = [pl.share for pl in stack if pl.member == m]
                if all(g is None for g in given):
                    continue
                if any(g is None for g in given):
                    r.bad(where, "plate", f"member '{m}' gives a share on some of its plates only; give "
                          "share on every plate of the member, or on none (then in proportion to thickness)")
                elif abs(sum(given) - 1.0) > 1e-6:
                    r.bad(where, "plate", f"the shares of member '{m}' add up to {sum(given):g}; the plates of "
                          "a member carry all of its force between them, so its shares must add up to 1")
            for key in {(pl.member, pl.group) for pl in stack if pl.group is not None}:
                ix = [i for i, pl in enumerate(stack) if (pl.member, pl.group) == key]
                if ix != list(range(ix[0], ix[-1] + 1)):
                    r.bad(where, "plate", f"the plates of member {key[0]}, group '{key[1]}' (plates "
                          f"{', '.join(str(i + 1) for i in ix)}) are not next to each other in the stack; a main "
                          "plate and its cheek plates sit side by side")
                if sum(stack[i].lateral is not None for i in ix) > 1:
                    r.bad(where, "plate", f"more than one plate of member {key[0]}, group '{key[1]}' has a lateral "
                          "load; the group is checked as one part: give its lateral load on one of them")
        bolt = None
        if grade is not None and mat is not None and d is not None:
            from .jobfile_lifting import bolt_spec

            bolt = bolt_spec(r, where, t, grade, d, len(plates_t))
        pin_model = r.text_field(where, t, "pin_model", choices=["uniform", "point"], default="uniform")
        wear = r.qty(where, t, "wear", "length", required=False, nonneg=True) or 0.0
        retainer = r.qty(where, t, "retainer", "force", required=False, positive=True)
        out[name] = Pin(name, f["xy"], f["bodies"], d, mat, tuple(stack),
                        r.flag(where, t, "replaceable"), r.flag(where, t, "rotates"), bolt,
                        r.flag(where, t, "secured"), pin_model=pin_model, wear=wear, retainer=retainer)
    return out


def _direction(r: _Reader, where: str, field: str, v) -> tuple[float, float] | None:
    """A direction: [x, y] (any length but zero) or an angle from +x ("30 deg")."""
    if isinstance(v, list):
        if (len(v) != 2 or not all(isinstance(c, (int, float)) and not isinstance(c, bool) and math.isfinite(c)
                                   for c in v) or math.hypot(*v) == 0):
            r.bad(where, field, f"expected a direction [x, y] (numbers, not both zero) or an angle such as "
                  f"\"30 deg\", got {v!r}")
            return None
        h = math.hypot(*v)
        return (v[0] / h, v[1] / h)
    ang = r.qty(where, {field: v}, field, "angle")
    return None if ang is None else (math.cos(ang), math.sin(ang))


def _lug_fields(r: _Reader, pw: str, p: dict, shape, width, end, hole, th, own, cases) -> dict | None:
    """Outline, axis, group, bushing and lateral load of a checked plate (None if something is wrong)."""
    from .lug import Outline, base_section, polygon_area, polygon_simple

    ok = True
    axis = _direction(r, pw, "axis", p["axis"]) if "axis" in p else None
    ok &= axis is not None or "axis" not in p
    base = r.qty(pw, p, "base", "length", required=False, positive=True)
    outline = None
    if shape == "polygon":
        for k in ("width", "end", "arc_centre", "radius", "base"):
            if k in p:
                r.bad(pw, k, f"a polygon lug takes its geometry from 'outline'; remove '{k}'")
                ok = False
        v = p.get("outline")
        if not isinstance(v, list) or len(v) < 3:
            r.bad(pw, "outline", "a polygon lug needs outline = [[s, n], ...], at least 3 corners in lug axes "
                  "(s along the axis, n across, hole centre at [0, 0]); the last-to-first edge is the base")
            return None
        pts = [_xy(r, pw, "outline", q) for q in v]
        if None in pts:
            return None
        if abs(polygon_area(pts)) <= 0 or not polygon_simple(pts):
            r.bad(pw, "outline", "the polygon's edges cross or it has no area; list its corners in order round it")
            return None
        if axis is None:
            r.bad(pw, "axis", "a polygon lug needs its axis in the frame, axis = [x, y] or \"θ deg\", to place "
                  "its outline")
            ok = False
        outline = Outline("polygon", vertices=tuple(pts))
    else:
        if "outline" in p:
            r.bad(pw, "outline", f"'outline' is for shape = \"polygon\", not a {shape} lug")
            ok = False
        centre = (0.0, 0.0)
        radius = end
        if "arc_centre" in p or "radius" in p:
            if shape != "round":
                r.bad(pw, "arc_centre", "arc_centre and radius are for a round-ended lug")
                return None
            if "end" in p:
                r.bad(pw, "end", "with arc_centre give the arc's radius, not end; remove 'end'")
                return None
            c = _xy(r, pw, "arc_centre", p.get("arc_centre", [0, 0])) if "arc_centre" in p else (0.0, 0.0)
            radius = r.qty(pw, p, "radius", "length", positive=True)
            if c is None or radius is None:
                return None
            centre = c
        if width is None or radius is None:
            return None
        if base is not None or centre != (0.0, 0.0):
            outline = Outline(shape, width=width, end=radius, centre=centre, base=base)
    if outline is not None and hole is not None and ok:
        if not outline.min_reach() > hole / 2:
            r.bad(pw, "outline" if shape == "polygon" else "base", "the hole does not fit inside the lug's "
                  "outline: some edge is nearer the hole centre than half the hole diameter")
            ok = False
    group = r.text_field(pw, p, "group")
    bushing = None
    if "bushing_od" in p or "bushing_material" in p:
        od = r.qty(pw, p, "bushing_od", "length", positive=True)
        mname = p.get("bushing_material")
        if mname is None:
            r.bad(pw, "bushing_material", "a bushing needs its material")
        bm = _material(r, pw, "bushing_material", mname, (od - hole) / 2 if od and hole and od > hole else th,
                       own) if mname is not None else None
        if od is not None and hole is not None and od <= hole:
            r.bad(pw, "bushing_od", f"the bushing's outside diameter ({p['bushing_od']}) must exceed its bore, "
                  f"the plate's hole field")
            od = None
        if od is None or bm is None:
            return None
        bushing = Bushing(od, bm)
    lateral = None
    if "lateral" in p or "lateral_force" in p:
        lateral = _lateral(r, pw, p, cases)
        if lateral is None:
            return None
        geo = outline if outline is not None else Outline(shape, width=width, end=end)
        h, b = base_section(geo)
        if h is None:
            r.bad(pw, "base", "a lateral load is checked at the lug's base section: give base, the distance from "
                  "the hole centre back to that section (e.g. base = \"150 mm\")")
            return None
        bw = r.qty(pw, p, "base_width", "length", required=False, positive=True)
        if bw is not None:
            lateral = Lateral(lateral.fraction, lateral.per_case, bw)
    elif "base_width" in p:
        r.bad(pw, "base_width", "base_width is for the base-section check of a lateral load; give lateral too")
        ok = False
    if not ok:
        return None
    return {"outline": outline, "axis": axis, "group": group, "bushing": bushing, "lateral": lateral}


def _lateral(r: _Reader, pw: str, p: dict, cases) -> Lateral | None:
    if "lateral" in p and "lateral_force" in p:
        r.bad(pw, "lateral_force", "give either lateral (a share of the in-plane force) or lateral_force (per "
              "case), not both")
        return None
    if "lateral" in p:
        v = p["lateral"]
        frac = None
        if isinstance(v, str) and v.strip().endswith("%"):
            try:
                frac = float(v.strip()[:-1]) / 100
            except ValueError:
                frac = None
        elif isinstance(v, (int, float)) and not isinstance(v, bool):
            frac = float(v)
        if frac is None or not math.isfinite(frac) or not 0 < frac <= 1:
            r.bad(pw, "lateral", f"a lateral load as a share of the in-plane force: a fraction 0 < x <= 1 or a "
                  f"percentage such as \"5 %\"; got {v!r}")
            return None
        return Lateral(frac)
    t = p["lateral_force"]
    if not isinstance(t, dict) or not t:
        r.bad(pw, "lateral_force", "expected a table of load case = force, e.g. lateral_force = { lift = \"8 kN\" }")
        return None
    per = {}
    for c, v in t.items():
        if c not in cases:
            r.bad(pw, "lateral_force", f"there is no load case '{c}'{suggest(c, cases)}")
            return None
        f = r.qty(pw, {f"lateral_force.{c}": v}, f"lateral_force.{c}", "force")
        if f is None:
            return None
        per[c] = f
    return Lateral(None, per)
