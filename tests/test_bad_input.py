"""A catalogue of wrong input: each case is a small job file and the message it must give.

Every case is run through the command line in-process (``pinchk.cli.main``): it must exit with
status 2 (the input is wrong), print no traceback, and say what is wrong in words a user can act on.
The base job is an invented scenario (a beam on a clevis bracket and a roller), not a real design.
"""

from __future__ import annotations

import os
import stat
import time

import pytest

from pinchk import cli

BASE = """\
[job]
title = "bad-input base job (invented)"

[units]
length = "mm"
force = "kN"

[method]
name = "EN 1993-1-8"

[body.beam]
points = { A = [0, 0], B = [1000, 0], C = [500, 0] }

[support.left]
at = "P1"
kind = "pinned"

[support.right]
at = "beam.B"
kind = "roller"
normal = [0, 1]

[case.c1]
description = "10 kN down at mid-span"

[[load]]
case = "c1"
at = "beam.C"
force = [0, -10]

[pin.P1]
joins = ["beam.A"]
diameter = 30
hole = 32
material = "42CrMo4+QT"

[[pin.P1.plate]]
member = "ground"
thickness = 10
material = "S355"
width = 80
end = 45

[[pin.P1.plate]]
member = "beam"
thickness = 20
material = "S355"
width = 90
end = 50
gap = 1

[[pin.P1.plate]]
member = "ground"
thickness = 10
material = "S355"
width = 80
end = 45
gap = 2
"""


def edit(*pairs: str, text: str = BASE) -> str:
    """BASE with each (old, new) pair replaced once; the old text must be there exactly once."""
    assert len(pairs) % 2 == 0
    for old, new in zip(pairs[::2], pairs[1::2], strict=True):
        assert text.count(old) == 1, f"edit target not unique: {old!r}"
        text = text.replace(old, new)
    return text


def add(extra: str) -> str:
    return BASE + "\n" + extra


def run_cli(tmp_path, text: str | bytes, *extra: str, capsys=None, name: str = "job.toml"):
    path = tmp_path / name
    if isinstance(text, bytes):
        path.write_bytes(text)
    else:
        path.write_text(text, encoding="utf-8")
    code = cli.main(["run", str(path), *extra])
    out = capsys.readouterr() if capsys is not None else None
    return code, out, path


PLATE2 = """[[pin.P1.plate]]
member = "beam"
thickness = 20
material = "S355"
width = 90
end = 50
gap = 1"""

