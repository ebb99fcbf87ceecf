"""The checked parts of a pin's stack and the columns a method checks them with.

A part is one plate, a main plate with its cheek plates (plates of one member given one ``group``: they
are welded or fitted to act together, so bearing and tear-out are checked on their combined thickness),
or a bushing (the pin bears on its bore; the plate behind it is checked with the bushing's outside
diameter as its "pin"). Every plate's geometry is taken along the actual force of each row (pinchk.lug).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import numpy.typing as npt

from . import lug
from .model import Lateral, Pin, Plate
from .stack import StackResult, part_names

Array = npt.NDArray[np.float64]

#: Check names that do not depend on the lug's outline: no off-axis note on them, and a bushing keeps them.
OUTLINE_FREE = ("bearing", "contact", "clearance")


@dataclass(frozen=True)
class Part:
    """A checked part of a pin's stack."""

    pin: str
    label: str
    kind: str  # "plate" (a plate, or a main plate with its cheeks) or "bushing"
    plates: tuple[int, ...]  # indices in the stack

    def force(self, st: StackResult) -> Array:
        """Force the part receives in every case, (n_case, 2) [N]."""
        return st.plate_force[:, list(self.plates), :].sum(axis=1)


def outline_of(plate: Plate) -> lug.Outline:
    """The plate's outline: as given, or round (radius ``end`` about the hole centre) or square from
    its width and end distance."""
    if plate.outline is not None:
        return plate.outline
    return lug.Outline(plate.shape, width=plate.width, end=plate.end)


def parts_of(pin: Pin) -> list[Part]:
    """The checked parts of ``pin``, in stack order, then its bushings."""
    names = part_names(pin)
    out: list[Part] = []
    seen: set[tuple[str, str]] = set()
    for i, p in enumerate(pin.stack):
        if not p.checked:
            continue
        if p.group is None:
            out.append(Part(pin.name, names[i], "plate", (i,)))
            continue
        if (p.member, p.group) in seen:
            continue
        seen.add((p.member, p.group))
        ix = tuple(j for j, q in enumerate(pin.stack) if q.member == p.member and q.group == p.group)
        label = names[i] if len(ix) == 1 else f"{p.member} {p.group} ({len(ix)} plates)"
        out.append(Part(pin.name, label, "plate", ix))
    out += [Part(pin.name, f"{names[i]} bushing", "bushing", (i,)) for i, p in enumerate(pin.stack)
            if p.bushing is not None]
    return out


def columns(pin: Pin, part: Part, f_vec: Array, uls, ser) -> dict[str, Array]:
    """Method columns (see pinchk.methods) of ``part`` for forces ``f_vec`` (n, 2) on it [N].

    Besides the method's own columns: ``angle`` (force from the lug axis [rad]; 0 where the axis is
    taken along the force), ``a``, ``c_pos``, ``c_neg`` (hole edge to the outline along and across the
    force [m]). ``a_end`` and ``width`` are given so that a method's a = a_end - d0/2 and
    c = width/2 - d0/2 are the smallest of the part's plates along the real force.
    """
    f_vec = np.atleast_2d(np.asarray(f_vec, float))
    n = len(f_vec)
    plates = [pin.stack[i] for i in part.plates]
    full = lambda v: np.full(n, float(v))  # noqa: E731
    if part.kind == "bushing":
        p = plates[0]
        m = p.bushing.material
        t, d, d0 = p.thickness, pin.diameter, p.hole + pin.wear
        fy, fu, E, fyp, fup = m.fy, m.fu, m.E, pin.material.fy, pin.material.fu
        a = cp = cn = np.full(n, np.inf)
        angle = np.zeros(n)
        type_b = False
    else:
        t = sum(p.thickness for p in plates)
        fy = min(p.material.fy for p in plates)
        fu = min(p.material.fu for p in plates)
        E = min(p.material.E for p in plates)
        # a bushing is the "pin" of the plate behind it, fitted without clearance
        d = min(p.bushing.outer if p.bushing else pin.diameter for p in plates)
        fyp = min(p.bushing.material.fy if p.bushing else pin.material.fy for p in plates)
        fup = min(p.bushing.material.fu if p.bushing else pin.material.fu for p in plates)
        d0s = [p.bushing.outer if p.bushing else p.hole + pin.wear for p in plates]
        d0 = max(d0s)
        geo = [lug.along(outline_of(p), h, f_vec, p.axis) for p, h in zip(plates, d0s, strict=True)]
        a = np.min([g.a for g in geo], axis=0)
        cp = np.min([g.c_pos for g in geo], axis=0)
        cn = np.min([g.c_neg for g in geo], axis=0)
        angle = geo[0].angle
        type_b = any(p.en_type == "B" for p in plates)
    return {
        "F": np.linalg.norm(f_vec, axis=-1), "t": full(t), "d": full(d), "d0": full(d0), "fy": full(fy),
        "fu": full(fu), "fyp": full(fyp), "fup": full(fup), "E": full(E), "a_end": a + d0 / 2,
        "width": d0 + 2 * np.minimum(cp, cn), "type_b": np.full(n, type_b), "rot": np.full(n, pin.rotates),
        "uls": np.broadcast_to(uls, (n,)).copy(), "ser": np.broadcast_to(ser, (n,)).copy(),
        "stiffened": np.full(n, any(p.stiffened for p in plates)),
        "angle": angle, "a": a, "c_pos": cp, "c_neg": cn,
    }


