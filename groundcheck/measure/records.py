"""The bench record's types: what a recording measured, how it compares with the plan, which
mechanism the fit
points at, and the bonding measurements.  Plain dataclasses, no numeric library (renderers read
them)."""

from __future__ import annotations

import math
from dataclasses import dataclass, field

__all__ = [
    "Clipping",
    "LineLevel",
    "Measured",
    "HarmonicRow",
    "Suspect",
    "ChannelBench",
    "BondCheck",
    "BenchRecord",
]


@dataclass(frozen=True)
class Clipping:
    """Samples at digital full scale: how many, and the first one's time (s)."""

    samples: int
    first_s: float


@dataclass(frozen=True)
class LineLevel:
    """One harmonic of the mains measured in the recording (rms levels in volts when calibrated,
    else relative to
    the rms of a full-scale sine: dBFS as AES17 counts it)."""

    harmonic: int
    frequency_hz: float
    level: float  # rms
    noise: float  # rms of the noise in the line's own bandwidth (the window's ENBW)
    above_noise: bool  # 6 dB or more above that noise (more with few segments: lines.py)


@dataclass(frozen=True)
class Measured:
    """What one recording holds: its format, the mains frequency found, every harmonic's level,
    the noise."""

    path: str
    rate: int
    channels: int
    channel: int  # 0-based, the channel analysed
    bits: int
    floating: bool
    seconds: float
    segments: int  # averaged spectra
    resolution_hz: float
    mains_hz: float  # found (or stated and refined)
    nominal_hz: float  # 50 or 60 (or as stated)
    detected: bool  # whether a line at the mains or its harmonics stands above the noise
    lines: tuple[LineLevel, ...]
    noise_density: float  # median between the lines, rms per √Hz
    volts_per_unit: (
        float | None
    )  # calibration: volts for 1.0 of digital full scale; None: relative only
    calibration: str  # how the calibration was made, in words
    clipping: Clipping | None
    peak: float  # largest |sample|, full-scale units
    window: str  # the method, in words

    @property
    def calibrated(self) -> bool:
        return self.volts_per_unit is not None


@dataclass(frozen=True)
class HarmonicRow:
    """One harmonic measured against planned (volts, or relative units when not calibrated)."""

    harmonic: int
    frequency_hz: float  # measured
    plan_frequency_hz: float  # the plan's own harmonic
    measured: float
    noise: float
    above_noise: bool
    predicted: float | None  # the plan's worst-case level; None: the plan predicts nothing there
    fitted: float  # the fit's level at this harmonic
    contributors: tuple[str, ...]  # the plan's contributors at this harmonic, largest first
    spl_db: float | None = None
    threshold_db: float | None = None
    unexplained: bool = False  # above the noise and nothing in the plan can make it


@dataclass(frozen=True)
class Suspect:
    """One mechanism of the plan as the fit sees it: its conductors (or loops), the scale the
    recording asks of
    its planned spectrum, and how much of the measured hum it explains."""

    mechanism: str  # in the trade's words
    source: str  # the plan's source group
    members: tuple[
        str, ...
    ]  # "conductor NAME" / "loop N", largest planned first (one shape: not told apart)
    planned: float  # planned level (rms over the harmonics)
    scale: float  # the fit's factor on the planned spectrum (1: as planned)
    explained: float  # its fitted level
    excess: float  # the fitted level above the planned one (0 when at or below)
    share_pct: float  # its fitted power against the measured hum's power

    @property
    def off_db(self) -> float | None:
        """How far the recording puts it from the plan, dB (None: the recording shows none of
        it)."""
        return 20 * math.log10(self.scale) if self.scale > 0 else None


@dataclass
class ChannelBench:
    """A channel's comparison: the table, the fit, what nothing in the plan explains, and the
    verdict."""

    channel: str
    rows: list[HarmonicRow]
    suspects: list[Suspect]
    measured_total: float
    predicted_total: float
    audible: bool | None
    margin_db: float | None
    summary: list[str] = field(default_factory=list)


@dataclass(frozen=True)
class BondCheck:
    """A measured resistance between two named points against the plan's figure and the limit."""

    a: str
    b: str
    measured_ohm: float
    test_current: float | None
    planned_ohm: float | None  # None: the two are not joined in the plan
    limit_ohm: (
        float | None
    )  # the protective bonding limit when the pair is on the protective route
    joints: tuple[
        str, ...
    ]  # the fastenings and conductors on the least-resistance path, joints first
    location: object  # core.errors.Location of the measurement line
    verdict: str  # "as planned", "above plan", "far above plan", "over the limit", "not in plan"


@dataclass
class BenchRecord:
    """Everything the bench command found: the plan, the recording, each channel, the bonds, the
    findings."""

    plan_path: str
    plan_title: str
    measured: Measured | None
    channels: list[ChannelBench]
    bonds: list[BondCheck]
    findings: list  # rules.catalogue.Finding (GC402-GC405)
    notes: list[str]
    cautions: tuple[str, ...]
