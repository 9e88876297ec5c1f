"""The signal's own wired returns, as the advisor guards them, and the trade's fix for a socket
bolted to the chassis.

A socket's sleeve, jack, pot or terminal fastened to the chassis and also wired to the signal
ground closes a loop through the metal; the trade's fix is to insulate it from the chassis (an
insulated socket, or shoulder washers), keeping its wired return, never to unwire it (common
practice).  Every such fastening in a loop is a candidate, inside blocks and device plans too.

A change that leaves a socket or a stage's end that had a wired return without one (its signal
would then return through chassis metal, or not at all) is refused by
:func:`lost_wired_returns`: the wired return is what the signal flows in; the chassis is not a
signal conductor.
"""

from __future__ import annotations

import dataclasses

import networkx as nx

from ..model.installation import device_of
from ..model.kinds import KINDS, PROTECTIVE, can_open, is_fastening, is_lift, joins_devices
from ..model.records import PE_POINT, SOCKET_KINDS, Plan, insulating_means
from ..network.earthing import earth_terminals
from ..model.supplies import winding_span
from ..rules.context import STRUCTURAL
from ..rules.equipment import ELV_LIMIT
from .changes import Candidate, ChangeContext, delete_change

__all__ = [
    "SOCKET_KINDS",
    "insulate_candidates",
    "refused_balanced",
    "wired_graph",
    "lost_wired_returns",
    "dead_screen_ends",
    "refuse",
]


def _socket_end(c, ctx: ChangeContext) -> str | None:
    """The point a fastening holds to the metal, when it is a socket, jack, pot or terminal, or
    a lug on metal written signal-only."""
    if not is_fastening(c, ctx.metals):
        return None
    metal = c.a if c.a in ctx.metals else c.b
    pt = ctx.points.get(c.b if c.a in ctx.metals else c.a)
    if pt is None:
        return None
    # a transducer's lug on signal-only metal (a reverb pan): insulated from the frame as the
    # pan's own makers do on its output side
    lug = pt.kind == "lug" and metal in ctx.metals and ctx.plan.metal(metal).signal_only
    return pt.name if pt.kind in SOCKET_KINDS or lug else None


def _insulate(ctx: ChangeContext, name: str, point: str, metal: str, reason: str):
    if ctx.points[point].kind == "terminal":
        return delete_change(
            ctx,
            name,
            f"remove {name}, the bond of {point} (0 V) to {metal} (not protective: the protective "
            "earth does not run through it), so that no ground loop closes through it",
            reason,
            "remove",
        )
    return delete_change(
        ctx,
        name,
        f"insulate {name}: {point} off {metal} ({insulating_means(ctx.points[point].kind)}), "
        "keeping its wired return, so that no ground loop closes through the fastening",
        reason,
        "insulate",
    )


def insulate_candidates(ctx: ChangeContext, reason: str, add) -> None:
    """Every non-protective fastening of a socket, jack, pot or terminal in a loop: insulate it
    from the metal (a terminal carrying 0 V: remove its bond to the case).  In a block the change
    is made once for every placement; in a device's own plan, in that plan."""
    seen, panels = set(), {}
    elv = _elv_supplies(ctx)
    fastened = {
        p for d in ctx.plan.conductors if is_fastening(d, ctx.metals) for p in (d.a, d.b)
    } - ctx.metals
    for lp in ctx.result.loops:
        if lp.closed_by in STRUCTURAL:
            continue
        for name in lp.loop.edges:
            c = ctx.cond.get(name)
            if c is None or name in seen or ctx.protective(c):
                continue
            volts = elv.get(ctx.plan.index.device_of(c.name), 0.0)
            if volts and _zero_volt_bond(ctx, c, fastened):
                seen.add(name)
                add(_remove_elv_bond(ctx, c, volts, reason))
                continue
            point = _socket_end(c, ctx)
            if point is not None:
                seen.add(name)
                metal = c.a if c.a in ctx.metals else c.b
                one = _insulate(ctx, name, point, metal, reason)
                add(one)
                if one is not None and one.action == "insulate":
                    panels.setdefault(metal, []).append((point, one))
    for metal, held in panels.items():
        # metal written signal-only (a reverb pan) is bonded by its lugs alone: insulating
        # every one of them leaves its frame connected to nothing
        if not ctx.plan.metal(metal).signal_only:
            add(_insulate_all(metal, held, reason))


