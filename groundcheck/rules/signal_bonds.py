"""GC105, GC106: each signal-ground network's bonds to the chassis: more than one (which to keep,
nearest the protective earth, and how to undo the others), or none at all.

A pure function of an :class:`~groundcheck.rules.context.AuditContext`, registered under its codes
(:mod:`groundcheck.rules.registry`).
"""

from __future__ import annotations

import math

from ..model.kinds import PROTECTIVE, is_fastening, joins_devices
from ..model.records import SOCKET_KINDS
from .catalogue import Finding
from .context import AuditContext
from ..model.supplies import winding_span
from .equipment import ELV_LIMIT, equipment_of
from .graph_search import bfs
from .pe_places import pe_point
from .floating import floating_fix as _floating_fix
from .registry import rule
from .signal_networks import chassis_proper, signal_grounds

__all__ = ["rule_signal_bonds"]


@rule("GC105", "GC106")
def rule_signal_bonds(ctx: AuditContext) -> list[Finding]:
    """GC105, GC106: signal grounds bonded to the chassis twice, or floating.

    Parameters:
        ctx: the audit context.
    Returns:
        GC105, GC106 findings.
    References:
        the rule catalogue (rules/catalogue.py), which names each code's sources.
    """
    out = []
    equipment = equipment_of(ctx)
    for comp, places in signal_grounds(ctx):
        name = _component_name(ctx, comp)
        if not places:
            out.append(_floating(ctx, comp, name))
            continue
        # bonds counted per piece of equipment: each class I box of its own keeps one
        groups: dict = {}
        for p, ks in places.items():
            key = equipment.get(ctx.plan.index.device_of(p))
            groups.setdefault(key, {})[p] = ks
        out += [_twice(ctx, name, group, comp) for group in groups.values() if len(group) > 1]
        out += [
            f for group in groups.values() if (f := _pot_only(ctx, name, group, comp)) is not None
        ]
        out += _held_by_links(ctx, comp, name, set(groups), equipment)
    return out + _wired_between_bonds(ctx)


def _wired_between_bonds(ctx: AuditContext) -> list[Finding]:
    """GC105 for a socket fastened to the chassis and wired to another point fastened to it (an
    input's sleeve run to a bolted star): both ends lie on the chassis side, so no signal-ground
    network holds the wire, yet the signal ground is bonded at both of its ends."""
    side, out = chassis_proper(ctx), []
    for c in ctx.plan.conductors:
        if (
            not c.connects
            or c.role == PROTECTIVE
            or is_fastening(c, ctx.metals)
            or joins_devices(c)
            or c.a == c.b
            or not {c.a, c.b} <= side - ctx.metals
        ):
            continue
        kinds = {getattr(ctx.plan.point(p), "kind", None) for p in (c.a, c.b)}
        held = _fastenings(ctx, {c.a, c.b})
        if kinds & {"sleeve", "jack"} and all(held.get(p) for p in (c.a, c.b)):
            places = {c.a: [c.name], c.b: [c.name]}
            out.append(_twice(ctx, _component_name(ctx, [c.a, c.b]), places, [c.a, c.b]))
    return out


def _twice(ctx: AuditContext, name: str, places: dict, comp=()) -> Finding:
    """GC105: one piece of equipment's signal ground bonded to its chassis at several places:
    which bond to keep (nearest the protective earth) and how to undo the others."""
    held = _fastenings(ctx, set(places))
    desc = ", ".join(
        f"{p} (by {', '.join(ks + held.get(p, []))})" for p, ks in sorted(places.items())
    )
    bonds = sorted(places)
    # a bond made by a supply's own lead (a wire from the winding's side of a rectifier, where its
    # return current goes back into the winding: a centre tap wired to a tag) is kept last; the
    # reservoir's side wired to the bond is the usual star bond, not this
    ends = {r.b for r in ctx.plan.rectifiers}
    supply = {
        p
        for p in bonds
        for k in places[p]
        if (c := ctx.plan.index.conductors.get(k)) is not None and {c.a, c.b} & ends
    }
    keep, why = _nearest_pe(ctx, bonds, comp, supply)
    others = [b for b in bonds if b != keep]
    actions = _unbond_actions(ctx, others, places)
    words = "; ".join(
        ("insulate " + k + " from the metal (insulated socket or shoulder washers)")
        if verb == "insulate"
        else f"remove {k}"
        for verb, k in actions
    )
    return Finding(
        "GC105",
        "warning",
        f"signal ground {name} is bonded to the chassis at {len(places)} places: {desc}",
        ctx.loc(places[others[0]][0]),
        tuple(dict.fromkeys(k for p in bonds for k in places[p])),
        {"bonds": len(places)},
        f"keep the bond at {keep}{why}; {words}",
        actions,
    )


