"""Large determinate frames built in memory, for the benchmarks and the assembly tests.

An invented scenario, not a real design: a long Warren truss of rigid bodies (every chord and
diagonal is a body with its two end points and a mid point, pinned at the joints), pinned at its
left end and on a roller at its right end. With p panels it has 4p - 1 members and 2p + 1 joints,
so members = 2 joints - 3 and, with three support reactions, it is statically determinate.

Options make it less regular: some diagonals become links (two-force members), the joints are
jittered, a body point instead of a pin carries the support, loads act on pins, on a body at a pin
and inside bodies, with moments.
"""

from __future__ import annotations

import numpy as np

from pinchk.model import Body, Case, Job, Link, Load, MethodChoice, Pin, Place, Support


def truss(n_bodies: int, n_cases: int = 1, *, link_every: int = 0, jitter: float = 0.0, seed: int = 0,
          panel: float = 2.0, height: float = 1.5, body_support: bool = False) -> Job:
    """A determinate Warren truss with about ``n_bodies`` members (bodies and links).

    Args:
        n_bodies: the number of members wanted; the truss has p = max(1, round((n + 1) / 4)) panels
            and 4p - 1 members.
        n_cases: load cases. Case 1 loads every top joint (a uniform load); case k > 1 is a trolley
            at one top joint (moving along the truss from case to case) with a side pull on a body
            and a load with a moment inside a bottom chord body.
        link_every: every this many diagonals is a link instead of a body (0: none).
        jitter: random shift of every joint, as a fraction of the panel length.
        seed: for the jitter.
        panel, height: panel length and truss depth [m].
        body_support: carry the left support on the first bottom-chord body's end point (a pinned
            support at a body point) instead of on the pin there.
    """
    p = max(1, round((n_bodies + 1) / 4))
    rng = np.random.default_rng(seed)
    bot = np.column_stack([np.arange(p + 1) * panel, np.zeros(p + 1)])
    top = np.column_stack([(np.arange(p) + 0.5) * panel, np.full(p, height)])
    if jitter:
        bot = bot + rng.uniform(-jitter, jitter, bot.shape) * panel
        top = top + rng.uniform(-jitter, jitter, top.shape) * panel
    xy = {f"B{i}": (float(bot[i, 0]), float(bot[i, 1])) for i in range(p + 1)}
    xy.update({f"T{i}": (float(top[i, 0]), float(top[i, 1])) for i in range(p)})

    members = [(f"b{i}", f"B{i}", f"B{i + 1}") for i in range(p)]
    members += [(f"t{i}", f"T{i}", f"T{i + 1}") for i in range(p - 1)]
    diag = []
    for i in range(p):
        diag += [(f"u{i}", f"B{i}", f"T{i}"), (f"d{i}", f"T{i}", f"B{i + 1}")]
    members += diag
    # (one panel: the top joint would be left with links only, and a pin joins at least one body)
    is_link = {name for k, (name, _, _) in enumerate(diag)
               if link_every and p > 1 and k % link_every == link_every - 1}

    bodies: dict[str, Body] = {}
    joins: dict[str, list[str]] = {j: [] for j in xy}
    for name, a, b in members:
        if name in is_link:
            continue
        (xa, ya), (xb, yb) = xy[a], xy[b]
        bodies[name] = Body(name, {"a": (xa, ya), "b": (xb, yb), "m": ((xa + xb) / 2, (ya + yb) / 2)})
        joins[a].append(name)
        joins[b].append(name)
    pins = {j: Pin(j, xy[j], tuple(joins[j]), None, None, ()) for j in xy}
    links = {}
    for name, a, b in members:
        if name in is_link:
            links[name] = Link(name, "link", (Place(None, None, a, xy[a]), Place(None, None, b, xy[b])))

    def at_pin(j: str) -> Place:
        return Place(None, None, j, xy[j])

    if body_support:
        left = Place("b0", "a", None, bodies["b0"].points["a"])
    else:
        left = at_pin("B0")
    supports = {"left": Support("left", "pinned", left),
                "right": Support("right", "roller", at_pin(f"B{p}"), (0.0, 1.0))}

    cases = {f"c{k + 1}": Case(f"c{k + 1}", "invented load case") for k in range(n_cases)}
    names = list(cases)
    loads = [Load(names[0], at_pin(f"T{i}"), (0.0, -10e3)) for i in range(p)]
    for k in range(1, n_cases):
        i = (k * 7919) % p  # the trolley's joint, spread along the truss
        loads.append(Load(names[k], at_pin(f"T{i}"), (0.0, -50e3 - 100.0 * k)))
        loads.append(Load(names[k], at_pin(f"T{i}"), (2e3, 0.0), body=joins[f"T{i}"][0]))
        b = f"b{(k * 31) % p}"
        loads.append(Load(names[k], Place(b, "m", None, bodies[b].points["m"]), (0.0, -5e3), moment=1e3))
    return Job(path="<generated truss>", title=f"generated truss, {p} panels (invented)",
               method=MethodChoice("EN 1993-1-8", None, {}), output_units="SI", bodies=bodies, pins=pins,
               links=links, supports=supports, loads=tuple(loads), cases=cases)


def n_members(job: Job) -> int:
    """Bodies and links of a frame."""
    return len(job.bodies) + len(job.links)
