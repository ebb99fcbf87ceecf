"""Rigid-body statics of a pinned frame: take it apart at its connections and solve every body.

Every body gives three equilibrium equations in the plane (two forces and a moment), every pin two (the
pin is a small free body of its own, so a load can hang on the pin itself). Unknowns: the two force
components each body receives from each pin it sits on, one tension per link or cable, and the reactions
of the supports (pinned 2, roller 1, fixed 3). The rank of the equations tells a determinate structure
from a mechanism or an indeterminate one; only a determinate one is solved. One sparse factorization
serves every load case, solved at once as a matrix of right-hand sides.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import numpy.typing as npt
import scipy.sparse as sp
import scipy.sparse.linalg as spla

from .errors import Problem, StructureError
from .model import GROUND, PIN_LOAD, Job

#: Above this many unknowns the rank is not found by a dense SVD; the sparse factorization decides.
DENSE_RANK_LIMIT = 2000
#: Equilibrium residual allowed, relative to the largest force in the solution.
RESIDUAL_TOL = 1e-9


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
    """Numbering of unknowns and equations, with what each one belongs to (for diagnostics)."""

    def __init__(self) -> None:
        self.n = 0
        self.owner: list[str] = []

    def take(self, k: int, owner: str) -> int:
        start = self.n
        self.n += k
        self.owner += [owner] * k
        return start


def _members(job: Job) -> dict[str, list[str]]:
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


def assemble(job: Job):
    """Equilibrium equations ``A x = b`` of the job, with the numbering used."""
    cases = tuple(job.cases)
    case_ix = {c: i for i, c in enumerate(cases)}
    members = _members(job)
    xs = _places(job)
    span = float(np.ptp(np.asarray(xs), axis=0).max()) if len(xs) > 1 else 1.0
    L = span if span > 0 else 1.0  # moment rows are divided by L so every entry is of order one

    eqs, unk = _Index(), _Index()
    body_eq = {name: eqs.take(3, f"body {name}") for name in job.bodies}
    pin_eq = {name: eqs.take(2, f"pin {name}") for name in job.pins}
    ref = {name: np.mean(np.asarray(list(b.points.values())), axis=0) for name, b in job.bodies.items()}

    rows: list[int] = []
    cols: list[int] = []
    vals: list[float] = []

    def add(r: int, c: int, v: float) -> None:
        if v != 0.0:
            rows.append(r)
            cols.append(c)
            vals.append(v)

    def force_on_body(body: str, xy, col_fx: int | None, col_fy: int | None, dx: float, dy: float) -> None:
        """Add unknown force columns acting on ``body`` at ``xy`` (unit vector components dx, dy when a
        single column carries a force along a line)."""
        r = body_eq[body]
        rx, ry = np.asarray(xy) - ref[body]
        if col_fy is None:  # one unknown along (dx, dy)
            add(r, col_fx, dx)
            add(r + 1, col_fx, dy)
            add(r + 2, col_fx, (rx * dy - ry * dx) / L)
        else:
            add(r, col_fx, 1.0)
            add(r + 1, col_fy, 1.0)
            add(r + 2, col_fx, -ry / L)
            add(r + 2, col_fy, rx / L)

    # pin-to-body forces: unknown (Fx, Fy) the body receives; the pin receives the opposite
    pin_body_col: dict[tuple[str, str], int] = {}
    for pname, pin in job.pins.items():
        for body in pin.bodies:
            c = unk.take(2, f"pin {pname} at body {body}")
            pin_body_col[(pname, body)] = c
            force_on_body(body, pin.xy, c, c + 1, 0, 0)
            add(pin_eq[pname], c, -1.0)
            add(pin_eq[pname] + 1, c + 1, -1.0)

    # links and cables: one tension each, pulling each end toward the other
    link_col: dict[str, int] = {}
    for lname, link in job.links.items():
        c = unk.take(1, f"{link.kind} {lname}")
        link_col[lname] = c
        a, b = link.ends
        d = np.subtract(b.xy, a.xy)
        u = d / np.hypot(*d)
        for end, s in ((a, 1.0), (b, -1.0)):
            ux, uy = s * u
            if end.pin is not None:
                add(pin_eq[end.pin], c, ux)
                add(pin_eq[end.pin] + 1, c, uy)
            else:
                force_on_body(end.body, end.xy, c, None, ux, uy)

    # supports
    sup_col: dict[str, int] = {}
    for sname, s in job.supports.items():
        k = {"pinned": 2, "roller": 1, "fixed": 3}[s.kind]
        c = unk.take(k, f"support {sname}")
        sup_col[sname] = c
        if s.at.pin is not None:
            r = pin_eq[s.at.pin]
            if s.kind == "roller":
                add(r, c, s.normal[0])
                add(r + 1, c, s.normal[1])
            else:
                add(r, c, 1.0)
                add(r + 1, c + 1, 1.0)
        else:
            if s.kind == "roller":
                force_on_body(s.at.body, s.at.xy, c, None, *s.normal)
            else:
                force_on_body(s.at.body, s.at.xy, c, c + 1, 0, 0)
                if s.kind == "fixed":
                    add(body_eq[s.at.body] + 2, c + 2, 1.0)  # reaction moment, unknown M / L

    # loads: the right-hand side, one column per case
    b = np.zeros((eqs.n, len(cases)))
    for load in job.loads:
        j = case_ix[load.case]
        fx, fy = load.force
        if load.at.pin is not None and load.body is None:
            r = pin_eq[load.at.pin]
            b[r, j] -= fx
            b[r + 1, j] -= fy
        else:
            body = load.body if load.body is not None else load.at.body
            r = body_eq[body]
            rx, ry = np.asarray(load.at.xy) - ref[body]
            b[r, j] -= fx
            b[r + 1, j] -= fy
            b[r + 2, j] -= (rx * fy - ry * fx + load.moment) / L

    A = sp.csc_matrix((vals, (rows, cols)), shape=(eqs.n, unk.n))
    numbering = dict(
        cases=cases, members=members, L=L, eqs=eqs, unk=unk, pin_body_col=pin_body_col,
        link_col=link_col, sup_col=sup_col,
    )
    return A, b, numbering


def _involved(owners: list[str], weights: npt.NDArray[np.float64]) -> str:
    w = np.abs(weights)
    keep = w > 1e-6 * max(w.max(), 1e-300)
    seen: list[str] = []
    for own, k in zip(owners, keep):
        if k and own not in seen:
            seen.append(own)
    return ", ".join(seen[:12]) + (" ..." if len(seen) > 12 else "")


def _diagnose(job: Job, A: sp.csc_matrix, num) -> None:
    """Raise a StructureError for a mechanism or an indeterminate structure; return if determinate."""
    n_eq, n_unk = A.shape
    eqs, unk = num["eqs"], num["unk"]
    problems: list[Problem] = []
    if max(n_eq, n_unk) <= DENSE_RANK_LIMIT:
        U, s, Vt = np.linalg.svd(A.toarray())
        tol = max(A.shape) * np.finfo(float).eps * (s[0] if s.size else 1.0) * 1e3
        rank = int((s > tol).sum())
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


def solve(job: Job) -> FrameSolution:
    """Solve the frame of ``job`` for every load case.

    Raises:
        StructureError: a mechanism, an indeterminate structure, or a cable in compression.
    """
    A, b, num = assemble(job)
    _diagnose(job, A, num)
    try:
        lu = spla.splu(A.tocsc())
    except RuntimeError:
        raise StructureError(Problem(job.path, "", "", (
            "the equilibrium equations are singular: the structure is a mechanism or indeterminate "
            "(too large to locate where)"))) from None
    x = lu.solve(b)
    return _collect(job, x, num)


def _collect(job: Job, x: npt.NDArray[np.float64], num) -> FrameSolution:
    cases, members, L = num["cases"], num["members"], num["L"]
    n_case = len(cases)
    links = {n: x[c].copy() for n, c in num["link_col"].items()}

    supports: dict[str, npt.NDArray[np.float64]] = {}
    for sname, s in job.supports.items():
        c = num["sup_col"][sname]
        r = np.zeros((n_case, 3))
        if s.kind == "roller":
            r[:, 0] = x[c] * s.normal[0]
            r[:, 1] = x[c] * s.normal[1]
        else:
            r[:, 0], r[:, 1] = x[c], x[c + 1]
            if s.kind == "fixed":
                r[:, 2] = x[c + 2] * L
        supports[sname] = r

    pin_load = {p: np.zeros((n_case, 2)) for p in job.pins}
    for load in job.loads:
        if load.at.pin is not None and load.body is None:
            pin_load[load.at.pin][cases.index(load.case)] += load.force

    pins: dict[str, PinForces] = {}
    for pname, pin in job.pins.items():
        mem = members[pname]
        f = np.zeros((n_case, len(mem), 2))
        for k, m in enumerate(mem):
            if m in pin.bodies:
                c = num["pin_body_col"][(pname, m)]
                f[:, k, 0], f[:, k, 1] = x[c], x[c + 1]
            elif m in job.links:
                link = job.links[m]
                a, bb = link.ends
                d = np.subtract(bb.xy, a.xy)
                u = d / np.hypot(*d)
                s = 1.0 if a.pin == pname else -1.0
                # the pin receives T*u*s from the link, so the link receives the opposite
                f[:, k, :] = -np.outer(links[m], s * u)
            elif m == GROUND:
                sname = next(n for n, s in job.supports.items() if s.at.pin == pname)
                f[:, k, :] = -supports[sname][:, :2]
            elif m == PIN_LOAD:
                f[:, k, :] = -pin_load[pname]
        pins[pname] = PinForces(pname, tuple(mem), f)

    sol = FrameSolution(cases, pins, links, supports, residual=0.0)
    residual = equilibrium_residual(job, sol)
    if not residual <= RESIDUAL_TOL:
        raise StructureError(Problem(job.path, "", "", (
            f"the solution does not satisfy equilibrium (relative residual {residual:.2e} > "
            f"{RESIDUAL_TOL:.0e}); the equations are ill-conditioned: check for nearly parallel links or "
            f"nearly coincident points")))
    for lname, link in job.links.items():
        if link.kind != "cable":
            continue
        scale = max(np.abs(links[lname]).max(), 1.0)
        for j, t in enumerate(links[lname]):
            if t < -1e-9 * scale:
                raise StructureError(Problem(job.path, f"link.{lname}", "kind", (
                    f"cable {lname} would be in compression ({t / 1e3:.6g} kN) in load case "
                    f"'{cases[j]}': a cable carries tension only; make it a link (kind = \"link\") "
                    f"or change the structure")))
    return FrameSolution(cases, pins, links, supports, residual)


def equilibrium_residual(job: Job, sol: FrameSolution) -> float:
    """Largest out-of-balance force or moment of any body or pin, relative to the largest force.

    Worked from the solved forces themselves, not from the matrix that produced them, so an assembly
    mistake cannot hide: every body sums what its pins, links, supports and loads put on it, every pin
    what its bodies, links, support and hung load put on it (from the link tensions and reactions
    reported, each of which must also be the opposite of the force the pin reports for that member).
    """
    n_case = len(sol.cases)
    F = {b: np.zeros((n_case, 3)) for b in job.bodies}  # Fx, Fy, Mz about the origin
    P = {p: np.zeros((n_case, 2)) for p in job.pins}

    def put(body: str, xy, f, m=0.0) -> None:
        F[body][:, 0] += f[:, 0]
        F[body][:, 1] += f[:, 1]
        F[body][:, 2] += xy[0] * f[:, 1] - xy[1] * f[:, 0] + m

    # what a link, support or hung load puts on a pin, summed from those members' own results and
    # compared with the entry the pin reports for that member (it must be the opposite)
    on_pin: dict[tuple[str, str], npt.NDArray[np.float64]] = {}

    def put_pin(pname: str, member: str, f) -> None:
        P[pname] += f
        on_pin[(pname, member)] = on_pin.get((pname, member), 0.0) + f

    for pname, pf in sol.pins.items():
        xy = job.pins[pname].xy
        for k, m in enumerate(pf.members):
            if m in job.bodies:
                P[pname] -= pf.force[:, k, :]
                put(m, xy, pf.force[:, k, :])
    for lname, link in job.links.items():
        a, b = link.ends
        d = np.subtract(b.xy, a.xy)
        u = d / np.hypot(*d)
        for end, s in ((a, 1.0), (b, -1.0)):
            f = np.outer(sol.links[lname], s * u)
            if end.pin is None:
                put(end.body, end.xy, f)
            else:
                put_pin(end.pin, lname, f)
    for sname, s in job.supports.items():
        if s.at.pin is None:
            put(s.at.body, s.at.xy, sol.supports[sname][:, :2], sol.supports[sname][:, 2])
        else:
            put_pin(s.at.pin, GROUND, sol.supports[sname][:, :2])
    for load in job.loads:
        j = sol.cases.index(load.case)
        f = np.zeros((n_case, 2))
        f[j] = load.force
        mz = np.zeros(n_case)
        mz[j] = load.moment
        if load.at.pin is not None and load.body is None:
            put_pin(load.at.pin, PIN_LOAD, f)
        else:
            put(load.body or load.at.body, load.at.xy, f, mz)
    mismatch = [np.zeros((n_case, 2))]
    for pname, pf in sol.pins.items():
        for k, m in enumerate(pf.members):
            if m not in job.bodies:
                mismatch.append(pf.force[:, k, :] + on_pin.get((pname, m), 0.0))

    xs = np.asarray(_places(job))
    L = max(float(np.abs(xs).max()), 1e-9)
    scale = max(
        [np.abs(pf.force).max(initial=0.0) for pf in sol.pins.values()]
        + [np.abs(t).max(initial=0.0) for t in sol.links.values()]
        + [np.abs(r[:, :2]).max(initial=0.0) for r in sol.supports.values()]
        + [float(np.hypot(*ld.force)) for ld in job.loads]
        + [abs(ld.moment) / L for ld in job.loads]
        + [1e-300]
    )
    worst = 0.0
    for f in F.values():
        worst = max(worst, np.abs(f[:, :2]).max(initial=0.0), np.abs(f[:, 2]).max(initial=0.0) / L)
    for p in [*P.values(), *mismatch]:
        worst = max(worst, np.abs(p).max(initial=0.0))
    return worst / scale
