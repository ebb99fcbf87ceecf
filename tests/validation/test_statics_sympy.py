"""The statics solver (pinchk.frame.solve) against independent solutions written with sympy.

Sources:
    SymPy 1.12+ (Meurer A. et al., "SymPy: symbolic computing in Python", PeerJ Computer Science 3:e103,
    2017): ``sympy.linsolve`` solves, in exact arithmetic, the free-body equations written out by hand
    below for each frame, with a symbol for every unknown. They are written here from the free-body
    diagrams, not from pinchk's assembly: moments are taken about a support or pin (pinchk takes them
    about each body's centroid), pins are free bodies of their own, and every sign is set by the
    diagram (Newton's third law at each pin, a link in tension pulls each end towards the other).

    ``sympy.physics.continuum_mechanics.truss.Truss`` (SymPy 1.12+), the method of joints, for
    structures of links only.

Units as in the job files below: m and kN (sympy works in N and m, as pinchk does inside).
Every pin force, link force and support reaction pinchk reports is compared, to 1e-9 relative to the
largest force of the frame (a relative check of an exact zero would be meaningless).
"""

from __future__ import annotations

import numpy as np
import pytest
import sympy as sy

from pinchk.frame import equilibrium_residual, solve
from pinchk.jobfile import load_job

from ..conftest import DEMO

G0 = sy.Rational(980665, 100000)  # standard gravity, CGPM 1901 (exact), as pinchk uses for a mass
kN = 1000
R = sy.Rational
REL = 1e-9


# ----------------------------------------------------------------------------------------------------
# free-body helpers (plain algebra; nothing from pinchk)

def moment(point, force, about):
    """z-moment of ``force`` applied at ``point`` about ``about``: r x F."""
    return (point[0] - about[0]) * force[1] - (point[1] - about[1]) * force[0]


def body(forces, about, couples=()):
    """Three equilibrium equations of a rigid body: sum Fx, sum Fy, sum M about ``about``."""
    return [sum(f[0] for _, f in forces), sum(f[1] for _, f in forces),
            sum(moment(p, f, about) for p, f in forces) + sum(couples)]


def pin(forces):
    """Two equilibrium equations of a pin, a free body of its own (forces through one point)."""
    return [sum(f[0] for f in forces), sum(f[1] for f in forces)]


def neg(f):
    return (-f[0], -f[1])


def unit(a, b):
    """Unit vector from point a towards point b."""
    d = (b[0] - a[0], b[1] - a[1])
    n = sy.sqrt(d[0] ** 2 + d[1] ** 2)
    return (d[0] / n, d[1] / n)


def scale(v, k):
    return (v[0] * k, v[1] * k)


def solve_fbd(eqs, unknowns, expect):
    """Solve the free-body equations exactly; substitute into the expected pinchk quantities."""
    sols = sy.linsolve([sy.nsimplify(e) if not isinstance(e, sy.Expr) else e for e in eqs], unknowns)
    assert len(sols) == 1, "the free-body equations have no unique solution"
    (sol,) = sols
    assert not set().union(*(s.free_symbols for s in sol)), "the free-body equations leave a free unknown"
    sub = dict(zip(unknowns, sol, strict=True))

    def val(e):
        return float(sy.sympify(e).subs(sub))

    return {
        "pins": {p: {m: (val(f[0]), val(f[1])) for m, f in ms.items()} for p, ms in expect["pins"].items()},
        "links": {k: val(v) for k, v in expect["links"].items()},
        "supports": {k: tuple(val(c) for c in v) for k, v in expect["supports"].items()},
    }


def compare(sol, case, ref):
    """Every pin force, link force and reaction of pinchk's solution against the sympy one."""
    j = sol.cases.index(case)
    values = [abs(c) for ms in ref["pins"].values() for f in ms.values() for c in f]
    values += [abs(v) for v in ref["links"].values()] + [abs(c) for v in ref["supports"].values() for c in v]
    atol = REL * max(values)
    assert set(sol.pins) == set(ref["pins"])
    for p, pf in sol.pins.items():
        assert set(pf.members) == set(ref["pins"][p]), p
        for k, m in enumerate(pf.members):
            np.testing.assert_allclose(pf.force[j, k], ref["pins"][p][m], rtol=REL, atol=atol,
                                       err_msg=f"case {case}, pin {p}, member {m}")
    assert set(sol.links) == set(ref["links"])
    for n, t in sol.links.items():
        np.testing.assert_allclose(t[j], ref["links"][n], rtol=REL, atol=atol, err_msg=f"case {case}, link {n}")
    assert set(sol.supports) == set(ref["supports"])
    for n, r in sol.supports.items():
        np.testing.assert_allclose(r[j], ref["supports"][n], rtol=REL, atol=atol,
                                   err_msg=f"case {case}, support {n}")


