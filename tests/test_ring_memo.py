"""The ring fluxes kept between analyses (groundcheck.physics.ring_memo): a kept result is the one
a fresh computation gives, to the last bit, and any change to what the computation reads gives a
new one. The expected values are ring_fluxes' own, computed afresh: the memo's only claim is that
it changes nothing."""

import numpy as np

from groundcheck.model.records import FieldSource
from groundcheck.physics import ring_memo
from groundcheck.physics.orient import source_fluxes
from groundcheck.physics.pickup import ring_fluxes, ring_terms

OUTLINES = {
    0: [(0.0, 0.0), (0.12, 0.0), (0.12, 0.06), (0.0, 0.06), (0.0, 0.0)],
    1: [(0.02, 0.07), (0.10, 0.07), (0.10, 0.11), (0.02, 0.07)],
}
DIRECTIONS = np.array([[0.0, 0.0, 1.0], [0.6, 0.0, 0.8], [0.0, 0.6, 0.8], [0.48, 0.6, 0.64]])


def _src(size=0.06, b_ref=40e-6):
    return FieldSource("t", "transformer", (0.06, 0.03), b_ref, 0.05, height=0.035, size=size)


def _fresh(model, M):
    terms = ring_terms(model.X, model.W, model.group, len(model.loops))
    return ring_fluxes(model.src, model.X, model.W, M, model.group, len(model.loops), terms)


def test_a_kept_flux_is_the_fresh_one_to_the_last_bit():
    first = source_fluxes(_src(), OUTLINES)
    got = first.fluxes(DIRECTIONS)
    assert np.array_equal(got, _fresh(first, DIRECTIONS))
    kept = len(ring_memo._CALLS)
    # a second model of the same source and loops (as the next candidate's analysis builds) is
    # served from the memo, with the same values
    second = source_fluxes(_src(), OUTLINES)
    assert np.array_equal(second.fluxes(DIRECTIONS), got)
    assert len(ring_memo._CALLS) == kept


def test_anything_the_flux_reads_changes_the_key():
    base = source_fluxes(_src(), OUTLINES).fluxes(DIRECTIONS)
    for changed in (
        source_fluxes(_src(size=0.05), OUTLINES),
        source_fluxes(_src(b_ref=50e-6), OUTLINES),
        source_fluxes(_src(), {**OUTLINES, 1: [(0.02, 0.07), (0.10, 0.07), (0.10, 0.12)]}),
    ):
        got = changed.fluxes(DIRECTIONS)
        assert np.array_equal(got, _fresh(changed, DIRECTIONS))
        assert not np.array_equal(got, base)


def test_the_memo_is_bounded(monkeypatch):
    monkeypatch.setattr(ring_memo, "MEMO_CALLS", 3)
    model = source_fluxes(_src(), OUTLINES)
    for k in range(6):
        model.fluxes(DIRECTIONS[k % 4 : k % 4 + 1] * (1 + 1e-3 * k))
    assert len(ring_memo._CALLS) <= 3


def test_a_loop_taken_alone_is_found_again_whatever_the_other_loops_do():
    # the next candidate moves loop 1: loop 0 alone has the same digest (its search is found
    # again), loop 1 alone a new one, and every flux is the fresh one
    moved = {**OUTLINES, 1: [(0.02, 0.08), (0.10, 0.08), (0.10, 0.12), (0.02, 0.08)]}
    a, b = source_fluxes(_src(), OUTLINES), source_fluxes(_src(), moved)
    assert a.digest() != b.digest()
    assert a.only(0).digest() == b.only(0).digest()
    assert a.only(1).digest() != b.only(1).digest()
    for model in (b.only(0), b.only(1), b):
        assert np.array_equal(model.fluxes(DIRECTIONS), _fresh(model, DIRECTIONS))
