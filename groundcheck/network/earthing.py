"""What is protective: the one definition every check, drawing and the repair advisor use.

A conductor is protective **by topology**, whatever role the plan wrote for it, when it lies on the
route that connects a metal part (or a device's earth pin, or an outlet's earth) to the earth: the
route found by one search from the earth terminals over conductors whose kind may carry protective
current (:mod:`groundcheck.model.kinds`), preferring conductors written ``protective`` or ``bond``,
and never passing through a point of the signal circuit (a stage's or a current's end, a star).  A
conductor on that route that the plan did not mark ``protective`` or ``bond`` is named in
``unmarked``: the checks treat it as protective all the same (its cross-section is checked, its
resistance counts in the protective path), the audit says the role is missing, and the repair
advisor never touches it.

Earth terminals, from the outermost in: main earthing terminals (points of kind
``earthing-terminal``) if the plan has any, else outlets, else inlets (the plan's own ``mains.pe``
and each placed device's).  Inlets and outlets further in are reached by the same search, so an
installation's building runs and mains cords are protective by topology too.
"""

from __future__ import annotations

from collections import deque
from dataclasses import dataclass

from ..model.kinds import LEAKAGE, PROTECTIVE, PROTECTIVE_ROLES, can_carry_protective
from ..model.records import PE_POINT, Plan

__all__ = [
    "EARTH_TERMINAL_KINDS",
    "ProtectiveRoute",
    "cut_vertices",
    "earth_terminals",
    "protective_route",
    "signal_points",
]

#: point kinds that are earth terminals, from the outermost in
EARTH_TERMINAL_KINDS = ("earthing-terminal", "outlet", "inlet")


@dataclass(frozen=True)
class ProtectiveRoute:
    """The protective route of a plan.

    ``conductors``: every conductor that is protective by topology or by its written role (and of a
    kind that may carry protective current); ``unmarked``: those on the route whose role does not
    say so; ``reached``: metal parts and earth terminals the route reaches (by conductors of any
    role), ``marked_reach``: those reached through conductors marked protective or bond alone;
    ``parent``: node -> (previous node, conductor) of the search tree; ``roots``: where it started;
    ``keep``: every conductor that may carry protective current between two nodes of the protective
    side (the nodes the search passed through), parallel paths included — what the repair advisor
    never touches.
    """

    conductors: frozenset
    unmarked: tuple
    keep: frozenset
    reached: frozenset
    marked_reach: frozenset
    parent: dict
    roots: tuple

    def path_to(self, node: str) -> list[str]:
        """The route's conductors from ``node`` back to its earth terminal (empty when not
        reached)."""
        out = []
        while node in self.parent and self.parent[node] is not None:
            node, k = self.parent[node]
            out.append(k)
        return out

    def __contains__(self, name: str) -> bool:
        return name in self.conductors


def signal_points(plan: Plan) -> set[str]:
    """Points of the signal circuit: ends of stages, rectifiers and currents (not leakage),
    stars."""
    pts = set()
    for s in plan.stages:
        pts.update((s.a, s.b))
    for r in (*plan.rectifiers, *(c for c in plan.currents if c.role != LEAKAGE)):
        pts.update((r.a, r.b))
    pts.update(p.name for p in plan.points if p.kind == "star")
    return pts


def earth_terminals(plan: Plan) -> dict[str, list[str]]:
    """Earth terminals by kind (``earthing-terminal``, ``outlet``, ``inlet``), each list sorted."""
    out: dict[str, list[str]] = {k: [] for k in EARTH_TERMINAL_KINDS}
    for p in plan.points:
        if p.kind in out:
            out[p.kind].append(p.name)
    if plan.mains is not None and PE_POINT not in out["inlet"]:
        out["inlet"].append(PE_POINT)
    return {k: sorted(v) for k, v in out.items()}


