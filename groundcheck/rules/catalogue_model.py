"""The catalogue's electrical-model entries (GC4xx): what each rule checks, why, its fix and its
sources, with what follows from it.

One family's entries, apart from the others so that each module reads in one sitting;
:mod:`groundcheck.rules.catalogue` takes every family's entries in its one table of rules.
"""

from __future__ import annotations

from .rule_entry import Rule, entry
from .rule_families import MODEL

__all__ = ["MODEL_ENTRIES"]

#: the electrical-model rules, in the catalogue's order
MODEL_ENTRIES: list[Rule] = [
    entry(
        "GC401",
        "island",
        MODEL,
        "note",
        "A part of the ground network not connected to the rest: it gets its own reference in "
        "the solve.",
        "Figures between points of different parts are undefined; usually a wire is missing "
        "from the plan.",
        "Connect the island, or confirm it is meant to float.",
        refusals=("unconnected",),
    ),
    entry(
        "GC402",
        "bond-above-plan",
        MODEL,
        "fault",
        "A resistance measured on the bench (the bench command's measurements file) between "
        "two named points, against the plan's figure for the same two points: a fault at more "
        "than three times the plan and 5 mohm over it, a warning at more than 1.5 times and 5 "
        "mohm over.",
        "A joint measuring far above its plan is a joint that was not made as planned: paint "
        "or anodising under a screw, a loose nut, a cold solder joint, a crimp on insulation. "
        "It carries fault current and return current badly and will get worse.",
        "Re-make the joints the finding names on the path between the two points (clean "
        "metal, a star washer, the screw tight), then measure again. Mains work: disconnect "
        "the supply first.",
        "common practice (clean screwed joints measure 0.1-1 mohm, from memory; the 5 mohm "
        "margin covers a four-wire meter's contact uncertainty, common practice)",
        variants=("fault", "warning"),
    ),
    entry(
        "GC403",
        "bond-over-limit",
        MODEL,
        "danger",
        "A resistance measured between the protective-earth terminal (or a point the "
        "protective route reaches from it) and touchable metal, above the protective bonding "
        "limit (0.1 ohm, or --pe-limit).",
        "The protective bond as built would not hold a touchable part near earth potential "
        "during a fault, nor carry the current that opens the fuse in time: the metal can "
        "become live.",
        "Do not use the equipment. Re-make the protective bond (its own stud, clean metal, "
        "the correct conductor) and measure again at the test current, and have it checked by "
        "a qualified person. Never lift or remove the protective earth.",
        "IEC 62368-1 5.6.6.2 (from memory); IEC 61010-1 6.5.2.4; IEC 60335-1 27.5 (0.1 ohm, "
        "supply cord excluded)",
    ),
    entry(
        "GC404",
        "bond-not-in-plan",
        MODEL,
        "warning",
        "Two points measured on the bench with a low resistance between them that the plan "
        "does not join at all.",
        "The build has a connection the plan does not describe: an extra bond or a socket "
        "touching the chassis. It can close a ground loop the plan's hum figures do not "
        "include.",
        "Find the connection (a socket's sleeve touching the panel, a screw through a board's "
        "ground), then either remove it or add it to the plan and check again.",
    ),
    entry(
        "GC405",
        "hum-above-plan",
        MODEL,
        "warning",
        "A channel's recorded hum (the bench command) at a harmonic of the mains more than 6 "
        "dB above the plan's prediction (a line the plan predicts nothing at, from the "
        "contributor level, -100 dBV by default), with the mechanism the fit of the plan's "
        "spectra points at.",
        "The build differs from the plan: a conductor or joint is not as planned, a loop "
        "exists that the plan does not describe, or a field source is closer than planned.",
        "Inspect the conductors the finding names first (the fit's suspect), re-measure their "
        "joints, and compare the wiring with the plan. Never lift the protective earth to "
        "cure hum.",
        "the fit: non-negative least squares (Lawson and Hanson, 1974); 6 dB: common practice",
    ),
]
