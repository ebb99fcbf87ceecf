"""Benchmark (prints figures, asserts nothing): the pin-stack solve, the lug geometry and the sweep.

    PYTHONPATH=. python benchmarks/joint_stack_sweep.py    (from the repository root, or with pinchk installed)
"""

from __future__ import annotations

import time
from pathlib import Path

import numpy as np

from pinchk import load_job, run
from pinchk.frame import PinForces
from pinchk.lug import Outline
from pinchk.model import Material, Pin, Plate
from pinchk.stack import solve_stack

HERE = Path(__file__).resolve().parent.parent


def clock(fn, repeat=5):
    best = float("inf")
    for _ in range(repeat):
        t0 = time.perf_counter()
        fn()
        best = min(best, time.perf_counter() - t0)
    return best


def main() -> None:
    steel = Material("S355", 355e6, 490e6, 210e9, "benchmark")
    n_plate, n_case = 9, 10_000
    members = [f"m{i % 4}" for i in range(n_plate)]
    plates = tuple(Plate(m, 0.02, 0.002, None, steel, 0.2, 0.1, "round", 0.051, "A") for m in members)
    pin = Pin("P", (0, 0), tuple(sorted(set(members))), 0.05, steel, plates)
    rng = np.random.default_rng(1)
    f = rng.normal(size=(n_case, 4, 2)) * 1e5
    f[:, -1] = -f[:, :-1].sum(axis=1)
    pf = PinForces("P", tuple(sorted(set(members))), f)
    for model in ("uniform", "point"):
        t = clock(lambda m=model: solve_stack(pin, pf, m))
        print(f"solve_stack, {n_plate} plates x {n_case} cases, {model}: {t * 1e3:.1f} ms "
              f"({t / n_case * 1e6:.2f} us per case)")
    o = Outline("round", width=0.2, end=0.1, centre=(-0.01, 0.0), base=0.3)
    th = np.linspace(0, 2 * np.pi, 100_000)
    u = np.column_stack([np.cos(th), np.sin(th)])
    t = clock(lambda: o.reach(u))
    print(f"Outline.reach, round with offset arc, 100000 directions: {t * 1e3:.1f} ms")
    for name in ("boom_head_joint.toml", "a_frame_gantry.toml"):
        job = load_job(HERE / "examples" / name)
        t = clock(lambda j=job: run(j), repeat=3)
        print(f"run() {name} (frame solve, checks, 5-degree sweeps of every lug): {t * 1e3:.1f} ms")


if __name__ == "__main__":
    main()
