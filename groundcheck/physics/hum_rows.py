"""The hum budget's rows as types: a channel's spectrum line, a contributor and a crosstalk line.

Units live in the types (volts in V, levels in dB), not in key suffixes; the JSON writer
(:mod:`groundcheck.renderers.json_results`) names and rounds them.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

from ..core.units import dbv

__all__ = [
    "SpectrumLine",
    "Contributor",
    "CrosstalkLine",
    "FeedbackLine",
    "FieldAxis",
    "PickupLine",
    "SourcePickup",
    "LoopPickup",
]


@dataclass(frozen=True)
class SpectrumLine:
    """One frequency of a channel's hum at its output."""

    frequency: float  # Hz
    volts: float  # V rms, the worst case (every stage's drop in phase) or the signed sum if larger
    volts_signed: float  # V rms, the network's own sum, every stage non-inverting
    spl: float | None = None  # dB SPL at the listener's seat (None: no listening verdict)
    threshold: float | None = None  # dB SPL, the threshold of hearing there

    @property
    def dbv(self) -> float:
        return dbv(self.volts)

    @property
    def margin(self) -> float | None:
        """SPL above the threshold of hearing, dB (positive: audible); None without a verdict."""
        if self.spl is None or self.threshold is None:
            return None
        return self.spl - self.threshold

    @property
    def audible(self) -> bool:
        m = self.margin
        return m is not None and math.isfinite(m) and m > 0


@dataclass
class Contributor:
    """One contributor to a channel's hum: a conductor that carries a source's current to a stage,
    a loop that picks up a field, or a fed stage's supply ripple."""

    kind: str  # "conductor", "loop" or "supply"
    element: str  # the conductor, the loop ("loop 2") or the fed stage
    source: str  # the hum source's name
    volts: float  # V rms at the output, power-summed over frequencies
    share: float  # signed share of the channel's (signed) hum power, %
    #: the conductors in series merged into this row (GC301's runs); empty for one element
    run: tuple[str, ...] = ()
    parts: list = field(default_factory=list)  # the merged rows of a run

    @property
    def dbv(self) -> float:
        return dbv(self.volts)


@dataclass(frozen=True)
class CrosstalkLine:
    """The level one channel's signal puts at another channel's output at one frequency."""

    source: str  # the driving channel (or signal current)
    to: str  # the channel that receives it
    frequency: float  # Hz
    volts: float  # V rms at the receiving output for the rated signal
    db: float  # dB below the rated output (the floor when nothing reaches it)


@dataclass(frozen=True)
class FeedbackLine:
    """What a signal current puts back into its own channel's output at one frequency."""

    source: str  # the signal current
    channel: str
    frequency: float  # Hz
    volts: float  # V rms, every stage of the channel (summed with signs)
    db: float  # dB against the channel's rated output
    input_volts: float  # V rms, the stages that do not end on the current's own points
    input_db: float  # dB against the rated output


@dataclass(frozen=True)
class FieldAxis:
    """One field source's direction for one channel's figures, and the hum it gives there."""

    source: str
    model: str  # "dipole" or "ring"
    axis_stated: str  # the plan's word ("worst" when it states none)
    axis: tuple[float, float, float]  # the unit vector used
    chosen: str  # "stated" or "worst at the output"
    measure: str  # what the worst direction maximises
    level: float  # V rms at the output with the direction used
    worst_axis: tuple[float, float, float]
    worst_level: float  # V rms with the worst direction
    axes: dict  # "x", "y", "z" -> V rms (None: that axis would take a ring through the deck)


@dataclass(frozen=True)
class PickupLine:
    """A loop's pickup from one source at one frequency."""

    frequency: float  # Hz
    emf: float  # V rms around the loop
    current: float  # A rms the EMF drives round the loop


@dataclass(frozen=True)
class SourcePickup:
    """One field source's pickup in one loop."""

    flux_density: float | None  # T, the flux over the loop's area (None: no area)
    closest: float  # m, the loop's closest approach to the source's centre
    height: float  # m, the source's centre above the deck
    axis: tuple[float, float, float]  # the direction of this row
    axis_stated: str
    model: str  # "dipole", "ring" or "two-wire line"
    size: float | None  # m, the source's stated size
    lines: tuple[PickupLine, ...]


@dataclass
class LoopPickup:
    """A ground loop's pickup from every field source."""

    loop: int  # its number in the loop table
    members: list
    closed_by: str
    area: float | None  # m²
    sources: dict = field(default_factory=dict)  # source name -> SourcePickup
