"""Regulators after a rectifier's reservoir (series and shunt) against ngspice: the reservoir's
charging current harmonic by harmonic to 2 kHz within 1 %, and a shunt regulator's returned
current likewise. In ngspice each regulator is behavioural: a series regulator is a constant
current drawn from the reservoir (its pass element passes the load current whatever the input),
a shunt regulator its feed resistor into a DC source that holds the output (the shunt element).
ngspice is an independent general-purpose circuit simulator; its diodes use the same law as
``diode shockley`` (IS, N, RS at 27 °C)."""

import math
import subprocess
import tempfile
from pathlib import Path

import numpy as np
import pytest

from groundcheck import load_text
from groundcheck.analysis import analyze
from groundcheck.core.errors import PlanErrors
from groundcheck.model.records import Rectifier
from groundcheck.physics.rectifier import harmonic_phasors, simulate
from groundcheck.physics.rectifier_exact import SHOCKLEY_IS, SHOCKLEY_N, SHOCKLEY_RS
from groundcheck.renderers.json_results import rectifier_json

from helpers import needs_ngspice

PERIODS = 5
F = 50.0
VRMS, RW, C1 = 250.0, 120.0, 47e-6


def _ngspice(load_lines: str) -> np.ndarray:
    """A centre-tapped full-wave rectifier (Shockley diodes, 120 Ω per half-winding, 47 µF) with
    the given load on its reservoir ``out``; the last PERIODS periods of (reservoir voltage,
    charging current, current into the node ``ret`` of the load); settled after 0.8 s (a 1.6 s
    run agrees to 1e-10 in each case here, measured while writing this)."""
    vpk = VRMS * math.sqrt(2)
    text = f"""regulated rectifier
V1 a 0 SIN(0 {vpk} {F})
V2 0 b SIN(0 {vpk} {F})
R1 a a2 {RW}
R2 b b2 {RW}
D1 a2 out dmod
D2 b2 out dmod
C1 out 0 {C1}
{load_lines}
.model dmod D(IS={SHOCKLEY_IS} N={SHOCKLEY_N} RS={SHOCKLEY_RS})
.options temp=27
.control
set numdgt=12
tran 1u 0.8 {0.8 - PERIODS / F} 4u
linearize
wrdata OUT v(out) i(V1) i(V2) i(Vret)
.endc
.end
"""
    with tempfile.TemporaryDirectory() as d:
        out, cir = Path(d) / "r.out", Path(d) / "r.cir"
        cir.write_text(text.replace("OUT", str(out)))
        subprocess.run(["ngspice", "-b", str(cir)], capture_output=True, timeout=300, check=False)
        data = np.loadtxt(out)
    data = data[-int(round(PERIODS / F / 1e-6)) :]
    return data[:, 1], np.abs(data[:, 3]) + np.abs(data[:, 5]), data[:, 7]


