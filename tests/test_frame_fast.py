"""The vectorized frame solve against its loop-based first version and against the method of sections.

References:
    tests/frame_loops.py: pinchk/frame.py as first written (entry by entry, Python loops), frozen; the
        vectorized assembly must give the same matrix, right-hand side, numbering, forces, residual
        and messages.
    R. C. Hibbeler, Engineering Mechanics: Statics, 14th ed., §6.4 "The method of sections": the
        chord force of a truss is the bending moment of the whole span about the opposite joint,
        divided by the depth.
Frames are generated Warren trusses (benchmarks/frames.py), invented for the purpose.
"""

from __future__ import annotations

import dataclasses
from pathlib import Path

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

import pinchk
from benchmarks.frames import truss
from pinchk import frame
from pinchk.errors import StructureError
from pinchk.model import Link, Support

from . import frame_loops as ref

ROOT = Path(__file__).resolve().parent.parent
FRAME_EXAMPLES = [p for p in sorted((ROOT / "examples").glob("*.toml")) if pinchk.load_job(str(p)).bodies]


def _same_assembly(job) -> None:
    A0, b0, n0 = ref.assemble(job)
    A1, b1, n1 = frame.assemble(job)
    assert A0.shape == A1.shape
    assert (A0 != A1).nnz == 0  # the same matrix to the last bit
    assert np.array_equal(b0, b1)
    assert n0["eqs"].owner == n1["eqs"].owner and n0["unk"].owner == n1["unk"].owner
    for key in ("cases", "members", "L", "link_col", "sup_col"):
        assert n0[key] == n1[key], key
    pairs = [(p, b) for p, pin in job.pins.items() for b in pin.bodies]
    assert n0["pin_body_col"] == dict(zip(pairs, n1["pb_col"].tolist(), strict=True))
    if A0.shape[0] != A0.shape[1]:
        return  # not determinate (an example for the stiffness solve): nothing to solve here
    # the same forces from the same solution vector
    x = ref.spla.splu(A0.tocsc()).solve(b0)
    s0, s1 = ref._collect(job, x, n0), frame._collect(job, x, n1)
    assert s0.residual == s1.residual
    assert s1.residual == frame.equilibrium_residual(job, s1)
    for p, pf in s0.pins.items():
        assert s1.pins[p].members == pf.members
        assert np.array_equal(s1.pins[p].force, pf.force), p
    for name, t in s0.links.items():
        assert np.array_equal(s1.links[name], t)
    for name, r in s0.supports.items():
        assert np.array_equal(s1.supports[name], r)


@pytest.mark.parametrize("path", FRAME_EXAMPLES, ids=lambda p: p.name)
def test_examples_assemble_as_before(path):
    _same_assembly(pinchk.load_job(str(path)))


@settings(max_examples=25, deadline=None)
@given(n=st.integers(3, 80), cases=st.integers(1, 4), link_every=st.integers(0, 4),
       jitter=st.floats(0.0, 0.2), seed=st.integers(0, 10_000), body_support=st.booleans())
def test_random_trusses_assemble_as_before(n, cases, link_every, jitter, seed, body_support):
    _same_assembly(truss(n, cases, link_every=link_every, jitter=jitter, seed=seed, body_support=body_support))


def test_large_truss_assembles_as_before():
    _same_assembly(truss(600, 3, link_every=3, jitter=0.1, seed=5))  # 2,000+ unknowns: the sparse path


@pytest.mark.parametrize("n", [40, 120])  # below and above SVD_FIRST_LIMIT unknowns
def test_solve_as_the_loop_version(n, monkeypatch):
    job = truss(n, 3, link_every=3, jitter=0.1, seed=n)
    s_ref = ref.solve(job)
    # SuperLU with determinacy by the factor's pivots and the loop version's SuperLU settings: the
    # same bits
    monkeypatch.setattr(frame, "SVD_FIRST_LIMIT", 0)
    with monkeypatch.context() as m:
        m.setattr(frame, "SPLU_OPTIONS", {})
        s = frame.solve(job)
    assert s.residual == s_ref.residual
    for p, pf in s_ref.pins.items():
        assert np.array_equal(s.pins[p].force, pf.force), p
    # with pinchk's own SuperLU settings (no relaxed supernodes): the same forces to round-off
    s = frame.solve(job)
    scale = max(np.abs(pf.force).max() for pf in s_ref.pins.values())
    assert s.residual < 1e-12
    for p, pf in s_ref.pins.items():
        np.testing.assert_allclose(s.pins[p].force, pf.force, rtol=1e-12, atol=1e-12 * scale, err_msg=p)
    # a small frame solved dense after the SVD (no scipy): the same forces to round-off
    monkeypatch.setattr(frame, "SVD_FIRST_LIMIT", 10**9)
    s = frame.solve(job)
    assert s.residual < 1e-12
    for p, pf in s_ref.pins.items():
        np.testing.assert_allclose(s.pins[p].force, pf.force, rtol=1e-12, atol=1e-12 * scale, err_msg=p)


@pytest.mark.parametrize("panels", [3, 8, 30])
def test_bottom_chord_by_the_method_of_sections(panels):
    """Hibbeler §6.4: uniform load P at every top joint, simply supported; the bottom chord of panel i
    carries T = M / h in tension, M the span's moment about the top joint T_i above it."""
    w, h, P = 2.0, 1.5, 10e3  # the generator's panel, depth and load (case c1, downward)
    job = truss(4 * panels - 1, 1, panel=w, height=h)
    sol = frame.solve(job)
    R = panels * P / 2
    for i in range(panels):
        x = (i + 0.5) * w
        M = R * x - sum(P * (x - (k + 0.5) * w) for k in range(i))
        fx, fy = sol.pins[f"B{i + 1}"].force[0, sol.pins[f"B{i + 1}"].members.index(f"b{i}")]
        assert fx == pytest.approx(M / h, rel=1e-12)  # the pin pulls the chord toward B(i+1): tension
        assert abs(fy) <= 1e-9 * P


