"""pinchk.stack: the pin as a short beam through its plates.

Checks against an independent evaluation of the same beam model: each plate's force spread uniformly
over its thickness (the EN 1993-1-8 Fig. 3.11 assumption), the moment M(z) of everything to the left
of z summed in closed form on a fine grid along the pin, and (for an unsymmetric stack) the net couple
held by equal end couples, pinchk's stated assumption. The published clevis and single-lap formulas
are in tests/validation/test_en1993_1_8.py.
"""

from __future__ import annotations

import numpy as np
import pytest

from pinchk.frame import PinForces, solve
from pinchk.jobfile import load_job
from pinchk.model import Material, Pin, Plate
from pinchk.stack import shares, solve_stack

from .conftest import DEMO

MM, KN = 1e-3, 1e3
STEEL = Material("S355", 355e6, 470e6, 210e9, "test")


def brute_force_moment(t, gaps, f, n=20001):
    """Largest |M(z)| along the pin, from plates of thickness t[i] after gaps[i], each pushing the pin
    with the force vector f[i] spread evenly over its thickness; the net couple C of the forces is held
    by end couples C/2 at both faces (M(0) = C/2)."""
    t, gaps, f = np.asarray(t), np.asarray(gaps), np.asarray(f, float)
    z0 = np.cumsum(gaps + np.concatenate([[0.0], t[:-1]]))
    z1 = z0 + t
    zc = (z0 + z1) / 2
    C = (f * zc[:, None]).sum(axis=0)
    z = np.linspace(0.0, z1[-1], n)
    M = np.tile(C / 2, (n, 1))
    for i in range(len(t)):
        inside = np.clip(z - z0[i], 0.0, t[i])  # loaded length of plate i left of z
        part = inside / t[i]  # share of its force left of z
        centre = z0[i] + inside / 2  # where that part acts
        M += (part * (z - centre))[:, None] * f[i][None, :]
    return np.linalg.norm(M, axis=1).max()


def make_pin(t, gaps, members):
    stack = tuple(Plate(m, ti, g, None, STEEL, 100 * MM, 60 * MM, "round", 41 * MM, "A")
                  for m, ti, g in zip(members, t, gaps, strict=True))
    return Pin("P", (0.0, 0.0), tuple(dict.fromkeys(members)), 40 * MM, STEEL, stack)


@pytest.mark.parametrize("seed", range(6))
def test_general_stack_matches_brute_force(seed):
    """Random stacks of 3 to 6 plates of 3 members, forces in any direction, summing to zero."""
    rng = np.random.default_rng(seed)
    n = int(rng.integers(3, 7))
    members = ["a", "b", "c"] * 2
    members = members[:n]
    t = rng.uniform(8, 40, n) * MM
    gaps = np.concatenate([[0.0], rng.uniform(0, 5, n - 1)]) * MM
    pin = make_pin(t, gaps, members)
    uniq = list(dict.fromkeys(members))
    F = rng.normal(size=(len(uniq), 2)) * 100 * KN
    F[-1] = -F[:-1].sum(axis=0)  # the pin is in equilibrium
    pf = PinForces("P", tuple(uniq), F[None])
    st = solve_stack(pin, pf)
    share, _ = shares(pin)
    plate_on_pin = np.array([-F[uniq.index(m)] * s for m, s in zip(members, share, strict=True)])
    ref = brute_force_moment(t, gaps, plate_on_pin)
    assert st.moment[0] == pytest.approx(ref, rel=1e-6)  # the grid resolves the peak to ~1e-8
    assert st.imbalance[0] == pytest.approx(0.0, abs=1e-9 * np.abs(F).max())


def test_demo_stacks_match_brute_force():
    """Every checked pin of the demo, every case, against the brute-force beam."""
    job = load_job(DEMO)
    sol = solve(job)
    for name, pin in job.pins.items():
        st = solve_stack(pin, sol.pins[name])
        share, _ = shares(pin)
        pf = sol.pins[name]
        col = [pf.members.index(p.member) for p in pin.stack]
        for j in range(len(sol.cases)):
            f = -pf.force[j, col] * share[:, None]
            ref = brute_force_moment([p.thickness for p in pin.stack], [p.gap for p in pin.stack], f)
            assert st.moment[j] == pytest.approx(ref, rel=1e-6), (name, j)


def test_shear_planes_of_a_clevis():
    """A clevis has two shear planes, each carrying F/2 (EN 1993-1-8 Table 3.10: per shear plane)."""
    pin = make_pin([12 * MM, 20 * MM, 12 * MM], [0, 1 * MM, 1 * MM], ["fork", "eye", "fork"])
    F = np.array([30.0, -40.0]) * KN  # |F| = 50 kN
    st = solve_stack(pin, PinForces("P", ("fork", "eye"), np.array([[-F, F]])))
    np.testing.assert_allclose(st.plane_shear[0], [25 * KN, 25 * KN], rtol=1e-12)


def test_shares_in_proportion_to_thickness():
    pin = make_pin([10 * MM, 20 * MM, 30 * MM], [0, 0, 0], ["fork", "eye", "fork"])
    s, note = shares(pin)
    np.testing.assert_allclose(s, [0.25, 1.0, 0.75], rtol=1e-14)
    assert "proportion to plate thickness" in note


def test_which_body_takes_a_load_changes_the_plate_forces(write_job):
    """The demo's 10 kN side pull acts on leg_left's lugs at the apex; moved onto the apex pin itself
    (as a second load on the shackle), each of leg_left's two plates there receives P/2 more
    (Newton's third law at the pin, shares by thickness 20/40), and the shackle's plate takes it."""
    body_text = DEMO.read_text()
    line = next(ln for ln in body_text.splitlines(keepends=True) if ln.startswith('body = "leg_left"'))
    pin_text = body_text.replace(line, "")
    assert pin_text != body_text
    P = np.array([10e3, 0.0])
    res = {}
    for key, text in (("body", body_text), ("pin", pin_text)):
        job = load_job(write_job(text, name=f"{key}.toml"))
        sol = solve(job)
        res[key] = solve_stack(job.pins["P_apex"], sol.pins["P_apex"]), sol.cases.index("lift_side")
    (st_b, j), (st_p, _) = res["body"], res["pin"]
    members = [p.member for p in load_job(DEMO).pins["P_apex"].stack]
    for k, m in enumerate(members):
        if m == "leg_left":
            np.testing.assert_allclose(st_p.plate_force[j, k], st_b.plate_force[j, k] + P / 2, rtol=1e-12)
        elif m == "load":
            np.testing.assert_allclose(st_p.plate_force[j, k], st_b.plate_force[j, k] - P, rtol=1e-12)
        else:
            np.testing.assert_allclose(st_p.plate_force[j, k], st_b.plate_force[j, k], rtol=1e-12)
    assert st_p.moment[j] != pytest.approx(st_b.moment[j], rel=1e-3)
