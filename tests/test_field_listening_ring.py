"""An outside builder's listening room on a 32 A ring with fused plugs
(tests/field/listening-room-ring, copied as written, his variants and probes in variants/): a valve
line preamp of his own in two boxes joined by an umbilical (the supply box carries the mains; the
audio box's case is earthed only by the umbilical's 0.3 mm² braid), a valve phono stage of his
own, a turntable whose earth wire runs to the preamp, a bought power amplifier, a class II
streamer and a subwoofer across the room.

His verdict: the audio box's case needs a real protective bond to the supply box (the braid is
thin, and the HT return shares it); never lift an earth; his probe with the braid deleted left a
touchable case holding 300 V earthed by nothing, and nothing was reported."""

from pathlib import Path

from groundcheck import load
from groundcheck.analysis import Options, analyze

FIELD = Path(__file__).parent / "field" / "listening-room-ring"
QUICK = Options(hum=False)


def test_the_audio_box_with_no_braid_is_a_danger_and_with_it_passes_the_bond_limit():
    # GC233: the audio box has no mains of its own; its case must reach the supply box's
    # protective earth through protective conductors. With the braid (1.2 m of 0.3 mm²: his own
    # figure for the path, 71.6 mΩ) it does within 0.1 Ω; without it, only the 0 V core joins the
    # boxes, a return, never an earth
    probe = analyze(load(FIELD / "variants" / "probe-no-braid" / "listening-room.gplan"), QUICK)
    (f,) = [f for f in probe.findings if f.code == "GC233"]
    assert f.severity == "danger" and f.elements == ("pre.pre_chassis", "psu")
    written = analyze(load(FIELD / "listening-room.gplan"), QUICK)
    assert not [f for f in written.findings if f.code == "GC233"]
