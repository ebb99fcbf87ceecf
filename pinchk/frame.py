"""Rigid-body statics of a pinned frame: take it apart at its connections and solve every body.

Every body gives three equilibrium equations in the plane (two forces and a moment), every pin two (the
pin is a small free body of its own, so a load can hang on the pin itself). Unknowns: the two force
components each body receives from each pin it sits on, one tension per link or cable, and the reactions
of the supports (pinned 2, roller 1, fixed 3). The rank of the equations tells a determinate structure
from a mechanism or an indeterminate one; only a determinate one is solved. One sparse factorization
serves every load case; the cases are solved, collected and checked in blocks (side by side on every CPU
for a large frame).

The equations are assembled as arrays, one block per kind of unknown (pin forces on bodies, links,
supports), never entry by entry, so a frame of 10,000 bodies assembles in milliseconds.
"""

from __future__ import annotations

import os
import sys
from dataclasses import dataclass
from itertools import chain

import numpy as np
import numpy.typing as npt

from .errors import Problem, StructureError
from .model import GROUND, PIN_LOAD, Job

#: Above this many unknowns the rank is not found by a dense SVD; the sparse factorization decides.
DENSE_RANK_LIMIT = 2000
#: Up to this many unknowns the dense SVD decides determinacy before the factorization, as it is cheap
#: at this size (a millisecond); above, the sparse factor's pivots decide whether the SVD is needed.
SVD_FIRST_LIMIT = 200
#: A sparse factorization with a pivot below this fraction of the largest pivot is taken as a sign of a
#: singular system; up to DENSE_RANK_LIMIT unknowns the dense SVD then decides (and says where).
PIVOT_SUSPECT = 1e-8
#: Equilibrium residual allowed, relative to the largest force in the solution.
RESIDUAL_TOL = 1e-9
#: SuperLU without relaxed supernodes: a frame's equations have a few entries per column, so padded
#: supernodes only add zeros and small dense steps. Without them, at 10,000 bodies, the factorization is
#: about twice as fast, one case's solve about four times, a block of cases about twice. The ordering and
#: the pivoting rule are the same.
SPLU_OPTIONS = {"relax": 1}

_SINGULAR = ("the equilibrium equations are singular: the structure is a mechanism or indeterminate "
             "(too large to locate where)")


@dataclass(frozen=True)
class PinForces:
    """Forces each member receives from one pin: ``force[case, member] = (Fx, Fy)`` [N].

    The members are the bodies the pin joins, the links ending on it, "ground" for a support at the pin
    and "load" for a load hung on the pin. They sum to zero in every case (the pin is in equilibrium).
    """

    pin: str
    members: tuple[str, ...]
    force: npt.NDArray[np.float64]  # (n_case, n_member, 2)
    axial: npt.NDArray[np.float64] | None = None  # (n_case, n_member) along the pin, when a forces file gives it


@dataclass(frozen=True)
class FrameSolution:
    """The solved frame for every load case. Arrays have the case as their first axis."""

    cases: tuple[str, ...]
    pins: dict[str, PinForces]
    links: dict[str, npt.NDArray[np.float64]]  # tension [N], (n_case,)
    supports: dict[str, npt.NDArray[np.float64]]  # (n_case, 3): Rx, Ry [N], M [N*m] on the structure
    residual: float  # largest equilibrium residual of any body or pin, relative to the largest force
    solver: str = "rigid-body statics"
    warnings: tuple[str, ...] = ()  # things the engineer must look at (e.g. forces that do not balance)



class _Index:
    """Numbering of unknowns and equations, with what each one belongs to (for diagnostics).

    Blocks of numbers are taken at once; the owner names are only written out when a diagnostic asks
    for them (a large frame that solves never needs them).
    """

    def __init__(self) -> None:
        self.n = 0
        self._blocks: list[tuple[object, object]] = []  # (numbers per item, labels or a function giving them)

    def take(self, k: int, owner: str) -> int:
        start = self.n
        self.n += k
        self._blocks.append((k, [owner]))
        return start

    def take_each(self, ks, labels) -> npt.NDArray[np.intp]:
        """Numbers for items of ``ks`` numbers each (an int or one per item); returns the first of each.

        ``labels`` is a list of owner names, one per item, or a function returning it.
        """
        ks = np.asarray(ks, dtype=np.intp)
        if ks.ndim == 0:
            raise TypeError("take_each needs one count per item")
        starts = self.n + np.concatenate([[0], np.cumsum(ks)[:-1]]).astype(np.intp) if ks.size else ks
        self.n += int(ks.sum())
        self._blocks.append((ks, labels))
        return starts

    @property
    def owner(self) -> list[str]:
        out: list[str] = []
        for ks, labels in self._blocks:
            names = labels() if callable(labels) else labels
            counts = [ks] * len(names) if isinstance(ks, int) else ks.tolist()
            for name, k in zip(names, counts, strict=True):
                out += [name] * k
        return out


def members_at_pins(job: Job) -> dict[str, list[str]]:
    """Members at each pin, in a fixed order: bodies, links, ground, load."""
    members = {name: list(p.bodies) for name, p in job.pins.items()}
    for link in job.links.values():
        for end in link.ends:
            if end.pin is not None:
                members[end.pin].append(link.name)
    for s in job.supports.values():
        if s.at.pin is not None:
            members[s.at.pin].append(GROUND)
    for load in job.loads:
        if load.at.pin is not None and load.body is None and PIN_LOAD not in members[load.at.pin]:
            members[load.at.pin].append(PIN_LOAD)
    return members


def _places(job: Job) -> list[tuple[float, float]]:
    """Every point of the frame: body points and pins (a pin may stand where only links meet)."""
    return [xy for b in job.bodies.values() for xy in b.points.values()] + [p.xy for p in job.pins.values()]


def _unit(a_xy: npt.NDArray[np.float64], b_xy: npt.NDArray[np.float64]) -> npt.NDArray[np.float64]:
    """Unit vectors from a to b, row by row."""
    d = b_xy - a_xy
    return d / np.hypot(d[:, 0], d[:, 1])[:, None]


def _xy(places) -> npt.NDArray[np.float64]:
    return np.array([p.xy for p in places], dtype=float).reshape(-1, 2)


