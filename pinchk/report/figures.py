"""Pictures for the calculation report: the frame, the governing lug and the utilizations, as PNG bytes.

matplotlib is imported here only, lazily (the report formats need it, the other views do not), and
drives no GUI: each figure is a ``matplotlib.figure.Figure`` drawn by the Agg renderer. Every figure is
drawn under matplotlib's default style with fixed metadata (no software tag, no date, a fixed SVG hash
salt), so the same results give the same bytes.

The colour scale is one set of bands of utilization, used by every picture (``BANDS``).
"""

from __future__ import annotations

import io
import math

import numpy as np

from .common import convert, fmt, unit_of, units_of

#: Utilization bands: (upper limit, colour, legend text). Shared by every picture and the HTML tables.
BANDS = (
    (0.50, "#3b6ea8", "under 0.50"),
    (0.80, "#55a38a", "0.50 to 0.80"),
    (0.95, "#d9a520", "0.80 to 0.95"),
    (1.00, "#e06a1b", "0.95 to 1.00"),
    (math.inf, "#b3152c", "over 1.00 (fails)"),
)
UNCHECKED = "#9a9a9a"
MAX_BARS = 40  # the utilization chart shows at most this many pins and plates, the highest
BODY = "#5d6d7e"
LINK = "#2e4053"
LOAD = "#111111"
PIN_FORCE = "#7b2d8e"

_RC = {"svg.hashsalt": "pinchk", "font.size": 9, "axes.titlesize": 10, "figure.dpi": 100}


def band_colour(u: float) -> str:
    """The colour of utilization ``u``."""
    for top, colour, _ in BANDS:
        if u <= top:
            return colour
    return BANDS[-1][1]


def _png(fig) -> bytes:
    buf = io.BytesIO()
    fig.savefig(buf, format="png", dpi=110, metadata={"Software": None})
    return buf.getvalue()


def _figure(w: float, h: float, layout: str | None = "constrained"):
    from matplotlib.figure import Figure

    return Figure(figsize=(w, h), layout=layout)


def _drawing(size: tuple[float, float], legend: float):
    """A figure with one equal-aspect drawing area on the left and ``legend`` inches free on the right."""
    w, h = size
    fig = _figure(w, h, layout=None)
    left, bottom, top = 0.75 / w, 0.55 / h, 0.4 / h
    ax = fig.add_axes((left, bottom, (w - legend - 0.2) / w - left, 1 - bottom - top))
    ax.set_aspect("equal", adjustable="box", anchor="W")
    return fig, ax


class _Styled:
    """Default matplotlib style plus the fixed settings of ``_RC`` (a user's matplotlibrc is ignored)."""

    def __enter__(self):
        import contextlib

        import matplotlib as mpl
        import matplotlib.style

        self._stack = contextlib.ExitStack()
        self._stack.enter_context(matplotlib.style.context("default"))
        self._stack.enter_context(mpl.rc_context(_RC))
        return self

    def __exit__(self, *exc):
        return self._stack.__exit__(*exc)



def pin_utilization(results) -> dict[str, float]:
    """Highest utilization of any check of each checked pin (the pin and its plates), every case."""
    c = results.columns
    out: dict[str, float] = {}
    for p, u in zip(c["pin"], c["utilization"], strict=True):
        out[p] = max(out.get(p, 0.0), float(u))
    return out


def governing_case(results) -> str | None:
    g = results.governing
    if g is not None:
        return results.columns["case"][g]
    return results.solution.cases[0] if results.solution.cases else None


def _legend_handles(used_max: float):
    from matplotlib.patches import Patch

    return [Patch(facecolor=col, edgecolor="#333333", label=f"utilization {text}") for _, col, text in BANDS]


# ---------------------------------------------------------------------------------------------- frame
def frame_figure(results) -> bytes:
    """The frame: bodies, links, supports, pins coloured by utilization, the governing case's loads and
    the force each body receives at each pin in that case."""
    with _Styled():
        return _frame(results)


