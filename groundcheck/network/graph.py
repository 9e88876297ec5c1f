"""The ground network as a graph: points and metal parts are nodes, conductors are edges.

One place builds it (:func:`build_graph`); every topology analysis reads it.
The graph ``G`` is a :class:`networkx.MultiGraph`; edge keys are conductor
names and each edge holds its :class:`~groundcheck.model.records.Conductor` as
``conductor``.  Hot paths on large plans use :mod:`scipy.sparse.csgraph`.
"""

from __future__ import annotations

from collections import deque
from dataclasses import dataclass

import networkx as nx
import numpy as np
import scipy.sparse as sp
import scipy.sparse.csgraph as csgraph

from ..model.records import Plan

__all__ = ["build_graph", "edges_of", "part_labels", "components", "loop_count", "fundamental_loops", "Loop",
           "loop_polygon", "polygon_area"]


def build_graph(plan: Plan) -> nx.MultiGraph:
    """The plan's ground network.  Open switches and shields terminated at one end are not edges."""
    G = nx.MultiGraph(title=plan.title)
    for m in plan.metals:
        G.add_node(m.name, type="metal", metal=m, touchable=m.touchable)
    for p in plan.points:
        G.add_node(p.name, type="point", point=p, pos=p.pos)
    for c in plan.conductors:
        if c.connects:
            G.add_edge(c.a, c.b, key=c.name, conductor=c)
    return G


def edges_of(G: nx.MultiGraph) -> list[tuple]:
    """Every edge once as ``(u, v, key, data)``, in the order and orientation of ``G.edges(keys=True,
    data=True)``, read from the adjacency dicts directly (several times faster on large graphs)."""
    seen: set = set()
    out = []
    for n, nbrs in G.adjacency():
        for nbr, keydict in nbrs.items():
            if nbr not in seen:
                for k, d in keydict.items():
                    out.append((n, nbr, k, d))
        seen.add(n)
    return out


def part_labels(n: int, rows, cols) -> tuple[int, np.ndarray]:
    """Connected parts of an undirected graph of ``n`` nodes with edges ``rows[i]``–``cols[i]`` (node indices):
    (number of parts, the part label of each node), by scipy's csgraph. The one home of connected parts."""
    A = sp.coo_matrix((np.ones(len(rows)), (rows, cols)), shape=(n, n))
    ncomp, labels = csgraph.connected_components(A, directed=False)
    return int(ncomp), labels


def components(G: nx.MultiGraph, edges: list[tuple] | None = None) -> tuple[list, np.ndarray, int]:
    """Connected parts: (nodes in graph order, the part label of each, number of parts), by scipy's csgraph.
    ``edges`` is :func:`edges_of` ``(G)`` when the caller already has it."""
    order = list(G.nodes)
    if not order:
        return order, np.zeros(0, dtype=np.int32), 0
    idx = {n: i for i, n in enumerate(order)}
    pairs = np.array([(idx[e[0]], idx[e[1]]) for e in (edges_of(G) if edges is None else edges)],
                     dtype=np.int64).reshape(-1, 2)
    ncomp, labels = part_labels(len(order), pairs[:, 0], pairs[:, 1])
    return order, labels, ncomp


def loop_count(G: nx.MultiGraph, edges: list[tuple] | None = None) -> int:
    """Number of independent loops, E − V + C (the cycle rank), in near-linear time."""
    edges = edges_of(G) if edges is None else edges
    order, _, ncomp = components(G, edges)
    return len(edges) - len(order) + ncomp if order else 0


@dataclass(frozen=True)
class Loop:
    """One independent loop: its nodes and conductors in order around it."""

    nodes: tuple[str, ...]
    edges: tuple[str, ...]          # conductor names; edges[i] joins nodes[i] and nodes[i+1 mod n]
    chord: int = -1                 # index in edges of the conductor outside the spanning forest


def fundamental_loops(G: nx.MultiGraph, limit: int | None = None, edges: list[tuple] | None = None) -> list[Loop]:
    """Loops of a cycle basis: one per conductor outside a breadth-first spanning forest.

    Breadth-first trees keep the fundamental loops short.  Self-loops (a
    conductor whose two ends are one point) are left out; they count in
    :func:`loop_count` and have a rule of their own.  ``limit`` caps how many
    loops are listed (the count is always exact).

    References: K. Paton, "An algorithm for finding a fundamental set of
    cycles of a graph", Comm. ACM 12(9), 1969.
    """
    parent: dict = {}
    parent_edge: dict = {}
    depth: dict = {}
    tree_edges = set()
    adj = dict(G.adjacency())           # plain dicts: node -> neighbour -> key -> data
    for root in adj:
        if root in parent:
            continue
        parent[root], depth[root], parent_edge[root] = None, 0, None
        q = deque([root])
        while q:
            u = q.popleft()
            for v, keys in adj[u].items():
                if v in parent:
                    continue
                key = min(keys)
                parent[v], depth[v], parent_edge[v] = u, depth[u] + 1, key
                tree_edges.add(key)
                q.append(v)
    loops: list[Loop] = []
    for u, v, key, _ in sorted(edges_of(G) if edges is None else edges, key=lambda e: e[2]):
        if key in tree_edges or u == v:
            continue
        # walk both ends up to their lowest common ancestor
        left_n, left_e, right_n, right_e = [u], [], [v], []
        a, b = u, v
        while depth[a] > depth[b]:
            a = _climb(a, parent, parent_edge, left_n, left_e)
        while depth[b] > depth[a]:
            b = _climb(b, parent, parent_edge, right_n, right_e)
        while a != b:
            a = _climb(a, parent, parent_edge, left_n, left_e)
            b = _climb(b, parent, parent_edge, right_n, right_e)
        # loop: lca ... u (reversed left), then key to v, then v ... up to just before lca
        nodes = list(reversed(left_n)) + right_n[:-1]
        edges = list(reversed(left_e)) + [key] + right_e
        # edges[i] joins nodes[i] and nodes[i+1]; rotate so the closing edge is last
        loops.append(Loop(tuple(nodes), tuple(edges[: len(nodes)]), len(left_e)))
        if limit is not None and len(loops) >= limit:
            break
    return loops


def _climb(x, parent, parent_edge, nodes, edges):
    """One step up the spanning tree from x, recording the edge taken and the node reached."""
    edges.append(parent_edge[x])
    nodes.append(parent[x])
    return parent[x]


def polygon_area(pts) -> float:
    """Area enclosed by a polygon (shoelace formula), m²; 0 for fewer than three points."""
    if len(pts) < 3:
        return 0.0
    a = np.asarray(pts, dtype=float)
    x, y = a[:, 0], a[:, 1]
    return float(abs(np.dot(x, np.roll(y, -1)) - np.dot(y, np.roll(x, -1))) / 2.0)


def loop_polygon(G: nx.MultiGraph, loop: Loop):
    """The loop's outline in the plan frame: point positions and wire routes in order.

    A metal part contributes the straight line between the fastening points
    the loop enters and leaves by.  None when a point of the loop has no position.
    """
    pts = []
    n = len(loop.nodes)
    for i in range(n):
        u, v = loop.nodes[i], loop.nodes[(i + 1) % n]
        data = G.nodes[u]
        if data.get("type") == "point":
            if data.get("pos") is None:
                return None
            pts.append(data["pos"])
        c = G.edges[u, v, loop.edges[i]]["conductor"]
        route = list(c.route)
        if route and c.a != u:
            route.reverse()
        pts.extend(route)
    return pts