class _Entries:
    """COO triplets of the equilibrium matrix, gathered block by block."""

    def __init__(self, L: float) -> None:
        self.L = L
        self.rows: list[npt.NDArray] = []
        self.cols: list[npt.NDArray] = []
        self.vals: list[npt.NDArray] = []

    def add(self, r, c, v) -> None:
        r = np.asarray(r, dtype=np.intp)
        self.rows.append(r)
        self.cols.append(np.broadcast_to(np.asarray(c, dtype=np.intp), r.shape))
        self.vals.append(np.broadcast_to(np.asarray(v, dtype=float), r.shape))

    def on_body_xy(self, r, c, rx, ry) -> None:
        """Unknown (Fx, Fy) in columns c, c + 1 acting on the bodies with rows r, at offsets (rx, ry)."""
        self.add(r, c, 1.0)
        self.add(r + 1, c + 1, 1.0)
        self.add(r + 2, c, -ry / self.L)
        self.add(r + 2, c + 1, rx / self.L)

    def on_body_line(self, r, c, rx, ry, dx, dy) -> None:
        """One unknown in column c acting along (dx, dy) on the bodies with rows r, at offsets (rx, ry)."""
        self.add(r, c, dx)
        self.add(r + 1, c, dy)
        self.add(r + 2, c, (rx * dy - ry * dx) / self.L)

    def arrays(self):
        if not self.rows:
            return np.zeros(0, np.intp), np.zeros(0, np.intp), np.zeros(0)
        rows, cols, vals = (np.concatenate(a) for a in (self.rows, self.cols, self.vals))
        keep = vals != 0.0
        return rows[keep], cols[keep], vals[keep]


#: Above this many numbers, _group_sum adds with a sparse incidence matrix (when scipy is loaded anyway).
_SPARSE_SUM_SIZE = 100_000


def _group_sum(values: npt.NDArray[np.float64], groups, n_group: int, rows=None) -> npt.NDArray[np.float64]:
    """Sum of the rows of ``values`` (item, ...) by the group of each item: (group, ...). See _GroupSum."""
    return _GroupSum(groups, n_group, rows)(values)


class _GroupSum:
    """Sums of rows of arrays by the group of each item, prepared once for many arrays of the same items.

    ``rows`` picks the items' rows of the values (all rows if None). Each group's items are added one
    after another in the order given, exactly as a loop over the items would add them (so the sums are
    the same to the last bit): one vectorized step per rank within the groups, or, for large arrays
    once scipy is loaded, one product with a 0/1 incidence matrix (whose rows add in column order).
    """

    def __init__(self, groups, n_group: int, rows=None) -> None:
        self.groups = np.asarray(groups, dtype=np.intp)
        self.n_group = n_group
        self.rows = np.arange(len(self.groups)) if rows is None else np.asarray(rows, dtype=np.intp)
        self.order = np.argsort(self.groups, kind="stable")
        self.counts = np.bincount(self.groups, minlength=n_group)
        self._S = None

    def __call__(self, values: npt.NDArray[np.float64]) -> npt.NDArray[np.float64]:
        tail = values.shape[1:]
        if self.groups.size == 0:
            return np.zeros((self.n_group,) + tail)
        if "scipy.sparse" in sys.modules and self.groups.size * max(1, int(np.prod(tail))) > _SPARSE_SUM_SIZE:
            if self._S is None:
                import scipy.sparse as sp

                indptr = np.concatenate([[0], np.cumsum(self.counts)])
                self._S = sp.csr_matrix((np.ones(len(self.order)), self.rows[self.order], indptr),
                                        shape=(self.n_group, values.shape[0]))
            return np.asarray(self._S @ values.reshape(values.shape[0], -1)).reshape((self.n_group,) + tail)
        out = np.zeros((self.n_group,) + tail)
        v = values[self.rows[self.order]]
        first = np.cumsum(self.counts) - self.counts
        for r in range(int(self.counts.max())):
            g = np.flatnonzero(self.counts > r)
            out[g] += v[first[g] + r]
        return out


@dataclass(frozen=True)
class _Slots:
    """Where each member's force sits when the members of every pin are laid one after another.

    Pin k's members (bodies, links, ground, load, in the order of ``_members``) take the slots
    start[k] .. start[k + 1] - 1. Built once from the job, shared by the assembly, the collection of
    the forces and the equilibrium check.
    """

    start: npt.NDArray[np.intp]  # (n_pin + 1,)
    pb_pin: npt.NDArray[np.intp]  # every (pin, body) pair, in pin order then pin.bodies order
    pb_body: npt.NDArray[np.intp]
    pb_slot: npt.NDArray[np.intp]
    s_link: list[int]  # slots of link ends at pins, with the link's index and the end's sign
    l_link: list[int]
    sign: list[float]
    s_gnd: list[int]  # slots of supports at pins, with the support's index
    g_sup: list[int]
    s_load: list[int]  # slots of loads hung on pins, with the pin's index
    p_load: list[int]


def _slots(job: Job, members: dict[str, list[str]], pin_ix: dict[str, int], body_ix: dict[str, int]) -> _Slots:
    n_b = np.fromiter(map(len, (p.bodies for p in job.pins.values())), np.intp, len(job.pins))
    lens = np.fromiter(map(len, members.values()), np.intp, len(members))
    start = np.concatenate([[0], np.cumsum(lens)]).astype(np.intp)
    n_pair = int(n_b.sum())
    pb_pin = np.repeat(np.arange(len(n_b), dtype=np.intp), n_b)
    pb_body = np.fromiter(map(body_ix.__getitem__, chain.from_iterable(p.bodies for p in job.pins.values())),
                          np.intp, n_pair)
    pair_first = np.cumsum(n_b) - n_b
    pb_slot = start[pb_pin] + (np.arange(n_pair, dtype=np.intp) - pair_first[pb_pin])
    # the rest of each pin's slots fill in the order _members appends them: links, ground, load
    fill = (start[:-1] + n_b).tolist()
    s_link, l_link, sign = [], [], []
    for li, link in enumerate(job.links.values()):
        for end, sg in zip(link.ends, (1.0, -1.0), strict=True):
            if end.pin is not None:
                k = pin_ix[end.pin]
                s_link.append(fill[k])
                fill[k] += 1
                l_link.append(li)
                sign.append(sg)
    s_gnd, g_sup = [], []
    first_sup: dict[str, int] = {}
    for si, sup in enumerate(job.supports.values()):
        if sup.at.pin is not None:
            first_sup.setdefault(sup.at.pin, si)
    for sup in job.supports.values():
        if sup.at.pin is not None:
            k = pin_ix[sup.at.pin]
            s_gnd.append(fill[k])
            fill[k] += 1
            g_sup.append(first_sup[sup.at.pin])  # a pin's ground is its (first) support
    s_load, p_load = [], []
    seen: set[int] = set()
    for ld in job.loads:
        if ld.at.pin is not None and ld.body is None:
            k = pin_ix[ld.at.pin]
            if k not in seen:
                seen.add(k)
                s_load.append(fill[k])
                fill[k] += 1
                p_load.append(k)
    return _Slots(start, pb_pin, pb_body, pb_slot, s_link, l_link, sign, s_gnd, g_sup, s_load, p_load)