def off_axis_note(pin: Pin, part: Part, angle: Array) -> list[str]:
    """Per row: the note that the method assumes load along the lug axis, where the force is off it."""
    if part.kind != "plate" or all(pin.stack[i].axis is None for i in part.plates):
        return [""] * len(angle)
    deg = np.degrees(angle)
    return [f"force {abs(x):.1f}° off the lug axis: the method's equations assume load along the axis; "
            f"geometry taken along the actual force" if abs(x) > lug.AXIS_TOL_DEG else "" for x in deg]


def share_note(pin: Pin, st: StackResult, part: Part) -> str:
    """How a grouped part's force is shared among its plates (for the notes)."""
    if len(part.plates) < 2:
        return ""
    names = [st.parts[i] for i in part.plates]
    sh = [st.share[i] for i in part.plates]
    tot = sum(sh)
    split = ", ".join(f"{n} {s / tot:.0%}" for n, s in zip(names, sh, strict=True))
    return (f"{pin.name} {part.label}: main plate and cheek plates checked together on their combined "
            f"thickness {sum(pin.stack[i].thickness for i in part.plates) * 1e3:g} mm (the lowest strength and "
            f"the smallest edge distances of them); they take {split} of the part's force; the weld or fit "
            "that makes them act together is not checked")


def lateral_columns(pin: Pin, part: Part, f_vec: Array, cases: tuple[str, ...],
                    combinations=None, fz: Array | None = None) -> dict[str, Array] | None:
    """Columns of the base-section check of a lug with a lateral load, or None when it has none.

    A lateral force given per load case enters a combination with the case's factor (``combinations``:
    name -> pinchk.model.Combination, where the rows are combinations). A part given no lateral load
    takes ``fz``, the force along the pin a forces file gives its plates (n_case,), where its outline
    has a base section.

    H: lateral force (out of the frame's plane) [N]; N: in-plane force along the lug axis, tension
    positive [N]; V: in-plane force across it [N]; h: hole centre to the base section [m]; b, t: the
    base section's width and thickness [m]; fy, fu [Pa].
    """
    if part.kind != "plate":
        return None
    # a group takes the lateral load and base section of the plate that has them
    p = next((pin.stack[i] for i in part.plates if pin.stack[i].lateral is not None), None)
    F = np.linalg.norm(f_vec, axis=-1)
    if p is None:
        p = pin.stack[part.plates[0]]
        if fz is None or not np.any(fz) or lug.base_section(outline_of(p))[0] is None:
            return None
        lat, H = Lateral(), np.abs(fz)
    elif (lat := p.lateral).fraction is not None:
        H = lat.fraction * F
    else:
        combos = combinations or {}
        H = np.abs([lat.per_case[c] if c in lat.per_case else
                    sum(k * lat.per_case.get(c0, 0.0) for c0, k in combos[c].factors.items()) if c in combos
                    else 0.0 for c in cases])
    h, b = lug.base_section(outline_of(p))
    b = lat.base_width if lat.base_width is not None else b
    if p.axis is None:
        N, V = F, np.zeros_like(F)
    else:
        ax = lug.unit(p.axis)[0]
        N = f_vec @ ax
        V = f_vec @ np.array([-ax[1], ax[0]])
    t = sum(pin.stack[i].thickness for i in part.plates)
    n = len(F)
    return {"H": H, "N": N, "V": V, "h": np.full(n, h), "b": np.full(n, b), "t": np.full(n, t),
            "fy": np.full(n, min(pin.stack[i].material.fy for i in part.plates)),
            "fu": np.full(n, min(pin.stack[i].material.fu for i in part.plates))}


