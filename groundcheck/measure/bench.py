"""The bench record: a recording and bonding measurements compared with the plan's analysis.

``bench_record`` is a pure function of the plan's :class:`~groundcheck.rules.results.Result`, the
measured
recording (:func:`groundcheck.measure.lines.measure`) and the measurements; it returns a
:class:`~groundcheck.measure.records.BenchRecord` that the renderers show.
"""

from __future__ import annotations

import math
from dataclasses import replace

import numpy as np

from ..core.caution import CAUTION
from ..core.errors import Location
from ..core.units import db_of_ratio, dbv
from ..physics.hearing import heard_threshold, spl_of
from ..physics.sources import LEAKAGE_GROUP
from ..rules.bench import HUM_MARGIN_DB, BenchFacts, MeasuredHum, bond_verdict
from ..rules.registry import functions
from .fit import fit, mechanisms
from .records import BenchRecord, BondCheck, ChannelBench, HarmonicRow, Measured

__all__ = ["bench_record", "mechanism_words", "BENCH_CAUTIONS", "pick_channel"]

#: what every bench output says before anything else (the issue's cautions, in our words)
BENCH_CAUTIONS = (
    CAUTION,
    "Measuring mains equipment is dangerous: the chassis, the output and the recording interface "
    "can be at lethal voltages if anything is faulty. Keep the protective earth connected at all "
    "times.",
    "Record the output through an attenuator or a measurement interface rated for it, with the "
    "amplifier's inputs shorted (a shorting plug) and its volume at the setting under test; never "
    "connect an interface to the speaker outputs of a valve amplifier without its rated load on "
    "them (an unloaded output transformer can arc over), and never bridge an output's negative "
    "terminal to the interface's ground.",
    "These comparisons and the bonding verdicts are aids, not a safety test: follow your local "
    "electrical code and licensed practice, and have the equipment's protective earth tested by a "
    "qualified person.",
)

#: the fitted scale beyond which a mechanism is named off the plan (6 dB), and the one below
#: which it is absent
OFF = 2.0
ABSENT = 0.25
#: within ±3 dB of the plan a mechanism matches it
MATCH = (10 ** (-3 / 20), 10 ** (3 / 20))


def mechanism_words(group: str, plan) -> str:
    """A source group of the hum budget as the trade names the mechanism.

    Parameters:
        group: 'rectifier charging', 'field:NAME', 'heater:NAME', 'current:NAME', 'induced:NAME'
        ...
        plan: the plan (for a field source's kind).
    Returns:
        the mechanism in words.
    References:
        common practice (the trade's names for hum mechanisms).
    """
    kind, _, name = group.partition(":")
    if group == "rectifier charging":
        return (
            "charging current in a shared return (twice the mains and its harmonics, a buzzy "
            "upper series)"
        )
    if kind == "field":
        src = plan.index.fields.get(name)
        if src is None or name.endswith(".wiring"):
            return "the heater wiring's field in a ground loop (the mains frequency)"
        return (
            f"magnetic pickup of the {src.kind} {name}'s field in a ground loop (the mains and "
            "its odd harmonics)"
        )
    if group == LEAKAGE_GROUP:
        return (
            "leakage currents of the equipment's mains filters and windings returning through "
            "the ground system (the mains frequency, all in phase)"
        )
    if kind == "heater":
        return f"heater current of {name} in a shared return (the mains frequency)"
    if kind == "induced":
        return f"current induced along a mains cable's protective core ({name})"
    if kind in ("current", "signal"):
        return f"the current {name} in a shared conductor"
    return group


def pick_channel(result, wanted: str | None) -> str:
    """The plan's channel a recording is of: the one named, or the plan's only one.

    Parameters:
        result: the plan's analysis.
        wanted: the channel named on the command line, or None.
    Returns:
        the channel's name; ValueError with the channels to choose from.
    References:
        none (bookkeeping).
    """
    chans = sorted(result.hum.channels) if result.hum is not None else []
    if not chans:
        raise ValueError(
            "the plan has no stage, so no channel's hum to compare (write its stages)"
        )
    if wanted is None:
        if len(chans) == 1:
            return chans[0]
        raise ValueError(
            f"the plan has channels {', '.join(chans)}: say which the recording is of (--channel)"
        )
    if wanted not in chans:
        raise ValueError(f"the plan has no channel {wanted!r}; its channels: {', '.join(chans)}")
    return wanted


