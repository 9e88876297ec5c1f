"""An outside engineer's rural chapel on a TT supply (tests/field/chapel-tt, copied as written,
his variants in variants/): a push-pull valve amplifier of his own (the earth lead and the mains
transformer's screen lead under one foot screw, a bottom cover bonded by painted screws, a glass
fuse, the reservoir's return on the preamp's tag strip), a mixer and a CD player on a strip off a
ring written as two cables, a vestry amplifier on an old flat cable off a sub-board, two
microphones on long balanced leads; a 100 mA RCD on a 160 Ω electrode.

His verdict: the earth lead on a stud of its own, a ceramic fuse, the cover bonded by a wire, the
reservoir's return to the centre tap, a 30 mA RCD; never lift an earth; a ring's two legs carry a
short circuit in parallel."""

from pathlib import Path

import pytest

from groundcheck import load
from groundcheck.analysis import Options, analyze

FIELD = Path(__file__).parent / "field" / "chapel-tt"
CHAPEL = FIELD / "chapel.gplan"
QUICK = Options(hum=False)


def test_the_rings_two_legs_carry_the_short_circuit_together():
    # his hand figure (report): the supply's 0.35 Ω, then line and neutral through the ring's two
    # legs in parallel (18 m ∥ 34 m of 2.5 mm²), the strip's 3 m of 1 mm² and the amplifier's
    # 3 m of 0.75 mm²: 0.789 Ω, 291 A; the least-resistance leg alone gave 261 A, the unsafe side
    # for a fuse's breaking capacity
    r = analyze(load(CHAPEL), QUICK)
    (f,) = [f for f in r.findings if f.code == "GC211" and f.elements[0].startswith("pa_amp")]
    assert f.figures["short_circuit_a"] == pytest.approx(291.0, rel=0.005)
    # with the second leg gone (his probe) the one leg is all there is
    probe = analyze(load(FIELD / "variants" / "ring-probe" / "chapel.gplan"), QUICK)
    (g,) = [f for f in probe.findings if f.code == "GC211" and f.elements[0].startswith("pa_amp")]
    assert g.figures["short_circuit_a"] == pytest.approx(261.0, rel=0.005)


def test_his_tt_figures_and_the_rcd_warning():
    # his hand figures: 1.42 A through the 160 Ω electrode, 228 V touch voltage, the RCD in 0.04 s;
    # the 100 mA RCD a warning beside 30 mA for socket outlets (GC225), not a disconnection failure
    r = analyze(load(CHAPEL), QUICK)
    codes = {f.code: f.severity for f in r.findings}
    assert codes.get("GC225") == "warning" and "GC208" not in codes
    own = analyze(load(FIELD / "chapel-amp.gplan"), QUICK)
    part = next(p for p in own.safety.parts if p.part == "deck")
    assert part.fault_current == pytest.approx(1.42, rel=0.01)
    assert part.touch_voltage == pytest.approx(228.0, rel=0.01)
    assert part.device == "rcd" and part.clear_time == pytest.approx(0.04)


def test_his_fused_plug_lets_a_1_mm2_earth_lead_pass():
    # without the plug's fuse the ring's 32 A breaker asks 64 A for 4 min (IEC 60950-1 Table 2E);
    # with 'plug-fuse 13 A' (his variant) 26 A for 2 min, which his 1 mm² leads pass
    plain = analyze(load(FIELD / "chapel-amp.gplan"), QUICK)
    assert any(f.code == "GC223" for f in plain.findings)
    fused = analyze(load(FIELD / "variants" / "plug-fuse" / "chapel-amp.gplan"), QUICK)
    assert [(t.current, t.duration) for t in fused.bonding.tests if t.name == "long"] == [
        (26.0, 120.0)
    ]
    assert not [f for f in fused.findings if f.code == "GC223" and "1 mm²" in f.message]


def test_the_vestrys_hum_fix_says_what_opens_the_buildings_loop():
    # his report: "fix … vestry_radial" named a building cable with no verb; the current is the
    # radial's load-induced EMF round the loop through the installation
    r = analyze(load(CHAPEL), Options())
    (f,) = [f for f in r.findings if f.code == "GC303" and f.elements[0] == "vestry"]
    assert f.fix.startswith(
        "fix the main contributors first (shares of the output's hum voltage): vestry_radial"
    )
    assert "plug the devices the loop joins into one outlet or strip" in f.fix
    # and no contributor of a rounded-away share is named
    (g,) = [f for f in r.findings if f.code == "GC303" and f.elements[0] == "pa_amp.main"]
    assert ", 0 %)" not in g.fix
