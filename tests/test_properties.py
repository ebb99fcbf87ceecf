"""Properties a result must have whatever way the job is written (hypothesis).

Random determinate frames (three-hinged frames, wall brackets with a tie, the tie's anchor on a body or
on a pin at a place of its own, A-frames with a tie and a roller foot) with random geometry, loads and
pin stacks are written as job files and run. The checks made here are identities of statics and of the
methods, not values from a source:

- every solved body and pin is in equilibrium (worked here from the job's own geometry and loads, not
  by the solver's own residual function);
- the same job in SI or US customary units gives the same utilizations;
- rotating or translating the whole structure with its loads changes no utilization;
- renaming and reordering bodies, pins, links, supports, cases, points and loads changes no result,
  and mirroring a stack (reversing the plate order along the pin) changes none either;
- scaling every load by k scales every force and moment demand by k; the other demands follow their
  own laws (interaction ratio k², contact stress and type-B thickness √k, geometry demands affine,
  yes/no detailing checks constant).

The reader is also fuzzed with random files and mutated demo jobs (every examples/*.toml): it raises
nothing but InputError, and the command line never exits with 3 (a bug). All geometry and loads are
random, invented for the test.
"""

from __future__ import annotations

import copy
import math
import random
from pathlib import Path

import numpy as np
import pytest
from hypothesis import HealthCheck, assume, given, settings
from hypothesis import strategies as st

import pinchk
from pinchk import cli
from pinchk.errors import InputError
from pinchk.methods import METHODS

IN, KIP = 0.0254, 4448.2216152605  # exact: 1 in = 25.4 mm; 1 lbf = 4.4482216152605 N (NIST SP 811)
KSI = KIP / IN**2  # 1 ksi = 1 kip / in², in Pa

SETTINGS = dict(max_examples=25, deadline=None, derandomize=True,
                suppress_health_check=[HealthCheck.too_slow, HealthCheck.function_scoped_fixture])

PLATE_STEELS = ["S355", "S275", "A36", "A572-50", "own_plate"]
PIN_STEELS = ["42CrMo4+QT", "A193-B7"]
METHOD_CHOICES = [(name, v) for name, m in METHODS.items() for v in (m.VARIANTS or (None,))]


# ---------------------------------------------------------------- a job as plain data (SI floats)
#
# spec = {bodies: {b: {pt: (x, y)}}, pins: {p: {joins: [(b, pt)], d, hole, mat, rot, plates: [...]}},
#         links: {l: {ends: [ref, ref], kind}}, supports: {s: {at: ref, kind, normal}},
#         cases: [c], loads: [{case, at: ref, force, moment, body}], method: (name, variant)}
# ref = ("pin", p) or ("pt", b, pt); every figure SI.


def _plate(draw, member, d, hole, t_lo=0.008, t_hi=0.040):
    t = draw(st.floats(t_lo, t_hi))
    if member == "load":
        return {"member": member, "t": t}
    return {
        "member": member, "t": t,
        "width": hole + 2 * draw(st.floats(0.015, 0.09)),
        "end": hole / 2 + draw(st.floats(0.012, 0.09)),
        "mat": draw(st.sampled_from(PLATE_STEELS)),
        "en_type": draw(st.sampled_from(["A", "A", "B"])),
    }


def _stack(draw, members, d, hole):
    """Plates of a pin in order: a lap (one plate each, in random order) or a clevis (the first member's
    two halves outside, the rest between them)."""
    members = list(members)
    draw(st.randoms(use_true_random=False)).shuffle(members)
    if len(members) >= 2 and draw(st.booleans()):
        outer = members[0]
        inner = [_plate(draw, m, d, hole) for m in members[1:]]
        a = _plate(draw, outer, d, hole, 0.006, 0.025)
        b = dict(a)
        plates = [a, *inner, b]
    else:
        plates = [_plate(draw, m, d, hole) for m in members]
    for i, p in enumerate(plates):
        p["gap"] = 0.0 if i == 0 else draw(st.sampled_from([0.0, 0.001, 0.002, 0.005]))
    return plates


def _members_at(spec, pname):
    pin = spec["pins"][pname]
    out = [b for b, _ in pin["joins"]]
    out += [ln for ln, link in spec["links"].items() for e in link["ends"] if e == ("pin", pname)]
    out += ["ground" for s in spec["supports"].values() if s["at"] == ("pin", pname)]
    if any(ld["at"] == ("pin", pname) and ld.get("body") is None for ld in spec["loads"]):
        out.append("load")
    return out


