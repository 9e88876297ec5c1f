"""Listening chains worked by hand: two speakers with a room gain, and headphones rated per mW or
per V.

Every expected level below was worked by hand from the definitions (P = V²/Z; SPL = sensitivity +
10·log10(P/1 W) − 20·log10(d/1 m); coherent speakers +20·log10(N); headphones rated per mW or per
V, IEC 60268-7) and is written out as a number; the threshold of hearing at 100 Hz is ISO
226:2003's 26.5 dB (tests/reference/hearing.toml)."""

import math

import pytest

from groundcheck import load_text
from groundcheck.analysis import analyze
from groundcheck.model.records import Listening
from groundcheck.physics.hearing import headphone_spl, speakers_gain, spl_of


def test_two_speakers_and_room_gain_worked_by_hand():
    # 100 µV at the output, +26 dB to the speaker: 1.9953 mV; P = V²/8 Ω = 4.976e-7 W = −63.031 dB
    # re 1 W; 88 dB/W/m → 24.969 dB SPL at 1 m, −9.542 dB at 3 m → 15.427; two speakers +6.021 →
    # 21.448; room +3 → 24.448
    one = Listening(amp_gain=26.0, sensitivity=88.0, impedance=8.0, distance=3.0)
    assert spl_of(1e-4, one) == pytest.approx(15.4267, abs=1e-3)
    two = Listening(
        amp_gain=26.0, sensitivity=88.0, impedance=8.0, distance=3.0, speakers=2, room_gain=3.0
    )
    assert spl_of(1e-4, two) == pytest.approx(24.4473, abs=1e-3)
    assert speakers_gain(2) == pytest.approx(6.0206, abs=1e-4)


def test_headphones_worked_by_hand():
    # 100 µV into 32 Ω: 3.125e-10 W = 3.125e-7 mW = −65.051 dB re 1 mW; 100 dB/mW → 34.949 dB SPL
    assert headphone_spl(1e-4, 100.0, "mW", 32.0) == pytest.approx(34.9485, abs=1e-3)
    # into 300 Ω: 3.333e-11 W → −74.771 dB re 1 mW → 25.229 dB SPL
    assert headphone_spl(1e-4, 100.0, "mW", 300.0) == pytest.approx(25.2288, abs=1e-3)
    # rated 110 dB/V: 20·log10(100 µV / 1 V) = −80 dB → 30 dB SPL
    assert headphone_spl(1e-4, 110.0, "V", 32.0) == pytest.approx(30.0, abs=1e-9)


PLAN = """plan "Headphone amplifier, listening check (trial)"
listening output 1 V, {chain}
metal deck: aluminium 2 mm, 200 x 120 mm
point star: star, at 100,60 on deck
point k: pad, at 150,60 on deck
point res_neg: cap, at 40,60 on deck
point ct: centre-tap, at 20,60 on deck
wire ct_lead: ct to star, 90 mm, 0.5 mm2, return
wire sup_gnd: res_neg to k, 110 mm, 0.2 mm2, return
wire k_gnd: k to star, 50 mm, 0.5 mm2, signal
stage v1: star to k, gain 20 dB, channel phones
rectifier hv: res_neg to ct, full-wave, secondary 30 V, winding 2 ohm, reservoir 2200 uF, \
load 200 mA
"""


@pytest.mark.parametrize(
    "chain",
    [
        "headphones 100 dB per mW, impedance 32 ohm",
        "headphones 110 dB per V",
        "speaker 88 dB, distance 3 m, speakers 2, room-gain 3 dB",
    ],
)
def test_the_hum_budget_uses_the_stated_chain(chain):
    r = analyze(load_text(PLAN.format(chain=chain), "phones.gplan"))
    h = r.hum.channels["phones"]
    row = next(x for x in h.spectrum if x.frequency == 100.0)
    v = row.volts
    assert v > 0 and h.audible is not None
    # the level at the ear from the output voltage, by the definitions written out here (not
    # groundcheck's own functions): per mW, 100 + 10·log10(v²/32 Ω / 1 mW); per V, 110 + 20·log10(v
    # / 1 V); speakers, 88 dB/W/m + 10·log10(v²/8 Ω / 1 W) − 20·log10(3 m / 1 m) + 20·log10(2) (two
    # coherent) + 3 dB room gain
    if "per mW" in chain:
        expected = 100.0 + 10 * math.log10(v * v / 32.0 / 1e-3)
    elif "per V" in chain:
        expected = 110.0 + 20 * math.log10(v)
    else:
        expected = (
            88.0 + 10 * math.log10(v * v / 8.0) - 20 * math.log10(3.0) + 20 * math.log10(2) + 3.0
        )
    assert row.spl == pytest.approx(expected, abs=0.01)
    assert row.margin == pytest.approx(expected - 26.5, abs=0.01)


def test_a_chain_with_both_speaker_and_headphones_is_refused():
    from groundcheck.core.errors import PlanErrors

    with pytest.raises(PlanErrors) as e:
        load_text(PLAN.format(chain="speaker 88 dB, headphones 100 dB per mW"), "x.gplan")
    assert "both a speaker and headphones" in str(e.value.errors[0])


def test_background_noise_masks_hum_below_it():
    # a room with 40 dB SPL of noise in each third-octave band: a tone is heard only above 40 − 4 =
    # 36 dB SPL (the critical ratio, from memory) where the quiet threshold is lower (26.5 dB at
    # 100 Hz, ISO 226), and above the quiet threshold where that is higher (44 dB at 50 Hz)
    quiet = analyze(
        load_text(PLAN.format(chain="headphones 100 dB per mW, impedance 32 ohm"), "q.gplan")
    )
    noisy = analyze(
        load_text(
            PLAN.format(chain="headphones 100 dB per mW, impedance 32 ohm, background 40 dB"),
            "n.gplan",
        )
    )
    for q, n in zip(quiet.hum.channels["phones"].spectrum, noisy.hum.channels["phones"].spectrum):
        if q.threshold is not None:
            assert n.threshold == pytest.approx(max(q.threshold, 36.0), abs=1e-9)
            assert n.margin == pytest.approx(n.spl - n.threshold, abs=0.011)
