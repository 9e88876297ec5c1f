"""Work cut into slices for the processes, and the JSON text written without the standard
library's generators: each must give what the whole, or the standard library, gives. The expected
values are the unsliced selection written out plainly (a stable sort of every pair) and
``json.dumps`` itself."""

import json
import sys

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from groundcheck.core.jsontext import dumps
from groundcheck.language.loader import load_text
from groundcheck.physics import coupling
from groundcheck.physics.circuit import build_circuit

from helpers import ROOT


def _installation(n):
    sys.path.insert(0, str(ROOT / "benchmarks"))
    from generate import installation

    return load_text(installation(n), "inst.gplan")


def test_shared_return_rows_from_slices_are_those_of_the_whole(monkeypatch):
    plan = _installation(40)
    circuit = build_circuit(plan)
    sources = coupling._unit_sources(plan)
    assert len(sources) > 6
    # every pair above the listed level, the strongest first, equal ones stage by stage and each
    # stage's sources in order (a stable sort of the whole matrix), the kept ones listed in that
    # order
    whole = coupling._transfers(circuit, circuit.dc(), sources, list(plan.stages))
    pairs = np.argwhere(whole > coupling.LISTED_TRANSFER)
    values = whole[pairs[:, 0], pairs[:, 1]]
    for rows in (3, 10, 10_000):
        monkeypatch.setattr(coupling, "MAX_SHARED_ROWS", rows)
        keep = np.sort(np.argsort(-values, kind="stable")[:rows])
        expected = [(int(k), int(s)) for k, s in pairs[keep]]
        for slice_ in (1, 2, 5, 256):
            monkeypatch.setattr(coupling, "TRANSFER_SLICE", slice_)
            listed = [task() for task in coupling.transfer_tasks(plan, circuit, 2)]
            got = coupling.shared_returns(plan, circuit, listed)
            names = [(r.stage, r.source) for r in got]
            want = [(plan.stages[k].name, sources[s].name) for k, s in expected]
            # a kept pair is listed when it shares a conductor (here every one does)
            assert names == [w for w in want if w in names] and len(names) == len(want)


_plain = st.recursive(
    st.none()
    | st.booleans()
    | st.integers(-(10**20), 10**20)
    | st.floats(allow_nan=True, allow_infinity=True)
    | st.text(),
    lambda inner: (
        st.lists(inner, max_size=4)
        | st.tuples(inner, inner)
        | st.dictionaries(st.text(max_size=6), inner, max_size=4)
    ),
    max_leaves=30,
)


@settings(max_examples=80, deadline=None)
@given(_plain)
def test_json_text_is_the_standard_librarys(doc):
    assert dumps(doc) == json.dumps(doc, indent=2, ensure_ascii=False)


@pytest.mark.parametrize(
    "doc",
    [{1: "a", None: [2]}, {"x": np.float64(0.1)}, [np.int64(3)], {"a": {"b": ()}}, "é\u2028"],
)
def test_json_text_leaves_anything_else_to_the_standard_library(doc):
    try:
        want = json.dumps(doc, indent=2, ensure_ascii=False)
    except TypeError:
        with pytest.raises(TypeError):
            dumps(doc)
        return
    assert dumps(doc) == want


def test_an_altered_record_is_the_one_replace_makes():
    from dataclasses import replace

    from groundcheck.model.construct import altered

    plan = _installation(3)
    for record in (*plan.conductors[:5], *plan.points[:5], *plan.metals[:2]):
        field = "route" if hasattr(record, "route") else "pos" if hasattr(record, "pos") else None
        changes = {field: ((1.0, 2.0),) if field == "route" else (1.0, 2.0)} if field else {}
        a, b = altered(record, **changes), replace(record, **changes)
        assert a == b and a.__dict__ == b.__dict__ and type(a) is type(b)
        with pytest.raises(TypeError):
            altered(record, no_such_field=1)
    # what a plan keeps beside its fields (its index, a cached property) is not carried over
    assert plan.index is not None and "index" in plan.__dict__
    assert "index" not in altered(plan, title="other").__dict__


def _plain_refinement(nodes, adj, colour, edge_colour, rounds):
    """Colour refinement written out plainly: each node's signature its colour and the sorted
    (conductor colour, neighbour colour) pairs, as tuples; new colours the signatures' ranks."""
    col = dict(colour)
    classes = len(set(col.values()))
    for _ in range(rounds):
        if classes == len(nodes):
            break
        sig = {
            u: (col[u], tuple(sorted((edge_colour[k], col[v]) for v in adj[u] for k in adj[u][v])))
            for u in nodes
        }
        order = {s: i for i, s in enumerate(sorted(set(sig.values())))}
        col = {u: order[sig[u]] for u in nodes}
        count = len(set(col.values()))
        if count == classes:
            break
        classes = count
    return col


