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
    r.add_argument("--format", choices=["table", "json", "csv", "md", "html"], default="table",
                   help="view of the results (default: table); md and html give the calculation report, "
                        "html as one file with its pictures inline, md with its pictures as PNG files beside "
                        "the --output file")
    r.add_argument("--output", metavar="PATH", help="write the view to PATH instead of the terminal")
    r.add_argument("--all-cases", action="store_true",
                   help="table: list every load case of every check, not only the governing one")
    r.add_argument("--no-forces", action="store_true", help="table: leave out the joint-force tables")
    r.add_argument("--forces-out", metavar="FILE",
                   help="also write the joint forces to FILE as a forces file (.csv or .json), which a job "
                        "can read back through [forces] file")
    sub.add_parser("methods", help="list the design methods, their factors and defaults")
    sub.add_parser("materials", help="list the bundled materials and their sources")
    _alternative_parsers(sub)
    return p


def _alternative_parsers(sub) -> None:
    """compare, size and rate (pinchk.alternatives); docs/sweeps.md describes them."""
    def common(q):
        q.add_argument("job", metavar="JOB", help="the job file (TOML), see docs/jobfile.md")
        q.add_argument("--format", choices=["table", "json", "csv", "md"], default="table",
                       help="view of the results (default: table; md: the table view as Markdown)")
        q.add_argument("--output", metavar="PATH", help="write the view to PATH instead of the terminal")

    c = sub.add_parser("compare", help="check a pin with alternative grades, materials, sizes or methods",
                       description="Check one or more pins with each alternative (the product of the lists given) "
                                   "and mark the lightest that passes. A list is comma-separated; 'all' means every "
                                   "entry of the library that fits the size.")
    common(c)
    c.add_argument("--pin", action="append", metavar="NAME", help="a pin to compare (repeat; default: every pin)")
    c.add_argument("--diameter", metavar="LIST", help="pin diameters, e.g. '30,36,40 mm' or a range '24:48:4 mm'")
    c.add_argument("--pin-material", metavar="LIST", help="pin materials of data/materials.csv, or 'all'")
    c.add_argument("--grade", metavar="LIST", help="bolt grades of data/bolt_grades.csv for the pin, or 'all'")
    c.add_argument("--thickness", metavar="LIST", help="plate thicknesses, e.g. '12,16,20 mm'")
    c.add_argument("--plate-material", metavar="LIST", help="plate materials of data/materials.csv, or 'all'")
    c.add_argument("--member", action="append", metavar="NAME",
                   help="the member whose plates --thickness and --plate-material change (repeat; default: every "
                        "member with checked plates at the pin)")
    c.add_argument("--method", metavar="LIST", help="design methods, each optionally with ':variant' (e.g. "
                   "'AISC 360-16:LRFD', 'ASME BTH-1:B'), or 'all' (every method and variant; see pinchk methods)")

    z = sub.add_parser("size", help="the smallest pin diameter and plate thickness of a series that pass",
                       description="For each pin, the smallest diameter of a preferred series and, for it, the "
                                   "thinnest plates of a plate series with the end distance and width the method's "
                                   "detailing rules need, so that every check passes in every case; with the exact "
                                   "limits found by root finding.")
    common(z)
    z.add_argument("--pin", action="append", metavar="NAME", help="a pin to size (repeat; default: every pin)")
    z.add_argument("--pin-series", metavar="NAMES", help="pin series of data/size_series.csv, comma-separated "
                   "(default: metric,metric-large; inch,inch-large for a job in US units)")
    z.add_argument("--plate-series", metavar="NAMES", help="plate series (default: metric; inch for US units)")
    z.add_argument("--only", choices=["pin", "plates"], help="size only the pin (plates as the job) or only the "
                   "plates (pin as the job); default: both")

    r = sub.add_parser("rate", help="the largest load multiplier for which every check passes",
                       description="Scale the loads of a case, or the loads with a label, or every load, and find "
                                   "the largest factor for which every check still passes, by root finding on full "
                                   "runs.")
    common(r)
    r.add_argument("--case", metavar="NAME", help="scale the loads of this load case (default: every case)")
    r.add_argument("--load", metavar="LABEL", help="scale the loads with this label (e.g. hook), in every case")
    r.add_argument("--max-factor", type=float, default=1000.0, metavar="X",
                   help="stop looking above this factor (default 1000)")


