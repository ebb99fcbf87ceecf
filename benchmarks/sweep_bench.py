"""Benchmark of pinchk.alternatives: a grade × diameter comparison over a 20-pin frame with 10 combinations.

The frame is an invented one for timing only: four copies of the demo A-frame gantry side by side (five
checked pins each), two load cases (a hook load and a side pull) and ten combinations of them. The
comparison takes every bolt grade of data/bolt_grades.csv and 30 pin diameters (10 to 39 mm) for every
pin. Prints the times; asserts nothing.

    python benchmarks/sweep_bench.py
"""

from __future__ import annotations

import os
import sys
import tempfile
import time

sys.path.insert(0, os.path.join(os.path.dirname(__file__), ".."))

from pinchk import alternatives as alt  # noqa: E402
from pinchk import load_job, run  # noqa: E402


def plate(member, t, width, end, gap=None, material="S355"):
    g = f"gap = {gap}\n" if gap is not None else ""
    mat = f'material = "{material}"\nwidth = {width}\nend = {end}\n' if material else ""
    return f'member = "{member}"\nthickness = {t}\n{g}{mat}'


def frame_text(copies: int = 4) -> str:
    out = ['[job]\ntitle = "benchmark: four gantries side by side (invented)"\noutput_units = "SI"\n',
           '[units]\nlength = "mm"\nforce = "kN"\n', '[method]\nname = "EN 1993-1-8"\n',
           '[case.hook]\n[case.side]\n']
    for k in range(10):
        out.append(f'[combination.c{k}]\ncases = {{ hook = {1.0 + 0.05 * k:g}, side = {-1.0 + 0.2 * k:g} }}\n')
    for k in range(copies):
        x = 6000 * k
        s = f"_{k}"
        out.append(f"[body.leg_left{s}]\npoints = {{ F = [{x}, 0], T = [{x + 1000}, 2000], A = [{x + 2000}, 4000] }}\n")
        out.append(f"[body.leg_right{s}]\npoints = {{ F = [{x + 4000}, 0], T = [{x + 3000}, 2000], "
                   f"A = [{x + 2000}, 4000] }}\n")
        out.append(f'[link.tie{s}]\nends = ["PL{s}", "PR{s}"]\nkind = "link"\n')
        out.append(f'[support.base{s}]\nat = "P_foot_left{s}"\nkind = "pinned"\n')
        out.append(f'[support.wheel{s}]\nat = "P_foot_right{s}"\nkind = "roller"\nnormal = [0, 1]\n')
        out.append(f'[[load]]\ncase = "hook"\nat = "P_apex{s}"\nmass = "10 t"\nlabel = "hook"\n')
        out.append(f'[[load]]\ncase = "side"\nat = "P_apex{s}"\nbody = "leg_left{s}"\nforce = ["10 kN", "0 kN"]\n')
        out.append(f'[pin.P_apex{s}]\njoins = ["leg_left{s}.A", "leg_right{s}.A"]\ndiameter = 60\nhole = 62\n'
                   'material = "42CrMo4+QT"\n')
        for mem, t, gap in ((f"leg_left{s}", 20, None), (f"leg_right{s}", 20, 2), ("load", 36, 3),
                            (f"leg_right{s}", 20, 3), (f"leg_left{s}", 20, 2)):
            out.append(f"[[pin.P_apex{s}.plate]]\n" + plate(mem, t, 180, 90, gap, None if mem == "load" else "S355"))
        for side, leg in (("L", "leg_left"), ("R", "leg_right")):
            out.append(f'[pin.P{side}{s}]\njoins = ["{leg}{s}.T"]\ndiameter = 30\nhole = 32\nmaterial = "42CrMo4+QT"\n')
            for mem, t, w, e, gap in ((f"tie{s}", 12, 80, 45, None), (f"{leg}{s}", 20, 100, 55, 1),
                                      (f"tie{s}", 12, 80, 45, 1)):
                out.append(f"[[pin.P{side}{s}.plate]]\n" + plate(mem, t, w, e, gap))
        for foot, leg in (("P_foot_left", "leg_left"), ("P_foot_right", "leg_right")):
            out.append(f'[pin.{foot}{s}]\njoins = ["{leg}{s}.F"]\ndiameter = 50\nhole = 52\nmaterial = "42CrMo4+QT"\n')
            for mem, t, gap in (("ground", 16, None), (f"{leg}{s}", 25, 2), ("ground", 16, 2)):
                out.append(f"[[pin.{foot}{s}.plate]]\n" + plate(mem, t, 150, 75, gap))
    return "\n".join(out)


def main() -> None:
    with tempfile.TemporaryDirectory() as tmp:
        path = os.path.join(tmp, "bench.toml")
        with open(path, "w", encoding="utf-8") as fh:
            fh.write(frame_text())
        job = load_job(path)
        t0 = time.perf_counter()
        res = run(job)
        t_run = time.perf_counter() - t0
        grades = alt.Every(alt.bolt_grade_names())
        diameters = [(10 + k) * 1e-3 for k in range(30)]
        t0 = time.perf_counter()
        base = alt.prepare(job)
        t_prep = time.perf_counter() - t0
        t0 = time.perf_counter()
        cmp = alt.compare(job, base=base, grades=grades, diameters=diameters)
        t_cmp = time.perf_counter() - t0
        n_opt = sum(len(s.options) for s in cmp.sweeps.values())
        print(f"frame: {len(base.pin_rows)} checked pins, {base.nc} combinations; one ordinary run: "
              f"{len(res)} check rows in {t_run * 1e3:.1f} ms")
        print(f"alternatives: {len(grades)} bolt grades x {len(diameters)} diameters per pin = {n_opt} (pin, "
              f"alternative) pairs ({sum(len(v) for v in cmp.skipped.values())} that do not fit left out)")
        print(f"prepare (solve once, record columns): {t_prep * 1e3:.1f} ms")
        print(f"compare (build columns, kernels once, reduce): {t_cmp * 1e3:.1f} ms")
        print(f"estimate for one ordinary run per alternative instead: {t_run * n_opt / len(base.pin_rows):.1f} s")
        t0 = time.perf_counter()
        sz = alt.size(job, base=base)
        t_size = time.perf_counter() - t0
        print(f"size (every pin: series search, then the exact limits by root finding): {t_size:.2f} s, "
              f"{sum(s.option is not None for s in sz.sized.values())} of {len(sz.sized)} pins sized")
        t0 = time.perf_counter()
        rt = alt.rate(job, label="hook")
        t_rate = time.perf_counter() - t0
        print(f"rate (hook loads, {rt.evaluations} full runs): {t_rate:.2f} s, factor {rt.factor:.4f}")


if __name__ == "__main__":
    main()
