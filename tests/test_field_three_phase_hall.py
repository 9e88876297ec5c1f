"""An outside backline technician's hall on a three-phase TN-S board (tests/field/three-phase-hall,
copied as written): a valve guitar head of his own (its earth on the transformer's mounting stud),
a bought bass amplifier at the end of a 50 m reel of 1.5 mm² on a 16 A type C breaker with no RCD,
a keyboard amplifier, a desk at the back, two DI boxes of his own placed from one plan.  The
language cannot say which phase each socket is on; his plan says so in comments.

His verdict: the head's earth on the transformer stud and the bass amplifier's fault at the end of
the reel (77.0 A by hand, not cleared within 0.4 s) are the dangers; the installation comes first
(an RCD); never lift an earth, never offer a balanced link to an unbalanced socket."""

from pathlib import Path

import pytest

from groundcheck import load
from groundcheck.advice.repair import suggest
from groundcheck.analysis import Options, analyze

FIELD = Path(__file__).parent / "field" / "three-phase-hall"
HALL, HEAD = FIELD / "hall.gplan", FIELD / "gtr-amp.gplan"
QUICK = Options(hum=False)


def test_the_head_earth_on_the_transformer_stud_and_the_reels_fault_are_the_dangers():
    r = analyze(load(HALL), QUICK)
    dangers = {(f.code, f.elements[0]) for f in r.findings if f.severity == "danger"}
    assert ("GC208", "bass") in dangers
    assert any(code == "GC202" for code, _ in dangers)
    (bass,) = [f for f in r.findings if f.code == "GC208" and f.elements[0] == "bass"]
    # his 77.0 A takes the building's wiring at class 1/2 (7.41 Ω/km for 2.5 mm²); the plan's
    # round cable is taken as flexible for the fault loop (7.98 Ω/km), 0.038 Ω more: 1.3 % less
    assert bass.figures["fault_current_a"] == pytest.approx(77.0, rel=0.015)
    assert bass.figures["fault_current_a"] < 77.0


def test_the_installation_comes_first_and_nothing_lifts_an_earth():
    _, evs = suggest(load(HALL), HALL.read_text(), QUICK, FIELD.resolve(), HALL.resolve())
    good = [e for e in evs if not e.rejected]
    assert good[0].candidate.action == "rcd"
    assert not [e for e in good if e.candidate.touches_protective]
    assert not [e for e in good if e.candidate.action == "balance"]