def _rows(meas: Measured, hum, plan_f0: float, fitted, lines, listening) -> list[HarmonicRow]:
    predicted = {row.frequency: row.volts for row in hum.spectrum}
    rows = []
    for i, ln in enumerate(meas.lines):
        pf = ln.harmonic * plan_f0
        at_f = sorted(((abs(per_f.get(pf, 0)), lab) for lab, per_f in lines.items()), reverse=True)
        names = tuple(lab[1] for v, lab in at_f if at_f and v > 0.01 * at_f[0][0] and v > 1e-15)[
            :3
        ]
        spl = thr = None
        if meas.calibrated and listening is not None and listening.verdict and ln.above_noise:
            spl, thr = (
                spl_of(ln.level, listening),
                heard_threshold(ln.frequency_hz, listening.background),
            )
        pv = predicted.get(pf)
        # a line the plan predicts within 20 dB is the plan's, whatever scale the fit settled on
        # (the fit weighs every harmonic: lines the plan predicts and the recording lacks pull a
        # mechanism's scale down, which says the shape differs, not that nothing makes the line)
        unexplained = (
            ln.above_noise and float(fitted[i]) < ln.level / 2 and (pv or 0.0) < ln.level / 10
        )
        rows.append(
            HarmonicRow(
                ln.harmonic,
                ln.frequency_hz,
                pf,
                ln.level,
                ln.noise,
                ln.above_noise,
                pv if pv else None,
                float(fitted[i]),
                names,
                spl,
                thr,
                unexplained,
            )
        )
    return rows


def _member(result, label: str) -> str:
    """A loop's label with what closes it and where the plan would open it."""
    if not label.startswith("loop "):
        return label
    try:
        info = result.loops[int(label.split()[1]) - 1]
    except (ValueError, IndexError):
        return label
    return f"{label} (closed by {info.closed_by}; opened at {info.open_at})"


def _dbs(x: float) -> str:
    return f"{round(db_of_ratio(x), 1) + 0.0:+.1f} dB"  # + 0.0: never "-0.0"


#: a planned line this many times the recording's noise (20 dB) that the recording lacks is said
MISSING = 10.0


def _summary(rows: list[HarmonicRow], suspects, calibrated: bool) -> list[str]:
    out = []
    for s in suspects:
        who = s.members[0] + (
            f" (or {', '.join(s.members[1:3])}: the recording cannot tell them apart)"
            if len(s.members) > 1
            else ""
        )
        if not calibrated:
            if s.explained > 0:
                out.append(
                    f"the shape matches {s.mechanism}: {who} (not calibrated: how far from the "
                    "plan is not known)"
                )
            continue
        if s.scale >= OFF:
            out.append(f"{s.mechanism}: {_dbs(s.scale)} against the plan — suspect {who}")
        elif s.scale <= ABSENT:
            out.append(
                f"{s.mechanism} is not seen: {who} is quieter than planned or under the noise"
            )
        elif MATCH[0] <= s.scale <= MATCH[1]:
            out.append(f"{s.mechanism} matches the plan ({_dbs(s.scale)}): {who}")
        else:
            out.append(f"{s.mechanism}: {_dbs(s.scale)} against the plan: {who}")
    missing = [
        r
        for r in rows
        if calibrated and not r.above_noise and r.predicted and r.predicted > MISSING * r.noise
    ]
    if missing:
        said = ", ".join(f"{r.frequency_hz:.0f} Hz" for r in missing[:6])
        out.append(
            f"the plan predicts line{'s' if len(missing) > 1 else ''} at {said} well above the "
            "recording's noise that the recording does not show: the hum's shape differs from "
            "the plan's there (another mechanism, or the plan's figures for it)"
        )
    odd = [r for r in rows if r.unexplained]
    if odd:
        said = ", ".join(f"{r.frequency_hz:.0f} Hz" for r in odd[:6])
        out.append(
            f"nothing in the plan explains the line{'s' if len(odd) > 1 else ''} at {said}: a "
            "mechanism the plan does not describe"
        )
    return out


