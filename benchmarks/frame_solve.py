"""Frame solve: pinchk.frame.solve against the bare scipy factor-and-solve of the same matrix.

The frames are generated determinate Warren trusses of rigid bodies (benchmarks/frames.py, an
invented scenario). pinchk's time is the whole solve: assembly, determinacy check, factorization,
every load case, the forces at every pin, the equilibrium check of every body and pin. The bare time
is scipy.sparse.linalg.splu of the very matrix pinchk assembles, with pinchk's SuperLU settings
(frame.SPLU_OPTIONS), and its solve of every case at once; the ratio is what pinchk adds.
"""

from __future__ import annotations

import math
import time

import scipy.sparse.linalg as spla

from pinchk import frame

from .frames import n_members, truss


def best_of(fn, repeat: int) -> float:
    best = math.inf
    for _ in range(repeat):
        t = time.perf_counter()
        fn()
        best = min(best, time.perf_counter() - t)
    return best


def measure(n_bodies: int, n_cases: int, repeat: int) -> dict[str, float]:
    job = truss(n_bodies, n_cases)
    A, b, _ = frame.assemble(job)
    A = A.tocsc()
    t_pinchk = t_bare = math.inf
    for _ in range(repeat):  # interleaved, so a busy moment of the machine hits both alike
        t_pinchk = min(t_pinchk, best_of(lambda: frame.solve(job), 1))
        t_bare = min(t_bare, best_of(lambda: spla.splu(A, **frame.SPLU_OPTIONS).solve(b), 1))
    return {"bodies": n_members(job), "unknowns": A.shape[0], "cases": n_cases, "pinchk_s": t_pinchk,
            "bare_s": t_bare, "ratio": t_pinchk / t_bare}


if __name__ == "__main__":
    for n in (10, 100, 1000, 10000):
        for nc in (1, 100):
            r = measure(n, nc, 5)
            print(f"{r['bodies']:>6d} bodies {r['cases']:>4d} cases  pinchk {r['pinchk_s'] * 1e3:9.2f} ms  "
                  f"bare {r['bare_s'] * 1e3:9.2f} ms  ratio {r['ratio']:.2f}")