def _triplets(job: Job):
    """Equilibrium equations as COO triplets ``(rows, cols, vals)``, the shape, ``b`` (a _Rhs) and the numbering."""
    cases = tuple(job.cases)
    case_ix = {c: i for i, c in enumerate(cases)}
    members = members_at_pins(job)
    body_names = list(job.bodies)
    pin_names = list(job.pins)
    body_ix = {name: i for i, name in enumerate(body_names)}
    pin_ix = {name: i for i, name in enumerate(pin_names)}
    n_body, n_pin = len(body_names), len(pin_names)

    n_pts = np.fromiter(map(len, (b.points for b in job.bodies.values())), np.intp, n_body)
    pts = np.fromiter(chain.from_iterable(chain.from_iterable(b.points.values() for b in job.bodies.values())),
                      float, 2 * int(n_pts.sum())).reshape(-1, 2)
    pin_xy = np.fromiter(chain.from_iterable(p.xy for p in job.pins.values()), float, 2 * n_pin).reshape(-1, 2)
    places = np.concatenate([pts, pin_xy])  # as _places(job): a pin may stand where only links meet
    span = float(np.ptp(places, axis=0).max()) if len(places) > 1 else 1.0
    L = span if span > 0 else 1.0  # moment rows are divided by L so every entry is of order one
    # reference point of each body: the mean of its points
    ref = _group_sum(pts, np.repeat(np.arange(n_body), n_pts), n_body) / np.maximum(n_pts, 1)[:, None]

    eqs, unk = _Index(), _Index()
    body_row = eqs.take_each(np.full(n_body, 3), lambda: [f"body {n}" for n in body_names])
    pin_row = eqs.take_each(np.full(n_pin, 2), lambda: [f"pin {n}" for n in pin_names])
    E = _Entries(L)
    slots = _slots(job, members, pin_ix, body_ix)
    pb_pin, pb_body = slots.pb_pin, slots.pb_body

    # pin-to-body forces: unknown (Fx, Fy) the body receives; the pin receives the opposite
    c = unk.take_each(np.full(len(pb_pin), 2), lambda: [f"pin {p} at body {b}" for p, pin in job.pins.items()
                                                        for b in pin.bodies])
    pb_col = c  # the columns of every (pin, body) pair, in pin order then pin.bodies order
    if len(pb_pin):
        rxy = pin_xy[pb_pin] - ref[pb_body]
        E.on_body_xy(body_row[pb_body], c, rxy[:, 0], rxy[:, 1])
        E.add(pin_row[pb_pin], c, -1.0)
        E.add(pin_row[pb_pin] + 1, c + 1, -1.0)

    # links and cables: one tension each, pulling each end toward the other
    link_list = list(job.links.values())
    c = unk.take_each(np.ones(len(link_list), dtype=np.intp), lambda: [f"{lk.kind} {lk.name}" for lk in link_list])
    link_col = dict(zip(job.links, c.tolist(), strict=True))
    if link_list:
        a_xy = _xy(lk.ends[0] for lk in link_list)
        b_xy = _xy(lk.ends[1] for lk in link_list)
        u = _unit(a_xy, b_xy)
        for k, (s, end_xy) in enumerate(((1.0, a_xy), (-1.0, b_xy))):
            su = s * u
            ends = [lk.ends[k] for lk in link_list]
            at_pin = np.array([e.pin is not None for e in ends], dtype=bool)
            if at_pin.any():
                pr = pin_row[[pin_ix[e.pin] for e in ends if e.pin is not None]]
                E.add(pr, c[at_pin], su[at_pin, 0])
                E.add(pr + 1, c[at_pin], su[at_pin, 1])
            on_body = ~at_pin
            if on_body.any():
                bi = np.array([body_ix[e.body] for e in ends if e.pin is None], dtype=np.intp)
                rxy = end_xy[on_body] - ref[bi]
                E.on_body_line(body_row[bi], c[on_body], rxy[:, 0], rxy[:, 1], su[on_body, 0], su[on_body, 1])

    # supports
    sup_list = list(job.supports.values())
    ks = np.array([{"pinned": 2, "roller": 1, "fixed": 3}[s.kind] for s in sup_list], dtype=np.intp)
    c = unk.take_each(ks, lambda: [f"support {s.name}" for s in sup_list])
    sup_col = dict(zip(job.supports, c.tolist(), strict=True))
    for k, s in enumerate(sup_list):  # few: one entry set each
        ck = int(c[k])
        if s.at.pin is not None:
            r = int(pin_row[pin_ix[s.at.pin]])
            if s.kind == "roller":
                E.add([r, r + 1], ck, [s.normal[0], s.normal[1]])
            else:
                E.add([r, r + 1], [ck, ck + 1], 1.0)
        else:
            bi = body_ix[s.at.body]
            r = np.array([body_row[bi]])
            rx, ry = np.asarray(s.at.xy, dtype=float) - ref[bi]
            if s.kind == "roller":
                E.on_body_line(r, ck, rx, ry, s.normal[0], s.normal[1])
            else:
                E.on_body_xy(r, ck, rx, ry)
                if s.kind == "fixed":
                    E.add(r + 2, ck + 2, 1.0)  # reaction moment, unknown M / L

    # loads: the right-hand side, one column per case, kept as its entries (a few per load)
    rhs_r: list[npt.NDArray[np.intp]] = []
    rhs_j: list[npt.NDArray[np.intp]] = []
    rhs_v: list[npt.NDArray[np.float64]] = []
    on_pin = [ld for ld in job.loads if ld.at.pin is not None and ld.body is None]
    on_body = [ld for ld in job.loads if not (ld.at.pin is not None and ld.body is None)]
    hung = (np.array([pin_ix[ld.at.pin] for ld in on_pin], dtype=np.intp),
            np.array([case_ix[ld.case] for ld in on_pin], dtype=np.intp),
            np.array([ld.force for ld in on_pin], dtype=float).reshape(-1, 2))  # pin, case, force of each
    if on_pin:
        r, j, f = pin_row[hung[0]], hung[1], hung[2]
        rhs_r += [r, r + 1]
        rhs_j += [j, j]
        rhs_v += [f[:, 0], f[:, 1]]
    if on_body:
        bi = np.array([body_ix[ld.body if ld.body is not None else ld.at.body] for ld in on_body], dtype=np.intp)
        r = body_row[bi]
        j = np.array([case_ix[ld.case] for ld in on_body], dtype=np.intp)
        f = np.array([ld.force for ld in on_body], dtype=float)
        mz = np.array([ld.moment for ld in on_body], dtype=float)
        rxy = _xy(ld.at for ld in on_body) - ref[bi]
        rhs_r += [r, r + 1, r + 2]
        rhs_j += [j, j, j]
        rhs_v += [f[:, 0], f[:, 1], (rxy[:, 0] * f[:, 1] - rxy[:, 1] * f[:, 0] + mz) / L]
    b = _Rhs(eqs.n, len(cases), rhs_r, rhs_j, rhs_v)

    rows, cols, vals = E.arrays()
    numbering = dict(
        cases=cases, members=members, L=L, eqs=eqs, unk=unk, index=(case_ix, body_ix, pin_ix), hung=hung,
        link_col=link_col, sup_col=sup_col, slots=slots, pb_col=pb_col, pin_xy=pin_xy, places=places,
    )
    return rows, cols, vals, (eqs.n, unk.n), b, numbering


