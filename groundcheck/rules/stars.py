"""GC103, GC104: stars that are chains (a return reaching the star through another, a channel's
star reaching the plan's through another channel's, a supply's returns meeting only at the star),
and stars with a single branch.

Pure functions of an :class:`~groundcheck.rules.context.AuditContext`, registered under their codes
(:mod:`groundcheck.rules.registry`).
"""

from __future__ import annotations

from ..network.canonical import canonical_ranks
from .catalogue import Finding
from .context import AuditContext
from .graph_search import bfs
from .registry import rule
from .repairs import supply_ends, supply_meetings

__all__ = ["rule_stars"]


@rule("GC103", "GC104")
def rule_stars(ctx: AuditContext) -> list[Finding]:
    """GC103, GC104: stars that are chains, stars with one branch.

    Parameters:
        ctx: the audit context.
    Returns:
        GC103, GC104 findings.
    References:
        the rule catalogue (rules/catalogue.py), which names each code's sources.
    """
    stars = [p for p in ctx.plan.points if p.kind == "star" and p.name in ctx.G]
    if not stars:
        return []
    groups = {p.name: p.group for p in ctx.plan.points}
    allowed = lambda v: v not in ctx.metals  # noqa: E731
    out = _single_branches(ctx, stars)
    out += _chains(ctx, stars, groups, allowed)
    out += _stars_through_other_placements(ctx, stars, groups, allowed)
    out += [
        Finding("GC103", "warning", msg, loc, elements, {"chained_returns": 1}, fix, acts)
        for loc, elements, msg, fix, acts in supply_meetings(ctx)
    ]
    return out


def _single_branches(ctx: AuditContext, stars) -> list[Finding]:
    """GC104: a star with one conductor."""
    out = []
    for s in stars:
        degree = ctx.G.degree(s.name)
        if degree == 1:
            ((u, v, k),) = ctx.G.edges(s.name, keys=True)
            out.append(
                Finding(
                    "GC104",
                    "note",
                    f"star {s.name} has a single branch ({k})",
                    s.location,
                    (s.name, k),
                    {"branches": 1},
                    "connect the returns that should gather there, or call it a junction",
                )
            )
    return out


def _chains(ctx: AuditContext, stars, groups: dict, allowed) -> list[Finding]:
    """GC103 for returns that reach their star through another return: each terminal belongs to
    its nearest star; a chain is a terminal whose path passes another terminal."""
    terminals = {t for t in ctx.signal_points if t in ctx.G and t not in ctx.chassis_side}
    star_names = {s.name for s in stars}
    # a terminal as near to two stars, or to its star over two paths, takes the one first in the
    # network's canonical order: never the order the statements are written in
    # a junction that only joins two pieces of one run is no hop: a wire split in two at a
    # junction reaches as the whole does
    joints = {
        p.name
        for p in ctx.plan.points
        if p.kind == "junction" and p.name in ctx.G and len(ctx.adj[p.name]) == 2
    } - terminals
    rank = canonical_ranks(ctx.G)
    dist, parent = bfs(ctx.adj, star_names, allowed, rank, joints)
    # a return is chained only when every shortest route to its star passes another return: with
    # one clear route as short, which one the search took is no fact of the wiring (and a wire
    # split in two, or renamed, would decide it)
    clear, _ = bfs(ctx.adj, star_names, lambda v: allowed(v) and v not in terminals, rank, joints)
    chains: dict[str, list[tuple[str, str]]] = {}
    supplies = supply_ends(ctx.plan)
    # the supplies' own return points (reservoir, centre tap, filter and regulator returns): met
    # at one supply's 0 V and taken to the star by one link, they are gathered, not chained
    # (common practice: the ± rails' reservoirs meet at their centre tap)
    gathered = {p for pair in supplies for p in pair}
    # an input socket wired to the ground of the stage that amplifies it, which runs on to the
    # star, is that stage's input pair as the trade wires it (the input's ground beside its
    # valve's cathode): no chain.  An output socket read at 0 dB is not: the load's current
    # returns through it
    supplies |= {frozenset((st.a, st.b)) for st in ctx.plan.stages if st.gain > 0}
    for t in sorted(terminals - star_names):
        if t not in dist:
            continue
        path = [t]
        while parent[path[-1]] is not None:
            path.append(parent[path[-1]])
        star = path[-1]
        if groups.get(star) and groups.get(t) != groups.get(star):
            continue  # a star placed in a block or device gathers that placement's returns only
        pairs = ctx.source_pairs | supplies
        if _partner_as_near(ctx.adj, dist, t, joints, pairs):
            continue  # as near through its own current's other end: which route is no fact
        via = _via(path, t, terminals, pairs)
        if via and t in gathered and set(via) <= gathered:
            continue  # a supply's return gathered with the others' at a supply's 0 V, one link on
        if via and _clear_distance(ctx.adj, clear, t, joints) > dist[t]:
            chains.setdefault(star, []).append((t, via[0]))
    return _chain_findings(ctx, chains)