def compare_channel(result, meas: Measured, channel: str) -> ChannelBench:
    """One channel's recording against the plan: the table per harmonic, the fit and its summary.

    Parameters:
        result: the plan's analysis.
        meas: the measured recording.
        channel: the plan's channel it is of.
    Returns:
        the channel's :class:`ChannelBench`.
    References:
        :mod:`groundcheck.measure.fit` (the fit), ISO 226:2003 (audibility, through
        physics.hearing).
    """
    plan, hum = result.plan, result.hum.channels[channel]
    plan_f0 = plan.frequency
    freqs = [ln.harmonic * plan_f0 for ln in meas.lines]
    mechs = mechanisms(hum.lines, freqs)
    level = np.array([ln.level if ln.above_noise else 0.0 for ln in meas.lines])
    noise = np.array([ln.noise for ln in meas.lines])
    suspects, fitted = fit(
        mechs, level, noise, lambda g: mechanism_words(g, plan), meas.calibrated
    )
    suspects = [replace(s, members=tuple(_member(result, m) for m in s.members)) for s in suspects]
    rows = _rows(meas, hum, plan_f0, fitted, hum.lines, plan.listening)
    margins = [
        r.spl_db - r.threshold_db for r in rows if r.spl_db is not None and math.isfinite(r.spl_db)
    ]
    audible = (
        None
        if not meas.calibrated or plan.listening is None or not plan.listening.verdict
        else (bool(margins) and max(margins) > 0)
    )
    measured_total = math.sqrt(sum(r.measured**2 for r in rows if r.above_noise))
    predicted_total = math.sqrt(sum((r.predicted or 0.0) ** 2 for r in rows))
    return ChannelBench(
        channel,
        rows,
        suspects,
        measured_total,
        predicted_total,
        audible,
        max(margins) if margins else None,
        _summary(rows, suspects, meas.calibrated),
    )


def _hum_facts(ch: ChannelBench, meas: Measured, floor_dbv: float) -> MeasuredHum:
    """A channel's recorded lines above the plan; a line the plan predicts nothing at counts only
    from ``floor_dbv`` (the contributor level: a quantisation product at -149 dBV is no hum)."""
    above = []
    for r in ch.rows:
        if not r.above_noise:
            continue
        if r.predicted is None or r.predicted <= 0:
            if r.unexplained and r.measured > 0 and dbv(r.measured) >= floor_dbv:
                above.append((round(r.frequency_hz, 2), None))
        elif db_of_ratio(r.measured / r.predicted) > HUM_MARGIN_DB:
            above.append(
                (round(r.frequency_hz, 2), round(db_of_ratio(r.measured / r.predicted), 1))
            )
    top = ch.suspects[0] if ch.suspects and ch.suspects[0].excess > 0 else None
    said = (
        f"the fit points at {top.mechanism}: suspect {top.members[0]}"
        if top
        else "nothing in the plan explains it"
    )
    return MeasuredHum(
        ch.channel, tuple(above) if meas.calibrated else (), said, Location(meas.path)
    )


def bench_record(result, meas: Measured | None, channel: str | None, bonds=()) -> BenchRecord:
    """The whole bench record: the channel's comparison, the bonds and the bench findings
    (GC402-GC405).

    Parameters:
        result: the plan's analysis (with its circuit and hum budget).
        meas: the measured recording, or None (bonds only).
        channel: the plan's channel the recording is of (see :func:`pick_channel`).
        bonds: the planned bonds (:func:`groundcheck.measure.planned.planned_bonds`).
    Returns:
        the :class:`BenchRecord`.
    References:
        the rule catalogue's entries GC402-GC405.
    """
    channels, notes = [], []
    hum_facts = ()
    if meas is not None:
        ch = compare_channel(result, meas, channel)
        channels.append(ch)
        hum_facts = (_hum_facts(ch, meas, result.options.contributor_level),)
        notes += _recording_notes(result, meas)
    facts = BenchFacts(tuple(bonds), hum_facts)
    findings = [f for r in functions("bench") for f in r.func(facts)]
    findings.sort(key=lambda f: f.sort_key())
    checks = [
        BondCheck(
            b.a,
            b.b,
            b.measured,
            b.current,
            b.planned,
            b.limit,
            b.joints,
            b.location,
            bond_verdict(b),
        )
        for b in bonds
    ]
    return BenchRecord(
        result.plan.file,
        result.plan.title,
        meas,
        channels,
        checks,
        findings,
        notes,
        BENCH_CAUTIONS,
    )


def _recording_notes(result, meas: Measured) -> list[str]:
    notes = []
    if meas.clipping is not None:
        notes.append(
            f"the recording is clipped: {meas.clipping.samples:,} samples at full scale, the "
            f"first at {meas.clipping.first_s:.2f} s; its levels are not reliable (lower the "
            "interface's gain)"
        )
    if not meas.calibrated:
        notes.append(
            "not calibrated (give --full-scale or --calibration): levels are relative to digital "
            "full scale, and neither the plan's levels nor audibility can be compared"
        )
    if not meas.detected:
        notes.append(
            "no line of the mains stands above the noise: the recording holds only noise at these "
            "frequencies (no hum to compare, or the gain is too low)"
        )
    if abs(meas.nominal_hz - result.plan.frequency) > 1:
        notes.append(
            f"the recording's mains is {meas.nominal_hz:g} Hz but the plan's "
            f"{result.plan.frequency:g} Hz: harmonics are compared by number"
        )
    return notes
