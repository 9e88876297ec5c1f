"""Balanced shields landed on the chassis together: a pair of links between the same two pieces of
equipment is landed on the chassis in one change (common practice: a balanced shield goes to the
enclosure where the cable enters, never to the signal ground; AES48-2005, from memory); a wire at
a shield's landing is kept there by :mod:`groundcheck.advice.pin_one`."""

from __future__ import annotations

from .changes import Answer, Candidate, ChangeContext

__all__ = ["shields_together"]


def shields_together(ctx: ChangeContext, answer: Answer, add, one) -> None:
    """GC113 over the whole result: each link's shield landed on the chassis (``one``: finding ->
    :class:`Candidate` or None), and where two or more links land their shields on one piece of
    equipment's signal ground, one change that lands them all (a stereo pair rewired one socket
    at a time moves the loop's current into the other: each alone may read worse)."""
    by_device: dict[str, dict] = {}  # device -> link -> its own change
    for f in answer.findings:
        c = one(ctx, f)
        add(c)
        ((_, name, end),) = f.actions
        dev = ctx.plan.index.device_of(end)
        if dev is not None and c is not None and not c.refused:
            by_device.setdefault(dev, {}).setdefault(name, c)  # a link's first end at dev
    for dev, each in by_device.items():
        singles = list(each.values())
        if len(singles) < 2:
            continue
        names = [c.element for c in singles]
        add(
            Candidate(
                f"land the shields of {', '.join(names[:-1])} and {names[-1]} on {dev}'s "
                "chassis where they enter, not on its signal ground",
                answer.reason,
                tuple(e for c in singles for e in c.edits),
                action="shield-to-chassis",
                element=names[0],
            )
        )
