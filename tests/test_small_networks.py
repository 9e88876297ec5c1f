"""Small networks take numpy-only paths (a dense nodal solve, connected parts by union-find) that
must give what the sparse paths give: checked against scipy's SuperLU and csgraph, used here as
the reference."""

import numpy as np
import pytest
import scipy.sparse as sp
import scipy.sparse.csgraph as csgraph

from groundcheck import load
from groundcheck.network import graph as graph_module
from groundcheck.physics import nodal as nodal_module
from groundcheck.physics.circuit import build_circuit
from groundcheck.physics.factored import DenseFactors
from helpers import EXAMPLES, ROOT

CHASSIS = EXAMPLES + sorted((ROOT / "examples" / "studio" / "devices").glob("*.gplan"))


@pytest.mark.parametrize("plan", CHASSIS, ids=lambda p: p.stem)
def test_dense_solve_agrees_with_the_sparse_solve(plan, monkeypatch):
    circuit = build_circuit(load(str(plan)))
    assert circuit._pattern[-1] <= nodal_module.DENSE_NODES  # these examples take the dense path
    rng = np.random.default_rng(7)
    J = rng.normal(size=(len(circuit.nodes), 11)) + 1j * rng.normal(size=(len(circuit.nodes), 11))
    emf = rng.normal(size=(len(circuit.branches), 11)) + 0j
    for f in (0.0, 50.0, 150.0, 1234.0, 5000.0):
        dense = circuit.at(f)
        monkeypatch.setattr(nodal_module, "DENSE_NODES", -1)
        sparse = circuit.at(f)
        monkeypatch.undo()
        assert type(dense.lu).__name__ == "DenseFactors" and type(sparse.lu).__name__ == "SuperLU"
        for a, b in (
            (dense.solve(J), sparse.solve(J)),
            (dense.solve(J, emf), sparse.solve(J, emf)),
        ):
            scale = np.max(np.abs(b.V))
            assert np.max(np.abs(a.V - b.V)) <= 1e-12 * scale
            # a branch current is a voltage difference times an admittance of up to 1/(1 mΩ):
            # rounding in the node voltages (either solver's) shows in it magnified, so it is held
            # to 1e-10
            assert np.max(np.abs(a.I - b.I)) <= 1e-10 * np.max(np.abs(b.I))
        rows = np.arange(len(circuit.nodes))[::2]
        assert np.max(np.abs(dense.voltages(J, rows) - sparse.voltages(J, rows))) <= 1e-12 * scale


def test_dense_factors_add_up_each_branch():
    # worked by hand: 1 A into node a, 2 Ω from a to b, 3 Ω from b to the reference: Va = 5 V, Vb =
    # 3 V. Entries given per branch, as the circuit gives them (the diagonal of b gets two): they
    # must add up
    rows = np.array([0, 1, 0, 1, 1])
    cols = np.array([0, 1, 1, 0, 1])
    vals = np.array([0.5, 0.5, -0.5, -0.5, 1 / 3])
    x = DenseFactors(vals, rows, cols, 2).solve(np.array([[1.0], [0.0]]))
    assert x[:, 0] == pytest.approx([5.0, 3.0], rel=1e-14)


@pytest.mark.parametrize("seed", range(6))
def test_connected_parts_number_as_csgraph(seed):
    rng = np.random.default_rng(seed)
    n = int(rng.integers(1, 400))
    e = int(rng.integers(0, 2 * n))
    rows, cols = rng.integers(0, n, e), rng.integers(0, n, e)
    expected = csgraph.connected_components(
        sp.coo_matrix((np.ones(e), (rows, cols)), shape=(n, n)), directed=False
    )
    ncomp, labels = graph_module.part_labels(n, rows, cols)
    assert ncomp == expected[0]
    assert labels.tolist() == expected[1].tolist()


def test_large_graphs_still_take_csgraph(monkeypatch):
    monkeypatch.setattr(graph_module, "SMALL_GRAPH", 3)
    ncomp, labels = graph_module.part_labels(6, np.array([0, 2, 4]), np.array([1, 3, 5]))
    assert ncomp == 3 and labels.tolist() == [0, 0, 1, 1, 2, 2]
