"""Benchmark (prints figures, asserts nothing): reading, mapping, checking and writing a forces file.

An invented job without a frame: N clevis pins (a lug between two clevis plates), C load cases, so the
forces file has 2·N·C rows. Run: python benchmarks/forcesfile_bench.py [N] [C]
"""

from __future__ import annotations

import sys
import tempfile
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

from pinchk import load_job, run  # noqa: E402
from pinchk.forcesfile import render_forces  # noqa: E402

PIN = """
[pin.P{i}]
diameter = 30
hole = 32
material = "42CrMo4+QT"
[[pin.P{i}.plate]]
member = "clevis"
thickness = 12
material = "S355"
width = 90
end = 50
[[pin.P{i}.plate]]
member = "lug"
thickness = 20
material = "S355"
width = 100
end = 55
gap = 1
[[pin.P{i}.plate]]
member = "clevis"
thickness = 12
material = "S355"
width = 90
end = 50
gap = 1
"""


def main(n_pin: int = 1000, n_case: int = 10) -> None:
    with tempfile.TemporaryDirectory() as d:
        d = Path(d)
        lines = ["case,pin,member,fx [kN],fy [kN]"]
        for c in range(n_case):
            for i in range(n_pin):
                fx, fy = 10.0 + c, 50.0 + (i % 17)
                lines += [f"c{c},P{i},lug,{fx},{fy}", f"c{c},P{i},clevis,{-fx},{-fy}"]
        (d / "f.csv").write_text("\n".join(lines) + "\n", encoding="utf-8")
        job_text = ('[job]\ntitle = "bench (invented)"\n[units]\nlength = "mm"\n[method]\nname = "EN 1993-1-8"\n'
                    '[forces]\nfile = "f.csv"\n' + "".join(f"[case.c{c}]\n" for c in range(n_case))
                    + "".join(PIN.format(i=i) for i in range(n_pin)))
        (d / "job.toml").write_text(job_text, encoding="utf-8")
        t0 = time.perf_counter()
        job = load_job(d / "job.toml")
        t1 = time.perf_counter()
        res = run(job)
        t2 = time.perf_counter()
        csv_text = render_forces(res.solution, "csv", "kN")
        t3 = time.perf_counter()
        json_text = render_forces(res.solution, "json", "kN")
        t4 = time.perf_counter()
    rows = 2 * n_pin * n_case
    print(f"{n_pin} pins x {n_case} cases = {rows} rows, {len(res)} check rows")
    print(f"load_job (TOML + forces CSV + mapping): {t1 - t0:.3f} s  ({rows / (t1 - t0):,.0f} rows/s overall)")
    print(f"run_checks:                             {t2 - t1:.3f} s")
    print(f"write CSV:                              {t3 - t2:.3f} s  ({len(csv_text) / 1e6:.1f} MB)")
    print(f"write JSON:                             {t4 - t3:.3f} s  ({len(json_text) / 1e6:.1f} MB)")


if __name__ == "__main__":
    main(*(int(a) for a in sys.argv[1:3]))
