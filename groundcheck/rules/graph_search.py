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


def bfs(adj: dict, sources, allowed=None, rank: dict | None = None, joints=frozenset()):
    """Hop distances and parents from any of ``sources`` over nodes passing ``allowed``
    (``adj``: node -> neighbours).

    Parameters:
        adj: node -> neighbours.
        sources: start nodes.
        allowed: which nodes may be passed.
        rank: node -> its canonical rank; when given, the sources and each node's neighbours are
            taken in that order (the parents are then free of the plan's order and names).
        joints: nodes passed without a hop (a wire's joint between its two pieces: a wire
            written in two pieces is as near as the whole).
    Returns:
        (hop distance of each reached node, its parent).
    References:
        breadth-first search, and its 0-1 form for joints (Cormen et al., *Introduction to
        Algorithms*).
    """
    dist, parent = {}, {}
    q = deque()
    if rank is not None:
        sources = sorted(sources, key=rank.__getitem__)
    for s in sources:
        dist[s], parent[s] = 0, None
        q.append(s)
    done = set()
    while q:
        u = q.popleft()
        if u in done:
            continue
        done.add(u)
        for v in adj[u] if rank is None else sorted(adj[u], key=rank.__getitem__):
            if allowed is not None and not allowed(v):
                continue
            step = 0 if v in joints else 1
            if dist[u] + step < dist.get(v, float("inf")):
                dist[v], parent[v] = dist[u] + step, u
                q.appendleft(v) if step == 0 else q.append(v)
    return dist, parent
