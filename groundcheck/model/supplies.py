"""The plan's supply records: the mains of one piece of equipment, an installation's supply, and
the listening chain where hum ends up.  SI units, as every record of :mod:`.records`."""

from __future__ import annotations

from dataclasses import dataclass, field, replace

from ..core.errors import Location

#: the extra-low-voltage limit, V rms: a supply whose windings stay at or below it needs no
#: protective bond for its outputs (IEC 61140 and IEC 60364-4-41 414, ELV 50 V AC, from memory)
ELV_LIMIT = 50.0


def winding_span(rect, rectifiers) -> float:
    """The rms voltage across the whole winding that feeds a rectifier, end to end: a centre-tapped
    winding's (a full-wave rectifier's, or a bridge's whose centre tap also feeds a rail of the
    other polarity: split ± rails) is twice its half's, ``secondary``.

    Parameters:
        rect: the rectifier record.
        rectifiers: every rectifier of the plan (to find a ± pair on one centre tap).
    Returns:
        the winding's voltage, V rms.
    References:
        common practice (a centre-tapped winding's two halves in series); IEC 61140 reads ELV
        between any two conductors (from memory).
    """
    v = rect.secondary or 0.0
    paired = rect.topology == "bridge" and any(
        o is not rect and o.b == rect.b and o.polarity != rect.polarity for o in rectifiers
    )
    return 2 * v if rect.topology == "full-wave" or paired else v


def elv_fed_high_tension(mains, rectifiers) -> bool:
    """Whether equipment fed at extra-low voltage (its ``mains`` of 50 V or less: a low-voltage
    adapter's) makes a supply above that limit inside (a rectifier whose winding is above it): its
    metal is then held to that supply's return (GC229), and a part nobody wrote as internal is
    touchable.

    Parameters:
        mains: the plan's mains record (None: none).
        rectifiers: its rectifier records.
    Returns:
        True for such equipment.
    References:
        IEC 61140 (extra-low voltage, from memory).
    """
    return (
        mains is not None
        and mains.voltage <= ELV_LIMIT
        and any(winding_span(r, rectifiers) > ELV_LIMIT for r in rectifiers)
    )


__all__ = [
    "Mains",
    "Supply",
    "Listening",
    "SYSTEMS",
    "EARTHED_LOCALLY",
    "DEFAULT_CORD",
    "CABLE_OPERATING_TEMPERATURE",
    "ELV_LIMIT",
    "elv_fed_high_tension",
    "winding_span",
]

XY = tuple[float, float]

#: earthing systems, IEC 60364-1 terms
SYSTEMS = ("TN-S", "TN-C-S", "TT", "IT")

#: the systems whose exposed metal is earthed by the installation's own electrode (IEC 60364-1
#: 312.2.2 and 312.2.3): the electrode's resistance R_A means something only in them
EARTHED_LOCALLY = ("TT", "IT")


#: the mains cord when neither plan nor device says: 2 m of 0.75 mm² (common practice up to 6 A,
#: IEC 60335-1)
DEFAULT_CORD = (2.0, 0.75e-6)
#: °C, PVC's: the fault loop is verified at it (IEC 60364-5-52 T. 52.1)
CABLE_OPERATING_TEMPERATURE = 70.0


#: a device's earth path to the main earthing terminal over this is reported (GC215), Ω: a final
#: circuit's protective conductor of 40 m of 1.5 mm² (about 0.5 Ω) plus a cord — a broken or
#: corroded path, not a long one (common practice)
DEVICE_EARTH_LIMIT = 1.0


