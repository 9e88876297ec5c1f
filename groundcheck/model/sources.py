"""The plan's sources and receivers: rectifiers and stated currents that drive current through the
ground system, valve heaters, amplifying stages that read a voltage as signal, and sources of stray
magnetic field.  SI units, as every record of :mod:`.records`."""

from __future__ import annotations

from dataclasses import dataclass, field

from ..core.errors import Location
from .kinds import RETURN

__all__ = ["Rectifier", "Current", "Heater", "Stage", "FieldSource"]

XY = tuple[float, float]


@dataclass(frozen=True)
class Rectifier:
    """A capacitor-input or choke-input rectifier whose charging current returns from ``a`` to
    ``b`` (a negative rail's from ``b`` to ``a``).

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
    #: constant (diode_drop per diode), shockley (exponential, with Rs) or valve
    diode_law: str = "constant"
    #: valve rectifiers: the drop (V) at valve_current (A), Child's law between
    valve_drop: float = 50.0
    valve_current: float = 0.25
    leakage: float = 0.0  # transformer leakage inductance per conducting (half-)winding, H
    filter_resistance: float = 0.0  # a filter section after the reservoir: series resistance, Ω
    filter_inductance: float = 0.0  # ... series inductance (a choke), H
    filter_capacitance: float | None = None  # ... its capacitor, F (None: no filter section)
    filter_point: str | None = None  # ... the point its capacitor's negative lands on
    #: a regulator after the reservoir: series (a pass element passing the load current) or shunt
    #: (a feed resistor into a shunt element holding the output); None: no regulator
    regulator: str | None = None
    regulator_voltage: float = 0.0  # its regulated output, V
    regulator_resistance: float = 0.0  # a shunt regulator's feed resistor, Ω
    regulator_point: str | None = None  # the point its load's (and shunt's) current returns by
    regulator_rejection: float | None = None  # its ripple rejection, dB (None: the default)
    #: a series regulator's dropout: the least drop across its pass element that keeps it
    #: regulating, V (0: none stated)
    regulator_dropout: float = 0.0
    #: a series regulator's quiescent current (drawn from the reservoir beside the load's and
    #: returned with it through its point), or a shunt element's least current for regulation, A
    regulator_quiescent: float = 0.0
    #: a choke between the rectifiers and the reservoir (choke input): its inductance, H (0: none)
    choke_inductance: float = 0.0
    choke_resistance: float = 0.0  # ... its winding's resistance, Ω
    #: positive (a rail above the reservoir's ground end) or negative (below it: the diodes turned
    #: round, the charging current flowing the other way round the ground system)
    polarity: str = "positive"


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
    #: the valve rectifier whose filament (its cathode) this winding heats: it sits at that
    #: rectifier's HT and is never referenced to ground
    rectifier: str | None = None


@dataclass(frozen=True)
class Stage:
    """An amplifying stage that sees the voltage between ``a`` and ``b`` as signal."""

    name: str
    a: str
    b: str
    gain: float = 0.0  # dB, from the pair to the output
    channel: str = "main"
    location: Location = field(default=Location("<plan>"), compare=False)
    #: an interconnect's input: the shield whose transfer impedance it reads
    across: str | None = None
    reference: str | None = None  # the input's reference (its sleeve): stated or inferred
    named: str | None = None  # with a reference (then a): the first point written
    inferred: bool = False  # the reference was inferred (a socket wired to the point written)
    supply: str | None = None  # the rectifier whose rail feeds it, when stated
    supply_tap: str = "output"  # output: the rail its load is fed from; reservoir: the reservoir
    supply_rejection: float = 0.0  # its supply rejection, dB, referred to its input


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
