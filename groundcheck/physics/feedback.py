"""Feedback through the ground: a channel's own output or load current read by its own stages.

A ``signal`` current of a channel (its load return at the rated output) drops a voltage across
every conductor it flows in; a stage of the same channel whose pair spans any of them amplifies
that drop as if it were signal.  The feedback is what this puts at the channel's output, against
the rated output: per frequency, Σ over the channel's stages of (V_a − V_b)·gain for the current's
amplitude, summed with signs as the crosstalk is (:mod:`groundcheck.physics.hum`).  The part read
by the stages that do not end on the current's own points (an output stage measured across its
own load return does; the input stages do not) is given beside it: it enters ahead of the
channel's gain.  The hum budget computes both on its own factorisations, at the signal frequency
(:data:`groundcheck.physics.humsettings.SIGNAL_FREQUENCY`, 1 kHz) and at every
frequency of the budget (the hum harmonics).

References: common-impedance coupling (H. W. Ott, *Electromagnetic Compatibility Engineering*,
2009, §3.1, from memory); nodal analysis.
"""

from __future__ import annotations

import numpy as np

from ..core.units import db_of_ratio
from .hum_rows import FeedbackLine

__all__ = ["FEEDBACK_FLOOR_DB", "feedback_sources", "own_feedback", "feedback_rows"]

#: feedback is not shown below this (dB), as the crosstalk
FEEDBACK_FLOOR_DB = -200.0


def feedback_sources(sources, stages) -> list:
    """The signal currents that have a channel with stages: those whose feedback is computed.

    Parameters:
        sources: the hum budget's signal sources.
        stages: the plan's stages.
    Returns:
        the sources whose channel has at least one stage.
    References:
        none (bookkeeping).
    """
    channels = {st.channel for st in stages}
    return [s for s in sources if s.channel is not None and s.channel in channels]


def own_feedback(circuit, fac, sources, stages, valid, gains) -> list[tuple]:
    """Each signal current's feedback at one frequency: the current at its rated amplitude (the sum
    of its stated parts' magnitudes, as the crosstalk takes it) solved on the factorisation, read
    across the stages of its own channel.

    Parameters:
        circuit: the circuit.
        fac: the factorised network at the frequency.
        sources: the signal sources (:func:`feedback_sources`).
        stages: the plan's stages.
        valid: whether each stage's two points are connected.
        gains: each stage's gain as a (complex) ratio at the frequency.
    Returns:
        per source: (name, channel, phasor at the output from all its channel's stages, phasor from
        the stages not at the current's own points), V.
    References:
        superposition and nodal analysis (Ho, Ruehli, Brennan, 1975).
    """
    if not sources:
        return []
    J = np.zeros((len(circuit.nodes), len(sources)), dtype=complex)
    for k, s in enumerate(sources):
        amp = sum(abs(v) for v in s.parts.values())
        J[circuit.point_node[s.a], k] += amp
        J[circuit.point_node[s.b], k] -= amp
    sol = fac.solve(J)
    out = []
    for si, s in enumerate(sources):
        total = ahead = 0j
        for k, st in enumerate(stages):
            if not valid[k] or st.channel != s.channel:
                continue
            v = complex(sol.between(st.a, st.b)[si] * gains[k])
            total += v
            if not {st.a, st.b} & {s.a, s.b}:
                ahead += v
        out.append((s.name, s.channel, total, ahead))
    return out


def _db(v: float, rated: float) -> float:
    return max(FEEDBACK_FLOOR_DB, db_of_ratio(v / rated)) if v > 0 else FEEDBACK_FLOOR_DB


def feedback_rows(raw: dict, rated) -> list[dict]:
    """The feedback rows of the result, by source and frequency.

    Parameters:
        raw: (source, channel, frequency) -> (phasor from every stage, phasor from the input
            stages), V.
        rated: the rated output, V, or a function of the channel giving its own (a placed device's
            channel heard through its own chain is against that chain's rated output).
    Returns:
        rows of source, channel, frequency_hz, volts, db (every stage's sum against the rated
        output), input_volts and input_db (the stages not at the current's own points); a source
        none of whose figures is above the floor has no rows.
    References:
        decibels of a voltage ratio, 20·log10 (IEC 60027-3).
    """
    of = rated if callable(rated) else (lambda ch: rated)
    heard = {
        k[0]
        for k, (total, ahead) in raw.items()
        if max(_db(abs(total), of(k[1])), _db(abs(ahead), of(k[1]))) > FEEDBACK_FLOOR_DB
    }
    rows = []
    for (name, ch, f), (total, ahead) in sorted(raw.items(), key=lambda kv: (kv[0][0], kv[0][2])):
        if name not in heard:  # nothing of it reaches its own channel's stages
            continue
        rows.append(
            FeedbackLine(
                name,
                ch,
                f,
                float(abs(total)),
                _db(abs(total), of(ch)),
                float(abs(ahead)),
                _db(abs(ahead), of(ch)),
            )
        )
    return rows
