"""Where a piece of equipment's protective earth enters it, and how far a point is from it: the
rules keep the bond nearest it and open the farthest."""

from __future__ import annotations

from ..model.records import PE_POINT
from ..network.canonical import canonical_ranks

__all__ = ["pe_point", "pe_distance"]


def pe_point(ctx, node: str) -> str:
    """The protective-earth inlet point of the equipment ``node`` belongs to: a placed device's own
    (``DEVICE.mains.pe``), else the plan's.

    Parameters:
        ctx: the audit context (:class:`groundcheck.rules.context.AuditContext`).
        node: a point.
    Returns:
        the inlet's protective-earth point's name (which may not exist in the plan).
    References:
        none (naming).
    """
    dev = ctx.plan.index.device_of(node)
    own = f"{dev}.{PE_POINT}" if dev else None
    return own if own is not None and own in ctx.G else PE_POINT


def pe_distance(ctx, node: str) -> float:
    """Straight-line distance from a chassis-side point to its equipment's protective-earth landing
    (0 when unknown).

    Parameters:
        ctx: the audit context (:class:`groundcheck.rules.context.AuditContext`).
        node: a chassis-side point.
    Returns:
        the straight-line distance to the protective-earth landing, m.
    References:
        elementary geometry.
    """
    pe = [
        v for v in ctx.G.adj.get(pe_point(ctx, node), {}) if ctx.G.nodes[v].get("pos") is not None
    ]
    here = ctx.G.nodes[node].get("pos") if node in ctx.G else None
    if not pe or here is None:
        return 0.0
    # of several landings (a second protective wire from the inlet), the first in the network's
    # canonical order: not the one the plan happens to write first
    p = ctx.G.nodes[min(pe, key=canonical_ranks(ctx.G).__getitem__)]["pos"]
    return ((p[0] - here[0]) ** 2 + (p[1] - here[1]) ** 2) ** 0.5
