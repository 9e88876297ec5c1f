"""GC229: touchable metal of a box fed at extra-low voltage that makes a hazardous voltage inside.

A valve headphone amplifier on a double-insulated low-voltage adapter has no protective earth, and
needs none for the adapter's 16 V; but it steps its supply up to the high tension its valves need
inside the box. A chafed high-tension lead that touches the case then makes the case live, unless
the case is tied to the high tension's own return: the fault is a short of that supply, which its
fuse or its own impedance ends, and the case stays near 0 V (common practice; IEC 61140's single
fault: a part that can become live under a single fault is held by a bond, from memory). The bond
is held to the same 0.1 Ω as a protective bond (IEC 60065 15.2's limit, REFERENCE.md): a screw
through an anodised or painted finish is no bond to count on.

The high-tension supply is any rectifier whose winding is above the extra-low-voltage limit (50 V
rms); the box is fed at extra-low voltage when its ``mains`` is 50 V or less.
"""

from __future__ import annotations

import networkx as nx

from ..physics.impedance import conductor_resistance
from ..physics.safety import STANDARD_PE_LIMIT
from .catalogue import Finding
from .context import AuditContext
from .equipment import ELV_LIMIT
from .registry import rule

__all__ = ["rule_elv_fed_high_tension"]

#: a joint of no resistance is kept in the network as this, Ω (a solve needs finite conductances)
_SHORT = 1e-9


@rule("GC229")
def rule_elv_fed_high_tension(ctx: AuditContext) -> list[Finding]:
    """GC229: in a box fed at extra-low voltage, touchable metal not bonded within 0.1 Ω to the
    return of a supply above the extra-low-voltage limit.

    Parameters:
        ctx: the audit context.
    Returns:
        GC229 findings, one per touchable part (dangers, as GC206's over the same limit in class I
        equipment).
    References:
        the module's description (common practice; IEC 61140, from memory; IEC 60065 15.2).
    """
    plan = ctx.plan
    m = plan.mains
    if m is None or m.voltage > ELV_LIMIT:
        return []
    ht = sorted(
        (r for r in plan.rectifiers if r.secondary is not None and r.secondary > ELV_LIMIT),
        key=lambda r: (-r.secondary, r.name),
    )
    parts = [x for x in plan.metals if x.touchable and not x.signal_only]
    if not ht or not parts:
        return []
    G = _resistive_graph(ctx)
    supply = ht[0]
    peak = supply.secondary * 2**0.5
    out = []
    for part in parts:
        r = _resistance(G, part.name, supply.a)
        if r is not None and r <= STANDARD_PE_LIMIT:
            continue
        where = (
            "nothing joins it to that supply's return, so a chafed high-tension lead would "
            f"leave it at up to {peak:.0f} V"
            if r is None
            else f"its bond to that supply's return is {r * 1e3:.0f} mΩ, over the "
            f"{STANDARD_PE_LIMIT * 1e3:.0f} mΩ a bond is held to: should that joint open, a "
            f"chafed high-tension lead would leave it at up to {peak:.0f} V"
        )
        out.append(
            Finding(
                "GC229",
                "danger",
                f"{part.name} is touchable metal of a box fed at {m.voltage:g} V that makes "
                f"{supply.secondary:g} V rms inside ({supply.name}): {where}",
                part.location,
                (part.name, supply.name),
                {} if r is None else {"path_resistance_mohm": r * 1e3},
                f"bond {part.name} to {supply.a} (the high tension's return, or the star it is "
                "wired to) by a wire of its own "
                "on a stud with a toothed washer on bare metal — a screw through an anodised or "
                "painted finish is no bond",
            )
        )
    return out


def _resistive_graph(ctx: AuditContext) -> nx.Graph:
    """The plan's conductors as a graph of resistances, parallel conductors combined."""
    G = nx.Graph()
    for c in ctx.plan.conductors:
        if not c.connects:
            continue
        r = max(conductor_resistance(c, ctx.plan.ambient)[0], _SHORT)
        if G.has_edge(c.a, c.b):
            G[c.a][c.b]["r"] = 1.0 / (1.0 / G[c.a][c.b]["r"] + 1.0 / r)
        elif c.a != c.b:
            G.add_edge(c.a, c.b, r=r)
    return G


def _resistance(G: nx.Graph, a: str, b: str) -> float | None:
    """The DC resistance between ``a`` and ``b``, Ω, or None when nothing joins them."""
    if a not in G or b not in G or not nx.has_path(G, a, b):
        return None
    if a == b:
        return 0.0
    H = G.subgraph(nx.node_connected_component(G, a))
    return float(nx.resistance_distance(H, a, b, weight="r", invert_weight=True))
