"""Fix texts and exemptions the rules share with the advisor (:mod:`groundcheck.advice`), so that
a finding never tells the user to make a change the advisor rejects: a shield that is the only
return of one of its ends is kept at both ends; a rectifier's or filter's returns joined together
and taken to the star by one wire are no chain; returns that meet only at the star are joined
before it.
"""

from __future__ import annotations

import networkx as nx

from ..model.kinds import is_fastening, joins_devices
from ..network.canonical import canonical_ranks
from .graph_search import bfs

__all__ = [
    "only_return_end",
    "service_entry",
    "shield_fix",
    "signal_shield",
    "supply_ends",
    "supply_meetings",
]


def only_return_end(ctx, c) -> str | None:
    """The end of a shield for which it is the only wired connection.

    Parameters:
        ctx: the audit context.
        c: a shield conductor.
    Returns:
        the end with no other conductor than the shield (fastenings to metal aside, and
        interconnects to other equipment, which bring the signal in and return it to the other
        equipment, not to this one's circuit), or None.
    References:
        common practice (a screen that is a socket's only return carries its signal).
    """
    for end in (c.a, c.b):
        if end not in ctx.G:
            continue
        others = [
            k
            for _, _, k in ctx.G.edges(end, keys=True)
            if k != c.name
            and not is_fastening(ctx.conductors[k], ctx.metals)
            and (joins_devices(c) or not joins_devices(ctx.conductors[k]))
        ]
        if not others:
            return end
    return None


def signal_shield(ctx, c) -> str | None:
    """Why a shield must keep both ends, in words, or None when it may be opened: an unbalanced
    link's shield is the signal's return, and a shield that is the only return of one end carries
    that end's signal.

    Parameters:
        ctx: the audit context.
        c: a shield or interconnect.
    Returns:
        "keep both ends of …: …", or None.
    References:
        common practice (an unbalanced screen is the signal return).
    """
    if joins_devices(c) and not c.balanced:
        return f"keep both ends of {c.name}: its shield is the signal's return"
    alone = only_return_end(ctx, c)
    if alone is not None:
        return f"keep both ends of {c.name}: it is the only return of {alone}"
    return None


def service_entry(ctx, c) -> str | None:
    """The end of a shield that is a cable entering the building (an aerial or cable-network
    feed): in an installation, an end outside every device while the other is in one.

    Parameters:
        ctx: the audit context.
        c: a shield.
    Returns:
        the building's end, or None.
    References:
        common practice (an incoming cable's screen is bonded where it enters, to the local
        wiring rules).
    """
    if ctx.plan.supply is None:
        return None
    device_of = ctx.plan.index.device_of
    outside = [e for e in (c.a, c.b) if device_of(e) is None]
    return outside[0] if len(outside) == 1 else None


def shield_fix(ctx, c, keep: str, lift: str) -> tuple[str, tuple]:
    """GC108's fix line and actions for a shield terminated at both ends.

    Parameters:
        ctx: the audit context.
        c: the shield.
        keep: the end nearer a star or stage reference.
        lift: the other end.
    Returns:
        (fix line, actions): terminate it at ``keep`` only — unless it is the only return of
        one end (opened, that end would float, GC106): then it stays, no action.
    References:
        common practice (a screened pair whose second core is the return, screen at one end).
    """
    entry = service_entry(ctx, c)
    if entry is not None:
        inside = c.b if entry == c.a else c.a
        return (
            f"keep both ends: {c.name}'s screen is bonded to the building's earth at {entry}, "
            "where the cable enters (the wiring rules' bonding of an incoming service, never "
            "undone, and never replaced by another cable); break the loop at the equipment "
            "instead: a galvanic isolator (an aerial isolator, capacitors in series with the "
            f"inner and the screen) at {inside}",
            (),
        )
    alone = only_return_end(ctx, c)
    if alone is None:
        return (
            f"terminate {c.name} at {keep} only and leave the end at {lift} unconnected",
            (("terminate-at", c.name, keep),),
        )
    return (
        f"keep both ends: {c.name} is the only return of {alone} (opened at either end, {alone} "
        "would float); to keep other currents off the signal's return, use a screened pair whose "
        f"second core is the return, with the screen at {keep} only",
        (),
    )