#: What a design method does for a joint that turns under load (a note in the results).
ROTATING = {
    "EN 1993-1-8": "pinchk applies no separate bearing limit from EN 1993-1-8 §3.13 to a pin that turns "
                   "under load (Table 3.10 has none); the method's limits for pins in service are those of a "
                   "replaceable pin (Table 3.10 serviceability bearing and bending, contact stress eqs "
                   "(3.14)-(3.16)): consider replaceable = true",
    "AISC 360-16": "AISC 360-16 §D5.2: the hole may be at most 1/32 in (1 mm) over the pin where the pin "
                   "turns under load, checked with any wear allowance; §J7 gives no separate bearing limit",
}


def rotating_note(method: str, pins: list[str]) -> str:
    """The note for the pins marked as turning under load."""
    rule = ROTATING.get(method, f"{method}: its rules for pins turning under load apply where it has them "
                                "(the rows say which)")
    return f"pins turning under load ({', '.join(pins)}): {rule}"


def notes(job, stacks, dropped: int, bushings: bool, bases: bool) -> list[str]:
    """The assumptions the joint checks rest on, for the results' notes."""
    out = []
    checked = [p for n in stacks for p in job.pins[n].stack if p.checked]
    if any(p.axis is None for p in checked):
        out.append("a plate without a lug axis is checked with its axis taken along the force of each case "
                   "(end distance along the force, width across it)")
    if any(p.axis is not None for p in checked):
        out.append("a plate with a lug axis is checked with the geometry of its outline along the actual "
                   "force of each case: material beyond the hole along the force, the net section across it "
                   "through the hole centre")
    if dropped:
        out.append(f"{dropped} rows left out where the outline sets no limit: along the force (or across it) "
                   "the plate runs on into its body through its base, with no free edge")
    turning = [n for n in stacks if job.pins[n].rotates]
    if turning:
        out.append(rotating_note(job.method.name, turning))
    out += [f"{n}: holes taken {job.pins[n].wear * 1e3:g} mm larger for wear in every check"
            for n in stacks if job.pins[n].wear > 0]
    models = {st.model for st in stacks.values()}
    if "uniform" in models:
        out.append("pin moment from uniform bearing over each plate's thickness (EN 1993-1-8 Fig. 3.11 "
                   "model); an unsymmetric stack's net couple is held by equal end couples at its outer faces")
    if "point" in models:
        out.append("pins with pin_model = \"point\": each plate's force as a point load at its centre "
                   "(conservative against uniform bearing)")
    if bushings:
        out.append("bushings: the pin bears on the bushing's bore (its own material); the plate behind is "
                   "checked with the bushing's outside diameter as its pin, fitted without clearance")
    if bases:
        out.append("lateral loads act at the hole centre, out of the frame's plane; the lug's base section "
                   "is checked for weak-axis bending with the in-plane force; the pin's retainer takes their "
                   "sum (see pin_axial)")
    return out


def no_base_warning(method: str, parts: list[str]) -> str:
    """The warning for lugs with a lateral load that the method in force cannot check at their base."""
    return (f"lateral loads given, but pinchk has no base-section check for {method}: the base of "
            f"{', '.join(parts)} is NOT checked (check it by hand, or run the job with EN 1993-1-8 or AISC 360-16)")
