"""Run a method over every pin, plate and load case into one long results table."""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np
import numpy.typing as npt

from . import bolts
from .combine import row_factors
from .frame import FrameSolution
from .methods import METHODS, Check, factors_for
from .model import Job
from .stack import StackResult, solve_stack

COLUMNS = ("pin", "part", "check", "case", "demand", "capacity", "kind", "utilization", "status", "clause",
           "formula", "factors", "note")


@dataclass(frozen=True)
class Results:
    """The long results table, one row per (pin, part, check, case), and what produced it.

    Columns are numpy arrays (numbers) or tuples (text); ``to_frame()`` gives a pandas DataFrame.
    Demand and capacity are SI (N, N*m, m, Pa, or a pure ratio), as ``kind`` says.
    """

    job: Job
    solution: FrameSolution
    stacks: dict[str, StackResult]
    method: str
    edition: str
    variant: str | None
    factors: dict[str, float]
    columns: dict[str, object]
    assumptions: tuple[str, ...] = field(default_factory=tuple)
    unchecked: tuple[str, ...] = field(default_factory=tuple)
    warnings: tuple[str, ...] = field(default_factory=tuple)
    case_solution: FrameSolution | None = None  # the forces per load case, where combinations were checked

    def __len__(self) -> int:
        return len(self.columns["check"])

    @property
    def order(self) -> npt.NDArray[np.intp]:
        """Row indices by utilization, highest first (stable, so ties keep table order)."""
        return np.argsort(-self.columns["utilization"], kind="stable")

    @property
    def governing(self) -> int | None:
        return int(self.order[0]) if len(self) else None

    @property
    def passed(self) -> bool:
        return bool(np.all(self.columns["utilization"] <= 1.0))

    def row(self, i: int) -> dict[str, object]:
        return {k: (v[i].item() if isinstance(v, np.ndarray) else v[i]) for k, v in self.columns.items()}

    def rows(self, sort: bool = False) -> list[dict[str, object]]:
        idx = self.order if sort else range(len(self))
        return [self.row(int(i)) for i in idx]

    def to_frame(self):
        import pandas as pd

        return pd.DataFrame({k: list(v) if isinstance(v, tuple) else v for k, v in self.columns.items()})


def _part_names(pin) -> list[str]:
    names = []
    for i, p in enumerate(pin.stack):
        same = [j for j, q in enumerate(pin.stack) if q.member == p.member]
        names.append(p.member if len(same) == 1 else f"{p.member} {same.index(i) + 1}/{len(same)}")
    return names