# ----------------------------------------------------------------------------------------------------
# Frame 1: the demo A-frame gantry (examples/a_frame_gantry.toml), both cases

def fbd_demo(case):
    FL, TL, A, FR, TR = (0, 0), (1, 2), (2, 4), (4, 0), (3, 2)  # m, as in the job file (mm there)
    aLx, aLy, aRx, aRy, tLx, tLy, tRx, tRy, fLx, fLy, fRx, fRy, T, Bx, By, N = unknowns = sy.symbols(
        "aLx aLy aRx aRy tLx tLy tRx tRy fLx fLy fRx fRy T Bx By N")
    aL, aR, tL, tR, fL, fR = (aLx, aLy), (aRx, aRy), (tLx, tLy), (tRx, tRy), (fLx, fLy), (fRx, fRy)
    hook = (0, -15000 * G0)  # 15 t on the hook, on the apex pin itself
    side = (10 * kN, 0) if case == "lift_side" else (0, 0)  # on leg_left's lug at the apex
    u = (1, 0)  # tie from PL to PR
    eqs = [
        *body([(A, aL), (TL, tL), (FL, fL), (A, side)], about=FL),
        *body([(A, aR), (TR, tR), (FR, fR)], about=FR),
        *pin([neg(aL), neg(aR), hook]),
        *pin([neg(tL), scale(u, T)]),
        *pin([neg(tR), scale(u, -T)]),
        *pin([neg(fL), (Bx, By)]),
        *pin([neg(fR), (0, N)]),
    ]
    expect = {
        "pins": {"P_apex": {"leg_left": aL, "leg_right": aR, "load": neg(hook)},
                 "PL": {"leg_left": tL, "tie": scale(u, -T)},
                 "PR": {"leg_right": tR, "tie": scale(u, T)},
                 "P_foot_left": {"leg_left": fL, "ground": (-Bx, -By)},
                 "P_foot_right": {"leg_right": fR, "ground": (0, -N)}},
        "links": {"tie": T},
        "supports": {"base": (Bx, By, 0), "wheel": (0, N, 0)},
    }
    return eqs, unknowns, expect


@pytest.mark.parametrize("case", ["lift", "lift_side"])
def test_demo_a_frame(case):
    job = load_job(DEMO)
    compare(solve(job), case, solve_fbd(*fbd_demo(case)))


# ----------------------------------------------------------------------------------------------------
# Frame 2: three-hinged frame; the same load on the crown pin itself, or on one body at that pin

THREE_HINGED = """
    [job]
    title = "three-hinged frame (test)"
    [units]
    length = "m"
    force = "kN"
    [method]
    name = "EN 1993-1-8"
    [body.left]
    points = { A = [0, 0], M = [1.5, 2], C = [3, 4] }
    [body.right]
    points = { C = [3, 4], N = [5.5, 2], B = [8, 0] }
    [pin.C]
    joins = ["left.C", "right.C"]
    [support.sa]
    at = "left.A"
    kind = "pinned"
    [support.sb]
    at = "right.B"
    kind = "pinned"
    [case.on_pin]
    [case.on_left]
    [case.on_right]
    [case.wind]
    [[load]]
    case = "on_pin"
    at = "C"
    force = [5, -20]
    [[load]]
    case = "on_left"
    at = "C"
    body = "left"
    force = [5, -20]
    [[load]]
    case = "on_right"
    at = "C"
    body = "right"
    force = [5, -20]
    [[load]]
    case = "wind"
    at = "left.M"
    force = [8, 0]
    [[load]]
    case = "wind"
    at = "right.N"
    force = [0, -6]
    """


