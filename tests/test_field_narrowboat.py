"""An outside builder's steel canal boat on a marina shore hook-up (tests/field/narrowboat-shore,
copied as written, his variants in variants/): a TT pedestal with a 30 mA RCD, a 25 m shore lead,
a galvanic isolator in the shore earth (written as a lift network with diodes: the language has no
word of its own for it), the hull bonded to the consumer unit's earth bar, a push-pull valve
integrated amplifier of his own (its earth on a transformer foot bolt, a base plate on painted
screws, a glass fuse, the reservoir's return on the input bus), a class II streamer.

His verdict: the isolator carries a fault's current (the boat's earth is not broken), the amp's own
earth faults, the reservoir's return first among the hum; never the shore earth taken off."""

from pathlib import Path

import pytest

from groundcheck import load
from groundcheck.analysis import Options, analyze

FIELD = Path(__file__).parent / "field" / "narrowboat-shore"
BOAT = FIELD / "narrowboat.gplan"
QUICK = Options(hum=False)


def test_the_galvanic_isolator_is_named_and_the_fault_loop_runs_through_it():
    r = analyze(load(BOAT), QUICK)
    (gc215,) = [f for f in r.findings if f.code == "GC215"]
    # a warning naming the isolator, not "broken" with nothing named
    assert gc215.severity == "warning" and "galv_iso" in gc215.message
    assert "never take the earth off" in gc215.fix
    amp = next(d for d in r.device_earths if d.device == "amp")
    assert amp.through == ("galv_iso",)
    # his hand figures (verdict.md): 3.72 A on the TT loop, 225 V, the RCD within 0.04 s
    assert amp.fault.fault_current == pytest.approx(3.7, rel=0.03)
    assert amp.fault.touch_voltage == pytest.approx(225, rel=0.01)
    assert amp.fault.clear_time <= 0.04
    # the amp's own checks on the boat's supply are made (the long bonding test at the shore
    # breaker), as they are with the isolator replaced by a plain link
    assert any(
        f.code == "GC223" and f.elements[0] == "amp.pe_lead" and "long bonding test" in f.message
        for f in r.findings
    )
