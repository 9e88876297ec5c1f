"""Breadth-first search over the audit context's adjacency (``AuditContext.adj``): hop distances
and parents, for the rules that ask which star, terminal or bond a point reaches first."""

from __future__ import annotations

from collections import deque

__all__ = ["bfs"]


def bfs(adj: dict, sources, allowed=None):
    """Hop distances and parents from any of ``sources`` over nodes passing ``allowed``
    (``adj``: node -> neighbours).

    Parameters:
        adj: node -> neighbours.
        sources: start nodes.
        allowed: which nodes may be passed.
    Returns:
        (hop distance of each reached node, its parent).
    References:
        breadth-first search (Cormen et al., *Introduction to Algorithms*).
    """
    dist, parent = {}, {}
    q = deque()
    for s in sources:
        dist[s], parent[s] = 0, None
        q.append(s)
    while q:
        u = q.popleft()
        for v in adj[u]:
            if v not in dist and (allowed is None or allowed(v)):
                dist[v], parent[v] = dist[u] + 1, u
                q.append(v)
    return dist, parent