def _pot_only(ctx: AuditContext, name: str, places: dict, comp: list) -> Finding | None:
    """GC105, a note: a piece of equipment's signal ground bonded to its chassis by a pot's body
    alone — a bushing through a panel, loosened by every turn of the knob, is the poorest bond
    there is (common practice: the bond is a stud of its own near the protective earth).  Only a
    network that holds a star: one without (an input's sleeve wired to the pot's lug) reaches the
    star through the pot's wiring."""
    kinds = ctx.plan.index.points
    if len(places) != 1 or not any(n in kinds and kinds[n].kind == "star" for n in comp):
        return None  # a network with no star (an input's sleeve wired to the pot) hangs on it
    (p,) = places
    point = ctx.plan.point(p)
    held = _fastenings(ctx, {p}).get(p, [])
    if point is None or point.kind != "pot" or not held:
        return None
    return Finding(
        "GC105",
        "note",
        f"signal ground {name} is bonded to the chassis by the body of pot {p} alone "
        f"({', '.join(held)}): a bushing through the panel, loosened by every turn of the knob, "
        "is a poor bond",
        ctx.loc(held[0]),
        (*held, p),
        {"bonds": 1},
        f"bond the signal ground at a stud of its own near the protective earth, and insulate "
        f"{p} from the metal (an insulated-bushing pot or shoulder washers)",
        tuple(("insulate", k) for k in held),
    )


def _held_by_links(ctx: AuditContext, comp: list, name: str, bonded: set, equipment: dict):
    """GC106: a class I piece of equipment plugged into the mains whose signal ground holds its
    own supply's return but is bonded to no chassis of its own: it reaches the protective earth
    only through its links to other equipment (their shields would carry a fault in its own
    transformer)."""
    device_of, devices = ctx.plan.index.device_of, ctx.plan.index.devices
    points = set(comp)
    out = []
    for key in sorted(set(equipment.values()) - bonded):
        members = sorted(d for d, k in equipment.items() if k == key)
        powered = any(
            devices[d].plugged is not None and devices[d].equipment_class == "I" for d in members
        )
        # an extra-low-voltage supply's outputs may float (a pedal supply's, as a class II one's)
        supplies = sorted(
            r.name
            for r in ctx.plan.rectifiers
            if device_of(r.name) in members
            and {r.a, r.b} & points
            and winding_span(r, ctx.plan.rectifiers) > ELV_LIMIT
        )
        if not (powered and supplies):
            continue
        own = sorted(p for p in comp if device_of(p) in members)
        out.append(
            Finding(
                "GC106",
                "fault",
                f"signal ground {name} of {', '.join(members)} reaches the protective earth only "
                f"through its links to other equipment: it holds the return of "
                f"{', '.join(supplies)}, and an insulation fault in that transformer would send "
                "its current down the links' shields; a class I box keeps a bond of its own",
                min(ctx.loc(n) for n in own),
                tuple(own[:12]),
                {"points": len(own)},
                f"bond {', '.join(members)}'s signal ground to its own chassis at one place near "
                "its protective-earth stud (directly or through a ground-lift network); never "
                "rely on a link's shield for it",
            )
        )
    return out


def _floating(ctx: AuditContext, comp: list[str], name: str) -> Finding:
    """GC106: signal-ground network ``comp`` reaches neither the chassis nor the protective earth;
    a fault when it holds a mains-fed supply's return in class I equipment."""
    first = min(ctx.loc(n) for n in comp)
    supplies = _supplies_in(ctx, comp)
    live = (
        f"; it holds the return of {', '.join(supplies)}: the supply and everything on "
        "its ground (output windings, speaker terminals, sockets) have no path to the "
        "protective earth, so an insulation fault in the transformer would leave them live"
        if supplies
        else ""
    )
    return Finding(
        "GC106",
        "fault" if supplies else "warning",
        f"signal ground {name} is floating: it reaches neither the chassis nor the "
        f"protective earth{live}",
        first,
        tuple(comp[:12]),
        {"points": len(comp)},
        _floating_fix(ctx, comp),
    )


def _supplies_in(ctx: AuditContext, comp: list[str]) -> list[str]:
    """The rectifiers of class I equipment whose return lies in the signal-ground network
    ``comp``: a mains-fed supply that floats with it (common practice: in class I equipment the
    secondary circuits' ground is bonded to the protective earth, directly or through a lift
    network)."""
    mains = ctx.plan.mains
    if mains is None or mains.equipment_class != "I":
        return []
    points = set(comp)
    return sorted(r.name for r in ctx.plan.rectifiers if {r.a, r.b} & points)


def _fastenings(ctx: AuditContext, points: set[str]) -> dict[str, list[str]]:
    """The fastenings that hold each of ``points`` on a metal part (a socket's nut), by point: a
    bond reaches the chassis through them."""
    out: dict[str, list[str]] = {}
    for c in ctx.plan.conductors:
        for p in {c.a, c.b} & points:
            if is_fastening(c, ctx.metals) and p not in ctx.metals:
                out.setdefault(p, []).append(c.name)
    return {p: sorted(ks) for p, ks in out.items()}