def _frame(results) -> bytes:
    from matplotlib.lines import Line2D
    from matplotlib.patches import Circle, FancyArrowPatch, Polygon

    job, sol = results.job, results.solution
    units = units_of(results)
    lu, fu = unit_of("length", units), unit_of("force", units)
    case = governing_case(results)
    j = sol.cases.index(case) if case in sol.cases else 0
    util = pin_utilization(results)

    pts = [xy for b in job.bodies.values() for xy in b.points.values()]
    pts += [p.xy for p in job.pins.values()]
    pts += [e.xy for lk in job.links.values() for e in lk.ends]
    pts += [s.at.xy for s in job.supports.values()]
    P = np.array(pts, float) if pts else np.zeros((1, 2))
    lo, hi = P.min(axis=0), P.max(axis=0)
    span = float(max(hi[0] - lo[0], hi[1] - lo[1], 0.0)) or 1.0  # a frame at one point still gets a scale
    k_len = lambda v: convert(v, "length", units)  # noqa: E731  drawing in output length units
    s = 0.045 * span  # symbol size

    loads = [ld for ld in job.loads if ld.case == case]
    fmax = max([math.hypot(*ld.force) for ld in loads] + [1e-30])
    tails = {}
    for n_ld, ld in enumerate(loads):
        f = math.hypot(*ld.force)
        if f > 0:
            tails[n_ld] = np.array(ld.at.xy) - 0.16 * span * (0.4 + 0.6 * f / fmax) * np.array(ld.force) / f
    if tails:
        T = np.array(list(tails.values()))
        lo, hi = np.minimum(lo, T.min(axis=0)), np.maximum(hi, T.max(axis=0))
    fig, ax = _drawing(_size(hi[0] - lo[0], hi[1] - lo[1], legend=2.9), legend=2.9)
    ax.set_title(f"Frame, case '{case}' (the governing case): loads, pin forces and pin utilization")

    # bodies: a light hull with the member lines between its points
    for name, b in job.bodies.items():
        xy = np.array(list(b.points.values()), float)
        if len(xy) >= 3 and _area(xy) > 1e-6 * span**2:
            hull = _hull(xy)
            ax.add_patch(Polygon(k_len(hull), closed=True, facecolor="#d6dde4", edgecolor=BODY, lw=1.2,
                                 zorder=1))
        else:
            order = np.lexsort((xy[:, 1], xy[:, 0]))
            ax.plot(*k_len(xy[order]).T, color=BODY, lw=7, solid_capstyle="round", alpha=0.45, zorder=1)
            ax.plot(*k_len(xy[order]).T, color=BODY, lw=1.2, zorder=1)
        # the name beside the middle of the body's longest edge, clear of the pins at its points
        closed = len(xy) >= 3 and _area(xy) > 1e-6 * span**2
        ring = _hull(xy) if closed else xy[np.lexsort((xy[:, 1], xy[:, 0]))]
        if len(ring) >= 2:
            seg = np.diff(np.vstack([ring, ring[:1]]) if closed else ring, axis=0)
            k = int(np.argmax(np.hypot(seg[:, 0], seg[:, 1])))
            mid = ring[k] + seg[k] / 2
            nrm = np.array([seg[k][1], -seg[k][0]]) / (float(np.hypot(*seg[k])) or 1.0)
        else:
            mid, nrm = xy[0], np.array([0.0, -1.0])
        ax.annotate(name, k_len(mid), xytext=tuple(10 * nrm), textcoords="offset points", color=BODY, fontsize=8,
                    style="italic", zorder=6, ha="left" if nrm[0] > 0.3 else ("right" if nrm[0] < -0.3 else "center"),
                    va="center")

    for name, lk in job.links.items():
        a, b = (k_len(np.array(e.xy)) for e in lk.ends)
        ax.plot([a[0], b[0]], [a[1], b[1]], color=LINK, lw=3 if lk.kind == "link" else 1.2,
                ls="-" if lk.kind == "link" else (0, (5, 3)), zorder=2)
        t = sol.links.get(name)
        label = name
        if t is not None:
            label = f"{name}: {'T' if t[j] >= 0 else 'C'} {fmt(abs(convert(t[j], 'force', units)))} {fu}"
        ax.annotate(label, (a + b) / 2, xytext=(0, -13), textcoords="offset points", ha="center", fontsize=8,
                    color=LINK, zorder=6)

    for name, sup in job.supports.items():
        _support(ax, k_len(np.array(sup.at.xy)), k_len(s), sup.kind, sup.normal, name)

    # loads of the governing case
    for n_ld, ld in enumerate(loads):
        if n_ld not in tails:
            continue
        fx, fy = ld.force
        f = math.hypot(fx, fy)
        tip, tail = k_len(np.array(ld.at.xy)), k_len(tails[n_ld])
        ax.add_patch(FancyArrowPatch(tail, tip, arrowstyle="-|>,head_length=6,head_width=3.5", lw=2.2,
                                     color=LOAD, zorder=7, shrinkB=k_len(0) + 6))
        ux, uy = fx / f, fy / f
        ax.annotate(f"{ld.label or 'load'} {fmt(convert(f, 'force', units))} {fu}", tail,
                    xytext=(-10 * ux, -10 * uy), textcoords="offset points", fontsize=8, zorder=8,
                    ha="right" if ux > 0.3 else ("left" if ux < -0.3 else "center"),
                    va="top" if uy > 0.3 else ("bottom" if uy < -0.3 else "center"))

    # force each body receives at each pin in the governing case, drawn from the pin toward the body
    fmax_pin = max([float(np.hypot(*pf.force[j, k])) for pf in sol.pins.values() for k in range(len(pf.members))]
                   + [1e-30])
    for pname, pf in sol.pins.items():
        pxy = k_len(np.array(job.pins[pname].xy))
        for k, m in enumerate(pf.members):
            if m not in job.bodies:
                continue
            fx, fy = pf.force[j, k]
            f = math.hypot(fx, fy)
            if f <= 1e-9 * fmax_pin:
                continue
            bxy = k_len(np.array(list(job.bodies[m].points.values()), float).mean(axis=0))
            toward = bxy - pxy
            nt = float(np.hypot(*toward))
            tu = toward / nt if nt > 0 else np.zeros(2)
            L = k_len(0.13 * span * f / fmax_pin)
            u = np.array([fx, fy]) / f
            near = pxy + tu * k_len(1.2 * s)  # just off the pin disc, on the body's side
            # the arrow lies on the body's side of the pin whichever way the force points
            start, end = (near, near + L * u) if float(np.dot(u, tu)) >= 0 else (near - L * u, near)
            ax.add_patch(FancyArrowPatch(start, end, arrowstyle="-|>,head_length=5,head_width=3", lw=1.4,
                                         color=PIN_FORCE, zorder=7))
            px, py = (-u[1], u[0]) if u[0] >= 0 else (u[1], -u[0])  # beside the arrow's middle
            ax.annotate(f"{fmt(convert(f, 'force', units), 3)}", (start + end) / 2, xytext=(6 * px, 6 * py),
                        textcoords="offset points", fontsize=7, color=PIN_FORCE, zorder=8,
                        ha="left" if px > 0.3 else ("right" if px < -0.3 else "center"),
                        va="bottom" if py > 0.3 else ("top" if py < -0.3 else "center"))

    for pname, pin in job.pins.items():
        xy = k_len(np.array(pin.xy))
        u = util.get(pname)
        col = UNCHECKED if u is None else band_colour(u)
        ax.add_patch(Circle(xy, k_len(0.6 * s), facecolor=col, edgecolor="#222222", lw=1.2, zorder=9))
        ax.add_patch(Circle(xy, k_len(0.18 * s), facecolor="white", edgecolor="#222222", lw=0.8, zorder=10))
        text = f"{pname}\n" + ("not checked" if u is None else f"u = {u:.3f}")
        ox, oy = _clear_side(job, pname, case)
        ax.annotate(text, xy, xytext=(14 * ox, 14 * oy), textcoords="offset points", fontsize=8, fontweight="bold",
                    zorder=11, bbox={"boxstyle": "round,pad=0.2", "fc": "white", "ec": col, "alpha": 0.9},
                    ha="left" if ox > 0.25 else ("right" if ox < -0.25 else "center"),
                    va="bottom" if oy > 0.25 else ("top" if oy < -0.25 else "center"))

    pad = k_len(0.22 * span)
    ax.set_xlim(k_len(lo[0]) - pad, k_len(hi[0]) + pad)
    ax.set_ylim(k_len(lo[1]) - pad, k_len(hi[1]) + pad)
    ax.set_xlabel(f"x [{lu}]")
    ax.set_ylabel(f"y [{lu}]")
    ax.grid(True, color="#e5e5e5", lw=0.6)
    handles = _legend_handles(max(util.values(), default=0.0))
    handles.append(Line2D([], [], marker="o", ls="", mfc=UNCHECKED, mec="#222222", label="pin not checked"))
    handles.append(Line2D([], [], color=LOAD, lw=2.2, label=f"load [{fu}]"))
    handles.append(Line2D([], [], color=PIN_FORCE, lw=1.4, label=f"force a body receives at a pin [{fu}]"))
    fig.legend(handles=handles, loc="upper right", fontsize=8, frameon=False,
               title="pin colour: highest utilization\nof the pin and its plates,\nevery case", title_fontsize=8,
               alignment="left")
    return _png(fig)