class _Rhs:
    """The right-hand side b (equation, case) as its entries: a load adds -value at (row, case).

    A block of cases is made dense only when it is solved, so a run of many cases never holds b whole.
    """

    def __init__(self, n: int, n_case: int, rows, cases, values) -> None:
        self.shape = (n, n_case)
        r, j, v = (np.concatenate(a) if a else np.zeros(0, dt) for a, dt in
                   ((rows, np.intp), (cases, np.intp), (values, float)))
        order = np.argsort(j, kind="stable")  # by case, each case's entries in the order given
        self.r, self.j, self.v = r[order], j[order], v[order]
        self.at = np.searchsorted(self.j, np.arange(n_case + 1))

    def dense(self, c0: int, c1: int) -> npt.NDArray[np.float64]:
        """Cases c0 .. c1 - 1 of b, column-major; each entry adds its loads one after another."""
        out = np.zeros((self.shape[0], c1 - c0), order="F")
        a, z = self.at[c0], self.at[c1]
        np.subtract.at(out, (self.r[a:z], self.j[a:z] - c0), self.v[a:z])
        return out


def assemble(job: Job):
    """Equilibrium equations ``A x = b`` of the job (A a scipy CSC matrix, b dense), with the numbering used."""
    import scipy.sparse as sp

    rows, cols, vals, shape, b, numbering = _triplets(job)
    return sp.csc_matrix((vals, (rows, cols)), shape=shape), b.dense(0, b.shape[1]), numbering


def _involved(owners: list[str], weights: npt.NDArray[np.float64]) -> str:
    w = np.abs(weights)
    keep = w > 1e-6 * max(w.max(), 1e-300)
    seen: list[str] = []
    for own, k in zip(owners, keep, strict=True):
        if k and own not in seen:
            seen.append(own)
    return ", ".join(seen[:12]) + (" ..." if len(seen) > 12 else "")


def rank_tol(shape, s: npt.NDArray[np.float64]) -> float:
    return max(shape) * np.finfo(float).eps * (s[0] if s.size else 1.0) * 1e3


def _diagnose(job: Job, A, num) -> None:
    """Raise a StructureError for a mechanism or an indeterminate structure; return if determinate.

    ``A`` is the equilibrium matrix, sparse or dense. Up to DENSE_RANK_LIMIT unknowns its rank comes
    from a dense SVD, which also names what is involved; above, only the counts are compared.
    """
    n_eq, n_unk = A.shape
    eqs, unk = num["eqs"], num["unk"]
    problems: list[Problem] = []
    if max(n_eq, n_unk) <= DENSE_RANK_LIMIT:
        M = A.toarray() if hasattr(A, "toarray") else np.asarray(A, dtype=float)
        if n_eq == n_unk:  # the singular values alone settle a determinate frame, the common case
            s = np.linalg.svd(M, compute_uv=False)
            if int((s > rank_tol(M.shape, s)).sum()) == n_eq:
                return
        U, s, Vt = np.linalg.svd(M)
        rank = int((s > rank_tol(M.shape, s)).sum())
        mech, indet = n_eq - rank, n_unk - rank
        if mech == 0 and indet == 0:
            return
        if mech > 0:
            where = _involved(eqs.owner, np.abs(U[:, rank:]).sum(axis=1))
            problems.append(Problem(job.path, "", "", (
                f"the structure is a mechanism with {mech} degree(s) of freedom: it can move without "
                f"resistance, so statics cannot hold it (involved: {where}); add a support or a link, "
                f"or make a joint fixed")))
        if indet > 0:
            where = _involved(unk.owner, np.abs(Vt[rank:, :]).sum(axis=0))
            problems.append(Problem(job.path, "", "", (
                f"the structure is statically indeterminate to degree {indet}: equilibrium alone cannot "
                f"share the load among these (involved: {where}); remove a redundant support or link, "
                f"or turn a support into a roller")))
        raise StructureError(problems)
    if n_eq > n_unk:
        raise StructureError(Problem(job.path, "", "", (
            f"the structure is a mechanism: {n_eq} equilibrium equations but only {n_unk} unknowns; "
            f"add a support or a link")))
    if n_unk > n_eq:
        raise StructureError(Problem(job.path, "", "", (
            f"the structure is statically indeterminate to degree at least {n_unk - n_eq}: {n_unk} unknowns "
            f"for {n_eq} equilibrium equations; remove a redundant support or link")))


