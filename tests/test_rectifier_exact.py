"""The exact rectifier model (Shockley diodes with series resistance, transformer leakage
inductance) against an ngspice transient analysis of the same circuit: DC voltage, rms charging
current and every harmonic of the charging current up to 2 kHz within 3 %.  ngspice is an
independent general-purpose circuit simulator; its diode uses the same law (IS, N, RS at 27 °C)."""

import math
import subprocess
import tempfile
from pathlib import Path

import numpy as np
import pytest

from groundcheck import load, load_text
from groundcheck.model.records import Rectifier
from groundcheck.physics.rectifier import harmonic_phasors, simulate
from groundcheck.physics.rectifier_exact import SHOCKLEY_IS, SHOCKLEY_N, SHOCKLEY_RS

from helpers import needs_ngspice

PERIODS = 5

# ngspice's transients below: output every 1 µs, its largest step 4 µs (against a 1 µs largest
# step, measured on the 250 V, 120 ohm, 47 uF, 25 mA case: the DC within 2e-9 and every even
# harmonic to 2 kHz within 0.02 %, far inside these tests' tolerances; 3.5 times faster). A
# capacitor-input supply without a filter section has settled after SETTLE seconds: the last
# periods of a 0.8 s and a 1.6 s run of each case here agree to 2.3e-6 in the mean and the rms
# of every trace (measured while writing this; the tests allow 1 % and more)
SETTLE = 0.8


def _last_periods(text: str, f: float) -> np.ndarray:
    """Run a netlist whose wrdata line writes to OUT; the rows of its last PERIODS mains periods (1
    µs steps)."""
    with tempfile.TemporaryDirectory() as d:
        out, cir = Path(d) / "r.out", Path(d) / "r.cir"
        cir.write_text(text.replace("OUT", str(out)))
        subprocess.run(["ngspice", "-b", str(cir)], capture_output=True, timeout=300, check=False)
        data = np.loadtxt(out)
    return data[-int(round(PERIODS / f / 1e-6)) :]


def _ngspice(vrms, rw, leak, c, iload, f, law):
    """Centre-tapped full-wave rectifier, each half-winding with its resistance and leakage
    inductance; the last PERIODS mains periods of the reservoir voltage and the charging current,
    sampled evenly."""
    vpk = vrms * math.sqrt(2)
    diode = (
        f"D(IS={SHOCKLEY_IS} N={SHOCKLEY_N} RS={SHOCKLEY_RS})"
        if law == "shockley"
        else "D(IS=1e-14 N=1)"
    )
    stop = SETTLE
    leak_lines = f"L1 a a1 {leak}\nL2 b b1 {leak}\n" if leak else "R5 a a1 0\nR6 b b1 0\n"
    text = f"""exact rectifier
V1 a 0 SIN(0 {vpk} {f})
V2 0 b SIN(0 {vpk} {f})
{leak_lines}R1 a1 a2 {rw}
R2 b1 b2 {rw}
D1 a2 out dmod
D2 b2 out dmod
C1 out 0 {c}
I1 out 0 DC {iload}
.model dmod {diode}
.options temp=27
.control
set numdgt=12
tran 1u {stop} {stop - PERIODS / f} 4u
linearize
wrdata OUT v(out) i(V1) i(V2)
.endc
.end
"""
    data = _last_periods(text, f)
    v = data[:, 1]
    i = np.abs(data[:, 3]) + np.abs(data[:, 5])
    return v, i


