"""The vectorized results table (checks.check_table) and grade look-ups against their loop versions.

The reference is the row-by-row assembly run_checks used before it was vectorized (reproduced below),
and the per-row dictionary look-up of EN 1993-1-8 Table 3.4 αv and AISC 360-16 Table J3.2 Fnv. The
check values are invented; what is tested is that both ways give the same table.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

import pinchk
from pinchk import joint
from pinchk.checks import COLUMNS, check_table
from pinchk.methods import aisc360_16, en1993_1_8, make_check
from pinchk.methods._lookup import per_text


def _loop_table(blocks, cases, dropped=None):
    """run_checks' table as it was built before: Python lists, one row at a time (its emit())."""
    dropped = [0] if dropped is None else dropped
    nc = len(cases)
    cols = {k: [] for k in COLUMNS}
    for checks, labels, stack_text, *more in blocks:
        notes, keep = (list(more) + [None, None])[:2]
        n = len(labels)
        pins_ = np.repeat([p for p, _ in labels], nc) if n else np.array([], dtype=str)
        parts = np.repeat([q for _, q in labels], nc) if n else np.array([], dtype=str)
        case_col = np.tile(np.array(cases, dtype=object), n)
        for ch in checks:
            if keep is not None and not keep(ch.name):
                continue
            mask = np.ones(n * nc, bool) if ch.mask is None else np.asarray(ch.mask, bool)
            unbounded = mask & np.isposinf(ch.capacity)
            dropped[0] += int(unbounded.sum())
            mask = mask & ~unbounded
            if not mask.any():
                continue
            dem, cap = ch.demand[mask], ch.capacity[mask]
            with np.errstate(divide="ignore", invalid="ignore"):
                util = np.where(cap > 0, dem / np.where(cap > 0, cap, 1.0), np.inf)
            k = int(mask.sum())
            cols["pin"] += list(pins_[mask])
            cols["part"] += list(parts[mask])
            cols["check"] += [ch.name] * k
            cols["case"] += list(case_col[mask])
            cols["demand"].append(dem)
            cols["capacity"].append(cap)
            cols["kind"] += [ch.kind] * k
            cols["utilization"].append(util)
            cols["status"] += ["pass" if u <= 1.0 else "FAIL" for u in util]
            cols["clause"] += [ch.clause] * k
            cols["formula"] += [ch.formula] * k
            stack = stack_text[mask] if ch.uses_forces else [""] * k
            cols["factors"] += [ch.factors + ("; " if ch.factors and s else "") + s for s in stack]
            if notes is None or any(w in ch.name for w in joint.OUTLINE_FREE):
                cols["note"] += [ch.note] * k
            else:
                cols["note"] += ["; ".join(x for x in (ch.note, notes[i]) if x) for i in np.flatnonzero(mask)]
            cols["worked_demand"] += [ch.worked[0]] * k
            cols["worked_capacity"] += [ch.worked[1]] * k
            vals = [(sym, kd, np.broadcast_to(np.asarray(v, float), mask.shape)[mask]) for sym, kd, v in ch.terms]
            cols["terms"] += [tuple((sym, kd, float(a[r])) for sym, kd, a in vals) for r in range(k)]
    out = {}
    for k in COLUMNS:
        if k in ("demand", "capacity", "utilization"):
            out[k] = np.concatenate(cols[k]) if cols[k] else np.zeros(0)
        elif k == "terms":
            out[k] = tuple(cols[k])
        else:
            out[k] = tuple(str(x) for x in cols[k])
    return out


def _blocks(rng, stacks):
    cases = ("lift", "side", "test")
    nc = len(cases)
    pins = [(f"P{i}", "pin") for i in range(5)]
    plates = [(f"P{i}", f"leg {j}/2") for i in range(5) for j in (1, 2)]
    blocks = []
    for labels in (pins, plates):
        n = len(labels) * nc
        dem = rng.uniform(0, 2, n)
        cap = rng.uniform(0.5, 1.5, n)
        cap[::7] = 0.0  # no capacity: utilization inf
        dem[::11] = np.nan  # a figure that could not be worked out: it fails
        checks = [make_check("a", "X 1: a <= b", "force", dem, cap, "γ = 1",
                             terms=(("F", "force", dem), ("t", "length", 0.02)), worked=("{F}", "{t} x 2")),
                  make_check("b", "X 2: c <= d", "length", dem * 2, cap, "", mask=rng.random(n) < 0.5),
                  make_check("c", "X 3: e <= f", "ratio", dem, cap, "γ = 2", mask=np.zeros(n, bool)),
                  make_check("d", "X 4: g <= h", "length", dem, cap, "γ = 3", uses_forces=False, note="n"),
                  make_check("bearing", "X 5: i <= j", "force", dem, np.where(cap > 1.3, np.inf, cap), "",
                             note="m"),
                  make_check("skip me", "X 6: k <= l", "force", dem, cap, "")]
        notes = list(rng.choice(["", "off axis", "off axis 20°"], n))
        blocks.append((checks, labels, np.array(rng.choice(stacks, n), dtype=object), notes,
                       lambda name: name != "skip me"))
    return blocks, cases


