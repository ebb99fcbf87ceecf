"""Machine-readable views: JSON (the contract of DESIGN.md) and CSV of the long table."""

from __future__ import annotations

import csv
import io
import json
import math

from .. import __version__
from . import CAUTION
from .common import convert, force_rows, governing_by_check, unit_of, units_of, verdict
from .joints import joint_dict

CSV_COLUMNS = ("pin", "part", "check", "case", "demand", "capacity", "unit", "utilization", "status", "clause",
               "formula", "factors", "note")


def _rows(results) -> list[dict]:
    units = units_of(results)
    out = []
    for r in results.rows():
        kind = r.pop("kind")
        r["demand"] = float(convert(r["demand"], kind, units))
        r["capacity"] = float(convert(r["capacity"], kind, units))
        r["unit"] = unit_of(kind, units)
        out.append({k: r[k] for k in CSV_COLUMNS})
    return out


def to_dict(results) -> dict:
    units = units_of(results)
    rows = _rows(results)
    g = results.governing
    governing = None
    if g is not None:
        governing = {k: rows[g][k] for k in ("pin", "part", "check", "case", "utilization", "status")}
    fu = unit_of("force", units)
    sol = results.solution
    return {
        "pinchk": __version__,
        "job": {"title": results.job.title, "file": results.job.path, **results.job.info},
        "method": {"name": results.method, "edition": results.edition, "design": results.variant,
                   "factors": results.factors},
        "units": {k: unit_of(k, units) for k in ("force", "moment", "length", "stress")},
        "verdict": verdict(results),
        "governing": governing,
        "governing_by_check": [{k: rows[i][k] for k in ("pin", "part", "check", "case", "utilization", "status")}
                               for i in governing_by_check(results)],
        "combinations": {n: {"cases": c.factors, "description": c.description, "limit_state": c.limit_state}
                         for n, c in results.job.combinations.items()},
        "lift_factors": [{"name": sf.name, "value": sf.value, "combinations": sf.combinations, "pins": sf.pins,
                          "members": sf.members, "note": sf.note} for sf in results.job.stack_factors],
        "checks": rows,
        "case_joint_forces": [  # per load case, where the checks ran on combinations (else empty)
            {"case": c, "pin": p, "member": m, "fx": convert(fx, "force", units), "fy": convert(fy, "force", units),
             "unit": fu}
            for c, p, m, fx, fy, _, _ in force_rows(results, getattr(results, "case_solution", None))],
        "joint_forces": _with_axial(sol, [
            {"case": c, "pin": p, "member": m, "fx": convert(fx, "force", units), "fy": convert(fy, "force", units),
             "resultant": convert(f, "force", units), "angle_deg": a, "unit": fu}
            for c, p, m, fx, fy, f, a in force_rows(results)], units),
        "supports": [
            {"case": c, "support": s, "rx": convert(r[j, 0], "force", units), "ry": convert(r[j, 1], "force", units),
             "moment": convert(r[j, 2], "moment", units)}
            for s, r in sol.supports.items() for j, c in enumerate(sol.cases)],
        "links": [{"case": c, "link": n, "tension": convert(t[j], "force", units)}
                  for n, t in sol.links.items() for j, c in enumerate(sol.cases)],
        "solver": sol.solver,
        "warnings": [*getattr(sol, "warnings", ()), *getattr(results, "warnings", ())],
        "equilibrium_residual": sol.residual,
        "joints": joint_dict(results, units),
        "unchecked_pins": list(results.unchecked),
        "assumptions": list(results.assumptions),
        "caution": CAUTION,
    }


def _with_axial(sol, rows: list[dict], units) -> list[dict]:
    """Add fz, the force along the pin, to the joint-force rows when a forces file gives one (reported only)."""
    if all(getattr(pf, "axial", None) is None for pf in sol.pins.values()):
        return rows
    fz = [float(pf.axial[j, k]) if pf.axial is not None else 0.0
          for j in range(len(sol.cases)) for pf in sol.pins.values() for k in range(len(pf.members))]
    for r, v in zip(rows, fz, strict=True):
        r["fz"] = convert(v, "force", units)
    return rows


def _finite(x):
    """JSON has no infinity or NaN (RFC 8259 §6): such a figure is written as null (its row's status says
    what it means, e.g. FAIL for a capacity of zero)."""
    if isinstance(x, float) and not math.isfinite(x):
        return None
    if isinstance(x, dict):
        return {k: _finite(v) for k, v in x.items()}
    if isinstance(x, (list, tuple)):
        return [_finite(v) for v in x]
    return x


def render_json(results, **_) -> str:
    return json.dumps(_finite(to_dict(results)), indent=2, ensure_ascii=False, allow_nan=False) + "\n"


def render_csv(results, **_) -> str:
    buf = io.StringIO()
    w = csv.DictWriter(buf, fieldnames=CSV_COLUMNS, lineterminator="\n")
    w.writeheader()
    for r in _rows(results):
        w.writerow({**r, "demand": repr(r["demand"]), "capacity": repr(r["capacity"]),
                    "utilization": repr(r["utilization"])})
    return buf.getvalue()
