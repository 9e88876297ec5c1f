"""The plan model: immutable records of everything a ground wiring plan holds.

All quantities are SI (m, m², Ω, A, V, Hz, T, F, s), temperatures in °C,
positions in metres in one plan-wide frame (x to the right, y away from the
front panel, looking down on the chassis).  Every record keeps the
:class:`~groundcheck.core.errors.Location` of the statement that made it.
"""

from __future__ import annotations

from dataclasses import MISSING, dataclass, field, fields

from ..core.errors import Location
from .kinds import CONDUCTOR_KINDS, RETURN, ROLES, SIGNAL, can_open, shield_like

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
    "PE_POINT",
    "ROLES",
    "CONDUCTOR_KINDS",
    "DEFAULT_CORD",
    "SYSTEMS",
    "make",
    "from_values",
]

#: the implicit point of the mains inlet's protective-earth terminal
PE_POINT = "mains.pe"

XY = tuple[float, float]

#: earthing systems, IEC 60364-1 terms
SYSTEMS = ("TN-S", "TN-C-S", "TT")

#: the mains cord when neither plan nor device says: 2 m of 0.75 mm² (common practice up to 6 A,
#: IEC 60335-1)
DEFAULT_CORD = (2.0, 0.75e-6)
CABLE_OPERATING_TEMPERATURE = (
    70.0  # °C, PVC's: the fault loop is verified at it (IEC 60364-5-52 T. 52.1)
)


@dataclass(frozen=True)
class Mains:
    """The mains supply: nominal voltage U0 (V rms), frequency (Hz), earthing system, protection,
    and the equipment's protection class.  Optional figures left None take the documented defaults
    of :mod:`groundcheck.physics.protection`."""

    voltage: float
    frequency: float
    fuse: float | None = None  # rating, A
    fuse_kind: str = "slow"  # slow | fast | breaker-B | breaker-C | breaker-D
    fuse_i2t: float | None = None  # let-through I²t, A²s, when the plan states it
    clear_time: float | None = None  # clearing time, s, when the plan states it
    line_area: float | None = None  # line-conductor cross-section, m²
    loop_impedance: float | None = None  # external earth-fault loop impedance Ze at the origin, Ω
    cord_length: float = DEFAULT_CORD[0]  # mains cord, m
    cord_area: float | None = (
        None  # mains cord conductor area, m² (default: line_area, else DEFAULT_CORD)
    )
    inlet: XY | None = None
    system: str = "TN-S"  # TN-S | TN-C-S | TT (IEC 60364-1)
    rcd: float | None = None  # rated residual operating current IΔn, A
    circuit_length: float | None = None  # final circuit from the origin to the socket, m
    circuit_area: float | None = None  # its line conductor, m²
    cpc_area: float | None = None  # its circuit protective conductor, m² (default: circuit_area)
    electrode: float | None = None  # TT: the installation's earth-electrode resistance R_A, Ω
    equipment_class: str = "I"  # I | II
    breaking: str | None = None  # low | enhanced | high (IEC 60127 categories)
    breaking_current: float | None = None  # stated breaking capacity, A
    fuse_resistance: float | None = None  # stated cold resistance of the fuse, Ω
    cable_temperature: float | None = (
        None  # °C, the installation cables' operating temperature (default 70 °C)
    )
    short_circuit: float | None = (
        None  # A, prospective line-to-neutral short-circuit current at the origin
    )
    location: Location = field(default=Location("<plan>"), compare=False)

    @property
    def cord_section(self) -> float:
        """The cord's conductor area, m²: stated, else the line conductor's, else the default
        cord's."""
        return self.cord_area or self.line_area or DEFAULT_CORD[1]


@dataclass(frozen=True)
class Supply:
    """An installation's supply (the building's mains): nominal voltage U0 (V rms), frequency (Hz)
    and earthing system.  Devices placed in the installation take it unless their own plan states a
    ``mains``."""

    voltage: float
    frequency: float
    system: str = "TN-S"
    location: Location = field(default=Location("<plan>"), compare=False)


#: how a building cable's three cores lie (see :mod:`groundcheck.physics.induction`): flat with the
#: protective core at the side or in the middle, or round (three cores touching)
CABLE_CORES = ("L-N-PE", "L-PE-N", "round")