def _clear_side(job, pname: str, case: str | None) -> tuple[float, float]:
    """A unit direction from a pin away from what meets it (bodies, links, supports, the loads of ``case``),
    for its label."""
    p = np.array(job.pins[pname].xy, float)
    away = np.zeros(2)
    others = [np.array(list(job.bodies[b].points.values()), float).mean(axis=0) for b in job.pins[pname].bodies
              if b in job.bodies]
    for lk in job.links.values():
        ends = [e for e in lk.ends if e.pin == pname or math.dist(e.xy, p) < 1e-9]
        if ends:
            others += [np.array(e.xy, float) for e in lk.ends if e not in ends]
    for v in others:
        d = v - p
        n = float(np.hypot(*d))
        if n > 0:
            away -= d / n
    for sup in job.supports.values():
        if sup.at.pin == pname or math.dist(sup.at.xy, p) < 1e-9:
            nrm = np.array(sup.normal if sup.normal is not None else (0.0, 1.0), float)
            away += nrm / (float(np.hypot(*nrm)) or 1.0)  # the support is drawn on the far side of its normal
    for ld in job.loads:
        if ld.case == case and math.dist(ld.at.xy, p) < 1e-9 and math.hypot(*ld.force) > 0:
            away += np.array(ld.force) / math.hypot(*ld.force)  # the load arrow comes from the other side
    n = float(np.hypot(*away))
    if n < 1e-6:
        return (0.7071, 0.7071)
    # prefer the diagonals, where a label box sits best beside a disc
    ang = math.atan2(away[1], away[0])
    ang = math.radians(45 + 90 * round((math.degrees(ang) - 45) / 90))
    return (math.cos(ang), math.sin(ang))


