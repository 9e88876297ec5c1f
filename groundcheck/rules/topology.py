"""Topology rules on single elements: heater supplies with no reference (GC107), internal shields
terminated at both ends (GC108), implausible lengths (GC112), points that reach no ground and
conductors with both ends at one point (GC109, GC110).

The family's other rules have modules of their own: loops (GC101, :mod:`.loops`), stars (GC103,
GC104, :mod:`.stars`), the signal ground's chassis bonds (GC105, GC106, :mod:`.signal_bonds`).
Each rule is a pure function of an :class:`~groundcheck.rules.context.AuditContext` returning
findings, registered under the codes it makes (:mod:`groundcheck.rules.registry`).
"""

from __future__ import annotations

import math

from ..model.kinds import PROTECTIVE, is_fastening_kind, joins_devices, kind, shield_like
from ..model.records import PE_POINT
from .catalogue import Finding
from .context import AuditContext
from .graph_search import bfs
from .registry import rule
from .repairs import shield_fix

__all__ = ["rule_heaters", "rule_shields", "rule_lengths", "rule_unconnected"]


@rule("GC107")
def rule_heaters(ctx: AuditContext) -> list[Finding]:
    """GC107: heater supplies with no reference.

    Parameters:
        ctx: the audit context.
    Returns:
        GC107 findings.
    References:
        the rule catalogue (rules/catalogue.py), which names each code's sources.
    """
    valves = sorted(r.name for r in ctx.plan.rectifiers if r.diode_law == "valve")
    device_of = ctx.plan.index.device_of

    def fix(h) -> str:
        # a valve rectifier's filament is its cathode, at the HT: grounding its winding shorts
        # the supply, so with a valve rectifier beside it the advice says that first; the name is
        # written as the heater's own plan writes it (a placed device's, without its prefix)
        dev = device_of(h.name)
        mine = [v for v in valves if device_of(v) == dev]
        if not mine:
            return (
                "reference it: centre tap or two equal resistors to ground, or an elevated DC "
                "reference"
            )
        local = mine[0][len(dev) + 1 :] if dev else mine[0]
        return (
            f"if it heats the valve rectifier ({', '.join(mine)}), leave it floating and write "
            f"'rectifier {local}' on it: that filament is the HT and must never be referenced to "
            "ground; otherwise reference it: centre tap or two equal resistors to ground, or an "
            "elevated DC reference"
        )

    return [
        Finding(
            "GC107",
            "warning",
            f"heater supply {h.name} has no reference to ground",
            h.location,
            (h.name,),
            {"current_a": h.current},
            fix(h),
        )
        for h in ctx.plan.heaters
        if h.reference is None and h.rectifier is None
    ]


@rule("GC108")
def rule_shields(ctx: AuditContext) -> list[Finding]:
    """GC108: shields of internal wiring terminated at both ends.

    Parameters:
        ctx: the audit context.
    Returns:
        GC108 findings.
    References:
        the rule catalogue (rules/catalogue.py), which names each code's sources.
    """
    out = []
    # a shield in no loop (its far end on an isolated footswitch box, say) carries no loop current
    # whatever its ends: terminating both is then no finding
    looped = {e for info in ctx.loops for e in info.loop.edges}
    if len(ctx.loops) < ctx.loop_total:  # not every loop listed: membership is not known
        looped = {c.name for c in ctx.plan.conductors}
    both = [
        c
        for c in ctx.plan.conductors
        if shield_like(c) and not joins_devices(c) and c.terminated == "both" and c.name in looped
    ]
    if not both:
        return out
    stars = [p.name for p in ctx.plan.points if p.kind == "star" and p.name in ctx.G]
    refs = set(stars) | {s.b for s in ctx.plan.stages}
    dist, _ = bfs(ctx.adj, sorted(refs)) if refs else ({}, {})
    for c in both:
        da, db = dist.get(c.a, 10**9), dist.get(c.b, 10**9)
        keep, lift = (c.a, c.b) if da <= db else (c.b, c.a)
        out.append(
            Finding(
                "GC108",
                "warning",
                f"shield {c.name} is terminated at both ends ({c.a} and {c.b})",
                c.location,
                (c.name,),
                {},
                *shield_fix(ctx, c, keep, lift),
            )
        )
    return out


#: a stated length is implausible more than this share below the straight route (positions in a
#: plan are drawn by hand, to a few millimetres), or above LENGTH_SLACK times it
LENGTH_SHORT = 0.10
LENGTH_SLACK = 3.0


#: a protective lead from a part that comes off (a lid, a cover) to the part it is fastened to is
#: left long enough to set the part down beside the box with its lead on, m (common practice):
#: GC112 does not call it too long within this
FLYING_LEAD = 0.25


def _between_parts(ends) -> bool:
    """Whether a conductor's two ends sit on two different metal parts."""
    ons = [p.on if p is not None else None for p in ends]
    return None not in ons and ons[0] != ons[1]


