"""An outside electrician's village hall (tests/field/village-hall-tt, copied as written): a
1950s 12 W valve PA amplifier converted by its owner to a three-core cord (the earth on a tag
under a transformer foot bolt, a valve cage on two lacquered screws, the reservoir's return run to
the input end of the ground bus, a glass fuse), in a side room on a TT supply (180 Ω electrode,
one 100 mA RCD, a 20 A type B radial) with a bought class II record player and a class I tuner on
unbalanced leads. His verdict: the earth under the bolt and the cage are dangers, the bus return
a fault, the 100 mA RCD short of the 30 mA additional protection; the first fix the earth's own
stud; never a lift in the protective path, never the supply's link to the ground moved to the
input end. His hand figures: the TT fault loop 181.68 Ω (1.266 A, 228.2 V on the metal), the
cage's path 1 Ω (two 2 Ω screws in parallel) plus 2.7 mΩ."""

from pathlib import Path

import pytest

from groundcheck import load
from groundcheck.analysis import Options, analyze

from fieldadvice import GROUP, advised

FIELD = Path(__file__).parent / "field" / "village-hall-tt"
AMP = FIELD / "amp.gplan"
HALL = FIELD / "hall.gplan"

pytestmark = pytest.mark.xdist_group(GROUP)


def _codes(r, severity):
    return {(f.code, f.elements[0]) for f in r.findings if f.severity == severity}


def test_the_amplifier_alone_finds_the_bolt_the_cage_and_the_bus_return():
    r = analyze(load(AMP))
    dangers = _codes(r, "danger")
    assert ("GC202", "pe_lead") in dangers or any(c == "GC202" for c, _ in dangers)
    (cage,) = [f for f in r.findings if f.code == "GC206" and "cage" in f.elements]
    assert cage.severity == "danger"
    # by hand: two 2 Ω screws in parallel (1 Ω) after 90 mm of 0.75 mm² and the bolt (2.7 mΩ)
    assert cage.figures["path_resistance_mohm"] == pytest.approx(1002.7, rel=2e-3)
    shared = [f for f in r.findings if f.code == "GC102" and f.elements[0] == "psu"]
    assert shared and all(f.severity == "fault" for f in shared)


def test_the_tt_fault_loop_matches_the_hand_working():
    # by hand (IEC 60364-4-41 411.5): Z = 180 + 1 + 0.2 + 0.1334 + 0.0624 + 0.0027 + 0.0624 +
    # 0.2178 = 181.68 Ω, I = 230 / 181.68 = 1.266 A, touch 1.266 × 180.28 = 228.2 V
    r = analyze(load(AMP), Options(hum=False))
    chassis = next(p for p in r.safety.parts if p.part == "chassis")
    assert chassis.fault_current == pytest.approx(1.266, rel=2e-3)
    assert chassis.touch_voltage == pytest.approx(228.2, rel=2e-3)


def test_the_first_fix_is_the_earths_own_stud_and_the_supply_never_meets_the_input_end():
    a = advised("village-hall-tt/amp.gplan")
    useful = [e for e in a.evs if not e.rejected]
    assert useful[0].candidate.action == "own-stud", useful[0].candidate.title
    titles = [e.candidate.title for e in useful] + [e.candidate.title for e in a.chosen]
    # joining the centre tap to the reservoir by moving ct_lead leaves res_lead, to the input end
    # of the bus (bA, beside v1a's 64 dB input), the supply's one link to the signal ground
    assert not [t for t in titles if t.startswith("join ht_ct straight to res_neg")]
    refused = [e for e in a.evs if e.candidate.title.startswith("join ht_ct straight to res_neg")]
    assert refused and all("nearer v1a" in (e.rejected or "") for e in refused)
    assert [t for t in titles if t.startswith("join res_neg straight to ht_ct")]
    assert not [t for t in titles if "lift" in t and "protective earth stays" not in t]
    assert not [t for t in titles if "remove cage_s" in t]


def test_the_hall_asks_for_30_ma_on_its_sockets():
    r = analyze(load(HALL), Options(hum=False))
    (w,) = [f for f in r.findings if f.code == "GC225"]
    assert w.severity == "warning" and w.elements == ("supply",)
    assert w.location.file.endswith("hall.gplan")
    assert "100 mA" in w.message and "30 mA" in w.message


def test_without_the_rooms_rcd_the_amplifier_is_a_danger_whatever_its_own_plan_assumes(tmp_path):
    # the builder's own variant: the room's supply with its RCD taken out (the amplifier's plan
    # still says 'rcd 100 mA'). 1.27 A through the electrode never opens the 20 A breaker, nor the
    # 1 A slow fuse (IEC 60127-2: 1.5 × In holds for over an hour, from memory)
    (tmp_path / "amp.gplan").write_text(AMP.read_text())
    text = HALL.read_text().replace("electrode 180 ohm, rcd 100 mA,", "electrode 180 ohm,")
    assert text != HALL.read_text()
    (tmp_path / "hall.gplan").write_text(text)
    r = analyze(load(tmp_path / "hall.gplan"), Options(hum=False))
    amp = [f for f in r.findings if f.code == "GC208" and f.elements[0].startswith("amp.")]
    assert amp and all(f.severity == "danger" for f in amp)
    assert all("no RCD" in f.message and "100 mA, not counted here" in f.message for f in amp)
    assert not [f for f in r.findings if "by the rcd" in f.message]


def test_a_cut_spectrum_keeps_the_bus_return_a_fault():
    # a full-wave rectifier has no line below 100 Hz: computed up to 60 Hz the hum budget holds
    # nothing, which once turned the bus return into notes and the run's exit status to 0
    full = analyze(load(AMP))
    cut = analyze(load(AMP), Options(max_frequency=60.0))
    faults = {f.elements for f in full.findings if f.code == "GC102" and f.severity == "fault"}
    kept = {f.elements for f in cut.findings if f.code == "GC102" and f.severity == "fault"}
    assert faults and faults <= kept
    assert all(h.audible is not False for h in cut.hum.channels.values())
    assert any("up to 60 Hz only (--max-frequency" in n for n in cut.notices)