def _defect(job, member="d1"):
    """One diagonal removed and the roller made pinned: as many unknowns as equations, but one panel
    is a mechanism and the supports are indeterminate (the bottom chord is straight)."""
    bodies = {k: v for k, v in job.bodies.items() if k != member}
    pins = {k: dataclasses.replace(p, bodies=tuple(b for b in p.bodies if b != member))
            for k, p in job.pins.items()}
    sup = dict(job.supports)
    sup["right"] = Support("right", "pinned", sup["right"].at)
    return dataclasses.replace(job, bodies=bodies, pins=pins, supports=sup)


def _message(fn, job) -> str:
    with pytest.raises(StructureError) as exc:
        fn(job)
    return str(exc.value)


@pytest.mark.parametrize("n", [11, 60])  # dense SVD directly; sparse factor, then the SVD names where
def test_singular_frames_get_the_same_message(n):
    job = _defect(truss(n, 2))
    msg = _message(frame.solve, job)
    assert msg == _message(ref.solve, job)
    assert "mechanism with 1 degree(s) of freedom" in msg and "indeterminate to degree 1" in msg


def test_large_singular_frame_is_refused():
    job = _defect(truss(600, 1))  # 2,400 unknowns: above the dense SVD; SuperLU finds a zero pivot
    assert "equations are singular" in _message(frame.solve, job)


def test_large_singular_frame_with_a_tiny_pivot_is_refused():
    # SuperLU factors this singular matrix without complaint (its smallest pivot is ~1e-18 of the
    # largest); the loop version returned an answer, the pivot check refuses it
    job = _defect(truss(2000, 1))
    ref.solve(job)  # the old behaviour: no error
    assert "equations are singular" in _message(frame.solve, job)


def test_count_messages_for_large_frames_as_before():
    job = truss(600, 1)
    more = dataclasses.replace(job, supports={**job.supports, "right": Support("right", "pinned",
                                                                                job.supports["right"].at)})
    assert _message(frame.solve, more) == _message(ref.solve, more)
    assert "indeterminate to degree at least 1" in _message(frame.solve, more)


def test_cable_in_compression_same_message():
    job = truss(20, 2, link_every=1)  # every diagonal a link; half of them are pushed
    cables = {n: Link(n, "cable", lk.ends) for n, lk in job.links.items()}
    job = dataclasses.replace(job, links=cables)
    msg = _message(frame.solve, job)
    assert msg == _message(ref.solve, job)
    assert "would be in compression" in msg


def test_group_sums_add_in_order_both_ways(monkeypatch):
    """The rank-by-rank sums and the incidence-matrix product both add each group's items in order:
    the same bits as a plain loop."""
    import scipy.sparse  # noqa: F401  (the product is used only once scipy is loaded)

    rng = np.random.default_rng(3)
    groups = rng.integers(0, 40, 500)
    values = rng.standard_normal((500, 3, 2)) * 10.0 ** rng.integers(-6, 6, (500, 3, 2))
    rows = rng.permutation(500)
    loop = np.zeros((40, 3, 2))
    for g, r in zip(groups, rows, strict=True):
        loop[g] += values[r]
    for size in (10**12, 0):  # rank by rank, then the sparse product
        monkeypatch.setattr(frame, "_SPARSE_SUM_SIZE", size)
        assert np.array_equal(frame._group_sum(values, groups, 40, rows=rows), loop)


def test_large_truss_forces_as_before_with_the_sparse_sums(monkeypatch):
    monkeypatch.setattr(frame, "_SPARSE_SUM_SIZE", 0)
    _same_assembly(truss(200, 2, link_every=2, jitter=0.05, seed=9, body_support=True))


@pytest.mark.parametrize("threads", [False, True])
def test_cases_in_blocks_give_the_same_bits(monkeypatch, threads):
    """Load cases solved, collected and checked in several blocks (side by side or one after another)
    give the same forces, reactions, tensions and residual to the last bit as all cases in one block,
    both from the solve and from equilibrium_residual; a wrong force in a later block is still seen."""
    job = truss(300, 9, link_every=3, jitter=0.1, seed=4, body_support=True)
    whole = frame.solve(job)
    slots = sum(len(pf.members) for pf in whole.pins.values())
    monkeypatch.setattr(frame, "BLOCK_SIZE", 2 * slots * 2)  # two cases a block: five blocks
    monkeypatch.setattr(frame, "THREAD_SIZE", 0 if threads else 10**12)
    monkeypatch.setattr(frame, "_cpus", lambda: 2)  # side by side even on a machine of one CPU
    assert len(frame._case_blocks(9, 2 * slots, 2 if threads else 1)) >= 5
    parts = frame.solve(job)
    assert parts.residual == whole.residual == frame.equilibrium_residual(job, parts)
    for p, pf in whole.pins.items():
        assert np.array_equal(parts.pins[p].force, pf.force), p
    for n, t in whole.links.items():
        assert np.array_equal(parts.links[n], t), n
    for n, r in whole.supports.items():
        assert np.array_equal(parts.supports[n], r), n
    bad = dataclasses.replace(parts, pins=dict(parts.pins))
    pf = bad.pins["T3"]
    f = pf.force.copy()
    scale = max(np.abs(q.force).max() for q in parts.pins.values())
    f[8, 0, 0] += 1e-3 * scale  # the last case, the last block
    bad.pins["T3"] = dataclasses.replace(pf, force=f)
    assert frame.equilibrium_residual(job, bad) > 1e-4
