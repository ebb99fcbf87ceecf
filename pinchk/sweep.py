"""Load-angle sweep: every check of a lug plate as its force turns through 360° at its largest magnitude.

Booms and linkages load a lug from many directions; the sweep shows how near each check comes in any of
them, with the directions of the actual load cases marked on it. Angles are in the frame's coordinates,
counter-clockwise from +x [deg]. Ultimate-state checks only (those that apply to every ULS row).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import numpy.typing as npt

from . import joint
from .combine import row_factors
from .methods import METHODS

Array = npt.NDArray[np.float64]

STEP_DEG = 5.0


@dataclass(frozen=True)
class LugSweep:
    """Utilization of every check of one lug part against the direction of its force."""

    pin: str
    part: str
    force: float  # largest |F| of the part over the load cases [N], the magnitude swept
    axis_deg: float | None  # lug axis in the frame [deg]; None: the axis follows the force
    angle_deg: Array  # (n_angle,) directions swept
    checks: tuple[str, ...]
    util: Array  # (n_check, n_angle); nan where the check does not apply
    cases: tuple[str, ...]
    case_angle_deg: Array  # (n_case,) direction of each case's force on the part
    case_force: Array  # (n_case,) |F| of each case [N]
    case_util: Array  # (n_check, n_case): utilization at the swept magnitude in each case's direction

    def peak(self) -> tuple[float, float, str]:
        """(utilization, angle [deg], check) of the worst point of the sweep."""
        u = np.where(np.isnan(self.util), -np.inf, self.util)
        i, j = np.unravel_index(np.argmax(u), u.shape)
        return float(self.util[i, j]), float(self.angle_deg[j]), self.checks[i]

    def to_frame(self):
        """Long table: one row per (check, angle)."""
        import pandas as pd

        n = len(self.angle_deg)
        return pd.DataFrame({"pin": self.pin, "part": self.part, "check": np.repeat(self.checks, n),
                             "angle_deg": np.tile(self.angle_deg, len(self.checks)),
                             "utilization": self.util.ravel()})


def _utils(mod, Q, fac, variant) -> tuple[list[str], Array]:
    names, rows = [], []
    for ch in mod.plate_checks(Q, fac, variant):
        mask = np.ones(len(Q["F"]), bool) if ch.mask is None else np.asarray(ch.mask, bool)
        if not mask.any():
            continue
        with np.errstate(divide="ignore", invalid="ignore"):
            u = np.where(np.isposinf(ch.capacity), 0.0, ch.demand / ch.capacity)
        names.append(ch.name)
        rows.append(np.where(mask, u, np.nan))
    return names, np.array(rows)


def load_angle_sweep(results, step_deg: float = STEP_DEG) -> list[LugSweep]:
    """The sweep of every lug plate of ``results`` (bushings and unchecked plates left out)."""
    return lug_sweeps(results.job, results.stacks, results.factors, results.variant, results.solution.cases,
                      step_deg)


def lug_sweeps(job, stacks, fac, variant, cases, step_deg: float = STEP_DEG) -> list[LugSweep]:
    """The sweep of every lug plate of ``job`` with its solved ``stacks`` and the method's factors."""
    mod = METHODS[job.method.name]
    ang = np.arange(0.0, 360.0, step_deg)
    dirs = np.column_stack([np.cos(np.radians(ang)), np.sin(np.radians(ang))])
    out: list[LugSweep] = []
    for name, st in stacks.items():
        pin = job.pins[name]
        for part in joint.parts_of(pin):
            if part.kind != "plate":
                continue
            # the factor stack (dynamic, skew, consequence) scales the part's forces, as in the checks
            f_case = part.force(st) * row_factors(job, cases, name, {pin.stack[part.plates[0]].member})[0][:, None]
            mag = np.linalg.norm(f_case, axis=-1)
            F = float(mag.max()) if len(mag) else 0.0
            if F <= 0:
                continue
            case_dir = joint.lug.unit(f_case)
            cdeg = np.degrees(np.arctan2(case_dir[:, 1], case_dir[:, 0])) % 360.0
            names, u = _utils(mod, joint.columns(pin, part, F * dirs, True, False), fac, variant)
            names_c, uc = _utils(mod, joint.columns(pin, part, F * case_dir, True, False), fac, variant)
            if names_c != names:  # a check that applies only in some directions: align by name
                uc = np.array([uc[names_c.index(k)] if k in names_c else np.full(len(cdeg), np.nan)
                               for k in names])
            ax = pin.stack[part.plates[0]].axis
            axis_deg = None if ax is None else float(np.degrees(np.arctan2(ax[1], ax[0])) % 360.0)
            out.append(LugSweep(name, part.label, F, axis_deg, ang, tuple(names), u, cases,
                                cdeg, mag, uc))
    return out