def _elv_supplies(ctx: ChangeContext) -> dict:
    """Each device (None: the plan's own) whose every supply is extra-low voltage, with its
    highest winding voltage end to end, V rms: its 0 V-to-case bond is functional, not
    protective."""
    by: dict = {}
    rects = ctx.plan.rectifiers
    for r in rects:
        by.setdefault(ctx.plan.index.device_of(r.name), []).append(winding_span(r, rects))
    return {d: max(v) for d, v in by.items() if max(v) <= ELV_LIMIT}


def _zero_volt_bond(ctx: ChangeContext, c, fastened: set) -> bool:
    """Whether ``c`` is a wire joining a circuit's 0 V to a stud or tag fastened to the case (one
    end fastened, the other not), never a fastening or a protective conductor itself."""
    if c.role == PROTECTIVE or is_fastening(c, ctx.metals):
        return False
    return len({c.a, c.b} & fastened) == 1


def _remove_elv_bond(ctx: ChangeContext, c, volts: float, reason: str) -> Candidate | None:
    """An extra-low-voltage supply's 0 V-to-case wire taken away: its outputs float as a class II
    supply's do (a builder may; the protective earth does not run through it)."""
    return delete_change(
        ctx,
        c.name,
        f"remove {c.name}, the bond of an extra-low-voltage supply's 0 V to its case (windings "
        f"of {volts:g} V end to end, under {ELV_LIMIT:g} V: not protective), so that its outputs "
        "float as a class II supply's do and no ground loop closes through it",
        reason,
        "remove",
    )


def _insulate_all(metal: str, held: list, reason: str) -> Candidate | None:
    """Every socket in a loop that ``metal`` holds, insulated at once: a panel of sockets bonded
    at each is one change for a builder (common practice), and insulating one alone can move the
    loop's current onto the others."""
    if len(held) < 2:
        return None
    edits = {(str(e.file or ""), e.line): e for _, c in held for e in c.edits}  # a block's once
    points = ", ".join(p for p, _ in held)
    return Candidate(
        f"insulate every socket on {metal} that closes a loop ({points}): each off {metal} (an "
        "insulated socket or shoulder washers), keeping its wired return",
        reason,
        tuple(edits[n] for n in sorted(edits)),
        action="insulate",
        element=held[0][1].element,
    )


def refused_balanced(ctx: ChangeContext, c) -> str:
    """Why a balanced link is not offered for interconnect ``c`` (empty when it may be): an end on
    a sleeve is an unbalanced socket's return, so the equipment has no balanced socket there."""
    for end in (c.a, c.b):
        pt = ctx.points.get(end)
        if pt is not None and pt.kind == "sleeve":
            return (
                f"{end} is an unbalanced socket's sleeve: the equipment has no balanced socket "
                "there"
            )
    for dev in _bought_without_balanced_socket(ctx, c):
        return (
            f"{dev} is bought equipment ('simple') and its statement does not say 'sockets "
            "balanced', nor does a balanced link of this plan reach it: its sockets are taken as "
            "made, unbalanced"
        )
    return ""


def _bought_without_balanced_socket(ctx: ChangeContext, c) -> list[str]:
    """The devices at ``c``'s ends placed as ``simple`` (bought: their sockets are as made) that
    are not known to have a balanced socket: not stated ``sockets balanced`` and reached by no
    balanced interconnect of the plan (``sockets unbalanced`` settles it either way)."""
    devices = {d.name: d for d in ctx.plan.devices}
    simple = {d.name: d.sockets for d in ctx.plan.devices if d.source == "simple"}
    # an end is a point or, for a shield landed on the chassis, the device's metal part: its
    # device is its name's prefix
    linked = {
        device_of(e, devices)
        for x in ctx.plan.conductors
        if joins_devices(x) and x.balanced
        for e in (x.a, x.b)
    }
    return [
        d
        for d in (device_of(c.a, devices), device_of(c.b, devices))
        if d in simple and (simple[d] == "unbalanced" or (simple[d] is None and d not in linked))
    ]