def _chain_findings(ctx: AuditContext, chains: dict) -> list[Finding]:
    """GC103, one per star: ``chains`` maps each star to its (return, return passed) pairs."""
    out = []
    for star, pairs in sorted(chains.items()):
        desc = "; ".join(f"{t} reaches it through {u}" for t, u in pairs)
        elements = tuple(sorted({star, *(x for p in pairs for x in p)}))
        first = min((ctx.loc(t) for t, _ in pairs))
        out.append(
            Finding(
                "GC103",
                "warning",
                f"the star {star} is partly a chain: {desc}",
                first,
                elements,
                {"chained_returns": len(pairs)},
                "; ".join(f"run {t} to {star} by a wire of its own" for t, _ in pairs),
            )
        )
    return out


def _via(path: list, t: str, terminals: set, pairs) -> list:
    """The other returns a return's route to its star passes before the other end of its own pair
    (an input read beside its stage's ground, a head coil's return at the first stage's cathode):
    beyond that end the route is that end's, judged as its own."""
    inner = path[1:-1]
    own = next((i for i, n in enumerate(inner) if frozenset((t, n)) in pairs), len(inner))
    return [n for n in inner[:own] if n in terminals]


def _partner_as_near(adj: dict, dist: dict, t: str, joints, pairs) -> bool:
    """Whether a shortest route from ``t`` to its star starts at the other end of its own current
    (a source's or supply's pair): then a tie decided which route the search kept, and a route
    through another return is no chain of the wiring (a wire split at a junction, or renamed,
    would decide the tie the other way)."""
    step = 0 if t in joints else 1
    return any(
        frozenset((t, u)) in pairs and u in dist and dist[u] + step == dist[t] for u in adj[t]
    )


def _clear_distance(adj: dict, clear: dict, t: str, joints) -> float:
    """The hops from ``t``'s nearest star along a route that passes no other return (``clear``:
    the distances over the nodes that are no returns)."""
    step = 0 if t in joints else 1
    return min((clear[u] + step for u in adj[t] if u in clear), default=float("inf"))


def _stars_through_other_placements(
    ctx: AuditContext, stars, groups: dict, allowed
) -> list[Finding]:
    """GC103 for a star of one placement (a channel) that reaches the plan's own star only through
    the star of another placement: its returns then flow in the other channel's star wire
    (dual-mono practice: each channel's star on a wire of its own to the common star, common
    practice)."""
    own = sorted(s.name for s in stars if not groups.get(s.name))
    placed = [s for s in stars if groups.get(s.name)]
    if not own or not placed:
        return []
    rank = canonical_ranks(ctx.G)
    _, parent = bfs(ctx.adj, own, allowed, rank)
    out = []
    for s in placed:
        if s.name not in parent:
            continue
        path = [s.name]
        while parent[path[-1]] is not None:
            path.append(parent[path[-1]])
        via = next(
            (
                n
                for n in path[1:-1]
                if groups.get(n)
                and groups.get(n) != groups.get(s.name)
                and ctx.plan.point(n).kind == "star"
            ),
            None,
        )
        if via is None:
            continue
        # of two conductors side by side to the other star, the first by rank
        links = sorted(ctx.G[s.name].get(via, {}), key=rank.__getitem__) if path[1] == via else []
        root, link = path[-1], (links[0] if links else None)
        out.append(
            Finding(
                "GC103",
                "warning",
                f"star {s.name} reaches {root} only through {via}, the star of {groups[via]}: the "
                f"returns of {groups[s.name]} flow in its wiring",
                ctx.loc(link) if link else s.location,
                tuple(sorted({s.name, via, root} | ({link} if link else set()))),
                {"chained_returns": 1},
                f"run {s.name} to {root} by a wire of its own",
                (("reroute", link, root),) if link else (),
            )
        )
    return out
