"""An outside live-sound technician's gig in a field on a floating portable generator
(tests/field/generator-field-gig, copied as written, his variants in variants/): a distribution box
with a 30 mA RCD and 16 A breakers, long reels, a valve guitar head of his own (its front plate on
paint, the earth under the transformer stud, a glass fuse, the reservoir's return on the bus), a
bought powered mixer, a class II keyboard, a passive stage box; written as an IT supply with no
electrode (the language has no word for "no electrode at all"), his first fix with the
generator's neutral linked to its frame (a TN-S supply of its own).

His verdict: an RCD cannot see a fault through the earth wiring of a floating generator; link
neutral to earth at the generator; never an earth lifted."""

from pathlib import Path

import pytest

from groundcheck import load
from groundcheck.analysis import Options, analyze

FIELD = Path(__file__).parent / "field" / "generator-field-gig"
GIG, TNS = FIELD / "field-gig.gplan", FIELD / "variants" / "field-gig-tns.gplan"
QUICK = Options(hum=False)


def test_no_disconnection_danger_on_the_floating_generator_is_answered_by_an_rcd():
    r = analyze(load(GIG), QUICK)
    late = [f for f in r.findings if f.code == "GC208"]
    assert {f.elements[0] for f in late} >= {"wedge", "mixer", "head.chassis"}
    for f in late:
        # the supply already has its RCD, which a second fault through the earth wiring passes
        assert "does not see it" in f.fix and "link its neutral to its frame" in f.fix, f.fix
    # his hand figure for the IT second fault through the wedge's reel: 18.4 A
    wedge = next(f for f in late if f.elements[0] == "wedge")
    assert wedge.figures["fault_current_a"] == pytest.approx(18.4, rel=0.01)


def test_his_neutral_link_clears_every_disconnection_danger():
    r = analyze(load(TNS), QUICK)
    assert not [f for f in r.findings if f.code == "GC208"]
    assert not [f for f in r.findings if f.code == "GC215" and f.severity == "danger"]


def test_a_one_stage_channel_is_not_louder_than_its_own_signed_sum():
    # the FOH guitar line and the wedge each have one stage: "every stage in phase" cannot make
    # them louder than the network's own sum, and the devices' leakage currents (one mains line)
    # cancel along the reels as phasors — the worst case had added their magnitudes (-62.6 dBV
    # against the signed -77.5 dBV; his hand figure, without the keyboard's opposing leakage,
    # -73.9 dBV)
    r = analyze(load(GIG))
    for ch in ("foh_gtr", "wedge"):
        h = r.hum.channels[ch]
        assert h.total_v == pytest.approx(h.signed_v, rel=1e-9), ch
    assert r.hum.channels["foh_gtr"].total_dbv == pytest.approx(-77.5, abs=0.1)
