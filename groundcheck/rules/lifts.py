"""GC115: a ground lift that lifts nothing — a switch written open, or a lift network, whose two
ends are joined without it inside the same equipment (a socket's fastening to the case, a tag
bolted to the metal).  Paths through other equipment do not count: they are the loop a lift is
there to open."""

from __future__ import annotations

import networkx as nx

from ..model.kinds import can_open, is_fastening, is_lift, joins_devices
from ..model.records import SOCKET_KINDS, insulating_means
from .catalogue import Finding
from .context import AuditContext
from .registry import rule

__all__ = ["rule_lift_bypassed"]


@rule("GC115")
def rule_lift_bypassed(ctx: AuditContext) -> list[Finding]:
    """GC115 at each open switch or lift network whose ends are joined without it in its own
    equipment, naming the conductors that join them.

    Parameters:
        ctx: the audit context.
    Returns:
        GC115 findings.
    References:
        the rule catalogue (rules/catalogue.py): common practice.
    """
    lifts = [
        c
        for c in ctx.plan.conductors
        if (can_open(c) and not c.closed) or (is_lift(c) and c.connects)
    ]
    if not lifts:
        return []
    device_of = ctx.plan.index.device_of
    # inside one piece of equipment: no link between devices, no conductor between two of them
    inside = nx.subgraph_view(
        ctx.G,
        filter_edge=lambda u, v, k: (
            not joins_devices(ctx.conductors[k]) and device_of(u) == device_of(v)
        ),
    )
    out = []
    for c in lifts:
        around_it = nx.subgraph_view(inside, filter_edge=lambda u, v, k, c=c: k != c.name)
        if c.a not in ctx.G or c.b not in ctx.G or not nx.has_path(around_it, c.a, c.b):
            continue
        path = nx.shortest_path(around_it, c.a, c.b)
        around = [next(iter(around_it[u][v])) for u, v in zip(path, path[1:])]
        out.append(_bypassed(ctx, c, around))
    return out


def _bypassed(ctx: AuditContext, c, around: list[str]) -> Finding:
    """The finding for lift ``c`` joined around by the conductors ``around``: each fastening
    there that holds a socket or jack is one to insulate."""
    what = "is open" if can_open(c) else "is a lift network"
    held = {
        k: kind
        for k in around
        if is_fastening(ctx.conductors[k], ctx.metals)
        for p in (ctx.conductors[k].a, ctx.conductors[k].b)
        if (kind := getattr(ctx.plan.point(p), "kind", None)) in SOCKET_KINDS
    }
    sockets = list(held)
    fix = (
        f"insulate {', '.join(sockets)} ({insulating_means(held[sockets[0]])}) so that only "
        f"{c.name} joins {c.a} and {c.b}"
        if sockets
        else f"move {c.name} to where it alone joins the two, or undo {', '.join(around)}"
    )
    return Finding(
        "GC115",
        "warning",
        f"{c.name} {what} between {c.a} and {c.b}, but {', '.join(around)} join them without it: "
        "the lift lifts nothing",
        c.location,
        (c.name, *around),
        {"conductors": len(around)},
        f"{fix}; never lift the protective earth",
        tuple(("insulate", k) for k in sockets),
    )
