"""Rules on a channel's own signal return: a return that runs through chassis metal (GC114), and a
channel's own output current read by its own stages, feedback through the ground (GC306)."""

from __future__ import annotations

import networkx as nx

from ..model.kinds import shield_like
from ..physics.humsettings import SIGNAL_FREQUENCY_TEXT, at_signal_frequency
from .catalogue import Finding
from .context import AuditContext
from .graph_search import bfs
from .electrical import Solved
from .registry import rule

__all__ = [
    "rule_return_through_metal",
    "rule_ground_feedback",
    "FEEDBACK_LIMIT_DB",
    "FEEDBACK_NOTE_DB",
]

#: ground feedback through a channel's input stages above this is a fault, dB against the rated
#: output: 0.1 %, the distortion a power amplifier is commonly held to (common practice)
FEEDBACK_LIMIT_DB = -60.0

#: below this it is not reported, dB: 0.001 %, below what a distortion measurement of an
#: amplifier resolves (common practice)
FEEDBACK_NOTE_DB = -100.0


def _metal_route(ctx: AuditContext, a: str, b: str, barred: set, wired: dict) -> list[str] | None:
    """The route from a to b when every route between them passes through a metal part or an
    earth terminal (None when a wired route exists, or none at all); ``barred`` holds the metal
    parts and earth terminals, ``wired`` each other node's part of the network without them."""
    if a not in ctx.G or b not in ctx.G or a == b:
        return None
    if a in barred:
        near, _ = bfs(ctx.adj, [a], lambda n: n not in barred)
        if b in near:
            return None
    elif b not in barred and wired[a] == wired[b]:
        return None
    try:
        return nx.shortest_path(ctx.G, a, b)
    except nx.NetworkXNoPath:
        return None


def _parts_without(adj: dict, barred: set) -> dict:
    """Each node not in ``barred`` labelled by its connected part of the network without the
    barred nodes (one search for every stage, where a search per stage found the same)."""
    label: dict = {}
    for s in adj:
        if s in barred or s in label:
            continue
        label[s] = s
        stack = [s]
        while stack:
            for v in adj[stack.pop()]:
                if v not in barred and v not in label:
                    label[v] = s
                    stack.append(v)
    return label


@rule("GC114")
def rule_return_through_metal(ctx: AuditContext) -> list[Finding]:
    """GC114: a stage whose input reference reaches its ground only through metal parts.

    Parameters:
        ctx: the audit context.
    Returns:
        GC114 findings, one per stage.
    References:
        common practice: an input socket is insulated from the chassis and wired to the input
        ground.
    """
    out = []
    barred = ctx.metals | set(ctx.earth_terminals)
    wired = _parts_without(ctx.adj, barred) if ctx.plan.stages else {}
    for st in ctx.plan.stages:
        if st.across is not None:  # an interconnect's input: its shield is the return
            continue
        route = _metal_route(ctx, st.a, st.b, barred, wired)
        if route is None:
            continue
        fastenings = [
            next(iter(ctx.adj[u][v]))
            for u, v in zip(route, route[1:])
            if u in ctx.metals or v in ctx.metals
        ]
        if not fastenings:
            continue
        target = st.named or st.b
        metal = list(dict.fromkeys(n for n in route if n in ctx.metals))
        out.append(
            Finding(
                "GC114",
                "warning",
                f"stage {st.name}'s input reference {st.a} reaches its ground {st.b} only through "
                f"{', '.join(metal)}: {' → '.join(route)}",
                st.location,
                (st.name, st.a, *dict.fromkeys(fastenings)),
                {"metal_parts": len(metal)},
                f"wire {st.a} to {target} by a wire of its own and insulate {st.a} from the metal "
                f"({fastenings[0]}: an insulated socket or shoulder washers)",
                (("join", st.a, target), ("insulate", fastenings[0])),
            )
        )
    return out


