"""pinchk: checks the pins and lug plates of a pinned structure against published design methods."""

from __future__ import annotations

__version__ = "0.1.0"
__all__ = ["InputError", "PinchkError", "Results", "load_job", "run", "__version__"]

from .errors import InputError, PinchkError


def load_job(path):
    """Read a job file (TOML) into a validated Job; raises InputError listing every problem."""
    from .jobfile import load_job as _load

    return _load(path)


def run(job):
    """Solve the frame of ``job`` (a Job or a path to a job file), or read its forces file, and check
    every pin: Results."""
    from .checks import run_checks
    from .combine import combine
    from .forcesfile import joint_forces

    if not hasattr(job, "pins"):
        job = load_job(job)
    from dataclasses import replace

    per_case = joint_forces(job)
    job2, sol = combine(job, per_case)
    res = run_checks(job2, sol)
    return res if sol is per_case else replace(res, case_solution=per_case)


def __getattr__(name):
    if name == "Results":
        from .checks import Results

        return Results
    raise AttributeError(name)
