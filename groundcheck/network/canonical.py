"""A name- and order-free rank of every element of the ground network, for the choices that must
not depend on how the plan is written (the spanning tree of the listed loops, the conductor a loop
is opened at).

Each node and conductor starts with a key of what it is, never what it is called: a point's kind
and position and what is attached to it (a stage's or a source's end, with its gain or current),
a metal part's material, thickness, size and place; a conductor's kind, role, material, geometry
and stated figures. Colour refinement then adds to each node the multiset of its conductors and
neighbours, round after round, until the partition stops splitting (or after
:data:`MAX_ROUNDS`). Elements left in one class are alike in everything but their names (identical
parallel wires, two pads hung identically from one point): their order is their names', so a
choice among them differs from one writing to another only by exchanging elements that nothing
else tells apart.

References: B. Weisfeiler and A. Leman, "The reduction of a graph to canonical form and the algebra
which appears therein", NTI Series 2(9), 1968 (colour refinement); B. D. McKay and A. Piperno,
"Practical graph isomorphism, II", J. Symbolic Computation 60, 2014 (refinement as the first
step of a canonical labelling).
"""

from __future__ import annotations

import dataclasses
from operator import attrgetter

import networkx as nx
import numpy as np

from ..model.kinds import KINDS, joins_devices, shield_like

__all__ = ["MAX_ROUNDS", "canonical_ranks", "attachments"]

#: refinement rounds at the most (a long chain of identical pads would take one per link)
MAX_ROUNDS = 12

#: conductor fields that name something (or say where it is written): never part of its key
_NAMING = {"name", "kind", "a", "b", "location", "channel", "bundle", "shield_ends"}
#: where a conductor runs: a tie-break only, as a node's position is (see _place_key)
_PLACING = {"route"}
_CACHE = "canonical_ranks"


def _plain(x) -> str:
    """A value as text, numbers to nine significant digits (a length written in another unit
    differs in its last bit)."""
    if isinstance(x, bool) or x is None or isinstance(x, str):
        return repr(x)
    if isinstance(x, (int, float)):
        return format(float(x), ".9g")
    if isinstance(x, (tuple, list)):
        return "(" + ",".join(_plain(v) for v in x) + ")"
    if isinstance(x, (set, frozenset)):  # in sorted order: a set's own order follows hashing
        return "{" + ",".join(sorted(_plain(v) for v in x)) + "}"
    return repr(x)


#: conductor keys already written, by what they are written from (the record's type, its kind and
#: the values of its fields that name nothing): the advisor and the watch re-analyse plans whose
#: conductors are mostly the same, and a large plan holds many conductors alike but for their names
_KEYS: dict = {}
_KEYS_MAX = 1 << 16
#: each kind's row of the kinds table as its key (the table is fixed)
_KIND_KEYS: dict = {}
#: each record type's fields that a key is written from
_KEY_FIELDS: dict = {}
_SKIPPED = _NAMING | _PLACING


def _key_fields(c) -> tuple[tuple[str, ...], object]:
    """The record type's fields a key is written from, and a getter of their values (a tuple)."""
    known = _KEY_FIELDS.get(type(c))
    if known is None:
        fields = tuple(f for f in getattr(c, "__dataclass_fields__", {}) if f not in _SKIPPED)
        got = (
            attrgetter(*fields)
            if len(fields) > 1
            else (lambda r: tuple(getattr(r, f) for f in fields))
        )
        known = _KEY_FIELDS[type(c)] = (fields, got)
    return known


def _conductor_key(c) -> str:
    """What a conductor is; a shield or a link between devices sorts last, so that the spanning
    tree takes the wiring and such a conductor closes the loop it makes (and names it)."""
    if c is None:
        return ""
    fields, got = _key_fields(c)
    values = (type(c), c.kind, got(c))
    try:
        key = _KEYS.get(values)
    except TypeError:  # a record holding something unhashable: written each time
        return _written_key(c, fields)
    if key is None:
        if len(_KEYS) >= _KEYS_MAX:
            _KEYS.clear()
        key = _KEYS[values] = _written_key(c, fields)
    return key


def _written_key(c, fields: tuple[str, ...]) -> str:
    last = shield_like(c) or joins_devices(c)
    # a kind by what its row of the kinds table says, not by its word: two kinds whose rows
    # differ in nothing but the word are one
    kind = _KIND_KEYS.get(c.kind)
    if kind is None:
        row = KINDS[c.kind]
        kind = _KIND_KEYS[c.kind] = _plain(
            tuple(getattr(row, f.name) for f in dataclasses.fields(row) if f.name != "name")
        )
    return f"{int(last)};{kind};" + ";".join(f"{f}={_plain(getattr(c, f))}" for f in fields)


def _node_key(data: dict) -> str:
    metal, point = data.get("metal"), data.get("point")
    if metal is not None:
        return "metal;" + _plain(
            (
                metal.material,
                metal.thickness,
                metal.size,
                metal.touchable,
                metal.signal_only,
                metal.permeability,
            )
        )
    if point is not None:
        return "point;" + _plain((point.kind, data.get("attached", ())))
    return ""


def _place_key(data: dict) -> str:
    """Where a node is (a metal part's corner, a point's position): only a tie-break among nodes
    alike in everything else, so that a channel and its mirror image order their elements alike
    (positions in the colour would order two different points of one channel by where they lie,
    the other way round in the mirror image)."""
    metal, point = data.get("metal"), data.get("point")
    if metal is not None:
        return _plain(metal.origin)
    return _plain(point.pos) if point is not None else ""