def _size(dx: float, dy: float, legend: float) -> tuple[float, float]:
    """Figure size [in] for a drawing of extent dx by dy beside a legend ``legend`` inches wide."""
    w_ax = 5.6
    if not max(dx, dy) > 0:
        dx = dy = 1.0
    h = w_ax * (dy + 0.4 * max(dx, dy)) / (dx + 0.4 * max(dx, dy)) + 0.9
    return w_ax + legend, min(max(h, 3.4), 7.5)


def _area(xy) -> float:
    h = _hull(xy)
    x, y = h[:, 0], h[:, 1]
    return 0.5 * abs(float(np.dot(x, np.roll(y, 1)) - np.dot(y, np.roll(x, 1))))


def _hull(xy):
    """Convex hull (monotone chain), counter-clockwise."""
    pts = sorted({(float(a), float(b)) for a, b in xy})
    if len(pts) < 3:
        return np.array(pts)

    def cross(o, a, b):
        return (a[0] - o[0]) * (b[1] - o[1]) - (a[1] - o[1]) * (b[0] - o[0])

    lower: list = []
    for p in pts:
        while len(lower) >= 2 and cross(lower[-2], lower[-1], p) <= 0:
            lower.pop()
        lower.append(p)
    upper: list = []
    for p in reversed(pts):
        while len(upper) >= 2 and cross(upper[-2], upper[-1], p) <= 0:
            upper.pop()
        upper.append(p)
    return np.array(lower[:-1] + upper[:-1])


def _support(ax, xy, s, kind, normal, name):
    """A support symbol: a wedge for a pinned support, a wedge on two wheels for a roller, a hatched
    block for a fixed one; drawn on the side the support pushes from."""
    from matplotlib.patches import Circle, Polygon, Rectangle

    n = np.array(normal if normal is not None else (0.0, 1.0), float)
    n = n / (np.hypot(*n) or 1.0)
    t = np.array([-n[1], n[0]])
    col = "#34495e"
    if kind == "fixed":
        ang = math.degrees(math.atan2(n[1], n[0])) - 90
        base = xy - n * 0.6 * s + t * 1.1 * s  # the corner the rotated block starts from
        ax.add_patch(Rectangle(base, 2.2 * s, 0.6 * s, angle=ang, facecolor="#cfd6dd", edgecolor=col,
                               hatch="////", lw=1.0, zorder=3))
    else:
        base = xy - n * 1.3 * s
        tri = np.array([xy, base + t * 0.8 * s, base - t * 0.8 * s])
        ax.add_patch(Polygon(tri, closed=True, facecolor="#cfd6dd", edgecolor=col, lw=1.2, zorder=3))
        ground = base
        if kind == "roller":
            r = 0.22 * s
            for off in (-0.45, 0.45):
                ax.add_patch(Circle(base + t * off * s - n * r, r, facecolor="white", edgecolor=col, lw=1.0,
                                    zorder=3))
            ground = base - n * 2 * r
        g0, g1 = ground + t * 1.2 * s, ground - t * 1.2 * s
        ax.plot([g0[0], g1[0]], [g0[1], g1[1]], color=col, lw=1.6, zorder=3)
        for q in np.linspace(-1.0, 1.0, 6):
            a = ground + t * q * s
            b = a - n * 0.35 * s - t * 0.3 * s
            ax.plot([a[0], b[0]], [a[1], b[1]], color=col, lw=0.8, zorder=3)
    lab = xy - n * 2.4 * s
    ax.annotate(f"{name} ({kind})", lab, ha="center", va="center", fontsize=8, color=col, zorder=6)


# ------------------------------------------------------------------------------------------------ lug
def governing_plate_row(results) -> int | None:
    """The row with the highest utilization on a lug plate (a plate or a main plate with its cheeks; not a
    bushing, not the pin or its retainer), or None if no plate is checked."""
    c = results.columns
    for i in results.order:
        i = int(i)
        if _plate_part(results, c["pin"][i], c["part"][i]) is not None:
            return i
    return None


def _plate_part(results, pin: str, label: str):
    """The pinchk.joint.Part of kind "plate" of ``pin`` called ``label``, or None."""
    from ..joint import parts_of

    p = results.job.pins.get(pin)
    if p is None or label in ("pin", "pin retainer"):
        return None
    return next((q for q in parts_of(p) if q.label == label and q.kind == "plate"), None)


def lug_figure(results, row: int) -> bytes:
    """A sketch of one lug plate (the governing one): its outline as given, drawn in the frame's orientation
    with its axis, the hole and the pin bearing in it, the real force direction of the row's case, the
    failure planes and the distances the checks use along that force."""
    with _Styled():
        return _lug(results, row)


