"""Frequencies shared among processes: the same results as one process, in the same order."""

import json
import math

import numpy as np
import pytest

from groundcheck import load
from groundcheck.analysis import Options, analyze
from groundcheck.physics.coupling import pair_tests
from groundcheck.renderers.jsondoc import render_json
from groundcheck.physics.sweep import can_fork, map_frequencies

from helpers import EXAMPLES, ROOT

STUDIO = ROOT / "examples" / "studio" / "project-studio.gplan"
forking = pytest.mark.skipif(not can_fork(), reason="worker processes are forked on Linux only")


def test_results_come_back_in_the_order_given_whatever_the_number_of_processes():
    freqs = [900.0, 100.0, 50.0, 1234.5, 7.0]
    offset = 0.25                               # a closure: the work need not be picklable
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
