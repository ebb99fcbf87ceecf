"""The calculation report (Markdown and HTML), its pictures, its safe writing, and the progress helper.

Check values:
- the worked expressions are evaluated here independently (plain Python arithmetic on the SI inputs
  the row carries) and must give the demand and capacity the method computed;
- one bearing resistance is worked by hand from EN 1993-1-8:2005 Table 3.10, Fb,Rd = 1.5 t d fy / γM0;
- the rest are structural: every results row appears with its numbers, the HTML parses, two runs give
  the same bytes, and a write interrupted part way leaves no file.
"""

from __future__ import annotations

import base64
import html
import math
import os
import re
import subprocess
import sys
from html.parser import HTMLParser
from pathlib import Path

import numpy as np
import pytest

import pinchk
from pinchk import lug
from pinchk.progress import Progress
from pinchk.report import CAUTION, render, write_report
from pinchk.report.common import convert, fmt, unit_of, units_of

ROOT = Path(__file__).resolve().parents[1]
DEMOS = sorted((ROOT / "examples").glob("*.toml"))
GANTRY = ROOT / "examples" / "a_frame_gantry.toml"
DATE = "2026-01-02"


@pytest.fixture(scope="module")
def gantry():
    return pinchk.run(str(GANTRY))


@pytest.fixture(scope="module")
def gantry_html(gantry):
    return render(gantry, "html", date=DATE)


@pytest.fixture(scope="module", params=[p.name for p in DEMOS])
def demo(request):
    return pinchk.run(str(ROOT / "examples" / request.param))


def expected_rows(results):
    """Each results row as the report must print it: (pin, part, check, case, demand, capacity, unit,
    utilization, status)."""
    units = units_of(results)
    out = []
    for r in results.rows():
        k = r["kind"]
        out.append((r["pin"], r["part"], r["check"], r["case"], fmt(convert(r["demand"], k, units)),
                    fmt(convert(r["capacity"], k, units)), unit_of(k, units), f"{r['utilization']:.3f}",
                    r["status"]))
    return out


class _Doc(HTMLParser):
    """Collects headings, tables (rows of cell texts), images and tag balance."""

    VOID = {"meta", "img", "br", "hr", "link", "input", "col"}

    def __init__(self):
        super().__init__(convert_charrefs=True)
        self.stack: list[str] = []
        self.errors: list[str] = []
        self.headings: list[tuple[str, str]] = []
        self.tables: list[dict] = []
        self.imgs: list[dict] = []
        self._text: list[str] | None = None
        self._cell: list[str] | None = None
        self._row: list[str] | None = None
        self._last_h4 = ""

    def handle_starttag(self, tag, attrs):
        if tag in self.VOID:
            if tag == "img":
                self.imgs.append(dict(attrs))
            return
        self.stack.append(tag)
        if tag in ("h1", "h2", "h3", "h4"):
            self._text = []
        elif tag == "table":
            self.tables.append({"h4": self._last_h4, "rows": [], "cls": dict(attrs).get("class", "")})
        elif tag == "tr":
            self._row = []
        elif tag in ("td", "th"):
            self._cell = []

    def handle_endtag(self, tag):
        if tag in self.VOID:
            return
        if not self.stack or self.stack[-1] != tag:
            self.errors.append(f"</{tag}> closes <{self.stack[-1] if self.stack else None}>")
            return
        self.stack.pop()
        if tag in ("h1", "h2", "h3", "h4") and self._text is not None:
            text = " ".join("".join(self._text).split())
            self.headings.append((tag, text))
            if tag == "h4":
                self._last_h4 = text
            self._text = None
        elif tag in ("td", "th") and self._cell is not None and self._row is not None:
            self._row.append(" ".join("".join(self._cell).split()))
            self._cell = None
        elif tag == "tr" and self._row is not None:
            self.tables[-1]["rows"].append(self._row)
            self._row = None

    def handle_data(self, data):
        if self._text is not None:
            self._text.append(data)
        if self._cell is not None:
            self._cell.append(data)


def parse(html: str) -> _Doc:
    d = _Doc()
    d.feed(html)
    d.close()
    return d


