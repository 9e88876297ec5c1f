"""The settings of the hum and buzz budget, with their defaults: the one home of these defaults.

Kept apart from :mod:`groundcheck.physics.hum` so that the analysis options and the command line
can read the defaults without importing the numeric stack.
"""

from __future__ import annotations

from dataclasses import dataclass

__all__ = [
    "PLATE_CURRENTS",
    "QUIET_MARGIN_DB",
    "far_below_hearing",
    "HumOptions",
    "SIGNAL_FREQUENCY",
    "SIGNAL_FREQUENCY_TEXT",
    "at_signal_frequency",
    "channel_listenings",
]

#: how a loop's current may be taken across a plate (``--plate-current``)
PLATE_CURRENTS = ("resistive", "inductive")

#: the signal frequency at which the crosstalk between channels and each channel's feedback through
#: the ground are always given, Hz (1 kHz: the reference frequency of audio measurements, IEC
#: 60268-3, from memory); the one place it is written
SIGNAL_FREQUENCY = 1000.0

#: the same, as the findings and reports write it
SIGNAL_FREQUENCY_TEXT = f"{SIGNAL_FREQUENCY / 1000:g} kHz"

#: a channel whose hum stays this far below the threshold of hearing at the listener's seat (dB, at
#: every harmonic) is far enough below it that a rise there is of no consequence: the figures are
#: estimates, and 20 dB is the project's own margin for them (the advice's louder test, and the
#: severity of a leakage current's shared return, read it)
QUIET_MARGIN_DB = 20.0


def spectrum_cut(options) -> bool:
    """Whether a run computes the hum lines only up to a frequency below the default (the
    ``--max-frequency`` option): its figures then lack the lines above it, so a quiet figure is no
    verdict of 'inaudible' and a share below the contributor level may not be.

    Parameters:
        options: the run's settings (anything with ``max_frequency``, Hz).
    Returns:
        True when lines the default range computes are left out.
    References:
        none (bookkeeping).
    """
    return options.max_frequency < HumOptions.max_frequency * (1 - 1e-12)


def far_below_hearing(hum, channel: str) -> bool:
    """Whether ``channel``'s hum in a hum budget ``hum`` is judged inaudible at the listener's
    seat with at least :data:`QUIET_MARGIN_DB` to spare (False without a listening verdict).

    Parameters:
        hum: a hum budget's result (None: no budget).
        channel: a channel's name.
    Returns:
        True when a rise of its hum is of no consequence.
    References:
        ISO 226:2003 (the threshold the margin is read against).
    """
    h = hum.channels.get(channel) if hum is not None else None
    return (
        h is not None
        and h.audible is False
        and h.margin_db is not None
        and h.margin_db <= -QUIET_MARGIN_DB
    )


def at_signal_frequency(f: float) -> bool:
    """Whether a row's frequency is :data:`SIGNAL_FREQUENCY` (to a billionth, not by the exact
    float comparison: a frequency reached by arithmetic, 20 × 50 Hz say, may differ in its last
    bit).

    Parameters:
        f: a frequency, Hz.
    Returns:
        True at the signal frequency.
    References:
        none (bookkeeping).
    """
    return abs(f - SIGNAL_FREQUENCY) <= 1e-9 * SIGNAL_FREQUENCY


@dataclass(frozen=True)
class HumOptions:
    """Settings of the hum budget.

    Parameters:
        max_frequency: highest harmonic analysed, Hz.
        contributor_level: contributors above this level at the output (dBV) become findings.
        crosstalk_limit: crosstalk between channels at the signal frequency (SIGNAL_FREQUENCY)
            worse than this (dB) is a finding.
        plate_current: how a loop's current crosses a plate: ``resistive`` (spread as at DC) or
            ``inductive`` (the sheet solve at each field line's frequency).
    """

    max_frequency: float = 5000.0
    contributor_level: float = -100.0
    crosstalk_limit: float = -60.0
    plate_current: str = "resistive"

    @classmethod
    def of(cls, options) -> "HumOptions":
        """The hum budget's settings of an analysis run's (its fields of the same names)."""
        return cls(*(getattr(options, k) for k in cls.__dataclass_fields__))


def channel_listenings(plan, stages, channels) -> dict:
    """Each channel's listening context: in an installation, a channel whose stages are all inside
    one placed device (beside the inputs of the installation's links) whose own plan states a
    whole listening chain (a speaker or headphones) is heard through it (a guitar head through its
    own cabinet, not the installation's PA); every other channel through the plan's.

    Parameters:
        plan: the plan.
        stages: its stages.
        channels: its channels.
    Returns:
        channel -> its Listening (or None).
    References:
        none (which chain a channel is heard through).
    """
    own = {
        name: p.listening
        for name, p in plan.device_plans
        if p.listening is not None and p.listening.verdict
    }
    out = {}
    for ch in channels:
        # the inputs of the installation's own links in the channel (a guitar lead into the head)
        # are heard through the equipment they feed: they decide no chain
        devices = {plan.index.device_of(s.name) for s in stages if s.channel == ch} - {None}
        dev = next(iter(devices)) if len(devices) == 1 else None
        out[ch] = own.get(dev, plan.listening)
    return out