CASES = [
    # --- unknown or misspelt fields: the near name is suggested
    ("unknown top table", add("[jobb]\nx = 1"), ["unknown field 'jobb'", "did you mean 'job'"]),
    ("misspelt pin field", edit("diameter = 30", "diamter = 30"),
     ["unknown field 'diamter'", "did you mean 'diameter'"]),
    ("misspelt plate field", edit("thickness = 20", "thicknes = 20"),
     ["unknown field 'thicknes'", "did you mean 'thickness'"]),
    ("misspelt load field", edit("force = [0, -10]", "forse = [0, -10]"),
     ["unknown field 'forse'", "did you mean 'force'", "a load needs a force"]),
    ("misspelt body field", edit("points = {", "pionts = {"), ["did you mean 'points'"]),
    ("misspelt method name", edit('name = "EN 1993-1-8"', 'name = "EN 1993-1-9"'),
     ["'EN 1993-1-9' is not one of", "did you mean 'EN 1993-1-8'"]),
    ("misspelt material", edit('material = "42CrMo4+QT"', 'material = "42CrMo4QT"'),
     ["unknown material '42CrMo4QT'", "did you mean '42CrMo4+QT'"]),
    ("unknown factor", edit('name = "EN 1993-1-8"', 'name = "EN 1993-1-8"\n[method.factors]\ngamma_M3 = 1.1'),
     ["unknown factor 'gamma_M3'", "did you mean"]),
    ("misspelt support kind", edit('kind = "pinned"', 'kind = "pined"'), ["did you mean 'pinned'"]),
    ("misspelt plate member", edit('member = "beam"', 'member = "bean"'),
     ["'bean' does not meet pin P1", "did you mean 'beam'"]),
    ("unknown units dimension", edit('force = "kN"', 'forces = "kN"'), ["did you mean 'force'"]),
    # --- missing required fields
    ("missing job table", edit('[job]\ntitle = "bad-input base job (invented)"\n', ""), ["missing table [job]"]),
    ("missing method", edit('[method]\nname = "EN 1993-1-8"\n', ""), ["missing table [method]"]),
    ("missing pin diameter", edit("diameter = 30\n", ""), ["missing required field 'diameter'"]),
    ("missing plate thickness", edit("thickness = 20\n", ""), ["missing required field 'thickness'"]),
    ("missing plate material", edit('thickness = 20\nmaterial = "S355"\n', "thickness = 20\n"),
     ["missing: the plate's material"]),
    ("missing load case", edit('case = "c1"\nat = "beam.C"', 'at = "beam.C"'), ["missing required field 'case'"]),
    ("missing support kind", edit('at = "P1"\nkind = "pinned"', 'at = "P1"'), ["missing required field 'kind'"]),
    ("missing body points", edit("points = { A = [0, 0], B = [1000, 0], C = [500, 0] }", 'description = "x"'),
     ["points", "missing or empty"]),
    ("missing roller normal", edit("normal = [0, 1]\n", ""), ["a roller needs normal"]),
    # --- wrong dimension
    ("force for a diameter", edit("diameter = 30", 'diameter = "40 kN"'),
     ["'kN' is a unit of force, but a length is needed"]),
    ("stress for a force", edit("force = [0, -10]", 'force = ["0 kN", "10 MPa"]'), ["a force is needed"]),
    ("length for a strength", add('[material.mine]\nfy = "355 mm"\nfu = "470 MPa"\nsource = "x"'),
     ["a stress is needed"]),
    ("unknown unit", edit("thickness = 20", 'thickness = "20 mmm"'), ["is not a unit pinchk knows"]),
    ("bare number without a default unit", edit('length = "mm"\n', ""),
     ["has no unit and the job declares no default length unit"]),
    ("default unit of the wrong dimension", edit('length = "mm"', 'length = "kN"'), ["a length is needed"]),
    ("text that is not a quantity", edit("width = 90", 'width = "wide"'),
     ["does not start with a number"]),
    # --- negative or zero sizes
    ("negative diameter", edit("diameter = 30", "diameter = -30"), ["must be greater than zero, got -30"]),
    ("zero thickness", edit("thickness = 20", "thickness = 0"), ["must be greater than zero, got 0"]),
    ("zero yield strength", add('[material.mine]\nfy = "0 MPa"\nfu = "470 MPa"\nsource = "x"'),
     ["must be greater than zero"]),
    ("negative mass", edit("force = [0, -10]", 'mass = "-2 t"'), ["must not be negative"]),
    ("zero factor", edit('name = "EN 1993-1-8"', 'name = "EN 1993-1-8"\n[method.factors]\ngamma_M0 = 0'),
     ["a factor must be a finite number greater than zero"]),
    # --- geometry of holes and plates
    ("hole smaller than its pin", edit("hole = 32", "hole = 28"), ["smaller than the pin"]),
    ("plate hole smaller than the pin", edit("thickness = 20", "thickness = 20\nhole = 29"),
     ["the plate's hole is smaller than the pin"]),
    ("end distance inside the hole", edit("end = 50", "end = 15"),
     ["lies inside the hole"]),
    ("plate not wider than its hole", edit("width = 90", "width = 30"),
     ["not wider than its hole"]),
    # plates of a stack are sequential along the pin with non-negative gaps; a negative gap would put
    # two plates in the same place (overlap)
    ("overlapping plates (negative gap)", edit("gap = 2", "gap = -5"),
     ["field 'gap'", "would make this plate overlap the one before it"]),
    ("share above one", edit("thickness = 20", "thickness = 20\nshare = 1.5"), ["0 < share <= 1"]),
    ("stack of one plate", add('[pin.P2]\njoins = ["beam.C"]\ndiameter = 20\nhole = 21\nmaterial = "S355"\n'
                               '[[pin.P2.plate]]\nmember = "beam"\nthickness = 10\nmaterial = "S355"\n'
                               'width = 50\nend = 30'),
     ["a stack needs at least two plates"]),
    ("member at the pin without a plate", edit(PLATE2 + "\n", ""),
     ["member 'beam' meets pin P1 but has no plate"]),
    # --- places, names and references
    ("pin at a point no body has", edit('joins = ["beam.A"]', 'joins = ["beam.Z"]'),
     ["body beam has no point 'Z'"]),
    ("pin joining points that are apart", add('[body.arm]\npoints = { A = [0, 10], D = [0, 500] }\n'
                                              '[link.stay]\nends = ["arm.D", "beam.B"]').replace(
                                                  'joins = ["beam.A"]', 'joins = ["beam.A", "arm.A"]'),
     ["the points it joins are not at one place"]),
    ("load on a body that does not exist", edit('at = "beam.C"', 'at = "bem.C"'),
     ["there is no body 'bem'", "did you mean 'beam'"]),
    ("load at a pin that does not exist", edit('at = "beam.C"', 'at = "P9"'), ["'P9' is not a"]),
    ("load in an undeclared case", edit('case = "c1"\nat', 'case = "c2"\nat'), ["there is no load case 'c2'"]),
    ("body with no connection", add('[body.loose]\npoints = { A = [0, 2000], B = [100, 2000] }'),
     ["body loose", "connected to nothing"]),
    ("pin connected to nothing", add('[pin.P7]\nat = [0, 700]'), ["pin P7 is connected to nothing"]),
    ("link with both ends at one place", add('[link.stub]\nends = ["beam.A", "beam.A"]'),
     ["a link needs a length"]),
    ("duplicate key in a table", edit("diameter = 30", "diameter = 30\ndiameter = 32"),
     ["not a valid TOML file"]),
    ("duplicate table", add("[case.c1]\n"), ["not a valid TOML file"]),
    ("link named like a body", add('[body.tie]\npoints = { A = [200, 300] }\n'
                                   '[link.tie]\nends = ["tie.A", "beam.C"]'),
     ["the name 'tie' is used by a body too"]),
    ("pin named like a body", add('[body.P1]\npoints = { X = [0, 900] }\n[support.top]\nat = "P1.X"\nkind = "fixed"'),
     ["the name 'P1' is used by a body too"]),
    ("reserved name", add('[body.ground]\npoints = { A = [0, 900] }\n[support.g]\nat = "ground.A"\nkind = "fixed"'),
     ["'ground' is a reserved member name"]),
    ("body listed twice on one pin", edit('joins = ["beam.A"]', 'joins = ["beam.A", "beam.A"]'),
     ["a body is listed twice"]),
    ("two supports at one pin", add('[support.again]\nat = "P1"\nkind = "pinned"'),
     ["pin P1 already has support left"]),
    ("fixed support at a pin", edit('kind = "pinned"', 'kind = "fixed"'), ["cannot be fixed"]),
    # --- loads
    ("force and mass both", edit("force = [0, -10]", 'force = [0, -10]\nmass = "1 t"'),
     ["give either force or mass, not both"]),
    ("moment on a pin", add('[[load]]\ncase = "c1"\nat = "P1"\nmoment = "1 kN*m"'),
     ["a pin turns freely and takes no moment"]),
    ("load body named at a body point", edit('at = "beam.C"', 'at = "beam.C"\nbody = "beam"'),
     ["'body' is only for a load at a pin"]),
    ("mass with an angle", edit("force = [0, -10]", 'mass = "1 t"\nangle = "30 deg"'), ["a mass loads straight down"]),
    ("negative force magnitude", edit("force = [0, -10]", 'force = -10\nangle = "90 deg"'), ["must not be negative"]),
    ("force pair with an angle", edit("force = [0, -10]", 'force = [0, -10]\nangle = "90 deg"'),
     ["give force = [Fx, Fy], or force"]),
    ("load body the pin does not join", add('[[load]]\ncase = "c1"\nat = "P1"\nbody = "arm"\nforce = [1, 0]'),
     ["body 'arm' is not joined by pin P1"]),
    ("normal on a pinned support", edit('kind = "pinned"', 'kind = "pinned"\nnormal = [0, 1]'),
     ["only a roller has a normal"]),
    ("title that is not text", edit('title = "bad-input base job (invented)"', "title = 42"),
     ["expected text, got 42"]),
    ("link end on a missing body", add('[link.stay]\nends = ["beam.C", "wall.X"]'), ["there is no body 'wall'"]),
    # --- load combinations (the [combination.NAME] format of docs/jobfile.md)
    ("combination of a case that does not exist", add('[combination.lift]\ncases = { c1 = 1.5, c9 = 1.0 }'),
     ["table [combination.lift], field 'cases'", "there is no load case 'c9'"]),
    ("combination factor not a number", add('[combination.lift]\ncases = { c1 = nan }'),
     ["the factor on case 'c1' must be a finite number"]),
    ("combination named like a case", add('[combination.c1]\ncases = { c1 = 1.5 }'),
     ["the name 'c1' is used by a load case too"]),
    ("lift factor scoped to a missing combination",
     add('[combination.lift]\ncases = { c1 = 1.5 }\n[lift_factors]\nskew = { value = 1.25, combinations = ["lfit"] }'),
     ["there is no combination 'lfit'", "did you mean 'lift'"]),
    # --- NaN and infinite values
    ("NaN diameter", edit("diameter = 30", "diameter = nan"), ["is not a finite number"]),
    ("infinite force", edit("force = [0, -10]", "force = [0, -inf]"), ["is not a finite number"]),
    ("overflowing number", edit("thickness = 20", 'thickness = "1e999 mm"'), ["is not a finite number"]),
    ("NaN coordinate", edit("B = [1000, 0]", "B = [nan, 0]"), ["is not a finite number"]),
    ("NaN factor", edit('name = "EN 1993-1-8"', 'name = "EN 1993-1-8"\n[method.factors]\ngamma_M2 = nan'),
     ["a factor must be a finite number"]),
    ("NaN roller normal", edit("normal = [0, 1]", "normal = [nan, 1]"), ["a roller needs normal"]),
    ("weight that overflows", edit("force = [0, -10]", 'mass = "1e306 t"'), ["is too large"]),
    ("absurd force", edit("force = [0, -10]", 'force = [0, "-1e300 kN"]'), ["is too large"]),
    ("vanishing thickness", edit("thickness = 20", 'thickness = "1e-300 mm"'),
     ["too small for pinchk to compute with"]),
    ("absurd factor", edit('name = "EN 1993-1-8"', 'name = "EN 1993-1-8"\n[method.factors]\ngamma_M0 = 1e308'),
     ["a factor must lie between 0.001 and 1000"]),
    # --- structures statics cannot solve
    ("mechanism", edit('[support.right]\nat = "beam.B"\nkind = "roller"\nnormal = [0, 1]\n', ""),
     ["mechanism"]),
    ("indeterminate structure (no stiffness data)", edit('kind = "roller"\nnormal = [0, 1]', 'kind = "pinned"'),
     ["statically indeterminate", "body beam has no section: the stiffness solve needs"]),
    # the beam's right end hangs on a cable that runs down to an anchor: the load pushes it
    ("cable in compression", edit('[support.right]\nat = "beam.B"\nkind = "roller"\nnormal = [0, 1]\n',
                                  '[body.anchor]\npoints = { G = [1000, -1000] }\n'
                                  '[support.anchor]\nat = "anchor.G"\nkind = "fixed"\n'
                                  '[link.prop]\nends = ["beam.B", "anchor.G"]\nkind = "cable"\n'),
     ["cable prop would be in compression"]),
    # --- materials
    ("material without fu", add('[material.mine]\nfy = "355 MPa"\nsource = "mill certificate"').replace(
        'thickness = 20\nmaterial = "S355"', 'thickness = 20\nmaterial = "mine"'),
     ["material.mine", "missing required field 'fu'"]),
    ("material without the E a check needs",
     add('[material.mine]\nfy = "240 MPa"\nfu = "400 MPa"\nsource = "x"').replace(
        'thickness = 20\nmaterial = "S355"', 'thickness = 20\nmaterial = "mine"').replace(
        'hole = 32\n', 'hole = 32\nreplaceable = true\n'),
     ["material mine gives no modulus E", "EN 1993-1-8 eq (3.15)"]),
    ("material without a source", add('[material.mine]\nfy = "355 MPa"\nfu = "470 MPa"'),
     ["missing required field 'source'"]),
    ("yield above tensile strength", add('[material.mine]\nfy = "500 MPa"\nfu = "470 MPa"\nsource = "x"'),
     ["exceeds the tensile strength"]),
    ("material outside its size range", edit("thickness = 20", "thickness = 120"), ["is listed for sizes"]),
    # --- text fields and flags
    ("unknown limit state", edit('description = "10 kN down at mid-span"', 'limit_state = "ULT"'),
     ["'ULT' is not one of: ULS, SLS"]),
    ("unknown output units", edit('title = "bad-input base job (invented)"',
                                  'title = "x"\noutput_units = "metric"'), ["'metric' is not one of"]),
    ("flag that is not true or false", edit("hole = 32", 'hole = 32\nreplaceable = "yes"'),
     ["expected true or false"]),
    # --- quantity strings built to be expensive are refused quickly, by what they may contain
    ("long quantity string", edit("thickness = 20", 'thickness = "' + "1" * 5000 + ' mm"'),
     ["at most 40 characters"]),
    ("chained powers", edit("thickness = 20", 'thickness = "1 m^9^9^9"'),
     ["a power must be a unit raised to a whole number"]),
    ("stray dot in a quantity", edit("thickness = 20", 'thickness = "20.."'), ["is not a unit pinchk reads"]),
    ("unit with a leading dot", edit("thickness = 20", 'thickness = "20 .mm"'), ["is not a unit pinchk reads"]),
    ("characters outside a quantity", edit("thickness = 20", 'thickness = "20 mm; rm -rf"'),
     ["is not a quantity pinchk reads"]),
]