@settings(max_examples=60, deadline=None)
@given(st.integers(1, 40), st.integers(0, 90), st.integers(1, 4), st.integers(1, 3), st.randoms())
def test_refinement_gives_the_colours_of_the_plain_tuple_refinement(n, m, kinds, starts, rnd):
    import networkx as nx

    from groundcheck.network.canonical import MAX_ROUNDS, _refined

    G = nx.MultiGraph()
    G.add_nodes_from(f"n{i}" for i in range(n))
    for j in range(m):  # parallel conductors and conductors from a node to itself among them
        G.add_edge(f"n{rnd.randrange(n)}", f"n{rnd.randrange(n)}", key=f"c{j}")
    nodes = list(G.nodes)
    adj = dict(G.adjacency())
    colour = {u: rnd.randrange(starts) for u in nodes}
    ranks = {c: i for i, c in enumerate(sorted(set(colour.values())))}
    colour = {u: ranks[c] for u, c in colour.items()}
    edge_colour = {f"c{j}": rnd.randrange(kinds) for j in range(m)}
    want = _plain_refinement(nodes, adj, colour, edge_colour, MAX_ROUNDS)
    assert _refined(nodes, adj, colour, edge_colour) == want


def _plain_clean(x, digits=9):
    """clean() written out plainly: containers copied, text keys, floats to ``digits`` significant
    digits, non-finite ones None, numpy scalars as Python numbers, complex numbers by magnitude."""
    import math

    if isinstance(x, dict):
        return {str(k): _plain_clean(v, digits) for k, v in x.items()}
    if isinstance(x, (list, tuple)):
        return [_plain_clean(v, digits) for v in x]
    if isinstance(x, np.generic):
        x = x.item()
    if isinstance(x, bool) or x is None or isinstance(x, str):
        return x
    if isinstance(x, int):
        return int(x)
    if isinstance(x, float):
        return float(f"{x:.{digits}g}") if math.isfinite(x) else None
    if isinstance(x, complex):
        return _plain_clean(abs(x), digits)
    return x


_numbers = st.recursive(
    st.none()
    | st.booleans()
    | st.integers(-(10**20), 10**20)
    | st.floats(allow_nan=True, allow_infinity=True)
    | st.complex_numbers(allow_nan=False, allow_infinity=False, max_magnitude=1e300)
    | st.floats(allow_nan=False, allow_infinity=False, width=32).map(np.float64)
    | st.integers(-(2**40), 2**40).map(np.int64)
    | st.text(max_size=4),
    lambda inner: (
        st.lists(inner, max_size=4)
        | st.tuples(inner, inner)
        | st.dictionaries(st.text(max_size=4) | st.integers(0, 9), inner, max_size=4)
    ),
    max_leaves=30,
)


@settings(max_examples=80, deadline=None)
@given(_numbers, st.integers(3, 12))
def test_clean_is_the_plain_copy(doc, digits):
    from groundcheck.core.plain import clean

    got, want = clean(doc, digits), _plain_clean(doc, digits)
    assert json.dumps(got, allow_nan=False) == json.dumps(want, allow_nan=False)


def test_cut_vertices_from_blocks_are_networkx_articulation_points():
    """The protective route's pruning reads cut vertices off the blocks (a node in two blocks or
    more) instead of a second depth-first pass: the same set as networkx's own articulation
    points on random graphs, isolated nodes, bridges and several components included."""
    import random

    import networkx as nx

    from groundcheck.network.earthing import cut_vertices

    for seed in range(200):
        r = random.Random(seed)
        G = nx.gnm_random_graph(r.randint(1, 40), r.randint(0, 60), seed=seed)
        blocks = list(nx.biconnected_components(G))
        assert cut_vertices(blocks) == set(nx.articulation_points(G)), seed


def test_the_ring_factor_without_gathering_is_the_same_to_the_bit():
    """Where no point is near the ring's axis the ring factor is worked on the whole arrays: the
    same bits as the path that gathers the elliptic points apart (here made to run by one point
    on the axis, dropped afterwards)."""
    import numpy as np

    from groundcheck.physics.pickup import _ring_factor

    r = np.random.default_rng(5)
    rho, z = r.uniform(0.03, 0.6, 5000), r.uniform(-0.1, 0.2, 5000)
    whole = _ring_factor(rho, z, 0.04, 1.3e-6)
    gathered = _ring_factor(np.append(rho, 1e-9), np.append(z, 0.0), 0.04, 1.3e-6)[:-1]
    assert whole.tobytes() == gathered.tobytes()
