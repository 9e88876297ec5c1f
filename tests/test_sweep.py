"""Frequencies shared among processes: the same results as one process, in the same order."""

import json
import math

import numpy as np
import pytest

from groundcheck import load
from groundcheck.analysis import Options, analyze
from groundcheck.physics.coupling import pair_tests
from groundcheck.renderers.jsondoc import render_json
from groundcheck.physics.sweep import can_fork, map_frequencies, run_tasks

from helpers import EXAMPLES, ROOT

STUDIO = ROOT / "examples" / "studio" / "project-studio.gplan"
ROOM = ROOT / "examples" / "studio" / "recording-room.gplan"
forking = pytest.mark.skipif(not can_fork(), reason="worker processes are forked on Linux only")


def test_results_come_back_in_the_order_given_whatever_the_number_of_processes():
    freqs = [900.0, 100.0, 50.0, 1234.5, 7.0]
    offset = 0.25  # a closure: the work need not be picklable
    expect = [math.sin(f) + offset for f in freqs]
    for jobs in (1, 2, 3, 8):
        assert map_frequencies(lambda f: math.sin(f) + offset, freqs, jobs) == expect
    assert map_frequencies(lambda f: f, [], 4) == []


@forking
@pytest.mark.parametrize("path", EXAMPLES + [STUDIO], ids=lambda p: p.name)
def test_a_hum_budget_over_two_processes_equals_the_one_process_budget(path):
    plan = load(path)
    one = json.loads(render_json(analyze(plan, Options(jobs=1))))
    two = json.loads(render_json(analyze(plan, Options(jobs=2))))
    assert one == two


@forking
def test_factorisations_in_workers_match_the_parent():
    r = analyze(load(STUDIO), Options(hum=False))
    c = r.circuit
    J = pair_tests(c, [(s.a, s.b) for s in r.plan.stages])
    freqs = [0.0, 100.0, 1000.0, 5000.0]
    here = [c.at(f).solve(J).V for f in freqs]
    there = map_frequencies(lambda f: c.at(f).solve(J).V, freqs, jobs=2)
    for a, b in zip(here, there):
        assert np.array_equal(a, b)


def test_tasks_come_back_in_their_order_whatever_their_costs_and_processes():
    scale = 3  # closures again: the tasks need not be picklable
    tasks = [lambda k=k: k * scale for k in range(7)]
    for jobs in (1, 2, 3):
        for costs in (None, [1, 9, 2, 8, 3, 7, 4], [5] * 7):
            assert run_tasks(tasks, jobs, costs) == [k * scale for k in range(7)]
    assert run_tasks([], 2) == []


def _close(a, b, path=""):
    """Two JSON documents alike: the same structure and strings, numbers within 1e-9 (sums taken in
    another order by the processes)."""
    if isinstance(a, dict):
        assert a.keys() == b.keys(), path
        for k in a:
            _close(a[k], b[k], f"{path}.{k}")
    elif isinstance(a, list):
        assert len(a) == len(b), path
        for k, (x, y) in enumerate(zip(a, b)):
            _close(x, y, f"{path}[{k}]")
    elif isinstance(a, float) and isinstance(b, float):
        assert a == pytest.approx(b, rel=1e-9, abs=1e-15), path
    else:
        assert a == b, path


@forking
def test_a_budget_cut_into_slices_of_sources_among_processes_equals_the_one_process_budget(
    monkeypatch,
):
    """With every frequency's sources cut into slices of one (as a large installation's are cut
    into slices of TASK_SOURCES, and the shared returns' transfers into slices of TRANSFER_SLICE),
    the shared returns, the hum budget and the outlet voltages, run as tasks of two processes,
    give the one-process figures (the recording room: leakage, a cable's EMF and a rectifier)."""
    from groundcheck import analysis
    from groundcheck.physics import coupling, hum

    plan = load(ROOM)
    one = json.loads(render_json(analyze(plan, Options(jobs=1))))
    monkeypatch.setattr(hum, "TASK_SOURCES", 1)
    monkeypatch.setattr(coupling, "TRANSFER_SLICE", 1)
    counted = []

    def counting(tasks, jobs=1, costs=None):
        counted.append(len(tasks))
        return run_tasks(tasks, jobs, costs)

    monkeypatch.setattr(analysis, "run_tasks", counting)
    two = json.loads(render_json(analyze(plan, Options(jobs=2))))
    # the shared returns' transfers a slice per source, then their rows, the outlets and many
    # slices of the budget
    assert counted[0] > 1 and counted[1] > 10
    _close(one, two)


def test_the_largest_few_are_those_of_a_full_stable_sort_ties_included():
    from groundcheck.physics.ranking import largest

    rng = np.random.default_rng(3)
    for n, k in ((1000, 5), (1000, 64), (7, 10), (50, 50), (3, 0)):
        values = rng.integers(0, 20, n).astype(float)  # many ties at every cut
        assert list(largest(values, k)) == list(np.argsort(-values, kind="stable")[:k])
