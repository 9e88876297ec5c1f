"""The hum budget's rows as types: a channel's spectrum line, a contributor and a crosstalk line.

Units live in the types (volts in V, levels in dB), not in key suffixes; the JSON writer
(:mod:`groundcheck.renderers.json_results`) names and rounds them.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

from ..core.units import dbv

__all__ = ["SpectrumLine", "Contributor", "CrosstalkLine"]


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
