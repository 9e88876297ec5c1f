"""Topology rules: loops, stars, chassis bonds of the signal ground, heaters, shields, unconnected
points.

Each rule is a pure function of an :class:`~groundcheck.rules.context.AuditContext` returning
findings, registered under the codes it makes (:mod:`groundcheck.rules.registry`).
"""

from __future__ import annotations

import math


from ..model.kinds import PROTECTIVE, is_fastening, is_fastening_kind, joins_devices, shield_like
from ..model.records import PE_POINT
from ..network.graph import Loop, part_labels
from .catalogue import Finding
from .context import LOOP_CLASSES, LOOP_LIST_LIMIT, AuditContext, bfs
from .floating import floating_fix as _floating_fix
from .registry import rule
from .repairs import shield_fix, supply_ends, supply_meetings

__all__ = [
    "rule_loops",
    "rule_stars",
    "rule_signal_bonds",
    "rule_heaters",
    "rule_shields",
    "rule_unconnected",
]


def _loop_text(lp: Loop) -> str:
    return " → ".join(lp.nodes + lp.nodes[:1])


@rule("GC101")
def rule_loops(ctx: AuditContext) -> list[Finding]:
    """GC101: the ground loops, each classified by what closes it, with the conductor to open.

    Parameters:
        ctx: the audit context.
    Returns:
        GC101 findings.
    References:
        the rule catalogue (rules/catalogue.py), which names each code's sources.
    """
    out = []
    for info in ctx.loops:
        if info.closed_by == "chassis-structure":
            continue
        figures = {"conductors": len(info.loop.edges)}
        if info.area is not None:
            figures["area_mm2"] = round(info.area * 1e6, 1)
        fix, actions = _loop_fix(info, ctx.conductors.get(info.open_at), ctx)
        out.append(
            Finding(
                "GC101",
                "warning",
                f"ground loop closed by {LOOP_CLASSES[info.closed_by]}: {_loop_text(info.loop)}",
                ctx.loc(info.open_at or info.loop.edges[-1]),
                info.loop.edges,
                figures,
                fix,
                actions,
            )
        )
    extra = (
        ctx.loop_total
        - len(ctx.loops)
        - sum(1 for c in ctx.plan.conductors if c.connects and c.a == c.b)
    )
    if extra > 0:
        out.append(
            Finding(
                "GC101",
                "note",
                f"{extra} more independent loops not listed (limit {LOOP_LIST_LIMIT})",
                ctx.plan.location,
                (),
                {"loops_total": ctx.loop_total},
                "open the loops listed first",
            )
        )
    return out


def _loop_fix(info, opener, ctx: AuditContext) -> tuple[str, tuple]:
    """What to do about a loop, by what closes it and where it opens: (the fix, its structured
    actions)."""
    if (
        info.closed_by == "mains-cords"
        and opener is not None
        and joins_devices(opener)
        and opener.balanced
    ):
        return (
            f"{info.open_at} is balanced: its input rejects the loop's current by its common-mode "
            "rejection (the hum budget gives what is left); if hum remains, plug the devices "
            "into one outlet or strip, or use an input of better rejection; never lift the "
            "protective earth"
        ), ()
    if opener is not None and is_fastening(opener, ctx.metals):
        where = f"insulate {info.open_at} from the metal (insulated socket or shoulder washers)"
        actions = (("insulate", info.open_at),)
    elif opener is not None:
        where, actions = f"open the loop at {info.open_at}", (("open", info.open_at),)
    else:
        where, actions = "open the loop outside the protective earth", ()
    return where + {
        "shield-both-ends": " (terminate the shield at one end only)",
        "channel-returns": " (join the channels at one point only)",
        "second-chassis-bond": " (keep one bond of the signal ground to the chassis)",
        "metal-return": " (return currents by wire, not through the metal)",
        "mains-cords": " (use a balanced interconnect or a ground-lift network on the signal "
        "side; never lift the protective earth)",
    }.get(info.closed_by, ""), actions