def outline_polygon(outline, back: float, n: int = 181) -> tuple[np.ndarray, bool]:
    """The outline's boundary in lug coordinates (s, n) [m] as a closed polygon, and whether its last edge
    is a base section given in the job (else the sides are cut at ``back`` behind the hole for the drawing).

    Round: every line across the axis runs from the base to s = s_c + √(R² − (n − n_c)²) (s_c where the line
    misses the arc: a shoulder); square: to the end; polygon: its vertices, the closing edge the base.
    """
    if outline.kind == "polygon":
        return np.asarray(outline.vertices, float), True
    w2 = outline.width / 2
    b = outline.base if outline.base is not None else back
    if outline.kind == "square":
        front = np.array([[outline.end, -w2], [outline.end, w2]])
    else:
        cs, cn = outline.centre
        R = outline.end
        nn = np.unique(np.concatenate([np.linspace(-w2, w2, n), np.clip([cn - R, cn + R], -w2, w2)]))
        front = np.column_stack([cs + np.sqrt(np.maximum(R**2 - (nn - cn) ** 2, 0.0)), nn])
    return np.vstack([[[-b, -w2]], front, [[-b, w2]]]), outline.base is not None


def _ray_exit(poly: np.ndarray, p: np.ndarray, u: np.ndarray) -> float:
    """Distance from ``p`` along ``u`` to the first crossing of the closed polygon ``poly`` (inf: none)."""
    q = np.roll(poly, -1, axis=0)
    e = q - poly
    den = u[0] * e[:, 1] - u[1] * e[:, 0]
    with np.errstate(divide="ignore", invalid="ignore"):
        t = ((poly[:, 0] - p[0]) * e[:, 1] - (poly[:, 1] - p[1]) * e[:, 0]) / den
        lam = ((poly[:, 0] - p[0]) * u[1] - (poly[:, 1] - p[1]) * u[0]) / den
    ok = (den != 0) & (t > 1e-12) & (lam >= -1e-9) & (lam <= 1 + 1e-9)
    return float(t[ok].min()) if ok.any() else math.inf


