"""The calculation report, as Markdown or as one self-contained HTML file (jinja2 templates).

Both formats show the same contents, in this order: the job block (number, revision, prepared and
checked by, date), the verdict and the governing check, the summary table sorted by utilization, the
method and every factor used, the inputs (geometry, materials with their sources, loads and cases), the
solved forces, every check of every pin and plate in every case worked out (formula, values put in
with their units, result, utilization, clause), the assumptions, the pictures and the caution.

Pictures: HTML carries them inline (base64 PNG). Markdown cannot carry pictures in one file portably,
so ``render_md`` writes none; ``pinchk.report.output.write_report`` writes them as PNG files beside the
Markdown file (``NAME.frame.png``, ``NAME.lug.png``, ``NAME.utilization.png``) and links them.

The date: ``date=`` if given, else the job's ``[job] date``, else ``SOURCE_DATE_EPOCH`` (the
reproducible-builds convention), else today (UTC). Everything else depends only on the inputs, so a
fixed date gives the same bytes on every run.
"""

from __future__ import annotations

import base64
import datetime as _dt
import math
import os

import numpy as np

from .. import __version__
from ..stack import part_names
from . import CAUTION
from .common import combination_lines, convert, fmt, force_rows, governing_by_check, unit_of, units_of, verdict
from .worked import value_text, worked_line

_TEMPLATES = os.path.join(os.path.dirname(__file__), "templates")


def report_date(results, date: str | None = None) -> str:
    if date:
        return str(date)
    if results.job.info.get("date"):
        return results.job.info["date"]
    epoch = os.environ.get("SOURCE_DATE_EPOCH")
    when = _dt.datetime.fromtimestamp(int(epoch), _dt.UTC) if epoch and epoch.isdigit() else _dt.datetime.now(_dt.UTC)
    return when.date().isoformat()


def _L(v, units):
    return value_text(v, "length", units) if v is not None else "-"


def _S(v, units):
    return value_text(v, "stress", units) if v is not None else "-"