def _finish(draw, spec):
    """Give every pin a size, materials and a stack of plates for every member meeting it."""
    for pname, pin in spec["pins"].items():
        d = draw(st.floats(0.020, 0.090))
        pin["d"] = d
        pin["hole"] = d + draw(st.floats(0.0005, 0.003))
        pin["mat"] = draw(st.sampled_from(PIN_STEELS))
        pin["rot"] = draw(st.booleans())
        pin["repl"] = draw(st.booleans())
        pin["plates"] = _stack(draw, _members_at(spec, pname), d, pin["hole"])
    spec["method"] = draw(st.sampled_from(METHOD_CHOICES))
    return spec


def _force(draw, top=60e3):
    return (draw(st.floats(-top, top, allow_subnormal=False)), draw(st.floats(-top, top, allow_subnormal=False)))


def _loads(draw, spec, places):
    loads = []
    for case in spec["cases"]:
        for at in draw(st.lists(st.sampled_from(places), min_size=1, max_size=3)):
            ld = {"case": case, "at": at, "force": _force(draw), "moment": 0.0, "body": None}
            if at[0] == "pt" and draw(st.booleans()):
                ld["moment"] = draw(st.floats(-5e3, 5e3))
            loads.append(ld)
    return loads


@st.composite
def three_hinged(draw):
    span = draw(st.floats(1.0, 8.0))
    h = draw(st.floats(0.4, 1.5)) * span
    xc = draw(st.floats(0.25, 0.75)) * span
    dy = draw(st.floats(-0.2, 0.2)) * span
    ql = (draw(st.floats(0.1, 0.9)) * xc, draw(st.floats(0.1, 0.9)) * h)
    qr = (xc + draw(st.floats(0.1, 0.9)) * (span - xc), dy + draw(st.floats(0.1, 0.9)) * (h - dy))
    spec = {
        "bodies": {"left": {"F": (0.0, 0.0), "C": (xc, h), "Q": ql},
                   "right": {"F": (span, dy), "C": (xc, h), "Q": qr}},
        "pins": {"PF1": {"joins": [("left", "F")]}, "PF2": {"joins": [("right", "F")]},
                 "PC": {"joins": [("left", "C"), ("right", "C")]}},
        "links": {},
        "supports": {"s1": {"at": ("pin", "PF1"), "kind": "pinned"}, "s2": {"at": ("pin", "PF2"), "kind": "pinned"}},
        "cases": ["c1", "c2"],
    }
    if draw(st.booleans()):  # the right foot held at the body's own point, with no pin to check there
        del spec["pins"]["PF2"]
        spec["supports"]["s2"]["at"] = ("pt", "right", "F")
    places = [("pt", "left", "Q"), ("pt", "right", "Q"), ("pin", "PC")]
    spec["loads"] = _loads(draw, spec, places)
    return _finish(draw, spec)


@st.composite
def wall_bracket(draw):
    a = draw(st.floats(0.5, 3.0))
    b = a + draw(st.sampled_from([-1, 1])) * draw(st.floats(0.3, 1.5))
    lx = draw(st.floats(0.8, 4.0))
    ly = a + draw(st.floats(-0.5, 0.5)) * lx
    tip = (lx * draw(st.floats(1.0, 1.4)), ly + draw(st.floats(-0.3, 0.3)))
    spec = {
        "bodies": {"wall": {"W": (0.0, 0.0), "A": (0.0, a), "T": (0.0, b)},
                   "boom": {"A": (0.0, a), "B": (lx, ly), "Tip": tip}},
        "pins": {"PA": {"joins": [("wall", "A"), ("boom", "A")]}, "PT": {"joins": [("wall", "T")]},
                 "PB": {"joins": [("boom", "B")]}},
        "links": {"tie": {"ends": [("pin", "PT"), ("pin", "PB")], "kind": "link"}},
        "supports": {"base": {"at": ("pt", "wall", "W"), "kind": "fixed"}},
        "cases": ["c1", "c2"],
    }
    if draw(st.booleans()):  # the tie anchored on a pin at a place of its own, with its own support
        del spec["bodies"]["wall"]["T"]
        spec["pins"]["PT"] = {"joins": [], "at": (0.0, b)}
        spec["supports"]["anchor"] = {"at": ("pin", "PT"), "kind": "pinned"}
    spec["loads"] = _loads(draw, spec, [("pt", "boom", "Tip"), ("pin", "PB")])
    return _finish(draw, spec)