@pytest.mark.parametrize("text,fragments", [c[1:] for c in CASES], ids=[c[0] for c in CASES])
def test_bad_job_gives_clear_message(tmp_path, capsys, text, fragments):
    t0 = time.perf_counter()
    code, out, path = run_cli(tmp_path, text, capsys=capsys)
    elapsed = time.perf_counter() - t0
    assert "Traceback" not in out.err and "internal error" not in out.err
    assert code == cli.EXIT_INPUT, out.err
    assert str(path) in out.err  # the message names the file
    for frag in fragments:
        assert frag in out.err, f"{frag!r} not in:\n{out.err}"
    assert out.out == ""  # nothing half-printed to stdout
    assert elapsed < 5.0  # generous: each is a small file; the quantity-string cases must not hang


def test_base_job_is_valid(tmp_path, capsys):
    """The base of the catalogue runs, so each case fails for its own reason only."""
    code, out, _ = run_cli(tmp_path, BASE, capsys=capsys)
    assert code in (cli.EXIT_PASS, cli.EXIT_FAIL), out.err
    assert out.err == ""


def test_catalogue_size():
    assert len(CASES) >= 40
    assert len({c[0] for c in CASES}) == len(CASES)


def test_crafted_quantity_refused_quickly(tmp_path, capsys):
    """A short string that makes pint compute 9^(9^9) is refused before pint sees it."""
    from pinchk.units import QuantityError, to_si

    for s in ["1 m^9^9^9", "1 m**9**9**9", "1 m ^ 9 ^ 9", "1 9^9^9 m", "1 m^(9^99)", "1 m^999"]:
        t0 = time.perf_counter()
        with pytest.raises(QuantityError, match="power|not a unit pinchk reads"):
            to_si(s, "length")
        assert time.perf_counter() - t0 < 0.5, s
    # ordinary powers still read (1 m^-1 * m^2 is 1 m; mm^2/mm is 1 mm)
    assert to_si("1 m^-1*m^2", "length") == pytest.approx(1.0, rel=1e-15)
    assert to_si("3 mm**2/mm", "length") == pytest.approx(3e-3, rel=1e-15)


