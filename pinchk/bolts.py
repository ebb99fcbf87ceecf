"""Bolts used as pins: the grade library (data/bolt_grades.csv) and thread tensile-stress areas.

A pin may be a bolt of a named grade. Its shank and, in the planes the job names, its threaded part take
the shear; bearing and bending are checked as for a pin on the shank diameter. Rigging practice warns
against a bolt in place of a pin where a thread bears or lies in a shear plane, or where the pin turns
under load; the checks say so in the results.

References:
    ISO 898-1:2013 Mechanical properties of fasteners, Table 3 (strengths) and Table 4 (stress areas,
    As = (π/4)(d − 0.9382 p)²); ISO 261 coarse pitches. SAE J429 Mechanical and material requirements
    for externally threaded fasteners. ASTM F3125/F3125M (Grades A325, A490 and their metric forms).
    ASTM A307. ASME B1.1 Unified inch screw threads (As = 0.7854 (D − 0.9743/n)²).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import cache

import numpy as np

from .materials import read_rows
from .units import to_si

INCH = 0.0254


@dataclass(frozen=True)
class BoltGrade:
    """One row of the grade library: strengths [Pa] over a nominal-diameter range [m]."""

    standard: str
    grade: str
    size_min: float
    size_max: float
    fu_nom: float
    fu_min: float
    fy_nom: float | None  # None: the standard specifies no yield strength (ASTM A307)
    fy_min: float | None
    proof: float | None
    thread: str  # "metric" or "unified"
    confidence: str
    source: str

    @property
    def label(self) -> str:
        return self.standard if self.grade in self.standard else f"{self.standard} {self.grade}"


@dataclass(frozen=True)
class ThreadSize:
    """A coarse thread: nominal diameter d [m], pitch p [m], the stress area of its table [m²] if any."""

    system: str
    size: str
    d: float
    pitch: float
    table_As: float | None
    confidence: str
    source: str


def _opt(text: str, unit: str, dim: str) -> float | None:
    return to_si(float(text), dim, unit) if text.strip() else None


@cache
def grades() -> tuple[BoltGrade, ...]:
    """Every row of data/bolt_grades.csv, in file order."""
    out = []
    for r in read_rows("bolt_grades.csv"):
        su, st = r["size_unit"], r["stress_unit"]
        out.append(BoltGrade(
            r["standard"], r["grade"], to_si(float(r["size_min"]), "length", su),
            to_si(float(r["size_max"]), "length", su), to_si(float(r["fu_nom"]), "stress", st),
            to_si(float(r["fu_min"]), "stress", st), _opt(r["fy_nom"], st, "stress"), _opt(r["fy_min"], st, "stress"),
            _opt(r["proof"], st, "stress"), r["thread"], r["confidence"], r["source"]))
    return tuple(out)


def grade_names() -> list[str]:
    """Names a job may give: the grade ("8.8", "A325", "Grade 5"), and "standard grade" forms."""
    names: list[str] = []
    for g in grades():
        for n in (g.grade, f"{g.standard} {g.grade}"):
            if n not in names:
                names.append(n)
    return names


def grade_at(name: str, d: float) -> BoltGrade:
    """The grade row for ``name`` at nominal diameter ``d`` [m].

    Raises:
        KeyError: no grade of that name.
        ValueError: the grade does not cover the size (the message gives its range).
    """
    rows = [g for g in grades() if name in (g.grade, f"{g.standard} {g.grade}")]
    if not rows:
        raise KeyError(name)
    eps = 1e-9
    for i, g in enumerate(rows):
        low_ok = d >= g.size_min - eps if i == 0 else d > g.size_min + eps
        if low_ok and d <= g.size_max + eps:
            return g
    unit, k = ("in", INCH) if rows[0].thread == "unified" else ("mm", 1e-3)
    raise ValueError(f"bolt grade {name} is listed for diameters {rows[0].size_min / k:g} {unit} to "
                     f"{rows[-1].size_max / k:g} {unit}, not {d / k:g} {unit}")


@cache
def thread_sizes() -> tuple[ThreadSize, ...]:
    out = []
    for r in read_rows("thread_sizes.csv"):
        if r["system"] == "metric":
            d, p = float(r["d"]) * 1e-3, float(r["pitch"]) * 1e-3
            As = float(r["table_As"]) * 1e-6 if r["table_As"].strip() else None
        else:
            d, p = float(r["d"]) * INCH, INCH / float(r["tpi"])
            As = float(r["table_As"]) * INCH**2 if r["table_As"].strip() else None
        out.append(ThreadSize(r["system"], r["size"], d, p, As, r["confidence"], r["source"]))
    return tuple(out)


def coarse_thread(system: str, d: float) -> ThreadSize | None:
    """The listed coarse thread of nominal diameter ``d`` [m] in ``system``, or None."""
    for t in thread_sizes():
        if t.system == system and abs(t.d - d) <= 1e-6 * max(d, 1e-3):
            return t
    return None


def stress_area_metric(d: float, p: float) -> float:
    """Tensile stress area of an ISO metric thread [m²]: As = (π/4)(d − 0.9382 p)² (ISO 898-1 Table 4 note).

    Args:
        d: nominal diameter [m]. p: pitch [m].
    """
    return math.pi / 4 * (d - 0.9382 * p) ** 2


def stress_area_unified(D: float, n: float) -> float:
    """Tensile stress area of a unified inch thread [m²]: As = 0.7854 (D − 0.9743/n)² in inches (ASME B1.1).

    Args:
        D: nominal diameter [m]. n: threads per inch [1/in].
    """
    D_in = D / INCH
    return 0.7854 * (D_in - 0.9743 / n) ** 2 * INCH**2


def stress_area(system: str, d: float, pitch: float) -> float:
    """Stress area [m²] of a thread of ``system`` ("metric" or "unified"), nominal ``d`` and ``pitch`` [m]."""
    if system == "metric":
        return stress_area_metric(d, pitch)
    return stress_area_unified(d, INCH / pitch)


def pitch_text(system: str, pitch: float) -> str:
    if system == "metric":
        return f"pitch {pitch * 1e3:g} mm"
    return f"{INCH / pitch:g} threads per inch"


@dataclass(frozen=True)
class BoltSpec:
    """A pin that is a bolt: its grade, thread, stress area and where the thread lies in the stack.

    ``thread_planes`` are shear-plane numbers (plane 1 lies between plates 1 and 2 of the stack);
    ``thread_plates`` are plate numbers (1-based) whose hole holds part of the thread.
    """

    grade: BoltGrade
    system: str
    pitch: float  # m
    As: float  # m², tensile stress area of the thread
    pitch_source: str
    thread_planes: tuple[int, ...] = ()
    thread_plates: tuple[int, ...] = ()

    @property
    def thread_note(self) -> str:
        return (f"bolt {self.grade.label}, {pitch_text(self.system, self.pitch)} ({self.pitch_source}), "
                f"As = {self.As * 1e6:.4g} mm² by the {self.system} stress-area formula")


def shank_and_thread_shear(pin, st):
    """Largest shear [N] on a plane through the shank and on one through the thread, per case (0 where none).

    Args:
        pin: the Pin (its ``bolt`` says which planes cut the thread). st: its StackResult.
    """
    planes = st.plane_shear
    thread = np.zeros(planes.shape[1], bool)
    if pin.bolt is not None:
        thread[[k - 1 for k in pin.bolt.thread_planes]] = True
    zero = np.zeros(planes.shape[0])
    V_sh = planes[:, ~thread].max(axis=1) if (~thread).any() else zero
    V_th = planes[:, thread].max(axis=1) if thread.any() else zero
    return V_sh, V_th


def warnings_for(pin) -> list[str]:
    """Rigging practice warns against a bolt in place of a pin where a thread bears or shears, or it turns."""
    b = pin.bolt
    if b is None:
        return []
    out = []
    if b.thread_planes:
        out.append(f"{pin.name}: bolt used as a pin with its thread in shear plane(s) "
                   f"{', '.join(map(str, b.thread_planes))}: rigging practice warns against a thread in a shear "
                   "plane; use a pin or a bolt with a longer shank")
    if b.thread_plates:
        names = ", ".join(f"{k} ({pin.stack[k - 1].member})" for k in b.thread_plates)
        out.append(f"{pin.name}: bolt used as a pin with its thread bearing in plate(s) {names}: rigging practice "
                   "warns against a thread in bearing; the bearing checks use the shank diameter and do not "
                   "cover a thread")
    if pin.rotates:
        out.append(f"{pin.name}: bolt used as a pin in a joint marked rotating under load: rigging practice warns "
                   "against it (the bolt wears, its thread and nut can loosen); use a pin")
    return out
