"""The command line: parse the arguments, call the API, print or write a view. Nothing else."""

from __future__ import annotations

import argparse
import os
import sys
import tempfile

EXIT_PASS, EXIT_FAIL, EXIT_INPUT, EXIT_BUG = 0, 1, 2, 3

CAUTION_SHORT = ("results are an aid to a qualified engineer, not a substitute; local codes, the project's "
                 "specification and licensed practice govern")


def _parser() -> argparse.ArgumentParser:
    from . import __version__

    p = argparse.ArgumentParser(
        prog="pinchk",
        description="Check the pins and lug plates of a pinned structure: solve the frame, check every pin "
                    "and plate in every load case, and report what governs.",
        epilog=f"Exit status: 0 every check passes, 1 a check fails, 2 the input is wrong. Caution: {CAUTION_SHORT}.")
    p.add_argument("--version", action="version", version=f"pinchk {__version__}")
    sub = p.add_subparsers(dest="command", metavar="COMMAND")
    r = sub.add_parser("run", help="solve a job file and check every pin and plate",
                       description="Solve a job file's frame, check every pin and plate, and print the results.")
    r.add_argument("job", metavar="JOB", help="the job file (TOML), see docs/jobfile.md")
    r.add_argument("--format", choices=["table", "json", "csv"], default="table",
                   help="view of the results (default: table)")
    r.add_argument("--output", metavar="PATH", help="write the view to PATH instead of the terminal")
    r.add_argument("--all-cases", action="store_true",
                   help="table: list every load case of every check, not only the governing one")
    r.add_argument("--no-forces", action="store_true", help="table: leave out the joint-force tables")
    r.add_argument("--forces-out", metavar="FILE",
                   help="also write the joint forces to FILE as a forces file (.csv or .json), which a job "
                        "can read back through [forces] file")
    sub.add_parser("methods", help="list the design methods, their factors and defaults")
    sub.add_parser("materials", help="list the bundled materials and their sources")
    return p


def _write(path: str, text: str, protect: list[str]) -> None:
    """Write ``text`` to ``path`` through a temporary file and a rename: never a half-written file."""
    real = os.path.realpath(path)
    for q in protect:
        if os.path.exists(q) and os.path.exists(real) and os.path.samefile(real, q):
            raise OSError(f"refusing to overwrite the input file {q}")
    folder = os.path.dirname(real) or "."
    fd, tmp = tempfile.mkstemp(prefix=".pinchk-", dir=folder)
    try:
        with os.fdopen(fd, "w", encoding="utf-8", newline="") as fh:
            fh.write(text)
        os.replace(tmp, real)
    except BaseException:
        if os.path.exists(tmp):
            os.unlink(tmp)
        raise


def _cmd_run(a) -> int:
    from . import run
    from .report import render

    if a.forces_out:
        from .errors import InputError, Problem
        from .forcesfile import format_of

        format_of(a.forces_out)  # a wrong extension is an input error before any work
        if a.output and os.path.realpath(a.output) == os.path.realpath(a.forces_out):
            raise InputError(Problem(a.forces_out, "", "--forces-out", "is the same file as --output; name two files"))
    results = run(a.job)
    opts = {"all_cases": a.all_cases, "forces": not a.no_forces} if a.format == "table" else {}
    text = render(results, a.format, **opts)
    protect = [a.job] + ([results.job.forces.path] if results.job.forces is not None else [])
    if a.forces_out:
        from .forcesfile import render_forces
        from .units import UNIT_SYSTEMS

        # the forces per load case (not per combination), so the file reads back into the same job
        per_case = results.solution if results.case_solution is None else results.case_solution
        _write(a.forces_out, render_forces(per_case, format_of(a.forces_out),
                                           UNIT_SYSTEMS[results.job.output_units]["force"], results.job.title),
               protect + ([a.output] if a.output else []))
    if a.output:
        _write(a.output, text, protect + ([a.forces_out] if a.forces_out else []))
        from .report.common import verdict

        print(f"{verdict(results)}\nwrote {a.output}\ncaution: {CAUTION_SHORT}")
    else:
        sys.stdout.write(text)
    if a.output or a.format != "table":  # the table view prints its warnings itself
        for w in (*getattr(results.solution, "warnings", ()), *getattr(results, "warnings", ())):
            print(f"warning: {w}", file=sys.stderr)
    if a.forces_out:
        print(f"wrote joint forces to {a.forces_out}", file=sys.stderr if not a.output else sys.stdout)
    return EXIT_PASS if results.passed else EXIT_FAIL


def _cmd_methods(a) -> int:
    from .methods import METHODS

    for name, m in METHODS.items():
        print(f"{name}: {m.EDITION}" + (f"; design: {' or '.join(m.VARIANTS)}" if m.VARIANTS else ""))
        for k, (v, what) in m.FACTORS.items():
            print(f"  {k} = {v:g}    {what}")
    return 0


def _cmd_materials(a) -> int:
    from .materials import library

    for name, rows in library().items():
        for r in rows:
            print(f"{name:12s} {r.size_min * 1e3:6.1f} < size <= {r.size_max * 1e3:6.1f} mm  fy {r.fy / 1e6:6.1f} MPa"
                  f"  fu {r.fu / 1e6:6.1f} MPa   {r.source}")
    from .bolts import grades

    print("\nbolt grades (a pin's bolt = \"GRADE\"): nominal yield / tensile strength")
    for g in grades():
        fy = f"{g.fy_nom / 1e6:6.1f}" if g.fy_nom is not None else "  none"
        print(f"{g.label:22s} {g.size_min * 1e3:6.1f} < d <= {g.size_max * 1e3:6.1f} mm  fy {fy} MPa"
              f"  fu {g.fu_nom / 1e6:6.1f} MPa   {g.source}")
    return 0


COMMANDS = {"run": _cmd_run, "methods": _cmd_methods, "materials": _cmd_materials}


def main(argv: list[str] | None = None) -> int:
    p = _parser()
    a = p.parse_args(argv)
    if a.command is None:
        p.print_help()
        return EXIT_INPUT
    from .errors import InputError

    try:
        return COMMANDS[a.command](a)
    except InputError as exc:
        print(exc.text(), file=sys.stderr)
        return EXIT_INPUT
    except OSError as exc:
        print(f"error: {exc.strerror or exc}{': ' + exc.filename if getattr(exc, 'filename', None) else ''}",
              file=sys.stderr)
        return EXIT_INPUT
    except KeyboardInterrupt:
        print("interrupted", file=sys.stderr)
        return 130
    except Exception:
        import traceback

        traceback.print_exc()
        print("internal error: this is a bug in pinchk, not in your input; please report it with the job file",
              file=sys.stderr)
        return EXIT_BUG