def fbd_three_hinged(case):
    A, M, C, N, B = (0, 0), (R(3, 2), 2), (3, 4), (R(11, 2), 2), (8, 0)
    Lx, Ly, Rx, Ry, Ax, Ay, Bx, By = unknowns = sy.symbols("Lx Ly Rx Ry Ax Ay Bx By")
    L, Rr = (Lx, Ly), (Rx, Ry)
    P = (5 * kN, -20 * kN)
    zero = (0, 0)
    on_pin = P if case == "on_pin" else zero
    on_left = [(C, P)] if case == "on_left" else []
    on_right = [(C, P)] if case == "on_right" else []
    wind_l = [(M, (8 * kN, 0))] if case == "wind" else []
    wind_r = [(N, (0, -6 * kN))] if case == "wind" else []
    eqs = [
        *body([(C, L), (A, (Ax, Ay)), *on_left, *wind_l], about=A),
        *body([(C, Rr), (B, (Bx, By)), *on_right, *wind_r], about=B),
        *pin([neg(L), neg(Rr), on_pin]),
    ]
    expect = {"pins": {"C": {"left": L, "right": Rr, "load": neg(on_pin)}}, "links": {},
              "supports": {"sa": (Ax, Ay, 0), "sb": (Bx, By, 0)}}
    return eqs, unknowns, expect


@pytest.mark.parametrize("case", ["on_pin", "on_left", "on_right", "wind"])
def test_three_hinged_frame(make_job, case):
    compare(solve(make_job(THREE_HINGED)), case, solve_fbd(*fbd_three_hinged(case)))


def test_load_on_pin_or_on_body_changes_plate_forces(make_job):
    """Hand identity (Newton's third law at the pin): when the load P moves from the pin onto body
    'left' at that pin, the force 'left' receives from the pin drops by exactly P and 'right' is
    unchanged; each body's total from the pin and load is the same."""
    sol = solve(make_job(THREE_HINGED))
    pf = sol.pins["C"]
    L, Rr = pf.members.index("left"), pf.members.index("right")
    P = np.array([5e3, -20e3])
    on_pin, on_left, on_right = (sol.cases.index(c) for c in ("on_pin", "on_left", "on_right"))
    np.testing.assert_allclose(pf.force[on_left, L], pf.force[on_pin, L] - P, rtol=1e-12, atol=1e-6)
    np.testing.assert_allclose(pf.force[on_left, Rr], pf.force[on_pin, Rr], rtol=1e-12, atol=1e-6)
    np.testing.assert_allclose(pf.force[on_right, Rr], pf.force[on_pin, Rr] - P, rtol=1e-12, atol=1e-6)
    # and the plates really do see different forces
    assert np.linalg.norm(pf.force[on_left, L] - pf.force[on_pin, L]) > 1e3


# ----------------------------------------------------------------------------------------------------
# Frame 3: a post on a fixed base, an arm pinned to it and held by a cable; a moment load

POST_AND_ARM = """
    [job]
    title = "post and arm on a fixed base (test)"
    [units]
    length = "m"
    force = "kN"
    moment = "kN*m"
    [method]
    name = "EN 1993-1-8"
    [body.post]
    points = { A = [0, 0], B = [0, 3], C = [0, 5] }
    [body.arm]
    points = { B = [0, 3], E = [2, 3], D = [4, 3] }
    [pin.B]
    joins = ["post.B", "arm.B"]
    [link.stay]
    ends = ["post.C", "arm.D"]
    kind = "cable"
    [support.base]
    at = "post.A"
    kind = "fixed"
    [case.tip]
    [case.couple]
    [case.mixed]
    [[load]]
    case = "tip"
    at = "arm.D"
    force = [0, -12]
    [[load]]
    case = "couple"
    at = "arm.E"
    moment = -8
    [[load]]
    case = "mixed"
    at = "arm.E"
    force = [3, -6]
    moment = "-4 kN*m"
    [[load]]
    case = "mixed"
    at = "post.C"
    force = [2, 0]
    moment = 1.5
    """


def fbd_post_and_arm(case):
    A, B, C, E, D = (0, 0), (0, 3), (0, 5), (2, 3), (4, 3)
    Px, Py, Qx, Qy, T, Rx, Ry, Mr = unknowns = sy.symbols("Px Py Qx Qy T Rx Ry Mr")
    Pp, Q = (Px, Py), (Qx, Qy)
    u = unit(C, D)  # the stay from post.C to arm.D; in tension it pulls post.C along u, arm.D against it
    arm_loads, arm_couples, post_loads, post_couples = [], [], [], []
    if case == "tip":
        arm_loads = [(D, (0, -12 * kN))]
    elif case == "couple":
        arm_couples = [-8 * kN]
    else:
        arm_loads, arm_couples = [(E, (3 * kN, -6 * kN))], [-4 * kN]
        post_loads, post_couples = [(C, (2 * kN, 0))], [R(3, 2) * kN]
    eqs = [
        *body([(B, Pp), (C, scale(u, T)), (A, (Rx, Ry)), *post_loads], about=A, couples=[Mr, *post_couples]),
        *body([(B, Q), (D, scale(u, -T)), *arm_loads], about=B, couples=arm_couples),
        *pin([neg(Pp), neg(Q)]),
    ]
    expect = {"pins": {"B": {"post": Pp, "arm": Q}}, "links": {"stay": T}, "supports": {"base": (Rx, Ry, Mr)}}
    return eqs, unknowns, expect


