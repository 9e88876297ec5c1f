"""An outside restorer's transformerless table radio (tests/field/live-chassis-radio, copied as
written): a 1950s-style series-heater set whose chassis is tied to one conductor of its two-core
cord, an aux socket added on that live chassis for a streamer, and his own proper conversion (an
isolating transformer, a three-core cord, the chassis on a protective stud of its own). His
verdict: the live chassis is the danger; never bond it to the protective earth (with the plug one
way round that shorts line to earth), never treat insulating the aux socket as a fix while its
sleeve stays joined to the live chassis through its wiring, never write the set down as class II;
the converted set is clean of dangers.

When he wrote it the language could not say that a point is a mains pole: his plan writes the tie
as a plain terminal bolted to the chassis and says so in its header. The language now has the word
(`mains-pole`); the tests read the plan as written and, where the verdict rests on the tie, with
that one word written as his header describes."""

import math
from pathlib import Path

from groundcheck import load, load_text
from groundcheck.advice.repair import suggest
from groundcheck.analysis import Options, analyze

FIELD = Path(__file__).parent / "field" / "live-chassis-radio"
LIVE, ISOLATED = FIELD / "radio-live.gplan", FIELD / "radio-isolated.gplan"
QUICK = Options(hum=False)
POLE_AS_WRITTEN = "point pole_tag: terminal,"


def _with_pole(text: str) -> str:
    assert POLE_AS_WRITTEN in text
    return text.replace(POLE_AS_WRITTEN, "point pole_tag: mains-pole,")


def test_as_written_the_dangers_are_found_and_no_protective_bond_is_offered():
    # the plan cannot say the chassis is live: the tool sees class I metal with no protective earth
    # (dangers), and its fix line for the inlet warns against bonding a chassis on a mains pole
    r = analyze(load(LIVE), QUICK)
    dangers = {f.code for f in r.findings if f.severity == "danger"}
    assert {"GC201", "GC205"} <= dangers
    (inlet,) = [f for f in r.findings if f.code == "GC201"]
    assert "mains-pole" in inlet.fix and "then never" in inlet.fix
    text = LIVE.read_text()
    _, evs = suggest(load(LIVE), text, QUICK)
    assert not [e for e in evs if not e.rejected and "protective" in e.candidate.title]


def test_the_live_chassis_written_as_a_mains_pole_is_the_danger_and_never_bonded():
    text = _with_pole(LIVE.read_text())
    r = analyze(load_text(text, str(LIVE)), QUICK)
    (live,) = [f for f in r.findings if f.code == "GC230"]
    assert live.severity == "danger" and live.elements == ("chassis", "pole_tag")
    assert "aux_sleeve" in live.message and "never bond it to the protective earth" in live.fix
    # no finding asks for the live chassis to be bonded to the protective earth
    assert not [f for f in r.findings if f.code in ("GC201", "GC205")]
    # insulating the aux socket makes nothing safe: considered, never tried; nothing is offered
    _, evs = suggest(load_text(text, str(LIVE)), text, QUICK)
    insulate = [e for e in evs if e.candidate.action == "insulate"]
    assert insulate and all("GC230" in e.rejected for e in insulate)
    assert not [e for e in evs if not e.rejected]


def test_writing_the_live_set_down_as_class_ii_hides_nothing():
    text = _with_pole(LIVE.read_text())
    (mains,) = [line for line in text.splitlines() if line.startswith("mains ")]
    class_ii = text.replace(mains, mains + ", class II")
    r = analyze(load_text(class_ii, str(LIVE)), QUICK)
    assert [f.severity for f in r.findings if f.code == "GC230"] == ["danger"]
    # nor does leaving out 'touchable' (class II metal is internal unless written; a part on a
    # mains pole is touchable unless written internal)
    (chassis,) = [line for line in class_ii.splitlines() if line.startswith("metal chassis")]
    bare = class_ii.replace(chassis, chassis.replace(", touchable", ""))
    assert bare != class_ii
    r = analyze(load_text(bare, str(LIVE)), QUICK)
    assert [f.severity for f in r.findings if f.code == "GC230"] == ["danger"]


def test_the_converted_set_is_clean_of_dangers():
    # his figures by hand: 148.7 A and 41.8 V for a fault behind the fuse (TN-C-S, Ze 0.35 Ω,
    # 15 m of 1.5 mm², the 2 m cord, the fuse's cold resistance)
    r = analyze(load(ISOLATED), QUICK)
    assert not [f for f in r.findings if f.severity == "danger"]
    assert not [f for f in r.findings if f.code == "GC230"]
    (part,) = [p for p in r.safety.parts if p.part == "chassis"]
    assert abs(part.fault_current - 148.7) / 148.7 < 0.01
    assert abs(part.touch_voltage - 41.8) / 41.8 < 0.01


def test_the_cords_survival_in_the_room_is_not_answered_by_a_faster_fuse():
    # his review: GC207's fix offered a faster fuse, which cannot help a fault ahead of the fuse
    # (the building's 16 A breaker clears it; the cord is held to IEC 60898-1's 0.1 s bound)
    # (the cord is held to the breaker's let-through: I² over one period of the mains well inside
    # its instantaneous band). As he wrote it, his 0.75 mm² cord survives: about 240 A, worked
    # by hand √(1580 A²s)/115 = 0.35 mm²
    room = FIELD / "room-isolated.gplan"
    r = analyze(load(room), QUICK)
    assert not [f for f in r.findings if f.code == "GC207"]
    radio = next(d for d in r.device_earths if d.device == "radio")
    assert math.sqrt(radio.fault.i2t) / 115 < 0.75
    # a cord of 0.2 mm² would not: the fix still names no faster fuse
    thin = room.read_text().replace("cord 2 m 0.75 mm2", "cord 2 m 0.2 mm2")
    r = analyze(load_text(thin, str(room), root=FIELD.resolve()), QUICK)
    cords = [f for f in r.findings if f.code == "GC207"]
    assert cords and all("no faster fuse shortens" in f.fix for f in cords)
    assert not [f for f in cords if "faster or lower-rated" in f.fix]
