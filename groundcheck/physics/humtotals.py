"""The hum budget's totals: the frequencies' parts merged per channel (spectrum, worst case and
signed sum, contributors with signed shares), the loops' pickup rows and the crosstalk, and the
result types.

See :mod:`groundcheck.physics.hum` for how the parts are computed and combined.
"""

from __future__ import annotations

import math
from collections import defaultdict
from dataclasses import dataclass, field
from functools import cached_property
from types import SimpleNamespace

import numpy as np

from ..core.units import db_of_ratio, dbv
from .feedback import feedback_rows
from .hearing import heard_threshold, spl_of
from .hum_shares import pooled_shares
from .hum_rows import Contributor, CrosstalkLine, FeedbackLine, LoopPickup, SpectrumLine

__all__ = ["ChannelHum", "HumResult", "Merged", "FLOOR_V", "ROUNDING", "CROSSTALK_FLOOR_DB"]

#: output voltages below this (V) are numerical noise and shown as zero (−240 dBV)
FLOOR_V = 1e-12
#: a spectrum line under this fraction of its channel's largest is rounding, not a figure (−160 dB)
ROUNDING = 1e-8

#: crosstalk is not shown below this (dB)
CROSSTALK_FLOOR_DB = -200.0


@dataclass
class ChannelHum:
    channel: str
    spectrum: list[SpectrumLine]
    total_v: float
    rated_output: float
    contributors: list[Contributor]
    audible: bool | None
    margin_db: float | None  # worst SPL − threshold, dB (positive: audible)
    signed_v: float = 0.0  # the network's own sum, every stage taken as non-inverting
    field_axes: list = field(
        default_factory=list
    )  # per field source: the direction used and the hum it gives
    # each contributor's phasor at the output per frequency: (kind, element, group) -> {Hz: complex
    # V}; the spectra a bench recording is fitted on (not in the JSON: the contributors' rows
    # summarise it)
    lines: dict = field(default_factory=dict)
    # what the figure covers (:func:`groundcheck.physics.supplyhum.coverage`)
    covers: dict = field(default_factory=dict)

    @property
    def total_dbv(self) -> float:
        return dbv(self.total_v)

    @property
    def signed_dbv(self) -> float:
        return dbv(self.signed_v)

    @property
    def spectrum_shown(self) -> list:
        """The lines a report shows as figures: above zero and above :data:`ROUNDING` of the
        largest (a line 160 dB under it is the rounding of a sum that cancels, as a full-wave
        supply's odd harmonics; the JSON keeps every line)."""
        top = max((r.volts for r in self.spectrum), default=0.0)
        return [r for r in self.spectrum if r.volts > 0 and r.volts > ROUNDING * top]

    def heard_alone(self, kind: str, elements: tuple[str, ...], source: str) -> float | None:
        """How far a contributor alone (the lines of ``elements`` of ``kind`` from ``source``,
        added as phasors per frequency) is above the threshold of hearing at the listener's seat,
        dB at its worst line (positive: heard on its own, whatever the rest); None without a
        verdict.  A line's level at the seat moves with 20·log10 of its voltage, so each line's
        margin is the channel's at that frequency plus its ratio to the channel's line."""
        rows = {r.frequency: r for r in self.spectrum}
        per_f: dict = {}
        for name in elements:
            for lines in self._lines_of.get((kind, name, source), ()):
                for f, v in lines.items():
                    per_f[f] = per_f.get(f, 0) + v
        worst = None
        for f, v in per_f.items():
            r = rows.get(f)
            if r is None or r.spl is None or r.threshold is None or r.volts <= 0 or abs(v) <= 0:
                continue
            if not math.isfinite(r.spl):
                continue
            m = r.spl - r.threshold + db_of_ratio(abs(v) / r.volts)
            worst = m if worst is None else max(worst, m)
        return worst

    @cached_property
    def _lines_of(self) -> dict:
        """Each contributor's lines by (kind, element, source): a group's prefix dropped, as the
        contributors' rows name their source."""
        out: dict = {}
        for (kind, name, group), lines in self.lines.items():
            out.setdefault((kind, name, group.split(":", 1)[-1]), []).append(lines)
        return out

    @property
    def signal_to_hum(self) -> float:
        return math.inf if self.total_v <= 0 else db_of_ratio(self.rated_output / self.total_v)