def supply_ends(plan) -> set[frozenset]:
    """Pairs of points a rectifier's or its filter's currents circulate between on purpose.

    Parameters:
        plan: the plan.
    Returns:
        each rectifier's two ends, and its filter capacitor's return with each of them.
    References:
        common practice (reservoir, centre tap and filter negatives joined before the star).
    """
    out = set()
    for r in plan.rectifiers:
        out.add(frozenset((r.a, r.b)))
        if r.filter_point:
            out |= {frozenset((r.filter_point, r.a)), frozenset((r.filter_point, r.b))}
        if r.regulator_point:
            out |= {frozenset((r.regulator_point, r.a)), frozenset((r.regulator_point, r.b))}
    return out


def supply_meetings(ctx) -> list[tuple]:
    """Rectifiers whose two ends (or whose filter's return and reservoir) meet only at a star: the
    charging or ripple current flows through the star itself, every return's reference (GC103).

    Parameters:
        ctx: the audit context.
    Returns:
        (location, elements, message, fix, actions) of each: the action ("join", conductor,
        point) moves the conductor's star end to the point, joining them before the star.
    References:
        common practice (join them by a short wire of their own, then one wire to the star).
    """
    stars = {p.name for p in ctx.plan.points if p.kind == "star"}
    if not stars:
        return []
    H = nx.Graph((u, v) for u, v in ctx.G.edges() if not {u, v} & (stars | ctx.metals))
    stage_ends = ctx.plan.index.stage_ends
    rank = canonical_ranks(ctx.G)
    out = []
    for r in ctx.plan.rectifiers:
        for x, y in ((r.b, r.a), (r.filter_point, r.a), (r.regulator_point, r.a)):
            if not x or x not in ctx.G or y not in ctx.G:
                continue
            if x in H and y in H and nx.has_path(H, x, y):
                continue
            path = _shortest(ctx.adj, x, y, rank)
            star = next((n for n in path[1:-1] if n in stars), None)
            if star is None or any(n in ctx.metals for n in path):
                continue
            # of two conductors side by side, the first by rank (not by the plan's order)
            link = min(ctx.G[path[0]][path[1]], key=rank.__getitem__)
            if x != r.b and x in stage_ends:
                out.append(_return_on_stage(r, star, x, y, link))
                continue
            out.append(
                (
                    r.location,
                    (star, x, y, link),
                    f"the current of {r.name} between {x} and {y} flows through "
                    f"{_the_star(star)}: "
                    "they meet only there",
                    f"join {x} to {y} by a short wire of their own ({link}), then one wire to "
                    f"{star}",
                    (("join", link, y),),
                )
            )
    return out


def _shortest(adj: dict, x: str, y: str, rank: dict) -> list:
    """A path of fewest hops from x to y (empty when none), of several such the one the network's
    canonical order takes first: never the order the plan writes its statements in."""
    _, parent = bfs(adj, [x], None, rank)
    if y not in parent:
        return []
    path = [y]
    while parent[path[-1]] is not None:
        path.append(parent[path[-1]])
    return path[::-1]


def _return_on_stage(r, star: str, x: str, y: str, link: str) -> tuple:
    """GC103 for a filter's or regulator's return landed on a stage's own ground point ``x``:
    the fix moves that return's end to the reservoir's ``y`` (the heater string's or the load's
    cold end rewired), never the stage's ground wire ``link``, which is the stage's reference
    (common practice)."""
    what = "regulator" if x == r.regulator_point else "filter"
    return (
        r.location,
        (star, x, y, link),
        f"the current of {r.name} between {x} and {y} flows through {_the_star(star)}: they meet "
        f"only there, and its {what} return lands on {x}, a stage's ground",
        f"take the {what}'s return off {x} to {y} (rewire its cold end there); {x} keeps its "
        f"own wire ({link}) to {star}",
        (("return-to", r.name, x, y),),
    )


def _the_star(name: str) -> str:
    """A star point in words: "the star" for one named star, "the star (pre.star)" in a device,
    else "the star NAME" (never "the star star")."""
    if name == "star":
        return "the star"
    return f"the star ({name})" if name.rsplit(".", 1)[-1] == "star" else f"the star {name}"
