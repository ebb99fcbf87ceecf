"""Job-file tables for lifting work: [combination.*], [lift_factors] and a pin's bolt fields.

Read with the job-file reader's problem collector, so every mistake is reported with its file, table and
field (see docs/jobfile.md).
"""

from __future__ import annotations

import math

from . import bolts
from .model import Combination, Material, StackFactor
from .units import to_si

COMBINATION_KEYS = {"cases", "description", "limit_state"}
STACK_FACTOR_KEYS = {"value", "combinations", "pins", "members", "note"}
BOLT_KEYS = {"bolt", "thread_pitch", "thread_planes", "thread_plates"}


def _number(v) -> bool:
    return not isinstance(v, bool) and isinstance(v, (int, float)) and math.isfinite(v)


def combinations(r, data: dict, cases: dict) -> dict[str, Combination]:
    """[combination.NAME] tables: cases = { CASE = factor, ... }, description, limit_state."""
    from .jobfile import suggest

    out: dict[str, Combination] = {}
    ct = r.table(data, "combination", "")
    for name, t in ct.items():
        where = f"combination.{name}"
        if not isinstance(t, dict):
            r.bad(where, "", "expected a table with cases = { CASE = factor, ... }")
            continue
        r.name_ok(where, name)
        for k in t:
            if k not in COMBINATION_KEYS:
                r.bad(where, k, f"unknown field '{k}'{suggest(k, COMBINATION_KEYS)}; fields here are: "
                      f"{', '.join(sorted(COMBINATION_KEYS))}")
        fac = t.get("cases")
        if not isinstance(fac, dict) or not fac:
            r.bad(where, "cases", "missing or empty: give cases = { CASE = factor, ... }, e.g. "
                  "cases = { dead = 1.1, hook = 1.0 }")
            continue
        factors: dict[str, float] = {}
        for c, v in fac.items():
            if c not in cases:
                r.bad(where, "cases", f"there is no load case '{c}'{suggest(c, cases)}; declared cases: "
                      f"{', '.join(cases) or '(none)'}")
            elif not _number(v):
                r.bad(where, "cases", f"the factor on case '{c}' must be a finite number, got {v!r}")
            else:
                factors[c] = float(v)
        if len(factors) != len(fac):
            continue
        ls = r.text_field(where, t, "limit_state", choices=["ULS", "SLS"], default="ULS")
        out[name] = Combination(name, factors, r.text_field(where, t, "description", default=""), ls)
    return out


def _names(bad, field: str, v, known, what: str) -> tuple[str, ...] | None:
    from .jobfile import suggest

    if v is None:
        return None
    if not isinstance(v, list) or not v or not all(isinstance(x, str) for x in v):
        bad(field, f"expected a list of {what} names, e.g. {field} = [\"...\"], got {v!r}")
        return None
    for x in v:
        if x not in known:
            bad(field, f"there is no {what} '{x}'{suggest(x, known)}; {what}s: {', '.join(known)}")
    return tuple(v)


def stack_factors(r, data: dict, combos: dict, cases: dict, pins: dict, members: set[str]) -> tuple[StackFactor, ...]:
    """[lift_factors]: NAME = number (everywhere) or NAME = { value, combinations, pins, members, note }."""
    from .combine import STACK_FACTORS
    from .jobfile import suggest

    out: list[StackFactor] = []
    lt = r.table(data, "lift_factors", "")
    comb_names = list(combos) if combos else list(cases)
    for name, v in lt.items():
        where = "lift_factors"
        if name not in STACK_FACTORS:
            r.bad(where, name, f"unknown factor '{name}'{suggest(name, STACK_FACTORS)}; the lift factors are: "
                  f"{', '.join(STACK_FACTORS)}")
            continue
        t = v if isinstance(v, dict) else {"value": v}
        own_table = f"[lift_factors.{name}]" in r.text.replace(" ", "")
        inline = isinstance(v, dict)

        def bad(sub, message, name=name, own_table=own_table, inline=inline):
            # a table of its own: [lift_factors.NAME] field SUB; an inline value: [lift_factors] field NAME
            if own_table:
                r.bad(f"lift_factors.{name}", sub, message)
            else:
                r.bad("lift_factors", name, f"{sub}: {message}" if inline else message)

        for k in t:
            if k not in STACK_FACTOR_KEYS:
                bad(k, f"unknown field '{k}'{suggest(k, STACK_FACTOR_KEYS)}; fields here are: "
                    f"{', '.join(sorted(STACK_FACTOR_KEYS))}")
        val = t.get("value")
        if not _number(val) or val <= 0:
            bad("value", f"a factor must be a finite number greater than zero, got {val!r}")
            continue
        out.append(StackFactor(
            name, float(val),
            _names(bad, "combinations", t.get("combinations"), comb_names, "combination"),
            _names(bad, "pins", t.get("pins"), list(pins), "pin"),
            _names(bad, "members", t.get("members"), sorted(members), "member"),
            str(t.get("note", ""))))
    return tuple(out)