def _pivot_ratio(lu) -> float:
    """Smallest over largest pivot of a SuperLU factorization (0 for an empty or zero factor)."""
    d = np.abs(lu.U.diagonal())
    top = d.max(initial=0.0)
    return float(d.min() / top) if top > 0 and np.isfinite(top) else 0.0


def solve(job: Job) -> FrameSolution:
    """Solve the frame of ``job`` for every load case.

    The equations are factored once (SuperLU) and every case solved with that factor. A small frame's
    determinacy is decided first by the dense SVD, as before; for a larger one a failed factor, or a
    pivot that is tiny against the largest, is the sign of a singular system: the dense SVD then
    decides and says where, when the frame is small enough for it; otherwise it is reported as
    singular. The equilibrium of every body and pin is checked on the solved forces.

    Raises:
        StructureError: a mechanism, an indeterminate structure, or a cable in compression.
    """
    rows, cols, vals, shape, b, num = _triplets(job)
    n = max(shape)
    if n <= min(SVD_FIRST_LIMIT, DENSE_RANK_LIMIT):
        # a small frame is solved dense: the SVD decides determinacy, and the run needs no scipy import
        A = np.zeros(shape)
        np.add.at(A, (np.asarray(rows, dtype=np.intp), np.asarray(cols, dtype=np.intp)), vals)
        _diagnose(job, A, num)  # raises for a mechanism or an indeterminate frame
        return _collect(job, np.linalg.solve(A, b.dense(0, b.shape[1])), num)

    import scipy.sparse as sp
    import scipy.sparse.linalg as spla

    A = sp.csc_matrix((vals, (rows, cols)), shape=shape)
    checked = shape[0] != shape[1]
    if checked:
        _diagnose(job, A, num)  # raises: a frame that is not square is a mechanism or indeterminate
    try:
        lu = spla.splu(A, **SPLU_OPTIONS)
    except RuntimeError:
        lu = None
    suspect = PIVOT_SUSPECT if n <= DENSE_RANK_LIMIT else rank_tol(shape, np.ones(1))
    if lu is None or (not checked and _pivot_ratio(lu) < suspect):
        if n > DENSE_RANK_LIMIT:
            raise StructureError(Problem(job.path, "", "", _SINGULAR))
        if not checked:
            _diagnose(job, A, num)  # raises when the SVD finds the system singular, naming what is involved
        if lu is None:
            return _collect(job, np.linalg.solve(A.toarray(), b.dense(0, b.shape[1])), num)

    def x_of(c0: int, c1: int) -> npt.NDArray[np.float64]:
        # a few right-hand sides at a time: their columns then stay in the CPU's cache during the solve
        x = np.empty((b.shape[0], c1 - c0), order="F")
        for a in range(c0, c1, SOLVE_COLUMNS):
            z = min(a + SOLVE_COLUMNS, c1)
            x[:, a - c0:z - c0] = lu.solve(b.dense(a, z))
        return x

    return _collect_blocks(job, x_of, num)


#: Load cases are solved, collected and checked in blocks of about this many pin-force numbers (slots x 2
#: x cases: 16 cases at 10,000 bodies; a small frame's cases all in one block). A block's arrays stay
#: small (a few MB), where arrays of every case at once would each cost fresh memory; the results are the
#: same to the last bit whatever the blocks.
BLOCK_SIZE = 720_000
#: A frame with at least this many pin-force numbers in all works its blocks side by side, one thread per
#: CPU up to one per block (the solver and numpy's large steps release the GIL).
THREAD_SIZE = 200_000
#: SuperLU solves this many load cases at a time (fewer columns stay in cache; see benchmarks/frame_solve.py).
SOLVE_COLUMNS = 4