def protective_route(plan: Plan, adj: dict) -> ProtectiveRoute:
    """The protective route over the graph's adjacency ``adj`` (node -> neighbour -> key -> data).

    A 0-1 breadth-first search: a conductor marked protective or bond costs 0, any other conductor
    of a kind that may carry protective current costs 1, so each part is reached through marked
    conductors whenever it can be.
    """
    terms = earth_terminals(plan)
    roots = next((terms[k] for k in EARTH_TERMINAL_KINDS if terms[k]), [])
    roots = [r for r in roots if r in adj]
    blocked = signal_points(plan)
    # metal written signal-only (a reverb pan, a board's ground plane) is no part the protective
    # earth must reach: the conductors that join it are the signal ground's, never protective
    metals = {m.name for m in plan.metals if not m.signal_only}
    # each conductor's cost once: 0 marked protective, 1 any other kind that may carry protective
    # current
    cost = {
        c.name: (0 if c.role in PROTECTIVE_ROLES else 1)
        for c in plan.conductors
        if can_carry_protective(c)
    }
    dist, parent, done = _search(roots, blocked, cost, adj)
    targets = (metals | {n for k in EARTH_TERMINAL_KINDS for n in terms[k]}) & parent.keys()
    route: set[str] = set()
    for t in targets:
        v = t
        while parent[v] is not None and parent[v][1] not in route:
            u, k = parent[v]
            route.add(k)
            v = u
    conds = plan.index.conductors
    marked = {c.name for c in plan.conductors if c.role == PROTECTIVE and can_carry_protective(c)}
    marked_reach = frozenset(t for t in targets if dist[t] == 0)
    side = _without_dead_ends(done - (blocked - set(roots)), targets | set(roots), adj, cost)
    side = _without_dead_blocks(side, targets | set(roots), adj, cost)
    # every conductor between two nodes of the protective side carries fault current, whatever role
    # the plan writes: the route is found from the network, the role only documents it
    keep = route | {
        k for u in side for v, keys in adj[u].items() if v in side for k in keys if k in cost
    }
    unmarked = tuple(sorted(k for k in keep if conds[k].role not in PROTECTIVE_ROLES))
    everything = frozenset(keep | marked)
    return ProtectiveRoute(
        everything, unmarked, everything, frozenset(targets), marked_reach, parent, tuple(roots)
    )


def _search(roots: list, blocked: set, cost: dict, adj: dict) -> tuple[dict, dict, set]:
    """The 0-1 breadth-first search from the earth terminals: (each reached node's cost, its
    parent as (previous node, conductor), the nodes taken from the queue). Of parallel conductors
    the cheapest (then the first by name) is taken; a point of the signal circuit is reached but
    never passed through."""
    dist: dict[str, int] = {r: 0 for r in roots}
    parent: dict = {r: None for r in roots}
    q = deque(roots)
    done: set[str] = set()
    while q:
        u = q.popleft()
        if u in done:
            continue
        done.add(u)
        if u in blocked and u not in roots:
            continue  # reached, but the route never passes through the signal circuit
        for v, keys in adj[u].items():
            best = None
            for k in keys if len(keys) == 1 else sorted(keys):
                w = cost.get(k)
                if w is not None and (best is None or w < best[0]):
                    best = (w, k)
            if best is None:
                continue
            d = dist[u] + best[0]
            if v not in dist or d < dist[v]:
                dist[v] = d
                parent[v] = (u, best[1])
                if best[0] == 0:
                    q.appendleft(v)
                else:
                    q.append(v)
    return dist, parent, done


def _without_dead_ends(side: set, ends: set, adj: dict, cost: dict) -> set:
    """The protective side less its dead ends: a point (not a metal part or earth terminal)
    joined to the rest of the side by one conductor carries no fault current to any part (a
    socket's sleeve fastened to the chassis whose other wiring runs into the signal circuit), so
    its fastening is no protective path; pruned until none is left."""
    side = set(side)
    degree = {
        u: sum(
            len([k for k in keys if k in cost])
            for v, keys in adj[u].items()
            if v in side and v != u
        )
        for u in side
    }
    stack = [u for u in side if u not in ends and degree[u] <= 1]
    while stack:
        u = stack.pop()
        if u not in side:
            continue
        side.discard(u)
        for v, keys in adj[u].items():
            if v in side and v != u:
                degree[v] -= len([k for k in keys if k in cost])
                if v not in ends and degree[v] <= 1:
                    stack.append(v)
    return side


def cut_vertices(blocks: list) -> set:
    """The cut vertices of a graph from its blocks (biconnected components): the nodes in two
    blocks or more, so one depth-first pass gives both.

    Parameters:
        blocks: the graph's blocks, as sets of nodes.
    Returns:
        its cut vertices (articulation points).
    References:
        F. Harary, *Graph Theory*, 1969, ch. 3 (a cut vertex lies in more than one block).
    """
    seen: set = set()
    cuts: set = set()
    for block in blocks:
        cuts |= block & seen
        seen |= block
    return cuts


def _without_dead_blocks(side: set, ends: set, adj: dict, cost: dict) -> set:
    """The protective side less the blocks that hang off it at one point and hold no metal part
    or earth terminal of their own: two sockets fastened to one panel and wired to each other
    form a ring through the panel that no fault current to any part has to pass (every way from
    the earth to a part runs through the panel itself), so the wire between them is no protective
    conductor; pruned until none is left (a dead end is such a block of one conductor)."""
    import networkx as nx

    side = set(side)
    G = nx.Graph()
    G.add_nodes_from(side)
    for u in side:
        for v, keys in adj[u].items():
            if v in side and v != u and any(k in cost for k in keys):
                G.add_edge(u, v)
    while True:
        blocks = list(nx.biconnected_components(G))
        cuts = cut_vertices(blocks)
        dead = set()
        for block in blocks:
            joint = block & cuts
            if len(joint) == 1 and not (block - joint) & ends:
                dead |= block - joint
        if not dead:
            return side
        side -= dead
        G.remove_nodes_from(dead)  # the graph on what is left, as built from it
