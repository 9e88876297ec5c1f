"""Accept comments that accept nothing, name a danger, or sit in a block placed several times say
so, naming their FILE:LINE; 'accept left.NAME CODE: reason' accepts one placement's finding
only."""

import pytest

from groundcheck import load_text
from groundcheck.analysis import Options, analyze
from groundcheck.core.errors import PlanErrors

BLOCK = """plan "two placements"
metal deck: aluminium 2 mm, 300 x 200 mm
point star: star, at 150,100 on deck
block ch {
  point s: sleeve, at 20,20 on deck
  point k: pad, at 60,20 on deck
  wire g: s to k, 10 mm, 0.5 mm2   # ACCEPT
  wire r: k to star, 120 mm, 0.5 mm2
}
place ch as left at 0,0
place ch as right at 0,100
"""


def _run(comment: str, **options):
    text = BLOCK.replace("# ACCEPT", comment)
    return analyze(load_text(text, "p.gplan"), Options(hum=False, **options))


def _short(r):
    # wire g is stated 10 mm between ends 40 mm apart: GC112 (a stated length far from the
    # distance) in each placement, both located on line 7
    return {f.elements[0]: f.accepted for f in r.findings if f.code == "GC112"}


def test_an_accept_in_a_block_says_which_placements_it_covers():
    r = _run("# accept GC112: measured on the bench")
    assert _short(r) == {"left.g": "measured on the bench", "right.g": "measured on the bench"}
    (said,) = [n for n in r.notices if "covers" in n]
    assert said.startswith(
        "the accept comment at p.gplan:7 (GC112) covers 2 placements: left, right"
    )


def test_an_accept_naming_an_element_selects_one_placement():
    r = _run("# accept left.g GC112: measured on the bench")
    assert _short(r) == {"left.g": "measured on the bench", "right.g": None}
    assert not any("covers" in n or "matches no finding" in n for n in r.notices)


def test_an_accept_that_matches_nothing_is_a_warning_naming_its_line():
    r = _run("# accept GC101: no loop here")
    (said,) = [n for n in r.notices if "matches no finding" in n]
    assert said.startswith(
        "warning: the accept comment at p.gplan:7 (GC101) matches no finding on its line"
    )
    r = _run("# accept left.zz GC112: a name that is not there")
    assert _short(r) == {"left.g": None, "right.g": None}
    assert any("p.gplan:7" in n and "matches no finding of left.zz" in n for n in r.notices)
    # a rule the run did not judge is not said to match nothing: the verdict lists it as not
    # checked
    r = _run("# accept GC101: no loop here", leave_out=("GC101",), leave_out_origin="--leave-out")
    assert not any("matches no finding" in n for n in r.notices)


def test_an_accept_on_a_danger_says_it_cannot_apply():
    text = """plan "danger"
mains 230 V 50 Hz, fuse 1 A slow, breaking high, inlet at 10,10
metal case: steel 1 mm, 200 x 100 mm, touchable
metal lid: steel 1 mm, 200 x 100 mm, at 0,100, touchable   # accept GC206: painted threads
point pe: stud, at 20,20 on case
wire pe_lead: mains.pe to pe, 30 mm, 0.75 mm2, protective
bolt pe_nut: pe to case
bolt lid_screws: lid to case, contact 4 ohm, protective   # accept GC206: on the wrong line
"""
    r = analyze(load_text(text, "d.gplan"), Options(hum=False))
    (danger,) = [f for f in r.findings if f.code == "GC206"]
    assert danger.accepted is None
    assert any(
        n.startswith("the accept comment at d.gplan:4 names a danger (GC206)") for n in r.notices
    )
    # the part's finding is located at the part: the same comment on the screws' line accepts
    # nothing
    (wrong,) = [n for n in r.notices if "matches no finding" in n]
    assert wrong.startswith("warning: the accept comment at d.gplan:8 (GC206) matches no finding")


def test_an_unknown_rule_after_an_element_is_an_error_at_its_column():
    with pytest.raises(PlanErrors) as e:
        _run("# accept left.g GC11Z: typo")
    err = e.value.errors[0]
    line = BLOCK.splitlines()[6].replace("# ACCEPT", "# accept left.g GC11Z: typo")
    assert (err.location.line, err.location.column) == (7, line.index("GC11Z") + 1)


def test_an_accept_that_matches_nothing_reaches_a_review_screen():
    import json
    from groundcheck.renderers.sarif import render_sarif

    log = json.loads(render_sarif([_run("# accept GC101: no loop here")]))
    notes = log["runs"][0]["invocations"][0]["toolExecutionNotifications"]
    assert any(
        n["level"] == "warning" and "p.gplan:7 (GC101) matches no finding" in n["message"]["text"]
        for n in notes
    )
