"""Plots of the joint views (matplotlib, an optional dependency: pip install 'pinchk[report]')."""

from __future__ import annotations

import numpy as np


def sweep_figure(sweep, checks=None):
    """A polar plot of one lug's load-angle sweep: utilization of each check against the force's
    direction in the frame, the load cases marked, the unit circle (utilization 1) drawn.

    Args:
        sweep: a pinchk.sweep.LugSweep.
        checks: names of the checks to draw (default: every check).

    Returns:
        the matplotlib Figure.
    """
    import matplotlib

    matplotlib.use("Agg", force=False)
    import matplotlib.pyplot as plt

    fig, ax = plt.subplots(subplot_kw={"projection": "polar"}, figsize=(6, 6))
    th = np.radians(np.append(sweep.angle_deg, sweep.angle_deg[:1] + 360.0))
    for i, name in enumerate(sweep.checks):
        if checks is not None and name not in checks:
            continue
        u = np.append(sweep.util[i], sweep.util[i][:1])
        ax.plot(th, u, label=name)
    ax.plot(np.linspace(0, 2 * np.pi, 181), np.ones(181), "k--", lw=0.8, label="utilization 1")
    worst = np.nanmax(np.where(np.isnan(sweep.case_util), -np.inf, sweep.case_util), axis=0)
    ax.plot(np.radians(sweep.case_angle_deg), worst, "ko", label="load cases")
    for c, a, u in zip(sweep.cases, sweep.case_angle_deg, worst, strict=True):
        ax.annotate(c, (np.radians(a), u), fontsize=8)
    if sweep.axis_deg is not None:
        ax.annotate("", xy=(np.radians(sweep.axis_deg), 0.5), xytext=(0, 0),
                    arrowprops={"arrowstyle": "->", "color": "grey"})
    ax.set_title(f"{sweep.pin} {sweep.part}: force turned at {sweep.force / 1e3:.4g} kN")
    ax.legend(loc="lower left", bbox_to_anchor=(-0.1, -0.15), fontsize=7)
    return fig