def _lug(results, row: int) -> bytes:
    from matplotlib.lines import Line2D
    from matplotlib.patches import Arc, Circle, FancyArrowPatch, Polygon

    from .. import lug as lugmod
    from ..combine import row_factors
    from ..joint import outline_of

    c = results.columns
    units = units_of(results)
    lu, fu = unit_of("length", units), unit_of("force", units)
    pname, label, case = c["pin"][row], c["part"][row], c["case"][row]
    pin = results.job.pins[pname]
    part = _plate_part(results, pname, label)
    plates = [pin.stack[i] for i in part.plates]
    plate = plates[0]  # the main plate: its outline is drawn (cheek plates are listed)
    j = results.solution.cases.index(case)
    st = results.stacks[pname]
    sfac = row_factors(results.job, results.solution.cases, pname, {plate.member})[0]
    F = part.force(st)[j] * sfac[j]
    f = float(np.hypot(*F))
    u = np.array(F) / f if f > 0 else None
    # lug axis in the frame: as given, else along the force of this case
    if plate.axis is not None:
        ax_u = lugmod.unit(plate.axis)[0]
    else:
        ax_u = u if u is not None else np.array([0.0, 1.0])
    if u is None:
        u = ax_u
    th_f = math.atan2(u[1], u[0])
    R = np.array([[ax_u[0], -ax_u[1]], [ax_u[1], ax_u[0]]])  # lug (s, n) -> frame (x, y)
    Lc = lambda v: convert(v, "length", units)  # noqa: E731

    outline = outline_of(plate)
    d = min(q.bushing.outer if q.bushing else pin.diameter for q in plates)  # what bears on the plate
    d0 = max(q.bushing.outer if q.bushing else q.hole + pin.wear for q in plates)
    t = sum(q.thickness for q in plates)
    r3 = outline.reach(np.array([[1.0, 0.0], [0.0, 1.0], [0.0, -1.0]]))  # along the axis and across it
    size = float(max(r3[np.isfinite(r3)].max(initial=d0), d0))  # a scale for the drawing
    poly_l, has_base = outline_polygon(outline, back=2.2 * size)
    poly = poly_l @ R.T  # frame orientation, hole centre at the origin [m]
    geo = lugmod.along(outline, d0, u[None, :], plate.axis)
    perp = np.array([-u[1], u[0]])

    def g(xy):
        return Lc(np.asarray(xy, float))

    ext = np.vstack([poly, [u * (_finite(geo.reach[0], size) + 2.4 * d0)]])
    lo, hi = ext.min(axis=0), ext.max(axis=0)
    fig, ax = _drawing(_size(*(Lc(hi - lo)), legend=2.9), legend=2.9)
    ax.add_patch(Polygon(g(poly), closed=True, facecolor="#d6dde4", edgecolor="none", zorder=1))
    ax.plot(*g(poly).T, color=BODY, lw=1.5, zorder=1)  # the free edges (open: the closing edge is the base)
    ax.plot(*g(np.vstack([poly[-1], poly[0]])).T, color=BODY, lw=1.0, ls=(0, (6, 3)), zorder=1)  # base line
    ax.add_patch(Circle(g([0, 0]), Lc(d0 / 2), facecolor="white", edgecolor=BODY, lw=1.2, zorder=2))
    # the pin (or the bushing) bears on the hole's edge on the side the force pushes the plate
    ax.add_patch(Circle(g(u * (d0 - d) / 2), Lc(d / 2), facecolor="#f3e7c4", edgecolor="#8a6d1d", lw=1.0,
                        zorder=3, alpha=0.9))
    if plate.axis is not None:  # the lug axis, from the hole centre toward its end
        reach_ax = _finite(float(outline.reach(np.array([[1.0, 0.0]]))[0]), size)
        ax.plot(*g([-0.6 * size * ax_u, (reach_ax + 0.6 * d0) * ax_u]).T, color="#555555", lw=0.9,
                ls=(0, (8, 2, 2, 2)), zorder=4)
    red = BANDS[-1][1]
    # net section across the force through the hole centre, to the outline on either side
    for sgn, cc in ((1, geo.c_pos[0]), (-1, geo.c_neg[0])):
        if math.isfinite(cc):
            ax.plot(*g([sgn * perp * d0 / 2, sgn * perp * (d0 / 2 + cc)]).T, color=red, lw=2.4, zorder=4)
    # shear-out planes beside the hole, along the force, to the outline
    yk = 0.35 * d0
    for sgn in (-1, 1):
        p0 = sgn * perp * yk + u * math.sqrt((d0 / 2) ** 2 - yk**2)
        L_out = _ray_exit(poly, p0, u)
        if math.isfinite(L_out) and math.isfinite(geo.reach[0]):  # none where the force runs into the body
            ax.plot(*g([p0, p0 + u * L_out]).T, color="#1f5fa8", lw=2.4, ls=(0, (4, 2)), zorder=4)
    ax.add_patch(Arc(g([0, 0]), Lc(d0), Lc(d0), theta1=math.degrees(th_f) - 60, theta2=math.degrees(th_f) + 60,
                     color="#e06a1b", lw=4, zorder=5))
    # the force the plate receives from the pin, just beyond the outline along its direction
    r0 = _finite(geo.reach[0], size)
    a0, a1 = g(u * (r0 + 0.25 * d0)), g(u * (r0 + 1.6 * d0))
    ax.add_patch(FancyArrowPatch(a0, a1, arrowstyle="-|>,head_length=9,head_width=5", lw=2.6, color=LOAD,
                                 zorder=6))
    mid = (np.asarray(a0) + np.asarray(a1)) / 2
    px, py = (-u[1], u[0]) if u[0] >= -1e-9 else (u[1], -u[0])
    off = math.degrees(float(geo.angle[0]))
    ax.annotate(f"F = {fmt(convert(f, 'force', units))} {fu}\nat {math.degrees(th_f) % 360:.1f}° from +x"
                + (f"\n{abs(off):.1f}° off the lug axis" if plate.axis is not None else ""), mid,
                xytext=(12 * px, 12 * py), textcoords="offset points", fontsize=8.5, fontweight="bold", zorder=7,
                ha="left" if px > 0.3 else ("right" if px < -0.3 else "center"),
                va="bottom" if py > 0.3 else ("top" if py < -0.3 else "center"))
    # the distances the checks use, along and across the force
    a_e, cp, cn = float(geo.a[0]), float(geo.c_pos[0]), float(geo.c_neg[0])
    if math.isfinite(a_e):
        _dim(ax, g(u * d0 / 2), g(u * (d0 / 2 + a_e)), f"a = {fmt(Lc(a_e))}")
    back_at = -u * 0.5 * d0 - u * 0.25 * size
    for sgn, cc, nm in ((1, cp, "c+"), (-1, cn, "c−")):
        if math.isfinite(cc):
            _dim(ax, g(back_at + sgn * perp * d0 / 2), g(back_at + sgn * perp * (d0 / 2 + cc)),
                 f"{nm} = {fmt(Lc(cc))}")
    handles = [Line2D([], [], color=red, lw=2.4, label="net section across the force"),
               Line2D([], [], color="#1f5fa8", lw=2.4, ls=(0, (4, 2)), label="shear-out planes beyond the hole"),
               Line2D([], [], color="#e06a1b", lw=4, label="bearing on the hole"),
               Line2D([], [], color=BODY, lw=1.0, ls=(0, (6, 3)),
                      label="base section (joins its body)" if has_base else "cut of the drawing (no base given)")]
    if plate.axis is not None:
        handles.append(Line2D([], [], color="#555555", lw=0.9, ls=(0, (8, 2, 2, 2)), label="lug axis"))
    fig.legend(handles=handles, loc="upper right", fontsize=8, frameon=False)
    m = plate.material
    cheeks = f" ({len(plates)} plates, t total)" if len(plates) > 1 else ""
    info = (f"pin {pname}, part '{label}', case '{case}'\n"
            f"t = {fmt(Lc(t))} {lu}{cheeks}\nhole d0 = {fmt(Lc(d0))} {lu}, pin d = {fmt(Lc(d))} {lu}\n"
            f"outline: {outline.kind}" + (", axis as given" if plate.axis is not None else
                                          ", axis along the force") + "\n"
            f"{m.name if m else '-'}\n"
            f"lengths in {lu}, as in the frame\nF: the force the pin puts\non the plate"
            + ("" if math.isfinite(geo.reach[0]) else "\n(toward the body: no free\nedge ahead of the pin)"))
    fig.text(1 - 2.8 / fig.get_figwidth(), 0.04, info, fontsize=8, va="bottom", ha="left")
    lo_d, hi_d = Lc(lo), Lc(hi)
    pad = 0.14 * float(max(hi_d - lo_d))
    ax.set_xlim(lo_d[0] - pad, hi_d[0] + pad)
    ax.set_ylim(lo_d[1] - pad, hi_d[1] + pad)
    ax.set_xlabel(f"x [{lu}] from the hole centre")
    ax.set_ylabel(f"y [{lu}]")
    ax.set_title(f"Governing lug: {pname} {label}, {c['check'][row]} (u = {c['utilization'][row]:.3f})")
    return _png(fig)