def bolt_material(r, where: str, t: dict, d: float) -> tuple[bolts.BoltGrade | None, Material | None]:
    """The grade row of a pin's ``bolt`` field and the Material it gives the pin (nominal strengths)."""
    from .jobfile import suggest

    name = t["bolt"]
    if not isinstance(name, str):
        r.bad(where, "bolt", f"expected a bolt grade name such as \"8.8\" or \"A325\", got {name!r}")
        return None, None
    try:
        g = bolts.grade_at(name, d)
    except KeyError:
        r.bad(where, "bolt", f"unknown bolt grade '{name}'{suggest(name, bolts.grade_names())}; grades: "
              f"{', '.join(dict.fromkeys(g.grade for g in bolts.grades()))}")
        return None, None
    except ValueError as exc:
        r.bad(where, "bolt", str(exc))
        return None, None
    if g.fy_nom is None:
        r.bad(where, "bolt", f"{g.label} specifies no yield strength, and the pin's bending and bearing checks "
              "need one: use a grade with a specified yield, or give the pin a [material] of your own")
        return g, None
    E = to_si(29000, "stress", "ksi") if g.thread == "unified" else 210e9
    return g, Material(f"bolt {g.label}", g.fy_nom, g.fu_nom, E, g.source)


def bolt_spec(r, where: str, t: dict, grade: bolts.BoltGrade, d: float, n_plates: int) -> bolts.BoltSpec | None:
    """The pin's thread (pitch, stress area) and where it lies in the stack."""
    ok = True
    if "thread_pitch" in t:
        p = r.qty(where, t, "thread_pitch", "length", positive=True)
        if p is None:
            return None
        src = "as given"
        if p >= d / 2:
            r.bad(where, "thread_pitch", f"a pitch of {t['thread_pitch']} is not plausible for this diameter")
            return None
    else:
        th = bolts.coarse_thread(grade.thread, d)
        if th is None:
            unit = "in" if grade.thread == "unified" else "mm"
            k = bolts.INCH if unit == "in" else 1e-3
            sizes = ", ".join(x.size for x in bolts.thread_sizes() if x.system == grade.thread)
            r.bad(where, "diameter", f"{d / k:g} {unit} is not a listed {grade.thread} coarse thread size "
                  f"({sizes}); give thread_pitch for another size")
            return None
        p = th.pitch
        src = f"{th.size} coarse, {th.source}"
    lists = {}
    for field, top, what in (("thread_planes", n_plates - 1, "shear plane"), ("thread_plates", n_plates, "plate")):
        v = t.get(field, [])
        if (not isinstance(v, list) or not all(isinstance(k, int) and not isinstance(k, bool) for k in v)
                or not all(1 <= k <= top for k in v)):
            r.bad(where, field, f"expected a list of {what} numbers from 1 to {top} (plane 1 lies between plates "
                  f"1 and 2 of the stack), got {v!r}")
            ok = False
        else:
            lists[field] = tuple(sorted(set(v)))
    if not ok:
        return None
    return bolts.BoltSpec(grade, grade.thread, p, bolts.stress_area(grade.thread, d, p), src,
                          lists["thread_planes"], lists["thread_plates"])