def context(results, date: str | None = None, pictures: dict[str, tuple[str, str]] | None = None) -> dict:
    """Everything the templates show, as plain strings and lists (numbers already formatted)."""
    from ..methods import METHODS

    job, sol = results.job, results.solution
    units = units_of(results)
    fu, mu = unit_of("force", units), unit_of("moment", units)
    c = results.columns
    n = len(results)
    util = c["utilization"]

    def row_view(i: int) -> dict:
        kind = c["kind"][i]
        terms = c["terms"][i] if "terms" in c else ()
        wd = c["worked_demand"][i] if "worked_demand" in c else ""
        wc = c["worked_capacity"][i] if "worked_capacity" in c else ""
        u = float(util[i])
        return {
            "pin": c["pin"][i], "part": c["part"][i], "check": c["check"][i], "case": c["case"][i],
            "demand": fmt(convert(c["demand"][i], kind, units)),
            "capacity": fmt(convert(c["capacity"][i], kind, units)),
            "unit": unit_of(kind, units), "utilization": f"{u:.3f}", "status": c["status"][i],
            "fails": u > 1.0, "band": _band(u), "clause": c["clause"][i], "formula": c["formula"][i],
            "factors": c["factors"][i], "note": c["note"][i],
            "worked_demand": worked_line(wd, terms, float(c["demand"][i]), kind, units),
            "worked_capacity": worked_line(wc, terms, float(c["capacity"][i]), kind, units),
            "inputs": ", ".join(f"{s} = {value_text(v, k, units)}" for s, k, v in terms),
        }

    # checks grouped by pin, then part, every case, in table order
    by_pin: dict[str, dict[str, list[dict]]] = {}
    for i in range(n):
        by_pin.setdefault(c["pin"][i], {}).setdefault(c["part"][i], []).append(row_view(i))
    pin_util = {}
    for i in range(n):
        pin_util[c["pin"][i]] = max(pin_util.get(c["pin"][i], 0.0), float(util[i]))

    g = results.governing
    mod = METHODS.get(results.method)
    factors = []
    for k, v in results.factors.items():
        what = mod.FACTORS[k][1] if mod is not None and k in mod.FACTORS else ""
        default = mod.FACTORS[k][0] if mod is not None and k in mod.FACTORS else None
        factors.append({"name": k, "value": f"{v:g}", "what": what,
                        "source": "job file" if k in job.method.factors else "method default",
                        "default": "-" if default is None else f"{default:g}"})

    mats: dict[tuple, dict] = {}
    for p in job.pins.values():
        for role, m in [("pin", p.material)] + [("plate", q.material) for q in p.stack]:
            if m is None:
                continue
            key = (m.name, m.fy, m.fu, m.E, m.source)
            entry = mats.setdefault(key, {"name": m.name, "fy": _S(m.fy, units), "fu": _S(m.fu, units),
                                          "E": _S(m.E, units), "source": m.source, "used": set()})
            entry["used"].add(f"{p.name} {role}")
    materials = [{**v, "used": ", ".join(sorted(v["used"]))} for v in mats.values()]

    def xy_text(xy):
        return f"({fmt(convert(xy[0], 'length', units))}, {fmt(convert(xy[1], 'length', units))})"

    pins = []
    for p in job.pins.values():
        parts = part_names(p)
        pins.append({
            "name": p.name, "xy": xy_text(p.xy),
            "bodies": ", ".join(p.bodies) or "-", "d": _L(p.diameter, units),
            "material": p.material.name if p.material else "-", "replaceable": "yes" if p.replaceable else "no",
            "rotates": "yes" if p.rotates else "no", "checked": p.checked,
            "plates": [{"part": part, "member": q.member, "t": _L(q.thickness, units), "gap": _L(q.gap, units),
                        "hole": _L(q.hole, units), "width": _L(q.width, units), "end": _L(q.end, units),
                        "shape": q.shape, "material": q.material.name if q.material else "not checked",
                        "share": "by thickness" if q.share is None else f"{q.share:g}", "en_type": q.en_type,
                        "detail": _plate_detail(q, units)}
                       for q, part in zip(p.stack, parts, strict=False)],
        })

    bodies = [{"name": b.name, "points": ", ".join(f"{k} {xy_text(v)}" for k, v in b.points.items())}
              for b in job.bodies.values()]
    links = [{"name": lk.name, "kind": lk.kind, "ends": " – ".join(e.label for e in lk.ends)}
             for lk in job.links.values()]
    supports = [{"name": s.name, "kind": s.kind, "at": s.at.label,
                 "normal": "-" if s.normal is None else f"({s.normal[0]:g}, {s.normal[1]:g})"}
                for s in job.supports.values()]
    loads = [{"case": ld.case, "at": ld.at.label, "body": ld.body or "-", "label": ld.label or "-",
              "fx": fmt(convert(ld.force[0], "force", units)), "fy": fmt(convert(ld.force[1], "force", units)),
              "m": fmt(convert(ld.moment, "moment", units))} for ld in job.loads]
    cases = [{"name": k, "limit_state": v.limit_state, "description": v.description or "-"}
             for k, v in job.cases.items()]

    forces = [{"case": cs, "pin": p, "member": m, "fx": fmt(convert(fx, "force", units)),
               "fy": fmt(convert(fy, "force", units)), "f": fmt(convert(f, "force", units)), "angle": f"{a:.1f}"}
              for cs, p, m, fx, fy, f, a in force_rows(results)]
    reactions = [{"case": cs, "support": s, "rx": fmt(convert(r[j, 0], "force", units)),
                  "ry": fmt(convert(r[j, 1], "force", units)), "m": fmt(convert(r[j, 2], "moment", units))}
                 for s, r in sol.supports.items() for j, cs in enumerate(sol.cases)]
    link_forces = [{"case": cs, "link": k, "t": fmt(convert(t[j], "force", units))}
                   for k, t in sol.links.items() for j, cs in enumerate(sol.cases)]
    stacks = []
    for name, st in results.stacks.items():
        for j, cs in enumerate(sol.cases):
            planes = " / ".join(fmt(convert(v, "force", units)) for v in st.plane_shear[j])
            stacks.append({"pin": name, "case": cs, "v": fmt(convert(st.shear[j], "force", units)),
                           "planes": planes or "-",
                           "shear_cause": st.shear_cause(j) if st.plane_shear.shape[1] else "-",
                           "m": fmt(convert(st.moment[j], "moment", units)),
                           "at": fmt(convert(st.moment_at[j], "length", units)),
                           "moment_cause": st.moment_cause(j), "model": st.model})
    geometry = []
    for (pn, part), gg in results.geometry.items():
        for j, cs in enumerate(sol.cases):
            geometry.append({"pin": pn, "part": part, "case": cs,
                             "angle": f"{math.degrees(float(gg['angle'][j])):.1f}",
                             "axis": "as given" if _has_axis(job, pn, part) else "along the force",
                             "a": _len_or_body(gg["a"][j], units), "c_pos": _len_or_body(gg["c_pos"][j], units),
                             "c_neg": _len_or_body(gg["c_neg"][j], units)})
    pin_axial = [{"pin": pn, "case": cs, "force": fmt(convert(float(a[j]), "force", units)),
                  "retainer": "-" if job.pins[pn].retainer is None else
                  fmt(convert(job.pins[pn].retainer, "force", units))}
                 for pn, a in results.pin_axial.items() for j, cs in enumerate(sol.cases)]
    sweeps = []
    for sw in results.sweeps:
        u_pk, a_pk, k_pk = sw.peak()
        worst = np.nanmax(np.where(np.isnan(sw.case_util), -np.inf, sw.case_util), axis=0) if sw.case_util.size \
            else np.zeros(0)
        sweeps.append({"pin": sw.pin, "part": sw.part, "force": fmt(convert(sw.force, "force", units)),
                       "axis": "along the force" if sw.axis_deg is None else f"{sw.axis_deg:.1f}",
                       "peak": f"{u_pk:.3f}", "peak_band": _band(u_pk), "at": f"{a_pk:.0f}", "check": k_pk,
                       "cases": "; ".join(f"{cs} {a:.0f}°: {u:.3f}" for cs, a, u in
                                          zip(sw.cases, sw.case_angle_deg, worst, strict=True))})

    info = job.info
    method = results.method + (f" ({results.variant})" if results.variant else "")
    return {
        "title": job.title, "file": os.path.basename(job.path) if job.path else "-",
        "number": info.get("number", "-"), "revision": info.get("revision", "-"),
        "prepared_by": info.get("prepared_by", "-"), "checked_by": info.get("checked_by", "-"),
        "client": info.get("client", "-"), "date": report_date(results, date), "version": __version__,
        "method": method, "edition": results.edition, "variant": results.variant or "-",
        "verdict": verdict(results), "passed": results.passed, "n_checks": n,
        "n_fail": int(np.sum(util > 1.0)) if n else 0,
        "governing": row_view(g) if g is not None else None,
        "summary": [row_view(i) for i in governing_by_check(results)],
        "factors": factors, "materials": materials, "bodies": bodies, "pins": pins, "links": links,
        "supports": supports, "loads": loads, "cases": cases, "forces": forces, "reactions": reactions,
        "link_forces": link_forces, "stacks": stacks, "geometry": geometry, "pin_axial": pin_axial,
        "sweeps": sweeps, "solver": sol.solver,
        "residual": f"{sol.residual:.1e}",
        "warnings": [*getattr(sol, "warnings", ()), *getattr(results, "warnings", ())],
        "combination_lines": combination_lines(results), "combined": bool(getattr(job, "combinations", None)),
        "forces_file": os.path.basename(job.forces.path) if getattr(job, "forces", None) is not None else None,
        "checks": [{"pin": p, "utilization": f"{pin_util[p]:.3f}", "band": _band(pin_util[p]),
                    "parts": [{"part": part, "rows": rows} for part, rows in parts.items()]}
                   for p, parts in by_pin.items()],
        "assumptions": list(results.assumptions), "unchecked": list(results.unchecked),
        "caution": CAUTION, "pictures": pictures or {},
        "units": {"force": fu, "moment": mu, "length": unit_of("length", units), "stress": unit_of("stress", units)},
        "bands": _bands(),
    }