@pytest.mark.parametrize("case", ["tip", "couple", "mixed"])
def test_fixed_support_cable_and_moment(make_job, case):
    compare(solve(make_job(POST_AND_ARM)), case, solve_fbd(*fbd_post_and_arm(case)))


# ----------------------------------------------------------------------------------------------------
# Frame 4: a hinged (Gerber) beam; its drop-in span stands on a roller on a 30° incline, at a pin

GERBER = """
    [job]
    title = "hinged beam, roller on an incline (test)"
    [units]
    length = "m"
    force = "kN"
    [method]
    name = "EN 1993-1-8"
    [body.girder]
    points = { A = [0, 0], G = [3, 0], B = [6, 0], C = [8, 0] }
    [body.drop_in]
    points = { C = [8, 0], H = [10, 0], D = [12, 0] }
    [pin.C]
    joins = ["girder.C", "drop_in.C"]
    [pin.PD]
    joins = ["drop_in.D"]
    [support.sa]
    at = "girder.A"
    kind = "pinned"
    [support.sb]
    at = "girder.B"
    kind = "roller"
    normal = [0, 1]
    [support.sd]
    at = "PD"
    kind = "roller"
    normal = [-0.5, 0.8660254037844386]   # the floor under D rises at 30° towards -x
    [case.gravity]
    [case.skew]
    [[load]]
    case = "gravity"
    at = "girder.G"
    force = [0, -20]
    [[load]]
    case = "gravity"
    at = "drop_in.H"
    force = [0, -30]
    [[load]]
    case = "skew"
    at = "drop_in.H"
    force = "25 kN"
    angle = "-60 deg"
    [[load]]
    case = "skew"
    at = "C"
    force = [0, -10]
    """


def fbd_gerber(case):
    A, G, B, C, H, D = (0, 0), (3, 0), (6, 0), (8, 0), (10, 0), (12, 0)
    Cgx, Cgy, Cdx, Cdy, Dx, Dy, Ax, Ay, Nb, Nd = unknowns = sy.symbols("Cgx Cgy Cdx Cdy Dx Dy Ax Ay Nb Nd")
    Cg, Cd, Dd = (Cgx, Cgy), (Cdx, Cdy), (Dx, Dy)
    n = (-R(1, 2), sy.sqrt(3) / 2)  # unit normal of the 30° incline
    if case == "gravity":
        g_loads, d_loads, on_pin = [(G, (0, -20 * kN))], [(H, (0, -30 * kN))], (0, 0)
    else:
        g_loads = []
        d_loads = [(H, (25 * kN * sy.cos(-sy.pi / 3), 25 * kN * sy.sin(-sy.pi / 3)))]
        on_pin = (0, -10 * kN)
    eqs = [
        *body([(C, Cg), (A, (Ax, Ay)), (B, (0, Nb)), *g_loads], about=A),
        *body([(C, Cd), (D, Dd), *d_loads], about=C),
        *pin([neg(Cg), neg(Cd), on_pin]),
        *pin([neg(Dd), scale(n, Nd)]),
    ]
    expect = {
        "pins": {"C": {"girder": Cg, "drop_in": Cd, "load": neg(on_pin)},
                 "PD": {"drop_in": Dd, "ground": scale(n, -Nd)}},
        "links": {},
        "supports": {"sa": (Ax, Ay, 0), "sb": (0, Nb, 0), "sd": (n[0] * Nd, n[1] * Nd, 0)},
    }
    return eqs, unknowns, expect


@pytest.mark.parametrize("case", ["gravity", "skew"])
def test_roller_on_incline(make_job, case):
    compare(solve(make_job(GERBER)), case, solve_fbd(*fbd_gerber(case)))


# ----------------------------------------------------------------------------------------------------
# Frame 5: three bodies on one pin with a hook load, a tie and a hanger between body points,
# and a roller on an inclined surface at a body point

