"""An outside technician's stage rig in a village bar on a TT supply (tests/field/pub-bass-di-tt,
copied as written): a valve bass head of his own (its protective earth under a transformer foot
bolt, its input jack nutted to the panel and wired to the first valve's ground), a passive DI box
whose lift switch he put in the input ground, where the jack's nut bypasses it, and a bought desk
on another socket circuit.  Beside them, his own variant of the DI with the lift where it
belongs (in pin 1, closed) and the room with it.

His verdict: the earth on the transformer bolt is the danger and a stud of its own the first
fix; the input jack is bonded twice; the DI's lift lifts nothing; the building loop is heard at
the PA; never lift, thin or move the protective earth except onto its own stud, never leave a
socket floating, never wire the shield past the DI's lift."""

from pathlib import Path

import pytest

from groundcheck import load
from groundcheck.advice.repair import suggest
from groundcheck.analysis import Options, analyze

FIELD = Path(__file__).parent / "field" / "pub-bass-di-tt"
HEAD, DI, ROOM = (FIELD / n for n in ("bass-head.gplan", "di-box.gplan", "room.gplan"))
ROOM_LIFT_IN_PIN_1 = FIELD / "room-di-closed.gplan"
QUICK = Options(hum=False)


def _accepted(path: Path, options=QUICK):
    root, resolved = path.resolve().parent, path.resolve()
    _, evs = suggest(load(path), path.read_text(), options, root, resolved)
    return [e for e in evs if not e.rejected]


def test_the_earth_under_the_transformer_bolt_is_the_danger_and_its_own_stud_comes_first():
    r = analyze(load(HEAD), QUICK)
    dangers = [f for f in r.findings if f.severity == "danger"]
    assert [f.code for f in dangers] == ["GC202"] and "pe_lead" in dangers[0].elements
    good = _accepted(HEAD)
    assert (good[0].candidate.action, good[0].candidate.element) == ("own-stud", "pe_lead")
    # the protective earth is never lifted, cut or thinned: the only changes to it are its own
    # stud and a thicker lead
    touching = {e.candidate.action for e in good if e.candidate.touches_protective}
    assert touching <= {"own-stud", "thicken"}


def test_the_input_jack_bonded_twice_is_insulated_with_its_wire_kept():
    r = analyze(load(HEAD), QUICK)
    codes = {f.code for f in r.findings}
    assert {"GC101", "GC105"} <= codes
    good = _accepted(HEAD)
    insulate = [e for e in good if e.candidate.action == "insulate"]
    assert [e.candidate.element for e in insulate] == ["in_nut"]
    # never the jack's own wire, never the star's bond (a floating signal ground)
    assert not [
        e
        for e in good
        if e.candidate.element in ("in_gnd", "star_bond") and e.candidate.action == "remove"
    ]


def test_the_lift_switch_in_the_input_ground_lifts_nothing():
    r = analyze(load(DI), QUICK)
    (f,) = [f for f in r.findings if f.code == "GC115"]
    assert f.elements == ("lift_sw", "in_nut", "tag_fix") and "lifts nothing" in f.message


def test_the_rcd_clears_the_head_fault_as_worked_by_hand():
    # his figures (verdict.md, figures by hand 2): Z = (R_A + 1 Ω) + fuse 0.2 V / 2 A + circuit
    # line 18 m × 12.1 mΩ/m × 1.2 + cord line 3 m × 19.5 mΩ/m × 1.2 + path 0.002 + cord PE +
    # circuit PE (IEC 60228 maxima, cables at 70 °C) = 91.77 Ω; I = 230 / Z = 2.51 A, touch
    # voltage I × 90.33 Ω = 226 V, cleared by the 30 mA RCD in 0.04 s (5 IΔn, IEC 61008-1, from
    # memory) against TT's 0.2 s
    z = 91 + 0.100 + 0.261 + 0.070 + 0.002 + 0.070 + 0.261
    (part,) = analyze(load(HEAD), QUICK).safety.parts
    assert part.fault_current == pytest.approx(230 / z, rel=2e-3)  # his rounding to the mΩ
    assert part.touch_voltage == pytest.approx(230 / z * (90 + 0.002 + 0.070 + 0.261), rel=2e-3)
    assert part.clear_time == 0.04
    r = analyze(load(ROOM), QUICK)
    assert not [f for f in r.findings if f.code in ("GC208", "GC220")]
    assert {f.code for f in r.findings if f.severity == "danger"} == {"GC202"}


def test_with_the_lift_in_pin_1_no_shield_is_landed_past_it_and_throwing_it_is_the_hum_fix():
    r = analyze(load(ROOM_LIFT_IN_PIN_1), QUICK)
    assert not [f for f in r.findings if f.code == "GC113"]  # the shield reaches the box only
    # through the lift: landing it on the box would bypass the builder's lift
    good = _accepted(ROOM_LIFT_IN_PIN_1, Options(max_frequency=400.0))
    hum = [
        e
        for e in good
        if not e.candidate.touches_protective and e.candidate.action not in ("own-stud", "thicken")
    ]
    assert (hum[0].candidate.action, hum[0].candidate.element) == ("throw", "di.lift_sw")
    assert "open" in hum[0].candidate.edits[0].new


@pytest.mark.parametrize("path", [ROOM, ROOM_LIFT_IN_PIN_1])
def test_nothing_in_the_room_lifts_the_protective_earth(path):
    for e in _accepted(path):
        c = e.candidate
        assert not (c.touches_protective and c.action not in ("own-stud", "thicken")), c.title
