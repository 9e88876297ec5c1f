"""An outside reviewer's restored guitar combo on 120 V 60 Hz TN-C-S
(tests/field/vintage-combo-120v: the plan as written, its verdict written before the analysis
ran).

Hand figures from the verdict: the reverb drive's 60 mA divides between the send screen (21.5 mΩ)
and the return path (about 37 mΩ), 22 mA of it through 27.6 mΩ of the input's path: 0.60 mV at
the recovery stage, × 177.8 (45 dB) = 107 mV against the 12.6 V rated output, −41 dB (Ohm's law
and current division, worked by hand)."""

import math

import pytest

from fieldadvice import GROUP, advised

pytestmark = pytest.mark.xdist_group(GROUP)

REL = "vintage-combo-120v/combo.gplan"


def test_the_earth_on_a_transformer_bolt_is_found_and_given_its_own_stud_first():
    a = advised(REL)
    assert any(f.code == "GC202" for f in a.before.findings)  # must find 1
    first = a.evs[0].candidate
    assert first.action == "own-stud"
    (edit,) = first.edits
    bolt = [x for x in edit.extra if x.startswith("bolt ")]
    assert bolt and bolt[0].endswith(", protective")
    # the new stud clear of the transformer frame's outline by a nut's room (15 mm)
    stud = next(x for x in edit.extra if x.startswith("point "))
    x, y = (float(v) for v in stud.split(" at ")[1].split(" on ")[0].split(","))
    frame = a.plan.metal("pt_frame")
    (fx, fy), (w, h) = frame.origin, frame.size
    dx = max(fx - x * 1e-3, 0, x * 1e-3 - (fx + w))
    dy = max(fy - y * 1e-3, 0, y * 1e-3 - (fy + h))
    assert math.hypot(dx, dy) >= 15e-3, stud


def test_the_reverb_loop_and_its_feedback_as_worked_by_hand():
    r = advised(REL).before
    assert any(f.code == "GC101" and "send_sh" in f.elements for f in r.findings)  # must find 2
    (fb,) = [f for f in r.findings if f.code == "GC306"]
    assert fb.figures["feedback_db"] == pytest.approx(-41.0, abs=1.0), fb.figures
    assert r.hum.channels["guitar"].audible is True


def test_the_rectifier_filament_is_never_to_be_grounded():
    r = advised(REL).before
    for f in (f for f in r.findings if f.code == "GC107"):
        assert "must never be referenced to ground" in f.fix


def test_the_pans_lugs_are_offered_one_at_a_time_and_no_bolt_is_moved():
    a = advised(REL)
    titles = [e.candidate.title for e in a.evs if not e.rejected]
    assert any(t.startswith("insulate pan_out_lug") for t in titles)
    assert not any(t.startswith("insulate every socket on pan") for t in titles)
    assert not any("(pan_in_lug)" in t or "(pan_out_lug)" in t for t in titles if "own wire" in t)
