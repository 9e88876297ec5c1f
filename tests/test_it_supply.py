"""An IT supply (IEC 60364-4-41 411.6): the second fault's loop driven by half the voltage
(411.6.4: Zs ≤ U/(2 Ia)) and timed by TN's column of Table 41.1; the first fault's touch voltage
R_A × I_d within 50 V (411.6.2, GC231); the words of the language and their errors.  Expected
values are worked by hand from the cables' IEC 60228 resistances, as in tests/test_safety.py."""

import pytest

from groundcheck import PlanErrors, load_text
from groundcheck.analysis import Options, analyze
from groundcheck.advice.repair import suggest

from helpers import plan
from test_safety import CIRCUIT_15_HOT, CORD_075_HOT, R_PATH, figures, mains_plan

CORD = "line-conductor 0.75 mm2, cord 2 m 0.75 mm2"


def _codes(result, code):
    return [f for f in result.findings if f.code == code]


def test_second_fault_is_driven_by_half_the_voltage_by_hand():
    # a 230 V IT supply without a neutral (the voltage between its two lines, as the equipment is
    # connected): the fault current of this circuit is U / (2 Zs) (411.6.4 b)
    s = figures(
        mains_plan(
            f"230 V 50 Hz, system IT, fuse 2 A slow, breaking high, {CORD}, loop-impedance 0.8 ohm"
        )
    )
    (deck,) = s.parts
    fuse_r = 0.2 / 2.0  # the documented cold-resistance fit of a fuse (from memory)
    z = 0.8 + fuse_r + CIRCUIT_15_HOT + CORD_075_HOT + R_PATH + CORD_075_HOT + CIRCUIT_15_HOT
    assert deck.fault_current == pytest.approx(230 / 2 / z, rel=1e-9)
    # between this part and the other faulty one, whose circuit is taken as this one's mirror:
    # the current through both circuits' protective conductors
    assert deck.touch_voltage == pytest.approx(
        2 * 230 / 2 / z * (R_PATH + CORD_075_HOT + CIRCUIT_15_HOT), rel=1e-9
    )
    # TN's column of Table 41.1 for the second fault (411.6.4 a): 0.4 s at 230 V
    assert s.supply.max_time == 0.4 and s.supply.electrode == 0.0


def test_a_breaker_that_trips_at_once_on_tn_is_late_on_it():
    # 16 A type B: instantaneous from 5 In = 80 A (IEC 60898-1, from memory).  With a 1.5 Ω loop
    # the TN fault (≈ 100 A by hand) trips it at once; the IT second fault draws half (≈ 50 A),
    # below 80 A, and is left to the thermal release: too late for 0.4 s
    z_cables = CIRCUIT_15_HOT + CORD_075_HOT + R_PATH + CORD_075_HOT + CIRCUIT_15_HOT
    base = f"230 V 50 Hz, breaker 16 A B, {CORD}, loop-impedance 1.5 ohm"
    assert 80 < 230 / (1.5 + z_cables + 0.1) and 230 / 2 / (1.5 + z_cables) < 80
    tn = analyze(mains_plan(base), Options(hum=False))
    it = analyze(mains_plan(base + ", system IT"), Options(hum=False))
    assert not _codes(tn, "GC208")
    (f,) = _codes(it, "GC208")
    assert f.severity == "danger" and f.figures["max_disconnection_s"] == 0.4
    assert "first fault on the other line" in f.message and "IT, second fault" in f.message
    # an RCD is not counted: the second fault leaves on one line and comes back on the other, so
    # one RCD ahead of both faulty circuits sees no residual current (an outside builder's point)
    (f,) = _codes(
        analyze(mains_plan(base + ", system IT, rcd 30 mA"), Options(hum=False)), "GC208"
    )
    assert f.severity == "danger" and f.figures["max_disconnection_s"] == 0.4


def test_a_placed_device_on_it_takes_the_buildings_loop_and_its_electrode_stays_out_of_it(
    tmp_path,
):
    # an outside builder's room: the supply states Ze 1.2 Ω and an electrode of 25 Ω; the
    # electrode is no part of an IT second fault's loop, so the stated loop stands (it had been
    # dropped as "smaller than the electrode", a TT rule, and the 0.8 Ω default taken).  His hand
    # method, I = U / (2 × (Ze + line path + protective path)), here for a simple device on 10 m
    # of 1.5 mm² (IEC 60228 12.1 Ω/km) and a 2 m 0.75 mm² cord (26 Ω/km), both at 70 °C (× 1.2):
    # 0.1452 + 0.0624 = 0.2076 Ω each way, I = 230 / (2 × (1.2 + 2 × 0.2076)) = 71.20 A, below
    # the 80 A (5 In) a 16 A type B breaker needs to trip at once (IEC 60898-1, from memory)
    room = tmp_path / "room.gplan"
    room.write_text(
        'plan "room"\nsupply 230 V 50 Hz, system IT, electrode 25 ohm, first-fault 1.5 A, '
        "loop-impedance 1.2 ohm, breaker 16 A B\npoint met: earthing-terminal\n"
        "point wall: outlet\ncable run: met to wall, 10 m, 1.5 mm2, cores L-N-PE\n"
        "device sub: simple, plugged wall, cord 2 m 0.75 mm2, signal-ground chassis\n"
    )
    from groundcheck import load

    (f,) = _codes(analyze(load(str(room)), Options(hum=False)), "GC208")
    assert f.severity == "danger"
    assert f.figures["fault_current_a"] == pytest.approx(230 / (2 * (1.2 + 2 * 0.2076)), rel=1e-4)


