"""Alternatives of a checked design: compare them, size pins and plates, rate the load a design takes.

The frame is solved once (for a statically determinate frame the joint forces do not depend on the
sizes of pins and plates). The check columns ``checks.run_checks`` builds for the method kernels are
recorded once, through a stand-in method module, then copied for every (pin, alternative) with the
values the alternative changes (pin diameter and hole, pin material or bolt grade at that size, plate
thickness, material and edge distances; the pin's shear and moment follow the new plate thicknesses
through the stack). The method kernels are then called once per method over all rows together.

Compare evaluates a list of alternatives per pin. Size searches a preferred series of pin diameters and
plate thicknesses (data/size_series.csv) for the smallest that passes every check in every case, with the
end distance and width the method's detailing rules then need, and finds the exact limit in between with
a root finder. Rate finds the largest multiplier on a load case or a labelled load for which every check
still passes, by root finding on the largest utilization of a full run: it does not divide by the
utilization, because checks are not all proportional to the load.

Results are an aid to a qualified engineer, not a substitute: local codes, the project's specification
and licensed practice govern.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace
from functools import cache, lru_cache

import numpy as np
import numpy.typing as npt
from scipy.optimize import brentq

from .checks import run_checks
from .errors import InputError, Problem, StructureError
from .frame import FrameSolution
from .materials import at_size, library, read_rows
from .methods import METHODS, factors_for, make_check
from .model import Job, Material
from .stack import solve_stack
from .units import to_si

Array = npt.NDArray[np.float64]
PROBE = "__columns__"
INCH = 0.0254

# ----------------------------------------------------------------------------------------------- series


@dataclass(frozen=True)
class Series:
    name: str
    kind: str  # "pin" or "plate"
    values: tuple[float, ...]  # m, ascending
    confidence: str
    source: str


@cache
def series_library() -> dict[tuple[str, str], Series]:
    """data/size_series.csv: (kind, name) -> Series."""
    out = {}
    for r in read_rows("size_series.csv"):
        vals = tuple(sorted(to_si(float(v), "length", r["unit"]) for v in r["values"].split()))
        out[(r["kind"], r["series"])] = Series(r["series"], r["kind"], vals, r["confidence"], r["source"])
    return out


def series_values(kind: str, names: str) -> tuple[tuple[float, ...], tuple[Series, ...]]:
    """The union of the series ``names`` ("metric", "metric,metric-large") of ``kind``, ascending."""
    lib = series_library()
    got = []
    for n in [x.strip() for x in names.split(",") if x.strip()]:
        if (kind, n) not in lib:
            have = ", ".join(s for k, s in lib if k == kind)
            raise InputError(Problem("data/size_series.csv", "", f"{kind} series",
                                     f"there is no {kind} series {n!r}; the series are: {have}"))
        got.append(lib[(kind, n)])
    vals = sorted({round(v, 9) for s in got for v in s.values})
    return tuple(vals), tuple(got)


def default_series(job: Job, kind: str) -> str:
    if job.output_units == "US":
        return "inch,inch-large" if kind == "pin" else "inch"
    return "metric,metric-large" if kind == "pin" else "metric"


# ----------------------------------------------------------------------------------------------- options


@dataclass(frozen=True)
class Option:
    """One alternative design of one pin; a field left None (or empty) keeps the job's value.

    Lengths in m. ``pin_material`` names a material of data/materials.csv, ``grade`` a bolt grade of
    data/bolt_grades.csv (both taken at the option's diameter). ``thickness``, ``plate_material`` and
    ``geometry`` give, per member of the pin's stack, the thickness, material and (end, width) of every
    checked plate of that member. ``detail`` derives end and width from the method's detailing rules.
    """

    label: str
    diameter: float | None = None
    pin_material: str | None = None
    grade: str | None = None
    thickness: tuple[tuple[str, float], ...] = ()
    plate_material: tuple[tuple[str, str], ...] = ()
    geometry: tuple[tuple[str, float, float], ...] = ()
    method: str | None = None
    detail: bool = False
    round_to: float | None = None  # round derived end and width up to this step [m]


@dataclass(frozen=True)
class Base:
    """The job's forces and the check columns of its design, recorded once."""

    job: Job  # as checked (one case per combination where the job has combinations)
    sol: FrameSolution
    P: dict[str, np.ndarray]
    Q: dict[str, np.ndarray]
    nc: int
    cases: tuple[str, ...]
    pin_rows: dict[str, np.ndarray]
    plate_rows: dict[str, np.ndarray]  # rows of the pin's checked plates: part-major, case-minor
    parts: dict[str, tuple[str, ...]]  # plate part labels of each pin, in row order
    part_member: dict[str, tuple[str, ...]]
    cache: dict = field(default_factory=dict, compare=False, repr=False)  # stack solves by plate thicknesses


class _Probe:
    """Stands in for a method module and records the columns run_checks gives its kernels."""

    def __init__(self, mod):
        self.NAME, self.EDITION, self.VARIANTS, self.FACTORS = mod.NAME, mod.EDITION, mod.VARIANTS, mod.FACTORS
        self.P: dict | None = None
        self.Q: dict | None = None

    def _mark(self, cols):
        n = len(cols["d"])
        return [make_check(PROBE, f"{PROBE}: -", "ratio", np.zeros(n), np.ones(n), "")]

    def pin_checks(self, P, f, variant=None):
        if self.P is None:
            self.P = P
        return self._mark(P)

    def plate_checks(self, Q, f, variant=None):
        if self.Q is None:  # the first call is the plates (a later one may be bushings)
            self.Q = Q
            return self._mark(Q)
        return []


def _forces(job: Job) -> tuple[Job, FrameSolution]:
    from .forcesfile import joint_forces

    sol = joint_forces(job)
    try:
        from .combine import combine
    except ImportError:  # a version without load combinations
        return job, sol
    return combine(job, sol)


def _member_of(pin, label: str) -> str:
    names = sorted({p.member for p in pin.stack}, key=len, reverse=True)
    for m in names:
        if label == m or label.startswith(m + " "):
            return m
    return label


def prepare(job: Job) -> Base:
    """Solve ``job`` once and record its check columns."""
    job2, sol = _forces(job)
    probe = _Probe(METHODS[job2.method.name])
    res = run_checks(job2, sol, module=probe)
    c = res.columns
    rows = np.flatnonzero(np.array([ch == PROBE for ch in c["check"]]))
    nP = 0 if probe.P is None else len(probe.P["d"])
    nQ = 0 if probe.Q is None else len(probe.Q["d"])
    pins_col = np.array(c["pin"], dtype=object)[rows]
    part_col = np.array(c["part"], dtype=object)[rows]
    pin_rows, plate_rows, parts, members = {}, {}, {}, {}
    for name in dict.fromkeys(pins_col[:nP]):
        pin_rows[name] = np.flatnonzero(pins_col[:nP] == name)
        q = np.flatnonzero(pins_col[nP:nP + nQ] == name)
        plate_rows[name] = q
        labs = tuple(dict.fromkeys(part_col[nP:nP + nQ][q]))
        parts[name] = labs
        members[name] = tuple(_member_of(job2.pins[name], lb) for lb in labs)
    return Base(job2, sol, probe.P or {}, probe.Q or {}, len(sol.cases), tuple(sol.cases), pin_rows, plate_rows,
                parts, members)


# ----------------------------------------------------------------------------------------------- materials


@lru_cache(maxsize=4096)
def _material(name: str, size: float) -> Material | str:
    """A library material at a size, or the reason there is none."""
    try:
        return at_size(name, size)
    except KeyError:
        return f"no material {name!r} in data/materials.csv"
    except ValueError as exc:
        return str(exc)


@lru_cache(maxsize=4096)
def _grade(name: str, size: float) -> tuple[Material, str] | str:
    try:
        from . import bolts
    except ImportError:
        return "bolt grades are not available in this version"
    try:
        g = bolts.grade_at(name, size)
    except KeyError:
        return f"no bolt grade {name!r} in data/bolt_grades.csv"
    except ValueError as exc:
        return str(exc)
    if g.fy_nom is None:
        return f"bolt grade {g.label} has no specified yield strength, which the pin checks need"
    return Material(f"bolt {g.label}", g.fy_nom, g.fu_nom, 2.1e11 if g.thread == "metric" else 1.9995e11,
                    g.source), g.grade


def bolt_grade_names() -> list[str]:
    """Every bolt grade of the library, once each ("8.8", "A325", "Grade 5", ...)."""
    try:
        from . import bolts
    except ImportError:
        return []
    return list(dict.fromkeys(g.grade for g in bolts.grades()))


def material_names() -> list[str]:
    return list(library())


@lru_cache(maxsize=1024)
def _from_library(m: Material | None) -> bool:
    return m is not None and m.name in library() and any(r.source == m.source for r in library()[m.name])


def _bolt_at(pin, opt: Option, d: float):
    """(BoltSpec or None, reason): a bolt pin at diameter ``d`` with the option's grade (its own where none);
    None for a pin that is not a bolt, or that the option makes a plain pin of a material."""
    bolt = getattr(pin, "bolt", None)
    if bolt is None or opt.pin_material is not None:
        return None, ""
    if opt.grade is None and d == pin.diameter:
        return bolt, ""
    from . import bolts

    try:
        g = bolts.grade_at(opt.grade or bolt.grade.grade, d)
    except (KeyError, ValueError) as exc:
        return None, str(exc)
    if g.thread == bolt.system and d == pin.diameter:
        pitch = bolt.pitch
    else:
        th = bolts.coarse_thread(g.thread, d)
        if th is None:
            return None, f"no {g.thread} coarse thread of this diameter in data/thread_sizes.csv"
        pitch = th.pitch
    return replace(bolt, grade=g, system=g.thread, pitch=pitch, As=bolts.stress_area(g.thread, d, pitch)), ""


def _pin_material(pin, opt: Option, d: float) -> tuple[Material | None, str | None, str]:
    """(material, bolt grade or None, reason it is not available or "")."""
    if opt.grade is not None:
        g = _grade(opt.grade, d)
        return (None, None, g) if isinstance(g, str) else (g[0], g[1], "")
    if opt.pin_material is not None:
        m = _material(opt.pin_material, d)
        return (None, None, m) if isinstance(m, str) else (m, None, "")
    bolt = getattr(pin, "bolt", None)
    if bolt is not None and d != pin.diameter:
        g = _grade(bolt.grade.grade, d)
        return (None, None, g) if isinstance(g, str) else (g[0], g[1], "")
    if d != pin.diameter and _from_library(pin.material):
        m = _material(pin.material.name, d)
        return (None, None, m) if isinstance(m, str) else (m, None, "")
    return pin.material, None, ""


# ----------------------------------------------------------------------------------------------- detailing


def _detail_en(F, t, d, d0, fy, fac, type_b):
    """EN 1993-1-8 Table 3.9 type A: a ≥ F γM0/(2 t fy) + 2 d0/3, c ≥ F γM0/(2 t fy) + d0/3."""
    base = F * fac["gamma_M0"] / (2 * t * fy)
    end = base + 2 * d0 / 3 + d0 / 2
    width = 2 * (base + d0 / 3) + d0
    return end, width, type_b  # type B plates keep their outline (scaled with the hole)


def _detail_aisc(F, t, d, d0, fy, fac, type_b):
    """AISC 360-16 §D5.1(a), §D5.2: be = 2t + 16 mm beside the hole, a ≥ 1.33 be, w ≥ 2 be + d."""
    from .methods.aisc360_16 import BE_ADD

    be = 2 * t + BE_ADD
    return 1.33 * be + d0 / 2, np.maximum(2 * be + d0, 2 * be + d), np.zeros_like(type_b, bool)


#: method name -> rule giving (end, width, keep) per row; methods without one scale the job's outline
DETAILING = {"EN 1993-1-8": _detail_en, "AISC 360-16": _detail_aisc}
#: the checks a rule's end and width meet by construction (left out where a limit is solved for)
DERIVED = {"EN 1993-1-8": ("end distance (type A)", "edge distance (type A)"),
           "AISC 360-16": ("end distance", "width")}
DETAILING_TEXT = {
    "EN 1993-1-8": "end and width from EN 1993-1-8 Table 3.9 type A (a = F γM0/(2 t fy) + 2 d0/3, "
                   "c = F γM0/(2 t fy) + d0/3, the largest force of any case); type B plates keep their outline "
                   "scaled with the hole",
    "AISC 360-16": "end and width from AISC 360-16 §D5.2 with be = 2t + 16 mm (a = 1.33 be, w = 2 be + d0)",
}
SCALED_TEXT = ("the method has no edge-distance rule of its own: end and width are the job's, scaled with the "
               "hole diameter")


# ----------------------------------------------------------------------------------------------- engine


@dataclass(frozen=True)
class PinSweep:
    """Every option of one pin, evaluated: utilization arrays (n_option,), nan where not available."""

    pin: str
    options: tuple[Option, ...]
    reason: tuple[str, ...]  # "" where the option could be evaluated
    util: Array
    check: tuple[str, ...]
    part: tuple[str, ...]
    case: tuple[str, ...]
    parts: tuple[str, ...]  # "pin" then the plate parts
    part_util: Array  # (n_option, n_parts)
    check_util: dict[str, Array] = field(default_factory=dict)
    check_names: tuple[str, ...] = ()
    part_check_ix: npt.NDArray[np.intp] | None = None  # (n_option, n_parts) into check_names
    geo: Array | None = None  # (n_option, n_plate_parts, 3): t, end, width [m]
    strengths: Array | None = None  # (n_option, 2): pin fu, lowest plate fu [Pa]
    kinds: dict[str, str] = field(default_factory=dict)  # check -> kind ("force", "length", ...)
    check_part_util: dict[str, Array] = field(default_factory=dict)  # check -> (n_option, n_parts)

    def util_without(self, exclude=(), parts=None) -> Array:
        """Largest utilization of each option over the checks not in ``exclude`` and the part columns
        ``parts`` (default all; 0 is the pin); inf where the option is not available."""
        cols = slice(None) if parts is None else list(parts)
        u = np.full(len(self.options), -np.inf)
        for c, arr in self.check_part_util.items():
            if c not in exclude:
                u = np.maximum(u, arr[:, cols].max(axis=1))
        return np.where(self.valid, u, np.inf)

    @property
    def valid(self) -> npt.NDArray[np.bool_]:
        return np.array([r == "" for r in self.reason], dtype=bool)

    @property
    def passed(self) -> npt.NDArray[np.bool_]:
        return self.valid & (np.nan_to_num(self.util, nan=np.inf) <= 1.0)

    def geometry(self, i: int) -> dict[str, tuple[float, float, float]]:
        """Option ``i``: plate part -> (thickness, end, width) [m]."""
        return {lab: tuple(float(x) for x in self.geo[i, j]) for j, lab in enumerate(self.parts[1:])}

    def part_check(self, i: int, j: int) -> str:
        """The governing check of part ``j`` (0 the pin) under option ``i``."""
        return self.check_names[int(self.part_check_ix[i, j])]

    def strength(self, i: int) -> tuple[float, str]:
        """(utilization, check) of the option's governing strength check (not a length or detailing rule)."""
        best, name = -np.inf, ""
        for c, arr in self.check_util.items():
            if self.kinds.get(c) not in ("length", "detail") and arr[i] > best:
                best, name = float(arr[i]), c
        return best, name


def _ratio(new, old):
    with np.errstate(divide="ignore", invalid="ignore"):
        return np.where(old > 0, new / np.where(old > 0, old, 1.0), 0.0)


def _stack_ratios(base: Base, name: str, thick: dict[str, float], cache: dict):
    """(V ratio, M ratio, plate-force ratio per plate part) of the pin with its members' plates at ``thick``."""
    key = (name, tuple(sorted(thick.items())))
    if key in cache:
        return cache[key]
    pin = base.job.pins[name]
    if not thick:
        out = None
    else:
        if (name, None) not in cache:
            cache[(name, None)] = solve_stack(pin, base.sol.pins[name])
        st0 = cache[(name, None)]
        stack = tuple(replace(p, thickness=_thickness(pin, p, thick[p.member])) if p.member in thick and p.checked
                      else p
                      for p in pin.stack)
        st1 = solve_stack(replace(pin, stack=stack), base.sol.pins[name])
        f0 = np.linalg.norm(st0.plate_force, axis=-1)
        f1 = np.linalg.norm(st1.plate_force, axis=-1)
        out = (_ratio(st1.shear, st0.shear), _ratio(st1.moment, st0.moment), _ratio(f1, f0))
    cache[key] = out
    return out


def _build(base: Base, name: str, options: list[Option], method: str, fac: dict, plates_only: bool = False):
    """Columns of pin ``name`` for every option: (P, Q, reasons, geometry, strengths)."""
    pin = base.job.pins[name]
    nc, na = base.nc, len(options)
    pr, qr = base.pin_rows[name], base.plate_rows[name]
    nq = len(base.parts[name])
    P = {k: np.tile(v[pr], na) for k, v in base.P.items()}
    Q = {k: np.tile(v[qr], na) for k, v in base.Q.items()}
    reasons = []
    d_opt = np.empty(na)
    fup, fyp = np.empty(na), np.empty(na)
    grade_col = []
    members = base.part_member[name]
    plate_of = {}
    for p in pin.stack:
        if p.checked:
            plate_of.setdefault(p.member, p)
    t0 = Q["t"][::nc][:nq] if nq else np.zeros(0)
    fu0 = Q["fu"][::nc][:nq] if nq else np.zeros(0)
    t_part = np.tile(t0, (na, 1))
    fy_part, fu_part, E_part = (np.full((na, nq), np.nan) for _ in range(3))
    geo_given = np.full((na, nq, 2), np.nan)
    v_ratio = np.ones((na, nc))
    m_ratio = np.ones((na, nc))
    f_ratio = np.ones((na, nq, nc))
    stack_cache = base.cache
    part_stack = [_stack_index(pin, lab) for lab in base.parts[name]]
    is_bolt, As_opt = np.zeros(na, bool), np.zeros(na)
    for i, o in enumerate(options):
        d = pin.diameter if o.diameter is None else o.diameter
        d_opt[i] = d
        mat, grade, why = _pin_material(pin, o, d)
        spec, why_b = _bolt_at(pin, o, d)
        why = why or why_b
        is_bolt[i] = spec is not None
        As_opt[i] = spec.As if spec is not None else np.pi * d**2 / 4
        if spec is not None:
            grade = spec.grade.grade
        if not why:
            fup[i], fyp[i] = mat.fu, mat.fy
        else:
            fup[i] = fyp[i] = np.nan
        grade_col.append(grade)
        if o.thickness or o.plate_material or o.geometry:
            why = _plates_of_option(o, members, plate_of, t_part[i], fy_part[i], fu_part[i], E_part[i],
                                    geo_given[i], why)
        if o.thickness and not plates_only:
            # (plates scale in proportion within a member, so their shares and forces stay; the pin's moment
            # follows the stack)
            thick = dict(o.thickness)
            r = _stack_ratios(base, name, thick, stack_cache)
            if r is not None:
                v_ratio[i], m_ratio[i] = r[0], r[1]
                for j, k in enumerate(part_stack):
                    if k is not None:
                        f_ratio[i, j] = r[2][:, k]
        reasons.append(why)
    strengths = np.stack([fup, np.where(np.isnan(fu_part), fu0[None, :], fu_part).min(axis=1)
                          if nq else np.full(na, np.inf)], axis=1)
    rep = lambda a: np.repeat(a, nc)  # noqa: E731  option values onto pin rows
    if len(pr):
        P["d"] = rep(d_opt)
        P["fup"] = np.where(np.isnan(rep(fup)), P["fup"], rep(fup))
        P["fyp"] = np.where(np.isnan(rep(fyp)), P["fyp"], rep(fyp))
        for key in ("V", "V_shank", "V_thread"):
            if key in P:
                P[key] = P[key] * v_ratio.ravel()
        P["M"] = P["M"] * m_ratio.ravel()
        if "As" in P:
            P["As"] = rep(As_opt)
        if "bolt" in P:  # a grade's strengths on a plain pin, or a bolt pin made of a material: shank everywhere
            P["bolt"] = rep(is_bolt)
        if "grade" in P:
            P["grade"] = np.repeat(np.array([g or "" for g in grade_col], dtype=object), nc)
    geometry = np.zeros((na, nq, 3))
    if nq:
        rq = lambda a: np.repeat(a.reshape(na, nq), nc, axis=1).ravel()  # noqa: E731  (option, part) onto rows
        d0_old = Q["d0"].copy()
        # the pin, every hole (and a bushing's outside) move with the diameter: clearances and walls kept
        delta = np.repeat(d_opt - pin.diameter, nq * nc)
        Q["d"] = Q["d"] + delta
        Q["d0"] = d0_old + delta
        Q["t"] = rq(t_part)
        for key, arr in (("fy", fy_part), ("fu", fu_part), ("E", E_part)):
            Q[key] = np.where(np.isnan(rq(arr)), Q[key], rq(arr))
        # a bushed plate bears on its bushing, whose material stays
        bushed = np.tile(np.repeat(np.array([k is not None and getattr(pin.stack[k], "bushing", None) is not None
                                             for k in part_stack], bool), nc), na)
        fyp_r, fup_r = np.repeat(fyp, nq * nc), np.repeat(fup, nq * nc)
        Q["fyp"] = np.where(np.isnan(fyp_r) | bushed, Q["fyp"], fyp_r)
        if "fup" in Q:
            Q["fup"] = np.where(np.isnan(fup_r) | bushed, Q["fup"], fup_r)
        Q["F"] = Q["F"] * f_ratio.ravel()
        # geometry: given, derived from the detailing rules, or the job's scaled with the hole
        end, width = Q["a_end"].copy(), Q["width"].copy()
        hole_scale = _ratio(Q["d0"], d0_old)
        any_detail = any(o.detail for o in options)
        if any_detail:
            rule = DETAILING.get(method)
            uls = np.asarray(Q.get("uls", np.ones_like(Q["F"], bool)), bool)
            type_b = np.asarray(Q.get("type_b", np.zeros_like(Q["F"], bool)), bool)
            if rule is not None:
                Fmax = np.where(uls, Q["F"], 0.0).reshape(na, nq, nc).max(axis=2)
                Fm = np.repeat(Fmax, nc, axis=1).ravel()
                e_req, w_req, keep = rule(Fm, Q["t"], Q["d"], Q["d0"], Q["fy"], fac, type_b)
                keep = np.asarray(keep, bool)
            else:
                e_req, w_req, keep = end, width, np.ones_like(end, bool)
            det = np.repeat(np.array([o.detail for o in options]), nq * nc)
            steps = np.repeat(np.array([o.round_to or 0.0 for o in options]), nq * nc)
            # a hair over the rule, so a derived edge distance never reads as the limit itself
            e_req, w_req = e_req * (1 + 1e-7), w_req * (1 + 1e-7)
            e_req = np.where(keep, end * hole_scale, e_req)
            w_req = np.where(keep, width * hole_scale, w_req)
            with np.errstate(invalid="ignore", divide="ignore"):
                e_req = np.where(steps > 0, np.ceil(e_req / np.where(steps > 0, steps, 1) - 1e-9) * steps, e_req)
                w_req = np.where(steps > 0, np.ceil(w_req / np.where(steps > 0, steps, 1) - 1e-9) * steps, w_req)
            end = np.where(det, e_req, end)
            width = np.where(det, w_req, width)
        # otherwise each plate keeps its outline and the hole grows or shrinks in it: a_end (hole centre to
        # the edge) and width stay, the distances from the hole edge change by half the hole's change
        given = ~np.isnan(rq(geo_given[..., 0]))
        end = np.where(given, rq(geo_given[..., 0]), end)
        width = np.where(given, rq(geo_given[..., 1]), width)
        Q["a_end"], Q["width"] = end, width
        # per-case geometry along the force, where the columns carry it: a round lug along its force where
        # the geometry is set, the job's outline (the hole edge moving) otherwise
        setg = given | (np.repeat(np.array([o.detail for o in options]), nq * nc) if any_detail else False)
        half = (Q["d0"] - d0_old) / 2
        if "a" in Q:
            Q["a"] = np.where(setg, end - Q["d0"] / 2, Q["a"] - half)
        for key in ("c_pos", "c_neg"):
            if key in Q:
                Q[key] = np.where(setg, width / 2 - Q["d0"] / 2, Q[key] - half)
        geometry[:, :, 0] = t_part
        geometry[:, :, 1] = end.reshape(na, nq, nc)[:, :, 0]
        geometry[:, :, 2] = width.reshape(na, nq, nc)[:, :, 0]
    return P, Q, reasons, geometry, strengths


def _plates_of_option(o: Option, members, plate_of, t_row, fy_row, fu_row, E_row, geo_row, why: str) -> str:
    """Fill one option's per-part thickness, material strengths and given geometry; the first problem."""
    thick, pmat = dict(o.thickness), dict(o.plate_material)
    geo = {m: (e, w) for m, e, w in o.geometry}
    for j, m in enumerate(members):
        # the member's plates scale together so that its first plate has the thickness (a part that is a
        # group of plates, a main plate with cheeks, scales with them)
        t = thick[m] if m in thick else plate_of[m].thickness
        t_row[j] = t_row[j] * t / plate_of[m].thickness
        plate = plate_of[m]
        mname = pmat.get(m)
        if mname is None and m in thick and _from_library(plate.material):
            mname = plate.material.name
        if mname is not None:
            mm = _material(mname, t)
            if isinstance(mm, str):
                why = why or f"{m}: {mm}"
            else:
                fy_row[j], fu_row[j], E_row[j] = mm.fy, mm.fu, mm.E
        if m in geo:
            geo_row[j] = geo[m]
    return why


def _thickness(pin, plate, t_first: float) -> float:
    """Thickness of ``plate`` when the first checked plate of its member at ``pin`` takes ``t_first``."""
    first = next(p for p in pin.stack if p.member == plate.member and p.checked)
    return plate.thickness * t_first / first.thickness


def _stack_index(pin, label: str) -> int | None:
    """Index in the stack of the plate a part label names ("tie 1/2" -> the first plate of tie)."""
    m = _member_of(pin, label)
    ix = [k for k, p in enumerate(pin.stack) if p.member == m]
    if label == m:
        return ix[0] if ix else None
    tail = label[len(m):].strip().split("/")[0]
    try:
        return ix[int(tail) - 1]
    except (ValueError, IndexError):
        return ix[0] if ix else None


def _utils(checks, n, kinds=None):
    """(names, util matrix (n_check, n)) with -inf where a check does not apply."""
    names, rows = [], []
    for ch in checks:
        if kinds is not None:  # a rule no force enters (a pin secured, a clearance) is a "detail"
            kinds[ch.name] = ch.kind if getattr(ch, "uses_forces", True) else "detail"
    for ch in checks:
        mask = np.ones(n, bool) if ch.mask is None else np.asarray(ch.mask, bool)
        mask = mask & ~np.isposinf(ch.capacity)
        cap = ch.capacity
        with np.errstate(divide="ignore", invalid="ignore"):
            u = np.where(cap > 0, ch.demand / np.where(cap > 0, cap, 1.0), np.inf)
        rows.append(np.where(mask, u, -np.inf))
        names.append(ch.name)
    return names, (np.array(rows) if rows else np.full((0, n), -np.inf))


def evaluate(base: Base, requests: dict[str, list[Option]], plates_only: bool = False) -> dict[str, PinSweep]:
    """Evaluate every option of every pin in ``requests`` (pin -> options), one kernel call per method.

    ``plates_only`` leaves out the pin checks (and the stack solves they need): for searches on plates.
    """
    job = base.job
    by_method: dict[str, list[tuple[str, int]]] = {}
    for name, opts in requests.items():
        if name not in base.pin_rows:
            raise InputError(Problem(job.path, f"pin.{name}", "", "is not a checked pin of the job (it has no stack "
                                     "of plates); checked pins: " + ", ".join(base.pin_rows)))
        for i, o in enumerate(opts):
            by_method.setdefault(o.method or job.method.name, []).append((name, i))
    acc = {}
    for name, opts in requests.items():
        na, nq = len(opts), len(base.parts[name])
        acc[name] = {"util": np.full(na, np.nan), "check": np.full(na, "", dtype=object),
                     "part": np.full(na, "", dtype=object), "case": np.full(na, "", dtype=object),
                     "part_util": np.full((na, 1 + nq), np.nan), "part_check": np.zeros((na, 1 + nq), np.intp),
                     "reason": [""] * na, "geo": np.zeros((na, nq, 3)), "strengths": np.zeros((na, 2)),
                     "check_util": {}, "cpu": {}}
    nc = base.nc
    kinds: dict[str, str] = {}
    names_all: list[str] = []
    for method_key, items in by_method.items():
        method, _, var = method_key.partition(":")
        mod = METHODS[method]
        same = method == job.method.name
        fac = factors_for(mod, job.method.factors if same else {})
        variant = var or (job.method.variant if same else (mod.VARIANTS[0] if mod.VARIANTS else None))
        groups: dict[str, list[int]] = {}
        for name, i in items:
            groups.setdefault(name, []).append(i)
        Ps, Qs, meta = [], [], []
        for name, ix in groups.items():
            P, Q, reasons, geo, strengths = _build(base, name, [requests[name][i] for i in ix], method, fac,
                                                   plates_only)
            Ps.append(P)
            Qs.append(Q)
            meta.append((name, np.array(ix), reasons, geo, strengths))
        Pa = {k: np.concatenate([p[k] for p in Ps]) for k in Ps[0]} if Ps and Ps[0] else {}
        qk = [q for q in Qs if q]
        Qa = {k: np.concatenate([q[k] for q in qk]) for k in qk[0]} if qk else {}
        pn, pu = (_utils(mod.pin_checks(Pa, fac, variant), len(Pa["d"]), kinds) if Pa and not plates_only
                  else ([], np.zeros((0, sum(len(p["d"]) for p in Ps) if Ps and Ps[0] else 0))))
        qn, qu = _utils(mod.plate_checks(Qa, fac, variant), len(Qa["d"]), kinds) if Qa else ([], np.zeros((0, 0)))
        allc = pn + qn
        cix = []
        for c in allc:
            if c not in names_all:
                names_all.append(c)
            cix.append(names_all.index(c))
        cix = np.array(cix, np.intp)
        op = oq = 0
        for name, ix, reasons, geo, strengths in meta:
            na, nq = len(ix), len(base.parts[name])
            up = pu[:, op:op + na * nc].reshape(len(pn), na, 1, nc)
            uq = qu[:, oq:oq + na * nq * nc].reshape(len(qn), na, nq, nc)
            op += na * nc
            oq += na * nq * nc
            # per (check, option, part): the largest over the cases; the pin is part 0
            cp = np.full((len(allc), na, 1 + nq), -np.inf)
            cp[:len(pn), :, :1] = up.max(axis=3)
            cp[len(pn):, :, 1:] = uq.max(axis=3)
            a = acc[name]
            pk = cp.argmax(axis=0)  # (option, part)
            pmax = np.take_along_axis(cp, pk[None], axis=0)[0]
            better = ~(pmax <= np.nan_to_num(a["part_util"][ix], nan=-np.inf))
            a["part_util"][ix] = np.where(better, pmax, a["part_util"][ix])
            a["part_check"][ix] = np.where(better, cix[pk], a["part_check"][ix])
            best_part = pmax.argmax(axis=1)
            umax = pmax[np.arange(na), best_part]
            chk = pk[np.arange(na), best_part]
            # the case of the governing (check, part)
            case_ix = np.empty(na, np.intp)
            on_pin = best_part == 0
            if on_pin.any():
                r = np.flatnonzero(on_pin)
                case_ix[r] = up[chk[r], r, 0, :].argmax(axis=1)
            if (~on_pin).any():
                r = np.flatnonzero(~on_pin)
                case_ix[r] = uq[chk[r] - len(pn), r, best_part[r] - 1, :].argmax(axis=1)
            ok = np.array([not x for x in reasons])
            labels = np.array(("pin",) + base.parts[name], dtype=object)
            a["util"][ix] = np.where(ok, umax, np.nan)
            a["check"][ix] = np.where(ok, np.array(allc, dtype=object)[chk], "")
            a["part"][ix] = np.where(ok, labels[best_part], "")
            a["case"][ix] = np.where(ok, np.array(base.cases, dtype=object)[case_ix], "")
            a["geo"][ix] = geo
            a["strengths"][ix] = strengths
            for r_, i in enumerate(ix):
                a["reason"][i] = reasons[r_]
            cu = cp.max(axis=2)  # (check, option)
            for c, cname in enumerate(allc):
                arr = a["check_util"].setdefault(cname, np.full(len(requests[name]), -np.inf))
                arr[ix] = np.maximum(arr[ix], cu[c])
                arr2 = a["cpu"].setdefault(cname, np.full((len(requests[name]), 1 + nq), -np.inf))
                arr2[ix] = np.maximum(arr2[ix], cp[c])
    return {name: PinSweep(name, tuple(requests[name]), tuple(a["reason"]), a["util"], tuple(a["check"]),
                           tuple(a["part"]), tuple(a["case"]), ("pin",) + base.parts[name], a["part_util"],
                           a["check_util"], tuple(names_all), a["part_check"], a["geo"], a["strengths"], dict(kinds),
                           a["cpu"])
            for name, a in acc.items()}


def apply_option(job: Job, name: str, opt: Option,
                 geometry: dict[str, tuple[float, float, float]] | None = None) -> Job:
    """The job with pin ``name`` built as ``opt`` (to check it through the ordinary path).

    ``geometry`` (part -> (t, end, width), as an evaluation reports it) sets every plate's end and width.
    """
    pin = job.pins[name]
    d = pin.diameter if opt.diameter is None else opt.diameter
    mat, _, why = _pin_material(pin, opt, d)
    if why:
        raise ValueError(why)
    thick, pmat = dict(opt.thickness), dict(opt.plate_material)
    stack = []
    for k, p in enumerate(pin.stack):
        if not p.checked:
            stack.append(replace(p, hole=p.hole + d - pin.diameter))
            continue
        t = _thickness(pin, p, thick[p.member]) if p.member in thick else p.thickness
        mname = pmat.get(p.member) or (p.material.name if p.member in thick and _from_library(p.material) else None)
        m = _material(mname, t) if mname else p.material
        if isinstance(m, str):
            raise ValueError(m)
        q = replace(p, thickness=t, material=m, hole=p.hole + d - pin.diameter)
        if geometry is not None:
            lab = next((lb for lb in geometry if _stack_index(pin, lb) == k), None)
            if lab is not None:
                _, e, w = geometry[lab]
                q = replace(q, end=e, width=w)
                if getattr(q, "outline", None) is not None:  # a sized plate is a lug along its force
                    q = replace(q, outline=None)
                if getattr(q, "axis", None) is not None:
                    q = replace(q, axis=None)
        stack.append(q)
    spec, why = _bolt_at(pin, opt, d)
    if why:
        raise ValueError(why)
    new = replace(pin, diameter=d, material=mat, stack=tuple(stack))
    if getattr(pin, "bolt", None) is not None:
        new = replace(new, bolt=spec)
    return replace(job, pins={**job.pins, name: new})


# ----------------------------------------------------------------------------------------------- compare


@dataclass(frozen=True)
class Comparison:
    """compare(): every pin's options, evaluated, and the lightest (then lowest-strength) one that passes."""

    job: Job
    method: str
    sweeps: dict[str, PinSweep]
    marked: dict[str, tuple[int, ...]]  # per pin: the lightest passing option (one per method compared)
    ranked: bool
    notes: tuple[str, ...]
    skipped: dict[str, tuple[str, ...]]


def _rank(sw: PinSweep, i: int, pin) -> tuple:
    o = sw.options[i]
    d = pin.diameter if o.diameter is None else o.diameter
    t = float(sw.geo[i, :, 0].sum()) if sw.geo is not None and sw.geo.size else 0.0
    fu_pin, fu_plate = (float(x) for x in sw.strengths[i])
    return (round(d, 9), round(t, 9), fu_pin, fu_plate)


def parse_lengths(text: str, default_unit: str, what: str) -> list[float]:
    """"40,45,50 mm", "40 mm, 2 in" or a range "30:60:5 mm" (start:stop:step, stop included) -> m."""
    text = text.strip()
    unit = None
    parts = [p.strip() for p in text.split(",") if p.strip()]
    if not parts:
        raise InputError(Problem("<command line>", "", what, "is empty; give sizes such as 40,45,50 mm"))
    last = parts[-1].split()
    if len(last) == 2:
        unit = last[1]
        parts[-1] = last[0]
    out = []
    try:
        for p in parts:
            if ":" in p.split()[0]:
                bits = p.split()
                a, b, s = (float(x) for x in bits[0].split(":"))
                u = bits[1] if len(bits) > 1 else (unit or default_unit)
                if s <= 0 or b < a:
                    raise ValueError(p)
                n = int(math.floor((b - a) / s + 1e-9)) + 1
                out += [to_si(a + k * s, "length", u) for k in range(n)]
            elif len(p.split()) == 2:
                out.append(to_si(p, "length"))
            else:
                out.append(to_si(float(p), "length", unit or default_unit))
    except (ValueError, TypeError) as exc:
        raise InputError(Problem("<command line>", "", what, f"cannot read {text!r} ({exc}); give sizes such as "
                                 "\"40,45,50 mm\" or a range \"30:60:5 mm\"")) from None
    if any(v <= 0 for v in out):
        raise InputError(Problem("<command line>", "", what, f"sizes must be > 0, got {text!r}"))
    return out


def options_from(job: Job, name: str, diameters=None, pin_materials=None, grades=None, thicknesses=None,
                 plate_materials=None, methods=None, members=None) -> tuple[list[Option], list[str]]:
    """The cartesian product of the alternatives given (None: keep the job's), and those that do not fit."""
    pin = job.pins[name]
    mem = tuple(members) if members else tuple(dict.fromkeys(p.member for p in pin.stack if p.checked))
    bad = [m for m in mem if m not in {p.member for p in pin.stack if p.checked}]
    if bad:
        raise InputError(Problem(job.path, f"pin.{name}", "--member", f"{', '.join(bad)} has no checked plate at "
                                 f"pin {name}; members there: {', '.join(dict.fromkeys(p.member for p in pin.stack))}"))
    Ds = list(diameters) if diameters else [None]
    mats = [("m", m) for m in (pin_materials or [])] + [("g", g) for g in (grades or [])] or [None]
    Ts = list(thicknesses) if thicknesses else [None]
    PMs = list(plate_materials) if plate_materials else [None]
    Ms = list(methods) if methods else [None]
    ulen = "in" if job.output_units == "US" else "mm"
    k = INCH if ulen == "in" else 1e-3
    out, skipped = [], []
    for d in Ds:
        for mm in mats:
            for t in Ts:
                for pm in PMs:
                    for me in Ms:
                        lab = []
                        if d is not None:
                            lab.append(f"d {d / k:g} {ulen}")
                        if mm is not None:
                            lab.append(("grade " if mm[0] == "g" else "") + mm[1])
                        if t is not None:
                            lab.append(f"t {t / k:g} {ulen}")
                        if pm is not None:
                            lab.append(f"plate {pm}")
                        if me is not None:
                            lab.append(me)
                        o = Option(" · ".join(lab) or "as the job", diameter=d,
                                   pin_material=mm[1] if mm and mm[0] == "m" else None,
                                   grade=mm[1] if mm and mm[0] == "g" else None,
                                   thickness=tuple((m, t) for m in mem) if t is not None else (),
                                   plate_material=tuple((m, pm) for m in mem) if pm is not None else (),
                                   method=me)
                        dd = pin.diameter if d is None else d
                        _, _, why = _pin_material(pin, o, dd)
                        why = why or _bolt_at(pin, o, dd)[1]
                        every = mm is not None and _is_all(pin_materials if mm[0] == "m" else grades)
                        if why and every:
                            skipped.append(f"{o.label}: {why}")  # "all": only those that fit the size
                            continue
                        if pm is not None and _is_all(plate_materials):
                            bad_t = [_material(pm, t if t is not None else p.thickness) for p in pin.stack
                                     if p.checked and p.member in mem]
                            why_p = next((x for x in bad_t if isinstance(x, str)), "")
                            if why_p:
                                skipped.append(f"{o.label}: {why_p}")
                                continue
                        out.append(o)
    return out, skipped


def _is_all(x) -> bool:
    return getattr(x, "every", False)


class Every(list):
    """A list of library names that stands for "every one in the library" (ones that do not fit are skipped)."""

    every = True


def method_names(job: Job | None = None) -> list[str]:
    """Every method, with each of its variants as "name:variant" ("AISC 360-16:LRFD", "ASME BTH-1:B")."""
    out = []
    for name, mod in METHODS.items():
        out += [f"{name}:{v}" for v in mod.VARIANTS] if mod.VARIANTS else [name]
    return out


def method_key(text: str) -> str | None:
    """A method as --method names it ("AISC 360-16", "AISC 360-16:LRFD"), checked; None if unknown."""
    name, _, var = text.partition(":")
    if name not in METHODS:
        return None
    if var and var not in METHODS[name].VARIANTS:
        return None
    return text


def _left_out_note(job: Job, names) -> list[str]:
    if any(getattr(p, "bushing", None) is not None or getattr(p, "lateral", None) is not None
           for n in names for p in job.pins[n].stack) or any(getattr(job.pins[n], "retainer", None) for n in names):
        return ["a bushing's own checks (the pin on its bore), a lug base under a lateral load and a pin retainer "
                "are not part of a sweep: check the chosen design with pinchk run"]
    return []


def compare(job: Job, pins: list[str] | None = None, base: Base | None = None, **alternatives) -> Comparison:
    """Evaluate the alternatives (see ``options_from``) for each pin; mark the lightest passing one."""
    base = base or prepare(job)
    names = pins or list(base.pin_rows)
    req, skipped = {}, {}
    for n in names:
        if n not in job.pins or n not in base.pin_rows:
            raise InputError(Problem(job.path, "", "--pin", f"{n!r} is not a checked pin of the job; checked pins: "
                                     + ", ".join(base.pin_rows)))
        req[n], skipped[n] = options_from(job, n, **alternatives)
    sweeps = evaluate(base, req)
    only_methods = any(req.values()) and all(
        o.method is not None and o.diameter is None and o.pin_material is None and o.grade is None
        and not o.thickness and not o.plate_material for opts in req.values() for o in opts)
    marked = {}
    for n, sw in sweeps.items():
        ok = np.flatnonzero(sw.passed)
        marks = []
        if not only_methods:
            for me in dict.fromkeys(o.method for o in sw.options):  # with methods compared: one mark per method
                cand = [int(i) for i in ok if sw.options[i].method == me]
                if cand:
                    marks.append(min(cand, key=lambda i: (_rank(sw, i, job.pins[n]), i)))
        marked[n] = tuple(marks)
    notes = []
    if any(o.method is not None for opts in req.values() for o in opts):
        notes.append("every method is given the same joint forces, from the job's loads as they stand; each method "
                     "expects loads combined with its own load factors (EN 1990 and AISC LRFD factored, AISC ASD and "
                     "BTH-1 unfactored): combine them for each method before comparing utilizations")
        notes.append("a method other than the job's uses its default factors (and its first design variant unless "
                     "one is named, e.g. 'AISC 360-16:LRFD', 'ASME BTH-1:B')")
    if not only_methods:
        notes.append("marked: the lightest option that passes (smallest pin diameter, then thinnest plates), then the "
                     "lowest pin strength, then the lowest plate strength; one per method where methods are compared")
    notes.append("a pin diameter other than the job's keeps each plate's outline (the hole grows or shrinks in it) "
                 "and each hole's clearance; a pin or plate material from the library is taken at the new size")
    notes += _left_out_note(job, names)
    return Comparison(job, base.job.method.name, sweeps, marked, not only_methods, tuple(notes), skipped)


# ----------------------------------------------------------------------------------------------- size


@dataclass(frozen=True)
class Sized:
    """The size chosen for one pin and how it was found."""

    pin: str
    option: Option | None  # None: no size in the series passes
    util: float
    governing: tuple[str, str, str]  # check, part, case at the chosen size
    geometry: dict[str, tuple[float, float, float]]
    smaller: Option | None  # the next smaller diameter of the series (None: the chosen is the smallest)
    smaller_util: float
    smaller_governing: tuple[str, str, str]
    smaller_note: str
    d_exact: float | None  # the diameter at which the largest utilization reaches 1 (plates as chosen)
    d_exact_check: str
    t_exact: dict[str, float]  # member -> thickness at which its plates' largest utilization reaches 1
    t_exact_check: dict[str, str]
    note: str = ""
    strength: tuple[float, str] = (math.nan, "")  # the governing check other than a detailing length rule


@dataclass(frozen=True)
class Sizing:
    job: Job
    method: str
    pin_series: tuple[Series, ...]
    plate_series: tuple[Series, ...]
    what: tuple[str, ...]
    sized: dict[str, Sized]
    notes: tuple[str, ...]

    @property
    def found(self) -> bool:
        return all(s.option is not None for s in self.sized.values())


def _members(job: Job, name: str) -> tuple[str, ...]:
    return tuple(dict.fromkeys(p.member for p in job.pins[name].stack if p.checked))


def _plate_ok(sw: PinSweep, base: Base, name: str, member: str) -> Array:
    cols = [1 + j for j, m in enumerate(base.part_member[name]) if m == member]
    u = sw.part_util[:, cols].max(axis=1) if cols else np.zeros(len(sw.options))
    return np.where(sw.valid, u, np.inf)


def size(job: Job, pins: list[str] | None = None, pin_series: str | None = None, plate_series: str | None = None,
         what: tuple[str, ...] = ("pin", "plates"), base: Base | None = None) -> Sizing:
    """For each pin, the smallest diameter of the pin series (then the thinnest plates of the plate series
    for it) such that every check passes in every case; with the exact limits in between."""
    base = base or prepare(job)
    names = pins or list(base.pin_rows)
    for n in names:
        if n not in base.pin_rows:
            raise InputError(Problem(job.path, "", "--pin", f"{n!r} is not a checked pin of the job; checked pins: "
                                     + ", ".join(base.pin_rows)))
    method = base.job.method.name
    D, dser = series_values("pin", pin_series or default_series(job, "pin"))
    T, tser = series_values("plate", plate_series or default_series(job, "plate"))
    step = INCH / 16 if job.output_units == "US" else 1e-3
    out = {}
    for n in names:
        out[n] = _size_one(base, n, D if "pin" in what else (job.pins[n].diameter,),
                           T if "plates" in what else None, step)
    notes = [DETAILING_TEXT.get(method, SCALED_TEXT),
             "the smallest diameter is chosen first, then for it the thinnest plate of each member that passes; the "
             "pin's moment follows the chosen thicknesses",
             "exact limits: the largest utilization as a continuous function of the size (materials at that size, "
             "edge distances not rounded), solved for 1 with scipy.optimize.brentq; the chosen size is rounded up "
             "to the series and checked itself",
             "every plate of a member at the pin takes one thickness; a hole keeps its clearance over the pin",
             "the thinnest plate that passes may need a wide lug (an edge-distance rule such as EN 1993-1-8 Table 3.9 "
             "type A grows as 1/t): hold the plates with --only pin, or weigh thicknesses with compare --thickness"]
    notes += _left_out_note(job, names)
    fixed = sorted({m.name for n in names for m in [job.pins[n].material] + [p.material for p in job.pins[n].stack]
                    if m is not None and not _from_library(m)})
    if fixed:
        notes.append(f"not from data/materials.csv, so taken with the same strengths at every size: {', '.join(fixed)}")
    return Sizing(job, method, dser, tser, tuple(what), out, tuple(notes))


def _size_one(base: Base, name: str, D, T, step) -> Sized:
    job = base.job
    mem = _members(job, name)
    # pass 1: each member's thinnest plate for every diameter (plate checks only depend on d and their own t)
    if T is not None:
        grid = [Option("", diameter=d, thickness=tuple((m, t) for m in mem), detail=True, round_to=step)
                for d in D for t in T]
        sw = evaluate(base, {name: grid}, plates_only=True)[name]
        tmin = {}
        for m in mem:
            ok = (_plate_ok(sw, base, name, m) <= 1.0).reshape(len(D), len(T))
            tmin[m] = [T[int(np.argmax(r))] if r.any() else None for r in ok]
    else:
        tmin = {m: [None] * len(D) for m in mem}
    # pass 2: every check with those plates
    cands, where = [], []
    for i, d in enumerate(D):
        if all(tmin[m][i] is not None for m in mem) or T is None:
            th = tuple((m, tmin[m][i]) for m in mem if tmin[m][i] is not None)
            cands.append(Option(f"d {d * 1e3:g} mm", diameter=d, thickness=th, detail=True, round_to=step))
            where.append(i)
    sw2 = evaluate(base, {name: cands})[name] if cands else None
    chosen = None
    if sw2 is not None:
        okix = np.flatnonzero(sw2.passed)
        if len(okix):
            chosen = int(okix[0])
    if chosen is None:
        return Sized(name, None, math.nan, ("", "", ""), {}, None, math.nan, ("", "", ""),
                     "", None, "", {}, {}, "no size in the series passes every check")
    opt = sw2.options[chosen]
    gi = where[chosen]
    # the next smaller diameter of the series
    smaller, s_util, s_gov, s_note = None, math.nan, ("", "", ""), ""
    if gi > 0:
        j = gi - 1
        if j in where:
            k = where.index(j)
            smaller = sw2.options[k]
            s_util = float(sw2.util[k])
            s_gov = (sw2.check[k], sw2.part[k], sw2.case[k])
            if sw2.reason[k]:
                s_note = sw2.reason[k]
        else:
            # no plate of the series passes for some member at this diameter: report the thickest tried
            th = tuple((m, T[-1]) for m in mem)
            smaller = Option("", diameter=D[j], thickness=th, detail=True, round_to=step)
            swj = evaluate(base, {name: [smaller]})[name]
            s_util, s_gov = float(swj.util[0]), (swj.check[0], swj.part[0], swj.case[0])
            s_note = "no plate thickness of the series passes at this diameter (shown at the thickest)"
            if swj.reason[0]:
                s_note = swj.reason[0]
    # exact diameter: plates as chosen, edge distances not rounded
    d_exact, d_check = None, ""
    if "pin" in _what_of(D, job, name) and getattr(job.pins[name], "bolt", None) is not None:
        d_check = "none: a bolt comes in its listed thread sizes only"
    elif "pin" in _what_of(D, job, name):
        d_exact = diameter_limit(base, name, opt, lo=D[gi - 1] if gi > 0 else None)
        if d_exact is not None:
            s = evaluate(base, {name: [replace(opt, diameter=d_exact * (1 - 1e-5), round_to=None)]})[name]
            # the check that fails a hair below, or the end of a material's size range
            d_check = s.check[0] if not s.reason[0] else f"size range ({s.reason[0]})"
    t_exact, t_check = {}, {}
    if T is not None:
        th0 = dict(opt.thickness)
        for m in mem:
            def u_t(ts, m=m):
                o = [replace(opt, thickness=tuple((k, (float(t) if k == m else v)) for k, v in th0.items()),
                             round_to=None) for t in ts]
                s = evaluate(base, {name: o}, plates_only=True)[name]
                cols = [1 + j for j, mm in enumerate(base.part_member[name]) if mm == m]
                return s.util_without(DERIVED.get(base.job.method.name, ()), cols), s
            hi = th0[m]
            lo = hi / 4
            try:
                if u_t([lo])[0][0] > 1.0 >= u_t([hi])[0][0]:
                    t_exact[m] = _crossing(lambda x, u_t=u_t: np.minimum(u_t(x)[0], 3.0) - 1.0, lo, hi)
                    s = u_t([t_exact[m] * (1 - 1e-5)])[1]
                    cols = [1 + j for j, mm in enumerate(base.part_member[name]) if mm == m]
                    j = max(cols, key=lambda c: s.part_util[0, c])
                    t_check[m] = s.part_check(0, j) if not s.reason[0] else f"size range ({s.reason[0]})"
            except ValueError:
                pass
    return Sized(name, opt, float(sw2.util[chosen]), (sw2.check[chosen], sw2.part[chosen], sw2.case[chosen]),
                 sw2.geometry(chosen), smaller, s_util, s_gov, s_note, d_exact, d_check, t_exact, t_check,
                 strength=sw2.strength(chosen))


def _crossing(g_vec, lo: float, hi: float, n: int = 16, rounds: int = 1) -> float:
    """The x in [lo, hi] where g (g(lo) > 0 fails, g(hi) ≤ 0 passes) last changes sign from fail to pass.

    g_vec evaluates many x in one call (one kernel pass); the bracket is narrowed on grids first, then
    closed with scipy.optimize.brentq on the scalar function.
    """
    for _ in range(rounds):
        x = np.linspace(lo, hi, n)
        g = np.asarray(g_vec(x), float)
        fail = np.flatnonzero(g > 0)
        k = int(fail[-1]) if len(fail) else 0
        if k >= n - 1:
            break
        lo, hi = float(x[k]), float(x[k + 1])
    return float(brentq(lambda v: float(g_vec(np.array([v]))[0]), lo, hi, xtol=1e-10 * hi, rtol=1e-10))


def diameter_limit(base: Base, name: str, option: Option, check: str | None = None, lo: float | None = None,
                   hi: float | None = None) -> float | None:
    """The pin diameter at which ``check`` (default: the largest utilization of every check) of pin ``name``
    reaches 1, everything else as ``option`` (materials at each size, derived edge distances unrounded).

    Found with scipy.optimize.brentq between a diameter that fails and one that passes (searched from
    ``lo``/``hi`` or from the option's diameter); None where no such bracket is found.
    """
    d0 = base.job.pins[name].diameter if option.diameter is None else option.diameter

    skip = DERIVED.get((option.method or base.job.method.name).partition(":")[0], ()) if option.detail else ()

    def u_vec(ds):
        sw = evaluate(base, {name: [replace(option, diameter=float(d), round_to=None) for d in ds]})[name]
        if check is None:
            u = sw.util_without(skip)
        elif check not in sw.check_util:
            raise InputError(Problem(base.job.path, f"pin.{name}", "check", f"no check {check!r}; the checks are: "
                                     + ", ".join(sw.check_util)))
        else:
            u = np.array(sw.check_util[check], float)
        return np.where(sw.valid, u, np.inf)

    def u(d):
        return float(u_vec([d])[0])

    hi = hi or d0
    k = 0
    while not u(hi) <= 1.0:
        hi *= 1.5
        k += 1
        if k > 8:
            return None
    lo = lo or hi / 1.5
    k = 0
    while u(lo) <= 1.0:
        lo /= 1.5
        k += 1
        if k > 12:
            return None
    return _crossing(lambda x: np.minimum(u_vec(x), 3.0) - 1.0, lo, hi)


def _what_of(D, job, name):
    return ("pin",) if len(D) > 1 or D[0] != job.pins[name].diameter else ()


def sized_job(job: Job, sizing: Sizing, smaller: bool = False, name: str | None = None) -> Job:
    """The job with the sizes found applied (or one pin at its next smaller size)."""
    for n, s in sizing.sized.items():
        if s.option is None:
            continue
        if smaller:
            if n != name or s.smaller is None:
                if n != name:
                    job = apply_option(job, n, s.option, s.geometry)
                continue
            base = prepare(job)
            sw = evaluate(base, {n: [s.smaller]})[n]
            job = apply_option(job, n, s.smaller, sw.geometry(0))
        else:
            job = apply_option(job, n, s.option, s.geometry)
    return job


# ----------------------------------------------------------------------------------------------- rate


@dataclass(frozen=True)
class Rating:
    """The largest load multiplier for which every check passes, and what limits it."""

    job: Job
    what: str  # "every load", "load case 'lift'", "loads labelled 'hook'"
    factor: float  # the multiplier at the limit (math.inf: no limit found up to factor_max)
    limit: str  # "check": a check reaches 1; "cable": a cable goes slack; "support": a roller lifts off;
    # "none": no limit up to the largest factor tried; "at zero": a check fails with the loads at zero
    governing: dict[str, object]  # pin, part, check, case, utilization just below the limit
    util_at_1: float  # the largest utilization as the job stands
    linear_estimate: float  # 1 / util_at_1, what a plain division would give
    loads: tuple[tuple[str, str, float, bool], ...]  # (case, label, |F| [N] at the limit, straight down)
    reasons: tuple[str, ...]  # why the limit is not a plain division, where it is not
    evaluations: int
    notes: tuple[str, ...] = ()


def _scaled_job(job: Job, lam: float, case: str | None, label: str | None) -> Job:
    loads = tuple(replace(ld, force=(ld.force[0] * lam, ld.force[1] * lam), moment=ld.moment * lam)
                  if (case is None or ld.case == case) and (label is None or ld.label == label) else ld
                  for ld in job.loads)
    if job.forces is not None:
        sol = job.forces.solution
        w = np.array([lam if (case is None or c == case) else 1.0 for c in sol.cases])
        pins = {p: replace(pf, force=pf.force * w[:, None, None],
                           axial=None if pf.axial is None else pf.axial * w[:, None]) for p, pf in sol.pins.items()}
        sol2 = replace(sol, pins=pins, links={n: t * w for n, t in sol.links.items()},
                       supports={n: r * w[:, None] for n, r in sol.supports.items()})
        return replace(job, loads=loads, forces=replace(job.forces, solution=sol2))
    return replace(job, loads=loads)


def _uplift(res) -> list[str]:
    """The solve's warnings for rollers that pull, under the checked (combined) loads."""
    try:
        from .solve import roller_uplift
    except ImportError:
        return []
    return list(roller_uplift(res.job, res.solution))


def rate(job: Job, case: str | None = None, label: str | None = None, factor_max: float = 1000.0) -> Rating:
    """The largest multiplier on the chosen loads for which every check passes in every case (or combination).

    Each trial multiplier runs the whole path (frame solve, combinations, factor stack, checks), so a cable
    going slack, a combined shear-and-bending check, detailing rules whose demand is not proportional to the
    load, and factors on only some cases are all taken as they are. The limit is found by bracketing and
    scipy.optimize.brentq on (largest utilization − 1).
    """
    from . import run

    if case is not None and case not in job.cases:
        raise InputError(Problem(job.path, "", "--case", f"there is no load case {case!r}; the cases are: "
                                 + ", ".join(job.cases)))
    if label is not None and not any(ld.label == label for ld in job.loads):
        labs = sorted({ld.label for ld in job.loads if ld.label})
        raise InputError(Problem(job.path, "", "--load", f"no load is labelled {label!r}; the labels are: "
                                 + (", ".join(labs) or "(none)")))
    if label is not None and job.forces is not None:
        raise InputError(Problem(job.path, "", "--load", "a job that reads its forces from a file has no loads to "
                                 "pick by label; rate a load case with --case"))
    count = [0]
    memo: dict[float, tuple[float, object, str]] = {}

    def trial(lam: float):
        lam = float(lam)
        if lam in memo:
            return memo[lam]
        count[0] += 1
        try:
            res = run(_scaled_job(job, lam, case, label))
        except StructureError as exc:
            if lam == 1.0:
                raise  # the job as it stands does not solve: its own input error
            # beyond this factor the frame cannot carry the load as modelled (a cable in compression): a
            # finite "fails" value, so the root finder closes on the factor where that begins
            out = (2.0, None, str(exc.problems[0].message if getattr(exc, "problems", None) else exc))
        else:
            g = res.governing
            out = (float(res.columns["utilization"][g]) if g is not None else 0.0, res, "")
            lifts = [w for w in _uplift(res) if w.split(" pulls")[0] not in lifted_at_1]
            if lam != 1.0 and lifts:
                # a wheel or pad that would have to pull: the structure lifts off, it is not the one solved
                out = (2.0, None, lifts[0])
        memo[lam] = out
        return out

    lifted_at_1: set[str] = set()

    u1, res1, why1 = trial(1.0)
    lifted_at_1.update(w.split(" pulls")[0] for w in _uplift(res1))  # warned by the run itself already
    what = ("every load" if case is None and label is None else
            (f"load case '{case}'" if label is None else
             (f"loads labelled '{label}'" + (f" in case '{case}'" if case else ""))))
    u0, res0, why0 = trial(0.0)
    reasons = []
    if u0 > 1.0 and not why0:
        g = res0.row(res0.governing) if res0 is not None else {}
        return Rating(job, what, 0.0, "at zero", g, u1, 1 / u1 if u1 > 0 else math.inf, (), (
            "a check fails with the chosen loads at zero: the design does not pass whatever the load",), count[0])
    # bracket: lo passes, hi fails
    if u1 <= 1.0:
        lo, hi = 1.0, 2.0
        while trial(hi)[0] <= 1.0:
            lo, hi = hi, hi * 2
            if hi > factor_max:
                g = trial(lo)[1]
                return Rating(job, what, math.inf, "none", g.row(g.governing) if g is not None else {}, u1,
                              1 / u1 if u1 > 0 else math.inf, (), (f"every check passes up to {lo:g} times the load",),
                              count[0])
    else:
        lo, hi = 0.5, 1.0
        while trial(lo)[0] > 1.0:
            lo, hi = lo / 2, lo
            if lo < 1e-6:
                lo = 0.0
                break
    lam = brentq(lambda x: trial(x)[0] - 1.0, lo, hi, xtol=1e-9, rtol=1e-9)
    u_below, res_b, _ = trial(lam * (1 - 1e-7))
    u_above, _, why_above = trial(lam * (1 + 1e-7))
    if res_b is None:  # the bracket closed from a factor the frame cannot carry
        u_below, res_b, _ = trial(lo)
    limit = ("support" if why_above.startswith("roller") else "cable") if why_above else "check"
    gov = res_b.row(res_b.governing) if res_b is not None and res_b.governing is not None else {}
    if limit in ("cable", "support"):
        reasons.append(f"beyond this factor the frame cannot carry the load as modelled: {why_above}")
    if why0:
        reasons.append(f"at factor 0 the frame cannot carry the other loads as modelled ({why0}); the factor "
                       "reported is the upper limit")
    lin = 1 / u1 if u1 > 0 and math.isfinite(u1) else math.inf
    if gov and limit == "check":
        kind = gov.get("kind")
        chk = str(gov.get("check", ""))
        if kind == "ratio" or "+" in chk:
            reasons.append(f"the limiting check ({chk}) combines utilizations nonlinearly (squares), so it does not "
                           "grow in proportion to the load")
        if kind == "length":
            reasons.append(f"the limiting check ({chk}) is a detailing rule whose demand is affine in the load "
                           "(a part that does not depend on the load)")
        if kind == "stress" and "contact" in chk:
            reasons.append("the limiting check (contact stress) grows with the square root of the load")
    if gov and res1 is not None and res1.governing is not None:
        g1 = res1.row(res1.governing)
        if (g1["pin"], g1["part"], g1["check"]) != (gov.get("pin"), gov.get("part"), gov.get("check")):
            reasons.append(f"as the job stands the governing check is {g1['pin']} {g1['part']}, {g1['check']} "
                           f"(utilization {g1['utilization']:.3f}); it grows less than in proportion to the load, or "
                           "not at all (a rule of geometry alone), so another check limits the factor")
    if case is not None or label is not None:
        reasons.append("only some loads are scaled: the forces they add combine with the others, so a check's "
                       "utilization is not proportional to the factor")
    if getattr(job, "combinations", None) and (case is not None or label is not None):
        reasons.append("the job combines cases with factors: the scaled loads enter the combinations with their "
                       "factors")
    if abs(lam - lin) <= 1e-6 * max(lam, 1.0):
        reasons.append("the limit here equals a plain division (1 / utilization): the limiting check is "
                       "proportional to the load")
    scaled = tuple((ld.case, ld.label, float(math.hypot(*ld.force)) * lam, ld.force[0] == 0.0 and ld.force[1] < 0)
                   for ld in job.loads if (case is None or ld.case == case) and (label is None or ld.label == label))
    return Rating(job, what, float(lam), limit, gov, u1, lin, scaled, tuple(reasons), count[0])