def _same_even_harmonics(ours: np.ndarray, samples: np.ndarray, f: float) -> None:
    """Our one period's even harmonics (full-wave: the even harmonics of the mains) up to 2 kHz,
    each within 3 % of ngspice's (its last PERIODS periods, by FFT), wherever ngspice's line is
    above 2 % of its second."""
    top = int(2000 // f)
    theirs = np.abs(np.fft.rfft(samples)[::PERIODS][: top + 1]) * math.sqrt(2) / len(samples)
    mine = np.abs(harmonic_phasors(ours, top))
    for k in range(2, top + 1, 2):
        if theirs[k] > 0.02 * theirs[2]:
            assert mine[k] == pytest.approx(theirs[k], rel=0.03), (k * f, mine[k], theirs[k])


@needs_ngspice
@pytest.mark.parametrize(
    "vrms,rw,leak,c,iload,f",
    [
        (250, 120, 0.0, 47e-6, 0.025, 50),  # Shockley diode alone
        (250, 120, 0.2, 47e-6, 0.025, 50),  # with 0.2 H of leakage per half-winding
        (330, 60, 0.1, 100e-6, 0.12, 60),  # a heavier load at 60 Hz
    ],
)
def test_exact_rectifier_against_ngspice(vrms, rw, leak, c, iload, f):
    r = Rectifier(
        "r",
        "a",
        "b",
        "full-wave",
        vrms,
        rw,
        0.0,
        c,
        load_current=iload,
        diode_law="shockley",
        leakage=leak,
    )
    ours = simulate(r, f)
    v, i = _ngspice(vrms, rw, leak, c, iload, f, "shockley")
    assert ours.dc_voltage == pytest.approx(v.mean(), rel=0.01)
    assert ours.rms_current == pytest.approx(math.sqrt(np.mean(i * i)), rel=0.03)
    _same_even_harmonics(ours.current, i, f)


@needs_ngspice
def test_leakage_inductance_lowers_the_upper_harmonics():
    # with 0.2 H per half-winding the 500 Hz line of a 250 V, 47 µF, 25 mA supply falls by about 10
    # dB and the 100 Hz line hardly moves: the fall of each line within 0.3 dB of ngspice's for the
    # same two circuits
    base = Rectifier(
        "r", "a", "b", "full-wave", 250, 120, 0.0, 47e-6, load_current=0.025, diode_law="shockley"
    )
    plain = np.abs(harmonic_phasors(simulate(base, 50).current, 10))
    from dataclasses import replace

    leaky = np.abs(harmonic_phasors(simulate(replace(base, leakage=0.2), 50).current, 10))
    theirs = {}
    for leak in (0.0, 0.2):
        _, i = _ngspice(250, 120, leak, 47e-6, 0.025, 50, "shockley")
        theirs[leak] = np.abs(np.fft.rfft(i)) / len(i)
    for k in (2, 10):  # 100 Hz and 500 Hz; the FFT holds PERIODS periods, line k at bin k·PERIODS
        fall = 20 * math.log10(theirs[0.0][k * PERIODS] / theirs[0.2][k * PERIODS])
        assert 20 * math.log10(plain[k] / leaky[k]) == pytest.approx(fall, abs=0.3), k
    assert 20 * math.log10(plain[10] / leaky[10]) > 7  # the lines named above: about 10 dB


def test_diode_law_and_leakage_are_read():
    p = load_text(
        'plan "r"\nrectifier hv: a to b, full-wave, secondary 250 V, winding 100 ohm, diode '
        "shockley, "
        "leakage 200 mH, reservoir 47 uF, load 20 mA\npoint a: pad\npoint b: pad\nwire w: a to b, "
        "10 mm, "
        "1 mm2\n",
        "r.gplan",
    )
    (r,) = p.rectifiers
    assert r.diode_law == "shockley" and r.leakage == pytest.approx(0.2)
    p = load_text(
        'plan "r"\nrectifier hv: a to b, full-wave, secondary 350 V, winding 100 ohm, valve 50 V '
        "at 250 mA, "
        "reservoir 32 uF, load 100 mA\npoint a: pad\npoint b: pad\nwire w: a to b, 10 mm, 1 mm2\n",
        "r.gplan",
    )
    (r,) = p.rectifiers
    assert (r.diode_law, r.valve_drop, r.valve_current) == (
        "valve",
        pytest.approx(50.0),
        pytest.approx(0.25),
    )


def _ngspice_crc(vrms, rw, c1, rf, c2, iload, f, lf=0.0):
    """Full-wave rectifier (Shockley diodes), reservoir, then R and a second capacitor with the
    load across it; the charging current and the second capacitor's current over the last PERIODS
    periods."""
    vpk = vrms * math.sqrt(2)
    text = f"""crc supply
V1 a 0 SIN(0 {vpk} {f})
V2 0 b SIN(0 {vpk} {f})
R1 a a2 {rw}
R2 b b2 {rw}
D1 a2 v1 dmod
D2 b2 v1 dmod
C1 v1 0 {c1}
{f"LF v1 vx {lf}" if lf else "RX v1 vx 0"}
RF vx v2 {rf}
C2 v2 c2n {c2}
VC2 c2n 0 DC 0
I1 v2 0 DC {iload}
.model dmod D(IS={SHOCKLEY_IS} N={SHOCKLEY_N} RS={SHOCKLEY_RS})
.options temp=27
.control
set numdgt=12
tran 1u 2.4 {2.4 - PERIODS / f} 4u
linearize
wrdata OUT v(v1) i(V1) i(V2) i(VC2) v(v2)
.endc
.end
"""
    data = _last_periods(text, f)
    return np.abs(data[:, 3]) + np.abs(data[:, 5]), data[:, 7], data[:, 9]


@needs_ngspice
def test_crc_filter_capacitor_current_against_ngspice():
    # 250 V, 120 Ω, 47 µF, then 1 kΩ and 47 µF with 25 mA drawn from the second capacitor: the
    # second capacitor's ripple current (which returns through the ground system) harmonic by
    # harmonic to 2 kHz within 3 %, and the charging current's rms
    r = Rectifier(
        "r",
        "a",
        "b",
        "full-wave",
        250,
        120,
        0.0,
        47e-6,
        load_current=0.025,
        diode_law="shockley",
        filter_resistance=1000.0,
        filter_capacitance=47e-6,
        filter_point="x",
    )
    ours = simulate(r, 50)
    i, i_c2, v2 = _ngspice_crc(250, 120, 47e-6, 1000.0, 47e-6, 0.025, 50)
    assert ours.output_dc == pytest.approx(v2.mean(), rel=0.01)  # the filter's output, as printed
    assert ours.output_ripple_pp == pytest.approx(v2.max() - v2.min(), rel=0.05)
    assert ours.rms_current == pytest.approx(math.sqrt(np.mean(i * i)), rel=0.03)
    _same_even_harmonics(ours.filter_current, i_c2, 50)


def test_a_crc_supply_is_a_source_in_the_hum_budget():
    # the second capacitor's negative lands on the stage's cathode pad, its ripple current returns
    # over the cathode wire to the reservoir: the budget names it
    text = """plan "CRC supply, filter return on the cathode wire (trial)"
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
stage v1: in_gnd to star, gain 30 dB, channel main
rectifier hv: res_neg to ct, full-wave, secondary 250 V, winding 120 ohm, diode shockley, \
reservoir 47 uF,
    filter 1 kohm 47 uF to k, load 25 mA
"""
    from groundcheck.analysis import analyze

    result = analyze(load_text(text, "crc.gplan"))
    assert "k_gnd" in {c.element for c in result.hum.channels["main"].contributors}
    rows = [row for row in result.coupling if row.source == "hv.filter"]
    assert rows and "k_gnd" in rows[0].shared
    assert any(f.code == "GC102" and "hv.filter" in f.message for f in result.findings)


def _ngspice_valve(vrms, rw, c, iload, f, k):
    """Full-wave valve rectifier: each anode a Child's-law source I = K·V^(3/2) (ngspice
    behavioural source)."""
    vpk = vrms * math.sqrt(2)
    text = f"""valve rectifier
V1 a 0 SIN(0 {vpk} {f})
V2 0 b SIN(0 {vpk} {f})
R1 a a2 {rw}
R2 b b2 {rw}
B1 a2 out I = V(a2,out) > 0 ? {k} * pow(V(a2,out), 1.5) : 0
B2 b2 out I = V(b2,out) > 0 ? {k} * pow(V(b2,out), 1.5) : 0
RL1 a2 out 1e9
RL2 b2 out 1e9
C1 out 0 {c}
I1 out 0 DC {iload}
.control
set numdgt=12
tran 1u {SETTLE} {SETTLE - PERIODS / f} 4u
linearize
wrdata OUT v(out) i(V1) i(V2)
.endc
.end
"""
    data = _last_periods(text, f)
    return data[:, 1], np.abs(data[:, 3]) + np.abs(data[:, 5])


@needs_ngspice
def test_valve_rectifier_against_ngspice():
    # a valve rectifier dropping 50 V at 250 mA (Child's law between: K = 0.25 / 50^1.5), 350 V,
    # 100 Ω, 32 µF, 100 mA: DC, rms and the charging current's harmonics to 2 kHz within 3 % of
    # ngspice
    r = Rectifier(
        "r",
        "a",
        "b",
        "full-wave",
        350,
        100,
        0.0,
        32e-6,
        load_current=0.1,
        diode_law="valve",
        valve_drop=50.0,
        valve_current=0.25,
    )
    ours = simulate(r, 50)
    v, i = _ngspice_valve(350, 100, 32e-6, 0.1, 50, 0.25 / 50**1.5)
    assert ours.dc_voltage == pytest.approx(v.mean(), rel=0.01)
    assert ours.rms_current == pytest.approx(math.sqrt(np.mean(i * i)), rel=0.03)
    _same_even_harmonics(ours.current, i, 50)


@needs_ngspice
def test_clc_filter_capacitor_current_against_ngspice():
    # the same supply with a 5 H, 80 Ω choke instead of the resistor (a CLC filter): the second
    # capacitor's current harmonic by harmonic to 2 kHz within 3 % of ngspice
    r = Rectifier(
        "r",
        "a",
        "b",
        "full-wave",
        250,
        120,
        0.0,
        47e-6,
        load_current=0.025,
        diode_law="shockley",
        filter_resistance=80.0,
        filter_inductance=5.0,
        filter_capacitance=47e-6,
        filter_point="x",
    )
    ours = simulate(r, 50)
    i, i_c2, v2 = _ngspice_crc(250, 120, 47e-6, 80.0, 47e-6, 0.025, 50, lf=5.0)
    assert ours.output_dc == pytest.approx(v2.mean(), rel=0.01)
    assert ours.rms_current == pytest.approx(math.sqrt(np.mean(i * i)), rel=0.03)
    _same_even_harmonics(ours.filter_current, i_c2, 50)


def _ngspice_bridge(vrms, rw, drop, c1, rf, c2, iload, f):
    """A four-diode bridge (each diode near-ideal behind a fixed `drop` source), the winding's
    resistance, the reservoir, then R and a second capacitor with the load drawn from it: the
    reservoir and output voltages."""
    vpk = vrms * math.sqrt(2)
    legs = "".join(
        f"V{n} {a} {n}x DC {drop}\nD{n} {n}x {k} dsharp\n"
        for n, a, k in (
            ("p1", "s1", "v1"),
            ("p2", "s2", "v1"),
            ("n1", "0", "s1"),
            ("n2", "0", "s2"),
        )
    )
    text = f"""bridge supply
VS s0 s2 SIN(0 {vpk} {f})
RW s0 s1 {rw}
{legs}C1 v1 0 {c1}
RF v1 v2 {rf}
C2 v2 0 {c2}
I1 v2 0 DC {iload}
.model dsharp D(IS=1e-20 N=0.05)
.control
set numdgt=12
tran 1u 2 {2 - PERIODS / f} 4u
linearize
wrdata OUT v(v1) v(v2)
.endc
.end
"""
    data = _last_periods(text, f)
    return data[:, 1], data[:, 3]


@needs_ngspice
def test_the_phono_example_supply_as_printed_against_ngspice():
    # the phono example's bridge (its secondary, winding, 1 V per diode, reservoir, filter and load
    # as written in the plan) built from four diodes in ngspice: the reservoir's and the filter's
    # DC voltages and the reservoir's ripple the check report prints, within 1 % (3 % for the
    # ripple)
    from groundcheck.analysis import analyze
    from helpers import EXAMPLES

    path = next(e for e in EXAMPLES if e.name.startswith("dual-mono"))
    result = analyze(load(path))
    r = next(x for x in result.plan.rectifiers if x.name == "hv")
    printed = next(x for x in result.rectifiers if x.name == "hv")
    v1, v2 = _ngspice_bridge(
        r.secondary,
        r.winding,
        r.diode_drop,
        r.capacitance,
        r.filter_resistance,
        r.filter_capacitance,
        r.load_current,
        result.plan.frequency,
    )
    assert printed.dc_voltage == pytest.approx(v1.mean(), rel=0.01)
    assert printed.output_dc == pytest.approx(v2.mean(), rel=0.01)
    assert printed.ripple_pp == pytest.approx(v1.max() - v1.min(), rel=0.03)