def _write(path: str, text: str, protect: list[str]) -> None:
    """Write ``text`` to ``path`` through a temporary file and a rename: never a half-written file."""
    real = os.path.realpath(path)
    for q in protect:
        if os.path.exists(q) and os.path.exists(real) and os.path.samefile(real, q):
            raise OSError(f"refusing to overwrite the input file {q}")
    folder = os.path.dirname(real) or "."
    try:
        fd, tmp = tempfile.mkstemp(prefix=".pinchk-", dir=folder)
    except OSError as exc:
        raise OSError(exc.errno, f"cannot write {path}: {exc.strerror or exc}") from None
    try:
        with os.fdopen(fd, "w", encoding="utf-8", newline="") as fh:
            fh.write(text)
        os.replace(tmp, real)
    except BaseException as exc:
        if os.path.exists(tmp):
            os.unlink(tmp)
        if isinstance(exc, OSError):  # name the output the user gave, not the temporary file
            raise OSError(exc.errno, f"cannot write {path}: {exc.strerror or exc}") from None
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
    protect = [a.job] + ([results.job.forces.path] if results.job.forces is not None else [])
    report_file = a.output and a.format in ("md", "html")  # the calculation report, written with its pictures
    text = None if report_file else render(results, a.format, **opts)
    if a.forces_out:
        from .forcesfile import render_forces
        from .units import UNIT_SYSTEMS

        # the forces per load case (not per combination), so the file reads back into the same job
        per_case = results.solution if results.case_solution is None else results.case_solution
        _write(a.forces_out, render_forces(per_case, format_of(a.forces_out),
                                           UNIT_SYSTEMS[results.job.output_units]["force"], results.job.title),
               protect + ([a.output] if a.output else []))
    if report_file:
        from .progress import Progress
        from .report import write_report

        with Progress(what="pictures") as bar:
            write_report(results, a.format, a.output, protect=protect + ([a.forces_out] if a.forces_out else []),
                         progress=bar)
    elif a.output:
        _write(a.output, text, protect + ([a.forces_out] if a.forces_out else []))
    if a.output:
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


def _names(text, every, what, job_path):
    from .alternatives import Every
    from .errors import InputError, Problem

    if text is None:
        return None
    if text.strip().lower() == "all":
        return Every(every)
    names = [x.strip() for x in text.split(",") if x.strip()]
    bad = [x for x in names if x not in every]
    if bad:
        raise InputError(Problem("<command line>", "", what, f"unknown: {', '.join(bad)}; known: {', '.join(every)}"))
    return names


def _methods(text):
    """--method: names (with an optional ':variant'), or 'all' (every method and variant)."""
    from .alternatives import method_key, method_names
    from .errors import InputError, Problem
    from .methods import METHODS

    if text is None:
        return None
    if text.strip().lower() == "all":
        return method_names()
    names = [x.strip() for x in text.split(",") if x.strip()]
    bad = [x for x in names if method_key(x) is None]
    if bad:
        raise InputError(Problem("<command line>", "", "--method", f"unknown: {', '.join(bad)}; known: "
                                 f"{', '.join(METHODS)}, each optionally with ':variant' "
                                 f"({', '.join(method_names())})"))
    return names


def _emit(a, kind, result, ok: bool, protect: list[str], verdict: str) -> int:
    from .report.alternatives import VIEWS

    text = VIEWS[kind][a.format](result)
    if a.output:
        _write(a.output, text, protect)
        print(f"{verdict}\nwrote {a.output}\ncaution: {CAUTION_SHORT}")
    else:
        sys.stdout.write(text)
    return EXIT_PASS if ok else EXIT_FAIL


def _protect(job) -> list[str]:
    return [job.path] + ([job.forces.path] if job.forces is not None else [])


def _cmd_compare(a) -> int:
    from . import alternatives as alt
    from . import load_job
    from .units import UNIT_SYSTEMS

    job = load_job(a.job)
    lu = UNIT_SYSTEMS[job.output_units]["length"]
    kw = {
        "diameters": alt.parse_lengths(a.diameter, lu, "--diameter") if a.diameter else None,
        "pin_materials": _names(a.pin_material, alt.material_names(), "--pin-material", a.job),
        "grades": _names(a.grade, alt.bolt_grade_names(), "--grade", a.job),
        "thicknesses": alt.parse_lengths(a.thickness, lu, "--thickness") if a.thickness else None,
        "plate_materials": _names(a.plate_material, alt.material_names(), "--plate-material", a.job),
        "methods": _methods(a.method),
        "members": a.member,
    }
    cmp = alt.compare(job, pins=a.pin, **kw)
    ok = all(cmp.marked.values()) if cmp.ranked else True
    n = sum(len(s.options) for s in cmp.sweeps.values())
    return _emit(a, "compare", cmp, ok, _protect(job),
                 f"compared {n} alternatives of {len(cmp.sweeps)} pin(s)"
                 + ("" if ok else "; some pin has none that passes"))


def _cmd_size(a) -> int:
    from . import alternatives as alt
    from . import load_job

    job = load_job(a.job)
    what = ("pin", "plates") if a.only is None else (a.only,)
    sz = alt.size(job, pins=a.pin, pin_series=a.pin_series, plate_series=a.plate_series, what=what)
    return _emit(a, "size", sz, sz.found, _protect(job),
                 "FOUND: every pin has a size that passes" if sz.found
                 else "NOT FOUND: some pin has no size that passes")


def _cmd_rate(a) -> int:
    from . import alternatives as alt
    from . import load_job
    from .errors import InputError, Problem

    if not a.max_factor > 1.0:
        raise InputError(Problem("<command line>", "", "--max-factor", f"must be > 1, got {a.max_factor:g}"))
    job = load_job(a.job)
    rt = alt.rate(job, case=a.case, label=a.load, factor_max=a.max_factor)
    ok = rt.factor >= 1.0
    return _emit(a, "rate", rt, ok, _protect(job), f"largest factor {rt.factor:.4f} on {rt.what}")


COMMANDS = {"run": _cmd_run, "methods": _cmd_methods, "materials": _cmd_materials, "compare": _cmd_compare,
            "size": _cmd_size, "rate": _cmd_rate}


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