@rule("GC112")
def rule_lengths(ctx: AuditContext) -> list[Finding]:
    """GC112: a stated length shorter than the straight route between positioned ends, or over
    three times it.

    Parameters:
        ctx: the audit context.
    Returns:
        GC112 findings.
    References:
        the rule catalogue (rules/catalogue.py), which names each code's sources.
    """
    pos = {p.name: p.pos for p in ctx.plan.points if p.pos is not None}
    placed = ctx.plan.index.placement_of
    out = []
    for c in ctx.plan.conductors:
        if (
            c.length is None
            or c.a not in pos
            or c.b not in pos
            or is_fastening_kind(c.kind)
            or joins_devices(c)
        ):
            continue
        path = [pos[c.a], *c.route, pos[c.b]]
        route = sum(
            ((x1 - x0) ** 2 + (y1 - y0) ** 2) ** 0.5 for (x0, y0), (x1, y1) in zip(path, path[1:])
        )
        # a cable between two pieces of equipment, an umbilical's core between two boxes, or a
        # building cable (it runs in walls and under floors) runs as it likes: only too short
        # counts
        # and so does a lead between two outlets (a strip's cord, a reel): it lies on the floor
        ends = (ctx.plan.point(c.a), ctx.plan.point(c.b))
        outlets = all(p is not None and p.kind == "outlet" for p in ends)
        free = placed(c.a) != placed(c.b) or c.bundle or kind(c.kind).carries_load or outlets
        slack = math.inf if free else LENGTH_SLACK
        longest = slack * route + 0.05
        if c.role == PROTECTIVE and _between_parts(ends):
            longest = max(longest, FLYING_LEAD)  # a lid's lead lets it off for service
        if route > 0 and (c.length < route * (1 - LENGTH_SHORT) or c.length > longest):
            what = "shorter than" if c.length < route else f"over {LENGTH_SLACK:g} times"
            out.append(
                Finding(
                    "GC112",
                    "note",
                    f"{c.kind} {c.name} is {c.length * 1e3:.0f} mm long, {what} the "
                    f"{route * 1e3:.0f} mm between its ends",
                    c.location,
                    (c.name,),
                    {"length_mm": c.length * 1e3, "route_mm": route * 1e3},
                    f"measure the route of {c.name} again and correct its length",
                )
            )
    return out


@rule("GC109", "GC110")
def rule_unconnected(ctx: AuditContext) -> list[Finding]:
    """GC109, GC110: points that reach no ground; conductors with both ends at one point.

    Parameters:
        ctx: the audit context.
    Returns:
        GC109, GC110 findings.
    References:
        the rule catalogue (rules/catalogue.py), which names each code's sources.
    """
    return _unreached(ctx) + _self_loops(ctx)


def _unreached(ctx: AuditContext) -> list[Finding]:
    """GC109: each connected part that holds no metal, no protective earth and no point of the
    signal circuit (an outlet's own wording when the part is outlets only)."""
    out = []
    order, labels, _ = ctx.parts
    members: dict[int, set] = {}
    for name, label in zip(order, labels.tolist()):
        members.setdefault(label, set()).add(name)
    # a class II device's inlet has no protective conductor in its cord: left on its own, it is as
    # it should be
    idle = {f"{d.name}.{PE_POINT}" for d in ctx.plan.devices if d.equipment_class == "II"}
    idle |= {t.name for t in ctx.plan.transformers if t.isolating}  # floating secondaries
    # a conductor of the mains cord itself (a pole a switch leaves open): mains, not ground
    idle |= {p.name for p in ctx.plan.points if p.kind == "mains-pole"}
    outlets = {p.name for p in ctx.plan.points if p.kind == "outlet"}
    for comp in members.values():
        if comp & ctx.metals or PE_POINT in comp or comp & ctx.signal_points or comp <= idle:
            continue
        names = sorted(comp)
        listed = f"{', '.join(names[:6])}{'…' if len(names) > 6 else ''}"
        if comp <= outlets:  # nothing plugged in (GC215 checks what is), but unwired all the same
            out.append(
                Finding(
                    "GC109",
                    "warning",
                    f"outlet {listed} does not reach the main earthing terminal",
                    min(ctx.loc(n) for n in names),
                    tuple(names[:20]),
                    {"points": len(names)},
                    "have its protective wiring repaired by a qualified person before anything is "
                    "plugged into it",
                )
            )
            continue
        out.append(
            Finding(
                "GC109",
                "warning",
                f"{listed} {'reaches' if len(names) == 1 else 'reach'} no ground",
                min(ctx.loc(n) for n in names),
                tuple(names[:20]),
                {"points": len(names)},
                "connect these points, or remove them from the plan",
            )
        )
    return out


def _self_loops(ctx: AuditContext) -> list[Finding]:
    """GC110: conductors whose two ends are the same point."""
    return [
        Finding(
            "GC110",
            "warning",
            f"{c.kind} {c.name} has both ends at {c.a}",
            c.location,
            (c.name,),
            {},
            "name the conductor's real ends",
        )
        for c in ctx.plan.conductors
        if c.a == c.b
    ]
