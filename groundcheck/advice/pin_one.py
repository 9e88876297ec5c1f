"""A balanced shield's landing kept at the entry: where a balanced interconnect's shield lands
inside a piece of equipment (pin 1 of its socket), a wire there is never moved onto the star or
off the chassis (common practice: a balanced shield goes to the enclosure where the cable enters,
never to the signal ground; AES48-2005, from memory)."""

from __future__ import annotations

from ..model.installation import shield_ends
from ..model.kinds import is_fastening, joins_devices

__all__ = ["off_the_entry"]


def _landings(ctx) -> dict[str, str]:
    """Each point where a balanced link's shield lands on a signal ground (``shield-to … signal``
    at that end) -> the link's name."""
    got = ctx.__dict__.get("_shield_landings")
    if got is None:
        got = {}
        for c in ctx.plan.conductors:
            if joins_devices(c) and c.connects and c.balanced:
                for end, landing in zip((c.a, c.b), shield_ends(c)):
                    if landing == "signal":
                        got.setdefault(end, c.name)
        ctx.__dict__["_shield_landings"] = got
    return got


def _on_chassis(ctx, point: str) -> bool:
    """Whether ``point`` is metal, or fastened to metal by a bolt or strap."""
    if point in ctx.metals:
        return True
    return any(
        is_fastening(d, ctx.metals) and ({d.a, d.b} - {point}) & ctx.metals for d in ctx.at(point)
    )


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
    link = _landings(ctx).get(stay)
    if link is None or (to not in ctx.stars and _on_chassis(ctx, to)):
        return ""  # a lug on the chassis keeps it there; a star bolted down is the signal ground
    return (
        f"{stay} is where the shield of {link} lands (a balanced socket's pin 1): moved to {to}, "
        f"{c.name} would carry the shield's current into the box and along its ground; a "
        "balanced shield goes to the chassis where the cable enters"
    )