def _finite(x: float, fallback: float) -> float:
    return float(x) if math.isfinite(x) else fallback


def _dim(ax, p0, p1, text):
    from matplotlib.patches import FancyArrowPatch

    ax.add_patch(FancyArrowPatch(p0, p1, arrowstyle="<|-|>,head_length=4,head_width=2", lw=0.9,
                                 color="#333333", zorder=6, shrinkA=0, shrinkB=0))
    mid = (np.asarray(p0) + np.asarray(p1)) / 2
    ax.annotate(text, mid, xytext=(3, 3), textcoords="offset points", fontsize=8, zorder=7,
                bbox={"boxstyle": "round,pad=0.15", "fc": "white", "ec": "none", "alpha": 0.8})


# ----------------------------------------------------------------------------------------------- bars
def governing_by_part(results) -> list[int]:
    """For each (pin, part), its row of highest utilization; sorted highest first."""
    c = results.columns
    u = c["utilization"]
    best: dict[tuple[str, str], int] = {}
    for i in range(len(results)):
        key = (c["pin"][i], c["part"][i])
        if key not in best or u[i] > u[best[key]]:
            best[key] = i
    return sorted(best.values(), key=lambda i: (-u[i], i))


def bars_figure(results) -> bytes:
    """Utilization of every pin and plate (its governing check and case), highest first."""
    with _Styled():
        return _bars(results)


def _bars(results) -> bytes:
    c = results.columns
    rows = governing_by_part(results)
    more = max(len(rows) - MAX_BARS, 0)
    rows = rows[:MAX_BARS]  # the highest; every row is in the report's tables
    n = len(rows)
    fig = _figure(8.0, 1.8 + 0.28 * max(n, 1))
    ax = fig.subplots()
    u = np.array([float(c["utilization"][i]) for i in rows])
    labels = [f"{c['pin'][i]} · {c['part'][i]}" for i in rows]
    y = np.arange(n)[::-1]
    shown = np.minimum(u, 1.5)
    ax.barh(y, shown, color=[band_colour(x) for x in u], edgecolor="#333333", lw=0.5, height=0.7)
    for yy, i, uu, sh in zip(y, rows, u, shown, strict=True):
        ax.text(sh + 0.01, yy, f"{uu:.3f}  {c['check'][i]}, '{c['case'][i]}'", va="center", fontsize=7.5,
                bbox={"boxstyle": "square,pad=0.1", "fc": "white", "ec": "none", "alpha": 0.8})
    ax.axvline(1.0, color="#b3152c", lw=1.2, ls="--")
    ax.set_yticks(y, labels, fontsize=8)
    top = max(1.0, float(shown.max(initial=0.0)))
    ax.set_xlim(0, top * 1.55)
    ax.set_xlabel("utilization = demand / capacity (1.00 = limit)")
    ax.set_title("Utilization of every pin and plate: its governing check and case" if not more else
                 f"Utilization of the {n} most used pins and plates ({more} more in the tables)")
    fig.legend(handles=_legend_handles(float(u.max(initial=0.0))), loc="outside lower center", ncol=3, fontsize=7.5,
               frameon=False)
    ax.grid(True, axis="x", color="#e5e5e5", lw=0.6)
    return _png(fig)


# ---------------------------------------------------------------------------------------------- sweep
SWEEP_COLOURS = ("#1b4f8a", "#c0392b", "#2a9d5c", "#8e44ad", "#d68910", "#16a0a0", "#6d4c2f", "#c2185b",
                 "#5d6d7e", "#7cb342")


def governing_sweep(results):
    """The load-angle sweep (pinchk.sweep.LugSweep) of the governing lug, or None."""
    r = governing_plate_row(results)
    if r is None:
        return None
    key = (results.columns["pin"][r], results.columns["part"][r])
    return next((sw for sw in results.sweeps if (sw.pin, sw.part) == key), None)