def _unbond_actions(ctx: AuditContext, others: list[str], places: dict) -> tuple:
    """How to undo each extra bond: a point of the signal circuit or a socket, jack, pot or
    terminal fastened to the metal is insulated from it, keeping its own ground wire (its return);
    any other bond conductor is removed."""
    actions = []
    kinds = {p.name: p.kind for p in ctx.plan.points}
    wanted = {p for p in others if p in ctx.signal_points or kinds.get(p) in SOCKET_KINDS}
    fastened: dict[str, list[str]] = {}
    if wanted:  # one pass over the conductors, not one per bond
        for c in ctx.plan.conductors:
            for p in {c.a, c.b} & wanted:
                if is_fastening(c, ctx.metals):
                    fastened.setdefault(p, []).append(c.name)
    for p in others:
        fastenings = fastened.get(p, [])
        if fastenings:
            actions.extend(("insulate", k) for k in sorted(fastenings))
        else:
            actions.extend(("remove", k) for k in places[p])
    return tuple(actions)


def _component_name(ctx: AuditContext, comp: list[str]) -> str:
    stars = [
        n
        for n in comp
        if n in ctx.G
        and ctx.G.nodes[n].get("point") is not None
        and ctx.G.nodes[n]["point"].kind == "star"
    ]
    if stars:
        return "around " + ", ".join(stars[:3]) + ("…" if len(stars) > 3 else "")
    return "at " + ", ".join(comp[:3]) + ("…" if len(comp) > 3 else "")


def _nearest_pe(
    ctx: AuditContext, candidates: list[str], comp=(), supply=frozenset()
) -> tuple[str, str]:
    """The bond to keep, and why: any before one made by a supply's own lead (``supply``: a
    rectifier's end wired to a tag, whose removal for service or a loose transformer screw would
    leave the signal ground floating), a deliberate one (not a socket's own ground fastened to the
    metal) before a socket's, a socket's before a pot's body, then one on the box that holds the
    signal star (of two boxes, the supply box's bond goes: common practice), then the nearest the
    equipment's protective earth."""
    sockets = {p.name for p in ctx.plan.points if p.kind in SOCKET_KINDS}
    # a pot's body is the poorest bond of all (a bushing through a painted panel, turned by
    # every knob): kept only when nothing else is (common practice)
    pots = {p.name for p in ctx.plan.points if p.kind == "pot"}
    star_box = {
        box
        for n in comp
        if (p := ctx.plan.point(n)) is not None and p.kind == "star"
        for box in _boxes(ctx, p)
    }
    boxes = {c: next(iter(_boxes(ctx, ctx.plan.point(c))), None) for c in candidates}
    away = {c for c in candidates if star_box and len(set(boxes.values())) > 1}
    away = {c for c in away if boxes[c] not in star_box}
    pe = pe_point(ctx, candidates[0])
    if pe not in ctx.G:
        keep = min(candidates, key=lambda c: (c in supply, c in sockets, c in pots, c))
        return keep, "" if keep in sockets else " (not a socket's own ground)"
    dist, _ = bfs(ctx.adj, [pe], lambda v: v in ctx.chassis_side)
    # equal hop counts (two studs on the same plate, say) are told apart by the distance on the
    # plate from the protective earth's own landing point, then by name
    landings = [q.pos for q in ctx.plan.points if q.pos is not None and dist.get(q.name) == 1]

    def metres(c: str) -> float:
        point = ctx.plan.point(c)
        pos = None if point is None else point.pos
        if pos is None or not landings:
            return math.inf
        return min(math.dist(pos, q) for q in landings)

    def order(c: str) -> tuple:
        return (c in sockets, c in pots, c in away, dist.get(c, 10**9), metres(c), c)

    keep = min(candidates, key=lambda c: (c in supply, *order(c)))
    nearest = min(candidates, key=lambda c: (dist.get(c, 10**9), metres(c), c))
    unweighed = min(candidates, key=order)
    if keep != unweighed:
        return keep, f" (the bond at {unweighed} is a supply's own lead, a winding's side)"
    if keep == nearest:
        return keep, ", nearest the protective earth"
    if nearest in away and keep not in away:
        return keep, ", on the box that holds the signal star"
    if keep in sockets:
        return keep, " (a socket's fastening holds better than a pot's body)"
    return keep, " (not a socket's own ground)"


def _boxes(ctx: AuditContext, p) -> set:
    """The metal part a point sits on: the one it is written ``on``, else the ones whose outline
    holds its position (none for a point without either)."""
    if p is None:
        return set()
    if p.on:
        return {p.on}
    if p.pos is None:
        return set()
    return {m.name for m in ctx.plan.metals if m.size is not None and m.contains(p.pos)}
