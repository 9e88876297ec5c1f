"""What the rules read: the plan, its graph, its loops and the protective route, each derived once.

:class:`AuditContext` is built once per plan and shared by every rule; :func:`classify_loop` says
what closes a loop and :func:`open_at` which conductor to open (never one the protective earth
relies on).
"""

from __future__ import annotations

from dataclasses import dataclass, field
from functools import cached_property

import networkx as nx
import numpy as np

from ..core.errors import Location
from ..model.kinds import (
    BOND,
    PROTECTIVE,
    PROTECTIVE_ROLES,
    SIGNAL,
    bonds_metal,
    is_fastening,
    is_fastening_kind,
    joins_devices,
    shield_like,
)
from ..model.index import outermost
from ..model.records import SOCKET_KINDS, Conductor, Plan
from ..network.canonical import canonical_ranks
from .pe_places import pe_distance
from .repairs import signal_shield
from ..network.earthing import ProtectiveRoute, earth_terminals, protective_route, signal_points
from ..network.graph import (
    Loop,
    build_graph,
    plan_ranks,
    components,
    edges_of,
    fundamental_loops,
    loop_polygon,
    polygon_area,
)

__all__ = [
    "AuditContext",
    "LoopInfo",
    "classify_loop",
    "open_at",
    "node_channel",
    "LOOP_LIST_LIMIT",
    "LOOP_CLASSES",
]

#: how many loops are listed one by one (the count is always exact)
LOOP_LIST_LIMIT = 500

#: loops that are the structure of the protective earth itself: never a finding, nothing to open
STRUCTURAL = ("chassis-structure", "protective-wiring")

LOOP_CLASSES = {
    "mains-cords": "an interconnect shield and the protective earth through two mains cords",
    "shield-both-ends": "a shield terminated at both ends",
    "channel-returns": "the returns of two channels tied in two places",
    "second-chassis-bond": "a second bond of the signal ground to a metal part",
    "metal-return": "a metal part used as a return path",
    "chassis-structure": "metal parts and their fastenings only",
    "protective-wiring": "protective conductors only (a ring circuit's, by design)",
    "parallel-wiring": "two wires in parallel",
}


@dataclass(frozen=True)
class LoopInfo:
    """A listed loop: members in order, what closes it, its area (None without positions)."""

    loop: Loop
    closed_by: str
    area: float | None  # m²
    open_at: str  # the conductor to open to break it
    polygon: tuple | None = None


