"""Every pinchk benchmark, with its target: python benchmarks/run.py [--quick]

Prints the machine, then a table: each figure beside its target and whether it is met. Targets are
ratios measured in the same run on the same machine (see docs/performance.md). Timings are the best
of several repeats (start-up: the median of several fresh processes), measured in turns so a busy
moment of the machine hits both sides of a ratio alike; a frame-solve ratio is the median of the
ratios within each repeat. Nothing here is part of the test suite.
"""

from __future__ import annotations

import os
import platform
import sys
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from benchmarks import frame_solve, kernel, startup  # noqa: E402


def machine() -> str:
    cpu = "unknown CPU"
    try:
        with open("/proc/cpuinfo", encoding="utf-8") as fh:
            cpu = next(ln.split(":", 1)[1].strip() for ln in fh if ln.startswith("model name"))
    except (OSError, StopIteration):
        pass
    return (f"{os.cpu_count()} CPUs ({cpu}), Python {platform.python_version()}, "
            f"{platform.system()} {platform.release()}")


def main(argv: list[str]) -> int:
    quick = "--quick" in argv
    rows: list[tuple[str, str, str, str]] = []

    def add(what: str, figure: str, target: str, ok: bool | None) -> None:
        rows.append((what, figure, target, "-" if ok is None else ("met" if ok else "NOT MET")))
        print(f"  {what}: {figure}", file=sys.stderr, flush=True)

    print(f"machine: {machine()}")
    print("measuring ...", file=sys.stderr)

    # start-up
    s = startup.measure(5 if quick else 15)
    base = s["baseline"]["median"]
    add("start-up: import numpy, pint; UnitRegistry()", f"{base * 1e3:.0f} ms (median)", "reference", None)
    add("start-up: pinchk --help", f"{s['help']['median'] * 1e3:.0f} ms = {s['help']['median'] / base:.2f} x ref",
        "-", None)
    r = s["run"]["median"] / base
    add("start-up: demo run, table", f"{s['run']['median'] * 1e3:.0f} ms = {r:.2f} x ref", "<= 1.5 x ref", r <= 1.5)
    rc = s["run (unit cache off)"]["median"] / base
    add("start-up: demo run, pint cache off", f"{s['run (unit cache off)']['median'] * 1e3:.0f} ms = {rc:.2f} x ref",
        "-", None)
    heavy = startup.heavy_imports()
    add("start-up: pandas/matplotlib/jinja2 imported by a table run",
        ", ".join(sorted(heavy)) or "none", "none", not heavy)

    # frame solve
    res = {}
    for n in (10, 100, 1000, 10000):
        cases = (1,) if quick and n == 10000 else (1, 100)
        res.update({(n, nc): m for nc, m in frame_solve.measure(n, 15 if n >= 10000 else 9, cases).items()})
        for nc in cases:
            m = res[(n, nc)]
            target = n == 10000
            add(f"frame solve: {m['bodies']:,} bodies, {nc} case(s), {m['unknowns']:,} unknowns",
                f"{m['pinchk_s'] * 1e3:.2f} ms, {m['ratio']:.2f} x bare scipy ({m['bare_s'] * 1e3:.2f} ms)",
                "<= 3 x bare" if target else "-", m["ratio"] <= 3 if target else None)
    g = res[(10000, 1)]["pinchk_s"] / res[(1000, 1)]["pinchk_s"]
    add("frame solve: 1,000 -> 10,000 bodies, 1 case", f"{g:.1f} x the time", "<= 15 x", g <= 15)
    for n in (1000, 10000):
        if (n, 100) in res:
            many = res[(n, 100)]
            c, cb = many["pinchk_per_1"], many["bare_per_1"]
            best = many["pinchk_s"] / res[(n, 1)]["pinchk_s"]
            target = n == 10000
            add(f"frame solve: 100 cases against 1, {n:,} bodies",
                f"{c:.2f} x the time (ratio of the best times: {best:.2f} x; bare scipy alone: {cb:.2f} x)",
                "<= 2 x" if target else "-", c <= 2 if target else None)

    # check kernel (last: 10 million rows leave the process with a large heap)
    for n in (1_000, 100_000) + (() if quick else (10_000_000,)):
        n_rows, t = kernel.time_kernel(n, 1 if n >= 10_000_000 else 5)
        rate = n_rows / t
        target = n >= 100_000
        add(f"check kernel: {n_rows:,} rows", f"{rate:,.0f} rows/s ({t * 1e3:.1f} ms)",
            ">= 1,000,000 rows/s" if target else "-", rate >= 1e6 if target else None)
    p = kernel.against_pint(10_000, 5)
    add(f"check kernel vs pint loop, same {p['rows']:,} rows",
        f"{p['ratio']:,.0f} x faster (loop {p['loop_s']:.2f} s, kernel {p['kernel_s'] * 1e3:.1f} ms; "
        f"utilizations differ by {p['max_rel_diff']:.1e})", ">= 200 x", p["ratio"] >= 200)

    w = [max(len(r[i]) for r in rows) for i in range(4)]
    head = ("figure", "measured", "target", "")
    print("  ".join(h.ljust(w[i]) for i, h in enumerate(head)))
    print("  ".join("-" * w[i] for i in range(4)))
    for r in rows:
        print("  ".join(c.ljust(w[i]) for i, c in enumerate(r)))
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
