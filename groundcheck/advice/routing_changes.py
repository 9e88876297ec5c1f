"""Returns re-routed (common practice): a return run to its star by a wire of its own, a supply's
two return ends (a rectifier's charging current, a filter capacitor's ripple) joined directly so
that its current leaves the shared ground, a stage's reference taken to the star, a channel's
load return taken off another channel's ground; and any rule's structured actions (move, join,
remove, insulate) carried out as written."""

from __future__ import annotations

import math

from ..core.units import wire_size
from ..model.kinds import SIGNAL, is_fastening, shield_like
from ..rules.catalogue import RULES
from .changes import ROUTE_ALLOWANCE, Answer, Candidate, ChangeContext, delete_change, reroute
from .protective_changes import at_end, free_name
from .returns import refuse

__all__ = [
    "carried_actions",
    "star_candidates",
    "shared_return_candidates",
    "crosstalk_candidates",
]


def _near_far(dist: dict, c) -> tuple[str, str]:
    """``c``'s end nearer a point (by ``dist``, hops from it) and its other end."""
    near = c.a if dist.get(c.a, 10**9) < dist.get(c.b, 10**9) else c.b
    return near, (c.b if near == c.a else c.a)


def carried_actions(ctx: ChangeContext, f, add) -> None:
    """Any other rule's structured actions (a rule added later needs no code here): ("reroute",
    conductor, point) moves the conductor's end nearer the point onto it; ("remove", conductor) and
    ("insulate", fastening) delete it.  Each is evaluated like every candidate."""
    import networkx as nx

    for verb, name, *where in f.actions:
        c = ctx.cond.get(name)
        if c is None or f.code not in RULES:
            continue
        if verb in ("reroute", "move", "join") and where and where[0] in ctx.G:
            if is_fastening(c, ctx.metals):
                continue  # a bolt holds a point to the metal under it: it runs nowhere else
            near, far = _near_far(nx.single_source_shortest_path_length(ctx.G, where[0]), c)
            title = f"take {far} to {where[0]} by its own wire ({name})"
            verb = "join" if verb == "join" else "move"
            add(reroute(ctx, name, near, where[0], title, f.code, verb))
        elif verb in ("remove", "insulate"):
            add(delete_change(ctx, name, f"{verb} {name}", f.code, verb))


def star_candidates(ctx: ChangeContext, f, add) -> None:
    """GC103: the finding's own actions (a star reaching the common star through another
    channel's, a supply's two returns meeting only at the star); without any, each wire between
    two of its points runs to its star by a wire of its own."""
    if f.actions:
        _star_actions(ctx, f, add)
    else:
        _star_wires(ctx, f, add)


def _star_actions(ctx: ChangeContext, f, add) -> None:
    """The finding's ("reroute" | "join", conductor, point) actions: its end nearer the point moved
    onto it."""
    import networkx as nx

    for verb, name, *where in f.actions:
        if verb == "return-to":
            add(return_to(ctx, f, name, *where))
            continue
        c = ctx.cond.get(name)
        if verb not in ("reroute", "join") or c is None or not where:
            continue
        near, far = _near_far(nx.single_source_shortest_path_length(ctx.G, where[0]), c)
        if verb == "join":  # a supply's two returns meeting only at the star
            title = (
                f"join {far} straight to {where[0]} ({name}), so the supply's current "
                "circulates between them and leaves the star"
            )
            add(reroute(ctx, name, near, where[0], title, f.code, "join"))
        else:
            title = f"run {far} to {where[0]} by its own wire ({name})"
            add(reroute(ctx, name, near, where[0], title, f.code))


def return_to(ctx: ChangeContext, f, supply: str, x: str, y: str) -> Candidate | None:
    """A filter's or regulator's return moved off a stage's ground point ``x`` to the reservoir's
    ``y``: the rectifier statement's ``… to X`` phrase names ``y`` (its cold end rewired there);
    None when the statement cannot be edited here (an included file) or names another point."""
    r = next((r for r in ctx.plan.rectifiers if r.name == supply), None)
    st = ctx.src.statement(r.location.line, r.location.file) if r is not None else None
    if st is None or not ctx.same_file(st, y):
        return None
    word = "regulator" if x == r.regulator_point else "filter"
    ph = ctx.src.find(st, word)
    last = ph[-1] if ph else None
    if last is None or last.kind != "word" or last.value != ctx.file_name(x, st):
        return None
    return Candidate(
        f"take {supply}'s {word} return off {x} to {y} (rewire its cold end there), so its "
        f"current leaves {x}, a stage's ground, and the star",
        f.code,
        (ctx.src.replace(st, [(last, ctx.file_name(y, st))]),),
        action="return-to",
        element=supply,
    )