@dataclass
class AuditContext:
    """What the rules read: the plan, its graph, and facts derived once."""

    plan: Plan
    G: nx.MultiGraph = field(default=None)

    def __post_init__(self):
        if self.G is None:
            # the plan's own network: its canonical ranks, worked out once, serve the loops here
            # and the hum budget's named shares (network.graph.plan_ranks)
            self.G = build_graph(self.plan)
            plan_ranks(self.plan, self.G)

    @cached_property
    def conductors(self) -> dict[str, Conductor]:
        return self.plan.index.conductors

    @cached_property
    def metals(self) -> set[str]:
        return {m.name for m in self.plan.metals}

    @cached_property
    def chassis_side(self) -> set[str]:
        """Metal parts, points fastened or strapped to one, and the earth terminals."""
        side = set(self.metals)
        for c in self.plan.conductors:
            if c.connects and bonds_metal(c):
                if c.a in self.metals:
                    side.add(c.b)
                if c.b in self.metals:
                    side.add(c.a)
        side.update(n for n in self.earth_terminals if n in self.G)
        return side

    @cached_property
    def signal_points(self) -> set[str]:
        return signal_points(self.plan)

    @cached_property
    def earth_terminals(self) -> list[str]:
        """Every earth terminal of the plan: main earthing terminals, outlets, inlets (mains.pe and
        devices')."""
        terms = earth_terminals(self.plan)
        return sorted(n for k in terms for n in terms[k])

    @cached_property
    def route(self) -> ProtectiveRoute:
        """The protective route (:mod:`groundcheck.network.earthing`): what is protective by
        topology or role."""
        return protective_route(self.plan, self.adj)

    @cached_property
    def earth_points(self) -> frozenset:
        """Points the protective route reaches through a conductor of its own (the earth stud, even
        one a return wrongly shares, where the route stops): their fastenings to metal stay."""
        return frozenset(
            p
            for p, up in self.route.parent.items()
            if up is not None and up[1] in self.protective_path and p not in self.metals
        )

    @cached_property
    def protective_path(self) -> frozenset:
        """Conductors the protective earth relies on, parallel paths included: never to be
        opened."""
        return self.route.keep

    @cached_property
    def source_pairs(self) -> set[frozenset]:
        """The two ends of each rectifier and stated current: joined on purpose."""
        return {frozenset((r.a, r.b)) for r in (*self.plan.rectifiers, *self.plan.currents)}

    @cached_property
    def edges(self) -> list[tuple]:
        """Every edge once as (u, v, conductor name, data)."""
        return edges_of(self.G)

    @cached_property
    def adj(self) -> dict:
        """The graph's adjacency as plain dicts: node -> neighbour -> conductor name -> data."""
        return dict(self.G.adjacency())

    @cached_property
    def parts(self) -> tuple[list, np.ndarray, int]:
        """Connected parts of the graph: (nodes, part label of each, number of parts)."""
        return components(self.G, self.edges)

    @cached_property
    def loop_total(self) -> int:
        order, _, ncomp = self.parts
        return len(self.edges) - len(order) + ncomp if order else 0

    @cached_property
    def loops(self) -> list[LoopInfo]:
        out = []
        for lp in fundamental_loops(self.G, limit=LOOP_LIST_LIMIT, edges=self.edges):
            closed_by = classify_loop(self, lp)
            poly = loop_polygon(self.G, lp)
            area = polygon_area(poly) if poly is not None else None
            out.append(
                LoopInfo(
                    lp,
                    closed_by,
                    area,
                    open_at(self, lp, closed_by),
                    tuple(poly) if poly else None,
                )
            )
        return out

    def loc(self, name: str) -> Location:
        c = self.conductors.get(name)
        if c is not None:
            return c.location
        n = self.G.nodes.get(name, {})
        obj = n.get("point") or n.get("metal")
        return obj.location if obj is not None else self.plan.location


def classify_loop(ctx: AuditContext, lp: Loop) -> str:
    """What closes a loop: one of :data:`LOOP_CLASSES`.

    Parameters:
        ctx: the audit context.
        lp: a loop.
    Returns:
        one of LOOP_CLASSES.
    References:
        the rule catalogue (rules/catalogue.py), which names each code's sources.
    """
    cs = [ctx.conductors[e] for e in lp.edges]
    roles = {c.role for c in cs}
    has_metal = any(n in ctx.metals for n in lp.nodes)
    if any(joins_devices(c) for c in cs) and PROTECTIVE in roles:
        return "mains-cords"
    if any(shield_like(c) for c in cs):
        return "shield-both-ends"
    known = set(ctx.plan.channels)
    channels = {c.channel for c in cs if c.channel in known} | {
        node_channel(ctx, n) for n in lp.nodes
    } & known
    if len(channels) >= 2:
        return "channel-returns"
    # a conductor the protective earth relies on is protective whatever role the plan writes
    carried = {PROTECTIVE if c.name in ctx.protective_path else c.role for c in cs}
    if carried <= set(PROTECTIVE_ROLES):
        return "chassis-structure" if has_metal else "protective-wiring"
    if has_metal and SIGNAL in carried:
        return "second-chassis-bond"
    if has_metal:
        return "metal-return"
    return "parallel-wiring"


def node_channel(ctx: "AuditContext", name: str) -> str | None:
    """The placement (block or device) a point was placed by: in a dual-mono plan, its channel.

    Parameters:
        ctx: the audit context.
        name: a point's name.
    Returns:
        the block or device that placed it, or None.
    References:
        none (bookkeeping).
    """
    point = ctx.plan.point(name)
    return outermost(point.group) if point is not None else None


def open_at(ctx: AuditContext, lp: Loop, closed_by: str) -> str:
    """The conductor to open: never a protective conductor or a fastening of metal parts.

    Parameters:
        ctx: the audit context.
        lp: a loop.
        closed_by: its class.
    Returns:
        the conductor to open, or "" when every conductor must stay.
    References:
        the rule catalogue (rules/catalogue.py), which names each code's sources.
    """
    candidates = _openable(ctx, lp)
    if not candidates:
        return ""
    chooser = _OPENERS.get(closed_by)
    chosen = chooser(ctx, candidates) if chooser else None
    return (candidates[-1] if chosen is None else chosen).name