@st.composite
def a_frame(draw):
    span = draw(st.floats(1.5, 8.0))
    h = draw(st.floats(0.5, 1.5)) * span
    xa = draw(st.floats(0.3, 0.7)) * span
    s1, s2 = draw(st.floats(0.3, 0.7)), draw(st.floats(0.3, 0.7))
    tl = (s1 * xa, s1 * h)
    tr = (span + s2 * (xa - span), s2 * h)
    ang = math.radians(90 + draw(st.floats(-30, 30)))
    spec = {
        "bodies": {"leg_l": {"F": (0.0, 0.0), "T": tl, "A": (xa, h)},
                   "leg_r": {"F": (span, 0.0), "T": tr, "A": (xa, h)}},
        "pins": {"PA": {"joins": [("leg_l", "A"), ("leg_r", "A")]}, "PL": {"joins": [("leg_l", "T")]},
                 "PR": {"joins": [("leg_r", "T")]}, "PF1": {"joins": [("leg_l", "F")]},
                 "PF2": {"joins": [("leg_r", "F")]}},
        "links": {"tie": {"ends": [("pin", "PL"), ("pin", "PR")], "kind": "link"}},
        "supports": {"fix": {"at": ("pin", "PF1"), "kind": "pinned"},
                     "wheel": {"at": ("pin", "PF2"), "kind": "roller", "normal": (math.cos(ang), math.sin(ang))}},
        "cases": ["c1", "c2"],
    }
    spec["loads"] = _loads(draw, spec, [("pin", "PA"), ("pt", "leg_l", "A"), ("pt", "leg_r", "T")])
    for ld in spec["loads"]:  # a load at the apex pin may act on one leg's lug
        if ld["at"] == ("pin", "PA") and draw(st.booleans()):
            ld["body"] = draw(st.sampled_from(["leg_l", "leg_r"]))
    return _finish(draw, spec)


frames = st.one_of(three_hinged(), wall_bracket(), a_frame())


# ---------------------------------------------------------------- writing a spec as a job file

def _num(x: float, system: str, dim: str) -> str:
    """A quantity: SI as strings with units, US as bare numbers in the job's [units]."""
    if system == "SI":
        factor, unit = {"length": (1e-3, "mm"), "force": (1e3, "kN"), "moment": (1.0, "N*m"),
                        "stress": (1e6, "MPa")}[dim]
        return f'"{x / factor!r} {unit}"'
    factor = {"length": IN, "force": KIP, "moment": KIP * IN, "stress": KSI}[dim]
    return repr(x / factor)


def _ref(ref) -> str:
    return f'"{ref[1]}"' if ref[0] == "pin" else f'"{ref[1]}.{ref[2]}"'


def to_toml(spec, system: str = "SI") -> str:
    L = lambda x: _num(x, system, "length")  # noqa: E731
    F = lambda x: _num(x, system, "force")  # noqa: E731
    out = ['[job]', 'title = "random frame (generated for a property test)"']
    if system == "US":
        out += ['output_units = "US"', '[units]', 'length = "in"', 'force = "kip"', 'moment = "kip*in"',
                'stress = "ksi"']
    name, variant = spec["method"]
    out += ['[method]', f'name = "{name}"'] + ([f'design = "{variant}"'] if variant else [])
    out += ['[material.own_plate]', f'fy = {_num(300e6, system, "stress")}', f'fu = {_num(440e6, system, "stress")}',
            f'E = {_num(200e9, system, "stress")}', 'source = "invented for a property test"']
    for b, pts in spec["bodies"].items():
        inner = ", ".join(f"{p} = [{L(x)}, {L(y)}]" for p, (x, y) in pts.items())
        out += [f"[body.{b}]", f"points = {{ {inner} }}"]
    for ln, link in spec["links"].items():
        a, b = (_ref(e) for e in link["ends"])
        out += [f"[link.{ln}]", f"ends = [{a}, {b}]", f'kind = "{link["kind"]}"']
    for sn, s in spec["supports"].items():
        out += [f"[support.{sn}]", f"at = {_ref(s['at'])}", f'kind = "{s["kind"]}"']
        if s["kind"] == "roller":
            out.append(f"normal = [{s['normal'][0]!r}, {s['normal'][1]!r}]")
    for c in spec["cases"]:
        out += [f"[case.{c}]"]
    for ld in spec["loads"]:
        out += ["[[load]]", f'case = "{ld["case"]}"', f"at = {_ref(ld['at'])}",
                f"force = [{F(ld['force'][0])}, {F(ld['force'][1])}]"]
        if ld.get("moment"):
            out.append(f"moment = {_num(ld['moment'], system, 'moment')}")
        if ld.get("body"):
            out.append(f'body = "{ld["body"]}"')
    for pn, pin in spec["pins"].items():
        joins = ", ".join(f'"{b}.{p}"' for b, p in pin["joins"])
        out += [f"[pin.{pn}]"]
        if "at" in pin:
            out.append(f"at = [{L(pin['at'][0])}, {L(pin['at'][1])}]")
        out += [f"joins = [{joins}]", f"diameter = {L(pin['d'])}", f"hole = {L(pin['hole'])}",
                f'material = "{pin["mat"]}"', f"rotates = {'true' if pin['rot'] else 'false'}",
                f"replaceable = {'true' if pin['repl'] else 'false'}"]
        for pl in pin["plates"]:
            out += [f"[[pin.{pn}.plate]]", f'member = "{pl["member"]}"', f"thickness = {L(pl['t'])}",
                    f"gap = {L(pl['gap'])}"]
            if pl["member"] != "load":
                out += [f'material = "{pl["mat"]}"', f"width = {L(pl['width'])}", f"end = {L(pl['end'])}",
                        f'en_type = "{pl["en_type"]}"']
    return "\n".join(out) + "\n"


