"""Job-file input of the stiffness solve: [section.NAME] tables, a body's section and members, a link's EA.

Read by pinchk.jobfile with its problem collector, so a bad value is reported with file, table and field.
Quantities are parsed to SI here (through pinchk.units) and nowhere else.
"""

from __future__ import annotations

import dataclasses
import math

from .model import Body, Link, Section

SECTION_KEYS = {"E", "A", "I", "source", "description"}
SOLVER_CHOICES = ("auto", "statics", "stiffness")


def _power_unit(r, power: int) -> str | None:
    """Default unit of a bare area (power 2) or second moment (power 4): the job's length unit to that power."""
    u = r.default_units.get("length")
    return f"{u}^{power}" if u else None


def read_sections(r, data: dict) -> dict[str, Section]:
    """[section.NAME] tables: E (stress), A (area), I (second moment of area), optional source."""
    from .jobfile import _line_of  # (jobfile imports this module: import at call time)

    out: dict[str, Section] = {}
    for name, t in r.table(data, "section", "").items():
        where = f"section.{name}"
        if not isinstance(t, dict):
            r.bad(where, "", "expected a table with E, A and I, e.g. E = \"210 GPa\", A = \"5380 mm^2\", "
                  "I = \"8.36e7 mm^4\"")
            continue
        for k in t:
            if k not in SECTION_KEYS:
                r.bad(where, k, f"unknown field '{k}'; fields here are: {', '.join(sorted(SECTION_KEYS))}")
        what = {"E": "Young's modulus, e.g. \"210 GPa\"", "A": "the section area, e.g. \"7800 mm^2\"",
                "I": "the second moment of area in the frame's plane, e.g. \"5.7e7 mm^4\""}
        for k in what:
            if k not in t:  # (the line is the table's: a missing field has none)
                r.c.add(where, k, f"missing required field '{k}': {what[k]}", _line_of(r.text, where, ""))
        saved = dict(r.default_units)
        r.default_units["section area"] = _power_unit(r, 2)
        r.default_units["second moment of area"] = _power_unit(r, 4)
        try:
            E = r.qty(where, t, "E", "stress", positive=True) if "E" in t else None
            A = r.qty(where, t, "A", "section area", positive=True) if "A" in t else None
            I_ = r.qty(where, t, "I", "second moment of area", positive=True) if "I" in t else None
        finally:
            r.default_units.clear()
            r.default_units.update(saved)
        source = r.text_field(where, t, "source", default="")
        if None not in (E, A, I_):
            out[name] = Section(name, E, A, I_, source or "")
    return out


def attach_to_bodies(r, data: dict, bodies: dict[str, Body], sections: dict[str, Section]) -> dict[str, Body]:
    """Give each body its section (field ``section``) and its members (field ``members``)."""
    out = dict(bodies)
    bt = data.get("body") if isinstance(data.get("body"), dict) else {}
    for name, body in bodies.items():
        t = bt.get(name, {})
        where = f"body.{name}"
        section = None
        if "section" in t:
            s = t["section"]
            if not isinstance(s, str) or s not in sections:
                near = f"; defined sections: {', '.join(sections)}" if sections else ""
                r.bad(where, "section", f"{s!r} is not a section of this job: name a [section.NAME] table{near}")
            else:
                section = sections[s]
        members: tuple[tuple[str, str], ...] = ()
        own: dict[tuple[str, str], Section] = {}
        if "members" in t:
            m = t["members"]
            ok = isinstance(m, list) and len(m) > 0
            pairs = []
            for entry in m if ok else []:
                if (not isinstance(entry, list) or len(entry) not in (2, 3)
                        or not all(isinstance(p, str) for p in entry)):
                    ok = False
                    break
                pair = entry[:2]
                if len(entry) == 3:
                    if entry[2] not in sections:
                        r.bad(where, "members", f"member {entry!r}: {entry[2]!r} is not a section of this job; "
                              f"defined sections: {', '.join(sections) or '(none)'}")
                        ok = None
                    else:
                        own[(pair[0], pair[1])] = sections[entry[2]]
                for p in pair:
                    if p not in body.points:
                        r.bad(where, "members", f"member {pair!r}: body {name} has no point '{p}'; "
                              f"its points: {', '.join(body.points)}")
                        ok = None
                if ok and pair[0] == pair[1]:
                    r.bad(where, "members", f"member {pair!r} joins a point to itself; a member joins two points")
                    ok = None
                if ok and math.dist(body.points[pair[0]], body.points[pair[1]]) <= 1e-9:
                    r.bad(where, "members", f"member {pair!r} has no length: its two points are at one place")
                    ok = None
                if ok and any({pair[0], pair[1]} == {a, b} for a, b in pairs):
                    r.bad(where, "members", f"member {pair!r} is listed twice; list each member once")
                    ok = None
                pairs.append((pair[0], pair[1]))
            if ok is False:
                r.bad(where, "members", "expected a list of point pairs, each with an optional section, e.g. "
                      f"members = [[\"A\", \"B\"], [\"B\", \"C\", \"HEB200\"]]; got {m!r}")
            elif ok:
                members = tuple(pairs)
        if own and section is None and len(own) < len(members):
            r.bad(where, "section", "some members name their own section and the rest have none: give the "
                  "body a section = \"NAME\" for the others, or a section on every member")
        if own and section is None and len(own) == len(members):
            section = next(iter(own.values()))  # every member has its own; the body's is never used
        out[name] = dataclasses.replace(body, section=section, members=members, member_sections=own)
    return out


def attach_to_links(r, data: dict, links: dict[str, Link]) -> dict[str, Link]:
    """Give each link its axial stiffness EA (field ``EA``, a force); without it the link is axially rigid."""
    out = dict(links)
    lt = data.get("link") if isinstance(data.get("link"), dict) else {}
    for name, link in links.items():
        t = lt.get(name, {})
        if "EA" in t:
            ea = r.qty(f"link.{name}", t, "EA", "force", positive=True)
            if ea is not None:
                out[name] = dataclasses.replace(link, EA=ea)
    return out
