"""The loops' pickup solved a block of loops at a time (physics/loop_columns.py) against the
whole-matrix form it replaced: every loop's EMF in series with its chord in one branches × loops
matrix, solved by the factors' own EMF path (Factored.solve with ``emf``), every branch's current
read, the drop Z·I summed along each stage's path."""

import math

import numpy as np
import pytest

import groundcheck.physics.loop_columns as loop_columns
from groundcheck import load
from groundcheck.analysis import _simulated, audit
from groundcheck.physics.circuit import build_circuit
from groundcheck.physics.hum import HumBudget, HumOptions
from groundcheck.rules.hum_rules import series_runs
from helpers import ROOT


@pytest.mark.parametrize(
    "rel", ["integrated-se-el84/plan.gplan", "it-home-integrated/living-room.gplan"]
)
def test_the_loops_pickup_in_blocks_is_the_whole_matrix_solve(rel, monkeypatch):
    # field plans of 12 and 13 loops taking an EMF (the second an installation of devices)
    plan = load(ROOT / "tests" / "field" / rel)
    _, ctx = audit(plan)
    circuit = build_circuit(plan)
    b = HumBudget(plan, circuit, ctx.loops, _simulated(plan), HumOptions(), (), series_runs(ctx))
    n = len(b.pick_loops)
    assert n >= 3  # blocks of two below: more than one block, the last one short
    monkeypatch.setattr(loop_columns, "LOOP_BLOCK", 2)
    for f in (50.0, 150.0, 1050.0):
        fac = circuit.at(f)
        E = np.zeros((len(circuit.branches), n), dtype=complex)
        E[b.pick_branch, np.arange(n)] = -1j * 2 * math.pi * f * b.pick_sign
        sol = fac.solve(np.zeros((len(circuit.nodes), n)), emf=E)
        gains = b.gains_at(fac)
        whole = np.zeros((len(b.stages), n), dtype=complex)
        for k, path in enumerate(b.paths):
            if b.valid_stage[k]:
                for idx, sgn in path:
                    whole[k] += sgn * fac.z[idx] * sol.I[idx] * gains[k]
        paths = [p if ok else None for p, ok in zip(b.paths, b.valid_stage)]
        drops, current = loop_columns.loop_pickup(fac, f, b.pick_branch, b.pick_sign, paths, gains)
        scale = np.abs(whole).max()
        assert scale > 0
        np.testing.assert_allclose(drops, whole, rtol=0, atol=1e-12 * scale)
        chord = sol.I[b.pick_branch, np.arange(n)]
        np.testing.assert_allclose(current, chord, rtol=1e-12, atol=0)