_COUNTER = [0]


def run_spec(tmp_path: Path, spec, system: str = "SI"):
    _COUNTER[0] += 1
    path = tmp_path / f"job{_COUNTER[0]}.toml"
    path.write_text(to_toml(spec, system), encoding="utf-8")
    try:
        return pinchk.run(str(path))
    except InputError as exc:
        # a random draw can land on a material size range the library does not cover, or on a
        # geometry a stack check refuses: not the property under test
        assume("is listed for sizes" not in str(exc))
        raise


# ---------------------------------------------------------------- transformations of a spec

def rotated(spec, theta: float, shift: tuple[float, float]):
    c, s = math.cos(theta), math.sin(theta)

    def rot(v):
        return (c * v[0] - s * v[1], s * v[0] + c * v[1])

    def move(p):
        x, y = rot(p)
        return (x + shift[0], y + shift[1])

    out = copy.deepcopy(spec)
    out["bodies"] = {b: {p: move(xy) for p, xy in pts.items()} for b, pts in spec["bodies"].items()}
    for pin in out["pins"].values():
        if "at" in pin:
            pin["at"] = move(pin["at"])
    for sup in out["supports"].values():
        if sup.get("normal"):
            sup["normal"] = rot(sup["normal"])
    for ld in out["loads"]:
        ld["force"] = rot(ld["force"])
    return out


def renamed(spec, rng: random.Random):
    """Every body, point, pin, link, support and case renamed, and every table order shuffled.

    Returns the new spec and the map new name -> old name (bodies, pins, links, cases)."""
    def fresh(prefix, old):
        return {o: f"{prefix}{rng.randrange(10**6)}x{i}" for i, o in enumerate(old)}

    bmap = fresh("b", spec["bodies"])
    pmap = fresh("p", spec["pins"])
    lmap = fresh("l", spec["links"])
    smap = fresh("s", spec["supports"])
    cmap = fresh("c", spec["cases"])
    ptmap = {b: fresh("q", pts) for b, pts in spec["bodies"].items()}
    member = {**bmap, **lmap, "ground": "ground", "load": "load"}

    def ref(r):
        return ("pin", pmap[r[1]]) if r[0] == "pin" else ("pt", bmap[r[1]], ptmap[r[1]][r[2]])

    def shuffled(items):
        items = list(items)
        rng.shuffle(items)
        return items

    out = {"method": spec["method"]}
    out["bodies"] = {bmap[b]: dict(shuffled((ptmap[b][p], xy) for p, xy in pts.items()))
                     for b, pts in shuffled(spec["bodies"].items())}
    out["pins"] = {}
    for pn, pin in shuffled(spec["pins"].items()):
        new = dict(pin)
        new["joins"] = shuffled((bmap[b], ptmap[b][p]) for b, p in pin["joins"])
        new["plates"] = [dict(pl, member=member[pl["member"]]) for pl in pin["plates"]]  # stack order kept
        out["pins"][pmap[pn]] = new
    out["links"] = {lmap[ln]: {"ends": [ref(e) for e in link["ends"]], "kind": link["kind"]}
                    for ln, link in shuffled(spec["links"].items())}
    out["supports"] = {smap[sn]: dict(s, at=ref(s["at"])) for sn, s in shuffled(spec["supports"].items())}
    out["cases"] = shuffled(cmap[c] for c in spec["cases"])
    out["loads"] = shuffled(dict(ld, case=cmap[ld["case"]], at=ref(ld["at"]),
                                 body=bmap[ld["body"]] if ld.get("body") else None) for ld in spec["loads"])
    back = {v: k for m in (bmap, pmap, lmap, cmap) for k, v in m.items()}
    return out, back


