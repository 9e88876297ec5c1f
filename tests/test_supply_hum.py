"""What a hum figure covers, and a supply rail's ripple in it (issue 32, item 6).

A stage that states the rectifier feeding it (``fed from hv, rejection 40 dB``) adds the rail's
ripple less its supply rejection, times its gain, to its channel's hum. The expected figures are
worked by hand from ngspice's reservoir voltage (an independent circuit simulator, the same
circuit: a centre-tapped full-wave rectifier, 250 V per half-winding, 120 Ω, Shockley diodes,
47 µF, 25 mA): its 100 Hz line by FFT, less the rejection in dB, plus the stage's gain in dB.
The share's phase through the stage is unknown, so it adds in power with the ground-borne hum
(checked below as the square root of the sum of squares)."""

import json
import math
from pathlib import Path

import numpy as np
import pytest

from groundcheck import load_text, render
from groundcheck.analysis import analyze

from helpers import needs_ngspice
from test_supply_regulators import F, PERIODS, _ngspice

ROOT = Path(__file__).resolve().parent.parent
GROUND = """plan "fed stage (trial)"
listening output 1 V
metal deck: aluminium 2 mm, 200 x 120 mm
point star: star, at 100,60 on deck
point k: pad, at 150,60 on deck
point in_gnd: sleeve, at 190,60 on deck
point res_neg: cap, at 40,60 on deck
point ct: centre-tap, at 20,60 on deck
wire ct_lead: ct to res_neg, 20 mm, 0.5 mm2, return
wire sup_gnd: res_neg to star, 60 mm, 0.5 mm2, return
wire k_gnd: k to star, 50 mm, 0.3 mm2, signal
wire in_lead: in_gnd to k, 40 mm, 0.3 mm2, signal
"""
RECTIFIER = """rectifier hv: res_neg to ct, full-wave, secondary 250 V, winding 120 ohm,
    diode shockley, reservoir 47 uF, load 25 mA{extra}
"""


def _channel(stage: str, extra: str = "", ground: str = GROUND) -> dict:
    text = ground + stage + "\n" + RECTIFIER.format(extra=extra)
    result = analyze(load_text(text, "fed.gplan"))
    return json.loads(render(result, "json"))["hum"]["channels"]["main"]


def _at(channel: dict, hz: float) -> float:
    return next(r["volts"] for r in channel["spectrum"] if r["frequency_hz"] == hz)


@pytest.fixture(scope="module")
def reservoir():
    """ngspice's reservoir voltage over PERIODS periods (the rectifier above, 25 mA drawn)."""
    v, _, _ = _ngspice("I1 out ret DC 0.025\nVret ret 0 DC 0")
    return v


def _line_100hz(v: np.ndarray) -> float:
    """The rms of the reservoir's 100 Hz ripple line (harmonic 2 of 50 Hz: bin 2·PERIODS)."""
    return abs(np.fft.rfft(v)[2 * PERIODS]) * math.sqrt(2) / len(v)


@needs_ngspice
def test_a_fed_stage_adds_its_rails_ripple_less_its_rejection(reservoir):
    # the stage reads in_gnd to star, which the charging current never crosses (it flows over
    # ct_lead only): the channel's 100 Hz hum is the supply's share alone. By hand: ngspice's
    # 100 Hz ripple line × 10^((30 dB − 40 dB)/20)
    ch = _channel(
        "stage v1: in_gnd to star, gain 30 dB, channel main, fed from hv, rejection 40 dB"
    )
    expected = _line_100hz(reservoir) * 10 ** ((30 - 40) / 20)
    assert F == 50.0
    assert _at(ch, 100.0) == pytest.approx(expected, rel=0.01)
    assert ch["covers"]["supply_ripple"] == "included"
    assert [c["kind"] for c in ch["contributors"]] == ["supply"]


@needs_ngspice
def test_a_regulated_rail_carries_the_reservoirs_ripple_less_both_rejections(reservoir):
    # a series regulator (60 dB) after the same reservoir: by hand, the 100 Hz line × 10^(−60/20)
    # × 10^((30 − 20)/20)
    ch = _channel(
        "stage v1: in_gnd to star, gain 30 dB, channel main, fed from hv, rejection 20 dB",
        ", regulator series 250 V to res_neg, rejection 60 dB",
    )
    expected = _line_100hz(reservoir) * 10 ** (-60 / 20) * 10 ** ((30 - 20) / 20)
    assert _at(ch, 100.0) == pytest.approx(expected, rel=0.01)
    assert ch["covers"]["fed"][0]["rail"] == "regulated output"