@dataclass(frozen=True)
class Listening:
    """Where the hum ends up: rated output level (V rms at the plan's output) and the chain after
    it."""

    rated_output: float = 1.0  # V rms at the plan's output for full signal
    amp_gain: float = 0.0  # dB voltage gain from the plan's output to the speaker
    sensitivity: float | None = None  # dB SPL at 1 W, 1 m
    impedance: float = 8.0  # speaker (or headphone) nominal impedance, Ω
    distance: float = 3.0  # listening distance, m
    location: Location = field(default=Location("<plan>"), compare=False)
    speakers: int = 1  # speakers playing the channel's hum, coherent at hum frequencies
    room_gain: float = 0.0  # dB added by the room at the seat
    phones: float | None = None  # headphone sensitivity, dB SPL per mW or per V (phones_per)
    phones_per: str = "mW"
    background: float | None = (
        None  # the room's noise, dB SPL in each third-octave band (flat): it masks hum
    )

    @property
    def verdict(self) -> bool:
        """Whether the chain ends in a transducer of known sensitivity, so that audibility can be
        judged."""
        return self.sensitivity is not None or self.phones is not None


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
    closed: bool = True  # switches
    terminated: str = "both"  # shields: a | b | both
    insulation: str = "pvc"  # pvc | xlpe | bare
    in_cable: bool = True  # a core of a cable (adiabatic k) or a separate conductor
    channel: str | None = None
    balanced: bool = False  # interconnects: balanced (the shield is not the signal return)
    gain: float | None = None  # interconnects: dB from the receiving input to the output
    cmrr: float | None = None  # interconnects, balanced: the input's own common-mode rejection, dB
    location: Location = field(default=Location("<plan>"), compare=False)
    imbalance: float | None = (
        None  # interconnects, balanced: source impedance imbalance between the legs, Ω
    )
    common_mode: float = (
        20e3  # interconnects, balanced: the input's common-mode impedance per leg, Ω
    )
    loads: tuple[
        tuple[float, float], ...
    ] = ()  # cables: (rms A, Hz; 0 = the mains frequency) in line and neutral
    cores: str = "round"  # cables: how the cores lie (CABLE_CORES)
    shield_ends: tuple[str, str] | None = (
        None  # interconnects: where each end of the shield lands, as stated
    )
    bundle: str | None = None  # umbilical cores: the umbilical (multi-core cable) they run in
    length_computed: bool = False  # no length stated: taken along its ends' positions and route

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
class Rectifier:
    """A capacitor-input rectifier whose charging current returns from ``a`` to ``b``.

    topology: ``full-wave`` (centre-tapped secondary, one diode drop), ``bridge``
    (two diode drops) or ``half-wave``.  ``secondary`` is the rms voltage of
    the (half-)winding, ``winding`` the series resistance of winding and diode.
    """

    name: str
    a: str
    b: str
    topology: str = "full-wave"
    secondary: float = 250.0
    winding: float = 50.0
    diode_drop: float = 0.7
    capacitance: float = 47e-6
    load_current: float | None = None
    load_resistance: float | None = None
    channel: str | None = None
    location: Location = field(default=Location("<plan>"), compare=False)
    diode_law: str = (
        "constant"  # constant (diode_drop per diode), shockley (exponential, with Rs) or valve
    )
    valve_drop: float = (
        50.0  # valve rectifiers: the drop (V) at valve_current (A), Child's law between
    )
    valve_current: float = 0.25
    leakage: float = 0.0  # transformer leakage inductance per conducting (half-)winding, H
    filter_resistance: float = 0.0  # a filter section after the reservoir: series resistance, Ω
    filter_inductance: float = 0.0  # ... series inductance (a choke), H
    filter_capacitance: float | None = None  # ... its capacitor, F (None: no filter section)
    filter_point: str | None = None  # ... the point its capacitor's negative lands on


@dataclass(frozen=True)
class Current:
    """A stated current flowing in the ground system from ``a`` to ``b``.

    ``parts`` are (rms amperes, hertz) pairs; 0 Hz is DC.  ``role``: return, load, heater,
    leakage, or signal (an output stage's signal return, used for crosstalk).
    """

    name: str
    a: str
    b: str
    parts: tuple[tuple[float, float], ...] = ()
    role: str = RETURN
    channel: str | None = None
    location: Location = field(default=Location("<plan>"), compare=False)


@dataclass(frozen=True)
class Heater:
    """A valve heater supply: its current, AC or DC, and how it is referenced to ground."""

    name: str
    current: float
    ac: bool = True
    reference: str | None = None  # point the heater supply is referenced at
    a: str | None = None  # when its return flows in the ground system: from a ...
    b: str | None = None  # ... to b
    location: Location = field(default=Location("<plan>"), compare=False)
    route: tuple[XY, ...] = ()  # the heater pair's centre line on the deck (AC: a field source)
    spacing: float | None = None  # the distance between the pair's two wires, m
    wiring_height: float | None = None  # the pair's height above the deck, m
    twisted: bool = False  # a twisted pair: no field source


