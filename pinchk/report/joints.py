"""Views of the pin stacks, the plate geometry along the force and the load-angle sweeps.

Shared by the terminal table and the JSON view: shear at every plane and the moment along each pin per
case, the plates that cause them, the governing plate check per case, and each lug's sweep.
"""

from __future__ import annotations

import math

import numpy as np

from .common import convert, fmt, unit_of


def _num(x):
    """A JSON-safe float: None for nan or inf."""
    x = float(x)
    return x if math.isfinite(x) else None


def stack_dicts(results, units) -> list[dict]:
    """Per pin and case: shear at each plane (vector and magnitude), the largest moment and their causes."""
    out = []
    for name, st in results.stacks.items():
        for j, case in enumerate(results.solution.cases):
            planes = [{"plane": f"{st.parts[k]} | {st.parts[k + 1]}",
                       "z": convert(float(st.plane_z[k]), "length", units),
                       "vx": convert(float(st.plane_shear_vec[j, k, 0]), "force", units),
                       "vy": convert(float(st.plane_shear_vec[j, k, 1]), "force", units),
                       "shear": convert(float(st.plane_shear[j, k]), "force", units)}
                      for k in range(st.plane_shear.shape[1])]
            out.append({
                "pin": name, "case": case, "model": st.model, "planes": planes,
                "shear": convert(float(st.shear[j]), "force", units), "shear_plane": int(st.shear_plane[j]) + 1,
                "shear_cause": st.shear_cause(j),
                "moment": convert(float(st.moment[j]), "moment", units),
                "mx": convert(float(st.moment_vec[j, 0]), "moment", units),
                "my": convert(float(st.moment_vec[j, 1]), "moment", units),
                "moment_at": convert(float(st.moment_at[j]), "length", units),
                "moment_cause": st.moment_cause(j),
                "share": {p: float(s) for p, s in zip(st.parts, st.share, strict=True)},
                "moment_diagram": _diagram(st, j, units),
                "share_note": st.share_note,
            })
    return out


def _diagram(st, j: int, units, per_plate: int = 4) -> dict:
    """Moment along the pin for a plot: at every plate's faces and ``per_plate`` points inside it."""
    z = np.unique(np.concatenate([np.linspace(z0, z0 + t, per_plate + 2)
                                  for z0, t in zip(st.z0, st.thickness, strict=True)]))
    M = st.moment_along(z)[j]
    return {"z": [convert(float(x), "length", units) for x in z],
            "mx": [convert(float(x), "moment", units) for x in M[:, 0]],
            "my": [convert(float(x), "moment", units) for x in M[:, 1]],
            "moment": [convert(float(x), "moment", units) for x in np.linalg.norm(M, axis=1)]}


def governing_plate_by_case(results) -> list[int]:
    """For each (pin, case), the row of the plate check with the highest utilization."""
    c = results.columns
    best: dict[tuple[str, str], int] = {}
    for i in range(len(results)):
        if c["part"][i] in ("pin", "pin retainer"):
            continue
        key = (c["pin"][i], c["case"][i])
        if key not in best or c["utilization"][i] > c["utilization"][best[key]]:
            best[key] = i
    return list(best.values())


def geometry_dicts(results, units) -> list[dict]:
    out = []
    for (pin, part), g in results.geometry.items():
        for j, case in enumerate(results.solution.cases):
            out.append({"pin": pin, "part": part, "case": case, "angle_to_axis_deg": math.degrees(g["angle"][j]),
                        "a": _num(convert(g["a"][j], "length", units)),
                        "c_left": _num(convert(g["c_pos"][j], "length", units)),
                        "c_right": _num(convert(g["c_neg"][j], "length", units))})
    return out


def sweep_dicts(results, units) -> list[dict]:
    out = []
    for sw in results.sweeps:
        out.append({
            "pin": sw.pin, "part": sw.part, "force": convert(sw.force, "force", units),
            "axis_deg": sw.axis_deg, "angle_deg": [float(a) for a in sw.angle_deg],
            "utilization": {k: [_num(u) for u in sw.util[i]] for i, k in enumerate(sw.checks)},
            "cases": [{"case": c, "angle_deg": float(sw.case_angle_deg[j]),
                       "force": convert(float(sw.case_force[j]), "force", units),
                       "utilization": {k: _num(sw.case_util[i, j]) for i, k in enumerate(sw.checks)}}
                      for j, c in enumerate(sw.cases)],
        })
    return out


