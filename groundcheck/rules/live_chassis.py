"""GC230: metal joined to a pole of the mains — a live chassis.

A transformerless set (an "AC/DC" radio with a series heater string and its rectifier on the mains)
ties its chassis to one conductor of its cord. With an unpolarised plug the chassis is at line
voltage in half the sockets it meets; a hand on it, or on anything joined to it (an added input
socket's sleeve, a knob's grub screw), carries some hundred milliamperes to earth and nothing
disconnects (IEC 60479-1's body currents, from memory). The plan says so with a point of kind
``mains-pole`` where the cord's conductor lands.

Bonding such a chassis to the protective earth is never the fix: with the plug one way round it
shorts line to earth, the other way it runs the neutral's current in the protective conductor. The
set is made safe by an isolating transformer of its own (its chassis then on the floating
secondary), or kept in its insulated cabinet with nothing metal reachable; a signal input needs
isolation of its own (a signal transformer, or safety-rated capacitors in both legs) — work for a
qualified person (common practice).
"""

from __future__ import annotations

import networkx as nx

from .catalogue import Finding
from .context import AuditContext
from .registry import rule

__all__ = ["rule_live_chassis", "live_metals", "live_network"]


def live_network(plan, G) -> dict[str, str]:
    """Every node joined, by conductors that connect, to a point of kind ``mains-pole``: node ->
    the pole (the first by name).

    Parameters:
        plan: the plan.
        G: its ground graph.
    Returns:
        the live nodes (points and metal parts).
    References:
        none (connectivity).
    """
    out: dict[str, str] = {}
    for pole in sorted(p.name for p in plan.points if p.kind == "mains-pole" and p.name in G):
        if pole not in out:
            out.update(dict.fromkeys(nx.node_connected_component(G, pole), pole))
    return out


def live_metals(ctx: AuditContext) -> dict[str, str]:
    """Each metal part on a pole of the mains (:func:`live_network`): part -> the pole.

    Parameters:
        ctx: the audit context.
    Returns:
        the live parts.
    References:
        none (connectivity).
    """
    return {n: pole for n, pole in live_network(ctx.plan, ctx.G).items() if n in ctx.metals}


@rule("GC230")
def rule_live_chassis(ctx: AuditContext) -> list[Finding]:
    """GC230: metal joined to a pole of the mains, whatever the plan's protection class.

    Parameters:
        ctx: the audit context.
    Returns:
        GC230 findings, one per part (a danger when it is touchable, a warning otherwise).
    References:
        the module's description (common practice; IEC 60479-1, from memory).
    """
    net = live_network(ctx.plan, ctx.G)
    live = {n: pole for n, pole in net.items() if n in ctx.metals}
    if not live:
        return []
    # the sockets on that network are live too: a plug's sleeve is in reach whatever the cabinet
    sockets = sorted(
        p.name for p in ctx.plan.points if p.kind in ("sleeve", "jack") and p.name in net
    )
    also = (
        ""
        if not sockets
        else f"; the socket {sockets[0]} on it is live too"
        if len(sockets) == 1
        else f"; the sockets {', '.join(sockets[:4])} on it are live too"
    )
    out = []
    volts = ctx.plan.mains.voltage if ctx.plan.mains is not None else None
    at = f"{volts:g} V" if volts else "line voltage"
    for name in sorted(live):
        part = ctx.plan.metal(name)
        reach = part.touchable
        out.append(
            Finding(
                "GC230",
                "danger" if reach else "warning",
                f"{name} is joined to a pole of the mains ({live[name]}): with the plug one way "
                f"round it is at {at} to earth, "
                + (
                    "and a hand on it — or on anything joined to it — carries a current that "
                    "nothing disconnects"
                    if reach
                    else "and anything that joins it to reachable metal makes that live"
                )
                + also,
                part.location,
                (name, live[name]),
                {},
                "never bond it to the protective earth (that shorts line to earth with the plug "
                "one way round, and runs the neutral's current in the protective conductor the "
                "other); give the set an isolating transformer of its own, its chassis on the "
                "floating secondary, or keep it in its insulated cabinet with nothing metal "
                "reachable and any signal input isolated (a signal transformer, or safety-rated "
                "capacitors in both legs) — work for a qualified person",
            )
        )
    return out