def _return_wire(s: Solved, cur) -> tuple[str, str] | None:
    """The one conductor that takes a signal current from its first point into the ground, and
    where it should go instead (the current's own second point, its star); None when there is no
    single such conductor."""
    wires = [
        c
        for c in s.plan.conductors
        if cur.a in (c.a, c.b)
        and c.connects
        and not shield_like(c)
        and c.name not in s.ctx.protective_path
    ]
    if len(wires) != 1:
        return None
    c = wires[0]
    far = c.b if c.a == cur.a else c.a
    return (c.name, cur.b) if far != cur.b else None


def _own_return_fix(s: Solved, cur, ch: str) -> str:
    """GC306's fix when no single wire is to move: a return of its own; or, when the current
    already has one (a wire straight between its two points), the parallel paths its share takes
    into the input ground (a line out's shield and the loop it closes through other equipment)."""
    own = [c.name for c in s.plan.conductors if {c.a, c.b} == {cur.a, cur.b} and c.connects]
    if not own:
        return (
            f"give {cur.name} a return of its own to its star, sharing nothing with the {ch} "
            "input ground"
        )
    parallel = sorted(
        c.name
        for c in s.plan.conductors
        if cur.a in (c.a, c.b) and c.connects and c.name not in own
    )
    via = f" ({', '.join(parallel[:4])} at {cur.a})" if parallel else ""
    return (
        f"{cur.name} already returns by a wire of its own ({', '.join(own)}): the share that "
        f"reaches the {ch} input runs in parallel paths{via} and the loop they close through the "
        "rest of the ground system (GC101): open that loop, not the return wire"
    )


def _feedback_finding(s: Solved, cur, rs: list) -> Finding | None:
    """GC306 for one signal current from its feedback rows (None when below the note level)."""
    worst = max(rs, key=lambda r: (r.input_db, -r.frequency))
    if worst.input_db <= FEEDBACK_NOTE_DB:
        return None
    at_1k = next((r for r in rs if at_signal_frequency(r.frequency)), worst)
    severity = "fault" if worst.input_db > FEEDBACK_LIMIT_DB else "note"
    move = _return_wire(s, cur)
    ch = cur.channel
    if move:
        fix = (
            f"take {cur.a}'s return to {move[1]} by a wire of its own (move {move[0]}), so that "
            f"it shares nothing with the {ch} input ground"
        )
    else:
        fix = _own_return_fix(s, cur, ch)
    return Finding(
        "GC306",
        severity,
        f"the {ch} channel's own current {cur.name} ({cur.a} → {cur.b}) flows in the ground its "
        f"input reads: {at_1k.db:.1f} dB of the output fed back at {SIGNAL_FREQUENCY_TEXT} "
        f"({at_1k.input_db:.1f} dB through its input stages; worst {worst.input_db:.1f} dB "
        f"at {worst.frequency:g} Hz)",
        s.ctx.conductors[move[0]].location if move else cur.location,
        (*((move[0],) if move else ()), cur.name),
        {
            "feedback_db": at_1k.db,
            "input_db": at_1k.input_db,
            "worst_input_db": worst.input_db,
            "worst_frequency_hz": worst.frequency,
            "channel": ch,
        },
        fix,
        (("reroute", move[0], move[1]),) if move else (),
    )


@rule("GC306", needs="solve", hum=True)
def rule_ground_feedback(s: Solved) -> list[Finding]:
    """GC306: a channel's own output or load current flowing in the ground its input stages read.

    Parameters:
        s: the solved network with its context.
    Returns:
        GC306 findings, one per signal current: a fault when its input stages' feedback is above
        FEEDBACK_LIMIT_DB at 1 kHz or a hum harmonic, a note above FEEDBACK_NOTE_DB.
    References:
        common-impedance coupling (see GC102); the limit: common practice.
    """
    if s.hum is None:
        return []
    rows: dict[str, list] = {}
    for row in s.hum.feedback:
        rows.setdefault(row.source, []).append(row)
    currents = s.plan.index.currents
    found = (_feedback_finding(s, currents[name], rs) for name, rs in rows.items())
    return [f for f in found if f is not None]