@pytest.mark.parametrize("stacks", [[""], ["dynamic 1.15"], ["", "dynamic 1.15", "skew 1.25; dynamic 1.15"]])
def test_check_table_as_the_loop_built_it(stacks):
    blocks, cases = _blocks(np.random.default_rng(len(stacks)), stacks)
    d_new, d_old = [0], [0]
    new, old = check_table(blocks, cases, d_new), _loop_table(blocks, cases, d_old)
    assert d_new == d_old and d_new[0] > 0  # rows of unbounded capacity left out, and counted
    for k in COLUMNS:
        if k == "terms":  # read lazily, row by row, from the method's arrays
            assert len(new[k]) == len(old[k]) and repr(tuple(new[k])) == repr(old[k])
            assert repr(new[k][-1]) == repr(old[k][-1]) and repr(new[k][1:3]) == repr(list(old[k][1:3]))
        elif isinstance(old[k], tuple):  # text: read row by row from a code per row into a few texts
            assert len(new[k]) == len(old[k]) and repr(tuple(new[k])) == repr(old[k]), k
            assert new[k] == old[k] and new[k] == list(old[k]) and all(type(x) is str for x in new[k]), k
            assert [new[k][i] for i in (0, -1, len(old[k]) // 2)] == [old[k][i] for i in (0, -1, len(old[k]) // 2)]
            assert new[k][2:5] == list(old[k][2:5]) and np.array(new[k]).tolist() == list(old[k]), k
        else:
            np.testing.assert_array_equal(new[k], old[k])
    assert "FAIL" in new["status"] and "pass" in new["status"]


def test_check_table_empty():
    cols = check_table([], ("c1",))
    assert all(tuple(cols[k]) == () for k in COLUMNS if k not in ("demand", "capacity", "utilization"))
    assert cols["utilization"].shape == (0,)


def test_demo_results_unchanged_by_the_table_builder(monkeypatch):
    path = str(Path(__file__).resolve().parent.parent / "examples" / "a_frame_gantry.toml")
    new = pinchk.run(path).columns
    monkeypatch.setattr(pinchk.checks, "check_table", _loop_table)
    old = pinchk.run(path).columns
    for k in COLUMNS:
        if isinstance(old[k], tuple):
            assert tuple(new[k]) == old[k], k  # terms: a lazy column, read row by row
        else:
            np.testing.assert_array_equal(new[k], old[k])


def test_grade_lookups_as_per_row():
    grades = ["8.8", "", "10.9", "4.6", "A325", "A490M", "X", "8.8"] * 3
    fu = np.linspace(400e6, 1040e6, len(grades))
    assert np.array_equal(en1993_1_8.alpha_v_thread(grades),
                          [en1993_1_8.ALPHA_V_THREAD.get(g, 0.5) for g in grades])
    n, x = aisc360_16.fnv(grades, fu)
    assert np.array_equal(n, [aisc360_16.FNV[g][0] if g in aisc360_16.FNV else aisc360_16.FNV_RATIO[0] * u
                              for g, u in zip(grades, fu, strict=True)])
    assert np.array_equal(x, [aisc360_16.FNV[g][1] if g in aisc360_16.FNV else aisc360_16.FNV_RATIO[1] * u
                              for g, u in zip(grades, fu, strict=True)])
    assert np.array_equal(per_text([""] * 4, {"": 2.0}, 1.0), [2.0] * 4)
    assert per_text([], {"a": 1.0}, 0.0).shape == (0,)


def test_rows_read_whole_columns_as_row_reads_one():
    res = pinchk.run(str(Path(__file__).resolve().parent.parent / "examples" / "a_frame_gantry.toml"))
    assert repr(res.rows()) == repr([res.row(i) for i in range(len(res))])
    assert repr(res.rows(sort=True)) == repr([res.row(int(i)) for i in res.order])