def _openable(ctx: AuditContext, lp: Loop) -> list[Conductor]:
    """The loop's conductors that may be opened, by what each is (its canonical rank): neither in
    the order the loop happens to be walked, which follows the plan's writing, nor by name."""
    cs = [ctx.conductors[e] for e in lp.edges]
    # a point the protective earth reaches (its stud, even one a return wrongly shares) keeps its
    # fastening to the metal: the route may stop there, the earth of the metal does not
    reached = ctx.earth_points
    earthing = {
        c.name
        for c in cs
        if (c.a in reached and c.b in ctx.metals) or (c.b in reached and c.a in ctx.metals)
    }
    rank = canonical_ranks(ctx.G)
    return sorted(
        (
            c
            for c in cs
            if c.role != PROTECTIVE
            and c.name not in ctx.protective_path
            and c.name not in earthing
            and not (
                bonds_metal(c) and c.role == BOND and (c.a in ctx.metals and c.b in ctx.metals)
            )
        ),
        key=lambda c: rank[c.name],
    )


def _interconnect(ctx: AuditContext, candidates: list[Conductor]) -> Conductor | None:
    """A loop through two mains cords opens at an interconnect."""
    return next((c for c in candidates if joins_devices(c)), None)


def _shield(ctx: AuditContext, candidates: list[Conductor]) -> Conductor | None:
    """A shield terminated at both ends opens at the shield — unless it carries a signal (an
    unbalanced link's screen, a socket's only return: :func:`.repairs.signal_shield`); then at a
    socket's fastening to the metal on the loop, insulated (GC101's fix says the same)."""
    shields = [c for c in candidates if shield_like(c)]
    free = next((c for c in shields if signal_shield(ctx, c) is None), None)
    if free is not None or not shields:
        return free
    sockets = [
        c
        for c in candidates
        if is_fastening(c, ctx.metals)
        and (p := ctx.plan.point(c.b if c.a in ctx.metals else c.a)) is not None
        and p.kind in SOCKET_KINDS
    ]
    return sockets[0] if sockets else shields[0]


def _channel_tie(ctx: AuditContext, candidates: list[Conductor]) -> Conductor | None:
    """Two channels' returns tied twice open at a tie of no channel between two channels."""
    return next(
        (
            c
            for c in candidates
            if not c.channel
            and node_channel(ctx, c.a)
            and node_channel(ctx, c.b)
            and node_channel(ctx, c.a) != node_channel(ctx, c.b)
        ),
        None,
    )


def _second_bond(ctx: AuditContext, candidates: list[Conductor]) -> Conductor | None:
    """A second bond of the signal ground: a signal point fastened to the metal (an uninsulated
    jack, say) is the bond to remove; otherwise the crossing farthest from the protective earth."""
    ends = set(ctx.plan.index.stage_ends) | {x for r in ctx.plan.currents for x in (r.a, r.b)}
    # a socket, jack, pot or terminal fastened to the metal too: insulating it keeps its return
    ends |= {p.name for p in ctx.plan.points if p.kind in SOCKET_KINDS}
    bolt = next(
        (
            c
            for c in candidates
            if is_fastening_kind(c.kind)
            and ((c.a in ctx.metals and c.b in ends) or (c.b in ctx.metals and c.a in ends))
        ),
        None,
    )
    if bolt is not None:
        return bolt
    # otherwise keep the bond nearest the protective earth and open the farthest
    crossing = [c for c in candidates if (c.a in ctx.chassis_side) != (c.b in ctx.chassis_side)]
    if not crossing:
        return None
    rank = canonical_ranks(ctx.G)
    return max(
        crossing,
        key=lambda c: (pe_distance(ctx, c.a if c.a in ctx.chassis_side else c.b), rank[c.name]),
    )


#: which conductor of a loop to open, by what closes it (the rest open at the last by rank)
_OPENERS = {
    "mains-cords": _interconnect,
    "shield-both-ends": _shield,
    "channel-returns": _channel_tie,
    "second-chassis-bond": _second_bond,
}
