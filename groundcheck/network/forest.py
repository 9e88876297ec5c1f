"""The spanning forest whose fundamental loops are the plan's loops
(:func:`groundcheck.network.graph.fundamental_loops`): breadth-first, grown in the canonical rank
order, the parts with a place on the deck spanned first.
"""

from __future__ import annotations

from collections import deque

import networkx as nx

from .earthing import EARTH_TERMINAL_KINDS

__all__ = ["spanning_forest"]


def spanning_forest(G: nx.MultiGraph, rank: dict) -> tuple[dict, dict, dict, set]:
    """A breadth-first spanning forest grown in rank order: (parent, the conductor to it, depth,
    the forest's conductors).

    It spans the parts with a place on the deck first (metal parts and points with a position,
    joined by conductors between two such), then joins those parts by the conductors that leave
    them (a cord, an outlet, a building cable): a loop inside a placed device then closes inside
    it, whatever else the installation joins to it, so its outline and its field pickup are those
    of the device alone, never lost in a loop through a cord that has no outline."""
    adj = dict(G.adjacency())  # plain dicts: node -> neighbour -> key -> data
    order = sorted(adj, key=lambda n: (_outermost(G.nodes[n]), rank[n]))
    placed = {n for n in adj if _has_place(G.nodes[n])}
    tree: set = set()
    part: dict = {}  # node -> the root of its placed part (a lone node for an unplaced one)
    members: dict = {}
    for root in order:
        if root in part:
            continue
        part[root], grown = root, [root]
        q = deque([root])
        while q:
            u = q.popleft()
            if u not in placed:
                continue
            for v in sorted(adj[u], key=rank.__getitem__):
                if v in part or v not in placed:
                    continue
                tree.add(min(adj[u][v], key=rank.__getitem__))
                part[v] = root
                grown.append(v)
                q.append(v)
        members[root] = grown
    joined: set = set()
    for root in order:
        if part[root] in joined:
            continue
        joined.add(part[root])
        q = deque(members[part[root]])
        while q:
            u = q.popleft()
            for v in sorted(adj[u], key=rank.__getitem__):
                if part[v] in joined:
                    continue
                tree.add(min(adj[u][v], key=rank.__getitem__))
                joined.add(part[v])
                q.extend(members[part[v]])
    return _rooted(adj, order, rank, tree)


def _rooted(adj: dict, order: list, rank: dict, tree: set) -> tuple[dict, dict, dict, set]:
    """The forest of conductors ``tree`` hung from its roots (each part's first node of
    ``order``): (parent, the conductor to it, depth, the forest's conductors)."""
    parent: dict = {}
    parent_edge: dict = {}
    depth: dict = {}
    for root in order:
        if root in parent:
            continue
        parent[root], depth[root], parent_edge[root] = None, 0, None
        q = deque([root])
        while q:
            u = q.popleft()
            for v in sorted(adj[u], key=rank.__getitem__):
                if v in parent:
                    continue
                keys = [k for k in adj[u][v] if k in tree]
                if not keys:
                    continue
                parent[v], depth[v] = u, depth[u] + 1
                parent_edge[v] = min(keys, key=rank.__getitem__)
                q.append(v)
    return parent, parent_edge, depth, tree


def _has_place(data: dict) -> bool:
    """Whether a node has a place on the deck: a metal part, or a point with a position."""
    return data.get("type") == "metal" or data.get("pos") is not None


def _outermost(data: dict) -> int:
    """Where a node stands among the earth terminals, outermost first (others last): the tree of
    each part grows from its outermost earth, as the protective route does."""
    point = data.get("point")
    kind = point.kind if point is not None else None
    return EARTH_TERMINAL_KINDS.index(kind) if kind in EARTH_TERMINAL_KINDS else 3