def joint_dict(results, units) -> dict:
    """The JSON section of the joints."""
    c = results.columns
    return {
        "stacks": stack_dicts(results, units),
        "governing_plate_check": [{"pin": c["pin"][i], "case": c["case"][i], "part": c["part"][i],
                                   "check": c["check"][i], "utilization": float(c["utilization"][i]),
                                   "status": c["status"][i]} for i in governing_plate_by_case(results)],
        "plate_geometry": geometry_dicts(results, units),
        "pin_axial_force": [{"pin": p, "case": case, "force": convert(float(a[j]), "force", units)}
                            for p, a in results.pin_axial.items() for j, case in enumerate(results.solution.cases)],
        "load_angle_sweep": sweep_dicts(results, units),
    }


def _plates_of(results, pin: str, part: str) -> tuple[int, ...]:
    from ..joint import parts_of

    return next(p.plates for p in parts_of(results.job.pins[pin]) if p.label == part)


def joint_text(results, units) -> list[str]:
    """Lines of the terminal view: stacks, governing plate check per case, sweeps."""
    from tabulate import tabulate

    fu, mu, lu = unit_of("force", units), unit_of("moment", units), unit_of("length", units)
    out: list[str] = []
    for name, st in results.stacks.items():
        rows = []
        for j, case in enumerate(results.solution.cases):
            shears = " / ".join(fmt(convert(v, "force", units)) for v in st.plane_shear[j])
            rows.append((case, shears, int(st.shear_plane[j]) + 1, fmt(convert(st.moment[j], "moment", units)),
                         fmt(convert(st.moment_at[j], "length", units))))
        out.append(f"Pin {name}: {len(st.parts)} plates ({', '.join(st.parts)}); {st.share_note}; "
                   f"{st.model} bearing")
        out.append(tabulate(rows, headers=["case", f"|V| at planes 1-2, 2-3, ... [{fu}]", "governing plane",
                                           f"max |M| [{mu}]", f"at [{lu}]"], disable_numparse=True))
        j = int(np.argmax(st.moment))
        out.append(f"  largest shear ({results.solution.cases[int(np.argmax(st.shear))]}): "
                   f"{st.shear_cause(int(np.argmax(st.shear)))}")
        out.append(f"  largest moment ({results.solution.cases[j]}): {st.moment_cause(j)}")
        out.append("")
    rows = []
    for (pin, part), g in results.geometry.items():
        if all(results.job.pins[pin].stack[i].axis is None for i in _plates_of(results, pin, part)):
            continue
        for j, case in enumerate(results.solution.cases):
            rows.append((pin, part, case, f"{math.degrees(g['angle'][j]):.1f}",
                         *(fmt(convert(g[k][j], "length", units)) for k in ("a", "c_pos", "c_neg"))))
    if rows:
        out.append("Lug geometry along the force of each case (plates with an axis; inf: the plate runs on into "
                   "its body)")
        out.append(tabulate(rows, headers=["pin", "part", "case", "force to axis [deg]", f"a [{lu}]",
                                           f"c left [{lu}]", f"c right [{lu}]"], disable_numparse=True))
        out.append("")
    c = results.columns
    rows = [(c["pin"][i], c["case"][i], c["part"][i], c["check"][i], f"{c['utilization'][i]:.3f}", c["status"][i])
            for i in governing_plate_by_case(results)]
    if rows:
        out.append("Governing plate check per load case")
        out.append(tabulate(rows, headers=["pin", "case", "part", "check", "util", "status"], disable_numparse=True))
        out.append("")
    rows = []
    for sw in results.sweeps:
        u, a, k = sw.peak()
        real = np.nanmax(sw.case_util) if sw.case_util.size else float("nan")
        rows.append((sw.pin, sw.part, fmt(convert(sw.force, "force", units)),
                     "along the force" if sw.axis_deg is None else f"{sw.axis_deg:.1f}", f"{u:.3f}", f"{a:.0f}", k,
                     ", ".join(f"{cs} {ang:.0f}" for cs, ang in zip(sw.cases, sw.case_angle_deg, strict=True)),
                     f"{real:.3f}"))
    if rows:
        out.append("Load-angle sweep: each lug's force turned through 360° at its largest magnitude "
                   "(angles in the frame, from +x)")
        out.append(tabulate(rows, headers=["pin", "part", f"|F| [{fu}]", "axis [deg]", "peak util", "at [deg]",
                                           "peak check", "case directions [deg]", "util at cases"],
                            disable_numparse=True))
        out.append("")
    return out
