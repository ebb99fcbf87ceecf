"""Load combinations and the lifting factor stack.

The frame is solved once per load case; a combination is a linear sum of the solved cases, each times
its factor (statics is linear, so the combined forces are in equilibrium with the combined loads; that
is checked, not assumed). With no combinations in the job, each case is its own combination.

The factor stack multiplies the forces of chosen connections: a dynamic (impact) factor, a skew factor
for multi-sling lifts whose load split is uncertain, a consequence factor on lift points and the
members framing into them. Each is a named input; each applies to the combinations, pins and members
the job names (all where it names none). The method's design factor (e.g. BTH-1 Nd) is applied by the
method on the capacity side. Every factor applied to a row is written into that row's ``factors``.

Defaults: every stack factor is 1.0 unless the job gives it (common practice; there is no standard
default). Typical values of lifting practice (from memory, to be set by the engineer): dynamic 1.1 to
1.3 for a crane lift at slow hoisting speed, skew 1.25 for a statically indeterminate four-sling lift,
consequence 1.3 on lift points.
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np

from .errors import Problem, StructureError
from .frame import FrameSolution, PinForces, compressed_cable, equilibrium_residual
from .model import Case, Combination, Job, StackFactor

#: The factors of the stack a job may give, with what each is for (all default to 1.0, common practice).
STACK_FACTORS = {
    "dynamic": "dynamic or impact factor on the lifted load (common practice, default 1.0)",
    "skew": "skew factor for a multi-sling lift whose load split is uncertain (common practice, default 1.0)",
    "consequence": "consequence factor on lift points and the members framing into them (common practice, "
                   "default 1.0)",
}


def combinations_of(job: Job) -> dict[str, Combination]:
    """The job's combinations, or each case as its own combination when it gives none."""
    if job.combinations:
        return dict(job.combinations)
    return {c: Combination(c, {c: 1.0}, case.description, case.limit_state) for c, case in job.cases.items()}


def combination_text(comb: Combination) -> str:
    """"1.2 dead + 1.0 hook" (the case factors of a combination as printed in the results)."""
    return " + ".join(f"{v:g} {c}" for c, v in comb.factors.items())


def combine(job: Job, sol: FrameSolution) -> tuple[Job, FrameSolution]:
    """The job and solution with the combinations in place of the cases.

    The returned job has one Case per combination (its name, description and limit state) and the loads
    scaled into it, so the combined solution can be checked for equilibrium as any other.

    Raises:
        StructureError: a cable in compression in a combination, or a combination out of balance.
    """
    if not job.combinations:
        return job, sol
    combos = combinations_of(job)
    names = tuple(combos)
    ix = {c: i for i, c in enumerate(sol.cases)}
    W = np.zeros((len(names), len(sol.cases)))
    for k, comb in enumerate(combos.values()):
        for c, v in comb.factors.items():
            W[k, ix[c]] = v
    pins = {p: PinForces(p, pf.members, np.einsum("kc,cmx->kmx", W, pf.force),
                         None if pf.axial is None else W @ pf.axial) for p, pf in sol.pins.items()}
    links = {n: W @ t for n, t in sol.links.items()}
    supports = {n: W @ r for n, r in sol.supports.items()}
    loads = tuple(_scaled(ld, name, comb.factors[ld.case])
                  for name, comb in combos.items() for ld in job.loads if ld.case in comb.factors)
    cases = {n: Case(n, c.description or combination_text(c), c.limit_state) for n, c in combos.items()}
    job2 = replace(job, cases=cases, loads=loads)
    solver = sol.solver + ", combined linearly per combination"
    sol2 = FrameSolution(names, pins, links, supports, 0.0, solver, sol.warnings)
    # a frame solved here is checked again under the combined loads; forces read from a file keep theirs
    solved_here = getattr(job, "forces", None) is None
    residual = equilibrium_residual(job2, sol2) if solved_here else sol.residual
    if solved_here and not residual <= 1e-9:
        raise StructureError(Problem(job.path, "", "", f"the combined solution is out of balance (relative "
                                     f"residual {residual:.2e}): this is a bug in pinchk, not in the input"))
    found = compressed_cable(job, links)
    if found is not None:
        lname, k, tk = found
        raise StructureError(Problem(job.path, f"combination.{names[k]}", "cases", (
            f"cable {lname} would be in compression ({tk / 1e3:.6g} kN) in combination '{names[k]}': "
            f"a cable carries tension only; change the combination's factors or make it a link")))
    return job2, FrameSolution(names, pins, links, supports, residual, solver, sol.warnings)


def _scaled(ld, case: str, k: float):
    """A load moved into combination ``case``, times its factor ``k``."""
    return replace(ld, case=case, force=(ld.force[0] * k, ld.force[1] * k), moment=ld.moment * k)


def _applies(sf: StackFactor, comb: str, pin: str, members: set[str]) -> bool:
    if sf.combinations is not None and comb not in sf.combinations:
        return False
    if sf.pins is None and sf.members is None:
        return True
    return (sf.pins is not None and pin in sf.pins) or (sf.members is not None and bool(members & set(sf.members)))


def row_factors(job: Job, cases: tuple[str, ...], pin: str, members: set[str]) -> tuple[np.ndarray, list[str]]:
    """Stack factor of a check row in each combination, and the text naming every factor applied.

    Args:
        members: the member of a plate row, or every member at the pin for a pin row.
    """
    fac = np.ones(len(cases))
    texts = []
    combos = job.combinations
    for k, c in enumerate(cases):
        parts = []
        if c in combos and not (len(combos[c].factors) == 1 and combos[c].factors.get(c) == 1.0):
            parts.append(f"{c} = {combination_text(combos[c])}")
        used = [sf for sf in job.stack_factors if _applies(sf, c, pin, members)]
        for sf in used:
            fac[k] *= sf.value
        if used:
            parts.append(" × ".join(f"{sf.name} {sf.value:g}" for sf in used)
                         + (f" = {fac[k]:g}" if len(used) > 1 else "") + " on the forces")
        texts.append("; ".join(parts))
    return fac, texts