# --- files that are not job files

def test_not_toml(tmp_path, capsys):
    code, out, _ = run_cli(tmp_path, "this is not { a job file\n", capsys=capsys)
    assert code == 2 and "not a valid TOML file" in out.err and "Traceback" not in out.err


def test_empty_file(tmp_path, capsys):
    code, out, _ = run_cli(tmp_path, "", capsys=capsys)
    assert code == 2 and "the file is empty" in out.err


def test_only_comments(tmp_path, capsys):
    code, out, _ = run_cli(tmp_path, "# nothing here\n\n", capsys=capsys)
    assert code == 2 and "the file is empty" in out.err


def test_binary_file(tmp_path, capsys):
    code, out, _ = run_cli(tmp_path, bytes(range(256)) * 4, capsys=capsys)
    assert code == 2 and "not UTF-8 text" in out.err


def test_huge_file(tmp_path, capsys):
    from pinchk.jobfile import MAX_FILE_BYTES

    big = BASE + "#" + "x" * (MAX_FILE_BYTES + 10) + "\n"
    t0 = time.perf_counter()
    code, out, _ = run_cli(tmp_path, big, capsys=capsys)
    assert code == 2 and f"at most {MAX_FILE_BYTES} bytes" in out.err
    assert time.perf_counter() - t0 < 5.0