def mirrored(spec):
    """Every stack reversed along its pin (plate i becomes plate n-1-i; gaps move with their plates)."""
    out = copy.deepcopy(spec)
    for pin in out["pins"].values():
        pl = pin["plates"]
        gaps = [p["gap"] for p in pl]
        rev = list(reversed(pl))
        for i, p in enumerate(rev):
            p["gap"] = 0.0 if i == 0 else gaps[len(pl) - i]
        pin["plates"] = rev
    return out


def scaled(spec, k: float):
    out = copy.deepcopy(spec)
    for ld in out["loads"]:
        ld["force"] = (k * ld["force"][0], k * ld["force"][1])
        ld["moment"] = k * ld.get("moment", 0.0)
    return out


# ---------------------------------------------------------------- comparing results

def keyed(res, back=None):
    """(pin, member, check, case) -> sorted utilizations, demands and capacities (names mapped back).

    A member with several plates in a stack is keyed by member, so mirroring a stack (which renumbers
    "tie 1/2" and "tie 2/2") compares like with like."""
    back = back or {}
    c = res.columns
    out: dict[tuple, list] = {}
    for i in range(len(res)):
        member = c["part"][i].split(" ")[0]
        key = (back.get(c["pin"][i], c["pin"][i]), back.get(member, member), c["check"][i],
               back.get(c["case"][i], c["case"][i]))
        out.setdefault(key, []).append((c["utilization"][i], c["demand"][i], c["capacity"][i], c["kind"][i]))
    return {k: sorted(v) for k, v in out.items()}


def assert_same(a, b, rtol=1e-9):
    """Same rows, and the same utilization, demand and capacity in each (to ``rtol``)."""
    assert a.keys() == b.keys()
    # the largest finite utilization (a yes/no check such as "pin secured" has capacity 0: inf)
    top = max([u for v in a.values() for u, *_ in v if math.isfinite(u)] + [1e-300])
    for k in a:
        ua, da, ca, _ = (np.array(c) for c in zip(*a[k], strict=True))
        ub, db, cb, _ = (np.array(c) for c in zip(*b[k], strict=True))
        np.testing.assert_allclose(ub, ua, rtol=rtol, atol=rtol * top, err_msg=str(k))
        np.testing.assert_allclose(cb, ca, rtol=rtol, err_msg=f"{k} capacity")
        if NONLINEAR.get(k[2]) == "sqrt":
            # a demand of exactly zero comes out as round-off in another writing, which a √F law
            # magnifies: compare the squares, which are linear in the force
            da, db, ca = da**2, db**2, ca**2
        # a demand is compared to within rtol of itself or of its own capacity, as the utilization is
        bad = np.abs(db - da) > rtol * (np.abs(da) + np.abs(ca))
        assert not bad.any(), f"{k} demand: {da[bad]} vs {db[bad]} (capacity {ca[bad]})"


# ---------------------------------------------------------------- the properties

def body_residuals(spec, res):
    """Largest out-of-balance force [N] and moment [N*m] of any body or pin, worked from the spec.

    Independent of pinchk.frame.equilibrium_residual: every force each body receives is collected
    here from the solution's pin forces, link tensions and support reactions and the job's loads."""
    sol = res.solution
    n = len(sol.cases)
    ci = {c: i for i, c in enumerate(sol.cases)}
    F = {b: np.zeros((n, 3)) for b in spec["bodies"]}

    def put(b, xy, f, m=0.0):
        F[b][:, 0] += f[:, 0]
        F[b][:, 1] += f[:, 1]
        F[b][:, 2] += xy[0] * f[:, 1] - xy[1] * f[:, 0] + m

    def xy_of(ref):
        if ref[0] == "pin":
            pin = spec["pins"][ref[1]]
            if "at" in pin:
                return pin["at"]
            b, p = pin["joins"][0]
            return spec["bodies"][b][p]
        return spec["bodies"][ref[1]][ref[2]]

    pin_worst = 0.0
    for pn, pf in sol.pins.items():
        pin_worst = max(pin_worst, np.abs(pf.force.sum(axis=1)).max())  # the pin itself
        for k, m in enumerate(pf.members):
            if m in spec["bodies"]:
                put(m, xy_of(("pin", pn)), pf.force[:, k, :])
    for ln, link in spec["links"].items():
        a, b = (xy_of(e) for e in link["ends"])
        u = np.subtract(b, a) / math.dist(a, b)
        for e, sgn in zip(link["ends"], (1.0, -1.0), strict=True):
            if e[0] == "pt":
                put(e[1], xy_of(e), np.outer(sol.links[ln], sgn * u))
    for sn, s in spec["supports"].items():
        if s["at"][0] == "pt":
            r = sol.supports[sn]
            put(s["at"][1], xy_of(s["at"]), r[:, :2], r[:, 2])
    for ld in spec["loads"]:
        f = np.zeros((n, 2))
        f[ci[ld["case"]]] = ld["force"]
        m = np.zeros(n)
        m[ci[ld["case"]]] = ld.get("moment", 0.0)
        if ld["at"][0] == "pt":
            put(ld["at"][1], xy_of(ld["at"]), f, m)
        elif ld.get("body"):
            put(ld["body"], xy_of(ld["at"]), f, m)
    force = max(np.abs(v[:, :2]).max() for v in F.values())
    moment = max(np.abs(v[:, 2]).max() for v in F.values())
    return max(force, pin_worst), moment


