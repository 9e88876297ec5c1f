"""How the advice judges a change's hum: how far a channel stands above hearing at the
listener's seat (the power sum of its lines' margins over the threshold), and a contributor that
only crossed its share's line because the rest of the hum fell.  (A channel far enough below
hearing that a rise there is of no consequence:
:func:`groundcheck.physics.humsettings.far_below_hearing`.)
"""

from __future__ import annotations

import math

from ..rules.catalogue import RULES
from ..rules.results import Result
from ..rules.rule_families import HUM

__all__ = [
    "HUM_FLOOR_DBV",
    "heard_level",
    "heard_changes",
    "share_only",
]

#: hum totals are compared down to this level, dBV: below it a change is of no consequence
HUM_FLOOR_DBV = -140.0


def heard_level(result: Result, channel: str) -> float | None:
    """How far a channel's hum stands above hearing at the listener's seat, in dB: the power sum
    over its harmonics of each one's margin over the threshold of hearing, 10·log10 Σ 10^(m/10)
    (dominated by the loudest line above hearing, every other line counted); None without a
    listening verdict or without hum.

    Parameters:
        result: an analysis.
        channel: a channel's name.
    Returns:
        the level in dB (negative: below hearing), or None.
    References:
        ISO 226:2003 (the thresholds the margins are read against).
    """
    h = result.hum.channels.get(channel) if result.hum is not None else None
    margins = [
        r.margin
        for r in (h.spectrum if h is not None else ())
        if r.margin is not None and math.isfinite(r.margin)
    ]
    if not margins:
        return None
    return 10.0 * math.log10(sum(10.0 ** (m / 10.0) for m in margins))


def heard_changes(before: Result, after: Result, h0: dict) -> dict:
    """Each channel's change of :func:`heard_level`, where the plan judges what is heard; a channel
    left with no hum falls as far as its total can (to :data:`HUM_FLOOR_DBV`)."""
    out = {}
    for ch, level in h0.items():
        w0 = heard_level(before, ch)
        if w0 is None:
            continue
        floor = w0 - (level - HUM_FLOOR_DBV)
        w1 = heard_level(after, ch)
        out[ch] = (floor if w1 is None else max(w1, floor)) - w0
    return out


def share_only(f, before: Result) -> bool:
    """Whether a hum contributor's finding after a change (GC301, GC302: an element, its source
    and a channel) names one that was there before at no lower level: it crossed the line of a
    tenth of the total only because the rest of the hum fell."""
    ch = f.figures.get("channel") if f.figures else None
    level = f.figures.get("level_dbv") if f.figures else None
    if RULES[f.code].family is not HUM or ch is None or level is None or len(f.elements) < 2:
        return False
    h = before.hum.channels.get(ch) if before.hum is not None else None
    return h is not None and any(
        c.element == f.elements[0] and c.source == f.elements[1] and c.dbv >= level - 0.05
        for c in h.contributors
    )
