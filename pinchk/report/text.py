"""The terminal view: joint forces, then the checks sorted by utilization, the verdict and the caution."""

from __future__ import annotations

from tabulate import tabulate

from . import CAUTION
from .common import combination_lines, convert, fmt, force_rows, governing_by_check, unit_of, units_of, verdict


def render_table(results, all_cases: bool = False, forces: bool = True) -> str:
    units = units_of(results)
    job = results.job
    out = [f"pinchk: {job.title}"]
    method = results.method + (f" ({results.variant})" if results.variant else "")
    out.append(f"method: {method}, {results.edition}")
    out.append("factors: " + ", ".join(f"{k} = {v:g}" for k, v in results.factors.items()))
    out.append(f"solver: {results.solution.solver}; equilibrium residual {results.solution.residual:.1e}")
    out += combination_lines(results)
    out.append("")
    if forces:
        fu = unit_of("force", units)
        rows = [(case, pin, mem, fmt(convert(fx, "force", units)), fmt(convert(fy, "force", units)),
                 fmt(convert(f, "force", units)), f"{ang:.1f}")
                for case, pin, mem, fx, fy, f, ang in force_rows(results)]
        out.append("Force each member receives from each pin")
        out.append(tabulate(rows, headers=["case", "pin", "member", f"Fx [{fu}]", f"Fy [{fu}]", f"|F| [{fu}]",
                                           "angle [deg]"], disable_numparse=True))
        out.append("")
        axial = [(case, pname, m, fmt(convert(pf.axial[j, k], "force", units)))
                 for j, case in enumerate(results.solution.cases) for pname, pf in results.solution.pins.items()
                 if getattr(pf, "axial", None) is not None for k, m in enumerate(pf.members)]
        if axial:
            out.append("Force each member receives along the pin (from the forces file; reported, not checked)")
            out.append(tabulate(axial, headers=["case", "pin", "member", f"Fz [{fu}]"], disable_numparse=True))
            out.append("")
        sup = []
        for sname, r in results.solution.supports.items():
            for j, case in enumerate(results.solution.cases):
                sup.append((case, sname, fmt(convert(r[j, 0], "force", units)),
                            fmt(convert(r[j, 1], "force", units)), fmt(convert(r[j, 2], "moment", units))))
        if sup:
            out.append("Support reactions")
            out.append(tabulate(sup, headers=["case", "support", f"Rx [{fu}]", f"Ry [{fu}]",
                                              f"M [{unit_of('moment', units)}]"], disable_numparse=True))
            out.append("")
        if results.solution.links:
            lk = [(case, n, fmt(convert(t[j], "force", units)))
                  for n, t in results.solution.links.items() for j, case in enumerate(results.solution.cases)]
            out.append("Link and cable forces (tension positive)")
            out.append(tabulate(lk, headers=["case", "link", f"T [{fu}]"], disable_numparse=True))
            out.append("")

    from .joints import joint_text

    out += joint_text(results, units)
    c = results.columns
    idx = [int(i) for i in results.order] if all_cases else governing_by_check(results)
    rows = []
    for i in idx:
        kind = c["kind"][i]
        rows.append((c["pin"][i], c["part"][i], c["check"][i], c["case"][i],
                     fmt(convert(c["demand"][i], kind, units)), fmt(convert(c["capacity"][i], kind, units)),
                     unit_of(kind, units), f"{c['utilization'][i]:.3f}", c["status"][i], c["clause"][i]))
    what = "combination" if job.combinations else "case"
    title = f"Checks, every {what}" if all_cases else f"Checks, governing {what} of each (highest first)"
    if rows:
        out.append(title)
        out.append(tabulate(rows, headers=["pin", "part", "check", "case", "demand", "capacity", "unit", "util",
                                           "status", "clause"], disable_numparse=True))
        out.append("")
    if results.unchecked:
        out.append("not checked (no stack of plates given): pins " + ", ".join(results.unchecked))
    for note in results.assumptions:
        out.append(f"assumed: {note}")
    for w in (*getattr(results.solution, "warnings", ()), *getattr(results, "warnings", ())):
        out.append(f"WARNING: {w}")
    out.append("")
    out.append(verdict(results))
    out.append(f"caution: {CAUTION}")
    return "\n".join(out) + "\n"