@settings(**SETTINGS)
@given(spec=frames)
def test_every_body_in_equilibrium(tmp_path, spec):
    res = run_spec(tmp_path, spec)
    size = max(abs(c) for pts in spec["bodies"].values() for xy in pts.values() for c in xy)
    scale = max(max(abs(ld["force"][0]), abs(ld["force"][1]), abs(ld.get("moment", 0.0)) / size)
                for ld in spec["loads"])
    f_res, m_res = body_residuals(spec, res)
    # round-off: a few hundred ulps of the largest force (forces here are up to ~1e5 N); the floor
    # keeps a load of a few ulps of a newton from asking for less than one ulp
    assert f_res <= 1e-10 * scale + 1e-300
    assert m_res <= 1e-10 * scale * size + 1e-300
    assert res.solution.residual <= 1e-12


@settings(**SETTINGS)
@given(spec=frames)
def test_si_and_us_units_agree(tmp_path, spec):
    si = run_spec(tmp_path, spec, "SI")
    us = run_spec(tmp_path, spec, "US")
    assert_same(keyed(si), keyed(us))


@settings(**SETTINGS)
@given(spec=frames, theta=st.floats(-math.pi, math.pi), dx=st.floats(-50, 50), dy=st.floats(-50, 50))
def test_rotation_and_translation_change_nothing(tmp_path, spec, theta, dx, dy):
    base = run_spec(tmp_path, spec)
    moved = run_spec(tmp_path, rotated(spec, theta, (dx, dy)))
    assert_same(keyed(base), keyed(moved))


@settings(**SETTINGS)
@given(spec=frames, seed=st.integers(0, 2**32 - 1))
def test_renaming_and_reordering_change_nothing(tmp_path, spec, seed):
    base = run_spec(tmp_path, spec)
    new, back = renamed(spec, random.Random(seed))
    assert_same(keyed(base), keyed(run_spec(tmp_path, new), back))


@settings(**SETTINGS)
@given(spec=frames)
def test_mirrored_stacks_change_nothing(tmp_path, spec):
    assert_same(keyed(run_spec(tmp_path, spec)), keyed(run_spec(tmp_path, mirrored(spec))))


@settings(**SETTINGS)
@given(spec=wall_bracket())
def test_a_tie_in_tension_is_the_same_as_a_cable(tmp_path, spec):
    """A cable differs from a link only when it would be pushed; in tension both give the same results."""
    tie = run_spec(tmp_path, spec).solution.links["tie"]
    pushed = {c for c, t in zip(spec["cases"], tie, strict=True) if t < 0}
    for ld in spec["loads"]:  # reverse the loads of a case that pushes the tie: then it pulls
        if ld["case"] in pushed:
            ld["force"] = (-ld["force"][0], -ld["force"][1])
            ld["moment"] = -ld.get("moment", 0.0)
    res = run_spec(tmp_path, spec)
    assert np.all(res.solution.links["tie"] >= -1e-9 * np.abs(tie).max())
    cable = copy.deepcopy(spec)
    cable["links"]["tie"]["kind"] = "cable"
    assert_same(keyed(res), keyed(run_spec(tmp_path, cable)), rtol=1e-15)


#: How the demand of a check follows the loads when every load is scaled by k (the force demands
#: and moments are linear; these are not).
NONLINEAR = {
    "pin shear + bending": "square",  # EN 1993-1-8 Table 3.10 interaction (M/MRd)² + (V/Fv,Rd)²
    "contact stress": "sqrt",  # EN 1993-1-8 eq (3.15): σh ∝ √F
    "thickness (type B)": "sqrt",  # EN 1993-1-8 Table 3.9 B: t ≥ 0.7 √(F γM0 / fy)
    "pin secured": "constant",  # a yes/no detailing check (1 = not stated secured), no force in it
}
#: Otherwise by kind: forces, moments and stresses (a force over an area) are linear in the loads;
#: lengths (geometry rules) are a force term plus a fixed term, or fixed.