# ------------------------------------------------------------------------------------------- HTML
def test_html_parses_with_its_structure(gantry_html):
    d = parse(gantry_html)
    assert d.errors == [] and d.stack == [], (d.errors, d.stack)
    assert gantry_html.startswith("<!DOCTYPE html>")
    h1 = [t for tag, t in d.headings if tag == "h1"]
    assert h1 == ["A-frame gantry, 10 t hook at the apex (demo)"]
    h2 = [t for tag, t in d.headings if tag == "h2"]
    for want in ("Verdict", "Summary", "Method and factors", "Inputs", "Solved forces", "Checks", "Assumptions",
                 "Caution", "Sign-off"):
        assert any(want in t for t in h2), want
    assert h2[0].endswith("Verdict") and "Summary" in h2[1]  # the verdict and the summary come first
    assert len(d.tables) >= 10
    # four pictures (frame, lug, load-angle sweep, utilizations), inline as PNG: self-contained, nothing fetched
    assert len(d.imgs) == 4
    for img in d.imgs:
        head, _, data = img["src"].partition(",")
        assert head == "data:image/png;base64"
        assert base64.b64decode(data)[:8] == b"\x89PNG\r\n\x1a\n"
        assert img.get("alt")
    assert "src=\"http" not in gantry_html and "<script" not in gantry_html


def test_every_demo_gives_a_whole_html_report(demo):
    text = render(demo, "html", date=DATE)
    d = parse(text)
    assert d.errors == [] and d.stack == []
    # the frame (when the job has one), the governing lug and its load-angle sweep, the utilizations
    from pinchk.report.figures import governing_plate_row, governing_sweep

    want = ((1 if demo.job.bodies or demo.job.links else 0) + (governing_plate_row(demo) is not None)
            + (governing_sweep(demo) is not None) + 1)
    assert len(d.imgs) == want
    assert sorted(_html_rows(d)) == sorted(expected_rows(demo))
    plain = html.unescape(text)
    for w in (*demo.solution.warnings, *demo.warnings):
        assert w in plain
    from pinchk.report.common import combination_lines

    for line in combination_lines(demo):  # combinations and lift factors, where the job gives them
        assert line in plain


def _html_rows(d: _Doc) -> list[tuple]:
    """The rows of the worked-check tables of a parsed report, as ``expected_rows`` gives them."""
    got = []
    for t in d.tables:
        if t["cls"] != "checks":
            continue
        pin, _, part = t["h4"].partition(" · ")
        header, *rows = t["rows"]
        col = {h: k for k, h in enumerate(header)}
        for r in rows:
            got.append((pin, part, r[col["check"]], r[col["case"]], r[col["demand"]], r[col["capacity"]],
                        r[col["unit"]], r[col["utilization"]], r[col["status"]]))
    return got


def test_every_results_row_is_in_the_html_with_its_numbers(gantry, gantry_html):
    assert sorted(_html_rows(parse(gantry_html))) == sorted(expected_rows(gantry))


def test_summary_sorted_with_the_governing_row_first(gantry, gantry_html):
    d = parse(gantry_html)
    summary = next(t for t in d.tables if t["cls"] == "summary")
    header, *rows = summary["rows"]
    u = [float(r[header.index("utilization")]) for r in rows]
    assert u == sorted(u, reverse=True)
    g = gantry.row(gantry.governing)
    assert rows[0][1:5] == [g["pin"], g["part"], g["check"], g["case"]]
    assert d.headings[1][1].endswith("Verdict")
    assert gantry_html.index("PASS: all") < gantry_html.index('class="summary"')


def test_caution_factors_and_job_block_are_in_both(gantry, gantry_html):
    md = render(gantry, "md", date=DATE)
    for text in (html.unescape(gantry_html), md):
        assert CAUTION in text
        assert gantry.edition in text
        for key in ("number", "revision", "prepared_by", "checked_by"):
            assert gantry.job.info[key] in text
        assert DATE in text
        for a in gantry.assumptions:
            assert a in text
    d = parse(gantry_html)
    factors = next(t for t in d.tables if t["cls"] == "factors")
    assert [r[:2] for r in factors["rows"][1:]] == [[k, f"{v:g}"] for k, v in gantry.factors.items()]
    for name, value in gantry.factors.items():
        assert f"| {name} | {value:g} |" in md


