"""The outside builder's valve bass head on a TT supply, with its rehearsal room
(tests/field/bass-head-tt: the plans as written, the verdict written before the analysis ran).

Hand figures from the verdict (IEC 60364-4-41 411.5): the fault loop is 300 Ω electrode + 1 Ω
supply + 0.05 Ω fuse + 2 × 0.222 Ω circuit + 2 × 0.070 Ω cord + 0.002 Ω ≈ 301.6 Ω, so a
line-to-chassis fault draws 230 / 301.6 = 0.7625 A (25 × the RCD's 30 mA: it opens within 40 ms;
IEC 61008-1, from memory) and the chassis stands at about 229 V until it does."""

from pathlib import Path

import pytest

from groundcheck import load
from groundcheck.analysis import Options, analyze

FIELD = Path(__file__).resolve().parent / "field" / "bass-head-tt"


@pytest.fixture(scope="module")
def head():
    return analyze(load(FIELD / "bass-head.gplan"), Options(hum=False))


def test_the_reservoir_return_on_the_preamp_bus_is_found(head):
    # must find 1: the HT charging current in the bus the phase inverter reads
    shared = [f for f in head.findings if f.code == "GC102" and f.severity == "fault"]
    assert any(f.elements[:2] == ("hv", "pi") for f in shared), [f.elements for f in shared]


def test_the_tt_fault_is_cleared_by_the_rcd_alone_as_worked_by_hand(head):
    # must find 3: 0.7625 A, 229 V, the RCD in 40 ms (the fuse cannot)
    for part in head.safety.parts:
        assert part.fault_current == pytest.approx(0.7625, rel=2e-3)
        assert part.touch_voltage == pytest.approx(229.0, rel=2e-3)
        assert part.device == "rcd" and part.clear_time == pytest.approx(0.04)
    assert not [f for f in head.findings if f.code in ("GC208", "GC220", "GC221")]


def test_the_di_pin_1_on_the_audio_ground_is_found():
    # must find 2: the link's shield current crosses the preamp bus
    room = analyze(load(FIELD / "room.gplan"), Options(hum=False))
    assert any(f.code == "GC113" and "di_link" in f.elements for f in room.findings)


def test_the_head_written_for_tn_s_is_a_danger_in_this_tt_room(tmp_path):
    # the same head with its mains written as a builder in a TN-S town would (no system, no
    # electrode, no RCD), placed in the room with the building's electrode: 0.7625 A cannot open
    # the 4 A fuse and nothing else disconnects (the room plan given its electrode only)
    text = (FIELD / "bass-head.gplan").read_text()
    town = text.replace("system TT, electrode 300 ohm, rcd 30 mA, ", "")
    assert town != text
    (tmp_path / "bass-head.gplan").write_text(town)
    room = (FIELD / "room.gplan").read_text()
    (tmp_path / "room.gplan").write_text(
        room.replace("system TT\n", "system TT, electrode 300 ohm\n")
    )
    r = analyze(load(tmp_path / "room.gplan"), Options(hum=False))
    dangers = [f for f in r.findings if f.code == "GC208" and f.severity == "danger"]
    assert dangers and all(f.elements[0].startswith("amp.") for f in dangers)
    assert dangers[0].figures["fault_current_a"] == pytest.approx(0.7625, rel=3e-3)
