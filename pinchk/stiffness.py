"""Linear-elastic 2D direct-stiffness solve of a pinned frame, for structures statics alone cannot share.

The model (small displacements, first order, Euler-Bernoulli beams without shear deformation):

- Every body with a section becomes beam elements between its points: the pairs listed in the body's
  ``members``, or by default a chain in point order (A-B, B-C, ...). Where two members of one body meet,
  the joint is rigid (the body is one piece). Every point of a body carries its own rotation.
- A pin is a release: the bodies it joins share its translation (one node, two displacements), and each
  keeps its own rotation, so no moment passes through a pin.
- A link or cable is an axial bar between its two places: with its ``EA`` it is elastic (stiffness EA/L);
  without one it is axially rigid, written exactly as a constraint (its length does not change) whose
  Lagrange multiplier is the tension. No large penalty number is used anywhere.
- A support is a constraint: pinned fixes both translations, a roller the translation along its normal,
  fixed also the body's rotation at that point. Its multiplier is the reaction.
- A cable carries tension only. Each load case is iterated on its own: solve with every cable taut, drop
  the cables that come out in compression, take back any slack cable whose ends would move apart, and
  repeat until no cable changes (at most ``MAX_CABLE_ROUNDS`` rounds; otherwise a StructureError names
  the cables that keep changing).

The equations are the saddle-point system [[K, Cᵀ], [C, 0]] [u; λ] = [f; 0], scaled symmetrically so
every diagonal entry of K and every constraint row is of order one. A singular system is a mechanism
(the structure moves without straining any member) or a set of rigid constraints that fight each other
(rigid links or supports that only an EA could share); the message says which, and where.

Results are the same FrameSolution and PinForces as the rigid-body solve (force each member receives at
each pin), so every check downstream is unchanged, and the equilibrium of every body and pin is checked
again from those forces (pinchk.frame.equilibrium_residual).

References:
    W. McGuire, R. H. Gallagher, R. D. Ziemian, Matrix Structural Analysis, 2nd ed., Wiley 2000:
    ch. 4-5 (the plane frame element stiffness and its transformation, eq. 4.34 and 5.6, from memory).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
import numpy.typing as npt
import scipy.sparse as sp
import scipy.sparse.linalg as spla

from .errors import Problem, StructureError
from .frame import FrameSolution, PinForces, equilibrium_residual, members_at_pins
from .model import GROUND, PIN_LOAD, Body, Job, Place

SOLVER = "direct stiffness (2D linear-elastic frame, pinned releases)"
#: A scaled system whose 1-norm condition number exceeds this is taken as singular (about 1e-3 / eps:
#: fewer than about three significant digits would survive in the forces).
COND_LIMIT = 1e-3 / np.finfo(float).eps
#: A singular system up to this many equations is decomposed by a dense SVD to say where it is singular.
DENSE_LIMIT = 1500
#: Equilibrium residual allowed, relative to the largest force. Looser than statics' 1e-9 because the
#: forces come from displacements: where a member is much shorter than its neighbours, its stiffness
#: (~ 1/L³) swamps theirs at the shared node and about (L_long / L_short)³ · eps of the force is lost
#: (a 10 mm member beside a 4 m one: ~1e-8). 1e-6 still leaves six significant digits.
RESIDUAL_TOL = 1e-6
#: Tension-only iteration: the most rounds of dropping and taking back cables in one load case.
MAX_CABLE_ROUNDS = 50


@dataclass(frozen=True)
class StiffnessResult:
    """The stiffness solve of every load case, with what the FrameSolution does not hold.

    ``displacement[(body, point)]`` is (n_case, 3): ux, uy [m], rotation [rad] of that body at that point.
    ``member_forces[(body, a, b)]`` is (n_case, 6): N, V, M at end a then at end b [N, N, N*m], in the
    member's own axes (x from a to b), the forces the member receives from its end nodes.
    ``slack[cable]`` is (n_case,) bool: the cable went slack in that case.
    """

    solution: FrameSolution
    displacement: dict[tuple[str, str], npt.NDArray[np.float64]]
    member_forces: dict[tuple[str, str, str], npt.NDArray[np.float64]]
    slack: dict[str, npt.NDArray[np.bool_]]


def body_members(body: Body) -> tuple[tuple[str, str], ...]:
    """The beam members of a body: its ``members``, or a chain through its points in the order given."""
    if body.members:
        return body.members
    names = list(body.points)
    return tuple(zip(names[:-1], names[1:], strict=True))


def _pin_of_point(job: Job) -> dict[tuple[str, str], str]:
    """(body, point) -> the pin at that point, for every body a pin joins."""
    out: dict[tuple[str, str], str] = {}
    for pname, pin in job.pins.items():
        for b in pin.bodies:
            pts = job.bodies[b].points
            best = min(pts, key=lambda k: math.dist(pts[k], pin.xy))
            out[(b, best)] = pname
    return out


def _check_bodies(job: Job) -> None:
    problems: list[Problem] = []
    for name, body in job.bodies.items():
        if body.section is None:
            problems.append(Problem(job.path, f"body.{name}", "section", (
                f"body {name} has no section: the stiffness solve needs E, A and I of every body; give "
                f"section = \"NAME\" here and define a [section.NAME] table")))
            continue
        if len(body.points) < 2:
            problems.append(Problem(job.path, f"body.{name}", "points", (
                f"body {name} has one point; a member of the stiffness solve needs two")))
            continue
        members = body_members(body)
        for a, b in members:
            if math.dist(body.points[a], body.points[b]) <= 1e-9:
                problems.append(Problem(job.path, f"body.{name}", "members", (
                    f"member {a}-{b} of body {name} has no length: its points are at one place; list "
                    f"members = [[...], ...] that join points apart")))
        # every point on a member, and all members one connected piece
        parent = {p: p for p in body.points}

        def root(p: str, parent: dict[str, str] = parent) -> str:
            while parent[p] != p:
                parent[p] = parent[parent[p]]
                p = parent[p]
            return p

        for a, b in members:
            parent[root(a)] = root(b)
        groups = {root(p) for p in body.points}
        if len(groups) > 1:
            alone = [p for p in body.points if not any(p in m for m in members)]
            what = (f"point(s) {', '.join(alone)} are on no member" if alone
                    else "its members fall into separate pieces")
            problems.append(Problem(job.path, f"body.{name}", "members", (
                f"the members of body {name} do not join all its points ({what}); a body is one piece: "
                f"list members = [[\"A\", \"B\"], ...] that connect every point, or split the body")))
    if problems:
        raise StructureError(problems)


class _Model:
    """Numbering, element stiffnesses, constraints and loads of one job (built once)."""

    def __init__(self, job: Job):
        self.job = job
        self.cases = tuple(job.cases)
        self.pin_of = _pin_of_point(job)
        self.owner: list[str] = []
        self.tdof: dict[str, int] = {}  # translation node -> first of its two dofs
        self.rdof: dict[tuple[str, str], int] = {}  # (body, point) -> its rotation dof
        n = 0
        for bname, body in job.bodies.items():
            for pt in body.points:
                key = self.tnode_of(Place(bname, pt, None, body.points[pt]))
                if key not in self.tdof:
                    self.tdof[key] = n
                    where = f"pin {key}" if key in job.pins else f"point {key}"
                    self.owner += [where, where]
                    n += 2
                self.rdof[(bname, pt)] = n
                self.owner.append(f"body {bname} at {pt}")
                n += 1
        for pname in job.pins:  # a pin at a place of its own, where only links and supports meet
            if pname not in self.tdof:
                self.tdof[pname] = n
                self.owner += [f"pin {pname}", f"pin {pname}"]
                n += 2
        self.n = n
        self.at_pin = {(b, pin): pt for (b, pt), pin in self.pin_of.items()}  # (body, pin) -> point

        # beam elements of the bodies
        self.elements: list[tuple[tuple[str, str, str], npt.NDArray[np.int64], npt.NDArray, npt.NDArray]] = []
        rows: list[npt.NDArray] = []
        cols: list[npt.NDArray] = []
        vals: list[npt.NDArray] = []
        for bname, body in job.bodies.items():
            for a, b in body_members(body):
                sec = body.member_sections.get((a, b), body.section)
                xa, xb = np.asarray(body.points[a]), np.asarray(body.points[b])
                dofs = np.array([*self._t(bname, a), self.rdof[(bname, a)],
                                 *self._t(bname, b), self.rdof[(bname, b)]])
                T, kl = _beam(xa, xb, sec.E, sec.A, sec.I)
                kg = T.T @ kl @ T
                self.elements.append(((bname, a, b), dofs, kg, T))
                rows.append(np.repeat(dofs, 6))
                cols.append(np.tile(dofs, 6))
                vals.append(kg.ravel())
        self.K_bodies = sp.csc_matrix((np.concatenate(vals), (np.concatenate(rows), np.concatenate(cols))),
                                      shape=(n, n))

        # links and cables: unit vector a -> b, dofs of the two translation nodes
        self.link_geom: dict[str, tuple[npt.NDArray, npt.NDArray, float]] = {}
        for lname, link in job.links.items():
            pa, pb = link.ends
            d = np.subtract(pb.xy, pa.xy)
            length = float(np.hypot(*d))
            dofs = np.array([*self.tdof_range(pa), *self.tdof_range(pb)])
            e = d / length
            self.link_geom[lname] = (dofs, np.concatenate([-e, e]), length)

        # support constraints: (owner, dofs, coefficients) rows
        self.sup_rows: dict[str, list[tuple[npt.NDArray, npt.NDArray]]] = {}
        for sname, s in job.supports.items():
            t = self.tdof_range(s.at)
            if s.kind == "roller":
                rws = [(np.array(t), np.asarray(s.normal, dtype=float))]
            else:
                rws = [(np.array([t[0]]), np.ones(1)), (np.array([t[1]]), np.ones(1))]
                if s.kind == "fixed":
                    rws.append((np.array([self.rdof[(s.at.body, s.at.point)]]), np.ones(1)))
            self.sup_rows[sname] = rws

        # loads: one column per case
        self.F = np.zeros((n, len(self.cases)))
        for load in job.loads:
            j = self.cases.index(load.case)
            t = self.tdof_range(load.at)
            self.F[t[0], j] += load.force[0]
            self.F[t[1], j] += load.force[1]
            if load.moment:
                body = load.body if load.body is not None else load.at.body
                self.F[self.rdof[(body, self.point_of(body, load.at))], j] += load.moment

    def tnode_of(self, place: Place) -> str:
        if place.pin is not None:
            return place.pin
        return self.pin_of.get((place.body, place.point), f"{place.body}.{place.point}")

    def tdof_range(self, place: Place) -> tuple[int, int]:
        i = self.tdof[self.tnode_of(place)]
        return (i, i + 1)

    def _t(self, body: str, point: str) -> tuple[int, int]:
        return self.tdof_range(Place(body, point, None, self.job.bodies[body].points[point]))

    def point_of(self, body: str, place: Place) -> str:
        """The point of ``body`` at ``place`` (a point of the body, or the pin that joins it)."""
        if place.pin is None:
            return place.point
        return self.at_pin[(body, place.pin)]


def _beam(xa, xb, E: float, A: float, I: float):
    """Plane frame element a -> b: transformation T (6x6) and local stiffness (6x6).

    Local dofs (u, v, θ) at a then b; stiffness of the Euler-Bernoulli beam-column without shear
    deformation (McGuire, Gallagher & Ziemian, Matrix Structural Analysis, 2nd ed., eq. 4.34, from memory;
    the same matrix is in every text on the stiffness method).
    """
    d = np.subtract(xb, xa)
    L = float(np.hypot(*d))
    c, s = d / L
    R = np.array([[c, s, 0.0], [-s, c, 0.0], [0.0, 0.0, 1.0]])
    T = np.zeros((6, 6))
    T[:3, :3] = R
    T[3:, 3:] = R
    ea, ei = E * A / L, E * I / L
    k = np.array([
        [ea, 0, 0, -ea, 0, 0],
        [0, 12 * ei / L**2, 6 * ei / L, 0, -12 * ei / L**2, 6 * ei / L],
        [0, 6 * ei / L, 4 * ei, 0, -6 * ei / L, 2 * ei],
        [-ea, 0, 0, ea, 0, 0],
        [0, -12 * ei / L**2, -6 * ei / L, 0, 12 * ei / L**2, -6 * ei / L],
        [0, 6 * ei / L, 2 * ei, 0, -6 * ei / L, 4 * ei],
    ], dtype=float)
    return T, k


class _System:
    """The scaled saddle-point system for one set of taut cables, factored once."""

    def __init__(self, m: _Model, taut: frozenset[str]):
        job = m.job
        n = m.n
        self.taut = taut
        rows: list[npt.NDArray] = []
        cols: list[npt.NDArray] = []
        vals: list[npt.NDArray] = []
        con: list[tuple[str, npt.NDArray, npt.NDArray]] = []  # (owner, dofs, coefficients)
        self.link_row: dict[str, int] = {}
        for lname, link in job.links.items():
            if link.kind == "cable" and lname not in taut:
                continue
            dofs, g, length = m.link_geom[lname]
            if link.EA is not None:
                rows.append(np.repeat(dofs, 4))
                cols.append(np.tile(dofs, 4))
                vals.append(((link.EA / length) * np.outer(g, g)).ravel())
            else:
                self.link_row[lname] = len(con)
                con.append((f"{link.kind} {lname}", dofs, g))
        self.sup_row: dict[str, list[int]] = {}
        for sname, rws in m.sup_rows.items():
            self.sup_row[sname] = []
            for dofs, coef in rws:
                self.sup_row[sname].append(len(con))
                con.append((f"support {sname}", dofs, coef))
        nc = len(con)
        K = m.K_bodies
        if vals:
            K = K + sp.csc_matrix((np.concatenate(vals), (np.concatenate(rows), np.concatenate(cols))),
                                  shape=(n, n))
        K = K.tocsr()
        if nc:
            C = sp.csr_matrix((np.concatenate([c[2] for c in con]),
                               (np.concatenate([np.full(len(c[1]), i) for i, c in enumerate(con)]),
                                np.concatenate([c[1] for c in con]))), shape=(nc, n))
        else:
            C = sp.csr_matrix((0, n))
        diag = np.abs(K.diagonal())
        ds = np.where(diag > 0, 1.0 / np.sqrt(np.where(diag > 0, diag, 1.0)), 1.0)
        cn = np.sqrt(np.asarray(C.multiply(C).multiply(ds[None, :] ** 2).sum(axis=1)).ravel()) if nc else np.zeros(0)
        cs = np.where(cn > 0, 1.0 / np.where(cn > 0, cn, 1.0), 1.0)
        self.D = np.concatenate([ds, cs])
        Dm = sp.diags(self.D)
        M = sp.bmat([[K, C.T], [C, None]], format="csc") if nc else K.tocsc()
        self.M = (Dm @ M @ Dm).tocsc()
        self.n, self.nc = n, nc
        self.owner = m.owner + [c[0] for c in con]
        self.singular: str | None = None
        size = n + nc
        try:
            self._lu = spla.splu(self.M)
            cond = self._condition()
        except RuntimeError:  # SuperLU: the factor is exactly singular
            cond = math.inf
        if not cond <= COND_LIMIT:
            if size <= DENSE_LIMIT:
                _, sv, Vt = np.linalg.svd(self.M.toarray())
                k = int((sv <= size * np.finfo(float).eps * 10 * (sv[0] if sv.size else 1.0)).sum())
                if k:
                    self.singular = self._explain(Vt[size - k:], k)
                else:
                    self.singular = (
                        f"the stiffness equations are ill-conditioned (condition number about {cond:.0e}): "
                        f"stiffnesses differ by too many orders, e.g. a near-rigid section beside soft links "
                        f"or a very short member beside long ones; give realistic sections, and leave out "
                        f"EA for a link meant to be rigid")
            else:
                self.singular = ("the stiffness equations are singular: the structure is a mechanism, or rigid "
                                 "links and supports fight each other (too large to locate where)")

    def _condition(self) -> float:
        """1-norm condition number of the scaled system; the inverse's norm by Hager's estimator
        (W. W. Hager, Condition estimates, SIAM J. Sci. Stat. Comput. 5 (1984) 311-316; the form in
        N. J. Higham, Accuracy and Stability of Numerical Algorithms, 2nd ed., Alg. 15.1, from memory)."""
        size = self.M.shape[0]
        x = np.full(size, 1.0 / size)
        est = 0.0
        for _ in range(5):
            y = self._lu.solve(x)
            if not np.all(np.isfinite(y)):
                return math.inf
            est = float(np.abs(y).sum())
            z = self._lu.solve(np.where(y >= 0, 1.0, -1.0), trans="T")
            j = int(np.argmax(np.abs(z)))
            if abs(z[j]) <= z @ x:
                break
            x = np.zeros(size)
            x[j] = 1.0
        norm = float(abs(self.M).sum(axis=0).max())
        c = norm * est
        return c if math.isfinite(c) else math.inf

    def _explain(self, null: npt.NDArray[np.float64], k: int) -> str:
        w = np.abs(null).sum(axis=0)
        in_u, in_c = w[: self.n].sum(), w[self.n:].sum()
        keep = w > 1e-6 * w.max()
        seen: list[str] = []
        for own, on in zip(self.owner, keep, strict=True):
            if on and own not in seen:
                seen.append(own)
        where = ", ".join(seen[:12]) + (" ..." if len(seen) > 12 else "")
        if in_u >= in_c:
            return (f"the structure is a mechanism with {k} degree(s) of freedom: it can move without "
                    f"straining any member (involved: {where}); add a support or a link, or give a body "
                    f"more members (if it cannot move, look for stiffnesses many orders apart, such as a "
                    f"near-rigid section hung on very soft links)")
        return (f"{k} rigid constraint(s) fight each other: these rigid links and supports hold the same "
                f"movement, so no stiffness can share the force between them (involved: {where}); give the "
                f"links an EA, or remove a redundant support")

    def solve(self, f: npt.NDArray[np.float64]) -> tuple[npt.NDArray[np.float64], npt.NDArray[np.float64]]:
        rhs = self.D * np.concatenate([f, np.zeros(self.nc)])
        y = self._lu.solve(rhs)
        for _ in range(2):  # iterative refinement: the sparse LU pivots less strictly than a dense one
            y = y + self._lu.solve(rhs - self.M @ y)
        x = self.D * y
        return x[: self.n], x[self.n:]


def analyse(job: Job, max_cable_rounds: int = MAX_CABLE_ROUNDS) -> StiffnessResult:
    """Solve ``job`` by the stiffness method for every load case.

    Raises:
        StructureError: a body without a section or with members that do not join its points; a
            mechanism; rigid constraints that fight each other; a cable iteration that does not settle;
            an equilibrium residual above RESIDUAL_TOL.
    """
    _check_bodies(job)
    m = _Model(job)
    cases = m.cases
    n_case = len(cases)
    cables = [n for n, ln in job.links.items() if ln.kind == "cable"]
    systems: dict[frozenset[str], _System] = {}

    def system(taut: frozenset[str]) -> _System:
        if taut not in systems:
            systems[taut] = _System(m, taut)
        return systems[taut]

    U = np.zeros((m.n, n_case))
    tension = {n: np.zeros(n_case) for n in job.links}
    reaction = {n: np.zeros((n_case, 3)) for n in job.supports}
    slack = {n: np.zeros(n_case, dtype=bool) for n in cables}
    for j, case in enumerate(cases):
        taut = frozenset(cables)
        f = m.F[:, j]
        f_scale = max(float(np.abs(f).max(initial=0.0)), 1e-300)
        history: list[frozenset[str]] = []
        for _round in range(max_cable_rounds + 1):
            S = system(taut)
            if S.singular is not None:
                gone = sorted(set(cables) - taut)
                extra = (f" with cable(s) {', '.join(gone)} slack in load case '{case}'" if gone else "")
                raise StructureError(Problem(job.path, "", "", f"stiffness solve{extra}: {S.singular}"))
            u, lam = S.solve(f)
            t = _tensions(job, m, S, u, lam)
            u_scale = max(float(np.abs(u).max(initial=0.0)), 1e-300)
            drop = {c for c in cables if c in taut and t[c] < -1e-9 * f_scale}
            take = set()
            for c in cables:
                if c not in taut:
                    dofs, g, _ = m.link_geom[c]
                    if float(g @ u[dofs]) > 1e-9 * u_scale:
                        take.add(c)
            if not drop and not take:
                break
            history.append(taut)
            taut = (taut - drop) | take
        else:
            flipping = sorted({c for h in history for c in cables if (c in h) != (c in taut)} or set(cables))
            raise StructureError(Problem(job.path, f"link.{flipping[0]}", "kind", (
                f"the tension-only iteration of the cables did not settle in load case '{case}' after "
                f"{max_cable_rounds} rounds (cables changing between taut and slack: {', '.join(flipping)}); "
                f"make the cable a link (kind = \"link\"), or add a member that holds the structure when "
                f"the cable goes slack")))
        U[:, j] = u
        for ln in job.links:
            tension[ln][j] = t[ln]
        for c in cables:
            slack[c][j] = c not in taut
        for sname, rws in S.sup_row.items():
            s = job.supports[sname]
            lam_s = -lam[rws]  # the reaction on the structure is minus the multiplier
            if s.kind == "roller":
                reaction[sname][j, :2] = lam_s[0] * np.asarray(s.normal)
            else:
                reaction[sname][j, :len(rws)] = lam_s

    return _collect(job, m, U, tension, reaction, slack)


def _tensions(job: Job, m: _Model, S: _System, u, lam) -> dict[str, float]:
    out: dict[str, float] = {}
    for lname, link in job.links.items():
        dofs, g, length = m.link_geom[lname]
        if lname in S.link_row:
            out[lname] = float(lam[S.link_row[lname]])
        elif link.kind == "cable" and lname not in S.taut:
            out[lname] = 0.0  # a slack cable
        else:
            out[lname] = link.EA / length * float(g @ u[dofs])  # an elastic link or taut elastic cable
    return out


def _collect(job: Job, m: _Model, U, tension, reaction, slack) -> StiffnessResult:
    cases = m.cases
    n_case = len(cases)
    disp = {(b, pt): np.stack([U[m._t(b, pt)[0]], U[m._t(b, pt)[1]], U[m.rdof[(b, pt)]]], axis=1)
            for b, body in job.bodies.items() for pt in body.points}
    member_forces: dict[tuple[str, str, str], npt.NDArray[np.float64]] = {}
    at_point: dict[tuple[str, str], npt.NDArray[np.float64]] = {}  # sum of member end forces (global)
    for key, dofs, kg, T in m.elements:
        fg = (kg @ U[dofs]).T  # (n_case, 6): forces the member receives from its nodes
        member_forces[key] = fg @ T.T
        b, pa, pb = key
        for pt, sl in ((pa, slice(0, 2)), (pb, slice(3, 5))):
            at_point.setdefault((b, pt), np.zeros((n_case, 2)))
            at_point[(b, pt)] += fg[:, sl]

    # forces applied to a body at its own point (not through a pin): loads, links, supports there
    applied = {k: np.zeros((n_case, 2)) for k in at_point}
    for load in job.loads:
        body = load.body if load.body is not None else load.at.body
        if body is None:
            continue  # on the pin itself
        applied[(body, m.point_of(body, load.at))][cases.index(load.case)] += load.force
    for lname, link in job.links.items():
        a, b = link.ends
        d = np.subtract(b.xy, a.xy)
        e = d / np.hypot(*d)
        for end, s in ((a, 1.0), (b, -1.0)):
            if end.pin is None:
                applied[(end.body, end.point)] += np.outer(tension[lname], s * e)
    for sname, s in job.supports.items():
        if s.at.pin is None:
            applied[(s.at.body, s.at.point)] += reaction[sname][:, :2]

    pin_load = {p: np.zeros((n_case, 2)) for p in job.pins}
    for load in job.loads:
        if load.at.pin is not None and load.body is None:
            pin_load[load.at.pin][cases.index(load.case)] += load.force

    pins: dict[str, PinForces] = {}
    for pname, mem in members_at_pins(job).items():
        f = np.zeros((n_case, len(mem), 2))
        for k, name in enumerate(mem):
            if name in job.pins[pname].bodies:
                key = (name, m.point_of(name, Place(None, None, pname, job.pins[pname].xy)))
                f[:, k, :] = at_point[key] - applied[key]
            elif name in job.links:
                a, b = job.links[name].ends
                d = np.subtract(b.xy, a.xy)
                e = d / np.hypot(*d)
                s = 1.0 if a.pin == pname else -1.0
                f[:, k, :] = -np.outer(tension[name], s * e)
            elif name == GROUND:
                sname = next(n for n, s in job.supports.items() if s.at.pin == pname)
                f[:, k, :] = -reaction[sname][:, :2]
            elif name == PIN_LOAD:
                f[:, k, :] = -pin_load[pname]
        pins[pname] = PinForces(pname, tuple(mem), f)

    sol = FrameSolution(cases, pins, tension, reaction, residual=0.0, solver=SOLVER)
    residual = equilibrium_residual(job, sol)
    if not residual <= RESIDUAL_TOL:
        raise StructureError(Problem(job.path, "", "", (
            f"the stiffness solution does not satisfy equilibrium (relative residual {residual:.2e} > "
            f"{RESIDUAL_TOL:.0e}); the equations are ill-conditioned: check for members of very different "
            f"stiffness, very short members or nearly coincident points")))
    notes = [("stiffness solve: the forces depend on the sections (E, A, I) and link EA given and on the "
              "supports' fixity; check them")]
    for c, sl in slack.items():
        gone = [cases[j] for j in np.flatnonzero(sl)]
        if gone:
            notes.append(f"cable {c} is slack (carries nothing) in load case(s) {', '.join(gone)}")
    notes += _superposition_notes(job, cases, slack)
    sol = FrameSolution(cases, pins, tension, reaction, residual=residual, solver=SOLVER, warnings=tuple(notes))
    return StiffnessResult(sol, disp, member_forces, slack)


def _superposition_notes(job: Job, cases: tuple[str, ...], slack: dict[str, npt.NDArray[np.bool_]]) -> list[str]:
    """Combinations are linear sums of the solved cases (pinchk.combine); a tension-only cable breaks
    that when it is slack in some of the cases summed, or when a case enters with a negative factor."""
    out = []
    for combo in (getattr(job, "combinations", None) or {}).values():
        used = [(c, f) for c, f in combo.factors.items() if f != 0 and c in cases]
        for cable, sl in slack.items():
            states = {bool(sl[cases.index(c)]) for c, _ in used}
            taut_negative = any(f < 0 and not sl[cases.index(c)] for c, f in used)
            if len(states) > 1 or taut_negative:
                out.append(f"combination {combo.name}: cable {cable} is taut in some of its cases and slack in "
                           f"others, or enters with a negative factor; a sum of solved cases is not exact for a "
                           f"tension-only cable: solve the combined loads as a load case of their own")
    return out


def solve(job: Job) -> FrameSolution:
    """Solve ``job`` by the stiffness method: the FrameSolution of every load case (see ``analyse``)."""
    return analyse(job).solution