THREE_AT_ONE_PIN = """
    [job]
    title = "three bodies on one pin (test)"
    [units]
    length = "m"
    force = "kN"
    [method]
    name = "EN 1993-1-8"
    [body.left]
    points = { A = [0, 0], M = [1, 2], C = [2, 4] }
    [body.right]
    points = { B = [4, 0], N = [3, 2], C = [2, 4] }
    [body.beam]
    points = { C = [2, 4], E = [5, 4] }
    [pin.C]
    joins = ["left.C", "right.C", "beam.C"]
    [link.tie]
    ends = ["left.M", "right.N"]
    [link.hanger]
    ends = ["beam.E", "right.N"]
    [support.sa]
    at = "left.A"
    kind = "pinned"
    [support.sb]
    at = "right.B"
    kind = "roller"
    normal = [-3, 4]
    [case.hook]
    [case.tip]
    [[load]]
    case = "hook"
    at = "C"
    force = [0, -40]
    [[load]]
    case = "tip"
    at = "beam.E"
    force = [0, -15]
    [[load]]
    case = "tip"
    at = "left.M"
    force = [4, 0]
    """


def fbd_three_at_one_pin(case):
    A, M, C, B, N, E = (0, 0), (1, 2), (2, 4), (4, 0), (3, 2), (5, 4)
    syms = sy.symbols("Lx Ly Rx Ry Kx Ky Tt Th Ax Ay Nb")
    Lx, Ly, Rx, Ry, Kx, Ky, Tt, Th, Ax, Ay, Nb = syms
    Lc, Rc, Kc = (Lx, Ly), (Rx, Ry), (Kx, Ky)
    ut = unit(M, N)  # tie, left.M -> right.N
    uh = unit(E, N)  # hanger, beam.E -> right.N
    n = (-R(3, 5), R(4, 5))
    on_pin = (0, -40 * kN) if case == "hook" else (0, 0)
    beam_loads = [(E, (0, -15 * kN))] if case == "tip" else []
    left_loads = [(M, (4 * kN, 0))] if case == "tip" else []
    eqs = [
        *body([(C, Lc), (M, scale(ut, Tt)), (A, (Ax, Ay)), *left_loads], about=A),
        *body([(C, Rc), (N, scale(ut, -Tt)), (N, scale(uh, -Th)), (B, scale(n, Nb))], about=B),
        *body([(C, Kc), (E, scale(uh, Th)), *beam_loads], about=C),
        *pin([neg(Lc), neg(Rc), neg(Kc), on_pin]),
    ]
    expect = {"pins": {"C": {"left": Lc, "right": Rc, "beam": Kc, "load": neg(on_pin)}},
              "links": {"tie": Tt, "hanger": Th},
              "supports": {"sa": (Ax, Ay, 0), "sb": (n[0] * Nb, n[1] * Nb, 0)}}
    return eqs, syms, expect


@pytest.mark.parametrize("case", ["hook", "tip"])
def test_three_bodies_on_one_pin(make_job, case):
    compare(solve(make_job(THREE_AT_ONE_PIN)), case, solve_fbd(*fbd_three_at_one_pin(case)))


@pytest.mark.parametrize("text", [THREE_HINGED, POST_AND_ARM, GERBER, THREE_AT_ONE_PIN])
def test_every_body_balances(make_job, text):
    """Every solved body and pin sums to zero, to round-off (pinchk.frame.equilibrium_residual)."""
    job = make_job(text)
    assert equilibrium_residual(job, solve(job)) < 1e-13


# ----------------------------------------------------------------------------------------------------
# Link-only structures against sympy's Truss (method of joints)

def _truss_job(nodes, members, loads, pinned, roller):
    """A job of links only: each joint a pin standing at its own place (at = [x, y])."""
    lines = ['[job]', 'title = "truss (test)"', '[units]', 'length = "m"', 'force = "kN"',
             '[method]', 'name = "EN 1993-1-8"', '[case.c]']
    for name, (x, y) in nodes.items():
        lines += [f"[pin.{name}]", f"at = [{x}, {y}]"]
    for name, (a, b) in members.items():
        lines += [f"[link.{name}]", f'ends = ["{a}", "{b}"]']
    lines += ["[support.s_pinned]", f'at = "{pinned}"', 'kind = "pinned"',
              "[support.s_roller]", f'at = "{roller}"', 'kind = "roller"', "normal = [0, 1]"]
    for node, (fx, fy) in loads:
        lines += ["[[load]]", 'case = "c"', f'at = "{node}"', f"force = [{fx}, {fy}]"]
    return "\n".join(lines) + "\n"


