"""An outside sound engineer's meeting hall on TN-C-S (tests/field/hall-pa-100v, copied as
written, his restoration in variants/): a restored 1960s-style valve 100 V line PA amplifier (its
earth tag under the mains transformer's foot bolt on paint, a 5 A quick-acting glass fuse, XLR pin
1 on the input ground, the line's common strapped to the chassis) on the front ring, a bought
mixer on the back radial 30 m away joined by a long balanced line, a class II CD player and a
hearing-loop driver.

His verdict: the earth on a stud of its own on bare metal first; a ceramic fuse; pin 1 to the
chassis; once restored, no danger is left in the hall — a 0.75 mm² cord on the ring's 32 A
breaker is ordinary practice."""

import math
from pathlib import Path

from groundcheck import load
from groundcheck.advice.repair import suggest
from groundcheck.analysis import Options, analyze

FIELD = Path(__file__).parent / "field" / "hall-pa-100v"
AMP, HALL = FIELD / "amp.gplan", FIELD / "hall.gplan"
FIXED = FIELD / "variants" / "hall-fix1.gplan"
QUICK = Options(hum=False)


def test_his_planted_dangers_are_found():
    r = analyze(load(AMP), QUICK)
    assert {"GC202", "GC206", "GC208", "GC211"} <= {
        f.code for f in r.findings if f.severity == "danger"
    }


def test_his_restoration_leaves_no_danger_in_the_hall():
    # the cord: about 307 A (his working), cleared by the B32's magnetic release; let-through
    # I² over one period of 50 Hz, S = √(307² × 0.02)/115 = 0.38 mm², within 0.75 mm²
    assert math.sqrt(307**2 * 0.02) / 115 < 0.75
    r = analyze(load(FIXED), QUICK)
    assert not [f for f in r.findings if f.severity == "danger"]


def test_the_earth_stud_goes_on_bare_metal_away_from_the_transformer():
    _, evs = suggest(load(AMP), AMP.read_text(), QUICK, FIELD.resolve(), AMP.resolve())
    own = next(e for e in evs if e.candidate.action == "own-stud")
    title = own.candidate.title
    assert "bare metal under a toothed washer" in title
    # never on the chassis's very edge (a hole needs metal round it), never in the transformer's
    # footprint: the nearest such place to the inlet at 20,240 on his 430 × 250 mm chassis
    assert "at 0,240" not in title and "at 140,240 on chassis" in title