def _has_axis(job, pin: str, part: str) -> bool:
    from ..joint import parts_of

    p = job.pins[pin]
    ix = next((q.plates for q in parts_of(p) if q.label == part), ())
    return any(p.stack[i].axis is not None for i in ix)


def _len_or_body(v, units) -> str:
    """A length, or a word where the outline sets no limit (the plate runs on into its body)."""
    v = float(v)
    return fmt(convert(v, "length", units)) if math.isfinite(v) else "into the body"


def _plate_detail(q, units) -> str:
    """The joint details of a plate beyond its basic sizes (outline, axis, group, bushing, lateral load)."""
    out = []
    o = q.outline
    if o is not None:
        if o.kind == "polygon":
            out.append("polygon outline (s, n) " + ", ".join(
                f"({fmt(convert(a, 'length', units))}, {fmt(convert(b, 'length', units))})" for a, b in o.vertices))
        else:
            out.append(f"{o.kind} outline, width {_L(o.width, units)}, "
                       + ("end" if o.kind == "square" else "arc radius") + f" {_L(o.end, units)}"
                       + (f" about ({fmt(convert(o.centre[0], 'length', units))}, "
                          f"{fmt(convert(o.centre[1], 'length', units))})" if tuple(o.centre) != (0.0, 0.0) else "")
                       + (f", base {_L(o.base, units)} behind the hole" if o.base is not None else ""))
    if q.axis is not None:
        out.append(f"axis {math.degrees(math.atan2(q.axis[1], q.axis[0])) % 360:.1f}° from +x")
    if q.group is not None:
        out.append(f"group '{q.group}'")
    if q.bushing is not None:
        b = q.bushing
        out.append(f"bushing OD {_L(b.outer, units)}" + (f", {b.material.name}" if b.material else ""))
    lat = q.lateral
    if lat is not None:
        if lat.fraction is not None:
            out.append(f"lateral load {lat.fraction:.3g} × in-plane force")
        else:
            out.append("lateral load per case: " + ", ".join(
                f"{k} {fmt(convert(v, 'force', units))} {unit_of('force', units)}" for k, v in lat.per_case.items()))
    if q.stiffened:
        out.append("stiffened")
    return "; ".join(out) or "-"


