"""Choke-input supplies and split ± rails from one centre-tapped winding against ngspice
transient analyses of the same circuits (an independent general-purpose circuit simulator, its
diode the same Shockley law: IS, N, RS at 27 °C): every harmonic of the current returned through
the ground up to 2 kHz within 1 %."""

import math
import subprocess
import tempfile
from pathlib import Path

import numpy as np
import pytest

from groundcheck import load_text
from groundcheck.model.records import Rectifier
from groundcheck.physics.rectifier import harmonic_phasors, simulate
from groundcheck.physics.rectifier_exact import SHOCKLEY_IS, SHOCKLEY_N, SHOCKLEY_RS
from groundcheck.physics.sources import plan_sources
from groundcheck.renderers.json_results import rectifier_json

from helpers import needs_ngspice

PERIODS = 2  # mains periods read from the end of each ngspice run
STEP = 2e-6  # ngspice's step (and its output's spacing), s


def _ngspice(circuit: str, stop: float, probes: str) -> np.ndarray:
    """Run a transient from the stated initial conditions to ``stop``; the rows of its last
    PERIODS mains periods (50 Hz), STEP apart, of the vectors ``probes``."""
    start = stop - PERIODS / 50
    text = (
        f"supply\n{circuit}\n.model dmod D(IS={SHOCKLEY_IS} N={SHOCKLEY_N} RS={SHOCKLEY_RS})\n"
        f".options temp=27\n.control\ntran {STEP} {stop} {start} {STEP} uic\nlinearize\n"
        f"wrdata OUT {probes}\n.endc\n.end\n"
    )
    with tempfile.TemporaryDirectory() as d:
        out, cir = Path(d) / "r.out", Path(d) / "r.cir"
        cir.write_text(text.replace("OUT", str(out)))
        subprocess.run(["ngspice", "-b", str(cir)], capture_output=True, timeout=300, check=False)
        data = np.loadtxt(out)
    return data[-int(round(PERIODS / 50 / STEP)) :]


def _lines(samples: np.ndarray, top: int) -> np.ndarray:
    """The rms magnitude of harmonics 0 … top of the 50 Hz mains in PERIODS periods of samples
    (the mean at 0)."""
    X = np.fft.rfft(samples)[::PERIODS][: top + 1] / len(samples)
    return np.abs(np.concatenate([[X[0]], math.sqrt(2) * X[1:]]))


def _agree(ours: np.ndarray, theirs: np.ndarray, floor: float, every: int = 2) -> float:
    """The largest relative difference over the even harmonics (``every`` 1: all of them) to
    2 kHz whose line is above ``floor`` of ngspice's largest (each checked within 1 %)."""
    worst = 0.0
    for k in range(every, 41, every):
        if theirs[k] > floor * theirs[1:].max():
            assert ours[k] == pytest.approx(theirs[k], rel=0.01), (k * 50, ours[k], theirs[k])
            worst = max(worst, abs(ours[k] / theirs[k] - 1))
    return worst


def _choke_input(
    topology: str, load: float, v0: float, stop: float
) -> tuple[np.ndarray, np.ndarray]:
    """ngspice's choke-input supply: a 300 V rms secondary (full-wave: a centre-tapped one, two
    424.26 V peak sines in antiphase, 50 Ω in each half-winding and two Shockley diodes; bridge:
    one winding with 50 Ω, four diodes, 1 GΩ from it to ground so that it never floats) into a
    10 H choke with 150 Ω of winding resistance, a 47 µF reservoir and a constant-current load,
    started at the reservoir voltage v0 and the load's current in the choke, run to ``stop``; the
    reservoir voltage and the choke's current (the current returned to the rectifiers) over its
    last periods."""
    vpk = 300 * math.sqrt(2)
    if topology == "full-wave":
        rectifiers = (
            f"V1 a 0 SIN(0 {vpk} 50)\nV2 0 b SIN(0 {vpk} 50)\nR1 a a2 50\nR2 b b2 50\n"
            "D1 a2 k dmod\nD2 b2 k dmod\n"
        )
    else:
        rectifiers = (
            f"V1 p q SIN(0 {vpk} 50)\nR1 p p2 50\nRF q 0 1e9\n"
            "D1 p2 k dmod\nD2 q k dmod\nD3 0 p2 dmod\nD4 0 q dmod\n"
        )
    circuit = (
        f"{rectifiers}L1 k m 10 ic={load}\nRL m out 150\nC1 out 0 47u ic={v0}\nI1 out 0 DC {load}"
    )
    data = _ngspice(circuit, stop, "v(out) i(L1)")
    return data[:, 1], data[:, 3]