def test_materials_with_their_sources(gantry, gantry_html):
    for pin in gantry.job.pins.values():
        for m in [pin.material] + [q.material for q in pin.stack]:
            if m is not None:
                assert m.source in html.unescape(gantry_html)


# --------------------------------------------------------------------------------------- Markdown
def _md_tables(md: str):
    """(heading, header cells, rows of cells) for every pipe table under a '####' heading."""
    out, head, header, rows = [], "", None, []
    for line in md.splitlines() + [""]:
        if line.startswith("#### "):
            head = line[5:]
        if line.startswith("|"):
            cells = [c.strip() for c in re.split(r"(?<!\\)\|", line.strip())[1:-1]]
            if header is None:
                header = cells
            elif not set("".join(cells)) <= set("-:"):
                rows.append(cells)
        elif header is not None:
            out.append((head, header, rows))
            header, rows = None, []
    return out


def test_every_results_row_is_in_the_markdown_with_its_numbers(demo):
    md = render(demo, "md", date=DATE)
    got = []
    for head, header, rows in _md_tables(md):
        if "demand, worked" not in header:
            continue
        pin, _, part = head.partition(" · ")
        col = {h: k for k, h in enumerate(header)}
        for r in rows:
            status = r[col["status"]].replace("**", "")
            got.append((pin, part, r[col["check"]], r[col["case"]], r[col["demand"]], r[col["capacity"]],
                        r[col["unit"]], r[col["utilization"]], status))
    assert sorted(got) == sorted(expected_rows(demo))
    assert CAUTION in md
    assert "![" not in md  # rendered without pictures, and it says where they go
    assert "PNG files beside the report" in md


def test_markdown_written_with_its_pictures_beside_it(gantry, tmp_path):
    out = tmp_path / "calc.md"
    paths = write_report(gantry, "md", str(out), date=DATE)
    names = sorted(Path(p).name for p in paths)
    assert names == ["calc.frame.png", "calc.lug.png", "calc.md", "calc.sweep.png", "calc.utilization.png"]
    md = out.read_text(encoding="utf-8")
    for n in [n for n in names if n.endswith(".png")]:
        assert f"]({n})" in md
        assert (tmp_path / n).read_bytes()[:4] == b"\x89PNG"
    assert sorted(os.listdir(tmp_path)) == names  # no temporary file left


# --------------------------------------------------------------------------------- worked values
_PH = re.compile(r"\{([^{}]+)\}")
# methods whose every check shows its worked lines
WORKED_REQUIRED = {"EN 1993-1-8", "AISC 360-16", "ASME BTH-1", "allowable stress"}


def _evaluate(expr: str, terms) -> float:
    """The value of a worked expression, by plain arithmetic on the row's SI inputs."""
    _, eq, rhs = expr.partition(" = ")
    rhs = rhs if eq else expr
    vals = {s: v for s, _, v in terms}
    py = _PH.sub(lambda m: f"({vals[m.group(1)]!r})", rhs)
    for a, b in (("×", "*"), ("−", "-"), ("√", "sqrt"), ("π", "pi"), ("²", "**2"), ("³", "**3")):
        py = py.replace(a, b)
    py = re.sub(r"(\bpi|\))\s+\(", r"\1 * (", py)  # "π (d)²": a product written side by side
    return float(eval(py, {"__builtins__": {}}, {"sqrt": math.sqrt, "pi": math.pi, "min": min}))  # noqa: S307


