"""Writing plans: the lift network's syntax and errors, lengths from positions, a device's channels, and
errors inside placed blocks that name only the placement at fault."""

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
    named = load_text(LIFT + "lift l: a to b, resistance 10 ohm, capacitance 47 nF\n", "p.gplan").conductors[0]
    assert (bare.resistance, bare.capacitance) == (named.resistance, named.capacitance)
    assert bare.resistance == 10.0 and bare.capacitance == pytest.approx(47e-9, rel=1e-12)


def test_a_lift_error_lists_only_what_a_lift_takes():
    line = _error(LIFT + "lift l: a to b, 10 ohm, farad 47 nF\n")
    assert line.startswith("p.gplan:5:25: error: lift: unknown attribute 'farad'")
    listed = line.split("expected one of: ")[1].split(";")[0].split(", ")
    assert set(listed) == {"protective", "return", "signal", "shield", "bond", "heater", "resistance",
                           "channel", "via", "capacitance"}
    assert "', 10 ohm, 47 nF'" in line
    wire = _error(LIFT + "wire w: a to b, 10 mm, 1 mm2, capacitance 4 nF\n")
    assert "capacitance is an attribute of a lift, not of a wire" in wire
    # a wire's own list keeps its geometry words and leaves out the lift's, the switch's and the cable's
    listed = _error(LIFT + "wire w: a to b, 10 mm, 1 mm2, zzz\n").split("expected one of: ")[1].split(", ")
    assert {"insulation", "AWG", "copper", "separate"} <= set(listed)
    assert not {"capacitance", "open", "cores", "terminated", "gain"} & set(listed)
