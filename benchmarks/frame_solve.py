"""Frame solve: pinchk.frame.solve against the bare scipy factor-and-solve of the same matrix.

The frames are generated determinate Warren trusses of rigid bodies (benchmarks/frames.py, an
invented scenario). pinchk's time is the whole solve: assembly, determinacy check, factorization,
every load case, the forces at every pin, the equilibrium check of every body and pin. The bare time
is scipy.sparse.linalg.splu of the very matrix pinchk assembles, with pinchk's SuperLU settings
(frame.SPLU_OPTIONS), and its solve of every case at once; the ratio is what pinchk adds.
"""

from __future__ import annotations

import statistics
import time

import scipy.sparse.linalg as spla

from pinchk import frame

from .frames import n_members, truss


def measure(n_bodies: int, repeat: int, cases: tuple[int, ...] = (1, 100)) -> dict[int, dict[str, float]]:
    """Per number of load cases: pinchk's and the bare time (best of ``repeat``) and ratios.

    Every repeat runs pinchk and the bare solve for every number of cases in turn. A ratio is the
    median over the repeats of the ratio within each repeat: pinchk against bare ("ratio"), and, for
    the last number of cases, its time against the first's ("pinchk_per_1", "bare_per_1").
    """
    jobs = {nc: truss(n_bodies, nc) for nc in cases}
    mats = {}
    for nc, job in jobs.items():
        A, b, _ = frame.assemble(job)
        mats[nc] = (A.tocsc(), b)
        frame.solve(job)  # once before timing: imports and first-use costs are not what is measured
    times: dict[tuple[int, str], list[float]] = {}
    for _ in range(repeat):
        for nc, job in jobs.items():
            A, b = mats[nc]
            t = time.perf_counter()
            frame.solve(job)
            times.setdefault((nc, "pinchk"), []).append(time.perf_counter() - t)
            t = time.perf_counter()
            spla.splu(A, **frame.SPLU_OPTIONS).solve(b)
            times.setdefault((nc, "bare"), []).append(time.perf_counter() - t)
    out = {}
    for nc, job in jobs.items():
        p, q = times[(nc, "pinchk")], times[(nc, "bare")]
        out[nc] = {"bodies": n_members(job), "unknowns": mats[nc][0].shape[0], "cases": nc,
                   "pinchk_s": min(p), "bare_s": min(q),
                   # a ratio from each repeat's own pair of runs (next to each other in time), then the
                   # median of those: a slow moment of the machine slows both runs of a pair alike
                   "ratio": statistics.median(a / b for a, b in zip(p, q, strict=True))}
    if len(cases) > 1:
        one, many = cases[0], cases[-1]
        for who in ("pinchk", "bare"):
            out[many][f"{who}_per_{one}"] = statistics.median(
                a / b for a, b in zip(times[(many, who)], times[(one, who)], strict=True))
    return out

if __name__ == "__main__":
    for n in (10, 100, 1000, 10000):
        for r in measure(n, 5).values():
            print(f"{r['bodies']:>6d} bodies {r['cases']:>4d} cases  pinchk {r['pinchk_s'] * 1e3:9.2f} ms  "
                  f"bare {r['bare_s'] * 1e3:9.2f} ms  ratio {r['ratio']:.2f}")