def _variants():
    """Every demo job with every design variant of its method (ASD and LRFD for AISC 360)."""
    from dataclasses import replace

    from pinchk.methods import METHODS

    out = []
    for p in DEMOS:
        job = pinchk.load_job(str(p))
        for v in METHODS[job.method.name].VARIANTS or (job.method.variant,):
            out.append(pytest.param(replace(job, method=replace(job.method, variant=v)), id=f"{p.stem}-{v}"))
    # the boom demo (cheek groups, a bushing, a lateral load at a lug base, a retainer) under AISC 360-16 too,
    # so that its base-section checks (§F11.1, §H1.1, §G1) are worked out in both variants
    boom = pinchk.load_job(str(ROOT / "examples" / "boom_head_joint.toml"))
    for v in METHODS["AISC 360-16"].VARIANTS:
        m = replace(boom.method, name="AISC 360-16", variant=v, factors={})
        out.append(pytest.param(replace(boom, method=m), id=f"boom_head_joint-AISC-{v}"))
    # no demo uses the in-house allowable stress method: the gantry and the boom under it
    for p in (GANTRY, ROOT / "examples" / "boom_head_joint.toml"):
        job = pinchk.load_job(str(p))
        m = replace(job.method, name="allowable stress", variant=None, factors={})
        out.append(pytest.param(replace(job, method=m), id=f"{p.stem}-allowable"))
    return out


@pytest.mark.parametrize("job", _variants())
def test_worked_expressions_give_the_checked_figures(job):
    res = pinchk.run(job)
    c = res.columns
    n_worked = 0
    for i in range(len(res)):
        for key, col in (("worked_demand", "demand"), ("worked_capacity", "capacity")):
            expr = c[key][i]
            if not expr and res.method not in WORKED_REQUIRED:
                continue  # a method without worked lines is reported with formula, demand and capacity only
            assert expr, f"{c['check'][i]}: the method gives no worked {col}"
            n_worked += 1
            assert _evaluate(expr, c["terms"][i]) == pytest.approx(float(c[col][i]), rel=1e-9), (c["check"][i], expr)
    if res.method in WORKED_REQUIRED:
        assert n_worked == 2 * len(res)


def _bolted(tmp_path, src: Path, pin_head: str, material: str, bolt: str) -> Path:
    """A demo job with one pin made a bolt of grade ``bolt``, its thread in the first shear plane."""
    text = src.read_text(encoding="utf-8")
    head = text.index(pin_head)
    at = text.index(material, head)
    text = text[:at] + f'bolt = "{bolt}"\nthread_planes = [1]' + text[at + len(material):]
    out = tmp_path / src.name
    out.write_text(text, encoding="utf-8")
    return out


@pytest.mark.parametrize("src, head, material, bolt, variants, shown", [
    # M30 coarse (pitch 3.5 mm): As = (π/4)(30 − 0.9382 × 3.5)² = 560.6 mm²; the ISO 898-1 table gives 561
    (GANTRY, "[pin.PL]", 'material = "42CrMo4+QT"', "8.8", (None,), ("× 560.6 mm² /", "0.6000 × 800.0 MPa")),
    # AISC 360-16 Table J3.2, Group A (A325): Fnv = 68 ksi threads excluded, 54 ksi threads included
    (ROOT / "examples" / "jib_bracket_aisc.toml", "[pin.P_root]", 'material = "A193-B7"', "A325", ("ASD", "LRFD"),
     ("68.00 ksi × π (1.250 in)² / 4", "54.00 ksi × π (1.250 in)² / 4")),
])
def test_worked_expressions_of_bolts_used_as_pins(tmp_path, src, head, material, bolt, variants, shown):
    from dataclasses import replace

    job = pinchk.load_job(str(_bolted(tmp_path, src, head, material, bolt)))
    for v in variants:
        res = pinchk.run(replace(job, method=replace(job.method, variant=v)))
        c = res.columns
        bolt_rows = [i for i in range(len(res)) if c["check"][i].startswith("bolt shear")]
        assert {c["check"][i] for i in bolt_rows} == {"bolt shear (shank)", "bolt shear (thread)"}
        for i in range(len(res)):
            for key, col in (("worked_demand", "demand"), ("worked_capacity", "capacity")):
                assert _evaluate(c[key][i], c["terms"][i]) == pytest.approx(float(c[col][i]), rel=1e-9), \
                    (c["check"][i], c[key][i])
        md = render(res, "md", date=DATE)
        for text in shown:
            assert text in md