@rule("GC103", "GC104")
def rule_stars(ctx: AuditContext) -> list[Finding]:
    """GC103, GC104: stars that are chains, stars with one branch.

    Parameters:
        ctx: the audit context.
    Returns:
        GC103, GC104 findings.
    References:
        the rule catalogue (rules/catalogue.py), which names each code's sources.
    """
    out = []
    stars = [p for p in ctx.plan.points if p.kind == "star" and p.name in ctx.G]
    if not stars:
        return out
    terminals = {t for t in ctx.signal_points if t in ctx.G and t not in ctx.chassis_side}
    star_names = {s.name for s in stars}
    allowed = lambda v: v not in ctx.metals  # noqa: E731
    for s in stars:
        degree = ctx.G.degree(s.name)
        if degree == 1:
            ((u, v, k),) = ctx.G.edges(s.name, keys=True)
            out.append(
                Finding(
                    "GC104",
                    "note",
                    f"star {s.name} has a single branch ({k})",
                    s.location,
                    (s.name, k),
                    {"branches": 1},
                    "connect the returns that should gather there, or call it a junction",
                )
            )
    # each terminal belongs to its nearest star; a chain is a terminal whose path passes another
    # terminal
    dist, parent = bfs(ctx.adj, sorted(star_names), allowed)
    groups = {p.name: p.group for p in ctx.plan.points}
    chains: dict[str, list[tuple[str, str]]] = {}
    supplies = supply_ends(ctx.plan)
    for t in sorted(terminals - star_names):
        if t not in dist:
            continue
        path = [t]
        while parent[path[-1]] is not None:
            path.append(parent[path[-1]])
        star = path[-1]
        if groups.get(star) and groups.get(t) != groups.get(star):
            continue  # a star placed in a block or device gathers that placement's returns only
        via = [
            n
            for n in path[1:-1]
            if n in terminals and frozenset((t, n)) not in ctx.source_pairs | supplies
        ]
        if via:
            chains.setdefault(star, []).append((t, via[0]))
    for star, pairs in sorted(chains.items()):
        desc = "; ".join(f"{t} reaches it through {u}" for t, u in pairs)
        elements = tuple(sorted({star, *(x for p in pairs for x in p)}))
        first = min((ctx.loc(t) for t, _ in pairs))
        out.append(
            Finding(
                "GC103",
                "warning",
                f"star {star} is partly a chain: {desc}",
                first,
                elements,
                {"chained_returns": len(pairs)},
                "; ".join(f"run {t} to {star} by a wire of its own" for t, _ in pairs),
            )
        )
    out += _stars_through_other_placements(ctx, stars, groups, allowed)
    out += [
        Finding("GC103", "warning", msg, loc, elements, {"chained_returns": 1}, fix, acts)
        for loc, elements, msg, fix, acts in supply_meetings(ctx)
    ]
    return out


def _stars_through_other_placements(
    ctx: AuditContext, stars, groups: dict, allowed
) -> list[Finding]:
    """GC103 for a star of one placement (a channel) that reaches the plan's own star only through
    the star of another placement: its returns then flow in the other channel's star wire
    (dual-mono practice: each channel's star on a wire of its own to the common star, common
    practice)."""
    own = sorted(s.name for s in stars if not groups.get(s.name))
    placed = [s for s in stars if groups.get(s.name)]
    if not own or not placed:
        return []
    _, parent = bfs(ctx.adj, own, allowed)
    out = []
    for s in placed:
        if s.name not in parent:
            continue
        path = [s.name]
        while parent[path[-1]] is not None:
            path.append(parent[path[-1]])
        via = next(
            (
                n
                for n in path[1:-1]
                if groups.get(n)
                and groups.get(n) != groups.get(s.name)
                and ctx.plan.point(n).kind == "star"
            ),
            None,
        )
        if via is None:
            continue
        root, link = (
            path[-1],
            next((k for k in ctx.G[s.name].get(via, {}) if path[1] == via), None),
        )
        out.append(
            Finding(
                "GC103",
                "warning",
                f"star {s.name} reaches {root} only through {via}, the star of {groups[via]}: the "
                f"returns of {groups[s.name]} flow in its wiring",
                ctx.loc(link) if link else s.location,
                tuple(sorted({s.name, via, root} | ({link} if link else set()))),
                {"chained_returns": 1},
                f"run {s.name} to {root} by a wire of its own",
                (("reroute", link, root),) if link else (),
            )
        )
    return out


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
    for comp, places in _signal_grounds(ctx):
        name = _component_name(ctx, comp)
        if len(places) > 1:
            desc = ", ".join(f"{p} (by {', '.join(ks)})" for p, ks in sorted(places.items()))
            bonds = sorted(places)
            # keep the bond nearest the protective earth
            keep = _nearest_pe(ctx, bonds)
            others = [b for b in bonds if b != keep]
            first_other = places[others[0]][0]
            actions = _unbond_actions(ctx, others, places)
            words = "; ".join(
                ("insulate " + k + " from the metal (insulated socket or shoulder washers)")
                if verb == "insulate"
                else f"remove {k}"
                for verb, k in actions
            )
            out.append(
                Finding(
                    "GC105",
                    "warning",
                    f"signal ground {name} is bonded to the chassis at {len(places)} places: "
                    f"{desc}",
                    ctx.loc(first_other),
                    tuple(k for p in bonds for k in places[p]),
                    {"bonds": len(places)},
                    f"keep the bond at {keep}, nearest the protective earth; {words}",
                    actions,
                )
            )
        elif not places:
            first = min(ctx.loc(n) for n in comp)
            out.append(
                Finding(
                    "GC106",
                    "warning",
                    f"signal ground {name} is floating: it reaches neither the chassis nor the "
                    "protective earth",
                    first,
                    tuple(comp[:12]),
                    {"points": len(comp)},
                    _floating_fix(ctx, comp),
                )
            )
    return out