@settings(**SETTINGS)
@given(spec=frames, k=st.floats(0.05, 20.0))
def test_scaling_loads_scales_demands(tmp_path, spec, k):
    runs = [run_spec(tmp_path, scaled(spec, s)) for s in (1.0, k, 2 * k)]
    f_top = max(np.abs(pf.force).max() for pf in runs[0].solution.pins.values())
    for name, t in runs[0].solution.links.items():  # the frame's own forces are linear in the loads
        np.testing.assert_allclose(runs[1].solution.links[name], k * t, rtol=1e-9, atol=1e-9 * k * f_top)
    for name, r in runs[0].solution.supports.items():
        np.testing.assert_allclose(runs[1].solution.supports[name][:, :2], k * r[:, :2], rtol=1e-9,
                                   atol=1e-9 * k * f_top)
    r1, rk, r2k = (keyed(r) for r in runs)
    top = {kd: max(abs(d) for v in r1.values() for _, d, _, kk in v if kk == kd)
           for kd in {r[3] for v in r1.values() for r in v}}
    for key, rows in r1.items():
        d1 = np.array([d for _, d, _, _ in rows])
        kind = rows[0][3]
        # sort within a key by demand so a stack's equal plates pair up
        d1 = np.sort(d1)
        dk = np.sort([d for _, d, _, _ in rk[key]])
        d2k = np.sort([d for _, d, _, _ in r2k[key]])
        cap1 = sorted(c for *_, c, _ in rows)
        capk = sorted(c for *_, c, _ in rk[key])
        np.testing.assert_allclose(capk, cap1, rtol=1e-12, err_msg=f"capacity moved with the load: {key}")
        law = NONLINEAR.get(key[2])
        if law == "square":
            np.testing.assert_allclose(dk, k**2 * d1, rtol=1e-9, atol=1e-12, err_msg=str(key))
        elif law == "sqrt":
            # compared squared (linear in the force), to within 1e-9 of itself or of its capacity²: the
            # root of a force that is zero up to round-off is far above round-off itself
            cap2 = np.square(cap1)
            bad = np.abs(dk**2 - k * d1**2) > 1e-9 * (k * d1**2 + cap2)
            assert not bad.any(), f"{key}: {dk} vs √k {d1}"
        elif law == "constant":
            np.testing.assert_array_equal(dk, d1, err_msg=str(key))
        elif kind in ("force", "moment", "stress"):
            np.testing.assert_allclose(dk, k * d1, rtol=1e-9, atol=1e-9 * k * top[kind], err_msg=str(key))
        elif kind == "length":
            # geometry demands are a force term plus a fixed term (Table 3.9 A: F γM0/(2 t fy) + 2 d0/3;
            # AISC §D5.2 rules have no force term): affine in k, so d(2k) - d(k) = k (d(1) - d(0))
            # with d(0) = 2 d(k) - d(2k)
            d0 = 2 * dk - d2k
            np.testing.assert_allclose(dk - d0, k * (d1 - d0), rtol=1e-9, atol=1e-12, err_msg=str(key))
        else:
            pytest.fail(f"no scaling law known for check {key[2]!r} of kind {kind!r}: add it to NONLINEAR")


# ---------------------------------------------------------------- the reader never crashes

EXAMPLES = Path(__file__).resolve().parents[1] / "examples"
DEMOS = [p.read_text(encoding="utf-8").splitlines() for p in sorted(EXAMPLES.glob("*.toml"))]
#: files the demo jobs read (forces files), copied beside a mutated job so it finds them
SIBLINGS = {p.name: p.read_bytes() for p in EXAMPLES.iterdir() if p.suffix in (".csv", ".json")}


def _with_siblings(folder: Path) -> None:
    for name, data in SIBLINGS.items():
        (folder / name).write_bytes(data)
ODD_VALUES = ["0", "-1", "1e308", "-0.0", "nan", "inf", '"1 m^9^9^9"', '"40 kN"', '""', "[]", "{}", "true",
              '"P_apex"', '"leg_left.A"', '"ground"', '"load"', "1e-300", '"12 parsec"', '"1 mm mm"', "[1, 2, 3]",
              '["1 mm", "2 kN"]', "2026-12-01", '"x" ', "{ a = 1 }", '"-5 mm"', '"1.5 in"', "0.0001", '"9.."',
              '"1 .m"', '"1 (m"', "-1e308"]


