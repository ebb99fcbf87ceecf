"""Views of compare, size and rate results (pinchk.alternatives): terminal table, JSON and CSV."""

from __future__ import annotations

import csv
import io
import json
import math
import re

from tabulate import tabulate

from .. import __version__
from ..units import G0, UNIT_SYSTEMS, from_si, unit_label
from . import CAUTION
from .common import fmt
from .data import _finite

MARK = "<- lightest passing"


def _units(job):
    u = UNIT_SYSTEMS[job.output_units]
    return u["length"], u["force"]


def _len(x, unit):
    return None if x is None or (isinstance(x, float) and not math.isfinite(x)) else float(from_si(x, "length", unit))


def _num(x):
    return None if x is None or (isinstance(x, float) and not math.isfinite(x)) else float(x)


def _head(job, method, what):
    return {"pinchk": __version__, "command": what,
            "job": {"title": job.title, "file": job.path, **job.info}, "method": method}


def _tf(md: bool) -> str:
    return "github" if md else "simple"


def _finish(out: list[str], md: bool, sections: tuple[str, ...]) -> str:
    """The lines as terminal text, or as Markdown: a title, sections, tables and the other lines as a list."""
    if not md:
        return "\n".join(out) + "\n"
    res = []
    for i, line in enumerate(out):
        if i == 0:
            res += [f"# {line}", ""]
        elif "\n" in line:  # a table
            res += ["", line, ""]
        elif line.startswith(sections):
            res += ["", f"## {line}", ""]
        elif line:
            res.append(f"- {line}")
    text = "\n".join(res)
    return re.sub(r"\n{3,}", "\n\n", text).strip() + "\n"


def _csv(rows: list[dict]) -> str:
    buf = io.StringIO()
    if rows:
        w = csv.DictWriter(buf, fieldnames=list(rows[0]), lineterminator="\n")
        w.writeheader()
        for r in rows:
            w.writerow({k: ("" if v is None else v) for k, v in r.items()})
    return buf.getvalue()


# ----------------------------------------------------------------------------------------------- compare


def compare_rows(cmp) -> list[dict]:
    lu, _ = _units(cmp.job)
    out = []
    for n, sw in cmp.sweeps.items():
        pin = cmp.job.pins[n]
        for i, o in enumerate(sw.options):
            ok = sw.reason[i] == ""
            util = float(sw.util[i]) if ok else None
            out.append({
                "pin": n, "alternative": o.label,
                "diameter": _len(pin.diameter if o.diameter is None else o.diameter, lu), "length_unit": unit_label(lu),
                "pin_material": o.grade and f"bolt {o.grade}" or o.pin_material or pin.material.name,
                "method": o.method or cmp.method,
                "governing_check": sw.check[i] if ok else "", "part": sw.part[i] if ok else "",
                "case": sw.case[i] if ok else "", "utilization": util,
                "strength_check": sw.strength(i)[1] if ok else "",
                "strength_utilization": sw.strength(i)[0] if ok else None,
                "status": "n/a" if not ok else ("pass" if util <= 1.0 else "FAIL"),
                "marked": i in cmp.marked.get(n, ()), "note": sw.reason[i]})
    return out