def wired_graph(plan: Plan) -> nx.Graph:
    """The signal ground's wiring inside each piece of equipment: conductors that join two points
    (never metal, the mains earth, a lift network, a switch or a link between devices: a return
    that reaches its star only through another box's does not return when that box is unplugged),
    shields only when they conduct at both ends."""
    metals = {m.name for m in plan.metals}
    G = nx.Graph()
    G.add_nodes_from(p.name for p in plan.points)
    for c in plan.conductors:
        if c.a in metals or c.b in metals or PE_POINT in (c.a, c.b) or joins_devices(c):
            continue
        if not is_lift(c) and not can_open(c) and c.connects and c.role != PROTECTIVE:
            G.add_edge(c.a, c.b)
    return G


def _guarded(plan: Plan, after: Plan) -> set[str]:
    """Sockets' returns and stages' ends: the points whose wired return the advisor never
    removes.  A balanced link's input (after the change) is no such stage: its signal returns in
    the link's own pair."""
    balanced = {f"{c.name}.input" for c in after.conductors if joins_devices(c) and c.balanced}
    out = {p.name for p in plan.points if p.kind in ("sleeve", "jack")}
    for s in plan.stages:
        if s.name not in balanced:
            out |= {s.a, s.b}
    return out


def _components(G: nx.Graph) -> dict[str, frozenset]:
    return {n: comp for comp in map(frozenset, nx.connected_components(G)) for n in comp}


def _earthed_metals(plan: Plan) -> set[str]:
    """The metal parts joined, by any conductor (a lift network, a closed switch too), to the
    protective earth: a plan's inlet earth, an installation's outlets and earthing terminal."""
    G = nx.Graph()
    for c in plan.conductors:
        if c.connects:
            G.add_edge(c.a, c.b)
    refs = {n for names in earth_terminals(plan).values() for n in names}
    reached: set[str] = set()
    for r in refs & set(G.nodes):
        if r not in reached:
            reached |= nx.node_connected_component(G, r)
    return {m.name for m in plan.metals} & reached


def metals_cut_loose(before: Plan, after: Plan) -> list[str]:
    """Metal parts joined to the protective earth (through the signal ground or the links, say)
    before a change and to nothing earthed after it: a screen or box left floating (a step-up box
    whose every socket is insulated from it), which picks up what it should keep out."""
    return sorted(_earthed_metals(before) - _earthed_metals(after))


def _local_graph(plan: Plan) -> nx.Graph:
    """Every conductor that joins two things inside one piece of equipment (wires, metal parts and
    their fastenings; never a link between devices, the protective route or the mains)."""
    outlets = {p.name for p in plan.points if p.kind == "outlet"}
    G = nx.Graph()
    G.add_nodes_from(p.name for p in plan.points)
    for c in plan.conductors:
        if (
            c.connects
            and not can_open(c)
            and not joins_devices(c)
            and c.role != PROTECTIVE
            and not ({c.a, c.b} & outlets)
            and not (c.a.endswith(PE_POINT) or c.b.endswith(PE_POINT))
        ):
            G.add_edge(c.a, c.b)
    return G


