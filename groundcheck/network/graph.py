"""The ground network as a graph: points and metal parts are nodes, conductors are edges.

One place builds it (:func:`build_graph`); every topology analysis reads it.
The graph ``G`` is a :class:`networkx.MultiGraph`; edge keys are conductor
names and each edge holds its :class:`~groundcheck.model.records.Conductor` as
``conductor``.  Hot paths on large plans use :mod:`scipy.sparse.csgraph` (imported for them).
"""

from __future__ import annotations

from dataclasses import dataclass

import networkx as nx
import numpy as np

from ..model.records import Plan
from .canonical import attachments, canonical_ranks
from .forest import spanning_forest

__all__ = [
    "build_graph",
    "plan_ranks",
    "edges_of",
    "part_labels",
    "components",
    "loop_count",
    "fundamental_loops",
    "Loop",
    "loop_polygon",
    "polygon_area",
]


def build_graph(plan: Plan) -> nx.MultiGraph:
    """The plan's ground network.  Open switches and shields terminated at one end are not
    edges."""
    G = nx.MultiGraph(title=plan.title)
    for m in plan.metals:
        G.add_node(m.name, type="metal", metal=m, touchable=m.touchable)
    attached = attachments(plan)
    for p in plan.points:
        G.add_node(p.name, type="point", point=p, pos=p.pos, attached=attached.get(p.name, ()))
    for c in plan.conductors:
        if c.connects:
            G.add_edge(c.a, c.b, key=c.name, conductor=c)
    return G


def plan_ranks(plan: Plan, G: nx.MultiGraph | None = None) -> dict:
    """The canonical ranks (:func:`~groundcheck.network.canonical.canonical_ranks`) of the plan's
    network, worked out once per plan and kept in its index.

    Parameters:
        plan: the plan.
        G: the plan's network as :func:`build_graph` gives it, when the caller has built it (its
            ranks are then the ones kept, and the graph holds them too).
    Returns:
        element name -> rank (0 first), nodes and conductors in one numbering.
    References:
        see :mod:`groundcheck.network.canonical`.
    """
    memo = plan.index.derived
    if "canonical_ranks" not in memo:
        memo["canonical_ranks"] = canonical_ranks(build_graph(plan) if G is None else G)
    elif G is not None:
        G.graph.setdefault("canonical_ranks", memo["canonical_ranks"])
    return memo["canonical_ranks"]


def edges_of(G: nx.MultiGraph) -> list[tuple]:
    """Every edge once as ``(u, v, key, data)``, in the order and orientation of
    ``G.edges(keys=True, data=True)``, read from the adjacency dicts directly (several times faster
    on large graphs)."""
    seen: set = set()
    out = []
    for n, nbrs in G.adjacency():
        for nbr, keydict in nbrs.items():
            if nbr not in seen:
                for k, d in keydict.items():
                    out.append((n, nbr, k, d))
        seen.add(n)
    return out


#: graphs of at most this many nodes get their connected parts by union-find in Python, sparing
#: the import of scipy's graph routines (which bring its sparse solvers); larger ones use csgraph
SMALL_GRAPH = 2000


def part_labels(n: int, rows, cols) -> tuple[int, np.ndarray]:
    """Connected parts of an undirected graph of ``n`` nodes with edges ``rows[i]``–``cols[i]``
    (node indices): (number of parts, the part label of each node), the parts numbered by their
    lowest node, as scipy's csgraph numbers them. The one home of connected parts."""
    if n > SMALL_GRAPH:
        import scipy.sparse as sp
        import scipy.sparse.csgraph as csgraph

        A = sp.coo_matrix((np.ones(len(rows)), (rows, cols)), shape=(n, n))
        ncomp, labels = csgraph.connected_components(A, directed=False)
        return int(ncomp), labels
    parent = list(range(n))

    def root(i: int) -> int:
        while parent[i] != i:
            parent[i] = parent[parent[i]]
            i = parent[i]
        return i

    for a, b in zip(np.asarray(rows).tolist(), np.asarray(cols).tolist()):
        ra, rb = root(a), root(b)
        if ra != rb:
            parent[max(ra, rb)] = min(ra, rb)
    labels = np.empty(n, dtype=np.int32)
    number: dict[int, int] = {}
    for i in range(n):
        labels[i] = number.setdefault(root(i), len(number))
    return len(number), labels


