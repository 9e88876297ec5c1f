"""The plan model: immutable records of everything a ground wiring plan holds.

All quantities are SI (m, m², Ω, A, V, Hz, T, F, s), temperatures in °C,
positions in metres in one plan-wide frame (x to the right, y away from the
front panel, looking down on the chassis).  Every record keeps the
:class:`~groundcheck.core.errors.Location` of the statement that made it.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from functools import cached_property

from ..core.errors import Location
from .construct import from_values, make
from .index import PlanIndex
from .kinds import CONDUCTOR_KINDS, ROLES, SIGNAL, can_open, shield_like
from .sources import Current, FieldSource, Heater, Rectifier, Stage
from .supplies import (
    CABLE_OPERATING_TEMPERATURE,
    DEFAULT_CORD,
    EARTHED_LOCALLY,
    SYSTEMS,
    Listening,
    Mains,
    Supply,
)

#: the records of the plan model, from this module and the two it gathers (:mod:`.supplies`,
#: :mod:`.sources`); every name is importable from here
__all__ = [
    "Mains",
    "Listening",
    "Metal",
    "Point",
    "Conductor",
    "Rectifier",
    "Current",
    "Heater",
    "Stage",
    "FieldSource",
    "Device",
    "Plan",
    "Supply",
    "CABLE_CORES",
    "CABLE_OPERATING_TEMPERATURE",
    "PE_POINT",
    "SOCKET_KINDS",
    "insulating_means",
    "ROLES",
    "CONDUCTOR_KINDS",
    "DEFAULT_CORD",
    "SYSTEMS",
    "EARTHED_LOCALLY",
    "make",
    "from_values",
]

#: the implicit point of the mains inlet's protective-earth terminal
PE_POINT = "mains.pe"

#: points that are a socket's, jack's, pot's or terminal's own ground: fastened to the metal, they
#: are a bond to insulate, never the one to keep
SOCKET_KINDS = ("sleeve", "jack", "pot", "terminal")


def insulating_means(kind: str | None) -> str:
    """How a point of ``kind`` fastened to metal is insulated from it, in words (common practice):
    a socket or jack by an insulated one or shoulder washers; a pot the same, and since its shaft
    is then no longer earthed by the panel, with an insulated shaft or knobs with no metal a
    finger can reach; a tag, lug or stud by an insulating spacer and shoulder washers."""
    if kind in ("sleeve", "jack"):
        return "an insulated socket or shoulder washers"
    if kind == "pot":
        return (
            "an insulated-bushing pot or shoulder washers, and an insulated shaft or knobs with "
            "no metal a finger can reach: the panel no longer earths its shaft"
        )
    return "an insulating spacer and shoulder washers"


XY = tuple[float, float]

#: how a building cable's three cores lie (see :mod:`groundcheck.physics.induction`): flat with the
#: protective core at the side or in the middle, or round (three cores touching)
CABLE_CORES = ("L-N-PE", "L-PE-N", "round")


@dataclass(frozen=True)
class Metal:
    """A metal part: chassis deck, cover, panel, transformer frame, rack ear."""

    name: str
    material: str = "aluminium"
    thickness: float = 1.5e-3
    size: XY | None = None  # width (x) and depth (y), m
    origin: XY = (0.0, 0.0)  # lower-left corner in the plan frame, m
    touchable: bool | None = False  # None when unwritten: settled by the plan's assembly
    location: Location = field(default=Location("<plan>"), compare=False)
    signal_only: bool = False  # holds no mains circuit, cannot become live: no protective bonding
    permeability: float | None = None  # relative, as stated (None: the material's default)

    def contains(self, p: XY, slack: float = 1e-6) -> bool:
        """Whether the plan-frame position ``p`` lies on the part (always true when its size is
        unknown)."""
        if self.size is None:
            return True
        (x0, y0), (w, h) = self.origin, self.size
        return (
            min(x0, x0 + w) - slack <= p[0] <= max(x0, x0 + w) + slack
            and min(y0, y0 + h) - slack <= p[1] <= max(y0, y0 + h) + slack
        )


@dataclass(frozen=True)
class Point:
    """A named junction: stud, star, tag, jack sleeve, pad, capacitor negative ..."""

    name: str
    kind: str = "junction"
    pos: XY | None = None
    on: str | None = None  # the metal part it sits on
    group: str | None = None  # the block placement or device it was placed by (e.g. "left")
    location: Location = field(default=Location("<plan>"), compare=False)


@dataclass(frozen=True)
class Conductor:
    """Anything that carries current between two nodes (points or metal parts).

    ``kind`` is one of :data:`CONDUCTOR_KINDS`; ``role`` one of :data:`ROLES`.
    Geometry that does not apply to a kind is None.
    """

    name: str
    kind: str
    a: str
    b: str
    role: str = SIGNAL
    material: str = "copper"
    length: float | None = None  # m
    area: float | None = None  # m²
    diameter: float | None = None  # m, round conductors (from AWG or area)
    width: float | None = None  # m, traces, bus bars, straps
    thickness: float | None = None  # m, traces, bus bars, straps
    route: tuple[XY, ...] = ()  # waypoints between the two ends
    resistance: float | None = None  # Ω, stated (overrides geometry)
    contact: float | None = None  # Ω, contact resistance (bolts, straps, switches)
    capacitance: float | None = None  # F, lift networks
    #: lift networks: anti-parallel power diodes (or a bridge) across the resistor, rated for a
    #: fault current (GC226)
    diodes: bool = False
    closed: bool = True  # switches
    terminated: str = "both"  # shields: a | b | both
    insulation: str = "pvc"  # pvc | xlpe | bare
    in_cable: bool = True  # a core of a cable (adiabatic k) or a separate conductor
    channel: str | None = None
    balanced: bool = False  # interconnects: balanced (the shield is not the signal return)
    gain: float | None = None  # interconnects: dB from the receiving input to the output
    cmrr: float | None = None  # interconnects, balanced: the input's own common-mode rejection, dB
    location: Location = field(default=Location("<plan>"), compare=False)
    #: interconnects, balanced: source impedance imbalance between the legs, Ω
    imbalance: float | None = None
    #: interconnects, balanced: the input's common-mode impedance per leg, Ω
    common_mode: float = 20e3
    #: cables: (rms A, Hz; 0 = the mains frequency) in line and neutral
    loads: tuple[tuple[float, float], ...] = ()
    cores: str = "round"  # cables: how the cores lie (CABLE_CORES)
    #: cables: the line and neutral cores' area, m², when it differs from the protective core's
    #: (``area``): a twin-and-earth cable's 2.5 mm² beside its 1.5 mm²
    line_area: float | None = None
    #: interconnects: where each end of the shield lands, as stated
    shield_ends: tuple[str, str] | None = None
    bundle: str | None = None  # umbilical cores: the umbilical (multi-core cable) they run in
    length_computed: bool = False  # no length stated: taken along its ends' positions and route
    #: round conductors: the conductor it is twisted with (the pair runs along one line)
    twisted_with: str | None = None

    @property
    def connects(self) -> bool:
        """Whether it joins its two ends electrically (an open switch or a one-end shield does
        not)."""
        if can_open(self) and not self.closed:
            return False
        if shield_like(self) and self.terminated != "both":
            return False
        return True


@dataclass(frozen=True)
class Device:
    """Another plan (or a built-in simple device) placed in an installation under a name.

    ``source`` is a plan file path as written, or ``simple``.  ``plugged`` names the outlet its
    mains cord goes to; ``signal_ground`` (simple devices) is chassis, lift or floating.
    """

    name: str
    source: str
    at: XY = (0.0, 0.0)
    mirror: bool = False
    plugged: str | None = None
    cord_length: float | None = None
    cord_area: float | None = None
    signal_ground: str = "chassis"
    location: Location = field(default=Location("<plan>"), compare=False)
    #: stated protective-conductor (leakage) current at the mains frequency, A
    leakage: float | None = None
    y_capacitance: float | None = None  # stated line-to-chassis capacitance of its mains filter, F
    #: simple devices: I (earthed chassis) or II (no protective conductor)
    equipment_class: str = "I"
    draws: float | None = None  # stated apparent power it draws from its supply, VA
    sockets: str | None = None  # simple devices: "balanced" or "unbalanced" as stated, else None


@dataclass(frozen=True)
class Plan:
    """A whole plan after includes and blocks are expanded and every name is resolved."""

    title: str
    file: str
    mains: Mains | None = None
    ambient: float = 20.0
    listening: Listening | None = None
    metals: tuple[Metal, ...] = ()
    points: tuple[Point, ...] = ()
    conductors: tuple[Conductor, ...] = ()
    rectifiers: tuple[Rectifier, ...] = ()
    currents: tuple[Current, ...] = ()
    heaters: tuple[Heater, ...] = ()
    stages: tuple[Stage, ...] = ()
    fields: tuple[FieldSource, ...] = ()
    files: tuple[str, ...] = ()
    location: Location = field(default=Location("<plan>"), compare=False)
    #: placed devices' (name, V, Hz) from their plans
    device_supplies: tuple[tuple[str, float, float], ...] = ()
    #: '# accept' comments: (file, line, codes, reason, code columns, the element named or None)
    acceptances: tuple[tuple, ...] = ()
    #: the files of placed devices' own plans (and what they include)
    device_files: tuple[str, ...] = ()
    supply: Supply | None = None  # an installation's stated supply
    devices: tuple[Device, ...] = ()  # the devices an installation places
    transformers: tuple = ()  # an installation's (model.installation.Transformer)
    #: placed devices' own plans as loaded, (name, Plan): their protective earth is checked on the
    #: installation's supply
    device_plans: tuple = field(default=(), compare=False, repr=False)

    @property
    def frequency(self) -> float:
        """The mains frequency: the plan's own ``mains``, else the installation's stated
        ``supply``, else that of the devices it places (one installation has one; the loader
        refuses a mixture), else 50 Hz (a plan with none of them describes no mains at all)."""
        if self.mains:
            return self.mains.frequency
        if self.supply:
            return self.supply.frequency
        return self.device_supplies[0][2] if self.device_supplies else 50.0

    @cached_property
    def index(self) -> PlanIndex:
        """The plan's elements by name and the placement each belongs to, built once
        (:class:`~groundcheck.model.index.PlanIndex`)."""
        return PlanIndex(self)

    def metal(self, name: str) -> Metal | None:
        return self.index.metals.get(name)

    def point(self, name: str) -> Point | None:
        return self.index.points.get(name)

    @property
    def channels(self) -> tuple[str, ...]:
        return tuple(sorted({s.channel for s in self.stages}))