def test_missing_file(tmp_path, capsys):
    code = cli.main(["run", str(tmp_path / "nowhere.toml")])
    err = capsys.readouterr().err
    assert code == 2 and "cannot read the job file" in err and "nowhere.toml" in err


def test_directory_as_job(tmp_path, capsys):
    code = cli.main(["run", str(tmp_path)])
    err = capsys.readouterr().err
    assert code == 2 and "Traceback" not in err and str(tmp_path) in err


def test_top_level_not_a_table(tmp_path, capsys):
    code, out, _ = run_cli(tmp_path, "link = 5\n" + BASE, capsys=capsys)
    assert code == 2 and "expected a table [link]" in out.err


# --- several errors in one job are all reported at once

def test_several_errors_reported_at_once(tmp_path, capsys):
    text = edit("diameter = 30", "diameter = -30",
                'at = "beam.C"', 'at = "bem.C"',
                "thickness = 20", 'thickness = "20 kN"',
                'kind = "roller"', 'kind = "rollr"')
    code, out, _ = run_cli(tmp_path, text, capsys=capsys)
    assert code == 2
    assert "4 problems" in out.err
    for frag in ("must be greater than zero", "no body 'bem'", "a length is needed", "did you mean 'roller'"):
        assert frag in out.err
    # each problem names its table and field
    assert "table [pin.P1], field 'diameter'" in out.err
    assert "table [load #1], field 'at'" in out.err