def compare_table(cmp, md: bool = False) -> str:
    out = [f"pinchk compare: {cmp.job.title}", f"method: {cmp.method}", ""]
    for n, sw in cmp.sweeps.items():
        rows = []
        for r in (x for x in compare_rows(cmp) if x["pin"] == n):
            strength = ("" if r["strength_utilization"] is None or r["strength_check"] == r["governing_check"]
                        else f"{r['strength_utilization']:.3f} {r['strength_check']}")
            rows.append((r["alternative"], r["governing_check"] or r["note"], r["part"], r["case"],
                         "-" if r["utilization"] is None else f"{r['utilization']:.3f}", r["status"], strength,
                         MARK if r["marked"] else ""))
        out.append(f"pin {n}")
        out.append(tabulate(rows, headers=["alternative", "governing check", "part", "case", "utilization", "status",
                                           "strength check (if not governing)", ""], disable_numparse=True,
                            tablefmt=_tf(md)))
        for m in cmp.marked.get(n, ()):
            out.append(f"lightest passing: {sw.options[m].label} (utilization {sw.util[m]:.3f})")
        if not sw.options:
            out.append("no alternative left to check: every one was left out (below)")
        elif cmp.ranked and not cmp.marked.get(n):
            out.append("no alternative passes")
        if cmp.skipped.get(n):
            out.append(f"left out ({len(cmp.skipped[n])}): " + "; ".join(cmp.skipped[n][:6])
                       + (" ..." if len(cmp.skipped[n]) > 6 else ""))
        out.append("")
    out += [f"note: {x}" for x in cmp.notes]
    out.append(f"caution: {CAUTION}")
    return _finish(out, md, ("pin ",))


def compare_json(cmp) -> str:
    d = _head(cmp.job, cmp.method, "compare")
    rows = compare_rows(cmp)
    d["pins"] = [{"pin": n, "marked": [cmp.sweeps[n].options[i].label for i in cmp.marked.get(n, ())],
                  "alternatives": [r for r in rows if r["pin"] == n], "left_out": list(cmp.skipped.get(n, ()))}
                 for n in cmp.sweeps]
    d["notes"] = list(cmp.notes)
    d["caution"] = CAUTION
    return json.dumps(_finite(d), indent=2, ensure_ascii=False, allow_nan=False) + "\n"


def compare_csv(cmp) -> str:
    return _csv(compare_rows(cmp))


# ----------------------------------------------------------------------------------------------- size


def size_rows(sz) -> tuple[list[dict], list[dict]]:
    lu, _ = _units(sz.job)
    pins, plates = [], []
    for n, s in sz.sized.items():
        pin = sz.job.pins[n]
        found = s.option is not None
        d = (pin.diameter if s.option.diameter is None else s.option.diameter) if found else None
        pins.append({
            "pin": n, "found": found, "diameter": _len(d, lu), "length_unit": unit_label(lu),
            "diameter_as_job": _len(pin.diameter, lu),
            "utilization": _num(s.util), "governing_check": s.governing[0], "part": s.governing[1],
            "case": s.governing[2],
            "next_smaller_diameter": _len(s.smaller.diameter, lu) if s.smaller is not None else None,
            "next_smaller_utilization": _num(s.smaller_util), "next_smaller_check": s.smaller_governing[0],
            "next_smaller_part": s.smaller_governing[1], "next_smaller_case": s.smaller_governing[2],
            "next_smaller_note": s.smaller_note,
            "exact_diameter": _len(s.d_exact, lu), "exact_diameter_check": s.d_exact_check,
            "strength_utilization": _num(s.strength[0]), "strength_check": s.strength[1], "note": s.note})
        for part, (t, e, w) in s.geometry.items():
            m = next(p for p in pin.stack if part == p.member or part.startswith(p.member + " "))
            plates.append({"pin": n, "part": part, "thickness": _len(t, lu), "thickness_as_job": _len(m.thickness, lu),
                           "end": _len(e, lu), "width": _len(w, lu), "length_unit": unit_label(lu),
                           "exact_thickness": _len(s.t_exact.get(m.member), lu),
                           "exact_thickness_check": s.t_exact_check.get(m.member, "")})
    return pins, plates


