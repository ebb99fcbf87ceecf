"""Benchmark (prints figures, asserts nothing): time of the stiffness solve against model size.

An invented continuous beam over n_span equal spans, each cut into 4 members, with a point load at
every interior point and 3 load cases, plus a hanger cable at every span's middle that goes slack in one
case. Run: python benchmarks/bench_stiffness.py [n_span ...]
"""

from __future__ import annotations

import sys
import time
import tomllib

from pinchk import frame, stiffness
from pinchk.jobfile import parse_job


def job(n_span: int):
    L = 5.0
    pts, sup = [], []
    for s in range(n_span):
        for i in range(4):
            pts.append((f"p{s}_{i}", s * L + i * L / 4))
        sup.append(f"p{s}_0")
    pts.append(("end", n_span * L))
    sup.append("end")
    text = ('[job]\ntitle = "bench (invented)"\n[units]\nlength = "m"\nforce = "kN"\n[method]\nname = "EN 1993-1-8"\n'
            '[section.s]\nE = "200 GPa"\nA = "8000 mm^2"\nI = "1e8 mm^4"\n'
            '[section.r]\nE = "200 GPa"\nA = "1 m^2"\nI = "1 m^4"\n'
            "[body.b]\npoints = { " + ", ".join(f"{n} = [{x}, 0]" for n, x in pts) + ' }\nsection = "s"\n'
            '[body.roof]\npoints = { K0 = [0, 3], K1 = [' + str(n_span * L) + ', 3] }\nsection = "r"\n'
            '[support.roof]\nat = "roof.K0"\nkind = "fixed"\n'
            "[case.a]\n[case.b]\n[case.c]\n")
    for k, n in enumerate(sup):
        text += f'[support.S{k}]\nat = "b.{n}"\nkind = "{"pinned" if k == 0 else "roller"}"\n'
        if k:
            text += "normal = [0, 1]\n"
    for s in range(n_span):
        text += f'[link.h{s}]\nends = ["roof.K1", "b.p{s}_2"]\nkind = "cable"\nEA = "1e5 kN"\n'
    for s in range(n_span):
        for i in (1, 2, 3):
            text += f'[[load]]\ncase = "a"\nat = "b.p{s}_{i}"\nforce = [0, -10]\n'
            text += f'[[load]]\ncase = "b"\nat = "b.p{s}_{i}"\nforce = [0, {-10 if s % 2 else 3}]\n'
        text += f'[[load]]\ncase = "c"\nat = "b.p{s}_2"\nforce = [1, -5]\n'
    return parse_job(tomllib.loads(text), "bench.toml", text)


def main(sizes):
    print(f"{'spans':>6} {'dofs':>7} {'solve [s]':>10} {'residual':>10}")
    for n in sizes:
        j = job(n)
        t0 = time.perf_counter()
        res = stiffness.analyse(j)
        dt = time.perf_counter() - t0
        dofs = sum(3 * len(b.points) for b in j.bodies.values())
        print(f"{n:6d} {dofs:7d} {dt:10.3f} {frame.equilibrium_residual(j, res.solution):10.1e}")


if __name__ == "__main__":
    main([int(a) for a in sys.argv[1:]] or [5, 25, 100, 250])