def test_bearing_worked_by_hand(gantry, gantry_html):
    # EN 1993-1-8:2005 Table 3.10, Fb,Rd = 1.5 t d fy / γM0 for the demo's tie plate at PL: t = 12 mm,
    # d = 30 mm, fy = 355 MPa (S355, t <= 16 mm, EN 10025-2), γM0 = 1.0: 1.5*12*30*355/1.0 N = 191.7 kN
    assert "Fb,Rd = 1.5 × 12.00 mm × 30.00 mm × 355.0 MPa / 1.000 = 191.7 kN" in gantry_html


# ----------------------------------------------------------------------------- same bytes, dates
def test_same_inputs_give_the_same_bytes(gantry):
    assert render(gantry, "html", date=DATE) == render(gantry, "html", date=DATE)
    assert render(gantry, "md", date=DATE) == render(gantry, "md", date=DATE)


def test_same_bytes_in_a_fresh_process(gantry_html, tmp_path):
    code = ("import sys, pinchk; from pinchk.report import render; "
            f"sys.stdout.buffer.write(render(pinchk.run({str(GANTRY)!r}), 'html', date={DATE!r}).encode())")
    out = subprocess.run([sys.executable, "-c", code], cwd=ROOT, capture_output=True, check=True)
    assert out.stdout.decode() == gantry_html


def test_the_date_the_user_fixes(gantry, monkeypatch):
    monkeypatch.setenv("SOURCE_DATE_EPOCH", "1767225600")  # 2026-01-01T00:00:00Z
    md = render(gantry, "md")
    assert "| **Date** | 2026-01-01 |" in md
    assert "| **Date** | 1999-12-31 |" in render(gantry, "md", date="1999-12-31")


# ------------------------------------------------------------------------------------ safe writes
class _Boom(RuntimeError):
    pass


@pytest.fixture
def quick_pictures(monkeypatch):
    """Stand-in pictures (a few bytes each) for the tests of writing, which do not look at them."""
    import pinchk.report.figures as figures

    def fake(results, progress=None):
        return {k: (cap, b"\x89PNG\r\n\x1a\n" + k.encode()) for k, cap in figures.all_figure_captions(results).items()}

    monkeypatch.setattr(figures, "all_figures", fake)