def components(G: nx.MultiGraph, edges: list[tuple] | None = None) -> tuple[list, np.ndarray, int]:
    """Connected parts: (nodes in graph order, the part label of each, number of parts), by scipy's
    csgraph. ``edges`` is :func:`edges_of` ``(G)`` when the caller already has it."""
    order = list(G.nodes)
    if not order:
        return order, np.zeros(0, dtype=np.int32), 0
    idx = {n: i for i, n in enumerate(order)}
    pairs = np.array(
        [(idx[e[0]], idx[e[1]]) for e in (edges_of(G) if edges is None else edges)], dtype=np.int64
    ).reshape(-1, 2)
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
    edges: tuple[str, ...]  # conductor names; edges[i] joins nodes[i] and nodes[i+1 mod n]
    chord: int = -1  # index in edges of the conductor outside the spanning forest


def fundamental_loops(
    G: nx.MultiGraph, limit: int | None = None, edges: list[tuple] | None = None
) -> list[Loop]:
    """Loops of a cycle basis: one per conductor outside a breadth-first spanning forest.

    Breadth-first trees keep the fundamental loops short.  The forest and the order the loops are
    listed in follow :func:`~groundcheck.network.canonical.canonical_ranks` (what each element is,
    never its name or where the plan writes it): each part grows from its outermost earth terminal
    (a main earthing terminal, else an outlet, else an inlet; else its first node), neighbours
    are taken in rank order, of parallel conductors the first, and the loops are listed by their
    closing conductor's rank.  Self-loops (a conductor whose two ends are one point) are left out;
    they count in :func:`loop_count` and have a rule of their own.  ``limit`` caps how many loops
    are listed (the count is always exact).

    References: K. Paton, "An algorithm for finding a fundamental set of
    cycles of a graph", Comm. ACM 12(9), 1969.
    """
    rank = canonical_ranks(G)
    parent, parent_edge, depth, tree_edges = spanning_forest(G, rank)
    loops: list[Loop] = []
    chords = sorted(
        (e for e in (edges_of(G) if edges is None else edges) if e[2] not in tree_edges),
        key=lambda e: rank[e[2]],
    )
    for u, v, key, _ in chords:
        if u == v:
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
    """Area enclosed by a polygon, m²: the integral of |winding number| over the plane, so that
    each lobe of a self-intersecting outline counts once whatever its sense (the shoelace formula's
    net area would subtract a lobe wound the other way); 0 for fewer than three points.

    Exact: the plane is cut into vertical slabs at every vertex and crossing, inside which no two
    edges cross; the edges through a slab are sorted by height and each trapezoid between
    neighbours carries the winding number accumulated below it (edge directions upward count +1,
    downward −1)."""
    if len(pts) < 3:
        return 0.0
    if len(pts) <= SMALL_POLYGON:  # most loops: plain floats beat array set-up
        if len(pts) == 3 or not _crosses_itself_small(pts):
            n = len(pts)
            terms = [
                (pts[k][0] * pts[(k + 1) % n][1], pts[(k + 1) % n][0] * pts[k][1])
                for k in range(n)
            ]
            return _shoelace(sum(p - q for p, q in terms), sum(abs(p) + abs(q) for p, q in terms))
    a = np.asarray(pts, dtype=float)
    if not _crosses_itself(a):  # the usual case: the shoelace formula, exact
        x, y = a[:, 0], a[:, 1]
        p, q = x * np.roll(y, -1), y * np.roll(x, -1)
        return _shoelace(float(np.sum(p) - np.sum(q)), float(np.sum(np.abs(p) + np.abs(q))))
    return _slab_area(a)


#: rounding of the shoelace sum, in units of its terms' size: a sum within it of zero is an outline
#: with no area (a loop along a line), whose rounding noise would otherwise depend on where the
#: outline starts (a plan renamed or mirrored: 2e-19 m² against 1e-19 m²)
_NOISE = 64 * np.finfo(float).eps


def _shoelace(twice: float, scale: float) -> float:
    """Half the shoelace sum's magnitude; 0 within the sum's rounding of zero."""
    return 0.0 if abs(twice) <= _NOISE * scale else abs(twice) / 2.0