@dataclass(frozen=True)
class Stage:
    """An amplifying stage that sees the voltage between ``a`` and ``b`` as signal."""

    name: str
    a: str
    b: str
    gain: float = 0.0  # dB, from the pair to the output
    channel: str = "main"
    location: Location = field(default=Location("<plan>"), compare=False)
    across: str | None = (
        None  # an interconnect's input: the shield whose transfer impedance it reads
    )
    reference: str | None = None  # the input's reference (its sleeve): stated or inferred
    named: str | None = None  # with a reference (then a): the first point written


@dataclass(frozen=True)
class FieldSource:
    """A source of stray magnetic field: flux density ``b_ref`` (T rms) at ``r_ref`` (m) on its
    equator, its centre ``height`` (m) above the chassis plane, its axis x, y, z or worst, and its
    size (m) when stated."""

    name: str
    kind: str
    pos: XY
    b_ref: float
    r_ref: float
    harmonics: tuple[tuple[int, float], ...] = ()  # (harmonic number, fraction of the fundamental)
    height: float = 0.0
    axis: str = "worst"
    size: float | None = None
    route: tuple[XY, ...] = ()  # an AC heater pair taken as a source: its centre line
    location: Location = field(default=Location("<plan>"), compare=False)


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
    leakage: float | None = (
        None  # stated protective-conductor (leakage) current at the mains frequency, A
    )
    y_capacitance: float | None = None  # stated line-to-chassis capacitance of its mains filter, F
    equipment_class: str = (
        "I"  # simple devices: I (earthed chassis) or II (no protective conductor)
    )
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
    device_supplies: tuple[
        tuple[str, float, float], ...
    ] = ()  # placed devices' (name, V, Hz) from their plans
    acceptances: tuple[tuple, ...] = ()  # '# accept' comments: (file, line, codes, reason, code
    #                                       columns, the element named or None)
    device_files: tuple[
        str, ...
    ] = ()  # the files of placed devices' own plans (and what they include)
    supply: Supply | None = None  # an installation's stated supply
    devices: tuple[Device, ...] = ()  # the devices an installation places
    transformers: tuple = ()  # an installation's (model.installation.Transformer)

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

    def metal(self, name: str) -> Metal | None:
        return next((m for m in self.metals if m.name == name), None)

    def point(self, name: str) -> Point | None:
        return next((p for p in self.points if p.name == name), None)

    @property
    def channels(self) -> tuple[str, ...]:
        return tuple(sorted({s.channel for s in self.stages}))


_LAYOUT: dict[type, tuple[dict, frozenset]] = {}


def make(cls, **values):
    """``cls(**values)`` for a record class of this module, built without the generated
    ``__init__``.

    A frozen dataclass's ``__init__`` sets each of its fields through ``object.__setattr__``; for
    the twenty-odd fields of a :class:`Conductor` that is most of the cost of loading a large
    plan's wires. This fills the instance's ``__dict__`` with the defaults and the given values in
    one step: the same record (equal, and equally immutable afterwards), about four times faster.
    Unknown or missing fields raise :class:`TypeError` as the constructor would.  None of the
    records has ``__post_init__``.
    """
    layout = _LAYOUT.get(cls)
    if layout is None:
        fs = fields(cls)
        defaults = {f.name: f.default for f in fs if f.default is not MISSING}
        factories = any(f.default_factory is not MISSING for f in fs)
        layout = _LAYOUT[cls] = (defaults, frozenset(f.name for f in fs), factories)
    defaults, names, factories = layout
    if factories or not names.issuperset(values) or not values.keys() >= names - defaults.keys():
        return cls(**values)  # fresh default objects, or let the constructor name the bad field
    obj = object.__new__(cls)
    d = obj.__dict__
    d.update(defaults)
    d.update(values)
    return obj


def from_values(cls, names: tuple[str, ...], values: tuple):
    """A record of ``cls`` from the value of every field, ``names`` being all its fields in order.

    The bulk counterpart of :func:`make` for records sent back by a worker process
    (:mod:`groundcheck.language.bigfile`): nothing is defaulted or checked, as the values came from
    a record.
    """
    obj = object.__new__(cls)
    obj.__dict__.update(zip(names, values))
    return obj
