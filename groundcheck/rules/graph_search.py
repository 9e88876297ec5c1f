"""Breadth-first search over the audit context's adjacency (``AuditContext.adj``): hop distances
and parents, for the rules that ask which star, terminal or bond a point reaches first.

The distances do not depend on the order the search meets the nodes in; the parents do, where a
node has two neighbours as near as each other to the sources. Given the network's canonical ranks
(:func:`groundcheck.network.canonical.canonical_ranks`) the sources and each node's neighbours are
taken in that order, so the parents, and the paths they make, follow what each element is, never
the order the plan writes its statements in nor the names."""

from __future__ import annotations

from collections import deque

__all__ = ["bfs"]


def bfs(adj: dict, sources, allowed=None, rank: dict | None = None):
    """Hop distances and parents from any of ``sources`` over nodes passing ``allowed``
    (``adj``: node -> neighbours).

    Parameters:
        adj: node -> neighbours.
        sources: start nodes.
        allowed: which nodes may be passed.
        rank: node -> its canonical rank; when given, the sources and each node's neighbours are
            taken in that order (the parents are then free of the plan's order and names).
    Returns:
        (hop distance of each reached node, its parent).
    References:
        breadth-first search (Cormen et al., *Introduction to Algorithms*).
    """
    dist, parent = {}, {}
    q = deque()
    if rank is not None:
        sources = sorted(sources, key=rank.__getitem__)
    for s in sources:
        dist[s], parent[s] = 0, None
        q.append(s)
    while q:
        u = q.popleft()
        for v in adj[u] if rank is None else sorted(adj[u], key=rank.__getitem__):
            if v not in dist and (allowed is None or allowed(v)):
                dist[v], parent[v] = dist[u] + 1, u
                q.append(v)
    return dist, parent
