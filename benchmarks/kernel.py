"""Check kernel: rows of the results table per second, and against a plain loop with pint quantities.

The rows are those of the bundled demo job (examples/a_frame_gantry.toml, an invented A-frame gantry):
its pin and plate columns, exactly as pinchk.checks.run_checks hands them to the method, are repeated
until the results table has the wanted number of rows. The kernel is what runs per row: the method's
check functions (EN 1993-1-8 for the demo) and the assembly of the long results table
(pinchk.checks.check_table). A row is one check of one pin or plate in one load case.

The plain loop is what a script would do: take one pin or plate in one case at a time, make pint
quantities of its figures and evaluate the same EN 1993-1-8 checks one by one. Its utilizations are
compared with the kernel's, so the two surely compute the same thing.
"""

from __future__ import annotations

import math
import time
from contextlib import contextmanager
from pathlib import Path

import numpy as np

import pinchk
from pinchk import checks
from pinchk.methods import METHODS

DEMO = Path(__file__).resolve().parent.parent / "examples" / "a_frame_gantry.toml"


@contextmanager
def _captured(mod):
    """Record what run_checks gives the method and the table builder."""
    got: dict[str, object] = {}
    pin, plate, table = mod.pin_checks, mod.plate_checks, checks.check_table

    def cap_pin(P, f, v):
        got.setdefault("P", P)  # the first call: the pins (later calls may be other kinds of part)
        got["f"], got["v"] = f, v
        return pin(P, f, v)

    def cap_plate(Q, f, v):
        got.setdefault("Q", Q)  # the first call: the plates (a later one: bushes)
        got["f"], got["v"] = f, v
        return plate(Q, f, v)

    def cap_table(blocks, cases, *rest):
        got["blocks"], got["cases"] = blocks, cases
        return table(blocks, cases, *rest)

    mod.pin_checks, mod.plate_checks, checks.check_table = cap_pin, cap_plate, cap_table
    try:
        yield got
    finally:
        mod.pin_checks, mod.plate_checks, checks.check_table = pin, plate, table


class Rows:
    """The demo's check inputs, repeated ``reps`` times (every pin and plate renamed per copy)."""

    def __init__(self, reps: int, job_path: Path = DEMO) -> None:
        job = pinchk.load_job(str(job_path))
        self.mod = METHODS[job.method.name]
        with _captured(self.mod) as got:
            pinchk.run(job)
        (_, pin_lab, pin_st, *pin_more), (_, plate_lab, plate_st, *plate_more) = got["blocks"][:2]
        self.f, self.variant, self.cases = got["f"], got["v"], got["cases"]

        def tile(cols):
            return {k: np.tile(np.asarray(v), reps) for k, v in cols.items()}

        def labels(lab):
            return [(f"{p}#{r}", q) for r in range(reps) for p, q in lab]

        def more(extra):  # the per-row notes of the block, if any
            return [None if x is None else np.tile(np.asarray(x, dtype=object), reps).tolist() for x in extra]

        self.P, self.pin_lab, self.pin_stack = tile(got["P"]), labels(pin_lab), np.tile(pin_st, reps)
        self.Q, self.plate_lab, self.plate_stack = tile(got["Q"]), labels(plate_lab), np.tile(plate_st, reps)
        self.pin_more, self.plate_more = more(pin_more), more(plate_more)

    def kernel(self) -> dict[str, object]:
        """The method's checks over every row and the long results table: the timed work."""
        m, f, v = self.mod, self.f, self.variant
        pc, qc = m.pin_checks(self.P, f, v), m.plate_checks(self.Q, f, v)
        blocks = [(pc, self.pin_lab, self.pin_stack, *self.pin_more),
                  (qc, self.plate_lab, self.plate_stack, *self.plate_more)]
        return checks.check_table(blocks, self.cases)


def rows_per_rep() -> int:
    return len(Rows(1).kernel()["check"])


def time_kernel(n_rows: int, repeat: int) -> tuple[int, float]:
    """(rows in the table, best time [s]) for a table of about ``n_rows`` rows."""
    rows = Rows(max(1, round(n_rows / rows_per_rep())))
    best, n = math.inf, 0
    for _ in range(repeat):
        t = time.perf_counter()
        cols = rows.kernel()
        best = min(best, time.perf_counter() - t)
        n = len(cols["check"])
        del cols
    return n, best