# --- outputs that cannot be written: exit 2, a clear message, and no file left behind

def test_output_into_missing_folder(tmp_path, capsys):
    job = tmp_path / "job.toml"
    job.write_text(BASE, encoding="utf-8")
    target = tmp_path / "no" / "such" / "folder" / "out.json"
    code = cli.main(["run", str(job), "--format", "json", "--output", str(target)])
    out = capsys.readouterr()
    assert code == 2 and "Traceback" not in out.err
    assert "cannot write" in out.err and "No such file or directory" in out.err
    assert str(target) in out.err  # names the path the user gave, not a temporary file
    assert ".pinchk-" not in out.err
    assert not target.exists()


@pytest.mark.skipif(os.name != "posix", reason="POSIX permissions")
def test_output_into_read_only_folder(tmp_path, capsys):
    job = tmp_path / "job.toml"
    job.write_text(BASE, encoding="utf-8")
    folder = tmp_path / "ro"
    folder.mkdir()
    folder.chmod(stat.S_IRUSR | stat.S_IXUSR)
    try:
        probe = folder / "probe"
        try:
            probe.write_text("x")
            probe.unlink()
            pytest.skip("running with privileges that ignore folder permissions (root)")
        except PermissionError:
            pass
        target = folder / "out.csv"
        code = cli.main(["run", str(job), "--format", "csv", "--output", str(target)])
        out = capsys.readouterr()
        assert code == 2 and "Traceback" not in out.err
        assert "Permission denied" in out.err and str(target) in out.err
        assert os.listdir(folder) == []  # no temporary file left behind
    finally:
        folder.chmod(stat.S_IRWXU)


def test_output_onto_a_folder(tmp_path, capsys):
    """--output naming an existing folder: refused (cannot replace a folder by a file), nothing changed."""
    job = tmp_path / "job.toml"
    job.write_text(BASE, encoding="utf-8")
    folder = tmp_path / "out"
    folder.mkdir()
    code = cli.main(["run", str(job), "--output", str(folder)])
    out = capsys.readouterr()
    assert code == 2 and "Traceback" not in out.err
    assert f"cannot write {folder}" in out.err
    assert folder.is_dir() and os.listdir(folder) == []
    assert [p.name for p in tmp_path.iterdir() if p.name.startswith(".pinchk-")] == []


def test_output_onto_the_job_file(tmp_path, capsys):
    job = tmp_path / "job.toml"
    job.write_text(BASE, encoding="utf-8")
    code = cli.main(["run", str(job), "--output", str(job)])
    out = capsys.readouterr()
    assert code == 2 and "refusing to overwrite the input file" in out.err
    assert job.read_text(encoding="utf-8") == BASE