def _signal_grounds(ctx: AuditContext) -> list[tuple[list[str], dict[str, list[str]]]]:
    """Each signal-ground network (a connected part of the graph without the chassis side and
    protective conductors that holds a signal point): its points, and its bonds to the chassis side
    by chassis point."""
    G, side = ctx.G, ctx.chassis_side
    order = list(G.nodes)
    idx = {n: i for i, n in enumerate(order)}
    rows, cols = [], []
    crossing = []  # (signal-side node, chassis-side node, conductor): the bonds
    for u, v, k, d in ctx.edges:
        us, vs = u in side, v in side
        if not us and not vs:
            if d["conductor"].role != PROTECTIVE:
                rows.append(idx[u])
                cols.append(idx[v])
        elif us != vs and not joins_devices(d["conductor"]):
            crossing.append((v, u, k) if us else (u, v, k))
    n = len(order)
    _, labels = part_labels(n, rows, cols)
    members: dict[int, list[str]] = {}
    for name in order:
        if name not in side:
            members.setdefault(int(labels[idx[name]]), []).append(name)
    bonds_of: dict[int, dict[str, list[str]]] = {}
    for node, chassis, k in crossing:
        bonds_of.setdefault(int(labels[idx[node]]), {}).setdefault(chassis, []).append(k)
    out = []
    for label in sorted(members, key=lambda k: min(members[k])):
        comp = sorted(members[label])
        if set(comp) & ctx.signal_points:
            out.append((comp, {c: sorted(ks) for c, ks in bonds_of.get(label, {}).items()}))
    return out


def _unbond_actions(ctx: AuditContext, others: list[str], places: dict) -> tuple:
    """How to undo each extra bond: a point of the signal circuit fastened to the metal (a socket)
    is insulated from it, keeping its own ground wire; any other bond conductor is removed."""
    actions = []
    wanted = {p for p in others if p in ctx.signal_points}
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


def _nearest_pe(ctx: AuditContext, candidates: list[str]) -> str:
    if PE_POINT not in ctx.G:
        return candidates[0]
    dist, _ = bfs(ctx.adj, [PE_POINT], lambda v: v in ctx.chassis_side)
    # equal hop counts (two studs on the same plate, say) are told apart by the distance on the
    # plate from the protective earth's own landing point, then by name
    landings = [q.pos for q in ctx.plan.points if q.pos is not None and dist.get(q.name) == 1]

    def metres(c: str) -> float:
        point = ctx.plan.point(c)
        pos = None if point is None else point.pos
        if pos is None or not landings:
            return math.inf
        return min(math.dist(pos, q) for q in landings)

    return min(candidates, key=lambda c: (dist.get(c, 10**9), metres(c), c))


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
    return [
        Finding(
            "GC107",
            "warning",
            f"heater supply {h.name} has no reference to ground",
            h.location,
            (h.name,),
            {"current_a": h.current},
            "reference it: centre tap or two equal resistors to ground, or an elevated DC "
            "reference",
        )
        for h in ctx.plan.heaters
        if h.reference is None
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
    both = [
        c
        for c in ctx.plan.conductors
        if shield_like(c) and not joins_devices(c) and c.terminated == "both"
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
    placed = {p.name: (p.group or "").split(".", 1)[0] for p in ctx.plan.points}
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
        # a cable between two pieces of equipment, or an umbilical's core between two boxes, runs
        # as it likes: only too short counts
        slack = math.inf if placed.get(c.a) != placed.get(c.b) or c.bundle else LENGTH_SLACK
        if route > 0 and (
            c.length < route * (1 - LENGTH_SHORT) or c.length > slack * route + 0.05
        ):
            what = "shorter than" if c.length < route else f"over {LENGTH_SLACK:g} times"
            out.append(
                Finding(
                    "GC112",
                    "note",
                    f"{c.kind} {c.name} is {c.length * 1e3:.0f} mm long, {what} the "
                    f"{route * 1e3:.0f} mm between its ends",
                    c.location,
                    (c.name,),
                    {"length_mm": round(c.length * 1e3, 1), "route_mm": round(route * 1e3, 1)},
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
    out = []
    order, labels, _ = ctx.parts
    members: dict[int, set] = {}
    for name, label in zip(order, labels.tolist()):
        members.setdefault(label, set()).add(name)
    # a class II device's inlet has no protective conductor in its cord: left on its own, it is as
    # it should be
    idle = {f"{d.name}.{PE_POINT}" for d in ctx.plan.devices if d.equipment_class == "II"}
    idle |= {t.name for t in ctx.plan.transformers if t.isolating}  # floating secondaries
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
    for c in ctx.plan.conductors:
        if c.a == c.b:
            out.append(
                Finding(
                    "GC110",
                    "warning",
                    f"{c.kind} {c.name} has both ends at {c.a}",
                    c.location,
                    (c.name,),
                    {},
                    "name the conductor's real ends",
                )
            )
    return out
