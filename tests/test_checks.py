"""pinchk.checks: the long results table, for every registered method (parametrized over the same
registry pinchk dispatches through, so a new method is tested the day it is registered)."""

from __future__ import annotations

import numpy as np
import pytest

from pinchk import run
from pinchk.checks import COLUMNS
from pinchk.jobfile import load_job
from pinchk.methods import METHODS

from .conftest import DEMO


def demo_with(write_job, method, variant=None):
    text = DEMO.read_text()
    text = text.replace('name = "EN 1993-1-8"', f'name = "{method}"' + (f'\ndesign = "{variant}"' if variant else ""))
    text = text.replace("gamma_M0 = 1.00\ngamma_M2 = 1.25\n", "")
    return load_job(write_job(text))


CHOICES = [(name, v) for name, m in METHODS.items() for v in (m.VARIANTS or (None,))]


@pytest.mark.parametrize("method, variant", CHOICES)
def test_results_table_contract(write_job, method, variant):
    res = run(demo_with(write_job, method, variant))
    c = res.columns
    assert set(c) == set(COLUMNS) and len(res) > 0
    n = len(res)
    assert all(len(v) == n for v in c.values())
    util = c["utilization"]
    pos = c["capacity"] > 0
    np.testing.assert_allclose(util[pos], c["demand"][pos] / c["capacity"][pos], rtol=1e-14)
    assert np.all(np.isinf(util[~pos]))  # a capacity of zero cannot be met: infinite utilization, FAIL
    assert all(s == ("pass" if u <= 1 else "FAIL") for s, u in zip(c["status"], util, strict=True))
    assert all(cl for cl in c["clause"]) and all(f for f in c["formula"])
    g = res.governing
    assert util[g] == util.max()
    assert res.passed == bool((util <= 1).all())
    # every checked pin, every case, has its pin checks
    cases = set(res.solution.cases)
    for pin in res.job.pins:
        rows = [i for i in range(n) if c["pin"][i] == pin and c["part"][i] == "pin"]
        assert {c["case"][i] for i in rows} == cases
    frame = res.to_frame()
    assert list(frame.columns) == list(COLUMNS) and len(frame) == n


@pytest.mark.parametrize("method, variant", CHOICES)
def test_plate_force_is_the_force_its_member_receives(write_job, method, variant):
    """Each plate is checked with its share of the force its member receives at the pin."""
    res = run(demo_with(write_job, method, variant))
    st = res.stacks["PL"]
    pf = res.solution.pins["PL"]
    F_leg = np.linalg.norm(pf.force[:, pf.members.index("leg_left")], axis=-1)
    F_tie = np.linalg.norm(pf.force[:, pf.members.index("tie")], axis=-1)
    np.testing.assert_allclose(np.linalg.norm(st.plate_force[:, 1], axis=-1), F_leg, rtol=1e-14)
    np.testing.assert_allclose(np.linalg.norm(st.plate_force[:, 0], axis=-1), F_tie / 2, rtol=1e-14)


def test_every_method_module_declares_its_interface():
    for name, m in METHODS.items():
        assert m.NAME == name and m.EDITION
        assert all(isinstance(v[0], float) and v[0] > 0 and v[1] for v in m.FACTORS.values())
        assert callable(m.pin_checks) and callable(m.plate_checks)


def test_serviceability_checks_run_on_sls_cases_only(write_job):
    """EN 1993-1-8 Table 3.10 and eqs (3.14)-(3.16): the replaceable-pin checks use the serviceability
    case, the resistance checks the ultimate ones; other pins get no serviceability rows."""
    text = DEMO.read_text().replace('material = "42CrMo4+QT"', 'material = "42CrMo4+QT"\nreplaceable = true', 1)
    text += '''
[case.service]
description = "10 t on the hook, unfactored"
limit_state = "SLS"
[[load]]
case = "service"
at = "P_apex"
mass = "10 t"
'''
    res = run(load_job(write_job(text)))
    c = res.columns
    rows = list(zip(c["pin"], c["check"], c["case"], strict=True))
    ser_checks = {"contact stress", "bearing (serviceability)", "pin bending (serviceability)"}
    ser_rows = [r for r in rows if r[1] in ser_checks]
    assert {r[0] for r in ser_rows} == {"P_apex"}
    assert {r[2] for r in ser_rows} == {"service"}
    assert {r[1] for r in ser_rows} == ser_checks
    uls_rows = [r for r in rows if r[1] in {"bearing", "pin shear", "pin bending", "end distance (type A)"}]
    assert {r[2] for r in uls_rows} == {"lift", "lift_side"}
    assert not any("no SLS case" in a for a in res.assumptions)


def test_replaceable_pin_without_sls_case_uses_uls_forces(write_job):
    text = DEMO.read_text().replace('material = "42CrMo4+QT"', 'material = "42CrMo4+QT"\nreplaceable = true', 1)
    res = run(load_job(write_job(text)))
    c = res.columns
    cases = {k for p, ch, k in zip(c["pin"], c["check"], c["case"], strict=True) if ch == "contact stress"}
    assert cases == {"lift", "lift_side"}
    assert any("no SLS case" in a for a in res.assumptions)