def _rectifier(topology: str, load: float) -> Rectifier:
    return Rectifier(
        "r",
        "a",
        "b",
        topology,
        300,
        50,
        0.7,
        47e-6,
        load_current=load,
        diode_law="shockley",
        choke_inductance=10.0,
        choke_resistance=150.0,
    )


@needs_ngspice
@pytest.mark.parametrize(
    "topology,load,v0,stop,continuous",
    [
        # 100 mA: about 249 V over 100 mA is 2.49 kΩ, L_crit = 2.49 kΩ/(3·2π·50 Hz) = 2.6 H,
        # below the 10 H choke: continuous; started at 0.9·300 V − 0.1 A·200 Ω − 0.7 V = 249 V,
        # run for 1 s (the choke and reservoir ring at 7 Hz, damped in about 0.1 s)
        ("full-wave", 0.1, 249.0, 1.0, True),
        # 15 mA: about 306 V over 15 mA is 20 kΩ, L_crit = 22 H, above it: the current stops
        # each half-cycle; started at 306 V (read off a first, longer run)
        ("full-wave", 0.015, 306.0, 0.6, False),
        # the same as a bridge (two diodes in each path, one winding; started at 248 V)
        ("bridge", 0.1, 248.0, 1.0, True),
    ],
)
def test_choke_input_against_ngspice(topology, load, v0, stop, continuous):
    ours = simulate(_rectifier(topology, load), 50)
    v, i = _choke_input(topology, load, v0, stop)
    assert ours.dc_voltage == pytest.approx(v.mean(), rel=1e-3)
    worst = _agree(np.abs(harmonic_phasors(ours.current, 40)), _lines(i, 40), 1e-5)
    assert worst < 0.01
    print(f"choke input, {topology}, {load} A: worst line {worst:.2e}")
    # the textbook condition worked by hand from ngspice's own mean voltage: L_crit = R/(3ω)
    # (Millman and Halkias, Integrated Electronics, 1972, the L-section filter; from memory)
    assert ours.critical_inductance == pytest.approx(
        v.mean() / load / (3 * 2 * math.pi * 50), 1e-3
    )
    assert ours.continuous is continuous and bool(i.min() > 0.5 * load) is continuous
    figures = rectifier_json(ours)
    assert figures["continuous_conduction"] is continuous and "critical_inductance_h" in figures


#: a class AB power amplifier's ± rails: one 2 × 35 V centre-tapped winding, 0.3 Ω in each half,
#: four Shockley diodes (a bridge across the whole winding), two 4700 µF reservoirs meeting at
#: res, wired to the centre tap; the positive rail loaded with 1.5 A, the negative with 1 A
SPLIT = """plan "split"
mains 230 V 50 Hz
point res: pad
point ct: centre-tap
wire w: res to ct, 50 mm, 1 mm2
rectifier pos: res to ct, full-wave, secondary 35 V, winding 0.3 ohm, diode shockley, \
reservoir 4700 uF, load 1.5 A
rectifier neg: res to ct, full-wave, negative, secondary 35 V, winding 0.3 ohm, \
diode shockley, reservoir 4700 uF, load 1 A
"""


