"""The job as pinchk holds it: frozen dataclasses of SI floats, built once by the job-file reader."""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Any

if TYPE_CHECKING:
    from .bolts import BoltSpec

#: Member names with a fixed meaning in a pin's stack.
GROUND = "ground"  # the support that ties a pin to the ground (a base bracket)
PIN_LOAD = "load"  # where a load hung on the pin itself enters it (a shackle, a hook)


@dataclass(frozen=True)
class Material:
    """Strengths of one material at one size [Pa], and where they come from."""

    name: str
    fy: float
    fu: float
    E: float
    source: str


@dataclass(frozen=True)
class Section:
    """Elastic section of a member for the stiffness solve: E [Pa], A [m^2], I [m^4]."""

    name: str
    E: float
    A: float
    I: float
    source: str = ""


@dataclass(frozen=True)
class Body:
    """A body with named points (x, y) [m]: rigid for statics; beam members for the stiffness solve.

    ``members`` are the pairs of points joined by beam elements (empty: a chain in point order);
    ``section`` their elastic section (None: the body has none, and only statics can solve it);
    ``member_sections`` the members whose section differs from the body's.
    """

    name: str
    points: dict[str, tuple[float, float]]
    section: Section | None = None
    members: tuple[tuple[str, str], ...] = ()
    member_sections: dict[tuple[str, str], Section] = field(default_factory=dict)


@dataclass(frozen=True)
class Place:
    """Where a link end, support or load attaches: a body's point, or a pin (the pin itself)."""

    body: str | None  # None when the place is a pin
    point: str | None
    pin: str | None
    xy: tuple[float, float]

    @property
    def label(self) -> str:
        return self.pin if self.pin is not None else f"{self.body}.{self.point}"


@dataclass(frozen=True)
class Bushing:
    """A bushing fitted in a plate's hole: the pin bears on its bore, it bears on the plate."""

    outer: float  # outside diameter = the plate's hole [m]
    material: Material


@dataclass(frozen=True)
class Lateral:
    """A load on a lug out of the frame's plane: a fraction of its in-plane force, or a force per case [N]."""

    fraction: float | None = None
    per_case: dict[str, float] = field(default_factory=dict)
    base_width: float | None = None  # width of the base section (None: from the outline)


@dataclass(frozen=True)
class Plate:
    """One plate (or other member) of a pin's stack, in order along the pin.

    Lengths in m. ``end`` is the distance from the hole centre to the plate's end along its axis (the
    end radius of a round-ended lug); ``width`` the plate width across the axis, the hole centred.
    """

    member: str  # body, link, "ground" or "load"
    thickness: float
    gap: float  # clear gap to the previous plate in the stack
    share: float | None  # share of the member's force; None: in proportion to thickness
    material: Material | None
    width: float | None
    end: float | None
    shape: str  # "round" or "square"
    hole: float  # hole diameter in this plate
    en_type: str  # EN 1993-1-8 Table 3.9 type: "A" or "B"
    stiffened: bool = False  # stiffened out of plane against dishing (ASME BTH-1 §3-3.3.1 4t limit waived)
    outline: object | None = None  # a pinchk.lug.Outline; None: round (radius end) or square, from width/end
    axis: tuple[float, float] | None = None  # lug axis (frame coordinates); None: along each case's force
    group: str | None = None  # plates of one member with one group act as one (main plate and cheeks)
    bushing: Bushing | None = None
    lateral: Lateral | None = None

    @property
    def checked(self) -> bool:
        return self.material is not None


@dataclass(frozen=True)
class Pin:
    """A pin: the bodies it joins at one point, and (if it is to be checked) its size and stack."""

    name: str
    xy: tuple[float, float]
    bodies: tuple[str, ...]
    diameter: float | None
    material: Material | None
    stack: tuple[Plate, ...]
    replaceable: bool = False
    rotates: bool = False
    bolt: BoltSpec | None = None  # the pin is a bolt of a grade (its material is the grade's strengths)
    secured: bool = False  # secured against working loose (cotter, keeper plate, nut), as the job says
    pin_model: str = "uniform"  # bearing on the pin: "uniform" over each plate, or "point" at plate centres
    wear: float = 0.0  # wear allowance on every hole's diameter [m] (a larger service clearance)
    retainer: float | None = None  # axial capacity of the pin's retainer [N], if given

    @property
    def checked(self) -> bool:
        return bool(self.stack)


@dataclass(frozen=True)
class Link:
    """A two-force member between two places: a link (tension or compression) or a cable."""

    name: str
    kind: str  # "link" or "cable"
    ends: tuple[Place, Place]
    EA: float | None = None  # axial stiffness [N] for the stiffness solve; None: axially rigid


@dataclass(frozen=True)
class Support:
    """A support: pinned (2 reactions), roller (1, along ``normal``) or fixed (2 and a moment)."""

    name: str
    kind: str
    at: Place
    normal: tuple[float, float] | None = None


@dataclass(frozen=True)
class Load:
    """A force [N] and moment [N*m] in one load case, at a place; on a pin, optionally on one body."""

    case: str
    at: Place
    force: tuple[float, float]
    moment: float = 0.0
    body: str | None = None  # for a load at a pin: the body that takes it (None: the pin itself)
    label: str = ""


@dataclass(frozen=True)
class Case:
    name: str
    description: str = ""
    limit_state: str = "ULS"


@dataclass(frozen=True)
class Combination:
    """A load combination: factor × load case, summed (the frame is solved once per case)."""

    name: str
    factors: dict[str, float]  # case name -> factor
    description: str = ""
    limit_state: str = "ULS"


@dataclass(frozen=True)
class StackFactor:
    """A named factor of the lifting factor stack (dynamic, skew, consequence) and where it applies.

    ``combinations``, ``pins`` and ``members`` are None where the factor is not limited by them; a
    factor applies to a check row when its combination, its pin and (for a plate) its member are in
    scope. A pin row is in scope of ``members`` when the pin joins one of them.
    """

    name: str
    value: float
    combinations: tuple[str, ...] | None = None
    pins: tuple[str, ...] | None = None
    members: tuple[str, ...] | None = None
    note: str = ""


@dataclass(frozen=True)
class MethodChoice:
    """The design method, its variant (ASD / LRFD) and the factors the job overrides."""

    name: str
    variant: str | None
    factors: dict[str, float] = field(default_factory=dict)


@dataclass(frozen=True)
class ForcesSource:
    """Joint forces read from a forces file instead of solved from a frame (see pinchk.forcesfile)."""

    file: str  # as the job file names it
    path: str  # resolved against the job file's folder
    balance_tol: float  # flag a pin whose member forces sum to more than this share of its largest
    solution: Any = None  # the pinchk.frame.FrameSolution built from the file


@dataclass(frozen=True)
class Job:
    path: str
    title: str
    method: MethodChoice
    output_units: str
    bodies: dict[str, Body]
    pins: dict[str, Pin]
    links: dict[str, Link]
    supports: dict[str, Support]
    loads: tuple[Load, ...]
    cases: dict[str, Case]
    info: dict[str, str] = field(default_factory=dict)
    solver: str = "auto"  # frame solve: "auto", "statics" or "stiffness" (pinchk.solve)
    forces: ForcesSource | None = None  # set when the job reads its joint forces from a forces file
    combinations: dict[str, Combination] = field(default_factory=dict)  # empty: each case on its own
    stack_factors: tuple[StackFactor, ...] = ()
