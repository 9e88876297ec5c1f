"""A large flat file read by two processes gives the same plan and the same errors as one
process."""

import dataclasses

import pytest

from groundcheck import PlanErrors, load_text
from groundcheck.language import bigfile
from groundcheck.physics.sweep import can_fork

pytestmark = pytest.mark.skipif(not can_fork(), reason="the worker is forked on Linux only")


def grid(side: int, spread: bool = False, mistakes: bool = False) -> str:
    out = [
        'plan "split test"',
        "mains 230 V 50 Hz, fuse 2 A slow, line-conductor 0.75 mm2, inlet at 5,5",
        f"metal deck: aluminium 2 mm, {side * 10 + 20} x {side * 10 + 20} mm, touchable",
        "point pe_stud: stud, at 12,5 on deck",
        "wire pe_lead: mains.pe to pe_stud, 20 mm, 1 mm2, protective",
        "bolt pe_nut: pe_stud to deck",
    ]
    for i in range(side):
        for j in range(side):
            out.append(f"point p{i}_{j}: pad, at {10 + 10 * i},{10 + 10 * j} on deck")
    for i in range(side):
        for j in range(side - 1):
            sep = ",\n    " if spread else ", "
            out.append(
                f"wire h{i}_{j}: p{i}_{j} to p{i}_{j + 1}{sep}{10 + (i * j) % 7}.5 mm, 0.5 mm2, "
                "signal"
            )
    out.append("bolt b0: p0_0 to deck")
    out.append(f"stage s0: p0_0 to p0_{side - 1}, gain 30 dB, channel left")
    if mistakes:
        out.insert(30, "wire bad1: p0_0 to nowhere, 10 mm, 0.5 mm2")  # early: read here
        out.append("wire bad2: p0_1 to p0_2, 10 furlongs, 0.5 mm2")  # late: read by the worker
        out.append("wire h0_0: p0_1 to p0_2, 10 mm, 0.5 mm2")  # a duplicate across the cut
    return "\n".join(out) + "\n"


def _deep(plan):
    records = (
        plan.points + plan.conductors + plan.metals + plan.stages + plan.rectifiers + plan.fields
    )
    return [dataclasses.asdict(x) for x in records] + [
        plan.title,
        plan.mains,
        plan.listening,
        plan.ambient,
        plan.files,
    ]


@pytest.fixture
def small_threshold(monkeypatch):
    monkeypatch.setattr(bigfile, "MIN_LINES", 100)
    calls = []
    real = bigfile.read_split
    monkeypatch.setattr(
        "groundcheck.language.bigfile.read_split", lambda *a: calls.append(1) or real(*a)
    )
    return calls


@pytest.mark.parametrize("spread", [False, True], ids=["one line each", "continued lines"])
def test_same_plan_locations_included(small_threshold, spread):
    text = grid(14, spread=spread)
    one = load_text(text, "g.gplan", jobs=1)
    two = load_text(text, "g.gplan", jobs=2)
    assert small_threshold == [1]  # the file was cut
    assert _deep(one) == _deep(two)


def test_same_errors(small_threshold):
    text = grid(14, mistakes=True)
    with pytest.raises(PlanErrors) as one:
        load_text(text, "g.gplan", jobs=1)
    with pytest.raises(PlanErrors) as two:
        load_text(text, "g.gplan", jobs=2)
    assert small_threshold == [1]
    assert one.value.render() == two.value.render()
    assert len(one.value.errors) == 3


def test_the_cut_never_falls_inside_a_statement():
    text = grid(14, spread=True)
    rows = text.split("\n")
    at = bigfile.split_point(text, min_lines=100)
    assert at is not None and rows[at].startswith(("point ", "wire ", "bolt ", "stage "))
    assert not rows[at - 1].rstrip().endswith(",")


def test_structured_and_small_files_are_read_whole():
    assert bigfile.split_point(grid(14)) is None  # under the default size
    with_block = grid(14) + "block ch {\npoint x: star\n}\nplace ch as left\n"
    assert bigfile.split_point(with_block, min_lines=100) is None
    assert bigfile.split_point('include "other.gplan"\n' + grid(14), min_lines=100) is None