def run_checks(job: Job, sol: FrameSolution, module=None) -> Results:
    """Check every pin of ``job`` that has a stack, for every load case of ``sol``.

    ``module`` stands in for the job's method module (same interface); pinchk.alternatives passes one
    that records the columns the method kernels are given, to reuse them with alternative values.
    """
    mod = METHODS[job.method.name] if module is None else module
    variant = job.method.variant
    fac = factors_for(mod, job.method.factors)
    cases = sol.cases
    nc = len(cases)
    uls_case = np.array([job.cases[c].limit_state == "ULS" for c in cases])
    has_sls = not uls_case.all()
    ser_case = ~uls_case if has_sls else uls_case

    stacks: dict[str, StackResult] = {}
    P = {k: [] for k in ("d", "fup", "fyp", "V", "M", "uls", "ser", "bolt", "grade", "As", "V_shank", "V_thread",
                         "secured", "rot", "stack_text", "shank_planes", "thread_planes")}
    Q = {k: [] for k in ("F", "t", "d", "d0", "fy", "fu", "fyp", "fup", "E", "a_end", "width", "type_b", "rot",
                         "uls", "ser", "stiffened", "stack_text")}
    warnings: list[str] = []
    pin_lab: list[str] = []
    plate_lab: list[tuple[str, str]] = []
    for name, pin in job.pins.items():
        if not pin.checked:
            continue
        st = solve_stack(pin, sol.pins[name])
        stacks[name] = st
        ser = ser_case & pin.replaceable
        # the factor stack (dynamic, skew, consequence) scales the forces of the rows it applies to
        sfac, txt = row_factors(job, cases, name, {p.member for p in pin.stack})
        bolt = pin.bolt
        V_sh, V_th = bolts.shank_and_thread_shear(pin, st)
        P["d"].append(np.full(nc, pin.diameter))
        P["fup"].append(np.full(nc, pin.material.fu))
        P["fyp"].append(np.full(nc, pin.material.fy))
        P["V"].append(st.shear * sfac)
        P["M"].append(st.moment * sfac)
        P["uls"].append(uls_case)
        P["ser"].append(ser)
        P["bolt"].append(np.full(nc, bolt is not None))
        P["grade"].append(np.full(nc, bolt.grade.grade if bolt else "", dtype=object))
        P["As"].append(np.full(nc, bolt.As if bolt else np.pi * pin.diameter**2 / 4))
        P["V_shank"].append(V_sh * sfac)
        P["V_thread"].append(V_th * sfac)
        n_thread = len(bolt.thread_planes) if bolt else 0
        P["shank_planes"].append(np.full(nc, n_thread < len(pin.stack) - 1))
        P["thread_planes"].append(np.full(nc, n_thread > 0))
        P["secured"].append(np.full(nc, pin.secured))
        P["rot"].append(np.full(nc, pin.rotates))
        P["stack_text"].append(np.array(txt, dtype=object))
        pin_lab.append(name)
        warnings += bolts.warnings_for(pin)
        for k, (plate, part) in enumerate(zip(pin.stack, _part_names(pin))):
            if not plate.checked:
                continue
            m = plate.material
            sfac, txt = row_factors(job, cases, name, {plate.member})
            Q["F"].append(np.linalg.norm(st.plate_force[:, k, :], axis=-1) * sfac)
            Q["stack_text"].append(np.array(txt, dtype=object))
            Q["stiffened"].append(np.full(nc, plate.stiffened))
            for key, val in (("t", plate.thickness), ("d", pin.diameter), ("d0", plate.hole), ("fy", m.fy),
                             ("fu", m.fu), ("fyp", pin.material.fy), ("fup", pin.material.fu), ("E", m.E),
                             ("a_end", plate.end), ("width", plate.width)):
                Q[key].append(np.full(nc, val))
            Q["type_b"].append(np.full(nc, plate.en_type == "B"))
            Q["rot"].append(np.full(nc, pin.rotates))
            Q["uls"].append(uls_case)
            Q["ser"].append(ser)
            plate_lab.append((name, part))

    cols: dict[str, list] = {k: [] for k in COLUMNS}

    def emit(checks: list[Check], labels: list[tuple[str, str]], stack_text) -> None:
        n = len(labels)
        pins_ = np.repeat([p for p, _ in labels], nc) if n else np.array([], dtype=str)
        parts = np.repeat([q for _, q in labels], nc) if n else np.array([], dtype=str)
        case_col = np.tile(np.array(cases, dtype=object), n)
        for ch in checks:
            mask = np.ones(n * nc, bool) if ch.mask is None else np.asarray(ch.mask, bool)
            if not mask.any():
                continue
            dem, cap = ch.demand[mask], ch.capacity[mask]
            with np.errstate(divide="ignore", invalid="ignore"):
                util = np.where(cap > 0, dem / np.where(cap > 0, cap, 1.0), np.inf)
            k = int(mask.sum())
            cols["pin"] += list(pins_[mask])
            cols["part"] += list(parts[mask])
            cols["check"] += [ch.name] * k
            cols["case"] += list(case_col[mask])
            cols["demand"].append(dem)
            cols["capacity"].append(cap)
            cols["kind"] += [ch.kind] * k
            cols["utilization"].append(util)
            cols["status"] += ["pass" if u <= 1.0 else "FAIL" for u in util]
            cols["clause"] += [ch.clause] * k
            cols["formula"] += [ch.formula] * k
            stack = stack_text[mask] if ch.uses_forces else [""] * k
            cols["factors"] += [ch.factors + ("; " if ch.factors and s else "") + s for s in stack]
            cols["note"] += [ch.note] * k

    if pin_lab:
        Pa = {k: np.concatenate(v) for k, v in P.items()}
        emit(mod.pin_checks(Pa, fac, variant), [(p, "pin") for p in pin_lab], Pa["stack_text"])
    if plate_lab:
        Qa = {k: np.concatenate(v) for k, v in Q.items()}
        emit(mod.plate_checks(Qa, fac, variant), plate_lab, Qa["stack_text"])

    columns: dict[str, object] = {}
    for k in COLUMNS:
        if k in ("demand", "capacity", "utilization"):
            columns[k] = np.concatenate(cols[k]) if cols[k] else np.zeros(0)
        else:
            columns[k] = tuple(str(x) for x in cols[k])

    notes = [f"{n}: {st.share_note}" for n, st in stacks.items()
             if len({p.member for p in job.pins[n].stack}) < len(job.pins[n].stack)]
    notes.append("each plate is checked with the geometry along its lug axis, taken as the direction of "
                 "its force (width across it, end distance along it)")
    notes.append("pin moment from uniform bearing over each plate's thickness (EN 1993-1-8 Fig. 3.11 model); "
                 "an unsymmetric stack's net couple is held by equal end couples at its outer faces")
    if any(job.pins[n].replaceable for n in stacks) and not has_sls:
        notes.append("replaceable pins: no SLS case is given, so the serviceability checks use the ultimate "
                     "case forces (conservative)")
    unchecked = tuple(n for n, p in job.pins.items() if not p.checked)
    notes += [f"{n}: {pin.bolt.thread_note}" for n, pin in job.pins.items() if pin.bolt and n in stacks]
    return Results(job, sol, stacks, mod.NAME, mod.EDITION, variant, fac, columns, tuple(notes), unchecked,
                   tuple(warnings))