def _sympy_truss(nodes, members, loads, pinned, roller):
    from sympy.physics.continuum_mechanics.truss import Truss

    t = Truss()
    t.add_node(*[(n, sy.nsimplify(x), sy.nsimplify(y)) for n, (x, y) in nodes.items()])
    t.add_member(*[(m, a, b) for m, (a, b) in members.items()])
    for node, (fx, fy) in loads:  # Truss takes a magnitude and an angle in degrees from +x
        fx, fy = sy.nsimplify(fx) * kN, sy.nsimplify(fy) * kN
        t.apply_load((node, sy.sqrt(fx**2 + fy**2), sy.deg(sy.atan2(fy, fx)) % 360))
    t.apply_support((pinned, "pinned"), (roller, "roller"))
    t.solve()
    return t


def test_truss_sign_convention():
    """Sympy's own documented example (Truss.solve docstring, SymPy 1.14): a 10-unit load hung from
    node_4 gives member_5, the hanger above it, +10, so Truss reports tension as positive (its
    docstring words it the other way round; the hanger settles it)."""
    from sympy.physics.continuum_mechanics.truss import Truss

    t = Truss()
    t.add_node(("node_1", 0, 0), ("node_2", 6, 0), ("node_3", 2, 2), ("node_4", 2, 0))
    t.add_member(("member_1", "node_1", "node_4"), ("member_2", "node_2", "node_4"),
                 ("member_3", "node_1", "node_3"))
    t.add_member(("member_4", "node_2", "node_3"), ("member_5", "node_3", "node_4"))
    t.apply_load(("node_4", 10, 270))
    t.apply_support(("node_1", "pinned"), ("node_2", "roller"))
    t.solve()
    assert t.internal_forces["member_5"] == 10
    assert t.internal_forces["member_3"] == -20 * sy.sqrt(2) / 3


TRUSSES = {
    # the documented example of sympy's Truss.solve, with its 10-unit load taken as 10 kN
    "sympy_docstring": (
        {"n1": (0, 0), "n2": (6, 0), "n3": (2, 2), "n4": (2, 0)},
        {"m1": ("n1", "n4"), "m2": ("n2", "n4"), "m3": ("n1", "n3"), "m4": ("n2", "n3"), "m5": ("n3", "n4")},
        [("n4", (0, -10))], "n1", "n2"),
    # a six-joint Pratt truss of 3-4-5 panels, loads down and sideways at several joints
    "pratt": (
        {"L0": (0, 0), "L1": (4, 0), "L2": (8, 0), "L3": (12, 0), "U1": (4, 3), "U2": (8, 3)},
        {"b1": ("L0", "L1"), "b2": ("L1", "L2"), "b3": ("L2", "L3"), "t1": ("U1", "U2"),
         "v1": ("L1", "U1"), "v2": ("L2", "U2"), "d1": ("L0", "U1"), "d2": ("L3", "U2"), "d3": ("U1", "L2")},
        [("L1", (0, -20)), ("L2", (0, -10)), ("U1", (5, 0)), ("U2", (2, -3))], "L0", "L3"),
    # a cantilever bracket: three joints, the roller under the tip node
    "bracket": (
        {"W1": (0, 0), "W2": (0, 1.5), "T": (2, 0)},
        {"top": ("W2", "T"), "bottom": ("W1", "T"), "wall": ("W1", "W2")},
        [("T", (1.5, -8)), ("W2", (-2, 0))], "W1", "T"),
}


@pytest.mark.parametrize("name", list(TRUSSES))
def test_truss_against_sympy(write_job, name):
    nodes, members, loads, pinned, roller = TRUSSES[name]
    job = load_job(write_job(_truss_job(nodes, members, loads, pinned, roller)))
    sol = solve(job)
    t = _sympy_truss(nodes, members, loads, pinned, roller)
    ref = {m: float(v) for m, v in t.internal_forces.items()}
    react = {k: float(v) for k, v in t.reaction_loads.items()}
    big = max(map(abs, [*ref.values(), *react.values()]))
    for m in members:
        np.testing.assert_allclose(sol.links[m][0], ref[m], rtol=REL, atol=REL * big, err_msg=m)
    np.testing.assert_allclose(sol.supports["s_pinned"][0, :2],
                               [react[f"R_{pinned}_x"], react[f"R_{pinned}_y"]], rtol=REL, atol=REL * big)
    np.testing.assert_allclose(sol.supports["s_roller"][0, :2], [0.0, react[f"R_{roller}_y"]],
                               rtol=REL, atol=REL * big)
    assert equilibrium_residual(job, sol) < 1e-13