def size_table(sz, md: bool = False) -> str:
    lu, _ = _units(sz.job)
    ul = unit_label(lu)
    pins, plates = size_rows(sz)
    out = [f"pinchk size: {sz.job.title}", f"method: {sz.method}",
           "pin series: " + "; ".join(f"{s.name} ({s.source}; {s.confidence})" for s in sz.pin_series),
           "plate series: " + "; ".join(f"{s.name} ({s.source}; {s.confidence})" for s in sz.plate_series), ""]
    rows = []
    for r in pins:
        if not r["found"]:
            rows.append((r["pin"], "-", "-", r["note"], "", "", "", "", ""))
            continue
        nxt = ("-" if r["next_smaller_diameter"] is None else
               f"{fmt(r['next_smaller_diameter'])}: {r['next_smaller_utilization']:.3f} {r['next_smaller_check']}"
               + (f" ({r['next_smaller_note']})" if r["next_smaller_note"] else ""))
        rows.append((r["pin"], f"{fmt(r['diameter_as_job'])} -> {fmt(r['diameter'])}", f"{r['utilization']:.3f}",
                     r["governing_check"], f"{r['part']}, {r['case']}",
                     f"{r['strength_utilization']:.3f} {r['strength_check']}", nxt,
                     "-" if r["exact_diameter"] is None else fmt(r["exact_diameter"]), r["exact_diameter_check"]))
    out.append(tabulate(rows, headers=["pin", f"d [{ul}]", "utilization", "governing check", "where",
                                       "strength check", f"next smaller d [{ul}]: utilization, check",
                                       f"exact d [{ul}]", "limited by"],
                        disable_numparse=True, tablefmt=_tf(md)))
    out.append("")
    prow = [(r["pin"], r["part"], f"{fmt(r['thickness_as_job'])} -> {fmt(r['thickness'])}", fmt(r["end"]),
             fmt(r["width"]), "-" if r["exact_thickness"] is None else fmt(r["exact_thickness"]),
             r["exact_thickness_check"]) for r in plates]
    out.append("Plates at the chosen size")
    out.append(tabulate(prow, headers=["pin", "part", f"t [{ul}]", f"end [{ul}]", f"width [{ul}]",
                                       f"exact t [{ul}]", "limited by"], disable_numparse=True, tablefmt=_tf(md)))
    out.append("")
    out += [f"note: {x}" for x in sz.notes]
    out.append("FOUND: every pin has a size in the series that passes" if sz.found else
                "NOT FOUND: some pin has no size in the series that passes")
    out.append(f"caution: {CAUTION}")
    return _finish(out, md, ("Plates at",))


def size_json(sz) -> str:
    d = _head(sz.job, sz.method, "size")
    pins, plates = size_rows(sz)
    d["series"] = {"pin": [{"name": s.name, "source": s.source, "confidence": s.confidence} for s in sz.pin_series],
                   "plate": [{"name": s.name, "source": s.source, "confidence": s.confidence}
                             for s in sz.plate_series]}
    d["sized"] = "+".join(sz.what)
    d["pins"] = [{**p, "plates": [q for q in plates if q["pin"] == p["pin"]]} for p in pins]
    d["found"] = sz.found
    d["notes"] = list(sz.notes)
    d["caution"] = CAUTION
    return json.dumps(_finite(d), indent=2, ensure_ascii=False, allow_nan=False) + "\n"


def size_csv(sz) -> str:
    pins, plates = size_rows(sz)
    by = {p["pin"]: p for p in pins}
    rows = []
    for q in plates:
        p = by[q["pin"]]
        rows.append({**{k: v for k, v in p.items() if k != "length_unit"},
                     **{("plate_" + k if k not in ("pin",) else k): v for k, v in q.items()}})
    for p in pins:
        if not any(q["pin"] == p["pin"] for q in plates):
            rows.append({k: v for k, v in p.items() if k != "length_unit"})
    return _csv(rows)


# ----------------------------------------------------------------------------------------------- rate


