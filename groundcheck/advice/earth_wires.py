"""A source's earth wire to the box its signal goes to.

A turntable's earth wire (its arm and plinth's ground) belongs on the input it plays into: run to
another box (the amplifier, while the signal leads go to a phono stage on another outlet), it
closes a loop through the two boxes' mains cords and the building's wiring, and the current round
it flows in the signal leads' shields.  Landed on a ground post of the box its signal leads go to,
the wire and the leads return to one box (common practice: the earth wire goes to the phono input's
own post).
"""

from __future__ import annotations

import dataclasses

from ..model.kinds import PROTECTIVE, is_fastening, joins_devices
from .changes import ChangeContext, reroute

__all__ = ["earth_wire_moves"]

#: point kinds that serve as a box's ground post for a wire from another box
_POSTS = ("terminal", "stud")


def earth_wire_moves(ctx: ChangeContext, reason: str, add) -> None:
    """For each wire between two devices that carries no signal of its own, from a device whose
    signal links all go from it to one other device (written from the source, the signal's way):
    the wire's far end moved to that device's free ground post (a terminal or stud fastened to its
    metal with nothing else on it), else its star, else a simple device's chassis.

    Parameters:
        ctx: the change context.
        reason: the rule the changes answer.
        add: takes a candidate (or None).
    Returns:
        nothing (the candidates go to ``add``).
    References:
        common practice (a turntable's earth wire goes to the input it plays into).
    """
    plan, device_of = ctx.plan, ctx.plan.index.device_of
    links = [c for c in plan.conductors if joins_devices(c) and c.connects]
    for c in plan.conductors:
        if joins_devices(c) or c.role == PROTECTIVE or is_fastening(c, ctx.metals):
            continue
        ends = (device_of(c.a), device_of(c.b))
        if None in ends or ends[0] == ends[1]:
            continue
        for src, there, other in ((ends[0], c.b, ends[1]), (ends[1], c.a, ends[0])):
            mine = [k for k in links if src in (device_of(k.a), device_of(k.b))]
            # a source sends: every link of its is written from it (A to B, the signal's way)
            if not mine or any(device_of(k.a) != src for k in mine):
                continue
            dests = {device_of(k.b) for k in mine} - {src, None}
            if len(dests) != 1 or other in dests:
                continue
            (dest,) = dests
            post = _post(ctx, dest)
            if post is None:
                continue
            add(_moved(ctx, c, there, post, src, dest, reason))


def _moved(ctx, c, there: str, post: str, src: str, dest: str, reason: str):
    cand = reroute(
        ctx,
        c.name,
        there,
        post,
        f"land {c.name} on {post} instead of {there}: {src}'s signal leads go to {dest}, so its "
        "earth wire and its leads return to one box and close no loop through the mains cords",
        reason,
        "earth-wire",
    )
    if cand is None or not cand.touches_protective:
        return cand
    # the route reaches the source's metal through the wire; a source with no mains of its own (or
    # a class II one) needs no protective earth, and the box it moves to is earthed by its cord:
    # the wire is a functional earth, and its metal stays earthed (the one other move of a
    # conductor on the protective route, docs/language.md)
    own = dict(ctx.plan.device_plans).get(src)
    mainsless = ctx.plan.index.devices[src].plugged is None and (own is None or own.mains is None)
    if c.role != PROTECTIVE and (mainsless or _class_ii(ctx, src)) and _earthed_by_cord(ctx, dest):
        return dataclasses.replace(cand, touches_protective=False)
    return cand


def _class_ii(ctx, dev: str) -> bool:
    """Whether a device is class II (its own plan's mains, or a simple device's word)."""
    own = dict(ctx.plan.device_plans).get(dev)
    if own is not None and own.mains is not None:
        return own.mains.equipment_class == "II"
    return ctx.plan.index.devices[dev].equipment_class == "II"


def _earthed_by_cord(ctx, dev: str) -> bool:
    """Whether a device is plugged in by a cord with a protective conductor (class I)."""
    own = dict(ctx.plan.device_plans).get(dev)
    plugged = ctx.plan.index.devices[dev].plugged is not None
    if own is not None:
        return plugged and own.mains is not None and own.mains.equipment_class == "I"
    return plugged and ctx.plan.index.devices[dev].equipment_class == "I"


def _post(ctx: ChangeContext, dev: str) -> str | None:
    """A device's free ground post (a terminal or stud held to its metal by a fastening and joined
    to nothing else, never the protective earth's), else its star; None when it has neither."""
    pts = [p for p in ctx.plan.points if ctx.plan.index.device_of(p.name) == dev]
    for p in pts:
        if p.kind not in _POSTS:
            continue
        at = ctx.at(p.name)
        if at and all(is_fastening(d, ctx.metals) and not ctx.protective(d) for d in at):
            return p.name
    star = next((p.name for p in pts if p.kind == "star"), None)
    # a simple device's earth post is its chassis itself
    chassis = f"{dev}.chassis"
    return star if star is not None or chassis not in ctx.metals else chassis
