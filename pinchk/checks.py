"""Run a method over every pin, plate and load case into one long results table."""

from __future__ import annotations

import operator
from bisect import bisect_right
from collections.abc import Sequence
from dataclasses import dataclass, field

import numpy as np
import numpy.typing as npt

from . import bolts, joint
from .combine import row_factors
from .frame import FrameSolution
from .methods import METHODS, factors_for, make_check, term
from .methods.lug_base import BASE_CHECKS
from .model import Job
from .stack import StackResult, solve_stack
from .sweep import lug_sweeps

COLUMNS = ("pin", "part", "check", "case", "demand", "capacity", "kind", "utilization", "status", "clause",
           "formula", "factors", "note", "worked_demand", "worked_capacity", "terms")


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
    #: (pin, part) -> geometry along the force of each case: angle [rad], a, c_pos, c_neg [m] (n_case,)
    geometry: dict[tuple[str, str], dict[str, npt.NDArray[np.float64]]] = field(default_factory=dict)
    #: pin -> axial force its retainer takes in each case [N] (lugs with a lateral load), (n_case,)
    pin_axial: dict[str, npt.NDArray[np.float64]] = field(default_factory=dict)
    #: load-angle sweep of every lug plate (pinchk.sweep.LugSweep)
    sweeps: tuple = field(default_factory=tuple)

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
        """Every row as ``row`` gives it; each column is read once, whole (not row by row)."""
        cols = {k: (v.tolist() if isinstance(v, np.ndarray) else list(v)) for k, v in self.columns.items()}
        idx = self.order.tolist() if sort else range(len(self))
        return [{k: c[i] for k, c in cols.items()} for i in idx]

    def to_frame(self):
        import pandas as pd

        return pd.DataFrame({k: v if isinstance(v, np.ndarray) else list(v) for k, v in self.columns.items()})


_STATUS = np.array(["FAIL", "pass"], dtype=object)


def _joined_text(own: str, row_texts) -> tuple[npt.NDArray[np.intp], npt.NDArray[np.object_]]:
    """The check's own text, then each row's text ('factors': the row's stack of load factors; 'note':
    the row's note), joined by '; ' where both are there, as (code of each row, texts): each distinct
    text is made once."""
    row_texts = np.asarray(row_texts, dtype=object)
    if row_texts.size and (row_texts == row_texts[0]).all():  # the common case: one text for every row
        index = {row_texts[0]: 0}
        inv = np.zeros(row_texts.size, np.intp)
    else:
        index = {}
        inv = np.fromiter((index.setdefault(t, len(index)) for t in row_texts.tolist()), np.intp, row_texts.size)
    return inv, np.array(["; ".join(x for x in (own, t) if x) for t in index], dtype=object)


class _BlockColumn(Sequence):
    """A column of the results table made of one block per check; a row is looked up when it is read.

    Subclasses keep ``_starts`` (each block's first row), ``_blocks`` and ``_n`` (rows in all), and say
    what row ``offset`` of block ``b`` holds (``_item``).
    """

    def __init__(self) -> None:
        self._starts: list[int] = []
        self._blocks: list = []
        self._n = 0

    def _item(self, b: int, offset: int):
        raise NotImplementedError

    def __len__(self) -> int:
        return self._n

    def __getitem__(self, i):
        if isinstance(i, slice):
            return [self[j] for j in range(*i.indices(self._n))]
        i = operator.index(i)
        if i < 0:
            i += self._n
        if not 0 <= i < self._n:
            raise IndexError(i)
        b = bisect_right(self._starts, i) - 1
        return self._item(b, i - self._starts[b])