def sweep_figure(results) -> bytes:
    """The governing lug's load-angle sweep as a polar plot: the utilization of each check as the lug's
    largest force turns through 360° (angles in the frame, from +x), utilization 1 dashed, the direction
    of each load case marked, the lug axis drawn."""
    with _Styled():
        return _sweep(results, governing_sweep(results))


def _sweep(results, sw) -> bytes:
    units = units_of(results)
    fu = unit_of("force", units)
    fig = _figure(8.4, 5.6, layout=None)
    ax = fig.add_axes((0.06, 0.1, 0.5, 0.78), projection="polar")
    th = np.radians(np.append(sw.angle_deg, sw.angle_deg[:1] + 360.0))
    top = 1.0
    for i, name in enumerate(sw.checks):
        u = np.append(sw.util[i], sw.util[i][:1])
        if not np.any(np.isfinite(u)):
            continue
        top = max(top, float(np.nanmax(u)))
        ax.plot(th, u, color=SWEEP_COLOURS[i % len(SWEEP_COLOURS)], lw=1.4,
                ls="-" if i < len(SWEEP_COLOURS) else (0, (4, 2)), label=name)
    ring = np.linspace(0, 2 * np.pi, 361)
    ax.plot(ring, np.ones_like(ring), color=BANDS[-1][1], lw=1.2, ls=(0, (5, 3)), label="utilization 1 (limit)")
    worst = np.nanmax(np.where(np.isnan(sw.case_util), -np.inf, sw.case_util), axis=0)
    ax.plot(np.radians(sw.case_angle_deg), worst, ls="", marker="o", mfc="white", mec=LOAD, mew=1.4, ms=7,
            label="direction of each load case\n(its worst check at the swept force)")
    for cs, a, u in zip(sw.cases, sw.case_angle_deg, worst, strict=True):
        ax.annotate(cs, (math.radians(a), u), xytext=(6, 6), textcoords="offset points", fontsize=7.5,
                    bbox={"boxstyle": "round,pad=0.15", "fc": "white", "ec": "none", "alpha": 0.8})
    rmax = 1.12 * top
    if sw.axis_deg is not None:
        ax.annotate("", xy=(math.radians(sw.axis_deg), 0.55 * rmax), xytext=(0, 0),
                    arrowprops={"arrowstyle": "-|>", "color": "#555555", "lw": 1.2})
        ax.plot([], [], color="#555555", lw=1.2, label=f"lug axis, {sw.axis_deg:.1f}°")
    ax.set_ylim(0, rmax)
    ax.set_thetagrids(range(0, 360, 30))
    ax.tick_params(labelsize=7.5)
    u_pk, a_pk, k_pk = sw.peak()
    ax.set_title(f"Load-angle sweep of {sw.pin} {sw.part}: |F| = {fmt(convert(sw.force, 'force', units))} {fu} "
                 "turned through 360°", loc="left", fontsize=10, pad=18)
    fig.legend(loc="upper left", bbox_to_anchor=(0.6, 0.88), fontsize=7.5, frameon=False,
               title="utilization of each check\n(radius; angle of the force\nfrom +x, counter-clockwise)",
               title_fontsize=8, alignment="left", handles=ax.get_legend_handles_labels()[0])
    fig.text(0.6, 0.08, f"peak {u_pk:.3f} ({k_pk}) at {a_pk:.0f}°\n"
             "ULS checks at the lug's largest force;\nthe load cases' own forces may be smaller", fontsize=8)
    return _png(fig)


def all_figure_captions(results) -> dict[str, str]:
    """The pictures the report has for these results: key -> caption (the frame, the governing lug, the
    utilization chart)."""
    job = results.job
    out = {}
    if job.bodies or job.links:  # a job checked from a forces file alone has no frame to draw
        out["frame"] = ("The frame in the governing case; each pin coloured by the highest utilization of the pin "
                        "and its plates")
    r = governing_plate_row(results)
    if r is not None:
        c = results.columns
        out["lug"] = (f"The governing lug, pin {c['pin'][r]} plate '{c['part'][r]}', drawn along the direction "
                      f"of its force in case '{c['case'][r]}', with its failure planes")
    sw = governing_sweep(results)
    if sw is not None:
        out["sweep"] = (f"Load-angle sweep of the governing lug, pin {sw.pin} '{sw.part}': the utilization of each "
                        "check as its largest force turns through 360°, with the load cases' directions")
    if len(results):
        out["utilization"] = "Utilization of every pin and plate (its governing check and case)"
    return out


def all_figures(results, progress=None) -> dict[str, tuple[str, bytes]]:
    """Every picture of the report: key -> (caption, PNG bytes)."""
    make = {"frame": lambda: frame_figure(results),
            "lug": lambda: lug_figure(results, governing_plate_row(results)),
            "sweep": lambda: sweep_figure(results), "utilization": lambda: bars_figure(results)}
    out: dict[str, tuple[str, bytes]] = {}
    for key, caption in all_figure_captions(results).items():
        out[key] = (caption, make[key]())
        if progress is not None:
            progress.step(f"picture: {key}")
    return out