@needs_ngspice
def test_the_supply_share_adds_in_power_with_the_ground_borne_hum(reservoir):
    # a stage across ct_lead (ct to res_neg), which the charging current crosses: ground-borne
    # hum at 100 Hz, G. With the supply stated the 100 Hz figure is √(G² + S²), S worked by hand
    # as above
    stage = "stage v1: ct to res_neg, gain 30 dB, channel main"
    ground_only = _at(_channel(stage), 100.0)
    fed = _at(_channel(stage + ", fed from hv, rejection 80 dB"), 100.0)
    supply = _line_100hz(reservoir) * 10 ** ((30 - 80) / 20)
    assert ground_only > 0.05 * supply  # both parts matter
    assert fed == pytest.approx(math.hypot(ground_only, supply), rel=0.01)


@needs_ngspice
def test_without_a_stated_supply_the_verdict_says_so_with_the_rectifier_tables_ripple(reservoir):
    result = analyze(
        load_text(
            GROUND
            + "stage v1: in_gnd to star, gain 30 dB, channel main\n"
            + RECTIFIER.format(extra=""),
            "fed.gplan",
        )
    )
    doc = json.loads(render(result, "json"))
    covers = doc["hum"]["channels"]["main"]["covers"]
    assert covers["carried_by"] == ["ground system", "stray fields"]
    assert covers["supply_ripple"] == "not included"
    left = covers["rails_left_out"][0]
    assert left["rectifier"] == "hv" and left["rail"] == "reservoir"
    # the ripple the rectifier table gives: ngspice's peak-to-peak within 1 %
    assert left["ripple_pp_v"] == pytest.approx(np.ptp(reservoir), rel=0.01)
    assert left["ripple_pp_v"] == pytest.approx(doc["rectifiers"][0]["ripple_pp_v"], abs=1e-5)
    for fmt in ("text", "html"):
        out = render(result, fmt)
        assert "the ground system and stray fields; supply ripple is not included" in out
        assert "hv " + format(left["ripple_pp_v"], ".4g") + " Vpp on its reservoir" in out


def test_the_documents_follow_the_schema():
    # a fed stage on a regulated rail and one not fed: contributors of kind supply, covers
    import jsonschema

    schema = json.loads((ROOT / "docs" / "schema" / "groundcheck-result.schema.json").read_text())
    text = (
        GROUND
        + "stage v1: in_gnd to star, gain 30 dB, channel main, fed from hv, rejection 20 dB\n"
        + "stage v2: k to star, gain 10 dB, channel main\n"
        + RECTIFIER.format(extra=", regulator series 250 V to res_neg")
    )
    doc = json.loads(render(analyze(load_text(text, "fed.gplan")), "json"))
    jsonschema.validate(doc, schema, cls=jsonschema.Draft202012Validator)
    covers = doc["hum"]["channels"]["main"]["covers"]
    assert covers["supply_ripple"] == "partly included" and covers["not_fed"] == ["v2"]


def test_a_stage_fed_from_no_rectifier_is_a_located_error():
    from groundcheck.core.errors import PlanErrors

    with pytest.raises(PlanErrors) as err:
        _channel("stage v1: in_gnd to star, gain 30 dB, channel main, fed from hvv")
    assert "no rectifier" in str(err.value) and "did you mean 'hv'" in str(err.value)
    with pytest.raises(PlanErrors) as err:
        _channel("stage v1: in_gnd to star, gain 30 dB, channel main, rejection 20 dB")
    assert "needs its supply" in str(err.value)


def test_a_fed_stages_supply_ripple_is_no_loop_pickup():
    # the supply share is not carried by a loop: no GC302 (loop-pickup) names it (whether the
    # channel is audible with it is GC303's, with a listening verdict)
    text = (
        GROUND
        + "stage v1: in_gnd to star, gain 30 dB, channel main, fed from hv, rejection 10 dB\n"
        + RECTIFIER.format(extra="")
    )
    result = analyze(load_text(text, "fed.gplan"))
    kinds = [c.kind for c in result.hum.channels["main"].contributors]
    assert kinds == ["supply"]  # the channel's whole hum, -70 dBV or so: far above the level
    assert not [f for f in result.findings if f.code == "GC302"]