def attachments(plan) -> dict[str, tuple]:
    """What the plan attaches to each point, name-free: each stage's, source's and heater's end
    (which end, its gain or current) and the mains inlet's protective terminal.

    Parameters:
        plan: the plan.
    Returns:
        point name -> a sorted tuple of (what, end, figures) rows.
    """
    rows: dict[str, list] = {}

    def add(point, *row):
        if point is not None:
            rows.setdefault(point, []).append(_plain(row))

    for s in plan.stages:
        add(s.a, "stage", "a", s.gain)
        add(s.b, "stage", "b", s.gain)
    for c in plan.currents:
        add(c.a, "current", "a", c.role, c.parts)
        add(c.b, "current", "b", c.role, c.parts)
    for r in plan.rectifiers:
        figures = (r.topology, r.secondary, r.winding, r.capacitance, r.load_current)
        add(r.a, "rectifier", "a", figures)
        add(r.b, "rectifier", "b", figures)
        add(r.filter_point, "rectifier", "filter", figures)
        if r.regulator_point is not None:
            add(r.regulator_point, "rectifier", "regulator", figures)
    for h in plan.heaters:
        add(h.a, "heater", "a", h.current, h.ac)
        add(h.b, "heater", "b", h.current, h.ac)
    return {k: tuple(sorted(v)) for k, v in rows.items()}


def _ranked(keys: list) -> list[int]:
    """Each key's rank among the distinct keys."""
    order = {k: i for i, k in enumerate(sorted(set(keys)))}
    return [order[k] for k in keys]


def _refined(nodes: list, adj: dict, colour: dict, edge_colour: dict) -> dict:
    """Colour refinement until the classes stop splitting (or :data:`MAX_ROUNDS`).

    A node's new colour is its rank among the signatures (its colour, the sorted (conductor's
    colour, neighbour's colour) pairs of its conductors), compared as tuples. Each signature is
    written as bytes that compare as the tuple does: every number a big-endian unsigned 8-byte
    word, a pair as the one number conductor colour × (nodes + 1) + neighbour colour (the
    neighbour's colour is below nodes + 1, so the pairs keep their order), a shorter signature
    before a longer one it begins, as a shorter tuple is. The sorting is then numpy's and bytes
    comparison's, not a tuple's element by element."""
    classes = len(set(colour.values()))
    n = len(nodes)
    if classes == n:
        return colour
    place = {u: i for i, u in enumerate(nodes)}
    owner, ecol, nbr = [], [], []  # each node's conductors, node by node
    for i, u in enumerate(nodes):
        for v, keys in adj[u].items():
            pv = place[v]
            for k in keys:
                owner.append(i)
                ecol.append(edge_colour[k])
                nbr.append(pv)
    owner_a = np.array(owner, dtype=np.int64)
    ecol_a = np.array(ecol, dtype=np.int64) * (n + 1)
    nbr_a = np.array(nbr, dtype=np.int64)
    # the signatures one after the other: a node's colour, then its pairs
    ends = np.cumsum(np.bincount(owner_a, minlength=n) + 1)
    head = ends - np.bincount(owner_a, minlength=n) - 1
    spots = np.arange(len(owner)) + owner_a + 1
    cuts = list(zip((8 * head).tolist(), (8 * ends).tolist()))
    col = np.array([colour[u] for u in nodes], dtype=np.int64)
    seq = np.empty(n + len(owner), dtype=np.int64)
    for _ in range(MAX_ROUNDS):
        pairs = ecol_a + col[nbr_a]
        seq[head] = col
        seq[spots] = pairs[np.lexsort((pairs, owner_a))]
        words = seq.astype(">u8").tobytes()
        new = _ranked([words[a:b] for a, b in cuts])
        col = np.array(new, dtype=np.int64)
        count = max(new) + 1
        if count == classes or count == n:
            break
        classes = count
    return dict(zip(nodes, col.tolist()))


def canonical_ranks(G: nx.MultiGraph) -> dict:
    """Every node's and conductor's rank in the name- and order-free order (ties by name), kept in
    the graph's attributes once computed.

    Parameters:
        G: the ground network (:func:`groundcheck.network.graph.build_graph`).
    Returns:
        element name -> rank (0 first); nodes and conductors in one numbering.
    """
    if _CACHE in G.graph:
        return G.graph[_CACHE]
    nodes = list(G.nodes)
    adj = dict(G.adjacency())
    colour = dict(zip(nodes, _ranked([_node_key(G.nodes[n]) for n in nodes])))
    ends: dict = {}  # conductor -> (one end, the other, its own key)
    for u, nbrs in adj.items():
        for v, keys in nbrs.items():
            for k, d in keys.items():
                if k not in ends:
                    ends[k] = (u, v, _conductor_key(d.get("conductor")))
    conductors = list(ends)
    edge_colour = dict(zip(conductors, _ranked([ends[k][2] for k in conductors])))
    colour = _refined(nodes, adj, colour, edge_colour)
    keyed = [((0, colour[n], _place_key(G.nodes[n])), _name(n)) for n in nodes]
    keyed += [
        (
            (
                1,
                edge_colour[k],
                tuple(sorted((colour[ends[k][0]], colour[ends[k][1]]))),
                _plain(getattr(adj[ends[k][0]][ends[k][1]][k].get("conductor"), "route", ())),
            ),
            _name(k),
        )
        for k in conductors
    ]
    names = nodes + conductors
    order = sorted(range(len(keyed)), key=keyed.__getitem__)
    ranks_out = {names[i]: r for r, i in enumerate(order)}
    G.graph[_CACHE] = ranks_out
    return ranks_out


def _name(x):
    return (type(x).__name__, x)