def _star_wires(ctx: ChangeContext, f, add) -> None:
    """Each non-protective conductor between two of the finding's points (none on its first star)
    runs to that star by a wire of its own."""
    import networkx as nx

    stars = [e for e in f.elements if e in ctx.stars]
    if not stars:
        return
    dist = nx.single_source_shortest_path_length(ctx.G, stars[0])
    for c in ctx.plan.conductors:
        if (
            c.a in f.elements
            and c.b in f.elements
            and not ctx.protective(c)
            and stars[0] not in (c.a, c.b)
        ):
            near, far = _near_far(dist, c)
            title = f"run {far} to {stars[0]} by its own wire ({c.name})"
            add(reroute(ctx, c.name, near, stars[0], title, f.code))


def _bonded_without(ctx: ChangeContext, point: str, wire) -> bool:
    """Whether ``point`` reaches a metal part through the plan's conductors without ``wire``."""
    import networkx as nx

    G = nx.restricted_view(ctx.G, [], [(wire.a, wire.b, wire.name)])
    if point not in G:
        return False
    return any(n in ctx.metals for n in nx.node_connected_component(G, point))


def _fastened(ctx: ChangeContext, point: str) -> bool:
    """Whether ``point`` is held on a metal part by a fastening (a lug, stud or bolted socket)."""
    return ctx.fastened_to(point) is not None


def _join_ways(ctx: ChangeContext, row) -> list[tuple]:
    """The conductors whose far end may move to join a return's two ends: (end, other, conductor,
    far) each."""
    # never one of the shared conductors (moving it re-routes the ground itself), nor a wire to a
    # point fastened to metal (the ground's bond to the chassis: moving it takes the bond away) —
    # unless it is the winding's own lead to a tag (a centre tap under a transformer screw) and
    # the ground keeps a bond without it: the builder's fix, the winding straight to the reservoir
    winding = {r.b for r in ctx.plan.rectifiers}
    ways = []
    for end, other in ((row.a, row.b), (row.b, row.a)):
        for d in ctx.at(other):
            far = d.b if d.a == other else d.a
            # a wire written 'signal' is a stage's reference, never a supply's return to join
            if (
                other in (d.a, d.b)
                and not shield_like(d)
                and not ctx.protective(d)
                and d.role != SIGNAL
                and d.name not in row.shared
                and (
                    not _fastened(ctx, far) or (other in winding and _bonded_without(ctx, end, d))
                )
                and any(x.name != d.name for x in ctx.at(far))  # never leaves far wired to nothing
            ):
                ways.append((end, other, d, far))
    return ways


def _join_ends(ctx: ChangeContext, row, reason: str, add, hops) -> None:
    """A rectifier's return (its charging current, or its filter capacitor's ripple current) whose
    two ends are not joined by a conductor of their own: move the far end of a conductor leaving
    one end onto the other, so that the current circulates between them alone (common practice:
    reservoir negative and centre tap or bridge negative joined directly; a filter capacitor's
    negative to the reservoir's). Of the ways to join them, one that leaves the supply's link to
    the signal ground nearer the most sensitive stage than another way would is refused: the
    stages' own return currents would run the length of the ground to it (common practice: the
    supply meets the signal ground at the star or the output end, never the input's)."""
    if any({d.a, d.b} == {row.a, row.b} for d in ctx.at(row.a)):
        return
    ways = _join_ways(ctx, row)
    stage_ends = ctx.plan.index.stage_ends
    landing = [_landing(ctx, row, w[2], hops) for w in ways]
    best = max((x[0] for x in landing if x[0] is not None), default=None)
    for (end, other, d, far), (near, at) in zip(ways, landing):
        c = reroute(
            ctx,
            d.name,
            far,
            end,
            f"join {other} straight to {end} ({d.name}), so the supply's return current "
            f"stays between them and leaves {', '.join(row.shared)}",
            reason,
            "join",
        )
        if end in stage_ends and other not in stage_ends:
            # a supply's return hung on a stage's own ground point: the stage's reference would
            # carry it (common practice: the return goes to the supply, never to a stage)
            c = refuse(
                c,
                f"it would hang {other}'s return on {end}, a stage's ground (its reference "
                "would carry the supply's current): move the supply's return off the stage "
                "instead",
            )
        elif at in stage_ends and any(x[1] not in stage_ends for x in landing if x[1]):
            # a bridge negative's lead to the first stage's tag kept, the other way leaves none
            why = f"it leaves the supply's only link to the signal ground on {at}, a stage's"
            c = refuse(c, why + " ground, where joining the other way takes it off the stages")
        elif best is not None and near is not None and near < best:
            c = refuse(
                c,
                f"it leaves the supply's link to the signal ground at {at}, nearer {hops[1]} "
                f"(the most sensitive stage) than joining the other way does: every stage's "
                "own return current would run along the ground to it",
            )
        add(c)


