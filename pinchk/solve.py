"""The frame solve of a run: rigid-body statics when the structure is determinate, stiffness when not.

``[job] solver`` chooses: "auto" (the default) solves by statics (pinchk.frame) and, only when statics
finds the structure statically indeterminate, by the stiffness method (pinchk.stiffness); "statics" or
"stiffness" force one. FrameSolution.solver says which one produced the forces.
"""

from __future__ import annotations

import numpy as np
import scipy.sparse as sp

from . import frame, stiffness
from .errors import Problem, StructureError
from .frame import FrameSolution
from .model import Job

#: The solvers a job can force, by the name used in [job] solver.
SOLVERS = {"statics": frame.solve, "stiffness": stiffness.solve}
#: Largest equilibrium matrix whose rank is found here by a dense SVD.
DENSE_RANK_LIMIT = 2000


def degree_of_indeterminacy(job: Job) -> tuple[int, int] | None:
    """(mechanism degrees of freedom, degree of static indeterminacy) of the rigid-body equations,
    or None when the system is too large for a dense rank."""
    try:
        A = sp.csc_matrix(frame.assemble(job)[0])
    except (AttributeError, TypeError, ValueError, IndexError):  # frame's assembly changed its form
        return None
    if max(A.shape) > DENSE_RANK_LIMIT:
        return None
    s = np.linalg.svd(A.toarray(), compute_uv=False)
    tol = max(A.shape) * np.finfo(float).eps * (s[0] if s.size else 1.0) * 1e3
    rank = int((s > tol).sum())
    return A.shape[0] - rank, A.shape[1] - rank


def solve(job: Job, solver: str | None = None) -> FrameSolution:
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
            return stiffness.solve(job)
        except StructureError as exc2:
            raise StructureError(exc.problems + exc2.problems) from None
