"""An outside builder's push-pull valve integrated amplifier in a home on a 230 V IT supply (no
neutral: 230 V between the two lines; an earth electrode of 25 Ω, a first-fault current of
1.5 A), with a class II player and a bought class I subwoofer on another circuit
(tests/field/it-home-integrated, copied as written).  The language had no word for an IT supply
when the builder was asked; it has now, and these are his verdicts.

His verdict: the protective earth under a transformer bolt is the danger and its own stud the
first fix; the glass fuse cannot break the line-to-line short (221 A by hand); a second fault,
with a first one on the other line, draws about 100 A, which the 16 A type C breaker does not
clear within 0.4 s (the amplifier and the subwoofer); the heater has no reference; the sockets
bond the signal ground several times; the first fault passes (25 Ω × 1.5 A = 37.5 V); one RCD
ahead of both circuits is no cure for the second fault; never lift, thin or move the protective
earth but onto its own stud; never treat one line of the supply as a neutral."""

from pathlib import Path

import pytest

from groundcheck import load
from groundcheck.advice.repair import suggest
from groundcheck.analysis import Options, analyze

FIELD = Path(__file__).parent / "field" / "it-home-integrated"
AMP, ROOM = FIELD / "pp-integrated.gplan", FIELD / "living-room.gplan"
QUICK = Options(hum=False)


def _accepted(path: Path):
    root, resolved = path.resolve().parent, path.resolve()
    _, evs = suggest(load(path), path.read_text(), QUICK, root, resolved)
    return [e for e in evs if not e.rejected], evs


@pytest.mark.parametrize("path", [AMP, ROOM])
def test_his_must_finds_are_reported_and_the_first_fault_passes(path):
    r = analyze(load(path), QUICK)
    dangers = {f.code for f in r.findings if f.severity == "danger"}
    assert {"GC202", "GC208", "GC211"} <= dangers
    codes = {f.code for f in r.findings}
    assert {"GC107", "GC105", "GC101", "GC223"} <= codes
    assert "GC231" not in codes  # 25 Ω × 1.5 A = 37.5 V, within 50 V
    second = [f for f in r.findings if f.code == "GC208"]
    assert all("first fault on the other line" in f.message for f in second)


def test_the_figures_he_worked_by_hand():
    r = analyze(load(AMP), QUICK)
    (short,) = [f for f in r.findings if f.code == "GC211"]
    assert "line-to-line short" in short.message  # an IT supply has no neutral
    assert short.figures["fault_current_a"] == pytest.approx(221, rel=5e-3)  # his F4
    deck = next(p for p in r.safety.parts if p.part == "deck")
    assert deck.fault_current == pytest.approx(100.0, rel=5e-3)  # his second-fault figure
    assert r.safety.supply.first_fault_v == pytest.approx(25 * 1.5)


def test_the_earths_own_stud_comes_first_and_nothing_lifts_the_protective_earth():
    good, _ = _accepted(AMP)
    assert (good[0].candidate.action, good[0].candidate.element) == ("own-stud", "pe_lead")
    assert not [e for e in good if e.candidate.touches_protective]


def test_one_rcd_for_the_whole_house_is_no_cure_for_the_second_fault():
    good, evs = _accepted(ROOM)
    assert {"own-stud", "fuse"} <= {e.candidate.action for e in good[:3]}
    rcd = [e for e in evs if e.candidate.action == "rcd"]
    assert rcd and all(e.rejected for e in rcd)
    # a stated RCD is not counted at the second fault either: it would see no residual current
    r = analyze(load(AMP), QUICK)
    assert all(p.device != "rcd" for p in r.safety.parts)