def rate_dict(rt) -> dict:
    _, fu = _units(rt.job)
    mu = UNIT_SYSTEMS[rt.job.output_units]["mass"]
    g = {k: (float(v) if hasattr(v, "__float__") and not isinstance(v, str) else v)
         for k, v in rt.governing.items() if k in ("pin", "part", "check", "case", "utilization", "clause")}
    return {"scaled": rt.what, "factor": _num(rt.factor), "limit": rt.limit, "governing": g,
            "utilization_as_job": _num(rt.util_at_1), "plain_division": _num(rt.linear_estimate),
            "loads_at_limit": [{"case": c, "label": lb, "magnitude": float(from_si(f, "force", fu)),
                                "unit": unit_label(fu),
                                "as_mass": float(from_si(f / G0, "mass", mu)) if down else None,
                                "mass_unit": unit_label(mu)} for c, lb, f, down in rt.loads],
            "why_not_a_division": list(rt.reasons), "runs": rt.evaluations}


def rate_table(rt, md: bool = False) -> str:
    _, fu = _units(rt.job)
    d = rate_dict(rt)
    out = [f"pinchk rate: {rt.job.title}", f"scaled: {rt.what}", ""]
    if rt.limit == "none":
        out.append(f"no limit found: every check passes up to the largest factor tried ({rt.reasons[0]})")
    elif rt.limit == "at zero":
        g = d["governing"]
        out.append(f"factor 0: {g.get('pin')} {g.get('part')}, {g.get('check')} fails with the scaled loads at zero")
    else:
        g = d["governing"]
        out.append(f"largest factor: {rt.factor:.4f}  (the design as the job stands has utilization "
                   f"{rt.util_at_1:.3f}; a plain division would give {rt.linear_estimate:.4f})")
        where = f"{g.get('pin')} {g.get('part')}, {g.get('check')}, case '{g.get('case')}'"
        if rt.limit in ("cable", "support"):
            what = "a cable going slack" if rt.limit == "cable" else "a roller lifting off"
            out.append(f"limited by: {what} just beyond this factor (see the note); the largest "
                       f"utilization just below it is {float(g.get('utilization', math.nan)):.3f}, {where}")
        else:
            out.append(f"limited by: {where}")
        if rt.loads:
            mu = UNIT_SYSTEMS[rt.job.output_units]["mass"]
            rows = [(c, lb or "-", fmt(from_si(f, "force", fu)), fmt(from_si(f / G0, "mass", mu)) if down else "-")
                    for c, lb, f, down in rt.loads]
            out.append("")
            out.append("Scaled loads at the limit (a load straight down also as the mass whose weight it is, "
                       "standard gravity)")
            out.append(tabulate(rows, headers=["case", "load", f"force [{unit_label(fu)}]",
                                               f"as a mass [{unit_label(mu)}]"], disable_numparse=True,
                                tablefmt=_tf(md)))
    out.append("")
    out += [f"note: {x}" for x in rt.reasons]
    out.append(f"note: limit solved by root finding on the largest utilization of {rt.evaluations} full runs "
               "(scipy.optimize.brentq), not by division")
    out.append(f"caution: {CAUTION}")
    return _finish(out, md, ("Scaled loads",))


def rate_json(rt) -> str:
    d = _head(rt.job, rt.job.method.name, "rate")
    d.update(rate_dict(rt))
    d["caution"] = CAUTION
    return json.dumps(_finite(d), indent=2, ensure_ascii=False, allow_nan=False) + "\n"


def rate_csv(rt) -> str:
    d = rate_dict(rt)
    g = d["governing"]
    return _csv([{"scaled": d["scaled"], "factor": d["factor"], "limit": d["limit"], "pin": g.get("pin"),
                  "part": g.get("part"), "check": g.get("check"), "case": g.get("case"),
                  "utilization_as_job": d["utilization_as_job"], "plain_division": d["plain_division"],
                  "why_not_a_division": " | ".join(d["why_not_a_division"])}])


VIEWS = {
    "compare": {"table": compare_table, "json": compare_json, "csv": compare_csv,
                "md": lambda r: compare_table(r, md=True)},
    "size": {"table": size_table, "json": size_json, "csv": size_csv, "md": lambda r: size_table(r, md=True)},
    "rate": {"table": rate_table, "json": rate_json, "csv": rate_csv, "md": lambda r: rate_table(r, md=True)},
}
