"""The catalogue's hum entries (GC3xx): what each rule checks, why, its fix and its
sources, with what follows from it.

One family's entries, apart from the others so that each module reads in one sitting;
:mod:`groundcheck.rules.catalogue` takes every family's entries in its one table of rules.
"""

from __future__ import annotations

from .rule_entry import Rule, entry
from .rule_families import HUM

__all__ = ["HUM_ENTRIES"]

#: the hum rules, in the catalogue's order
HUM_ENTRIES: list[Rule] = [
    entry(
        "GC301",
        "hum-contributor",
        HUM,
        "warning",
        "A conductor whose shared impedance puts hum or buzz above the set level at a "
        "channel's output (a note when the channel stays 20 dB or more below hearing at the "
        "listener's seat).",
        "Common-impedance coupling: a supply current's drop appears across a sensitive pair.",
        "Move the supply return off the conductor named, as the fix says.",
        variants=("warning", "note"),
        identity="pair",
    ),
    entry(
        "GC302",
        "loop-pickup",
        HUM,
        "warning",
        "A ground loop in which a stray magnetic field induces a hum voltage above the set "
        "level at a channel's output, a tenth of its hum or more, or heard on its own at the "
        "listener's seat (a note when the channel stays 20 dB or more below hearing there).",
        "Faraday's law: EMF = 2πfBA drives current round the loop; its drop across a "
        "sensitive pair is amplified.",
        "Open the loop, or make it smaller and move it away from the transformer; an AC heater "
        "pair run open is twisted along its whole run.",
        variants=("warning", "note"),
        identity="pair",
        actions=("twist",),
    ),
    entry(
        "GC303",
        "hum-audible",
        HUM,
        "fault",
        "A channel whose hum or buzz, as sound pressure at the listener's seat, is above the "
        "ISO 226 threshold of hearing at some frequency.",
        "Hum above the threshold of hearing at the listener's seat is likely to be heard in a "
        "quiet room.",
        "Fix the main contributors named in the finding.",
        "ISO 226:2003 threshold of hearing",
        identity="first",
    ),
    entry(
        "GC304",
        "crosstalk",
        HUM,
        "warning",
        "Crosstalk between channels through shared return impedance, worse than −60 dB at 1 kHz "
        "(not into a channel fed by the talker's own line out: a link leaving a device whose "
        "stages are all the talker's).",
        "Shared return impedance lets one channel's signal current appear in the other's "
        "reference.",
        "Give each channel its own return to the star; join channels at one point only.",
        identity="pair",
        actions=("own-crosstalk-return",),
    ),
    entry(
        "GC305",
        "loop-near-source",
        HUM,
        "note",
        "A loop that passes closer to a field source's centre than its stated size or, with "
        "no size stated, than the distance its strength was stated at.",
        "Close to a transformer the point-dipole law is an extrapolation: with a size the "
        "ring model is used, without one the figure may be off by a large factor either way.",
        "State the source's size ('size 60 mm') and height, or route the loop's conductors "
        "away from it.",
        "J. D. Jackson, Classical Electrodynamics, 3rd ed., §5.4 and §5.6",
        # a note on the model's reach, not on the plan: a change that opens the loop makes the
        # note go away, but is no answer to it (the loop's own findings carry that advice)
        actions=(),
    ),
    entry(
        "GC306",
        "ground-feedback",
        HUM,
        "fault",
        "A channel's own output or load current (a 'signal' current of that channel) flowing "
        "in the ground that one of its stages reads, other than the stages at the current's "
        "own ends. The feedback is the current's drop across each of the channel's stages "
        "times the stage's gain, summed with signs as the crosstalk is, against the rated "
        "output, at 1 kHz and at the hum budget's frequencies. A fault when the part read by "
        "those other stages (the input stages) is above -60 dB (0.1 %) at any of them, a note "
        "from -100 dB to -60 dB.",
        "The output current's drop in the input ground is fed back to the input ahead of the "
        "whole gain: a second, unplanned feedback path through the ground, which changes the "
        "gain, adds the load current's distortion (a class AB stage's half-wave currents, a "
        "speaker's reactive current) to the output and, large enough, makes the amplifier "
        "oscillate. 0.1 % is the distortion a power amplifier is commonly held to (common "
        "practice), so a ground feedback above it is an error of that size at the output.",
        "Take the load or output return straight to the channel's star (the supply's centre) "
        "by a wire of its own, so that it shares nothing with the input ground.",
        "common-impedance coupling (see GC102); 0.1 % as a power amplifier's distortion "
        "figure: common practice",
        variants=("fault", "note"),
    ),
]
