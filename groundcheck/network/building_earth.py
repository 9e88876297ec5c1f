"""The installation's own protective wiring as a graph: cables and protective wires outside every
device, and the galvanic isolators in it (a lift network with diodes at the installation's level:
its diodes carry a fault's current).

Used by the placed devices' fault loops (:mod:`groundcheck.rules.placed_supply`) and the devices'
earth paths (:mod:`groundcheck.physics.device_earth`, GC215)."""

from __future__ import annotations

import networkx as nx
import numpy as np

from ..model.kinds import PROTECTIVE, can_carry_protective, is_lift, kind
from ..model.records import Plan

__all__ = ["building_graph", "galvanic_isolator", "isolators_on", "is_cable", "route_factors"]


def galvanic_isolator(c) -> bool:
    """Whether ``c`` is a lift network with diodes: at the installation's level, in the shore or
    supply earth, a galvanic isolator (its diodes conduct a fault's current, its resistor and
    capacitor block small DC and AC voltages)."""
    return is_lift(c) and bool(c.diodes)


def is_cable(c) -> bool:
    """Whether ``c`` is a building cable (line and neutral cores beside its protective core)."""
    return kind(c.kind).carries_load


def _wiring(plan: Plan) -> list:
    """The installation's own cables and protective wires (outside every device, with a length
    and an area) and its galvanic isolators."""
    device_of = plan.index.device_of
    out = []
    for c in plan.conductors:
        if device_of(c.name) is not None:
            continue
        if galvanic_isolator(c):
            out.append(c)
        elif can_carry_protective(c) and (is_cable(c) or c.role == PROTECTIVE):
            if c.length and c.area:
                out.append(c)
    return out


def route_factors(plan: Plan, outlet: str, route) -> tuple[float, float]:
    """The installation's line and protective resistance between its earthing terminals (joined)
    and ``outlet`` over the same along ``route`` alone: each conductor's L/A, every one of them in
    the network (a ring's two legs, written as two cables between the same points, in parallel).

    Parameters:
        plan: the installation.
        outlet: the plug point.
        route: the least-resistance path's (name, length, line area, protective area, flexible).
    Returns:
        (line factor, protective factor), each at most 1.
    References:
        Kirchhoff's laws (a nodal solve of the wiring's conductances).
    """
    wiring = _wiring(plan)
    mets = {p.name for p in plan.points if p.kind == "earthing-terminal"}
    nodes = sorted({x for c in wiring for x in (c.a, c.b)} - mets)
    if outlet not in nodes or not route:
        return 1.0, 1.0
    at = {n: i for i, n in enumerate(nodes)}
    out = []
    for col in (3, 2):  # the protective cores, then the line cores
        path = sum(r[1] / r[col] for r in route if r[col])
        G = np.zeros((len(nodes), len(nodes)))
        for c in wiring:
            area = c.area if col == 3 or galvanic_isolator(c) else (c.line_area or c.area)
            g = 1e12 if galvanic_isolator(c) else area / c.length
            ends = [at.get(x) for x in (c.a, c.b)]
            for i in ends:
                if i is not None:
                    G[i, i] += g
            if None not in ends:
                G[ends[0], ends[1]] -= g
                G[ends[1], ends[0]] -= g
        J = np.zeros(len(nodes))
        J[at[outlet]] = 1.0
        try:
            eff = float(np.linalg.lstsq(G, J, rcond=None)[0][at[outlet]])
        except np.linalg.LinAlgError:
            eff = path
        out.append(min(1.0, eff / path) if path > 0 and eff > 0 else 1.0)
    return out[1], out[0]


def building_graph(plan: Plan) -> nx.Graph:
    """The installation's own protective wiring (cables and protective wires outside every
    device), each edge weighted by its resistance per resistivity, L/A.

    Parameters:
        plan: the installation.
    Returns:
        the graph, each edge with its ``conductor``.
    References:
        none (bookkeeping: the route's least resistance is found on it).
    """
    device_of = plan.index.device_of
    g = nx.Graph()
    for c in plan.conductors:
        if device_of(c.name) is None and galvanic_isolator(c):
            # its diodes carry a fault's current (a drop of a volt or two, left out)
            g.add_edge(c.a, c.b, weight=0.0, conductor=c)
            continue
        if device_of(c.name) is not None or not can_carry_protective(c):
            continue
        if not (is_cable(c) or c.role == PROTECTIVE) or not (c.length and c.area):
            continue
        weight = c.length / c.area
        if not g.has_edge(c.a, c.b) or g[c.a][c.b]["weight"] > weight:
            g.add_edge(c.a, c.b, weight=weight, conductor=c)
    return g


def isolators_on(plan: Plan, graph: nx.Graph, outlet: str | None) -> list[str]:
    """The galvanic isolators (:func:`galvanic_isolator`) without which ``outlet`` reaches no main
    earthing terminal through the installation's protective wiring (empty when it reaches one
    without them, or not at all).

    Parameters:
        plan: the installation.
        graph: :func:`building_graph` of it.
        outlet: a plug point.
    Returns:
        the isolators' names, in name order.
    References:
        none (bookkeeping).
    """
    mets = {p.name for p in plan.points if p.kind == "earthing-terminal"} & set(graph)
    if outlet is None or outlet not in graph or not mets:
        return []
    bare = nx.Graph(
        (u, v) for u, v, d in graph.edges(data=True) if not galvanic_isolator(d["conductor"])
    )
    bare.add_nodes_from(graph)
    if any(nx.has_path(bare, outlet, m) for m in mets):
        return []
    try:
        _, path = nx.multi_source_dijkstra(graph, mets, outlet, weight="weight")
    except nx.NetworkXNoPath:
        return []
    on = (graph[a][b]["conductor"] for a, b in zip(path, path[1:]))
    return sorted(c.name for c in on if galvanic_isolator(c))
