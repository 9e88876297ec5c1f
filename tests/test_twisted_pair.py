"""A signal pair written ``twisted with`` runs along one line: no area between its conductors for
a field to induce in. Checked against Faraday's law worked by hand: two wires d = 10 mm apart over
L = 100 mm in a uniform 10 µT (rms) field at 50 Hz normal to the deck pick up
EMF = ω·B·L·d = 2π·50·10e-6·0.1·0.01 V = 3.1416 µV; twisted, nothing."""

import json
import math

import pytest

from groundcheck import load_text, render
from groundcheck.analysis import analyze
from groundcheck.core.errors import PlanErrors

# the field: a transformer 10 m away on the deck's plane with its moment normal to the deck; on a
# dipole's equator B = B_ref·(r_ref/r)³ normal to the plane, 10 µT at the pair's centre, and it
# changes by under 1e-4 across the pair (the cube law's curvature over ±50 mm at 10 m)
PLAN = """plan "signal pair in a uniform field (trial)"
point p1: junction, at 0,0
point p2: junction, at 100,0
point p3: junction, at 150,0
wire w1: p1 to p2, 0.3 mm2, signal
wire w2: p1 to p2, 0.3 mm2, signal, via 0,10 100,10{twist}
wire w3: p2 to p3, 0.3 mm2, signal
stage v1: p1 to p3, gain 0 dB, channel main
field t: transformer, at 50,10005, 10 uT at 10 m, axis z
"""


def _loops(twist: str = "") -> list:
    doc = json.loads(render(analyze(load_text(PLAN.format(twist=twist), "pair.gplan")), "json"))
    return doc["hum"]["loops"]


def test_an_untwisted_pair_picks_up_omega_b_l_d():
    (loop,) = _loops()
    emf = loop["sources"]["t"]["per_frequency"][0]["emf_v"]
    by_hand = 2 * math.pi * 50 * 10e-6 * 0.100 * 0.010
    assert by_hand == pytest.approx(3.1416e-6, rel=1e-4)
    assert emf == pytest.approx(by_hand, rel=5e-4)
    assert loop["area_mm2"] == pytest.approx(100 * 10)


def test_a_twisted_pair_has_no_area_and_picks_up_nothing():
    # w2 keeps its written route, but twisted with w1 (written first) it runs along w1's line
    (loop,) = _loops(", twisted with w1")
    assert loop["area_mm2"] == 0.0
    assert loop["sources"]["t"]["per_frequency"][0]["emf_v"] < 1e-15


@pytest.mark.parametrize(
    "twist,message",
    [
        (", twisted with w9", "which is no conductor"),
        (", twisted with w3", "does not join the same two points"),
    ],
)
def test_a_twist_with_no_partner_is_a_located_error(twist, message):
    with pytest.raises(PlanErrors) as err:
        analyze(load_text(PLAN.format(twist=twist), "pair.gplan"))
    assert message in str(err.value) and "pair.gplan:6:" in str(err.value)


def test_only_round_conductors_twist():
    text = PLAN.format(twist="").replace(
        "wire w3: p2 to p3, 0.3 mm2, signal", "trace w3: p2 to p3, 1 mm, twisted with w1"
    )
    with pytest.raises(PlanErrors) as err:
        analyze(load_text(text, "pair.gplan"))
    assert "only a round conductor can be twisted" in str(err.value)