@dataclass(frozen=True)
class Mains:
    """The mains supply: nominal voltage U0 (V rms), frequency (Hz), earthing system, protection,
    and the equipment's protection class.  Optional figures left None take the documented defaults
    of :mod:`groundcheck.physics.protection`."""

    voltage: float
    frequency: float
    fuse: float | None = None  # rating, A
    fuse_kind: str = "slow"  # slow | fast | breaker-B | breaker-C | breaker-D
    #: the supply circuit's breaker when the plan states it beside the equipment's fuse: rating,
    #: A, and kind (breaker-B, -C, -D); a fault at the inlet, ahead of the fuse, is cleared by it
    #: alone
    breaker: float | None = None
    breaker_kind: str = "breaker-B"
    fuse_i2t: float | None = None  # let-through I²t, A²s, when the plan states it
    clear_time: float | None = None  # clearing time, s, when the plan states it
    line_area: float | None = None  # line-conductor cross-section, m²
    loop_impedance: float | None = None  # external earth-fault loop impedance Ze at the origin, Ω
    cord_length: float = DEFAULT_CORD[0]  # mains cord, m
    #: mains cord conductor area, m² (default: line_area, else DEFAULT_CORD)
    cord_area: float | None = None
    inlet: XY | None = None
    system: str = "TN-S"  # TN-S | TN-C-S | TT | IT (IEC 60364-1)
    rcd: float | None = None  # rated residual operating current IΔn, A
    circuit_length: float | None = None  # final circuit from the origin to the socket, m
    circuit_area: float | None = None  # its line conductor, m²
    cpc_area: float | None = None  # its circuit protective conductor, m² (default: circuit_area)
    #: a placed device's path through an installation, from the socket it is plugged into to the
    #: origin, in place of ``circuit``: (name, length m, line area m², protective area m²,
    #: flexible) of each conductor in series
    route: tuple[tuple[str, float, float, float, bool], ...] | None = None
    #: the installation's line and protective resistance between its earthing terminal and the
    #: outlet over the route's own (1 on a single path; less where cables run in parallel, a ring)
    route_factors: tuple[float, float] = (1.0, 1.0)
    electrode: float | None = None  # TT, IT: the installation's earth-electrode resistance R_A, Ω
    #: IT: the supply's earth-fault current at a first fault of negligible impedance I_d, A
    first_fault: float | None = None
    equipment_class: str = "I"  # I | II
    breaking: str | None = None  # low | enhanced | high (IEC 60127 categories)
    breaking_current: float | None = None  # stated breaking capacity, A
    fuse_resistance: float | None = None  # stated cold resistance of the fuse, Ω
    #: the rating of the fuse in the mains plug, A (a fused plug's), when the plan states one
    plug_fuse: float | None = None
    #: °C, the installation cables' operating temperature (default 70 °C)
    cable_temperature: float | None = None
    #: A, prospective line-to-neutral short-circuit current at the origin
    short_circuit: float | None = None
    location: Location = field(default=Location("<plan>"), compare=False)

    @property
    def inlet_device(self) -> tuple[float | None, str]:
        """(rating A, kind) of the device that clears a fault at the inlet: the supply circuit's
        breaker when the plan states one beside the equipment's fuse (the fault is ahead of the
        fuse), else the one device stated (rating None when none is)."""
        if self.breaker is not None:
            return self.breaker, self.breaker_kind
        return self.fuse, self.fuse_kind

    @property
    def protective_rating(self) -> float | None:
        """The rating of the overcurrent device ahead of the equipment (A), which the long bonding
        test takes: the plug's fuse when the plan states one and it is the smaller, else the device
        that clears a fault at the inlet (None when none is stated)."""
        rating, _ = self.inlet_device
        if self.plug_fuse is None:
            return rating
        return self.plug_fuse if rating is None else min(rating, self.plug_fuse)

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
    electrode: float | None = None  # TT, IT: the installation's earth-electrode resistance R_A, Ω
    rcd: float | None = None  # the RCD that protects its outlets, rated IΔn, A
    #: IT: the supply's earth-fault current at a first fault I_d, A
    first_fault: float | None = None
    #: the external earth-fault loop impedance Ze at the origin, Ω (TT: through the electrode)
    loop_impedance: float | None = None
    #: the breaker of the final circuits that feed its outlets: rating, A, and curve
    breaker: float | None = None
    breaker_kind: str = "breaker-B"

    def for_device(self, m: Mains | None) -> Mains:
        """A placed device's mains as the installation supplies it: the device's own statement
        (its fuse, cord, circuit) on this supply's earthing system, with this supply's electrode,
        RCD, loop impedance and breaker where it states them (the building's, whatever the
        device's plan assumed). The RCD is the building's alone: a supply that states none has
        none, whatever the device's own plan assumed (a device's plan describes where it was meant
        to be plugged in, not a part of it).

        Parameters:
            m: the device's own mains statement, or None.
        Returns:
            the Mains the device's protective earth is checked with in this installation.
        """
        base = m if m is not None else Mains(self.voltage, self.frequency)
        electrode = self.electrode if self.electrode is not None else base.electrode
        if self.loop_impedance is not None:
            loop = self.loop_impedance
        elif self.system == base.system and self.electrode is None:
            loop = base.loop_impedance
        else:
            loop = None
        if self.system == "TT" and electrode is not None and loop is not None and electrode > loop:
            loop = None  # the device's own loop cannot hold the building's electrode
        placed = replace(
            base,
            system=self.system,
            electrode=electrode if self.system in EARTHED_LOCALLY else None,
            first_fault=(
                (self.first_fault if self.first_fault is not None else base.first_fault)
                if self.system == "IT"
                else None
            ),
            rcd=self.rcd,
            loop_impedance=loop,
        )
        return self._with_breaker(placed)

    def _with_breaker(self, m: Mains) -> Mains:
        """The building's breaker in place of the one a device's plan assumed: beside the device's
        own fuse it clears a fault at the inlet; alone (no fuse stated) it is the one device."""
        if self.breaker is None:
            return m
        if m.breaker is not None or (m.fuse is not None and not m.fuse_kind.startswith("breaker")):
            return replace(m, breaker=self.breaker, breaker_kind=self.breaker_kind)
        return replace(m, fuse=self.breaker, fuse_kind=self.breaker_kind, breaker=None)


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
    #: the room's noise, dB SPL in each third-octave band (flat): it masks hum
    background: float | None = None

    @property
    def verdict(self) -> bool:
        """Whether the chain ends in a transducer of known sensitivity, so that audibility can be
        judged."""
        return self.sensitivity is not None or self.phones is not None