def pint_loop(rows: Rows) -> dict[tuple[str, str, str, str], float]:
    """The EN 1993-1-8 checks of every row, one row and one check at a time, with pint quantities."""
    from pinchk.units import ureg

    Q_ = ureg.Quantity
    g0, g2, g6 = rows.f["gamma_M0"], rows.f["gamma_M2"], rows.f["gamma_M6_ser"]
    nc = len(rows.cases)
    out: dict[tuple[str, str, str, str], float] = {}

    def util(demand, capacity) -> float:
        cap = capacity.to(demand.units).magnitude if hasattr(capacity, "units") else capacity
        dem = demand.magnitude if hasattr(demand, "units") else demand
        return dem / cap if cap > 0 else math.inf

    def put(key, demand, capacity) -> None:
        """Record a check, unless the capacity is unbounded (no free edge ahead of the force: no row)."""
        cap = capacity.to(demand.units).magnitude if hasattr(capacity, "units") else capacity
        if not math.isinf(cap):
            out[key] = util(demand, capacity)

    P = rows.P
    assert not P["bolt"].any(), "the loop covers pins, not bolts"
    for i in range(len(P["d"])):
        pin, case = rows.pin_lab[i // nc][0], rows.cases[i % nc]
        d, fup, fyp = Q_(P["d"][i], "m"), Q_(P["fup"][i], "Pa"), Q_(P["fyp"][i], "Pa")
        V, M = Q_(P["V"][i], "N"), Q_(P["M"][i], "N*m")
        A = math.pi * d**2 / 4
        Wel = math.pi * d**3 / 32
        if P["uls"][i]:
            Fv_Rd = 0.6 * A * fup / g2
            M_Rd = 1.5 * Wel * fyp / g0
            put((pin, "pin", "pin shear", case), V, Fv_Rd)
            put((pin, "pin", "pin bending", case), M, M_Rd)
            inter = ((M / M_Rd) ** 2 + (V / Fv_Rd) ** 2).to("dimensionless").magnitude
            put((pin, "pin", "pin shear + bending", case), inter, 1.0)
        if P["ser"][i]:
            put((pin, "pin", "pin bending (serviceability)", case), M, 0.8 * Wel * fyp / g6)
        # §3.13.1: a pin at risk of working loose is secured (a yes/no row: 0 of 1 when the job says so)
        put((pin, "pin", "pin secured", case), 0.0 if P["secured"][i] else 1.0, 1.0 if P["secured"][i] else 0.0)
    Q = rows.Q
    for i in range(len(Q["F"])):
        (pin, part), case = rows.plate_lab[i // nc], rows.cases[i % nc]
        F, t, d, d0 = Q_(Q["F"][i], "N"), Q_(Q["t"][i], "m"), Q_(Q["d"][i], "m"), Q_(Q["d0"][i], "m")
        fy, E = Q_(Q["fy"][i], "Pa"), Q_(Q["E"][i], "Pa")
        fy_low = min(fy, Q_(Q["fyp"][i], "Pa"))
        a_end, width = Q_(Q["a_end"][i], "m"), Q_(Q["width"][i], "m")
        key = (pin, part)
        if Q["uls"][i]:
            put((*key, "bearing", case), F, 1.5 * t * d * fy_low / g0)
            base = F * g0 / (2 * t * fy)
            if Q["type_b"][i]:
                put((*key, "thickness (type B)", case), (0.7 * (F * g0 / fy) ** 0.5).to("m"), t)
                put((*key, "hole to thickness (type B)", case), d0, 2.5 * t)
            else:
                put((*key, "end distance (type A)", case), (base + 2 * d0 / 3).to("m"), a_end - d0 / 2)
                put((*key, "edge distance (type A)", case), (base + d0 / 3).to("m"), width / 2 - d0 / 2)
        if Q["ser"][i]:
            put((*key, "bearing (serviceability)", case), F, 0.6 * t * d * fy_low / g6)
            sigma = (0.591 * (E * F * (d0 - d) / (d**2 * t)) ** 0.5).to("Pa")
            put((*key, "contact stress", case), sigma, 2.5 * fy_low / g6)
    return out


def against_pint(n_rows: int = 10_000, repeat: int = 5) -> dict[str, float]:
    """Kernel and plain pint loop on the same rows: times, and the largest difference of utilization."""
    rows = Rows(max(1, round(n_rows / rows_per_rep())))
    best = math.inf
    for _ in range(repeat):
        t = time.perf_counter()
        cols = rows.kernel()
        best = min(best, time.perf_counter() - t)
    t = time.perf_counter()
    loop = pint_loop(rows)
    t_loop = time.perf_counter() - t
    mine = {k: u for k, u in zip(zip(cols["pin"], cols["part"], cols["check"], cols["case"], strict=True),
                                 cols["utilization"].tolist(), strict=True)}
    if set(mine) != set(loop):
        raise AssertionError(f"the loop and the kernel check different rows: {len(mine)} against {len(loop)}")
    diff = max(abs(mine[k] - loop[k]) / max(abs(loop[k]), 1e-300) for k in loop)
    return {"rows": len(loop), "kernel_s": best, "loop_s": t_loop, "ratio": t_loop / best, "max_rel_diff": diff}


if __name__ == "__main__":
    for n in (1_000, 100_000):
        rows, t = time_kernel(n, 5)
        print(f"{rows:>10d} rows  {t * 1e3:9.2f} ms  {rows / t:14,.0f} rows/s")
    print(against_pint())