def _case_blocks(n_case: int, per_case: int, workers: int) -> list[tuple[int, int]]:
    """Blocks (c0, c1) of cases of about BLOCK_SIZE numbers (``per_case`` a case), of equal size, as
    many as a multiple of ``workers``."""
    n = -(-n_case * max(per_case, 1) // BLOCK_SIZE)
    n = min(n_case, -(-n // workers) * workers)
    edges = [round(i * n_case / n) for i in range(n + 1)] if n else [0]
    return [(a, b) for a, b in zip(edges[:-1], edges[1:], strict=True) if b > a]


def _cpus() -> int:
    """The CPUs this process may run on."""
    try:
        return len(os.sched_getaffinity(0))
    except (AttributeError, OSError):
        return os.cpu_count() or 1


def _in_blocks(work, n_case: int, size: int) -> tuple[float, float]:
    """Largest (out-of-balance, force) over the blocks of cases, ``work(c0, c1)`` giving each block's;
    ``size`` is the number of pin-force numbers of all cases."""
    per_case = size // max(n_case, 1)
    workers = min(_cpus(), len(_case_blocks(n_case, per_case, 1))) if size >= THREAD_SIZE else 1
    blocks = _case_blocks(n_case, per_case, max(workers, 1))
    if workers > 1 and len(blocks) > 1:
        from concurrent.futures import ThreadPoolExecutor

        with ThreadPoolExecutor(min(workers, len(blocks))) as pool:
            found = list(pool.map(lambda cc: work(*cc), blocks))
    else:
        found = [work(c0, c1) for c0, c1 in blocks]
    # np.max, not max: a NaN anywhere must come through
    return (float(np.max([w for w, _ in found], initial=0.0)), float(np.max([s for _, s in found], initial=0.0)))


def _collect(job: Job, x: npt.NDArray[np.float64], num) -> FrameSolution:
    """The forces of a frame from its solution ``x`` (unknown, case)."""
    return _collect_blocks(job, lambda c0, c1: x[:, c0:c1], num)


def _collect_blocks(job: Job, x_of, num) -> FrameSolution:
    """The forces of a frame, with ``x_of(c0, c1)`` giving the solution (unknown, case) of cases c0 to c1 - 1.

    Each block of cases is solved, laid into the results and checked for equilibrium on its own.
    """
    cases, members, L = num["cases"], num["members"], num["L"]
    n_case = len(cases)
    pin_ix = num["index"][2]
    link_list = list(job.links.values())
    T_all = np.zeros((len(link_list), n_case))  # link tensions, in the order of job.links
    t_col = np.array([num["link_col"][lk.name] for lk in link_list], dtype=np.intp)
    R_all = np.zeros((len(job.supports), n_case, 3))  # reactions, in the order of job.supports

    # every member slot of every pin, one after another: G[case, slot] = (Fx, Fy) the member receives;
    # each pin's forces are a view of its slots. A block of cases is taken at once from the block's
    # solution and the values of the members that are not bodies (then x's columns and the extra ones)
    sl: _Slots = num["slots"]
    start = sl.start
    n_slot, n_unk = int(start[-1]), num["unk"].n
    G = np.zeros((n_case, n_slot, 2))
    cb = np.column_stack([num["pb_col"], num["pb_col"] + 1]).astype(np.intp) if sl.pb_slot.size else None
    others = np.array(list(sl.s_link) + list(sl.s_gnd) + list(sl.s_load), dtype=np.intp)
    source = np.full((n_slot, 2), n_unk + 2 * len(others), dtype=np.intp)  # (a slot of no kind: zero)
    if cb is not None:
        source[sl.pb_slot] = cb
    source[others] = n_unk + np.arange(2 * len(others)).reshape(-1, 2)
    source = source.ravel()
    if sl.s_link:
        u = _unit(_xy(lk.ends[0] for lk in link_list), _xy(lk.ends[1] for lk in link_list))
        su = np.array(sl.sign)[:, None] * u[sl.l_link]  # (slot, 2)
        sl_col = t_col[sl.l_link]
    h_pin, h_case, h_f = num["hung"]  # the loads hung on pins
    at_pin = {p: tuple(m) for p, m in members.items()}
    balance = _Balance(job, list(at_pin.items()),
                       (sl.pb_slot, sl.pb_body, num["pin_xy"][sl.pb_pin], sl.pb_pin), num["places"], cases,
                       num["index"])
    n_sup = len(job.supports)

    def block(c0: int, c1: int) -> tuple[float, float]:
        # solve cases c0 .. c1 - 1, lay their forces into the results, check their equilibrium
        x = x_of(c0, c1)
        k = c1 - c0
        T = x[t_col]
        R = np.zeros((n_sup, k, 3))
        for i, (sname, s) in enumerate(job.supports.items()):
            c = num["sup_col"][sname]
            if s.kind == "roller":
                R[i, :, 0] = x[c] * s.normal[0]
                R[i, :, 1] = x[c] * s.normal[1]
            else:
                R[i, :, 0], R[i, :, 1] = x[c], x[c + 1]
                if s.kind == "fixed":
                    R[i, :, 2] = x[c + 2] * L
        T_all[:, c0:c1], R_all[:, c0:c1] = T, R
        extra = [np.zeros((0, 2, k))]  # (slot, 2, case) of the members that are not bodies, as `others`
        if sl.s_link:
            # the pin receives T*u*s from the link, so the link receives the opposite
            extra.append(-(su[:, :, None] * x[sl_col][:, None, :]))
        if sl.s_gnd:
            extra.append(-R[sl.g_sup][:, :, :2].transpose(0, 2, 1))
        if sl.s_load:
            pin_load = np.zeros((len(pin_ix), 2, k))
            here = (h_case >= c0) & (h_case < c1)
            np.add.at(pin_load, (h_pin[here], slice(None), h_case[here] - c0), h_f[here])
            extra.append(-pin_load[sl.p_load])
        ext = np.concatenate([x.T, np.concatenate(extra).transpose(2, 0, 1).reshape(k, -1), np.zeros((k, 1))],
                             axis=1)
        Gb = G[c0:c1]
        np.take(ext, source, axis=1, out=Gb.reshape(k, -1), mode="clip")  # (clip: unbuffered; all are in range)
        on_body = x[cb] if cb is not None else np.zeros((0, 2, k))  # (pin-body pair, 2, case), as Gb's
        return balance.block(on_body, Gb[:, balance.rest].transpose(1, 2, 0), T, R, c0, c1)

    worst, scale = _in_blocks(block, n_case, G.size)
    pins = {pname: PinForces(pname, at_pin[pname], G[:, start[k]:start[k + 1]]) for k, pname in enumerate(job.pins)}
    links = {lk.name: T_all[i] for i, lk in enumerate(link_list)}
    supports = {sname: R_all[i] for i, sname in enumerate(job.supports)}
    residual = float(worst / scale) if n_case else 0.0
    if not residual <= RESIDUAL_TOL:
        raise StructureError(Problem(job.path, "", "", (
            f"the solution does not satisfy equilibrium (relative residual {residual:.2e} > "
            f"{RESIDUAL_TOL:.0e}); the equations are ill-conditioned: check for nearly parallel links or "
            f"nearly coincident points")))
    found = compressed_cable(job, links)
    if found is not None:
        lname, j, tj = found
        raise StructureError(Problem(job.path, f"link.{lname}", "kind", (
            f"cable {lname} would be in compression ({tj / 1e3:.6g} kN) in load case "
            f"'{cases[j]}': a cable carries tension only; make it a link (kind = \"link\") "
            f"or change the structure")))
    return FrameSolution(cases, pins, links, supports, residual)


def compressed_cable(job: Job, links: dict[str, npt.NDArray[np.float64]]) -> tuple[str, int, float] | None:
    """The first cable in compression, as (cable, case index, tension [N]), or None.

    A tension below -1e-9 of the cable's largest (at least 1 N) counts: round-off on a slack cable is not
    compression.
    """
    for lname, link in job.links.items():
        if link.kind != "cable":
            continue
        t = links[lname]
        scale = max(np.abs(t).max(), 1.0)
        slack = np.flatnonzero(t < -1e-9 * scale)
        if slack.size:
            j = int(slack[0])
            return lname, j, float(t[j])
    return None


def equilibrium_residual(job: Job, sol: FrameSolution) -> float:
    """Largest out-of-balance force or moment of any body or pin, relative to the largest force.

    Worked from the solved forces themselves, not from the matrix that produced them, so an assembly
    mistake cannot hide: every body sums what its pins, links, supports and loads put on it, every pin
    what its bodies, links, support and hung load put on it (from the link tensions and reactions
    reported, each of which must also be the opposite of the force the pin reports for that member).
    """
    n_case = len(sol.cases)
    forces = [pf.force for pf in sol.pins.values()]
    G = np.concatenate(forces, axis=1) if forces else np.zeros((n_case, 0, 2))
    T = np.array([sol.links[n] for n in job.links], dtype=float).reshape(len(job.links), n_case)
    R = np.array([sol.supports[n] for n in job.supports], dtype=float).reshape(len(job.supports), n_case, 3)
    body_ix = {b: i for i, b in enumerate(job.bodies)}
    on_body = [(i, body_ix[m], job.pins[pf.pin].xy, k)
               for i, (k, pf, m) in enumerate((k, pf, m) for k, pf in enumerate(sol.pins.values())
                                              for m in pf.members) if m in body_ix]
    slot = np.array([i for i, _, _, _ in on_body], dtype=np.intp)
    body = np.array([bi for _, bi, _, _ in on_body], dtype=np.intp)
    xy = np.array([xy for _, _, xy, _ in on_body], dtype=float).reshape(-1, 2)
    pin = np.array([k for _, _, _, k in on_body], dtype=np.intp)
    balance = _Balance(job, [(pf.pin, pf.members) for pf in sol.pins.values()], (slot, body, xy, pin),
                       np.array(_places(job), dtype=float).reshape(-1, 2), sol.cases)

    def block(c0: int, c1: int) -> tuple[float, float]:
        Gb = G[c0:c1]
        return balance.block(Gb[:, slot].transpose(1, 2, 0), Gb[:, balance.rest].transpose(1, 2, 0),
                             T[:, c0:c1], R[:, c0:c1], c0, c1)

    worst, scale = _in_blocks(block, n_case, G.size)
    return float(worst / scale) if n_case else 0.0


def _absmax(a: npt.NDArray[np.float64]) -> float:
    """Largest magnitude in ``a`` (0 if empty, NaN if any is NaN), without a temporary array."""
    return float(np.maximum(a.max(initial=0.0), -a.min(initial=0.0))) + 0.0  # + 0.0: never -0.0


class _Balance:
    """equilibrium_residual prepared once for a frame, then worked one block of load cases at a time.

    ``pins`` = (pin, its members) in the order of the slots, ``on_body`` = (slot, body index, pin x y,
    pin index) of every slot whose member is a body, ``places`` every point of the frame. Every sum adds
    its terms in the order a loop over the job would, whatever the blocks.
    """

    def __init__(self, job: Job, pins: list[tuple[str, tuple[str, ...]]], on_body, places, cases,
                 index=None) -> None:
        # ``index``: the (case, body, pin) numbering dicts when the caller has them (pins in job order)
        case_ix, body_ix, pin_ix = index or ({c: j for j, c in enumerate(cases)},
                                             {b: i for i, b in enumerate(job.bodies)},
                                             {p: k for k, (p, _) in enumerate(pins)})
        self.n_body, self.n_pin = n_body, n_pin = len(body_ix), len(pins)
        slot, body, xy, slot_pin = on_body
        self.x, self.y = np.asarray(xy[:, 0:1]), np.asarray(xy[:, 1:2])
        self._rows: dict[int, tuple] = {}
        # what each pin gives its bodies and what each body receives from its pins, in one product
        n_on = len(body)
        self.sum_both = _GroupSum(np.concatenate([slot_pin, n_pin + np.asarray(body, dtype=np.intp)]),
                                  n_pin + n_body, rows=np.tile(np.arange(n_on), 2))
        self.sum_body = _GroupSum(body, n_body)  # the moments about the origin of what each body receives
        link_list = list(job.links.values())

        # link ends on pins: each adds to its pin, and per (pin, link) to compare with the pin's entry
        on_pin_key: dict[tuple[str, str], int] = {}
        ends = [(end.pin, lname, s, li) for li, (lname, link) in enumerate(job.links.items())
                for end, s in zip(link.ends, (1.0, -1.0), strict=True) if end.pin is not None and end.pin in pin_ix]
        self.end_link = np.array([e[3] for e in ends], dtype=np.intp)
        if ends:
            u = _unit(_xy(lk.ends[0] for lk in link_list), _xy(lk.ends[1] for lk in link_list))
            self.end_su = np.array([e[2] for e in ends])[:, None] * u[self.end_link]
            self.end_pin = np.array([pin_ix[e[0]] for e in ends], dtype=np.intp)
            self.end_key = np.array([on_pin_key.setdefault((e[0], e[1]), len(on_pin_key)) for e in ends],
                                    dtype=np.intp)
        self.n_key = n_key = len(on_pin_key)
        # supports and hung loads at pins: each adds to its pin, and per pin (only pins that have one)
        sups = [(pin_ix[s.at.pin], i) for i, s in enumerate(job.supports.values())
                if s.at.pin is not None and s.at.pin in pin_ix]
        self.sup_pin = np.array([k for k, _ in sups], dtype=np.intp)
        self.sup_ix = np.array([i for _, i in sups], dtype=np.intp)
        g_pins, self.sup_row = np.unique(self.sup_pin, return_inverse=True)
        loads_p = [ld for ld in job.loads if ld.at.pin is not None and ld.body is None and ld.at.pin in pin_ix]
        self.lp_pin = np.array([pin_ix[ld.at.pin] for ld in loads_p], dtype=np.intp)
        self.lp_case = np.array([case_ix[ld.case] for ld in loads_p], dtype=np.intp)
        self.lp_f = np.array([ld.force for ld in loads_p], dtype=float).reshape(-1, 2)
        h_pins, self.lp_row = np.unique(self.lp_pin, return_inverse=True)
        self.n_g, self.n_h = len(g_pins), len(h_pins)
        g_row = {int(k): r for r, k in enumerate(g_pins)}
        h_row = {int(k): r for r, k in enumerate(h_pins)}

        # each member that is not a body: where to find what it puts on the pin, in the rows of
        # [link ends per (pin, link); supports per pin; hung loads per pin; zero]
        lens = np.fromiter((len(m) for _, m in pins), np.intp, n_pin)
        start = np.concatenate([[0], np.cumsum(lens)]).astype(np.intp)
        is_body = np.zeros(int(start[-1]), dtype=bool)
        is_body[slot] = True
        rest = np.flatnonzero(~is_body)
        k_rest = np.searchsorted(start, rest, side="right") - 1
        zero = n_key + self.n_g + self.n_h
        src = []
        for i, k in zip(rest.tolist(), k_rest.tolist(), strict=True):
            p, m = pins[k][0], pins[k][1][i - int(start[k])]
            src.append(on_pin_key[(p, m)] if (p, m) in on_pin_key else
                       n_key + g_row.get(k, zero - n_key) if m == GROUND else
                       n_key + self.n_g + h_row.get(k, zero - n_key - self.n_g) if m == PIN_LOAD else zero)
        self.rest, self.rest_src = rest, np.array(src, dtype=np.intp)

        # forces on bodies that do not come through pins: link ends and supports at body points, in
        # the order a loop over the links and then the supports meets them
        self.items: list[tuple] = []
        for li, link in enumerate(link_list):
            a, b = link.ends
            d = np.subtract(b.xy, a.xy)
            u1 = d / np.hypot(*d)
            for end, s in ((a, 1.0), (b, -1.0)):
                if end.pin is None:
                    self.items.append(("link", li, s * u1, end.xy, body_ix[end.body]))
        for i, s in enumerate(job.supports.values()):
            if s.at.pin is None:
                self.items.append(("support", i, None, s.at.xy, body_ix[s.at.body]))
        # loads on bodies, each in its own case (a pin's own load is one of its members)
        loads = [ld for ld in job.loads if not (ld.at.pin is not None and ld.body is None)]
        self.lb_body = np.array([body_ix[ld.body or ld.at.body] for ld in loads], dtype=np.intp)
        self.lb_case = np.array([case_ix[ld.case] for ld in loads], dtype=np.intp)
        f = np.array([ld.force for ld in loads], dtype=float).reshape(-1, 2)
        X, Y = _xy(ld.at for ld in loads).reshape(-1, 2).T
        m = np.array([ld.moment for ld in loads], dtype=float)
        self.lb_f = np.column_stack([f[:, 0], f[:, 1], X * f[:, 1] - Y * f[:, 0] + m])

        self.L = L = max(float(np.abs(places).max(initial=0.0)), 1e-9)
        ld_f = np.array([ld.force for ld in job.loads], dtype=float).reshape(-1, 2)
        ld_m = np.array([ld.moment for ld in job.loads], dtype=float)
        self.load_scale = max(np.hypot(ld_f[:, 0], ld_f[:, 1]).max(initial=0.0), np.abs(ld_m).max(initial=0.0) / L,
                              1e-300)

    def _xy_rows(self, k: int) -> tuple[npt.NDArray[np.float64], npt.NDArray[np.float64]]:
        """The pins' x and y of the on-body slots, repeated for ``k`` cases (kept per k)."""
        if k not in self._rows:
            self._rows[k] = (np.repeat(self.x, k, axis=1), np.repeat(self.y, k, axis=1))
        return self._rows[k]

    def block(self, B, rest, T, R, c0: int, c1: int) -> tuple[float, float]:
        """(largest out-of-balance, largest force) of load cases c0 .. c1 - 1, from the forces ``B``
        (on-body slot, 2, case) the bodies receive, ``rest`` (slot, 2, case) those of the slots
        ``self.rest`` (the members that are not bodies), link tensions ``T`` (link, case) and reactions
        ``R`` (support, case, 3)."""
        k = c1 - c0
        # each pin: the opposite of what it gives its bodies, then what its links, support and hung
        # load put on it (each also kept per member, to compare with the pin's entry for it)
        PF = self.sum_both(B)
        P, F = PF[:self.n_pin], PF[self.n_pin:]  # (pin, 2, case), (body, 2, case)
        np.negative(P, out=P)
        on_link = np.zeros((self.n_key, 2, k))
        if self.n_key:
            f_end = self.end_su[:, :, None] * T[self.end_link][:, None, :]  # as np.outer(s * u, T)
            np.add.at(P, self.end_pin, f_end)
            np.add.at(on_link, self.end_key, f_end)
        ground = np.zeros((self.n_g, 2, k))
        if self.sup_pin.size:
            Rp = R[self.sup_ix][:, :, :2].transpose(0, 2, 1)
            np.add.at(P, self.sup_pin, Rp)
            np.add.at(ground, self.sup_row, Rp)
        hung = np.zeros((self.n_h, 2, k))
        here = (self.lp_case >= c0) & (self.lp_case < c1)
        if here.any():
            j = self.lp_case[here] - c0
            np.add.at(P, (self.lp_pin[here], slice(None), j), self.lp_f[here])
            np.add.at(hung, (self.lp_row[here], slice(None), j), self.lp_f[here])
        # each member that is not a body: the pin's entry for it and what it puts on the pin cancel
        given = np.concatenate([on_link, ground, hung, np.zeros((1, 2, k))])[self.rest_src]
        mismatch = _absmax(rest + given)

        # each body: Fx, Fy and Mz about the origin of every force on it: what its pins give it, then
        # its links and supports item by item, then its loads
        xr, yr = self._xy_rows(k)
        Bc = np.array(B.transpose(1, 0, 2), order="C")  # (2, slot, case) of our own: long inner loops
        mz = np.multiply(Bc[1], xr, out=Bc[1])
        mz -= np.multiply(Bc[0], yr, out=Bc[0])
        M = self.sum_body(mz)  # (body, case)
        for kind, i, su, (x, y), bi in self.items:
            if kind == "link":
                f = np.outer(T[i], su)
                F[bi] += f.T
                M[bi] += x * f[:, 1] - y * f[:, 0] + 0.0
            else:
                r = R[i]
                F[bi] += r[:, :2].T
                M[bi] += x * r[:, 1] - y * r[:, 0] + r[:, 2]
        here = (self.lb_case >= c0) & (self.lb_case < c1)
        if here.any():
            bi, j = self.lb_body[here], self.lb_case[here] - c0
            np.add.at(F, (bi, 0, j), self.lb_f[here, 0])
            np.add.at(F, (bi, 1, j), self.lb_f[here, 1])
            np.add.at(M, (bi, j), self.lb_f[here, 2])

        worst = np.max([_absmax(F), _absmax(M) / self.L, _absmax(P), mismatch])
        scale = np.max([_absmax(B), _absmax(rest), _absmax(T), _absmax(R[:, :, :2]), self.load_scale])
        return float(worst), float(scale)