def _band(u: float) -> int:
    from .figures import BANDS

    for k, (top, _, _) in enumerate(BANDS):
        if u <= top:
            return k
    return len(BANDS) - 1


def _bands() -> list[dict]:
    from .figures import BANDS

    return [{"k": k, "colour": col, "text": text} for k, (_, col, text) in enumerate(BANDS)]


def _env(autoescape: bool):
    import jinja2

    env = jinja2.Environment(loader=jinja2.FileSystemLoader(_TEMPLATES), autoescape=autoescape,
                             trim_blocks=True, lstrip_blocks=True, keep_trailing_newline=True,
                             undefined=jinja2.StrictUndefined)
    env.filters["md"] = _md_cell
    return env


def _md_cell(text) -> str:
    """Text safe inside a Markdown table cell."""
    return str(text).replace("|", "\\|").replace("\n", " ")


def pictures_png(results, progress=None) -> dict[str, tuple[str, bytes]]:
    from .figures import all_figures

    return all_figures(results, progress)


def render_html(results, date: str | None = None, progress=None, **_) -> str:
    """The report as one HTML file with its pictures inline (base64 PNG)."""
    pics = {k: (cap, "data:image/png;base64," + base64.b64encode(png).decode("ascii"))
            for k, (cap, png) in pictures_png(results, progress).items()}
    return _env(True).get_template("report.html.j2").render(**context(results, date, pics))


def render_md(results, date: str | None = None, pictures: dict[str, str] | None = None, **_) -> str:
    """The report as Markdown; ``pictures`` maps a picture key to the file name to link (none: no pictures)."""
    from .figures import all_figure_captions

    pics = {}
    if pictures:
        caps = all_figure_captions(results)
        pics = {k: (caps.get(k, k), v) for k, v in pictures.items()}
    return _env(False).get_template("report.md.j2").render(**context(results, date, pics))