@pytest.mark.parametrize(
    "words,severity,volts",
    [
        ("", "note", None),  # nothing stated: not checked, said
        (", electrode 10 ohm", "note", None),  # the first-fault current not stated
        (", electrode 80 ohm, first-fault 1 A", "danger", 80.0),  # 80 Ω × 1 A by hand
        (", electrode 40 ohm, first-fault 1 A", None, None),  # 40 V: within 50 V
        (", electrode 20 ohm, first-fault 2.5 A", None, None),  # exactly 50 V: within
    ],
)
def test_first_fault_touch_voltage(words, severity, volts):
    r = analyze(
        mains_plan(f"230 V 50 Hz, system IT, fuse 2 A slow, {CORD}{words}"), Options(hum=False)
    )
    found = _codes(r, "GC231")
    if severity is None:
        assert not found
        return
    (f,) = found
    assert f.severity == severity
    if volts is not None:
        assert f.figures["electrode_times_first_fault_v"] == pytest.approx(volts, rel=1e-12)
        assert "50 Ω" in f.fix  # 50 V / 1 A by hand
    else:
        assert "not checked" in f.message and "insulation monitor" in f.fix


def test_class_ii_and_tn_plans_have_no_first_fault_finding():
    tn = analyze(mains_plan(f"230 V 50 Hz, fuse 2 A slow, {CORD}"), Options(hum=False))
    ii = analyze(
        plan(
            'plan "t"\nmains 230 V 50 Hz, system IT, class II, fuse 1 A slow\n'
            "metal lid: steel 1 mm, internal\n",
            header=False,
        ),
        Options(hum=False),
    )
    assert not _codes(tn, "GC231") and not _codes(ii, "GC231")


@pytest.mark.parametrize(
    "mains,words",
    [
        (
            "230 V 50 Hz, first-fault 1 A",
            ("first-fault current is stated for a TN-S", "system IT"),
        ),
        ("230 V 50 Hz, system TN-C-S, electrode 10 ohm", ("TN-C-S supply", "system IT")),
        ("230 V 50 Hz, system IT, first-fault 0.1 mA", ("plausible range", "first-fault")),
        ("230 V 50 Hz, system IX", ("TN-S, TN-C-S, TT or IT", "system")),
    ],
)
def test_it_words_have_located_errors(mains, words):
    with pytest.raises(PlanErrors) as e:
        load_text(f'plan "t"\nmains {mains}\nmetal deck: steel 1 mm\n', "t.gplan")
    (err,) = e.value.errors
    line = err.one_line()
    assert line.startswith("t.gplan:2:") and all(w in line + err.hint for w in words)


def test_an_installation_on_it_passes_its_electrode_and_first_fault_to_each_device(tmp_path):
    (tmp_path / "amp.gplan").write_text(
        f'plan "amp"\nmains 230 V 50 Hz, fuse 2 A slow, {CORD}\n' + _PE
    )
    room = tmp_path / "room.gplan"
    room.write_text(
        'plan "room"\nsupply 230 V 50 Hz, system IT, electrode 30 ohm, first-fault 2 A, '
        "breaker 16 A B\npoint met: earthing-terminal\npoint wall: outlet\n"
        "cable run: met to wall, 10 m, 2.5 mm2, cores L-N-PE\n"
        'device amp: "amp.gplan", plugged wall\n'
    )
    from groundcheck import load

    r = analyze(load(str(room)), Options(hum=False))
    dangers = [f for f in _codes(r, "GC231") if f.severity == "danger"]
    # the building's own finding, and the device's under its name (as GC220): 30 Ω × 2 A = 60 V
    assert len(dangers) == 2
    assert all(f.figures["electrode_times_first_fault_v"] == pytest.approx(60.0) for f in dangers)


_PE = """metal deck: aluminium 2 mm, 300 x 200 mm, touchable
point pe_stud: stud, at 20,180 on deck
wire pe_lead: mains.pe to pe_stud, 1 m, 1.0 mm2, protective
bolt pe_bolt: pe_stud to deck, contact 0.5 mohm
"""


def test_the_advisor_improves_the_electrode_and_never_touches_the_protective_earth():
    text = (
        f'plan "t"\nmains 230 V 50 Hz, system IT, electrode 80 ohm, first-fault 1 A, '
        f"fuse 2 A slow, {CORD}\n" + _PE
    )
    before, evs = suggest(load_text(text, "t.gplan"), text, Options(max_frequency=1000.0))
    good = [ev for ev in evs if not ev.rejected]
    # 50 V / 1 A by hand: 50 Ω (IEC 60364-4-41 411.6.2)
    best = good[0]
    assert "electrode 50 ohm" in best.candidate.edits[0].new and "GC231 mains" in best.cleared
    assert "qualified electrician" in best.candidate.title and not best.introduced
    # nothing it offers touches the protective earth's wire
    assert all("pe_lead" not in e.new for ev in good for e in ev.candidate.edits)