@st.composite
def mutated_demo(draw):
    lines = list(draw(st.sampled_from(DEMOS)))
    for _ in range(draw(st.integers(1, 4))):
        op = draw(st.sampled_from(["delete", "duplicate", "swap", "char", "value", "truncate"]))
        i = draw(st.integers(0, len(lines) - 1)) if lines else 0
        if not lines:
            break
        if op == "delete":
            del lines[i]
        elif op == "duplicate":
            lines.insert(i, lines[i])
        elif op == "swap":
            j = draw(st.integers(0, len(lines) - 1))
            lines[i], lines[j] = lines[j], lines[i]
        elif op == "char" and lines[i]:
            k = draw(st.integers(0, len(lines[i]) - 1))
            ch = draw(st.sampled_from(list("0123456789-.e\"[]{}=,#ax _")))
            lines[i] = lines[i][:k] + ch + lines[i][k + 1:]
        elif op == "value" and "=" in lines[i]:
            key = lines[i].split("=")[0]
            lines[i] = f"{key}= {draw(st.sampled_from(ODD_VALUES))}"
        elif op == "truncate":
            lines = lines[:i]
    return "\n".join(lines) + "\n"


def _run_guarded(path):
    try:
        pinchk.run(str(path))
    except InputError:
        pass  # a clear input error is the right answer; anything else propagates and fails


@settings(max_examples=150, deadline=None, derandomize=True,
          suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(text=mutated_demo())
def test_mutated_demo_only_input_errors(tmp_path, text):
    _with_siblings(tmp_path)
    path = tmp_path / "mutated.toml"
    path.write_text(text, encoding="utf-8")
    _run_guarded(path)


@st.composite
def mutated_lines(draw, lines):
    lines = list(lines)
    for _ in range(draw(st.integers(1, 3))):
        if not lines:
            break
        i = draw(st.integers(0, len(lines) - 1))
        op = draw(st.sampled_from(["delete", "duplicate", "char", "cell"]))
        if op == "delete":
            del lines[i]
        elif op == "duplicate":
            lines.insert(i, lines[i])
        elif op == "char" and lines[i]:
            k = draw(st.integers(0, len(lines[i]) - 1))
            lines[i] = lines[i][:k] + draw(st.sampled_from(list('0123456789-.e",;x '))) + lines[i][k + 1:]
        elif op == "cell" and "," in lines[i]:
            cells = lines[i].split(",")
            cells[draw(st.integers(0, len(cells) - 1))] = draw(st.sampled_from(
                ["", "nan", "inf", "-1e308", "1e999", "abc", '"1 m^9^9^9"', "12 kN", "0", "P9", "ground"]))
            lines[i] = ",".join(cells)
    return "\n".join(lines) + "\n"


@settings(max_examples=60, deadline=None, derandomize=True,
          suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(data=st.data())
def test_mutated_forces_file_only_input_errors(tmp_path, data):
    """The demo that reads a forces file, with that file mutated."""
    if not SIBLINGS:
        pytest.skip("no demo reads a forces file")
    _with_siblings(tmp_path)
    name = data.draw(st.sampled_from(sorted(SIBLINGS)))
    text = data.draw(mutated_lines(SIBLINGS[name].decode("utf-8").splitlines()))
    (tmp_path / name).write_text(text, encoding="utf-8")
    for job in sorted(EXAMPLES.glob("*.toml")):
        if name in job.read_text(encoding="utf-8"):
            (tmp_path / job.name).write_bytes(job.read_bytes())
            _run_guarded(tmp_path / job.name)


TOKENS = ["[pin.", "[[pin.P.plate]]", "[[load]]", "[body.", "joins", "points", "member", "case", "at",
          "thickness", "\"1 mm\"", "\"P\"", "\"b.A\"", "[units]\nlength = \"mm\"\n", "[job]\n"]


@settings(max_examples=60, deadline=None, derandomize=True,
          suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(text=st.one_of(st.text(max_size=300),
                      st.lists(st.sampled_from(list('[]=."{},\n ab01-') + TOKENS), max_size=80).map("".join)))
def test_random_text_only_input_errors(tmp_path, text):
    path = tmp_path / "random.toml"
    path.write_text(text, encoding="utf-8", errors="surrogatepass")
    _run_guarded(path)


@settings(max_examples=40, deadline=None, derandomize=True,
          suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(text=mutated_demo(), fmt=st.sampled_from(["table", "json", "csv"]))
def test_cli_never_exits_with_a_bug(tmp_path, capsys, text, fmt):
    _with_siblings(tmp_path)
    path = tmp_path / "mutated.toml"
    path.write_text(text, encoding="utf-8")
    code = cli.main(["run", str(path), "--format", fmt])
    err = capsys.readouterr().err
    assert code in (cli.EXIT_PASS, cli.EXIT_FAIL, cli.EXIT_INPUT), err
    assert "Traceback" not in err
