"""An outside builder's stereo valve line preamplifier on a printed board with a ground plane
(written as a thin copper part, since the language has no word for a plane), its heaters from a
class II switch-mode adapter through a DC socket on the rear panel (tests/field/pcb-preamp-adapter,
copied as written), with a bought power amplifier.

His verdict: the bridge's negative bolted to the plane 120 mm from the reservoir's sends the
charging current across the plane under the input stages (the audible hum), and the first fix is a
wire of its own from the bridge negative to the reservoir negative with the bridge taken off the
plane: −85.8 → −99.1 dBV (left) and 20 dB less (right) in his compare; never touch the protective
earth or the bought amplifier."""

from pathlib import Path

from groundcheck import load
from groundcheck.advice.repair import suggest
from groundcheck.analysis import Options, analyze

FIELD = Path(__file__).parent / "field" / "pcb-preamp-adapter"
PRE = FIELD / "preamp.gplan"


def test_the_charging_current_across_the_plane_is_found_and_his_first_fix_comes_first():
    r = analyze(load(PRE), Options(max_frequency=1000.0))
    shared = [f for f in r.findings if f.code == "GC102" and f.elements[0] == "ht"]
    assert shared and all("gplane" in f.elements for f in shared)
    _, evs = suggest(
        load(PRE), PRE.read_text(), Options(max_frequency=1000.0), FIELD.resolve(), PRE.resolve()
    )
    good = [e for e in evs if not e.rejected]
    first = good[0]
    assert first.candidate.action == "join" and "j_br out" in first.candidate.title
    assert first.hum_change_db["left"] < -12 and first.hum_change_db["right"] < -18
    assert not [e for e in good if e.candidate.touches_protective]