class TextColumn(_BlockColumn):
    """A text column of the results table, kept per check as a code per row into a few texts (a text
    repeated is one text and no codes); a row's text is looked up when it is read.

    A table of 10 million rows would otherwise hold 10 million references per column. It reads like a
    tuple of str: len, index (int or slice), iteration, ``in``, equality with any sequence of str.
    """

    def add(self, k: int, texts, codes=None) -> None:
        """``k`` rows: ``texts[codes]``, or the one text ``texts`` k times when ``codes`` is None."""
        if k:
            self._starts.append(self._n)
            self._blocks.append((codes, texts))  # (codes or None, texts)
            self._n += k

    def _item(self, b: int, offset: int):
        codes, texts = self._blocks[b]
        return texts if codes is None else texts[codes[offset]]

    def _pieces(self):
        ends = self._starts[1:] + [self._n] if self._blocks else []
        for (codes, texts), a, z in zip(self._blocks, self._starts, ends, strict=True):
            yield [texts] * (z - a) if codes is None else texts[codes].tolist()

    def __iter__(self):
        for piece in self._pieces():
            yield from piece

    def __array__(self, dtype=None, copy=None):
        out = np.empty(self._n, dtype=object)
        at = 0
        for piece in self._pieces():
            out[at:at + len(piece)] = piece
            at += len(piece)
        return out if dtype is None else out.astype(dtype)

    def __eq__(self, other) -> bool:
        if not isinstance(other, Sequence) or isinstance(other, str):
            return NotImplemented
        return len(self) == len(other) and all(a == b for a, b in zip(self, other, strict=True))

    __hash__ = None  # type: ignore[assignment]

    def __repr__(self) -> str:
        return f"TextColumn({tuple(self)!r})"


class TermsColumn(_BlockColumn):
    """The named inputs of each row's formula, ((symbol, kind, SI value), ...) per row.

    Kept per check as the method's own arrays and the rows it kept; a row's tuple is made only when it
    is read (a report reads them, a sweep of millions of rows does not).
    """

    def add(self, k: int, mask, terms) -> None:
        self._starts.append(self._n)
        self._blocks.append([mask, None, terms])  # [mask, kept-row indices or None (made on first read), terms]
        self._n += k

    def _item(self, b: int, offset: int):
        block = self._blocks[b]
        mask, rows, terms = block
        if rows is None:
            rows = block[1] = np.flatnonzero(mask)
        r = rows[offset]
        return tuple((sym, kd, float(np.broadcast_to(np.asarray(v, float), mask.shape)[r]))
                     for sym, kd, v in terms)


