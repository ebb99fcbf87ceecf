"""pinchk.jobfile: input errors reported together, each with file, table, field and line, with
suggestions for misspelt names; and what a valid file turns into (SI values)."""

from __future__ import annotations

import math
import textwrap

import pytest

from pinchk.errors import InputError
from pinchk.jobfile import load_job

from .conftest import DEMO

GOOD = """
    [job]
    title = "small frame (test)"
    [units]
    length = "mm"
    force = "kN"
    [method]
    name = "EN 1993-1-8"
    [body.arm]
    points = { A = [0, 0], B = [2000, 0] }
    [pin.PA]
    joins = ["arm.A"]
    diameter = 30
    hole = 31
    material = "42CrMo4+QT"
    [[pin.PA.plate]]
    member = "ground"
    thickness = 10
    material = "S355"
    width = 80
    end = 45
    [[pin.PA.plate]]
    member = "arm"
    thickness = 20
    material = "S355"
    width = 80
    end = 45
    gap = 1
    [[pin.PA.plate]]
    member = "ground"
    thickness = 10
    material = "S355"
    width = 80
    end = 45
    gap = 1
    [support.wall]
    at = "PA"
    kind = "pinned"
    [support.prop]
    at = "arm.B"
    kind = "roller"
    normal = [0, 1]
    [case.lift]
    [[load]]
    case = "lift"
    at = "arm.B"
    mass = "2 t"
    [[load]]
    case = "lift"
    at = "arm.A"
    force = "5 kN"
    angle = "30 deg"
    """


def problems(make_job, text):
    with pytest.raises(InputError) as exc:
        make_job(text)
    return exc.value.problems


def test_good_file_reads_to_si(make_job):
    job = make_job(GOOD)
    assert job.bodies["arm"].points["B"] == (2.0, 0.0)
    pin = job.pins["PA"]
    assert pin.diameter == pytest.approx(0.030) and pin.stack[1].gap == pytest.approx(0.001)
    mass, angled = job.loads
    assert mass.force == pytest.approx((0.0, -2000 * 9.80665))  # weight with standard gravity, CGPM 1901
    assert angled.force == pytest.approx((5e3 * math.cos(math.pi / 6), 5e3 * math.sin(math.pi / 6)))


def test_several_problems_reported_together(make_job):
    """Five independent mistakes, all in one InputError, each with its table and field."""
    text = (GOOD
            .replace("hole = 31", "hole = \"31 kN\"")                  # wrong dimension
            .replace('material = "42CrMo4+QT"', 'material = "42CrMo4"')  # unknown material
            .replace("[case.lift]", "[case.lift]\n    limit_sate = \"ULS\"")  # misspelt field
            .replace('kind = "pinned"', 'kind = "pined"')               # misspelt choice
            .replace('case = "lift"\n    at = "arm.B"', 'case = "lfit"\n    at = "arm.B"'))  # unknown case
    found = {(p.table, p.field) for p in problems(make_job, text)}
    assert {("pin.PA", "hole"), ("pin.PA", "material"), ("case.lift", "limit_sate"),
            ("support.wall", "kind"), ("load #1", "case")} <= found


@pytest.mark.parametrize("old, new, table, field, hint", [
    ("diameter = 30", "diamter = 30", "pin.PA", "diamter", "did you mean 'diameter'?"),
    ('material = "42CrMo4+QT"', 'material = "42CrMo4+Q"', "pin.PA", "material", "did you mean '42CrMo4+QT'?"),
    ('at = "arm.B"\n    kind', 'at = "arm.C"\n    kind', "support.prop", "at", "body arm has no point 'C'"),
    ('at = "PA"', 'at = "PAA"', "support.wall", "at", "did you mean 'PA'?"),
    ('joins = ["arm.A"]', 'joins = ["ram.A"]', "pin.PA", "joins", "did you mean 'arm'?"),
    ('case = "lift"\n    at = "arm.B"', 'case = "lit"\n    at = "arm.B"', "load #1", "case", "did you mean 'lift'?"),
    ('name = "EN 1993-1-8"', 'name = "EN 1993-1-9"', "method", "name", "did you mean 'EN 1993-1-8'?"),
    ('member = "arm"', 'member = "amr"', "pin.PA.plate #2", "member", "did you mean 'arm'?"),
    ('kind = "roller"', 'kind = "roler"', "support.prop", "kind", "did you mean 'roller'?"),
])
def test_suggestions_for_misspelt_names(make_job, old, new, table, field, hint):
    assert old in GOOD
    ps = problems(make_job, GOOD.replace(old, new, 1))
    p = next((p for p in ps if p.table == table and p.field == field), None)
    assert p is not None, [str(q) for q in ps]
    assert hint in p.message


