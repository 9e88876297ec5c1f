"""A balanced shield's landing kept at the entry: where a balanced interconnect's shield lands
inside a piece of equipment (pin 1 of its socket), a wire there is never moved onto the star or
off the chassis (common practice: a balanced shield goes to the enclosure where the cable enters,
never to the signal ground; AES48-2005, from memory)."""

from __future__ import annotations

from ..model.installation import shield_ends
from ..model.kinds import joins_devices

__all__ = ["off_the_entry", "shield_landings"]


def shield_landings(plan) -> dict[str, str]:
    """Each point where a balanced link's shield lands on a signal ground (``shield-to … signal``
    at that end) -> the link's name.

    Parameters:
        plan: the plan.
    Returns:
        the points, each with its link.
    References:
        AES48-2005 (from memory), the landings :func:`groundcheck.model.installation.shield_ends`
        reads.
    """
    got: dict[str, str] = {}
    for c in plan.conductors:
        if joins_devices(c) and c.connects and c.balanced:
            for end, landing in zip((c.a, c.b), shield_ends(c)):
                if landing == "signal":
                    got.setdefault(end, c.name)
    return got


def off_the_entry(ctx, c, end: str, to: str) -> str:
    """Why moving the ``end`` of conductor ``c`` onto point ``to`` is never tried: its other end is
    where a balanced link's shield lands (pin 1) and ``to`` is a star or off the chassis, so the
    shield's current would run into the box to ``to`` and along the ground there (GC113's
    concern); empty when the move is not of that kind.

    Parameters:
        ctx: the advisor's context.
        c: the conductor moved.
        end: the end moved.
        to: the point it would be moved to.
    Returns:
        the reason, or "".
    References:
        AES48-2005 (from memory): a balanced shield terminates on the enclosure at the entry.
    """
    stay = c.b if end == c.a else c.a
    link = ctx.shield_landings.get(stay)
    if link is None or (to not in ctx.stars and (to in ctx.metals or ctx.fastened_to(to))):
        return ""  # a lug on the chassis keeps it there; a star bolted down is the signal ground
    return (
        f"{stay} is where the shield of {link} lands (a balanced socket's pin 1): moved to {to}, "
        f"{c.name} would carry the shield's current into the box and along its ground; a "
        "balanced shield goes to the chassis where the cable enters"
    )
