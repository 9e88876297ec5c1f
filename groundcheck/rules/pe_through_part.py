"""GC228: a touchable part whose only protective path runs through a part that a service takes out.

A bonding wire to a cover, a panel or a second chassis that starts from a stud on a transformer's
frame (or a bracket, a choke's can) hangs on that part's fixings: unbolt the transformer to change
it and the wire goes with it, leaving the cover unearthed though nobody touched an earth wire — the
trap GC202 finds for the protective earth's own stud, one bond further on. Each bond starts from
the chassis the protective earth lands on, on a fixing of its own (common practice; product-safety
standards forbid a protective connection that depends on a part's fixings — IEC 60335-1 cl. 28,
IEC 62368-1, from memory).

A part is taken to be one a service takes out when it is bolted to a larger part (the chassis);
a part bolted onto it (a cover mounted on a bracket) goes with it and is not reported; only a part
reached from it through a wire is.
"""

from __future__ import annotations

import networkx as nx

from ..model.kinds import is_fastening_kind
from ..model.records import PE_POINT
from .catalogue import Finding
from .context import AuditContext
from .registry import rule

__all__ = ["rule_bond_through_part"]


@rule("GC228")
def rule_bond_through_part(ctx: AuditContext) -> list[Finding]:
    """GC228: touchable metal whose only protective path runs through a smaller part bolted to a
    larger one, from a wire that starts on it.

    Parameters:
        ctx: the audit context.
    Returns:
        GC228 findings, one per part so earthed.
    References:
        the module's description (common practice; IEC 60335-1 cl. 28, from memory).
    """
    plan = ctx.plan
    m = plan.mains
    if m is None or m.equipment_class != "I" or PE_POINT not in ctx.G:
        return []
    G = nx.MultiGraph()
    for u, v, k in ctx.G.edges(keys=True):
        if k in ctx.route.keep:
            G.add_edge(u, v, key=k)
    if PE_POINT not in G:
        return []
    metals = {x.name: x for x in plan.metals}
    home = _home(ctx, G)
    out = []
    for part in sorted(set(G) & metals.keys() - home):
        bigger = _bolted_to_larger(ctx, G, part)
        if bigger is None:
            continue
        H = G.copy()
        H.remove_node(part)
        near = set(G.adj[part])
        for comp in nx.connected_components(H):
            if PE_POINT in comp:
                continue
            for x in sorted(comp & metals.keys()):
                if not metals[x].touchable or _mounted(ctx, H, comp, x, near):
                    continue
                out.append(_finding(ctx, G, x, part, bigger, near & comp))
    return out


def _home(ctx: AuditContext, G) -> set[str]:
    """The parts the protective conductors from the inlet land on: a part itself, or the part a
    landing point sits on and every part its fastenings hold it to (GC202's own ground)."""
    out = set()
    for v in G.adj[PE_POINT]:
        if v in ctx.metals:
            out.add(v)
            continue
        p = ctx.plan.point(v)
        if p is not None and p.on:
            out.add(p.on)
        out |= {w for w, keys in G.adj[v].items() if w in ctx.metals}
    return out


def _area(ctx: AuditContext, name: str) -> float:
    x = ctx.plan.metal(name)
    return abs(x.size[0] * x.size[1]) if x is not None and x.size else 0.0


def _fastened(ctx: AuditContext, G, u: str, v: str) -> bool:
    return any(is_fastening_kind(ctx.conductors[k].kind) for k in G.adj[u].get(v, {}))


def _bolted_to_larger(ctx: AuditContext, G, part: str) -> str | None:
    """The larger part ``part`` is bolted to — by a fastening between the two, or through a point
    fastened to both — or None (the chassis itself, a part with no fixings)."""
    mine = _area(ctx, part)
    found = []
    for w in G.adj[part]:
        if not _fastened(ctx, G, part, w):
            continue
        if w in ctx.metals:
            found.append(w)
            continue
        found += [y for y in G.adj[w] if y in ctx.metals and y != part and _fastened(ctx, G, w, y)]
    larger = [y for y in found if _area(ctx, y) > mine]
    return max(larger, key=lambda y: (_area(ctx, y), y)) if larger else None


def _mounted(ctx: AuditContext, H, comp: set, x: str, near: set) -> bool:
    """Whether ``x`` hangs on the removed part by fastenings alone (a cover bolted onto a bracket
    goes with it): joined to one of its neighbours through fastenings within ``comp``."""
    F = nx.Graph()
    F.add_nodes_from(comp)
    for u, v, k in H.subgraph(comp).edges(keys=True):
        if is_fastening_kind(ctx.conductors[k].kind):
            F.add_edge(u, v)
    return bool(nx.node_connected_component(F, x) & near)


def _finding(ctx: AuditContext, G, x: str, part: str, bigger: str, starts: set) -> Finding:
    """The finding for ``x`` earthed through ``part`` only: the wire that leaves from a point on it
    is named."""
    wires = sorted(
        k
        for s in starts
        for w, keys in G.adj[s].items()
        for k in keys
        if not is_fastening_kind(ctx.conductors[k].kind)
    )
    via = f" ({wires[0]} starts on {part})" if wires else ""
    return Finding(
        "GC228",
        "danger",
        f"the only protective path to {x} runs through {part}{via}, which is bolted to "
        f"{bigger}: taking {part} out for service unearths {x}",
        ctx.plan.metal(x).location,
        (x, part, *wires[:1]),
        {},
        f"bond {x} by a protective wire of its own from a stud on {bigger} beside the protective "
        f"earth's, never from {part}",
    )