def _own_wire(ctx: ChangeContext, row, reason: str, off_metal: bool = False) -> Candidate | None:
    """A short wire of its own between a supply return's two ends (reservoir negative and bridge
    negative), beside whatever joins them now: the rule's own fix, for a return that runs through
    a plate or a bus with no wire of its own to move.  With ``off_metal``, the fastening that
    lands one end on a plate (a bridge negative bolted to a ground plane) comes off in the same
    change, so the current has no other way.  Both ends in the plan's own file, with positions;
    the wire as thick as the thickest non-protective wire at either end (0.5 mm², a hook-up wire,
    when none says: common practice)."""
    if any({d.a, d.b} == {row.a, row.b} for d in ctx.at(row.a)):
        return None  # joined by a conductor of their own already
    pa, pb = ctx.points.get(row.a), ctx.points.get(row.b)
    if pa is None or pb is None or pa.pos is None or pb.pos is None:
        return None
    if "." in row.a + row.b:
        return None  # inside a block or a device: a new statement there is the block's own
    if {pa.location.file, pb.location.file} != {ctx.plan.file}:
        return None
    areas = [
        d.area
        for e in (row.a, row.b)
        for d in ctx.at(e)
        if d.area and not ctx.protective(d) and not shield_like(d)
    ]
    area = max(areas, default=0.5e-6) * 1e6
    length = max(math.dist(pa.pos, pb.pos) * (1 + ROUTE_ALLOWANCE), 10e-3) * 1e3
    name = free_name(ctx, (f"{row.b}_ret", f"{row.b}_ret2", f"{row.b}_ret3"))
    st = ctx.statement(next(iter(ctx.at(row.a)), None)) if ctx.at(row.a) else None
    if st is None or st.loc.file != ctx.plan.file:
        return None
    size, shown = wire_size(area / 1e6)
    extra = (f"wire {name}: {row.a} to {row.b}, {length:.0f} mm, {size}, return",)
    edits, off = [at_end(ctx, st, extra)], ""
    if off_metal:
        if row.source not in {r.name for r in ctx.plan.rectifiers}:
            return None  # a filter's or regulator's return: the reservoir keeps its place
        # the rectifiers' end (bridge negative, centre tap) comes off; the reservoir keeps its
        # link to the ground
        held = [
            (row.b, d)
            for d in ctx.at(row.b)
            if is_fastening(d, ctx.metals) and not ctx.protective(d)
        ]
        if len(held) != 1:
            return None
        ((end, bolt),) = held
        gone = ctx.statement(bolt)
        if gone is None or gone.loc.file != ctx.plan.file:
            return None
        edits.insert(0, ctx.src.delete(gone))
        off = f", and {end} off the metal ({bolt.name} out)"
    return Candidate(
        f"join {row.a} and {row.b} by a short wire of their own ({name}, {length:.0f} mm, "
        f"{shown}){off}, so the supply's return current stays between them and leaves "
        f"{', '.join(row.shared)}",
        reason,
        tuple(edits),
        action="join",
        element=name,
        wire=length / 1e3,
    )


def _from_most_sensitive(ctx: ChangeContext) -> tuple[dict, str | None]:
    """Hops through the ground network from the points of the stage of highest gain, and its
    name (({}, None) without stages)."""
    import networkx as nx

    stages = [s for s in ctx.plan.stages if s.a in ctx.G or s.b in ctx.G]
    if not stages:
        return {}, None
    top = max(stages, key=lambda s: (s.gain, s.name))
    sources = {p for p in (top.a, top.b, top.reference) if p in ctx.G}
    return nx.multi_source_dijkstra_path_length(ctx.G, sources, weight=None), top.name


