"""What every view shares: output units, number formatting, the governing row and the verdict."""

from __future__ import annotations

import math

import numpy as np

from ..units import UNIT_SYSTEMS, from_si, unit_label

KIND_DIM = {"force": "force", "moment": "moment", "length": "length", "stress": "stress"}


def units_of(results) -> dict[str, str]:
    return UNIT_SYSTEMS[results.job.output_units]


def convert(value, kind: str, units: dict[str, str]):
    """SI value of ``kind`` to the output unit; ratios pass through."""
    if kind in KIND_DIM:
        return from_si(value, KIND_DIM[kind], units[KIND_DIM[kind]])
    return value


def unit_of(kind: str, units: dict[str, str]) -> str:
    return unit_label(units[KIND_DIM[kind]]) if kind in KIND_DIM else "-"


def fmt(x: float, sig: int = 4) -> str:
    """A figure to ``sig`` significant digits, without exponent for everyday magnitudes."""
    if x is None or (isinstance(x, float) and math.isnan(x)):
        return "-"
    if math.isinf(x):
        return "inf"
    if x == 0:
        return "0"
    mag = math.floor(math.log10(abs(x)))
    if -4 <= mag < 7:
        return f"{x:.{max(sig - 1 - mag, 0)}f}"
    return f"{x:.{sig - 1}e}"


def verdict(results) -> str:
    """One line: pass or fail, how many checks, and the governing row."""
    n = len(results)
    if n == 0:
        return "NO CHECKS: no pin has a stack of plates to check"
    util = results.columns["utilization"]
    g = results.row(results.governing)
    where = f"{g['pin']} {g['part']}, {g['check']}, case '{g['case']}'"
    if results.passed:
        return f"PASS: all {n} checks pass; governing {where}: utilization {g['utilization']:.3f}"
    n_fail = int(np.sum(util > 1.0))
    return f"FAIL: {n_fail} of {n} checks fail; governing {where}: utilization {g['utilization']:.3f}"


def governing_by_check(results) -> list[int]:
    """For each (pin, part, check), the row of its governing case; sorted by utilization."""
    c = results.columns
    best: dict[tuple[str, str, str], int] = {}
    util = c["utilization"]
    for i in range(len(results)):
        key = (c["pin"][i], c["part"][i], c["check"][i])
        j = best.get(key)
        if j is None or util[i] > util[j]:
            best[key] = i
    return sorted(best.values(), key=lambda i: (-util[i], i))


def force_rows(results, sol=False):
    """Joint forces: (case, pin, member, Fx, Fy, |F|, angle deg) in SI, of ``sol`` (default the results'
    own solution; None gives no rows)."""
    sol = results.solution if sol is False else sol
    out = []
    if sol is None:
        return out
    for j, case in enumerate(sol.cases):
        for pname, pf in sol.pins.items():
            for k, m in enumerate(pf.members):
                fx, fy = pf.force[j, k]
                mag = math.hypot(fx, fy)
                ang = math.degrees(math.atan2(fy, fx)) if mag > 0 else 0.0
                out.append((case, pname, m, fx, fy, mag, ang))
    return out


def combination_lines(results) -> list[str]:
    """The job's combinations and lift factors, one line each (nothing when it gives none)."""
    from ..combine import combination_text

    job = results.job
    out = [f"combination {n}: {combination_text(c)} ({c.limit_state})" for n, c in job.combinations.items()]
    for sf in job.stack_factors:
        where = [f"{k} {', '.join(v)}" for k, v in (("combinations", sf.combinations), ("pins", sf.pins),
                                                    ("members", sf.members)) if v is not None]
        out.append(f"lift factor {sf.name} = {sf.value:g} on the forces, "
                   + ("; ".join(where) if where else "everywhere") + (f" ({sf.note})" if sf.note else ""))
    return out
