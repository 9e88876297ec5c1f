"""An outside electrician's garden studio (tests/field/garden-studio-tt, copied as written): an
outbuilding made TT on a 650 Ω rod behind a 100 mA RCD, his valve guitar amp (its protective
earth under a transformer bolt, a valve rectifier whose filament winding names its rectifier) and
headphone amp (a glass fuse, on a 30 m 0.75 mm² reel) with plans of their own, a bought interface
and monitors, the right monitor on a two-pin adaptor. His verdict: the rod times the RCD (65 V)
is a danger at the studio's supply; the broken earth; the glass fuse against some 166 A; the earth
under the bolt; the first fix a 30 mA RCD on the sockets, then the rod under 200 Ω; never a lift
on the monitor's screen, never a larger RCD or fuse. (The plan as written once failed to load:
the rectifier filament's 'rectifier ht' lost its device's prefix.)"""

from pathlib import Path

import pytest

from groundcheck import load
from groundcheck.analysis import Options, analyze

from fieldadvice import GROUP, advised

FIELD = Path(__file__).parent / "field" / "garden-studio-tt"
STUDIO = FIELD / "studio-original.gplan"

pytestmark = pytest.mark.xdist_group(GROUP)


def test_the_studio_loads_as_written_and_its_dangers_are_found():
    r = analyze(load(STUDIO), Options(hum=False))
    danger = {(f.code, f.elements[0]) for f in r.findings if f.severity == "danger"}
    assert ("GC220", "supply") in danger  # 650 Ω × 100 mA = 65 V > 50 V, at the studio's line
    assert ("GC215", "monR") in danger  # the two-pin adaptor
    assert any(code == "GC211" and el.startswith("hpa.") for code, el in danger)
    own = [f for f in r.findings if f.code == "GC202" and f.elements[0].startswith("gtr.")]
    assert own and own[0].severity in ("fault", "danger")
    (supply,) = [f for f in r.findings if f.code == "GC220" and f.elements == ("supply",)]
    assert supply.figures["electrode_times_rcd_v"] == pytest.approx(65.0)


def test_the_first_fix_is_a_30_ma_rcd_and_nothing_unsafe_is_offered():
    a = advised("garden-studio-tt/studio-original.gplan")
    useful = [e for e in a.evs if not e.rejected]
    first = useful[0].candidate
    assert first.action == "rcd" and "30 mA" in first.title, first.title
    electrode = [e.candidate for e in useful if e.candidate.action == "electrode"]
    assert electrode and "at most 200 Ω" in electrode[0].title
    offered = useful + list(a.chosen)
    titles = [e.candidate.title for e in offered]
    assert not [t for t in titles if "lift" in t and "protective earth stays" not in t]
    assert not [t for t in titles if "rcd 300 mA" in t or "rcd 500 mA" in t]
    assert any(t.startswith("plug monR in at") for t in titles)