def _returned(text: str) -> tuple[dict, np.ndarray]:
    """The plan's rectifiers' steady states and the magnitudes of harmonics 0 … 40 of the current
    from res to ct: every source of the plan (both rails'), added as phasors."""
    plan = load_text(text, "split.gplan")
    results = {r.name: simulate(r, plan.frequency) for r in plan.rectifiers}
    back = {}
    for s in plan_sources(plan, results, 2000):
        assert (s.a, s.b) == ("res", "ct")
        for f, x in s.parts.items():
            back[f] = back.get(f, 0) + x
    return results, np.array([abs(back.get(k * 50.0, 0)) for k in range(41)])


@needs_ngspice
def test_split_rails_centre_tap_return_against_ngspice():
    results, ours = _returned(SPLIT)
    vpk = 35 * math.sqrt(2)
    circuit = (
        f"V1 a ct SIN(0 {vpk} 50)\nV2 ct b SIN(0 {vpk} 50)\nVct ct 0 DC 0\n"
        "R1 a a2 0.3\nR2 b b2 0.3\nD1 a2 pos dmod\nD2 b2 pos dmod\nD3 neg a2 dmod\n"
        "D4 neg b2 dmod\nC1 pos 0 4700u ic=45.1\nC2 0 neg 4700u ic=46\n"
        "I1 pos 0 DC 1.5\nI2 0 neg DC 1.0"
    )
    data = _ngspice(circuit, 0.5, "v(pos) v(neg) i(Vct)")
    theirs = _lines(-data[:, 5], 40)  # into the centre tap from the ground
    assert results["pos"].dc_voltage == pytest.approx(data[:, 1].mean(), rel=1e-3)
    assert results["neg"].dc_voltage == pytest.approx(data[:, 3].mean(), rel=1e-3)
    assert ours[0] == pytest.approx(0.5, rel=1e-3) and theirs[0] == pytest.approx(0.5, rel=1e-3)
    worst = _agree(ours, theirs, 1e-3)
    print(f"split rails: worst line {worst:.2e}")
    assert worst < 0.01
    # the rails' pulses come at the same instants and return in opposite directions: each
    # rail's own 100 Hz line is over twice the centre tap's
    own = abs(harmonic_phasors(results["pos"].current, 2)[2])
    assert own > 2 * theirs[2]


@needs_ngspice
def test_split_half_wave_rails_against_ngspice():
    # a bias supply's ± half-wave rails from one 35 V winding (0.5 Ω) to its grounded end: the
    # negative rail charges half a period after the positive one, so the return carries the odd
    # harmonics of both; every harmonic to 2 kHz within 1 % of ngspice
    text = (
        SPLIT.split("rectifier pos")[0]
        + "rectifier pos: res to ct, half-wave, secondary 35 V, winding 0.5 ohm, diode shockley, "
        "reservoir 4700 uF, load 0.5 A\n"
        "rectifier neg: res to ct, half-wave, negative, secondary 35 V, winding 0.5 ohm, "
        "diode shockley, reservoir 4700 uF, load 0.3 A\n"
    )
    results, ours = _returned(text)
    circuit = (
        f"V1 a ct SIN(0 {35 * math.sqrt(2)} 50)\nVct ct 0 DC 0\nR1 a a2 0.5\n"
        "D1 a2 pos dmod\nD2 neg a2 dmod\nC1 pos 0 4700u ic=44\nC2 0 neg 4700u ic=45\n"
        "I1 pos 0 DC 0.5\nI2 0 neg DC 0.3"
    )
    data = _ngspice(circuit, 0.5, "v(pos) v(neg) i(Vct)")
    theirs = _lines(-data[:, 5], 40)
    assert results["neg"].dc_voltage == pytest.approx(data[:, 3].mean(), rel=1e-3)
    assert ours[0] == pytest.approx(0.2, rel=1e-3) and theirs[0] == pytest.approx(0.2, rel=1e-3)
    worst = _agree(ours, theirs, 1e-3, every=1)
    print(f"half-wave split rails: worst line {worst:.2e}")
    assert worst < 0.01
