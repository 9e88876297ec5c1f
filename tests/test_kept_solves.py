"""Work kept within one analysis (groundcheck.physics.nodal): the DC factorisation is made once per
circuit, the protective part of a circuit is built once, and a result still travels between
processes. The expected values are a fresh circuit's own solves: the claim is only that keeping
them changes nothing."""

import pickle

import numpy as np

from groundcheck import analyze, load
from groundcheck.physics.circuit import build_circuit

from helpers import EXAMPLES


def _guitar():
    return load(next(p for p in EXAMPLES if p.name == "guitar-head.gplan"))


def test_the_dc_factorisation_is_made_once_and_solves_as_a_fresh_one():
    plan = _guitar()
    circuit = build_circuit(plan)
    assert circuit.dc() is circuit.dc()
    assert circuit.at(0.0) is not circuit.dc()  # at() factorises afresh, whatever the frequency
    J = np.zeros((len(circuit.nodes), 1))
    J[0, 0], J[-1, 0] = 1.0, -1.0
    fresh = build_circuit(plan).at(0.0).solve(J).V
    assert np.array_equal(circuit.dc().solve(J).V, fresh)


def test_the_same_part_of_a_circuit_is_built_once():
    circuit = build_circuit(_guitar())
    names = {b.conductor for b in circuit.branches if b.conductor is not None}
    assert circuit.restricted(names) is circuit
    some = set(sorted(names)[: len(names) // 2])
    part = circuit.restricted(some)
    assert part is circuit.restricted(set(some))
    assert {b.conductor for b in part.branches} - {None} == some
    assert len(part.branches) < len(circuit.branches)


def test_a_result_with_kept_solves_still_pickles():
    # a --jobs worker sends its result back pickled; a sparse LU does not pickle
    result = analyze(_guitar())
    result.circuit.dc()
    back = pickle.loads(pickle.dumps(result))
    assert len(back.circuit.branches) == len(result.circuit.branches)
    assert "_dc" not in back.circuit.__dict__
