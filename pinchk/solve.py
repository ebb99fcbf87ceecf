"""The frame solve of a run: rigid-body statics when the structure is determinate, stiffness when not.

``[job] solver`` chooses: "auto" (the default) solves by statics (pinchk.frame) and, only when statics
finds the structure statically indeterminate, by the stiffness method (pinchk.stiffness); "statics" or
"stiffness" force one. FrameSolution.solver says which one produced the forces.
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np

from . import frame
from .errors import Problem, StructureError
from .frame import FrameSolution
from .model import Job


#: The solvers a job can force, by the name used in [job] solver.
def _stiffness_solve(job: Job) -> FrameSolution:
    from . import stiffness  # imported only when a frame needs it (scipy.sparse.linalg is slow to load)

    return stiffness.solve(job)


SOLVERS = {"statics": frame.solve, "stiffness": _stiffness_solve}


def degree_of_indeterminacy(job: Job) -> tuple[int, int] | None:
    """(mechanism degrees of freedom, degree of static indeterminacy) of the rigid-body equations,
    or None when the system is too large for a dense rank (frame.DENSE_RANK_LIMIT)."""
    A = frame.assemble(job)[0]
    if max(A.shape) > frame.DENSE_RANK_LIMIT:
        return None
    s = np.linalg.svd(A.toarray(), compute_uv=False)
    tol = frame.rank_tol(A.shape, s)
    rank = int((s > tol).sum())
    return A.shape[0] - rank, A.shape[1] - rank


def solve(job: Job, solver: str | None = None) -> FrameSolution:
    """Solve the frame of ``job`` (see ``_solve``), with warnings for rollers that would pull and for
    joint forces that dwarf the loads."""
    sol = _solve(job, solver)
    extra = roller_uplift(job, sol) + force_amplification(job, sol)
    return replace(sol, warnings=sol.warnings + extra) if extra else sol


#: Joint forces more than this many times the largest load point to a structure close to a mechanism.
AMPLIFICATION_WARN = 100.0


def force_amplification(job: Job, sol: FrameSolution) -> tuple[str, ...]:
    """A warning where joint forces dwarf the loads (nearly parallel links, nearly collinear members).

    Statics then still balances every body, but the forces depend on small differences of geometry, so
    a small error in the coordinates gives a large error in the forces (common practice: check it).
    """
    load = max([float(np.hypot(*ld.force)) for ld in job.loads] + [0.0])
    if not load > 0:
        return ()
    worst, where = 0.0, ""
    for pname, pf in sol.pins.items():
        m = float(np.abs(pf.force).max(initial=0.0))
        if m > worst:
            worst, where = m, f"pin {pname}"
    for lname, tension in sol.links.items():
        m = float(np.abs(tension).max(initial=0.0))
        if m > worst:
            worst, where = m, f"link {lname}"
    ratio = worst / load
    if ratio <= AMPLIFICATION_WARN:
        return ()
    return (f"the largest joint force ({where}, {worst / 1e3:.4g} kN) is {ratio:.3g} times the largest load: "
            f"the structure is close to a mechanism (nearly parallel links or nearly collinear members), "
            f"so its forces hang on small differences of geometry; check the coordinates",)


def roller_uplift(job: Job, sol: FrameSolution) -> tuple[str, ...]:
    """Warnings for rollers whose reaction pulls on the structure (a wheel or a bearing pad only pushes).

    The solve treats a roller as two-sided, so a negative reaction is a real answer only where the
    roller is held down (a guided roller, a hold-down bolt); otherwise the structure lifts off there.
    """
    out = []
    for name, s in job.supports.items():
        if s.kind != "roller":
            continue
        r = sol.supports[name][:, 0] * s.normal[0] + sol.supports[name][:, 1] * s.normal[1]
        scale = max(float(abs(r).max(initial=0.0)), 1e-300)
        for j, case in enumerate(sol.cases):
            if r[j] < -1e-9 * scale:
                out.append(f"roller {name} pulls on the structure in case '{case}' ({r[j] / 1e3:.4g} kN along "
                           f"its normal): a roller that is not held down lifts off there, and the structure "
                           f"is then not the one solved")
    return tuple(out)


def _solve(job: Job, solver: str | None = None) -> FrameSolution:
    """Solve the frame of ``job`` by ``solver`` ("auto", "statics", "stiffness"; None: the job's choice).

    Raises:
        StructureError: as the chosen solver does; in "auto", a structure statics cannot solve that is
            not indeterminate (a mechanism, a cable in compression) keeps the statics error, and an
            indeterminate one that the stiffness solve cannot solve either gets both messages.
    """
    choice = solver or job.solver
    if choice == "statics":
        try:
            return frame.solve(job)
        except StructureError as exc:
            if "indeterminate" not in str(exc):
                raise
            raise StructureError(exc.problems + [Problem(job.path, "job", "solver", (
                "the job forces solver = \"statics\"; with sections on the bodies, solver = \"auto\" or "
                "\"stiffness\" solves an indeterminate structure by the stiffness method"))]) from None
    if choice != "auto":
        return SOLVERS[choice](job)
    try:
        return frame.solve(job)
    except StructureError as exc:
        found = degree_of_indeterminacy(job)
        indeterminate = (found[1] > 0) if found is not None else "indeterminate" in str(exc)
        if not indeterminate:
            raise
        try:
            return _stiffness_solve(job)
        except StructureError as exc2:
            raise StructureError(exc.problems + exc2.problems) from None
