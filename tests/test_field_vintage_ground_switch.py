"""An outside technician's 1960s-style 120 V guitar amplifier
(tests/field/vintage-120v-ground-switch, copied as written): as it came in — a two-prong cord
and a "ground switch" that puts a 47 nF capacitor from a cord conductor onto the chassis, a 5 A
glass fuse, the bus bonded at the jacks and the pot — and as he restored it, with two mistakes of
his own left in (the face plate bonded by its nuts only, the original metal input jack).

His verdict: as received, the capacitor from the mains to the chassis is the danger, and the fix
is to take it out and earth the chassis (a three-core cord, the protective conductor on a stud of
its own) — not an isolating transformer, for the amplifier has a power transformer; never move the
ground bus's one wire to the reservoir away.  Restored: the face plate needs a bond of its own and
the input jack bonds the signal ground a second time."""

import math
from pathlib import Path

import pytest

from groundcheck import load
from groundcheck.advice.edits import apply_edits
from groundcheck.advice.repair import suggest
from groundcheck.analysis import Options, analyze

FIELD = Path(__file__).parent / "field" / "vintage-120v-ground-switch"
RECEIVED, RESTORED = FIELD / "combo-as-received.gplan", FIELD / "combo-restored.gplan"
QUICK = Options(hum=False)


def _evaluated(path: Path):
    return suggest(load(path), path.read_text(), QUICK, path.parent.resolve(), path.resolve())[1]


def test_the_capacitor_to_the_chassis_is_named_with_the_current_it_passes():
    r = analyze(load(RECEIVED), QUICK)
    live = [f for f in r.findings if f.code == "GC230" and f.elements[0] == "chassis"]
    (f,) = live
    assert f.severity == "danger" and "death_cap" in f.elements
    # his figure: I = U · 2πfC = 120 V × 2π × 60 Hz × 47 nF = 2.13 mA (the 20 MΩ beside it adds
    # 6 µA in quadrature)
    assert f.figures["current_ma"] == pytest.approx(120 * 2 * math.pi * 60 * 47e-9 * 1e3, rel=1e-4)
    assert "take death_cap" in f.fix and "earth the metal" in f.fix
    assert "isolating transformer" not in f.fix
    assert not [g for g in r.findings if g.code == "GC109" and "cord_a" in g.elements]


def test_the_first_change_takes_the_capacitor_out_and_earths_the_chassis_in_one_job():
    evs = _evaluated(RECEIVED)
    good = [e for e in evs if not e.rejected]
    first = good[0].candidate
    assert (first.action, first.element) == ("bond", "chassis")
    text = apply_edits(RECEIVED.read_text(), first.edits)
    assert "# lift death_cap" in text and "# switch gsw_pos2" in text
    assert "wire pe_lead: mains.pe to pe_stud" in text and text.rstrip().endswith("protective")
    # the ground bus's one wire to the reservoir is never moved elsewhere
    bus = [e for e in evs if e.candidate.element == "bus_a"]
    assert bus and all("without a wired return" in e.rejected for e in bus)


def test_restored_his_two_mistakes_are_found_and_answered():
    r = analyze(load(RESTORED), QUICK)
    (plate,) = [f for f in r.findings if f.code == "GC206"]
    assert plate.elements == ("panel",) and plate.severity == "danger"
    assert any("in_jack_nut" in f.elements for f in r.findings if f.code == "GC101")
    good = [e for e in _evaluated(RESTORED) if not e.rejected]
    offered = {(e.candidate.action, e.candidate.element) for e in good}
    assert {("bond", "panel"), ("insulate", "in_jack_nut")} <= offered
    assert not [e for e in good if e.candidate.touches_protective]
