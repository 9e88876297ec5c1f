"""GC232: a class I device earthed only through other equipment — its own outlet reaches no main
earthing terminal (a plug whose earth is cut, an adapter without one), yet a bonding wire to
another chassis and that device's cord earth its metal, so the device earth table finds a path."""

from __future__ import annotations

from typing import TYPE_CHECKING

import networkx as nx

from ..model.kinds import can_carry_protective
from .catalogue import Finding
from .registry import rule

if TYPE_CHECKING:
    from .electrical import Solved

__all__ = ["rule_borrowed_earth"]


@rule("GC232", needs="solve")
def rule_borrowed_earth(s: Solved) -> list[Finding]:
    """GC232 at each placed class I device with an earth path whose outlet, the device itself
    left out, reaches no earthing terminal.

    Parameters:
        s: the solved network with its context.
    Returns:
        GC232 findings.
    References:
        the rule catalogue (rules/catalogue.py): IEC 60364-5-54, common practice.
    """
    if not s.device_earths:
        return []
    plan, index = s.plan, s.plan.index
    mets = {p.name for p in plan.points if p.kind == "earthing-terminal"}
    G = nx.Graph()
    for u, v, _, d in s.ctx.edges:
        c = d["conductor"]
        if c.connects and can_carry_protective(c):
            G.add_edge(u, v, name=c.name)
    out = []
    for e in s.device_earths:
        dev = index.devices.get(e.device)
        if e.resistance is None or dev is None or not dev.plugged or dev.plugged not in G:
            continue
        own = {n for n in G if index.device_of(n) == dev.name} | {e.inlet}
        H = G.subgraph(n for n in G if n not in own)
        if dev.plugged in H and any(m in H and nx.has_path(H, dev.plugged, m) for m in mets):
            continue
        # what leaves the device other than its own cord (which lands on its outlet)
        leaving = [
            (G[u][v]["name"], v)
            for u in own & G.nodes
            for v in G[u]
            if v not in own and v != dev.plugged
        ]
        near = set().union(*(nx.node_connected_component(H, v) for _, v in leaving))
        others = sorted({index.device_of(n) for n in near} - {None, dev.name})
        out.append(_borrowed(dev, e, sorted({k for k, _ in leaving}), others))
    return out


def _borrowed(dev, e, via: list[str], others: list[str]) -> Finding:
    """The finding for device ``dev`` earthed only through the conductors ``via`` that leave it,
    to the devices ``others`` (whose cords then carry its earth)."""
    through = ", ".join(via[:6]) + ("…" if len(via) > 6 else "")
    who = f", to {', '.join(others[:4])} and their cords" if others else ""
    return Finding(
        "GC232",
        "danger",
        f"device {dev.name}: its outlet {dev.plugged} reaches no main earthing terminal; its "
        f"metal is earthed only through {through}{who} — unplug or unbolt those and it is "
        "earthed by nothing while its own cord still feeds it",
        dev.location,
        (dev.name, e.inlet),
        {"resistance_ohm": e.resistance},
        f"restore {dev.name}'s own earth: a plug and outlet whose protective conductor reaches "
        "the main earthing terminal (work for a qualified person); never count a bond between "
        "chassis as its protective earth",
    )
