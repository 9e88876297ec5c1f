"""The installation's own protective wiring as a graph: cables and protective wires outside every
device, and the galvanic isolators in it (a lift network with diodes at the installation's level:
its diodes carry a fault's current).

Used by the placed devices' fault loops (:mod:`groundcheck.rules.placed_supply`) and the devices'
earth paths (:mod:`groundcheck.physics.device_earth`, GC215)."""

from __future__ import annotations

import functools

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


def route_factors(graph: nx.Graph, outlet: str, route) -> tuple[float, float]:
    """The installation's line and protective resistance between its earthing terminals (joined)
    and ``outlet`` over the same along ``route`` alone: each conductor's L/A, every one of them in
    the network (a ring's two legs, written as two cables between the same points, in parallel).
    The wiring's two networks are factorised once per graph and each outlet solved once.

    Parameters:
        graph: :func:`building_graph` of the installation.
        outlet: the plug point.
        route: the least-resistance path's (name, length, line area, protective area, flexible).
    Returns:
        (line factor, protective factor), each at most 1.
    References:
        Kirchhoff's laws (a nodal solve of the wiring's conductances).
    """
    solved = graph.graph["outlets"]
    if outlet not in solved:
        solved[outlet] = _effective(graph.graph["solver"](), outlet)
    out = []
    for col, eff in zip((2, 3), solved[outlet]):  # the line cores, then the protective cores
        path = sum(r[1] / r[col] for r in route if r[col])
        out.append(min(1.0, eff / path) if path > 0 and eff and eff > 0 else 1.0)
    return out[0], out[1]


def _effective(solver, outlet: str) -> tuple[float | None, float | None]:
    """The outlet's L/A to the earthing terminals over the line and the protective network."""
    at, lus = solver
    if outlet not in at:
        return None, None
    out = []
    for lu in lus:
        J = np.zeros(len(at))
        J[at[outlet]] = 1.0
        out.append(float(lu.solve(J)[at[outlet]]))
    return out[0], out[1]


def _solver(plan: Plan, wiring: list):
    """The wiring's nodes that reach an earthing terminal (the terminals joined as the reference)
    and the sparse LU of its line and its protective network's conductances (L/A's inverse)."""
    import scipy.sparse as sp
    import scipy.sparse.linalg as spla

    mets = {p.name for p in plan.points if p.kind == "earthing-terminal"}
    reach = nx.Graph((c.a, c.b) for c in wiring)
    nodes = sorted(
        {n for comp in nx.connected_components(reach) if comp & mets for n in comp} - mets
    )
    at = {n: i for i, n in enumerate(nodes)}
    lus = []
    for line in (True, False):
        rows, cols, vals = [], [], []
        for c in wiring:
            area = c.area if not line or galvanic_isolator(c) else (c.line_area or c.area)
            g = 1e12 if galvanic_isolator(c) else area / c.length
            ends = [at.get(x) for x in (c.a, c.b)]
            for i in ends:
                if i is not None:
                    rows.append(i), cols.append(i), vals.append(g)
            if None not in ends:
                rows += ends
                cols += ends[::-1]
                vals += [-g, -g]
        G = sp.csc_matrix((vals, (rows, cols)), shape=(len(nodes), len(nodes)))
        lus.append(spla.splu(G) if nodes else None)
    return at, lus


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
    g = nx.Graph()
    wiring = _wiring(plan)
    for c in wiring:
        if galvanic_isolator(c):
            # its diodes carry a fault's current (a drop of a volt or two, left out)
            g.add_edge(c.a, c.b, weight=0.0, conductor=c)
            continue
        weight = c.length / c.area
        if not g.has_edge(c.a, c.b) or g[c.a][c.b]["weight"] > weight:
            g.add_edge(c.a, c.b, weight=weight, conductor=c)
    # the whole wiring's factorised networks, made when a fault loop first asks (route_factors)
    g.graph["solver"] = functools.cache(lambda: _solver(plan, wiring))
    g.graph["outlets"] = {}
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