def test_misspelt_factor_name(make_job):
    ps = problems(make_job, GOOD.replace('name = "EN 1993-1-8"',
                                         'name = "EN 1993-1-8"\n    [method.factors]\n    gama_M2 = 1.3'))
    assert any(p.table == "method.factors" and "did you mean 'gamma_M2'" in p.message for p in ps)


def test_misspelt_required_field_is_one_problem(make_job):
    """The misspelling is the problem; the field it stands for is not also reported missing."""
    ps = problems(make_job, GOOD.replace("diameter = 30", "diamter = 30"))
    assert len(ps) == 1 and ps[0].field == "diamter"


def test_line_numbers_point_at_the_field(write_job):
    """The line of a field in the k-th plate or load is that field's own line."""
    text = DEMO.read_text()
    lines = text.splitlines()
    k = next(i for i, ln in enumerate(lines) if ln == "thickness = 36")
    lines[k] = 'thickness = "36 kN"'
    j = next(i for i, ln in enumerate(lines) if ln.startswith('force = ["10 kN"'))
    lines[j] = 'force = ["10 kN", "0 mm"]'
    with pytest.raises(InputError) as exc:
        load_job(write_job("\n".join(lines) + "\n"))
    by_field = {(p.table, p.field): p for p in exc.value.problems}
    assert by_field[("pin.P_apex.plate #3", "thickness")].line == k + 1
    assert by_field[("load #3", "force")].line == j + 1


def test_problem_text_names_file_table_field_and_line(write_job):
    path = write_job(textwrap.dedent(GOOD).replace("hole = 31", 'hole = "31 MPa"'))
    with pytest.raises(InputError) as exc:
        load_job(path)
    text = exc.value.text()
    line_no = textwrap.dedent(GOOD).splitlines().index("hole = 31") + 1
    assert text.startswith(f"input error: {path}, line {line_no}, table [pin.PA], field 'hole': ")
    assert "stress" in text and "a length is needed" in text


def test_bare_number_without_default_unit(make_job):
    """Without [units] length, every bare length is refused, each where it is."""
    ps = problems(make_job, GOOD.replace('length = "mm"\n', ""))
    no_unit = {(p.table, p.field) for p in ps if "no default length unit" in p.message}
    assert {("body.arm", "points.A"), ("body.arm", "points.B")} <= no_unit
    assert "set [units] length" in next(p.message for p in ps if p.field == "points.A")


def test_pin_points_must_coincide(make_job):
    text = GOOD.replace('joins = ["arm.A"]', 'joins = ["arm.A", "other.A"]') + """
    [body.other]
    points = { A = [0, 5] }
    """
    ps = problems(make_job, text)
    assert any(p.table == "pin.PA" and p.field == "joins" and "not at one place" in p.message for p in ps)


def test_every_member_at_a_checked_pin_needs_a_plate(make_job):
    text = GOOD.replace("""    [[pin.PA.plate]]
    member = "arm"
    thickness = 20
    material = "S355"
    width = 80
    end = 45
    gap = 1
""", "")
    ps = problems(make_job, text)
    assert any("member 'arm' meets pin PA but has no plate" in p.message for p in ps)


def test_hole_smaller_than_pin(make_job):
    ps = problems(make_job, GOOD.replace("hole = 31", "hole = 29"))
    assert any(p.field == "hole" and "smaller than the pin" in p.message for p in ps)


def test_links_only_job_needs_no_body(make_job):
    """Pins standing at their own place joined by links: a structure without bodies is read."""
    text = """
    [job]
    title = "links only"
    [units]
    length = "m"
    force = "kN"
    [method]
    name = "EN 1993-1-8"
    [pin.A]
    at = [0, 0]
    [pin.B]
    at = [3, 0]
    [pin.C]
    at = [0, 4]
    [link.ab]
    ends = ["A", "B"]
    [link.bc]
    ends = ["B", "C"]
    [link.ca]
    ends = ["C", "A"]
    [support.sa]
    at = "A"
    kind = "pinned"
    [support.sc]
    at = "C"
    kind = "roller"
    normal = [1, 0]
    [case.c]
    [[load]]
    case = "c"
    at = "B"
    force = [0, -10]
    """
    job = make_job(text)
    assert not job.bodies and set(job.links) == {"ab", "bc", "ca"}


