"""The field plan push-pull-el84 (tests/field/push-pull-el84/, written by a builder from the README
and docs/language.md alone, kept as written): a stereo push-pull amplifier whose protective earth
lands on the power transformer's mounting stud.  The verdict's must-find and never-offer lines, as
the review beneath it reads them."""

from pathlib import Path

from groundcheck import load
from groundcheck.advice.repair import suggest
from groundcheck.analysis import Options, analyze

PLAN = Path(__file__).resolve().parent / "field" / "push-pull-el84" / "plan.gplan"
PE = {"pe_lead", "pt_fix_rr", "pt_fix_fl", "pt_fix_fr", "pt_fix_rl"}


def test_the_protective_earth_under_the_transformer_bolt_is_found():
    r = analyze(load(PLAN))
    (f,) = [f for f in r.findings if f.code == "GC202"]
    # the verdict expects a danger: the stud is the chassis' only protective bond, and taking the
    # transformer out undoes it
    assert f.severity == "danger" and {"pe_lead", "pt_stud_rr", "pt_frame"} <= set(f.elements)


def test_the_first_fix_is_a_stud_of_its_own_on_the_chassis_and_nothing_touches_the_earth():
    _, evs = suggest(load(PLAN), PLAN.read_text(), Options(), PLAN.parent, PLAN)
    useful = [e for e in evs if not e.rejected]
    first = useful[0].candidate
    assert (first.action, first.element) == ("own-stud", "pe_lead")
    assert "on chassis" in first.title and "pt_frame" not in first.title
    new = first.edits[0].extra
    assert any(line.startswith("bolt pe_stud_nut: pe_stud to chassis") for line in new)
    # never: lift, thin or insulate the earth or a touchable frame
    for e in useful[1:]:
        assert e.candidate.element not in PE and "frame" not in e.candidate.element


def test_tags_placed_on_the_chassis_but_not_fastened_are_named():
    r = analyze(load(PLAN))
    (f,) = [f for f in r.findings if f.code == "GC106"]
    assert "bus_tag_in" in f.fix and "bus_tag_psu" in f.fix and "bolt bus_tag_in_nut" in f.fix


def test_fault_current_and_touch_voltage_as_worked_by_hand():
    # verdict, figures: Z = 0.8 + 0.125 + 2 x 0.290 + 2 x 0.0624 + 0.0027 = 1.633 ohm (IEC 60228
    # maxima at 70 C, from memory), I = 230 / 1.633 = 141 A; touch 141 x (0.0027 + 0.0624 + 0.290)
    # = 50 V.  The path through pt_frame's bolts is the tool's own (a few mohm either way).
    r = analyze(load(PLAN))
    rows = {row.part: row for row in r.safety.parts}
    assert abs(rows["pt_frame"].fault_current - 141.0) / 141.0 < 0.01
    assert abs(rows["pt_frame"].touch_voltage - 50.0) / 50.0 < 0.02