def _half_then_fail(real_fdopen):
    class Half:
        def __init__(self, fh):
            self.fh = fh

        def __enter__(self):
            return self

        def __exit__(self, *exc):
            self.fh.close()
            return False

        def write(self, data):
            self.fh.write(data[: len(data) // 2])
            self.fh.flush()
            raise _Boom("disk gone mid-write")

    return lambda fd, *a, **k: Half(real_fdopen(fd, *a, **k))


@pytest.mark.parametrize("fmt_", ["html", "md"])
def test_a_write_interrupted_mid_file_leaves_no_file(gantry, tmp_path, monkeypatch, fmt_, quick_pictures):
    import pinchk.report.output as output

    monkeypatch.setattr(output.os, "fdopen", _half_then_fail(os.fdopen))
    with pytest.raises(_Boom):
        write_report(gantry, fmt_, str(tmp_path / f"calc.{fmt_}"), date=DATE)
    assert os.listdir(tmp_path) == []


def test_a_failure_on_the_last_file_removes_the_pictures_already_written(gantry, tmp_path, monkeypatch,
                                                                         quick_pictures):
    import pinchk.report.output as output

    real = output.atomic_write

    def fail_on_md(path, data):
        if str(path).endswith(".md"):
            raise _Boom("interrupted")
        real(path, data)

    monkeypatch.setattr(output, "atomic_write", fail_on_md)
    with pytest.raises(_Boom):
        write_report(gantry, "md", str(tmp_path / "calc.md"), date=DATE)
    assert os.listdir(tmp_path) == []


def test_a_failure_while_drawing_leaves_no_file_and_keeps_the_old_one(gantry, tmp_path, monkeypatch):
    import pinchk.report.figures as figures

    out = tmp_path / "calc.html"
    out.write_text("previous report", encoding="utf-8")

    def broken(results):
        raise _Boom("drawing failed")

    monkeypatch.setattr(figures, "bars_figure", broken)
    with pytest.raises(_Boom):
        write_report(gantry, "html", str(out), date=DATE)
    assert out.read_text(encoding="utf-8") == "previous report"
    assert os.listdir(tmp_path) == ["calc.html"]


def test_cli_never_writes_over_the_job_file(tmp_path):
    job = tmp_path / "job.toml"
    job.write_bytes(GANTRY.read_bytes())
    for fmt_, target in (("html", job), ("md", job), ("md", tmp_path / "job.md")):
        # for md the job file could also be hit through a picture name: job.md -> job.frame.png is safe,
        # the job file itself is refused
        r = subprocess.run([sys.executable, "-m", "pinchk", "run", str(job), "--format", fmt_, "--output",
                            str(target)], cwd=ROOT, capture_output=True, text=True)
        if target == job:
            assert r.returncode == 2 and "refusing to overwrite" in r.stderr
            assert "Traceback" not in r.stderr
        else:
            assert r.returncode == 0, r.stderr
    assert job.read_bytes() == GANTRY.read_bytes()
    assert sorted(os.listdir(tmp_path)) == ["job.frame.png", "job.lug.png", "job.md", "job.sweep.png", "job.toml",
                                            "job.utilization.png"]


def test_cli_html_report(tmp_path):
    out = tmp_path / "calc.html"
    r = subprocess.run([sys.executable, "-m", "pinchk", "run", str(GANTRY), "--format", "html", "--output",
                        str(out)], cwd=ROOT, capture_output=True, text=True)
    assert r.returncode == 0, r.stderr
    assert r.stderr == ""  # stderr is no terminal here: no progress
    d = parse(out.read_text(encoding="utf-8"))
    assert d.errors == [] and len(d.imgs) == 4


def test_other_views_do_not_import_matplotlib():
    code = (f"import sys, pinchk; from pinchk.report import render; r = pinchk.run({str(GANTRY)!r}); "
            "[render(r, f) for f in ('table', 'json', 'csv')]; "
            "print('matplotlib' in sys.modules, 'jinja2' in sys.modules)")
    out = subprocess.run([sys.executable, "-c", code], cwd=ROOT, capture_output=True, text=True, check=True)
    assert out.stdout.split() == ["False", "False"]


# --------------------------------------------------------------------------------------- progress
class _Stream:
    def __init__(self, tty: bool):
        self.tty, self.text = tty, ""

    def isatty(self):
        return self.tty

    def write(self, s):
        self.text += s

    def flush(self):
        pass


class _Clock:
    def __init__(self):
        self.t = 0.0

    def __call__(self):
        return self.t


@pytest.mark.parametrize("tty, seconds, shown", [(True, 0.5, False), (True, 10.0, True), (False, 10.0, False)])
def test_progress_only_for_long_work_on_a_terminal(tty, seconds, shown):
    s, clock = _Stream(tty), _Clock()
    with Progress(total=5, what="jobs", stream=s, clock=clock, after=2.0) as bar:
        for k in range(5):
            clock.t = seconds * (k + 1) / 5
            bar.step(f"job {k}")
    assert ("5/5 jobs" in s.text or "4/5 jobs" in s.text) == shown
    assert bool(s.text) == shown
    if shown:
        assert s.text.endswith("\r")  # the line is cleared at the end


# ---------------------------------------------------------------------------- failing and empty jobs
def _scaled(job, k: float):
    from dataclasses import replace

    return replace(job, loads=tuple(replace(ld, force=(ld.force[0] * k, ld.force[1] * k)) for ld in job.loads))


def test_a_failing_job_reads_as_failing(tmp_path):
    res = pinchk.run(_scaled(pinchk.load_job(str(GANTRY)), 12.0))
    assert not res.passed
    text = render(res, "html", date=DATE)
    d = parse(text)
    assert d.errors == [] and len(d.imgs) == 4
    assert 'class="verdict fail"' in text and "FAIL:" in text
    n_fail = sum(1 for r in res.rows() if r["status"] == "FAIL")
    cells = [r for t in d.tables if t["cls"] == "checks" for r in t["rows"] if r[-1] == "FAIL"]
    assert len(cells) == n_fail > 0
    md = render(res, "md", date=DATE)
    assert md.count("| **FAIL** |") == n_fail


def test_a_job_with_nothing_to_check_still_reports():
    from dataclasses import replace

    job = pinchk.load_job(str(GANTRY))
    job = replace(job, pins={k: replace(p, stack=()) for k, p in job.pins.items()})
    res = pinchk.run(job)
    assert len(res) == 0
    text = render(res, "html", date=DATE)
    d = parse(text)
    assert d.errors == [] and len(d.imgs) == 1  # the frame only: no lug, no utilizations
    assert "NO CHECKS" in text
    assert "Not checked (no stack of plates given): pins P_apex" in text


def test_utilization_chart_keeps_to_the_highest(gantry, monkeypatch):
    import pinchk.report.figures as figures

    rows = figures.governing_by_part(gantry)
    u = [gantry.columns["utilization"][i] for i in rows]
    assert u == sorted(u, reverse=True) and len(rows) == 21  # 5 pins + 16 plates of the demo
    monkeypatch.setattr(figures, "MAX_BARS", 5)
    small = figures.bars_figure(gantry)
    monkeypatch.setattr(figures, "MAX_BARS", 40)
    assert small[:8] == b"\x89PNG\r\n\x1a\n" and len(small) < len(figures.bars_figure(gantry))


# ------------------------------------------------------------------------------- joints in the report
BOOM = ROOT / "examples" / "boom_head_joint.toml"


def test_joint_results_are_in_the_report():
    """The boom demo's stack shears per plane, governing sections, plate geometry along the force, pin axial
    force and sweeps are all in the HTML, with the numbers of the results (the same formatting as the tables)."""
    from pinchk.report.common import convert, fmt, units_of

    res = pinchk.run(pinchk.load_job(str(BOOM)))
    plain = html.unescape(render(res, "html", date=DATE))
    units = units_of(res)
    for st in res.stacks.values():
        for j, _ in enumerate(res.solution.cases):
            planes = " / ".join(fmt(convert(v, "force", units)) for v in st.plane_shear[j])
            assert planes in plain
            assert st.shear_cause(j) in plain and st.moment_cause(j) in plain
    for (pin, part), g in res.geometry.items():
        assert f"<td>{pin}</td><td>{part}</td>" in plain
        for a in g["angle"]:
            assert f"{np.degrees(a):.1f}" in plain
    assert "5.6 Force along each pin" in plain and "5.7 Load-angle sweep" in plain
    for sw in res.sweeps:
        u, a, _ = sw.peak()
        assert f"{u:.3f}" in plain
    assert "base weak-axis bending" in plain and "Mz,Ed = " in plain  # the base check, worked
    assert "ΣH = " in plain  # the retainer check, worked


@pytest.mark.parametrize("outline", [
    lug.Outline("round", width=0.08, end=0.05),  # arc radius over half the width: flattened sides
    lug.Outline("round", width=0.12, end=0.04, base=0.1),  # arc radius under half the width: shoulders
    lug.Outline("round", width=0.08, end=0.05, centre=(0.02, 0.0), base=0.06),  # arc about another point
    lug.Outline("square", width=0.07, end=0.05, base=0.08),
    lug.Outline("polygon", vertices=((-0.05, -0.04), (0.03, -0.04), (0.06, 0.0), (0.03, 0.04), (-0.05, 0.04))),
])
def test_the_lug_drawing_follows_the_exact_outline(outline):
    """The drawn outline meets every ray from the hole centre where pinchk.lug's exact ray intersection does."""
    from pinchk.report.figures import _ray_exit, outline_polygon

    poly, _ = outline_polygon(outline, back=0.2, n=2001)
    th = np.radians(np.arange(0.0, 360.0, 7.0))
    u = np.column_stack([np.cos(th), np.sin(th)])
    want = outline.reach(u)
    for k in range(len(th)):
        got = _ray_exit(poly, np.zeros(2), u[k])
        if np.isfinite(want[k]) and want[k] * u[k, 0] > -0.2:  # not beyond where the drawing cuts the sides
            assert got == pytest.approx(want[k], abs=2e-5), np.degrees(th[k])