@dataclass
class HumResult:
    channels: dict[str, ChannelHum]
    rectifiers: list
    loops: list[LoopPickup]
    crosstalk: list[CrosstalkLine]
    frequencies: list[float]
    network: list[dict] = field(default_factory=list)  # per source: conductor currents and drops
    notes: list[str] = field(default_factory=list)
    probes: dict = field(
        default_factory=dict
    )  # frequency -> power sum over the sources of each probe pair, V²
    # channel -> source group -> its worst-case level at the output, V: per frequency the larger of
    # its stages' drops added in magnitude and its signed sum, power-summed over frequencies
    # ('rectifier charging' or 'KIND:NAME', as in the contributors)
    levels: dict = field(default_factory=dict)
    # per signal current and frequency: its own channel's stages reading it (physics/feedback.py)
    feedback: list[FeedbackLine] = field(default_factory=list)


class Merged:
    """The frequencies' parts merged in ascending order: per channel, per frequency, group ->
    phasor at the output."""

    def __init__(self, b):  # the budget of groundcheck.physics.hum
        self.b = b
        self.out = {ch: defaultdict(lambda: defaultdict(complex)) for ch in b.channels}
        self.contrib = {
            ch: defaultdict(lambda: defaultdict(complex)) for ch in b.channels
        }  # (label) -> f -> phasor
        self.loop_rows: dict[int, LoopPickup] = {}
        self.network_rows: list[dict] = []
        self.probes: dict = {}
        self.probe_leak: dict = {}
        self.crosstalk_raw = defaultdict(complex)
        self.feedback_raw: dict = {}
        self.in_phase = {ch: defaultdict(lambda: defaultdict(float)) for ch in b.channels}
        self.pickup: dict = {}  # frequency -> the loops' drops and currents per unit flux
        self.stage_drops: dict = {}  # frequency -> group -> each stage's drop (phasors), V
        self.pooled: dict = {}  # frequency -> group -> its sources' branch drops summed, V
        self.tests: dict = {}  # frequency -> the channels' test currents in each branch

    def add(self, f: float, part) -> None:
        for ch, group, mag in part.in_phase:
            self.in_phase[ch][f][group] += mag
        at = self.stage_drops.setdefault(f, {})
        for g, v in part.stage_drops.items():  # a frequency's sources may come in several parts
            at[g] = at[g] + v if g in at else v
        pooled = self.pooled.setdefault(f, {}) if part.pooled else {}
        for g, z in part.pooled.items():
            pooled[g] = pooled[g] + z if g in pooled else z
        if part.tests is not None:
            self.tests[f] = part.tests
        self.network_rows.extend(part.network)
        if part.probes is not None:
            self.probes[f] = self.probes.get(f, 0.0) + part.probes
        if part.probe_leak is not None:
            self.probe_leak[f] = self.probe_leak.get(f, 0.0) + part.probe_leak
        if part.pickup is not None:
            self.pickup[f] = part.pickup
        for src_ch, dst_ch, v in part.crosstalk:
            self.crosstalk_raw[(src_ch, dst_ch, f)] += v
        for name, ch, total, ahead in part.feedback:
            self.feedback_raw[(name, ch, f)] = (total, ahead)

    def fold(self) -> None:
        """Each source group's output and conductor shares (:func:`pooled_shares`), and each
        stage's drop from each group into the worst case (every stage in phase: Σ over a
        channel's stages of |drop|), once every part is in."""
        for f, pooled in self.pooled.items():
            sink = SimpleNamespace(out=[], contrib=[])
            pooled_shares(self.b, pooled, self.tests[f], sink)
            for ch, group, v in sink.out:
                self.out[ch][f][group] += v
            for ch, label, v in sink.contrib:
                self.contrib[ch][label][f] += v
        self.pooled = {}
        for f, groups in self.stage_drops.items():
            for ci, ch in enumerate(self.b.channels):
                rows = self.b.stage_channel == ci
                for g, v in groups.items():
                    self.in_phase[ch][f][g] += float(np.abs(v[rows]).sum())
        self.stage_drops = {}

    def channel(self, ch: str, axes=()) -> ChannelHum:
        """A channel's spectrum (power sum of its groups per frequency), total, contributors and
        verdict; ``axes``: each field source's direction for the channel
        (:func:`groundcheck.physics.fieldhum.field_pickup`)."""
        listening = self.b.listening_of(ch)
        spectrum = []
        total2 = signed2 = 0.0
        worst = None
        for f in self.b.freqs:
            groups = self.out[ch].get(f, {})
            v = math.sqrt(sum(abs(p) ** 2 for p in groups.values()))
            v = v if v >= FLOOR_V else 0.0
            signed = v
            w = math.sqrt(sum(x * x for x in self.in_phase[ch].get(f, {}).values()))
            v = (
                max(w, signed) if w >= FLOOR_V else signed
            )  # the worst case: every stage's drop in phase
            total2 += v * v
            signed2 += signed * signed
            spl = thr = None
            if listening is not None and listening.verdict:
                spl = spl_of(v, listening)
                thr = heard_threshold(f, listening.background)
                if math.isfinite(spl) and (worst is None or spl - thr > worst):
                    worst = spl - thr
            spectrum.append(SpectrumLine(f, v, signed, spl, thr))
        total = math.sqrt(total2)
        clist = self._contributors(ch)
        audible = None if worst is None else worst > 0
        if listening is not None and listening.verdict and worst is None:
            audible, worst = False, None
        lines = {
            (kind, name, group): dict(per_f)
            for (kind, name, group), per_f in self.contrib[ch].items()
        }
        return ChannelHum(
            ch,
            spectrum,
            total,
            listening.rated_output if listening is not None else self.b.rated,
            clist,
            audible,
            worst,
            math.sqrt(signed2),
            list(axes),
            lines,
        )

    def probe_powers(self) -> dict:
        """Per frequency, each probe pair's Σ |V_a − V_b|² over the source groups: every source
        alone but the leakage currents, which add as phasors first (in phase, one mains line)."""
        out = dict(self.probes)
        for f, v in self.probe_leak.items():
            out[f] = out.get(f, 0.0) + np.abs(v) ** 2
        return out

    def levels(self) -> dict:
        """Each source group's worst-case level at each channel's output, V (see
        :attr:`HumResult.levels`); a group below FLOOR_V is left out, as a contributor is: a
        source that reaches a channel in no conductor leaves rounding noise there (1e-22 V or
        so), which one writing of the plan gives and another gives as an exact zero."""
        out: dict = {}
        for ch in self.b.channels:
            power: dict = defaultdict(float)
            for f in self.b.freqs:
                signed, worst = self.out[ch].get(f, {}), self.in_phase[ch].get(f, {})
                for group in signed.keys() | worst.keys():
                    power[group] += max(abs(signed.get(group, 0.0)), worst.get(group, 0.0)) ** 2
            out[ch] = {g: math.sqrt(p) for g, p in power.items() if math.sqrt(p) >= FLOOR_V}
        return out

    def _contributors(self, ch: str) -> list[Contributor]:
        """The channel's contributors with their level and their signed share of the channel's
        (signed) hum power: the projection of each one's phasors on its group's total, so that the
        shares add up to 100 % and a contribution that cancels part of the others has a negative
        share."""
        clist = []
        out = self.out[ch]
        sqrt = math.sqrt
        for (kind, name, group), per_f in self.contrib[ch].items():
            # the sums written out (most contributors have one or two frequencies; the same
            # arithmetic as sum())
            power = proj = 0.0
            for f, p in per_f.items():
                power += abs(p) ** 2
                proj += (p * out[f][group].conjugate()).real
            lvl = sqrt(power)
            if lvl < FLOOR_V:
                continue
            clist.append(Contributor(kind, name, group.split(":", 1)[-1], lvl, proj))
        total = sum(abs(p) ** 2 for groups in out.values() for p in groups.values()) or 1.0
        for c in clist:
            # unrounded (the JSON writer rounds): a run's pieces are summed, and GC301's tenth is a
            # threshold, which a rounded share meets or misses by its last digit
            share = 100 * c.share / total  # (the projection until here)
            c.share = share if abs(share) >= 0.05 else 0.0
        clist.sort(key=lambda c: (-c.volts, c.element))
        if any(c.share < 0 for c in clist):
            self.b.notes.append(
                f"in {ch}, some contributions have negative shares: their drops oppose the "
                "others' along the stage's path and cancel part of them"
            )
        return clist

    def feedback(self) -> list[FeedbackLine]:
        def rated(ch: str) -> float:  # each channel against its own chain's rated output
            listening = self.b.listening_of(ch)
            return listening.rated_output if listening else self.b.rated

        return feedback_rows(self.feedback_raw, rated)

    def crosstalk(self) -> list[CrosstalkLine]:
        rated = self.b.rated
        out = []
        for (src_ch, dst_ch, f), v in sorted(
            self.crosstalk_raw.items(), key=lambda kv: (str(kv[0][0]), kv[0][1], kv[0][2])
        ):
            level = float(abs(v))
            db = (
                max(CROSSTALK_FLOOR_DB, db_of_ratio(level / rated))
                if level > 0
                else CROSSTALK_FLOOR_DB
            )
            out.append(CrosstalkLine(src_ch, dst_ch, f, level, db))
        return out
