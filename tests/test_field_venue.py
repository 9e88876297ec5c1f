"""An outside live-sound technician's venue (tests/field/venue-tn-s, copied as written): a TN-S
venue (Ze 0.8 Ω, 16 A type B breakers, no RCD) with the stage on one 50 m reel of 1 mm² flex, his
own valve DI box (a plan of its own) on an earth-lift adaptor, a bass amp's unbalanced line 35 m
to the mixer at front of house, and powered speakers fed by balanced lines. His verdict: the DI's
lost earth and every class I device on the reel are dangers; a device earthed only through a
signal screen gets no fault figures of a circuit it does not have; never the mixer plugged in at
the stage by a long lead, and no advice with the protective-earth rules left out that adds a
danger. His hand figures: the reel's fault loop 3.795 Ω (60.6 A, 90.8 V for the bass amp; 60.9 A
for the 2 m cords), earth paths of 1.24–1.25 Ω."""

from pathlib import Path

import pytest

from groundcheck import load
from groundcheck.advice.repair import advise
from groundcheck.analysis import Options, analyze

from fieldadvice import GROUP, advised

FIELD = Path(__file__).parent / "field" / "venue-tn-s"
VENUE = FIELD / "venue.gplan"

pytestmark = pytest.mark.xdist_group(GROUP)


def _run(options=Options(hum=False)):
    return analyze(load(VENUE), options)


def test_the_lost_earth_is_found_where_the_di_is_plugged_in_and_has_no_fault_figures():
    r = _run()
    (lost,) = [f for f in r.findings if f.code == "GC215" and f.elements[0] == "di"]
    assert lost.severity == "danger"
    assert lost.location.file.endswith("venue.gplan")  # the device's line, not its own plan's
    assert "plugged into di_adaptor" in lost.message
    (row,) = [d for d in r.device_earths if d.device == "di"]
    # no fault loop through a protective earth exists: figures on the circuit its own plan
    # assumed (153 A, cleared in 0.1 s) would describe a path it does not have
    assert row.resistance is None and row.fault is None
    assert not [f for f in r.findings if f.code == "GC208" and f.elements[0].startswith("di.")]


def test_every_device_on_the_reel_is_a_danger_with_the_hand_figures():
    r = _run()
    rows = {d.device: d for d in r.device_earths}
    # by hand: Zs = 0.8 + 2 x (0.222 + 1.170 + 0.035 + 0.070) = 3.795 Ω, 230 / 3.795 = 60.6 A
    assert rows["bassamp"].fault.fault_current == pytest.approx(60.6, rel=3e-3)
    assert rows["bassamp"].fault.touch_voltage == pytest.approx(90.8, rel=3e-3)
    assert rows["wedge1"].fault.fault_current == pytest.approx(60.9, rel=3e-3)
    dangers = {f.elements[0] for f in r.findings if f.code == "GC208" and f.severity == "danger"}
    assert {"bassamp", "wedge1", "wedge2", "pa_l", "pa_r"} <= dangers


def test_with_the_earth_rules_left_out_the_advice_still_judges_them():
    # a crew in a hurry: --leave-out GC2. The advisor once ranked first "plug mixer in at
    # stage_strip" (the mixer at the end of the reel: two new dangers) and --apply wrote it
    plan, text = load(VENUE), VENUE.read_text()
    before, evs, chosen, final = advise(
        plan, text, Options(leave_out=("GC2",)), FIELD.resolve(), VENUE.resolve(), budget=60
    )
    assert any(f.code == "GC208" for f in before.findings)  # judged, whatever was left out
    offered = [e for e in evs if not e.rejected] + list(chosen)
    assert not [e for e in offered if e.result is not None and "GC208" in str(e.introduced)]
    assert not [e for e in offered if e.candidate.title.startswith("plug mixer in at")]


def test_no_device_is_offered_an_outlet_its_cord_cannot_reach():
    # front of house is some 20 m from the stage; every cord is 2-3 m long
    a = advised("venue-tn-s/venue.gplan")  # once per test process, shared with the sweep
    evs, chosen = a.evs, a.chosen
    moves = [e for e in evs if e.candidate.action == "replug"]
    assert moves
    for e in moves:
        far = e.candidate.title.split(" in at ")[1].split(",")[0]
        if far == "foh_strip" or e.candidate.element == "mixer":
            assert e.rejected and "does not reach" in e.rejected, e.candidate.title
    assert not [e for e in chosen if e.candidate.action == "replug" and "foh" in e.candidate.title]
    # by hand, from the plan's positions: pa_l at (1.0, 6.5) m, the strip at (8.5, 25.0) m:
    # √(7.5² + 18.5²) = 19.96 m against its 2 m cord
    (pa_l,) = [e for e in moves if e.candidate.title.startswith("plug pa_l in at foh_strip")]
    assert "pa_l's cord (2 m) does not reach foh_strip, 20.0 m away" in pa_l.rejected