def test_output_under_a_file(tmp_path, capsys):
    """--output whose folder is a regular file (works as root too, where permissions do not bind)."""
    job = tmp_path / "job.toml"
    job.write_text(BASE, encoding="utf-8")
    blocker = tmp_path / "notes.txt"
    blocker.write_text("a file, not a folder")
    code = cli.main(["run", str(job), "--output", str(blocker / "out.txt")])
    out = capsys.readouterr()
    assert code == 2 and "Traceback" not in out.err
    assert "Not a directory" in out.err and str(blocker / "out.txt") in out.err
    assert blocker.read_text() == "a file, not a folder"


def _nth_line(text: str, header: str, k: int, key: str) -> int:
    """1-based line of ``key`` in the k-th table under ``header`` (worked out here, independently)."""
    lines = text.splitlines()
    heads = [i for i, ln in enumerate(lines) if ln.strip() == header]
    i = heads[k - 1] + 1
    while not lines[i].startswith(key):
        i += 1
    return i + 1


def test_problem_lines_point_at_the_field(tmp_path, capsys):
    """The line given for a problem in an array of tables is that table's line, not a same-named key
    elsewhere (the [units] table also has a 'force' line)."""
    text = edit("force = [0, -10]", 'force = [0, "10 MPa"]', "gap = 2", "gap = -1")
    code, out, _ = run_cli(tmp_path, text, capsys=capsys)
    assert code == 2
    assert f"line {_nth_line(text, '[[load]]', 1, 'force')}, table [load #1], field 'force'" in out.err
    assert f"line {_nth_line(text, '[[pin.P1.plate]]', 3, 'gap')}, table [pin.P1.plate #3], field 'gap'" in out.err


EXAMPLES = os.path.join(os.path.dirname(__file__), "..", "examples")


@pytest.mark.parametrize("cell,fragment", [
    ("9..", "is not a unit pinchk reads"),  # pint's parser raised AssertionError on this
    ("-1e308", "is too large"),  # overflowed to -inf N in the kN column
    ("nan", "does not start with a number"),
    ("1e999", "not a finite number"),
    ("12 MPa", "a force is needed"),
])
def test_bad_cell_in_a_forces_file(tmp_path, capsys, cell, fragment):
    """The demo that reads its joint forces from a CSV file, with one bad cell."""
    import shutil

    for name in ("padeye_forces.toml", "padeye_forces.csv"):
        shutil.copy(os.path.join(EXAMPLES, name), tmp_path / name)
    csv = tmp_path / "padeye_forces.csv"
    lines = csv.read_text(encoding="utf-8").splitlines()
    i = next(k for k, ln in enumerate(lines) if ln.startswith("lift_skew,"))
    cells = lines[i].split(",")
    cells[4] = cell  # fy
    lines[i] = ",".join(cells)
    csv.write_text("\n".join(lines) + "\n", encoding="utf-8")
    code = cli.main(["run", str(tmp_path / "padeye_forces.toml")])
    err = capsys.readouterr().err
    assert code == 2 and "Traceback" not in err
    assert fragment in err and "padeye_forces.csv" in err and f"line {i + 1}" in err


def test_bad_job_with_output_writes_nothing(tmp_path, capsys):
    """An input error stops the run before anything is written to --output."""
    target = tmp_path / "out.json"
    code, out, _ = run_cli(tmp_path, edit("diameter = 30", "diameter = -30"), "--format", "json",
                           "--output", str(target), capsys=capsys)
    assert code == 2 and not target.exists()
    assert [p.name for p in tmp_path.iterdir()] == ["job.toml"]


@pytest.mark.parametrize("argv", [["run"], ["run", "job.toml", "--format", "xml"], ["bogus"],
                                  ["run", "job.toml", "--outptu", "x"]])
def test_bad_command_line(tmp_path, capsys, argv):
    """A wrong command line is a wrong input too: status 2 and a usage message, no traceback."""
    with pytest.raises(SystemExit) as exc:
        cli.main(argv)
    err = capsys.readouterr().err
    assert exc.value.code == 2
    assert "usage:" in err and "Traceback" not in err


@pytest.mark.parametrize("command", ["compare", "size", "rate"])
def test_every_command_refuses_the_catalogue(tmp_path, capsys, command):
    """The other commands that read a job refuse every bad job of the catalogue the same way (exit 2)."""
    path = tmp_path / "job.toml"
    for name, text, fragments in CASES:
        path.write_text(text, encoding="utf-8")
        code = cli.main([command, str(path)])
        err = capsys.readouterr().err
        assert code == cli.EXIT_INPUT and "Traceback" not in err, (name, err)
        assert fragments[0] in err, (name, err)
