"""Start-up: `pinchk --help` and a demo run to a terminal table, against `import numpy, pint` with a
unit registry, each in a fresh Python process, in turns (so a busy moment hits all alike).

The demo run's figure is with pint's cache of its parsed definitions in place (pinchk asks pint for
it; the first run after installing pint writes it); the cold figure parses them (PINCHK_UNIT_CACHE=0).
"""

from __future__ import annotations

import os
import statistics
import subprocess
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
DEMO = str(ROOT / "examples" / "a_frame_gantry.toml")

COMMANDS = {
    "baseline": [sys.executable, "-c", "import numpy, pint; pint.UnitRegistry()"],
    "help": [sys.executable, "-m", "pinchk", "--help"],
    "run": [sys.executable, "-m", "pinchk", "run", DEMO],
    "run (unit cache off)": [sys.executable, "-m", "pinchk", "run", DEMO],
}


def _env(name: str) -> dict[str, str]:
    env = dict(os.environ)
    env["PYTHONPATH"] = str(ROOT) + os.pathsep + env.get("PYTHONPATH", "")
    if name == "run (unit cache off)":
        env["PINCHK_UNIT_CACHE"] = "0"
    return env


def _imports(argv: list[str]) -> set[str]:
    """Modules a command imports."""
    res = subprocess.run([sys.executable, "-X", "importtime", *argv[1:]], capture_output=True, text=True,
                         env=_env("run"), cwd=ROOT)
    return {ln.split("|")[-1].strip() for ln in res.stderr.splitlines() if "|" in ln}


def measure(rounds: int = 15) -> dict[str, dict[str, float]]:
    times: dict[str, list[float]] = {k: [] for k in COMMANDS}
    subprocess.run(COMMANDS["run"], env=_env("run"), cwd=ROOT, stdout=subprocess.DEVNULL)  # warm pint's cache
    for _ in range(rounds):
        for name, argv in COMMANDS.items():
            t = time.perf_counter()
            subprocess.run(argv, env=_env(name), cwd=ROOT, stdout=subprocess.DEVNULL, check=False)
            times[name].append(time.perf_counter() - t)
    return {k: {"min": min(v), "median": statistics.median(v)} for k, v in times.items()}


def heavy_imports() -> set[str]:
    """Which of pandas, matplotlib, jinja2 a plain table run imports (it needs numpy, pint, scipy.sparse
    for the frame solve, tabulate)."""
    return _imports(COMMANDS["run"]) & {"pandas", "matplotlib", "jinja2"}


if __name__ == "__main__":
    for name, r in measure().items():
        print(f"{name:24s} min {r['min'] * 1e3:7.1f} ms  median {r['median'] * 1e3:7.1f} ms")
    print("heavy imports of a table run:", sorted(heavy_imports()) or "none")