def lost_circuit(before: Plan, after: Plan) -> list[str]:
    """Sockets joined to their circuit (a pad, a star, a stage's ground: any point that is neither
    a socket nor metal) inside their equipment before a change, by wires or through the metal
    they are fastened to, and to none after it: an output jack whose ground reaches the board
    only through the box and the input jack's nut, say, once that nut is insulated."""
    metals = {m.name for m in before.metals}
    kinds = {p.name: p.kind for p in (*before.points, *after.points)}
    hardware = {
        *SOCKET_KINDS,
        "stud",
        "tag",
        "lug",
        "inlet",
        "outlet",
        "earthing-terminal",
        "mains-pole",
    }

    device_of = before.index.device_of

    def circuit(comp, socket: str) -> bool:
        # a point of the socket's own box's circuit, not a socket or the case's studs (another
        # box's circuit, reached by a wire between the boxes, is not the socket's)
        own = device_of(socket)
        return any(
            n not in metals and kinds.get(n, "junction") not in hardware and device_of(n) == own
            for n in comp
        )

    c0, c1 = _components(_local_graph(before)), _components(_local_graph(after))
    used = _used_sockets(before)
    return [
        p.name
        for p in before.points
        if p.kind in SOCKET_KINDS
        and p.name in used
        and circuit(c0.get(p.name, ()), p.name)
        and not circuit(c1.get(p.name, ()), p.name)
    ]


def _used_sockets(plan: Plan) -> set:
    """The points a circuit of the plan uses: a stage's end or reference, a current's end, or an
    end of a wire (not a fastening, nor a screen).  A head can or a terminal held only by its
    mounting, with a screen left open at it, has no circuit the plan describes to be cut from
    (what joined it to one was another socket's loop)."""
    used = set(plan.index.stage_ends) | {st.reference for st in plan.stages if st.reference}
    used |= {e for c in plan.currents for e in (c.a, c.b)}
    for c in plan.conductors:
        if not KINDS[c.kind].fastening and not KINDS[c.kind].shield_like and c.connects:
            used |= {c.a, c.b}
    return used


def lost_wired_returns(before: Plan, after: Plan) -> list[str]:
    """Sockets and stage ends wired to another point before a change and to none after it, or
    wired to a star or a supply's reservoir return before and to none after (their signal would
    return through the chassis, or not at all: a ground bus whose one wire to the reservoir is
    moved elsewhere reaches it through jack nuts and pot bushings)."""
    c0, c1 = _components(wired_graph(before)), _components(wired_graph(after))
    stars = {p.name for p in (*before.points, *after.points) if p.kind == "star"}
    stars |= {r.a for r in before.rectifiers}
    lost = []
    for p in sorted(_guarded(before, after)):
        if p not in c0 or len(c0[p]) < 2:
            continue
        comp = c1.get(p, frozenset((p,)))
        if len(comp) < 2 or (c0[p] & stars and not comp & stars):
            lost.append(p)
    return lost


def dead_screen_ends(before: Plan, after: Plan) -> list[str]:
    """The ends of unbalanced links whose shield went on to another conductor before a change and
    to none after it, at a junction rather than a socket: the shield is the signal's return, and
    the box it ends in (a passive wall box's pin 1, bolted to its plate) passes it on only through
    what the change took away.

    Parameters:
        before, after: the plan before and after the change.
    Returns:
        "LINK at POINT" for each such end.
    References:
        common practice (an unbalanced link's screen is its signal return).
    """

    def degree(plan: Plan) -> dict:
        count: dict = {}
        for c in plan.conductors:
            if c.connects and c.a != c.b:
                for end in (c.a, c.b):
                    count[end] = count.get(end, 0) + 1
        return count

    d0, d1 = degree(before), degree(after)
    # a socket has its own circuit behind it (a step-up transformer's winding, which the plan
    # does not draw): only a bare junction, a wall box's pin, passes the shield on
    sockets = {p.name for p in after.points if p.kind in ("sleeve", "jack")}
    return [
        f"{c.name} at {end}"
        for c in after.conductors
        if joins_devices(c) and not c.balanced and c.connects
        for end in (c.a, c.b)
        if end not in sockets and d0.get(end, 0) > 1 and d1.get(end, 0) <= 1
    ]


def refuse(c: Candidate | None, why: str) -> Candidate | None:
    """``c`` marked as considered but never tried, for ``why`` (unchanged when ``why`` is
    empty)."""
    return c if c is None or not why else dataclasses.replace(c, refused=why)
