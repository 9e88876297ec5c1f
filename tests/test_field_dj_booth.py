"""An outside technician's DJ booth in a bar on a TN-C-S supply (tests/field/dj-booth-bar, copied
as written, his variants in variants/): two class II turntables, one whose earth wire runs to the
valve amplifier while its signal goes to the mixer; a valve power amplifier of his own (a 0.5 mm²
earth lead on the transformer foot's stud, the bias supply's return on the input ground); a
powered speaker on a far circuit; a balanced link to the bar's zone amplifier.

His verdict: the amplifier's earth lead thicker and on a stud of its own; the bias return off the
input ground; deck B's earth wire to the mixer's post; never lift an earth or open a bought box."""

from pathlib import Path

import pytest

from groundcheck import load
from groundcheck.advice.changes import ChangeContext
from groundcheck.advice.earth_wires import earth_wire_moves
from groundcheck.advice.evaluation import evaluate
from groundcheck.analysis import Options, analyze

FIELD = Path(__file__).parent / "field" / "dj-booth-bar"
AMP, BOOTH = FIELD / "valve-amp.gplan", FIELD / "dj-booth.gplan"
QUICK = Options(hum=False)


def test_the_amplifiers_dangers_and_his_fault_figures():
    r = analyze(load(AMP), QUICK)
    dangers = {(f.code, f.elements[0]) for f in r.findings if f.severity == "danger"}
    assert {("GC202", "pe_lead"), ("GC204", "pe_lead"), ("GC223", "pe_lead")} <= dangers
    # his hand figures, rechecked in his report with the fault ahead of the fuse: 243 A, 86.5 V
    chassis = next(p for p in r.safety.parts if p.part == "chassis")
    assert chassis.fault_current == pytest.approx(243.0, rel=0.002)
    assert chassis.touch_voltage == pytest.approx(86.5, rel=0.002)


def test_deck_bs_earth_wire_is_offered_the_mixer_with_both_sides_said():
    # the turntable is class II: its earth wire is functional, and the mixer it plays into is
    # class I and plugged in. Alone the move makes the monitor link 2.5 dB louder (still below
    # hearing) while phono_b falls 27 dB: named with both sides, not offered alone
    plan, text = load(BOOTH), BOOTH.read_text()
    before = analyze(plan)
    found = []
    earth_wire_moves(ChangeContext(plan, before, text), "GC101", found.append)
    (cand,) = [c for c in found if c is not None and not c.touches_protective]
    assert "deck_b.chassis to mixer.chassis" in cand.edits[0].new
    ev = evaluate(text, plan, before, cand, Options(), FIELD.resolve(), BOOTH.resolve())
    assert "phono_b would be" in ev.rejected
    assert ev.hum_change_db["phono_b"] < -25