def _lines(samples: np.ndarray) -> np.ndarray:
    """ngspice's rms lines at the mains harmonics (its PERIODS periods by FFT)."""
    return (
        np.abs(np.fft.rfft(samples)[::PERIODS][: int(2000 // F) + 1]) * math.sqrt(2) / len(samples)
    )


def _within_1pct(ours: np.ndarray, theirs: np.ndarray) -> int:
    """Every even harmonic to 2 kHz above 2 % of the second within 1 %; the lines compared."""
    mine = np.abs(harmonic_phasors(ours, len(theirs) - 1))
    n = 0
    for k in range(2, len(theirs), 2):
        if theirs[k] > 0.02 * theirs[2]:
            assert mine[k] == pytest.approx(theirs[k], rel=0.01), (k * F, mine[k], theirs[k])
            n += 1
    return n


def _rectifier(**kw) -> Rectifier:
    return Rectifier("hv", "a", "b", "full-wave", VRMS, RW, 0.0, C1, diode_law="shockley", **kw)


@needs_ngspice
def test_series_regulator_draws_its_load_current_against_ngspice():
    # a 250 V series regulator with a 25 mA load: the reservoir's load is a constant 25 mA
    r = _rectifier(
        load_current=0.025, regulator="series", regulator_voltage=250.0, regulator_point="ret"
    )
    ours = simulate(r, F)
    v, i, _ = _ngspice("I1 out ret DC 0.025\nVret ret 0 DC 0")
    assert ours.dc_voltage == pytest.approx(v.mean(), rel=0.01)
    assert _within_1pct(ours.current, _lines(i)) >= 10
    # the load's current returned through the regulator's point: 25 mA DC
    assert float(ours.return_current.mean()) == pytest.approx(0.025, rel=1e-9)
    # the output's ripple: the reservoir's peak-to-peak less the default 60 dB (a factor 1000)
    assert ours.output_ripple_pp == pytest.approx((v.max() - v.min()) / 1000, rel=0.01)


@needs_ngspice
def test_series_regulators_quiescent_current_against_ngspice():
    # the same regulator drawing 6 mA of its own beside the 25 mA load, out of its common terminal
    # into the regulator's point: in ngspice a constant 31 mA from the reservoir into 'ret'
    r = _rectifier(
        load_current=0.025,
        regulator="series",
        regulator_voltage=250.0,
        regulator_point="ret",
        regulator_quiescent=0.006,
    )
    ours = simulate(r, F)
    v, i, back = _ngspice("I1 out ret DC 0.031\nVret ret 0 DC 0")
    assert ours.dc_voltage == pytest.approx(v.mean(), rel=0.01)
    assert _within_1pct(ours.current, _lines(i)) >= 10
    assert float(ours.return_current.mean()) == pytest.approx(back.mean(), rel=1e-3)
    assert back.mean() == pytest.approx(0.031, rel=1e-3)  # the circuit's own current, by KCL


@needs_ngspice
def test_shunt_regulator_feed_current_against_ngspice():
    # a 250 V shunt regulator fed through 2 kΩ, 25 mA load: the reservoir's load is the resistor
    # to a fixed 250 V; the whole feed current returns through the regulator's point
    r = _rectifier(
        load_current=0.025,
        regulator="shunt",
        regulator_voltage=250.0,
        regulator_resistance=2000.0,
        regulator_point="ret",
        regulator_rejection=40.0,
    )
    ours = simulate(r, F)
    v, i, back = _ngspice("Rs out reg 2000\nVreg reg ret DC 250\nVret ret 0 DC 0")
    assert ours.dc_voltage == pytest.approx(v.mean(), rel=0.01)
    assert _within_1pct(ours.current, _lines(i)) >= 10
    theirs = _lines(back)
    assert float(ours.return_current.mean()) == pytest.approx(back.mean(), rel=0.01)
    assert _within_1pct(ours.return_current, theirs) >= 3


def _plan(regulator: str) -> str:
    return f"""plan "regulated supply (trial)"
listening output 1 V
metal deck: aluminium 2 mm, 200 x 120 mm
point star: star, at 100,60 on deck
point k: pad, at 150,60 on deck
point in_gnd: sleeve, at 190,60 on deck
point res_neg: cap, at 40,60 on deck
point ct: centre-tap, at 20,60 on deck
point reg_ret: pad, at 120,80 on deck
wire ct_lead: ct to res_neg, 20 mm, 0.5 mm2, return
wire sup_gnd: res_neg to star, 60 mm, 0.5 mm2, return
wire reg_gnd: reg_ret to k, 40 mm, 0.3 mm2, return
wire k_gnd: k to star, 50 mm, 0.3 mm2, signal
wire in_lead: in_gnd to k, 40 mm, 0.3 mm2, signal
stage v1: in_gnd to star, gain 30 dB, channel main
rectifier hv: res_neg to ct, full-wave, secondary 250 V, winding 120 ohm, diode shockley,
    reservoir 47 uF, load 25 mA{regulator}
"""


def test_the_regulators_return_is_a_source_through_its_point():
    # the shunt regulator's feed current leaves reg_ret and returns over reg_gnd, k_gnd and
    # sup_gnd to the reservoir's negative: a source named hv.regulator sharing k_gnd with the
    # stage; its DC is the feed current, (V_reservoir − 250 V)/2 kΩ on average
    result = analyze(load_text(_plan(", regulator shunt 250 V 2 kohm to reg_ret"), "reg.gplan"))
    rows = [row for row in result.coupling if row.source == "hv.regulator"]
    assert rows and "k_gnd" in rows[0].shared
    rect = result.hum.rectifiers[0]
    assert float(rect.return_current.mean()) == pytest.approx(
        (rect.dc_voltage - 250.0) / 2000.0, rel=1e-6
    )
    assert rectifier_json(rect)["regulated_dc_v"] == 250.0


@pytest.mark.parametrize(
    "words,message",
    [
        (", rejection 40 dB", "a ripple rejection belongs to a regulator"),
        (", regulator series 400 V to reg_ret", "cannot feed a 400 V regulator"),
        (", regulator shunt 300 V 10 kohm to reg_ret", "cannot feed a 300 V regulator"),
        (", regulator series 250 V to nowhere", "nowhere"),
        (", dropout 3 V", "a dropout belongs to a regulator"),
        (", quiescent 5 mA", "a quiescent belongs to a regulator"),
        (", regulator shunt 250 V 2 kohm to reg_ret, dropout 3 V", "a shunt regulator has no"),
        (", regulator series 250 V to reg_ret, dropout -3 V", "dropout"),
        (", regulator series 300 V to reg_ret, dropout 60 V", "cannot feed a 300 V regulator"),
    ],
)
def test_regulator_mistakes_are_located_errors(words, message):
    with pytest.raises(PlanErrors) as err:
        analyze(load_text(_plan(words), "reg.gplan"))
    assert message in str(err.value)
    assert "reg.gplan:" in str(err.value)


def test_a_series_regulator_above_the_reservoirs_trough_is_refused():
    # 250 V rms, 120 Ω, 47 µF and 25 mA: the reservoir swings between 330 and 334 V (ngspice, the
    # series case above), so a 331 V series regulator drops out at the trough
    with pytest.raises(PlanErrors) as err:
        analyze(load_text(_plan(", regulator series 331 V to reg_ret"), "reg.gplan"))
    assert "too low for its series regulator" in str(err.value)


def test_a_series_regulators_dropout_is_held_against_the_reservoirs_trough():
    # the trough of this reservoir is 330 V to the volt (ngspice, the series case above): a 320 V
    # regulator with a 5 V dropout keeps regulating; with 12 V it drops out at the trough
    ok = analyze(load_text(_plan(", regulator series 320 V to reg_ret, dropout 5 V"), "r.gplan"))
    assert rectifier_json(ok.hum.rectifiers[0])["regulated_dc_v"] == 320.0
    with pytest.raises(PlanErrors) as err:
        analyze(load_text(_plan(", regulator series 320 V to reg_ret, dropout 12 V"), "r.gplan"))
    assert "too low for its series regulator to hold 320 V and its 12 V dropout" in str(err.value)
    assert "r.gplan:" in str(err.value)


def test_a_shunt_elements_least_current_is_held_at_the_trough():
    # fed through 2 kΩ from a reservoir of 330–334 V to 250 V: at the trough (330 − 250)/2000 =
    # 40 mA; a 25 mA load leaves the shunt element 15 mA, so a 10 mA least current is met and 20 mA
    # is not (the trough from ngspice, the series case above; the feed resistor's load raises it a
    # little, which only helps the first)
    good = ", regulator shunt 250 V 2 kohm to reg_ret, quiescent 10 mA"
    assert analyze(load_text(_plan(good), "r.gplan")).hum.rectifiers
    with pytest.raises(PlanErrors) as err:
        analyze(load_text(_plan(good.replace("10 mA", "20 mA")), "r.gplan"))
    assert "too low for its shunt regulator" in str(err.value)