def test_no_bodies_and_no_pins_of_their_own(make_job):
    ps = problems(make_job, """
    [job]
    title = "empty"
    [method]
    name = "EN 1993-1-8"
    [case.c]
    """)
    assert any(p.table == "body" and "no bodies" in p.message for p in ps)
    assert any(p.table == "load" and "no loads" in p.message for p in ps)


def test_links_only_job_still_needs_supports(make_job):
    ps = problems(make_job, """
    [job]
    title = "floating"
    [units]
    length = "m"
    force = "kN"
    [method]
    name = "EN 1993-1-8"
    [pin.A]
    at = [0, 0]
    [pin.B]
    at = [3, 0]
    [link.ab]
    ends = ["A", "B"]
    [case.c]
    [[load]]
    case = "c"
    at = "B"
    force = [0, -10]
    """)
    assert any(p.table == "support" and "no supports" in p.message for p in ps)


def test_moment_on_a_pin_refused(make_job):
    text = GOOD + """
    [[load]]
    case = "lift"
    at = "PA"
    moment = "3 kN*m"
    """
    ps = problems(make_job, text)
    assert any(p.field == "moment" and "takes no moment" in p.message for p in ps)


def test_oversized_file_refused(tmp_path):
    from pinchk.jobfile import MAX_FILE_BYTES

    path = tmp_path / "big.toml"
    path.write_bytes(b"#" * (MAX_FILE_BYTES + 1))
    with pytest.raises(InputError, match="at most"):
        load_job(path)


def with_ground_shares(shares):
    """GOOD with ``share = s`` on the two ground plates of pin PA (None: no share on that plate)."""
    parts = GOOD.split('member = "ground"\n')
    assert len(parts) == 3
    out = parts[0]
    for s, rest in zip(shares, parts[1:], strict=True):
        out += 'member = "ground"\n' + (f"    share = {s}\n" if s is not None else "") + rest
    return out


@pytest.mark.parametrize("shares, message", [
    ((0.5, 0.3), "add up to 0.8"),
    ((0.5, None), "on some of its plates only"),
])
def test_plate_shares_must_account_for_the_whole_force(make_job, shares, message):
    """A member's plates carry all of its force: given shares must be on every plate and sum to 1
    (0.5 + 0.3 would leave a fifth of the force on no plate, and the pin out of equilibrium)."""
    ps = problems(make_job, with_ground_shares(shares))
    assert any(p.table == "pin.PA" and p.field == "plate" and message in p.message for p in ps), ps


def test_plate_shares_adding_to_one_are_read(make_job):
    pin = make_job(with_ground_shares((0.7, 0.3))).pins["PA"]
    assert [p.share for p in pin.stack] == [0.7, None, 0.3]


def test_one_mistake_gives_one_message_not_a_cascade():
    """A misspelt support kind at a pin must not also report the pin's "ground" plate as meeting nothing,
    and a point that cannot be read must not also be reported missing where a pin joins it."""
    from pathlib import Path

    import pytest

    from pinchk import load_job
    from pinchk.errors import InputError

    with pytest.raises(InputError) as e:
        load_job(Path(__file__).parent / "data" / "cascade_support_kind.toml")
    assert len(e.value.problems) == 1 and "did you mean 'pinned'" in str(e.value)

    from pinchk.jobfile import parse_job

    data = {"job": {"title": "x"}, "method": {"name": "EN 1993-1-8"}, "body": {"a": {"points": {"A": [0, 0]}}},
            "pin": {"P": {"joins": ["a.A"], "diameter": "40 kN"}}}
    with pytest.raises(InputError) as e:
        parse_job(data, "mem.toml")
    text = str(e.value)
    assert "no point" not in text  # the unreadable point is reported once, where it is written
    assert "field 'diameter'" in text and "is a unit of force" in text  # the pin's own sizes still checked