def _landing(ctx: ChangeContext, row, moved, hops) -> tuple[int | None, str | None]:
    """Where the supply's return ends meet the rest of the ground once ``moved`` joins them: the
    nearest such point to the most sensitive stage (hops, point), (None, None) when unknown.  A
    point fastened to metal is no wired meeting (the current would reach the ground through the
    chassis): never the better way to compare with."""
    dist = hops[0]
    ends = {row.a, row.b}
    meets = []
    for e in ends:
        for d in ctx.at(e):
            if d is moved or {d.a, d.b} == ends or e not in (d.a, d.b):
                continue
            far = d.b if d.a == e else d.a
            if far in dist and not _fastened(ctx, far):
                meets.append((dist[far], far))
    if not meets:
        return None, None
    return min(meets)


def shared_return_candidates(ctx: ChangeContext, answer: Answer, add) -> None:
    """Shared returns: join the rectifier's ends directly, and re-route the stage's reference to
    the star.  Each row names its source's two ends (a rectifier's, its filter's, or a stated
    current's); the candidates answer ``answer``'s rule."""
    plan, reason = ctx.plan, answer.reason
    hops = None
    for row in ctx.result.coupling:
        if row.kind == "rectifier":
            hops = _from_most_sensitive(ctx) if hops is None else hops
            _join_ends(ctx, row, reason, add, hops)
            add(_own_wire(ctx, row, reason))
            add(_own_wire(ctx, row, reason, off_metal=True))
        stage = next((s for s in plan.stages if s.name == row.stage), None)
        if row.kind not in ("rectifier", "current") or stage is None:
            continue
        for shared in row.shared:
            c = ctx.cond.get(shared)
            if c is None:
                continue
            for end, other in ((row.a, row.b), (row.b, row.a)):
                for d in ctx.at(other):
                    # a shared conductor moved off the bus would cut the bus from the return
                    if other in (d.a, d.b) and d.name not in row.shared and not ctx.protective(d):
                        far = d.b if d.a == other else d.a
                        if far in (c.a, c.b) and far != end:
                            add(
                                reroute(
                                    ctx,
                                    d.name,
                                    far,
                                    end,
                                    f"join {other} straight to {end} ({d.name}), so the "
                                    f"{row.source} current leaves {shared}",
                                    reason,
                                    "join",
                                )
                            )
            for p in (stage.b, stage.a):
                star = ctx.nearest_star(p)
                for d in ctx.at(p):
                    if p in (d.a, d.b) and not ctx.protective(d):
                        far = d.b if d.a == p else d.a
                        if star and far != star and far in (c.a, c.b):
                            add(
                                reroute(
                                    ctx,
                                    d.name,
                                    far,
                                    star,
                                    f"take {p} to {star} by its own wire ({d.name})",
                                    reason,
                                )
                            )


def crosstalk_candidates(ctx: ChangeContext, answer: Answer, add) -> None:
    """A channel's signal return (its stated load current) that crosses another channel's
    reference: the wire leaving the return's far end is taken straight to where the current goes
    (its star), so the return no longer runs along the other channel's ground (common practice:
    each channel's load return to the star on a wire of its own)."""
    talkers = {f.elements[0] for f in answer.findings if f.elements}
    for cur in ctx.plan.currents:
        if cur.role != SIGNAL or cur.channel not in talkers:
            continue
        goal = cur.b if cur.b in ctx.stars else ctx.nearest_star(cur.b)
        for d in ctx.at(cur.a):
            if cur.a in (d.a, d.b) and not shield_like(d) and not ctx.protective(d):
                far = d.b if d.a == cur.a else d.a
                # a wire that lands on a socket is the lead plugged into it (a headphone lead's
                # common): its end stays on the socket
                socket = far in ctx.points and ctx.points[far].kind in ("sleeve", "jack")
                if goal and far != goal and not socket:
                    add(
                        reroute(
                            ctx,
                            d.name,
                            far,
                            goal,
                            f"take {cur.a} to {goal} by its own wire ({d.name}), so the "
                            f"{cur.channel} channel's return leaves the other channel's ground",
                            answer.reason,
                        )
                    )