def check_table(blocks, cases, dropped: list[int] | None = None) -> dict[str, object]:
    """The long results table from the checks of each block of rows, as columns.

    ``blocks`` is a list of ``(checks, labels, stack_text[, notes[, keep]])``: the Checks a method
    returned for rows that run (pin or plate) by (case), the (pin, part) label of each pin or plate, the
    text of the load factors applied to each row, optionally a note per row (added to the check's own
    note, except for the checks named in joint.OUTLINE_FREE) and a test of the check names to keep.
    Rows whose capacity is unbounded (+inf: the force runs into the body of the plate) are left out
    and counted in ``dropped[0]``. Every column is built with whole-array operations (no Python loop
    over rows): numbers as numpy arrays, text as TextColumns (read like tuples of str).
    """
    dropped = dropped if dropped is not None else [0]
    nc = len(cases)
    case_arr = np.array(cases, dtype=object)
    # first the numbers and the rows each check keeps, then every text column filled in place
    parts: list[tuple] = []  # (check, mask, demand, capacity, utilization, pins, part names, stack, notes)
    for checks, labels, stack_text, *more in blocks:
        notes, keep = (list(more) + [None, None])[:2]
        n = len(labels)
        pins_ = np.array([p for p, _ in labels], dtype=object)
        names = np.array([q for _, q in labels], dtype=object)
        for ch in checks:
            if keep is not None and not keep(ch.name):
                continue
            mask = np.ones(n * nc, bool) if ch.mask is None else np.asarray(ch.mask, bool)
            # a capacity without bound: the force runs into the body of the plate (no free edge ahead)
            unbounded = mask & np.isposinf(ch.capacity)
            dropped[0] += int(unbounded.sum())
            mask = mask & ~unbounded
            if not mask.any():
                continue
            dem, cap = ch.demand[mask], ch.capacity[mask]
            with np.errstate(divide="ignore", invalid="ignore"):
                util = np.where(cap > 0, dem / np.where(cap > 0, cap, 1.0), np.inf)
            own_note = notes is None or any(w in ch.name for w in joint.OUTLINE_FREE)
            parts.append((ch, mask, dem, cap, util, pins_, names, stack_text, None if own_note else notes))
    txt = {k: TextColumn() for k in COLUMNS if k not in ("demand", "capacity", "utilization", "terms")}
    terms = TermsColumn()
    for ch, mask, _, _, util, pins_, names, stack_text, notes in parts:
        k = len(util)
        row = np.flatnonzero(mask)  # rows run (pin or plate) by (case)
        label, case = np.divmod(row, nc)
        txt["pin"].add(k, pins_, label)
        txt["part"].add(k, names, label)
        txt["check"].add(k, ch.name)
        txt["case"].add(k, case_arr, case)
        txt["kind"].add(k, ch.kind)
        txt["status"].add(k, _STATUS, (util <= 1.0).view(np.int8))
        txt["clause"].add(k, ch.clause)
        txt["formula"].add(k, ch.formula)
        if ch.uses_forces:
            codes, texts = _joined_text(ch.factors, np.asarray(stack_text, dtype=object)[mask])
            txt["factors"].add(k, texts, codes)
        else:  # a detailing rule: no load factors enter it
            txt["factors"].add(k, ch.factors)
        if notes is None:
            txt["note"].add(k, ch.note)
        else:
            codes, texts = _joined_text(ch.note, np.asarray(notes, dtype=object)[row])
            txt["note"].add(k, texts, codes)
        txt["worked_demand"].add(k, ch.worked[0])
        txt["worked_capacity"].add(k, ch.worked[1])
        terms.add(k, mask, ch.terms)  # the formula's named inputs, made into row tuples when read
    columns: dict[str, object] = {}
    for key, pos in (("demand", 2), ("capacity", 3), ("utilization", 4)):
        columns[key] = np.concatenate([p[pos] for p in parts]) if parts else np.zeros(0)
    columns.update(txt)
    columns["terms"] = terms
    return {k: columns[k] for k in COLUMNS}


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
    Q: dict[str, list] = {}  # plate parts (the columns of joint.columns, with the factor-stack text)
    B: dict[str, list] = {}  # bushings: only the checks that do not depend on an outline
    L: dict[str, list] = {}  # lug bases under a lateral load
    warnings: list[str] = []
    pin_lab: list[str] = []
    plate_lab: list[tuple[str, str]] = []
    bush_lab: list[tuple[str, str]] = []
    base_lab: list[tuple[str, str]] = []
    plate_note: list[str] = []
    geometry: dict[tuple[str, str], dict] = {}
    pin_axial: dict[str, np.ndarray] = {}
    group_notes: list[str] = []
    no_base: list[str] = []
    fz_parts: list[str] = []  # lugs whose lateral load is the forces file's fz
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
        axial = np.zeros(nc)
        for part in joint.parts_of(pin):
            # the factor stack (dynamic, skew, consequence) scales the forces of the part's member
            sfac_p, txt_p = row_factors(job, cases, name, {pin.stack[part.plates[0]].member})
            f_part = part.force(st) * sfac_p[:, None]
            cols_ = joint.columns(pin, part, f_part, uls_case, ser)
            cols_["stack_text"] = np.array(txt_p, dtype=object)
            into, labels = (Q, plate_lab) if part.kind == "plate" else (B, bush_lab)
            for key, v in cols_.items():
                into.setdefault(key, []).append(v)
            labels.append((name, part.label))
            if part.kind == "plate":
                plate_note += joint.off_axis_note(pin, part, cols_["angle"])
                geometry[(name, part.label)] = {k: cols_[k] for k in ("angle", "a", "c_pos", "c_neg")}
                if note := joint.share_note(pin, st, part):
                    group_notes.append(note)
            fz = None
            pf = sol.pins[name]
            if pf.axial is not None:  # forces along the pin, from a forces file
                member = pin.stack[part.plates[0]].member
                fz = pf.axial[:, pf.members.index(member)] * sum(st.share[i] for i in part.plates) * sfac_p
            lat = joint.lateral_columns(pin, part, f_part, cases, job.combinations, fz)
            if lat is not None:
                if all(pin.stack[i].lateral is None for i in part.plates):
                    fz_parts.append(f"{name} {part.label}")
                lat["stack_text"] = cols_["stack_text"]
                axial += lat["H"]
                if job.method.name in BASE_CHECKS:
                    for key, v in lat.items():
                        L.setdefault(key, []).append(v)
                    base_lab.append((name, part.label))
                else:
                    no_base.append(f"{name} {part.label}")
        if axial.any() or pin.retainer is not None:
            pin_axial[name] = axial

    blocks: list[tuple] = []
    dropped = [0]

    if pin_lab:
        Pa = {k: np.concatenate(v) for k, v in P.items()}
        blocks.append((mod.pin_checks(Pa, fac, variant), [(p, "pin") for p in pin_lab], Pa["stack_text"]))
    if plate_lab:
        Qa = {k: np.concatenate(v) for k, v in Q.items()}
        blocks.append((mod.plate_checks(Qa, fac, variant), plate_lab, Qa["stack_text"], plate_note))
    if bush_lab:
        Ba = {k: np.concatenate(v) for k, v in B.items()}
        blocks.append((mod.plate_checks(Ba, fac, variant), bush_lab, Ba["stack_text"], None,
                       lambda c: any(w in c for w in joint.OUTLINE_FREE)))
    if base_lab:
        La = {k: np.concatenate(v) for k, v in L.items()}
        blocks.append((BASE_CHECKS[job.method.name](La, fac, variant), base_lab, La["stack_text"]))
    ret = [(n, job.pins[n].retainer) for n in pin_axial if job.pins[n].retainer is not None]
    if ret:
        blocks.append(([make_check("pin axial force (retainer)", "retainer capacity as given in the job: "
                         "axial force ≤ retainer capacity", "force",
                         np.concatenate([pin_axial[n] for n, _ in ret]), np.repeat([r for _, r in ret], nc), "",
                         None, "every lateral load on the pin's lugs taken through the pin to its retainer",
                         terms=(term("P", "force", np.concatenate([pin_axial[n] for n, _ in ret])),
                                term("Rret", "force", np.repeat([r for _, r in ret], nc))),
                         worked=("ΣH = {P}", "Rret = {Rret}"))],
             [(n, "pin retainer") for n, _ in ret], np.full(len(ret) * nc, "", dtype=object)))

    columns = check_table(blocks, cases, dropped)

    notes = [f"{n}: {st.share_note}" for n, st in stacks.items()
             if len({p.member for p in job.pins[n].stack}) < len(job.pins[n].stack)]
    notes += group_notes
    notes += joint.notes(job, stacks, dropped[0], bool(bush_lab), bool(base_lab))
    if no_base:
        warnings.append(joint.no_base_warning(job.method.name, no_base))
    if fz_parts:
        notes.append(f"the forces file's forces along the pin (fz) are the lateral loads of {', '.join(fz_parts)}, "
                     "by their share of the member's force: their base sections and the pin's retainer are checked "
                     "for them")
    if any(job.pins[n].replaceable for n in stacks) and not has_sls:
        notes.append("replaceable pins: no SLS case is given, so the serviceability checks use the ultimate "
                     "case forces (conservative)")
    unchecked = tuple(n for n, p in job.pins.items() if not p.checked)
    notes += [f"{n}: {pin.bolt.thread_note}" for n, pin in job.pins.items() if pin.bolt and n in stacks]
    sweeps = tuple(lug_sweeps(job, stacks, fac, variant, cases))
    return Results(job, sol, stacks, mod.NAME, mod.EDITION, variant, fac, columns, tuple(notes), unchecked,
                   tuple(warnings), None, geometry, pin_axial, sweeps)