def _slab_area(a: np.ndarray) -> float:
    """:func:`polygon_area` of an outline that crosses itself: by vertical slabs cut at every
    vertex and crossing, the trapezoids between neighbouring edges weighted by |winding| (the
    slabs taken in blocks, every edge of a block's slabs at once)."""
    q = np.roll(a, -1, axis=0)
    keep = a[:, 0] != q[:, 0]
    p, q = a[keep], q[keep]
    cuts = np.unique(np.concatenate([a[:, 0], _crossings_x(p, q)]))
    x0, x1 = cuts[:-1], cuts[1:]
    x0, x1 = x0[x1 > x0], x1[x1 > x0]
    dx, dy = q[:, 0] - p[:, 0], q[:, 1] - p[:, 1]
    lo, hi = np.minimum(p[:, 0], q[:, 0]), np.maximum(p[:, 0], q[:, 0])
    sense = np.where(dx > 0, 1, -1)
    total = 0.0
    block = max(1, 400_000 // max(1, len(p)))
    for s in range(0, len(x0), block):
        total += _slab_block(p, dx, dy, lo, hi, sense, x0[s : s + block], x1[s : s + block])
    return float(total)


def _slab_block(p, dx, dy, lo, hi, sense, x0, x1) -> float:
    """The |winding|-weighted area of the slabs [x0, x1): in each, the edges through it sorted by
    height; an edge not through a slab sorts last there with no sense (the senses of the edges
    through a slab add up to nought, so the winding is nought past the last of them)."""
    xm = 0.5 * (x0 + x1)
    through = (lo[None, :] <= xm[:, None]) & (xm[:, None] <= hi[None, :])
    t0 = (x0[:, None] - p[None, :, 0]) / dx[None, :]
    t1 = (x1[:, None] - p[None, :, 0]) / dx[None, :]
    y0 = np.where(through, p[None, :, 1] + dy[None, :] * t0, 0.0)
    y1 = np.where(through, p[None, :, 1] + dy[None, :] * t1, 0.0)
    mid = np.where(through, p[None, :, 1] + dy[None, :] * 0.5 * (t0 + t1), np.inf)
    order = np.argsort(mid, axis=1, kind="stable")
    y0, y1 = np.take_along_axis(y0, order, 1), np.take_along_axis(y1, order, 1)
    w = np.cumsum(np.take_along_axis(np.where(through, sense[None, :], 0), order, 1), axis=1)
    gaps = (y0[:, 1:] - y0[:, :-1]) + (y1[:, 1:] - y1[:, :-1])
    return float(np.sum(np.abs(w[:, :-1]) * gaps * ((x1 - x0) / 2)[:, None]))


def _crossings_x(p: np.ndarray, q: np.ndarray) -> np.ndarray:
    """The x of every crossing of two of the segments p→q inside both (all pairs at once)."""
    inside, t, d = _crossing_pairs(p, q)
    i, j = np.nonzero(np.triu(inside, 1))
    return p[i, 0] + t[i, j] * d[i, 0]


#: polygons with at most this many corners are checked for crossings with plain floats
SMALL_POLYGON = 12


def _crosses_itself_small(pts) -> bool:
    """:func:`_crosses_itself` for a short outline, pair by pair."""
    n = len(pts)
    edges = [(pts[k], pts[(k + 1) % n]) for k in range(n)]
    return any(
        _crossing_x(edges[i], edges[j]) is not None
        for i in range(n)
        for j in range(i + 2, n)
        if not (i == 0 and j == n - 1)
    )


def _crosses_itself(a: np.ndarray) -> bool:
    """Whether any two edges of the closed polygon cross inside both (all pairs at once)."""
    return bool(_crossing_pairs(a, np.roll(a, -1, axis=0))[0].any())


def _crossing_pairs(p: np.ndarray, q: np.ndarray):
    """For every pair of the segments p→q: whether they cross inside both, and the crossing's
    parameter t along the first (t[i, j] on segment i), with the segments' directions."""
    d = q - p
    r = p[None, :, :] - p[:, None, :]  # r[i, j] = p_j − p_i
    den = d[:, None, 0] * d[None, :, 1] - d[:, None, 1] * d[None, :, 0]
    with np.errstate(divide="ignore", invalid="ignore"):
        t = (r[..., 0] * d[None, :, 1] - r[..., 1] * d[None, :, 0]) / den
        u = (r[..., 0] * d[:, None, 1] - r[..., 1] * d[:, None, 0]) / den
    inside = (den != 0) & (t > 1e-12) & (t < 1 - 1e-12) & (u > 1e-12) & (u < 1 - 1e-12)
    return inside, t, d


def _crossing_x(e, f) -> float | None:
    """The x of the crossing of two segments inside both, or None."""
    (p, q), (r, s) = e, f
    d = (q[0] - p[0]) * (s[1] - r[1]) - (q[1] - p[1]) * (s[0] - r[0])
    if d == 0:
        return None
    t = ((r[0] - p[0]) * (s[1] - r[1]) - (r[1] - p[1]) * (s[0] - r[0])) / d
    u = ((r[0] - p[0]) * (q[1] - p[1]) - (r[1] - p[1]) * (q[0] - p[0])) / d
    if 1e-12 < t < 1 - 1e-12 and 1e-12 < u < 1 - 1e-12:
        return float(p[0] + t * (q[0] - p[0]))
    return None


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
