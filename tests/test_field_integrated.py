"""The field plan integrated-se-el84 (tests/field/integrated-se-el84/, written by an outside
builder from the README and docs/language.md alone, kept as written, its verdict written before
any run): a stereo single-ended integrated amplifier with six RCA sockets bolted to the rear apron,
the protective earth under a transformer bolt, the bridge's negative on the input pad and a bottom
plate earthed only through its screws.  The verdict's must-find, first-fix and never-offer lines,
and its hand figures."""

from pathlib import Path

import pytest

from groundcheck import load
from groundcheck.analysis import analyze

from fieldadvice import GROUP, advised as field_advised

PLAN = Path(__file__).resolve().parent / "field" / "integrated-se-el84" / "plan.gplan"
SOCKETS = {f"in{i}_{s}_nut" for i in (1, 2, 3) for s in "lr"}


@pytest.fixture(scope="module")
def checked():
    return analyze(load(PLAN))


pytestmark = pytest.mark.xdist_group(GROUP)


@pytest.fixture(scope="module")
def advised():
    a = field_advised("integrated-se-el84/plan.gplan")  # once per test process
    return a.plan, (a.chosen, a.final), a.evs


def test_every_must_find_is_found(checked):
    codes = {(f.code, e) for f in checked.findings for e in f.elements}
    assert ("GC206", "bottom") in codes  # M4: the plate earthed through its screws only
    assert ("GC202", "pe_lead") in codes  # M2: the earth under the transformer's bolt
    assert any(c == "GC102" for c, _ in codes)  # M3: the bridge's current in the signal ground
    assert any(c == "GC105" for c, _ in codes)  # M1: the sockets bond the ground to the chassis
    assert any(c == "GC303" for c, _ in codes)  # audible at the seat


def test_protective_figures_as_worked_by_hand(checked):
    # verdict, hand figures: bottom plate 0.378 ohm (four 1.5 ohm screws in parallel, plus about
    # 3 mohm to the chassis); fault current 135 A to the chassis and 110 A to the plate, touch
    # voltages 48 V and 81 V (the verdict's loop of 1.709 ohm and 2.084 ohm)
    rows = {row.part: row for row in checked.safety.parts}
    assert rows["bottom"].path_resistance == pytest.approx(0.378, rel=0.01)
    assert rows["chassis"].fault_current == pytest.approx(135.0, rel=0.01)
    assert rows["bottom"].fault_current == pytest.approx(110.0, rel=0.01)
    assert rows["chassis"].touch_voltage == pytest.approx(48.0, rel=0.02)
    assert rows["bottom"].touch_voltage == pytest.approx(81.0, rel=0.02)


def test_the_dangers_and_the_earth_stud_come_before_the_hum(advised):
    _, _, evs = advised
    useful = [e.candidate for e in evs if not e.rejected]
    # both are dangers (the bottom plate's touch voltage; the earth under the transformer's bolt,
    # which the verdict rates a danger too): either may come first, both before any hum fix
    first_two = {(c.action, c.reason) for c in useful[:2]}
    assert ("own-stud", "GC202") in first_two and any(
        c.reason == "GC206" or "bottom" in c.title for c in useful[:2]
    ), [c.title for c in useful[:3]]


def test_the_bridge_negative_goes_straight_to_the_reservoir(advised):
    # verdict, first hum fix: br_neg_w to res_neg, 'a wire of a few cm' (the two points are 25 mm
    # apart: its old waypoints past the input valve go with its old end)
    _, _, evs = advised
    (ev,) = [e for e in evs if e.candidate.element == "br_neg_w" and not e.rejected]
    new = ev.candidate.edits[0].new
    assert "br_neg to res_neg" in new and "via" not in new
    assert "30 mm" in new


def test_the_six_sockets_are_insulated_as_one_change_and_kept_in_the_combined_set(advised):
    plan, (best, _), evs = advised
    lines = {c.location.line for c in plan.conductors if c.name in SOCKETS}
    chosen = {
        e.line for ev in best for e in ev.candidate.edits if ev.candidate.action == "insulate"
    }
    assert len(lines) == 6 and lines <= chosen


def test_never_the_grounds_bond_to_the_chassis_nor_the_bus_nor_the_earth(advised):
    # verdict, never offer: removing or moving gnd_bond's wire (the audio ground would hang on the
    # RCA nuts, then float); cutting the bus away from the reservoir; touching pe_lead but for its
    # own stud
    _, (best, after), evs = advised
    for ev in [*evs, *best]:
        c = ev.candidate
        if ev.rejected:
            continue
        assert c.element not in ("gnd_lug_w", "gnd_bond", "bus3"), c.title
        assert c.element != "pe_lead" or c.action == "own-stud", c.title
    assert best and not any(f.code in ("GC106", "GC109") for f in after.findings)
