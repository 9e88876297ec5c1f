"""Writing plans: the lift network's syntax and errors, lengths from positions, a device's
channels, and errors inside placed blocks that name only the placement at fault."""

import pytest

from groundcheck import load_text
from groundcheck.core.errors import PlanErrors

LIFT = """plan "lift"
metal deck: aluminium 2 mm, 200 x 120 mm
point a: stud, at 10,10 on deck
point b: pad, at 50,10 on deck
"""


def _error(text: str) -> str:
    with pytest.raises(PlanErrors) as e:
        load_text(text, "p.gplan")
    return e.value.errors[0].one_line()


def test_a_lift_takes_its_capacitor_as_a_quantity_or_named():
    bare = load_text(LIFT + "lift l: a to b, 10 ohm, 47 nF\n", "p.gplan").conductors[0]
    named = load_text(
        LIFT + "lift l: a to b, resistance 10 ohm, capacitance 47 nF\n", "p.gplan"
    ).conductors[0]
    assert (bare.resistance, bare.capacitance) == (named.resistance, named.capacitance)
    assert bare.resistance == 10.0 and bare.capacitance == pytest.approx(47e-9, rel=1e-12)


def test_a_lift_error_lists_only_what_a_lift_takes():
    line = _error(LIFT + "lift l: a to b, 10 ohm, farad 47 nF\n")
    assert line.startswith("p.gplan:5:25: error: lift: unknown attribute 'farad'")
    listed = line.split("expected one of: ")[1].split(";")[0].split(", ")
    assert set(listed) == {
        "protective",
        "return",
        "signal",
        "shield",
        "bond",
        "heater",
        "resistance",
        "channel",
        "via",
        "capacitance",
        "diodes",
    }
    assert "', 10 ohm, 47 nF'" in line
    wire = _error(LIFT + "wire w: a to b, 10 mm, 1 mm2, capacitance 4 nF\n")
    assert "capacitance is an attribute of a lift, not of a wire" in wire
    # a wire's own list keeps its geometry words and leaves out the lift's, the switch's and the
    # cable's
    listed = (
        _error(LIFT + "wire w: a to b, 10 mm, 1 mm2, zzz\n")
        .split("expected one of: ")[1]
        .split(", ")
    )
    assert {"insulation", "AWG", "copper", "separate"} <= set(listed)
    assert not {"capacitance", "open", "cores", "terminated", "gain"} & set(listed)


def test_a_device_channel_named_as_the_device_is_not_prefixed_twice(tmp_path):
    from pathlib import Path
    from groundcheck import load

    studio = load(Path(__file__).parent / "field" / "home-studio-step-down" / "home-studio.gplan")
    channels = {s.channel for s in studio.stages}
    assert "comp" in channels and "comp.comp" not in channels
    # the installation's links that say 'channel comp' and the device's own stage are one channel
    assert {c.channel for c in studio.conductors if c.name in ("send", "ret")} == {"comp"}
    # a channel of another name is still the device's own, prefixed once
    (tmp_path / "box.gplan").write_text(
        'plan "box"\nmetal deck: aluminium 2 mm, 100 x 100 mm\npoint a: pad, at 10,10 on deck\n'
        "point b: pad, at 50,10 on deck\nwire w: a to b, 40 mm, 0.5 mm2\n"
        "stage s1: a to b, gain 20 dB, channel box\nstage s2: a to b, gain 20 dB, channel side\n"
    )
    (tmp_path / "room.gplan").write_text('plan "room"\ndevice box: "box.gplan", at 0,0\n')
    placed = load(tmp_path / "room.gplan")
    assert sorted(s.channel for s in placed.stages) == ["box", "box.side"]


def test_a_point_outside_its_part_names_only_the_placement_that_is_outside():
    text = """plan "outside"
metal deck: aluminium 2 mm, 300 x 100 mm
block ch {
  point s: sleeve, at 20,20 on deck
  point k: pad, at 60,20 on deck
  wire g: s to k, 40 mm, 0.5 mm2
}
place ch as left at 0,0
place ch as right at 250,0
"""
    with pytest.raises(PlanErrors) as e:
        load_text(text, "p.gplan")
    (only,) = e.value.errors  # right.s at 270,20 lies within; right.k at 310,20 does not
    assert only.one_line() == (
        "p.gplan:5:3: error: point 'right.k' at 310,20 mm lies outside 'deck' (in placement "
        "right) (positions are in the plan frame, in mm)"
    )
    # an error of the statement itself still names every placement
    with pytest.raises(PlanErrors) as e:
        load_text(text.replace("0.5 mm2", "0.5 mm2, zzz"), "p.gplan")
    (wire,) = [x for x in e.value.errors if x.location.line == 6]
    assert "(in placements left, right)" in wire.message


MEASURED = """plan "measured"
metal deck: aluminium 2 mm, 300 x 100 mm
point a: stud, at 10,10 on deck
point b: pad, at 40,50 on deck
"""


def test_a_wire_without_a_length_is_measured_along_its_ends_and_route():
    plan = load_text(
        MEASURED + "wire w1: a to b, 0.5 mm2\nwire w2: a to b, 0.5 mm2, via 40,10\n"
        "wire w3: a to b, 80 mm, 0.5 mm2\n",
        "p.gplan",
    )
    w1, w2, w3 = plan.conductors
    # by hand: ends 30 mm and 40 mm apart in x and y, a 3-4-5 triangle: 50 mm straight, 30 + 40 mm
    # via 40,10
    assert w1.length == pytest.approx(0.050, rel=1e-12) and w1.length_computed
    assert w2.length == pytest.approx(0.070, rel=1e-12) and w2.length_computed
    assert w3.length == pytest.approx(0.080, rel=1e-12) and not w3.length_computed  # as stated


def test_measured_lengths_are_said_and_a_stated_one_is_still_checked():
    from groundcheck.analysis import Options, analyze

    plan = load_text(
        MEASURED + "wire w1: a to b, 0.5 mm2\nwire w4: a to b, 20 mm, 0.5 mm2\n", "p.gplan"
    )
    r = analyze(plan, Options(hum=False))
    (said,) = [n for n in r.notices if "measured" in n]
    assert "wire w1 50 mm" in said and "w4" not in said
    short = [f for f in r.findings if f.code == "GC112"]
    assert [f.elements for f in short] == [("w4",)]  # 20 mm stated against 50 mm between ends


def test_a_length_that_cannot_be_measured_is_asked_for():
    line = _error(MEASURED + "point c: pad\nwire w: a to c, 0.5 mm2\n")
    assert line.startswith("p.gplan:6:1: error: wire w needs a length: c has no position")
    line = _error(MEASURED + "wire w: a to deck, 0.5 mm2\n")
    assert "deck has no position" in line
    # a link between devices runs as it likes: never measured
    line = _error(MEASURED + "interconnect i: a to b, 0.1 mm2\n")
    assert "interconnect i needs a length" in line
