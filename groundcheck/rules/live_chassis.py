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

import math

import networkx as nx

from ..model.kinds import can_open, is_lift

from .catalogue import RULES, Finding
from .context import AuditContext
from .registry import rule

__all__ = ["rule_live_chassis", "live_metals", "live_network", "LIVE_CHASSIS"]

#: the live-chassis rule's code, read from the catalogue by its name (the advisor asks for it here)
LIVE_CHASSIS = next(code for code, r in RULES.items() if r.name == "live-chassis")


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
        removable = _through_removable(ctx, name)
        if removable is not None:
            out.append(_tied_by_a_part(ctx, name, live[name], removable, reach, also))
            continue
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


def _through_removable(ctx: AuditContext, part: str) -> list | None:
    """The lift networks and switches (a capacitor or a "ground switch" from the mains to the
    chassis) without which ``part`` would reach no pole of the mains: the conductors of its
    shortest way to a pole that are such parts, or None when it is tied to a pole by wire."""
    G = ctx.G
    poles = {p.name for p in ctx.plan.points if p.kind == "mains-pole" and p.name in G}
    parts = {c.name: c for c in ctx.plan.conductors if is_lift(c) or can_open(c)}
    wired = nx.subgraph_view(G, filter_edge=lambda u, v, k: k not in parts)
    if any(nx.has_path(wired, part, p) for p in poles):
        return None
    pole = min((p for p in poles if nx.has_path(G, part, p)), key=str)
    path = nx.shortest_path(G, part, pole)
    return [parts[k] for u, v in zip(path, path[1:]) for k in G[u][v] if k in parts]


def _tied_by_a_part(ctx: AuditContext, name: str, pole: str, parts: list, reach: bool, also: str):
    """GC230 for metal tied to a pole of the mains only through a capacitor or a switch (a vintage
    set's "ground switch" and its capacitor): the fix is to take that part out and earth the
    metal, which its power transformer allows; the current a lift's capacitor passes is given."""
    m = ctx.plan.mains
    names = ", ".join(c.name for c in parts)
    figures, current = {}, ""
    lifts = [c for c in parts if is_lift(c)]
    if m is not None and len(lifts) == 1:
        c = lifts[0]
        y = math.hypot(
            1.0 / c.resistance if c.resistance else 0.0,
            2 * math.pi * m.frequency * (c.capacitance or 0.0),
        )
        figures = {"current_ma": m.voltage * y * 1e3}
        current = f"; {c.name} passes {m.voltage * y * 1e3:.3g} mA from the mains to it"
    return Finding(
        "GC230",
        "danger" if reach else "warning",
        f"{name} is joined to a pole of the mains ({pole}) through {names}, a part between the "
        f"mains and the metal{current} — and a shorted capacitor puts the line on it{also}",
        ctx.plan.metal(name).location,
        (name, pole, *(c.name for c in parts)),
        figures,
        f"take {names} out (nothing belongs between the mains and the metal), then earth the "
        "metal: a three-core cord whose protective conductor lands on a stud of its own — never "
        f"bond it while {names} is in place; work for a qualified person",
        tuple(("remove", c.name) for c in parts),
    )
