"""Hum and buzz: rectifier simulation, pickup, levels and hearing, against outside references."""

import math
import subprocess
import tempfile
import tomllib
from pathlib import Path

import numpy as np
import pytest

from groundcheck import load, load_text
from groundcheck.analysis import analyze
from groundcheck.core.units import dbv
from groundcheck.physics.hearing import dbu_from_dbv, spl_at_listener, threshold_of_hearing
from groundcheck.model.records import FieldSource, Rectifier
from groundcheck.network.graph import polygon_area
from groundcheck.physics.pickup import emf, loop_flux
from groundcheck.physics.rectifier import harmonic_phasors, simulate

from helpers import EXAMPLES, needs_ngspice, plan

HEARING = tomllib.loads((Path(__file__).parent / "reference" / "hearing.toml").read_text())


def _ngspice_rectifier(vrms, rw, c, iload, f):
    """Transient analysis of a centre-tapped full-wave rectifier in ngspice; last 5 mains
    periods (settled after 0.75 s: a 1.5 s run agrees to 1e-10 in each case here, measured while
    writing this)."""
    vpk = vrms * math.sqrt(2)
    text = f"""rect
V1 a 0 SIN(0 {vpk} {f})
V2 0 b SIN(0 {vpk} {f})
R1 a a2 {rw}
R2 b b2 {rw}
D1 a2 out dmod
D2 b2 out dmod
C1 out 0 {c}
I1 out 0 DC {iload}
.model dmod D(IS=1e-14 N=1)
.control
set numdgt=10
tran 2u 0.75 {0.75 - 5 / f} 2u
linearize
wrdata OUT v(out) i(V1) i(V2)
.endc
.end
"""
    with tempfile.TemporaryDirectory() as d:
        out = Path(d) / "r.out"
        cir = Path(d) / "r.cir"
        cir.write_text(text.replace("OUT", str(out)))
        subprocess.run(["ngspice", "-b", str(cir)], capture_output=True, timeout=120, check=False)
        data = np.loadtxt(out)
    v = data[:, 1]
    i = np.abs(data[:, 3]) + np.abs(data[:, 5])
    conducting = i > 1e-3 * i.max()
    angle = 360.0 * conducting.mean() / 2  # per charging pulse: two pulses per mains period
    return v.mean(), math.sqrt(np.mean(i * i)), i.max(), angle


@needs_ngspice
@pytest.mark.parametrize(
    "vrms,rw,c,iload,f",
    [(250, 120, 47e-6, 0.025, 50), (330, 60, 100e-6, 0.12, 60), (30, 2, 4700e-6, 1.0, 50)],
)
def test_rectifier_against_ngspice_transient(vrms, rw, c, iload, f):
    """DC voltage and RMS charging current of our simulation vs an ngspice transient analysis of
    the same circuit (diode IS=1e-14, N=1, whose drop at these currents is about 0.7–0.8 V; ours
    uses 0.75 V)."""
    ours = simulate(
        Rectifier("r", "a", "b", "full-wave", vrms, rw, 0.75, c, load_current=iload), f
    )
    v_dc, i_rms, i_pk, angle = _ngspice_rectifier(vrms, rw, c, iload, f)
    assert ours.dc_voltage == pytest.approx(v_dc, rel=0.01)
    assert ours.rms_current == pytest.approx(i_rms, rel=0.03)
    assert ours.peak_current == pytest.approx(i_pk, rel=0.05)
    assert ours.conduction_angle == pytest.approx(angle, rel=0.08)


def test_ripple_against_textbook_approximation():
    # Horowitz & Hill §1.6.3A: ΔVpp ≈ I/(2fC) for full-wave, slightly conservative; I/(fC) for
    # half-wave
    for topo, div in (("full-wave", 2), ("half-wave", 1)):
        r = simulate(Rectifier("r", "a", "b", topo, 250, 1.0, 0.7, 470e-6, load_current=0.05), 50)
        approx = 0.05 / (div * 50 * 470e-6)
        assert 0.8 * approx < r.ripple_pp <= approx


def test_ripple_fundamental_is_twice_mains_for_full_wave():
    # common practice: full-wave rectification puts the ripple at 2f; half-wave at f
    fw = simulate(
        Rectifier("r", "a", "b", "full-wave", 250, 100, 0.7, 47e-6, load_current=0.03), 50
    )
    ph = np.abs(harmonic_phasors(fw.current, 10))
    assert ph[1] < 1e-9 * ph[2] and ph[3] < 1e-9 * ph[2] and ph[2] > 0
    hw = simulate(
        Rectifier("r", "a", "b", "half-wave", 250, 100, 0.7, 47e-6, load_current=0.03), 50
    )
    assert np.abs(harmonic_phasors(hw.current, 2))[1] > 0
    assert fw.dc_current == pytest.approx(
        0.03, rel=1e-3
    )  # charge balance: mean charging = load current


def test_fft_of_pulse_train_matches_fourier_series():
    # rectangular pulses of height A and duty d: rms of harmonic n = √2·A·d·|sinc(n·d)| (Fourier
    # series); 4096 samples: the discrete transform differs from the series only by aliasing, below
    # 1e-4
    n, A, d = 4096, 2.0, 0.125
    x = np.where(np.arange(n) < d * n, A, 0.0)
    ph = harmonic_phasors(x, 20)
    assert ph[0].real == pytest.approx(A * d)
    for k in range(1, 21):
        assert abs(ph[k]) == pytest.approx(math.sqrt(2) * A * d * abs(np.sinc(k * d)), rel=1e-4)


def test_polygon_areas():
    assert polygon_area([(0, 0), (1, 0), (1, 1), (0, 1)]) == pytest.approx(1.0)
    assert polygon_area([(0, 0), (0, 1), (1, 1), (1, 0)]) == pytest.approx(
        1.0
    )  # either orientation
    assert polygon_area([(0, 0), (4, 0), (0, 3)]) == pytest.approx(6.0)
    assert polygon_area([(0, 0), (2, 0), (2, 1), (1, 1), (1, 2), (0, 2)]) == pytest.approx(
        3.0
    )  # L shape
    assert polygon_area([(0, 0), (1, 1), (2, 2)]) == 0.0  # collinear
    # an outline along one line whose shoelace sum rounds to 2.7e-20 or 4.1e-20 m² by the vertex
    # it starts at (found by the rename campaign): 0 from every start
    line = [
        (0.06996132757535453, -0.007415317352044395),
        (0.018913345199306274, 0.002806428423811919),
        (0.0486810128541249, -0.0031541897425684255),
        (0.06722551014309679, -0.006867502747430055),
    ]
    assert {polygon_area(line[i:] + line[:i]) for i in range(4)} == {0.0}


def test_faraday_worked_example():
    # worked by hand (tests/reference/hearing.toml): 1 µT over 100 cm² at 50 Hz → 3.14 µV; a
    # distant dipole is uniform over the loop
    src = FieldSource(
        "t", "transformer", (0.0, 0.0), b_ref=1e-6 * (100.0**3), r_ref=0.01
    )  # 1 µT at 1 m
    side = 0.1
    sq = [
        (1 - side / 2, -side / 2),
        (1 + side / 2, -side / 2),
        (1 + side / 2, side / 2),
        (1 - side / 2, side / 2),
    ]
    phi = loop_flux(src, sq)
    assert abs(phi) == pytest.approx(1e-6 * 1e-2, rel=0.01)
    assert emf(1e-6 * 1e-2, 50) == pytest.approx(
        HEARING["pickup"]["emf_1ut_100cm2_50hz_v"], rel=1e-5
    )


def test_dipole_falls_as_inverse_cube():
    # doubling the distance: 20·log10(1/8) = −18.06 dB (worked, tests/reference/hearing.toml)
    src = FieldSource("t", "transformer", (0.0, 0.0), b_ref=1e-5, r_ref=0.05)

    def small_loop(r):
        e = 1e-3
        return [(r - e, -e), (r + e, -e), (r + e, e), (r - e, e)]

    ratio = loop_flux(src, small_loop(0.4)) / loop_flux(src, small_loop(0.2))
    assert 20 * math.log10(abs(ratio)) == pytest.approx(
        HEARING["pickup"]["dipole_doubling_db"], abs=0.05
    )


def test_single_loop_solved_by_hand():
    # a rectangular loop of two wires with stated resistances (no inductance), far from a
    # transformer in the deck's plane: the worst direction is normal to the deck, where the
    # dipole's field in the plane is B = K/r³ (K = B_ref· r_ref³; Jackson §5.6, on the equator),
    # integrated here over the 100 mm square by Gauss–Legendre quadrature; EMF = 2πf·Φ (Faraday), I
    # = EMF / (R1 + R2) and the stage across wire 1 sees I·R1 (Ohm's law by hand)
    p = plan("""
        listening output 1 V
        point a: pad, at 0,0
        point b: pad, at 100,0
        wire w1: a to b, 100 mm, resistance 10 mohm
        wire w2: b to a, 300 mm, resistance 30 mohm, via 100,100 0,100
        stage s: a to b, gain 20 dB
        field t: transformer, at 1000,50, 1 uT at 100 mm
        """)
    r = analyze(p)
    t, w = np.polynomial.legendre.leggauss(24)
    x = 0.05 * (t + 1)  # 0 … 0.1 m along both sides
    X, Y = np.meshgrid(x, x)
    k = 1e-6 * 0.1**3
    phi = float(w @ (k / ((X - 1.0) ** 2 + (Y - 0.05) ** 2) ** 1.5) @ w) * 0.05 * 0.05
    e = 2 * math.pi * 50 * phi
    i = e / 0.040
    v_out = i * 0.010 * 10
    ch = r.hum.channels["main"]
    assert ch.total_v == pytest.approx(v_out, rel=1e-6)
    loop = r.hum.loops[0].sources["t"].lines[0]
    assert loop.emf == pytest.approx(e, rel=1e-6) and loop.current == pytest.approx(i, rel=1e-6)
    assert r.hum.loops[0].sources["t"].axis == (0.0, 0.0, 1.0)
    assert ch.field_axes[0].axis == (0.0, 0.0, 1.0)


def test_crosstalk_through_a_shared_return_by_hand():
    # channel a's signal return (10 mA) and channel b's stage share one wire of stated resistance
    # R: b's output sees 10 mA · R · gain, against a's rated output of 2 V (Ohm's law by hand)
    p = plan("""
        listening output 2 V
        point sa: pad
        point sb: pad
        point common: star
        point far: pad
        wire own_a: sa to common, 10 mm, resistance 5 mohm
        wire shared: common to far, 10 mm, resistance 20 mohm
        wire own_b: sb to far, 10 mm, resistance 5 mohm
        current ret_a: sa to far, 10 mA, signal, channel a
        stage ga: sa to common, gain 0 dB, channel a
        stage gb: common to sb, gain 40 dB, channel b
        """)
    r = analyze(p)
    row = next(
        x for x in r.hum.crosstalk if x.source == "a" and x.to == "b" and x.frequency == 1000.0
    )
    assert row.volts == pytest.approx(0.010 * 0.020 * 100, rel=1e-9)
    assert row.db == pytest.approx(20 * math.log10(0.010 * 0.020 * 100 / 2.0), abs=0.01)


def test_levels():
    # 0 dBV = 1 V rms; 0 dBu = √0.6 V; 0 dBV = +2.2185 dBu
    assert dbv(1.0) == 0.0 and dbv(0.1) == pytest.approx(-20.0)
    assert dbu_from_dbv(0.0) == pytest.approx(HEARING["levels"]["dbu_of_0_dbv"], abs=1e-4)
    # 2.83 V into 8 Ω is 1 W: SPL at 1 m equals the sensitivity; at 2 m, 6.02 dB less
    # (inverse-square law)
    assert spl_at_listener(math.sqrt(8), 0, 90, 8, 1.0) == pytest.approx(90.0)
    assert spl_at_listener(math.sqrt(8), 0, 90, 8, 2.0) == pytest.approx(90 - 6.0206, abs=1e-3)


@pytest.mark.parametrize("f,tf", list(zip(HEARING["frequencies_hz"], HEARING["threshold_db"])))
def test_threshold_of_hearing_iso226_table(f, tf):
    # ISO 226:2003 Table 1, committed in tests/reference/hearing.toml (never read from the package)
    assert threshold_of_hearing(f) == pytest.approx(tf)


def test_threshold_interpolates_on_log_frequency():
    mid = math.sqrt(100 * 125)  # halfway between 100 and 125 Hz on a log axis
    assert threshold_of_hearing(mid) == pytest.approx((26.5 + 22.1) / 2)
    assert (
        threshold_of_hearing(10) == 78.5 and threshold_of_hearing(20000) == 12.3
    )  # held at the ends


def test_symmetric_dual_mono_gives_identical_channels():
    # the phono example with its channels made alike: both equalisation grounds on the filter
    # capacitor's negative (a shared return each), both outputs to their own star, links of one
    # length, no ground post wire
    text = next(e for e in EXAMPLES if e.name.startswith("dual-mono")).read_text()
    for old, new in (
        ("left.eq_gnd to left.star, 35 mm", "left.eq_gnd to filt_neg, 110 mm"),
        ("right.out_sleeve to right.v2_k, 125 mm", "right.out_sleeve to right.star, 95 mm"),
        ("left.star to psu_star, 160 mm", "left.star to psu_star, 150 mm"),
        ("right.star to psu_star, 140 mm", "right.star to psu_star, 150 mm"),
        ("wire arm_gnd:", "# wire arm_gnd:"),
    ):
        assert old in text
        text = text.replace(old, new)
    r = analyze(load_text(text, "symmetric.gplan"))
    left, right = r.hum.channels["left"], r.hum.channels["right"]
    assert left.total_v > 0 and left.total_v == pytest.approx(right.total_v, rel=1e-9)
    for a, b in zip(left.spectrum, right.spectrum):
        assert a.volts == pytest.approx(b.volts, rel=1e-6, abs=1e-15)


@pytest.mark.parametrize("path", EXAMPLES, ids=[e.name for e in EXAMPLES])
def test_examples_report_budget_with_contributors_and_verdict(path):
    r = analyze(load(path))
    assert r.hum is not None and r.hum.channels
    for ch in r.hum.channels.values():
        assert ch.spectrum and ch.contributors and ch.audible in (True, False)
        assert all(math.isfinite(x.volts) for x in ch.spectrum)


def test_audible_hum_is_a_fault_with_contributors():
    r = analyze(load(next(e for e in EXAMPLES if e.name.startswith("headphone"))))
    audible = [f for f in r.findings if f.code == "GC303"]
    assert {f.elements[0] for f in audible} == {"left", "right"}
    assert all(f.severity == "fault" for f in audible)
    assert any(f.code == "GC301" and "in_gnd" in f.elements for f in r.findings)


def test_worst_case_adds_stage_shares_in_magnitude_and_shares_add_up():
    # two stages of one channel whose pair voltages from the same rectifier current have opposite
    # signs: the signed sum cancels, the worst case adds the magnitudes (|g1·v1| + |g2·v2|, worked
    # by hand from the two stage voltages the solve gives) and the contributors' signed shares add
    # up to 100 %
    from groundcheck.analysis import analyze

    text = """plan "two stages, opposite drops"
listening output 1 V
metal deck: aluminium 2 mm, 200 x 120 mm
point a: pad, at 20,60 on deck
point m: star, at 100,60 on deck
point b: pad, at 180,60 on deck
point ct: centre-tap, at 100,20 on deck
wire w1: a to m, 80 mm, 0.2 mm2, return
wire w2: m to b, 80 mm, 0.2 mm2, return
wire ct_lead: ct to m, 40 mm, 0.5 mm2, return
rectifier hv: a to b, full-wave, secondary 30 V, winding 2 ohm, reservoir 1000 uF, load 100 mA
stage s1: a to m, gain 20 dB, channel out
stage s2: m to b, gain 20 dB, channel out
"""
    r = analyze(load_text(text, "two.gplan"))
    h = r.hum.channels["out"]
    row = next(x for x in h.spectrum if x.frequency == 100.0)
    # by symmetry the rectifier current leaves a and returns at b: both stages see the same drop,
    # in phase (a→m and m→b), so here the worst case equals the signed sum and every share is
    # positive
    assert row.volts == pytest.approx(row.volts_signed, rel=1e-9)
    assert sum(c.share for c in h.contributors) == pytest.approx(100.0, abs=0.5)
    flipped = analyze(load_text(text.replace("stage s2: m to b", "stage s2: b to m"), "two.gplan"))
    h2 = flipped.hum.channels["out"]
    row2 = next(x for x in h2.spectrum if x.frequency == 100.0)
    # s2 now reads the same drop with the opposite sign: the signed sum cancels to nothing, the
    # worst case is the same as before (magnitudes)
    assert row2.volts == pytest.approx(row.volts, rel=1e-9)
    assert row2.volts_signed < 1e-6 * row.volts
    from groundcheck.renderers.text import text_report

    assert "with every stage non-inverting" in text_report(flipped)  # the summary says both
    assert "with every stage non-inverting" not in text_report(r)


def test_without_the_hum_figures_a_shared_return_says_why_it_stays_a_fault():
    # a DC relay current (no frequency: DC) on a stage's ground wire: the hum budget finds none of
    # it at the output, so GC102 is a note; with --no-hum nothing weighs it, and the finding says
    # so instead of quietly turning into a fault
    from groundcheck.rules.results import Options

    text = """plan "a DC return on a stage's ground wire (trial)"
listening output 1 V
metal deck: aluminium 2 mm, 200 x 120 mm
point star: star, at 100,60 on deck
point k: pad, at 150,60 on deck
point in_gnd: sleeve, at 190,60 on deck
point src: pad, at 40,60 on deck
wire sup: src to k, 110 mm, 0.5 mm2, return
wire k_gnd: k to star, 50 mm, 0.3 mm2, signal
wire in_lead: in_gnd to k, 40 mm, 0.3 mm2, signal
current relay: src to star, 50 mA, load
stage v1: in_gnd to star, gain 30 dB, channel main
"""
    judged, unjudged = (
        next(
            f
            for f in analyze(load_text(text, "dc.gplan"), Options(hum=h)).findings
            if f.code == "GC102"
        )
        for h in (True, False)
    )
    assert judged.severity == "note" and "finds none of it" in judged.message
    assert "level_dbv" not in judged.figures  # no level to show, rather than an empty one
    assert unjudged.severity == "fault" and "--no-hum" in unjudged.message


def test_without_the_hum_figures_the_verdict_names_the_rules_it_could_not_judge():
    # the headphone example: with the hum figures its verdict rests partly on GC301-GC306; without
    # them the verdict must not read as if those rules had passed
    from groundcheck.rules.results import Options
    from helpers import EXAMPLES

    plan = load(next(e for e in EXAMPLES if e.name.startswith("headphone")))
    full, bare = analyze(plan, Options()), analyze(plan, Options(hum=False))
    assert any(f.code in ("GC301", "GC303", "GC304", "GC306") for f in full.findings)
    assert not any(n.why.startswith("judged from the hum") for n in full.not_checked)
    (skipped,) = [n for n in bare.not_checked if "--no-hum" in n.why]
    assert skipped.codes == ("GC301", "GC302", "GC303", "GC304", "GC305", "GC306")
    assert "not checked: every GC3xx rule (hum)" in bare.verdict()
    assert any("GC3xx" in n and "--no-hum" in n for n in bare.notices)
    assert not bare.clean()
    # only the hum rules a selection keeps are said: --only-rules GC2 leaves none of them to judge
    chosen = analyze(
        plan, Options(hum=False, only_rules=("GC2",), only_rules_origin="--only-rules")
    )
    assert not any("--no-hum" in n.why for n in chosen.not_checked)


def test_a_loop_with_no_area_gets_no_near_source_note():
    # two wires side by side between the same two points: a loop of no area, which nothing
    # threads however near the transformer it runs (GC305 said it was 'inside its size'); the same
    # pair with one wire routed round 40 mm away has an area and keeps its note
    base = """plan "near"
mains 230 V 50 Hz, fuse 1 A slow, breaking high
metal deck: aluminium 2 mm, 200 x 120 mm
point a: junction, at 60,60 on deck
point b: junction, at 140,60 on deck
point k: pad, at 160,60 on deck
wire k_w: k to b, 20 mm, 0.5 mm2, signal
wire w1: a to b, 80 mm, 0.5 mm2, signal
wire w2: a to b, 80 mm, 0.5 mm2, signal{route}
stage s: a to k, gain 30 dB, channel main
field t: transformer, at 100,60, 50 uT at 5 cm, size 80 mm
"""
    flat = analyze(load_text(base.format(route=""), "near.gplan"))
    looped = analyze(load_text(base.format(route=", via 60,100 140,100"), "near.gplan"))
    assert flat.hum.loops and flat.hum.loops[0].area == 0
    assert not [f for f in flat.findings if f.code == "GC305"]
    assert [f for f in looped.findings if f.code == "GC305"]


def test_one_stages_leakage_currents_add_as_phasors_in_the_worst_case():
    # two leakage currents (one mains line: in phase) cross the one wire a single stage reads, in
    # opposite directions: 1.0 mA a → m and 0.6 mA m → a. Worked by hand: the wire is 80 mm of
    # 0.2 mm² copper, R = 1.724e-8 × 0.080 / 0.2e-6 = 6.896 mΩ; the stage reads (1.0 − 0.6) mA × R
    # = 2.758 µV at 50 Hz (gain 0 dB; the wire's 50 Hz reactance is far below its resistance).
    # "Every stage in phase" has one stage to add: the two currents' drops are not added in
    # magnitude, which would give (1.0 + 0.6) mA × R = 11.03 µV
    from groundcheck.analysis import analyze

    text = """plan "one stage, two opposing leakage currents"
listening output 1 V
metal deck: aluminium 2 mm, 200 x 120 mm
point a: pad, at 20,60 on deck
point m: star, at 100,60 on deck
wire w1: a to m, 80 mm, 0.2 mm2, return
current la: a to m, 1 mA 50 Hz, leakage
current lb: m to a, 0.6 mA 50 Hz, leakage
stage s: a to m, gain 0 dB, channel out
"""
    r = analyze(load_text(text, "leak.gplan"))
    row = next(x for x in r.hum.channels["out"].spectrum if x.frequency == 50.0)
    by_hand = (1.0e-3 - 0.6e-3) * 1.724e-8 * 0.080 / 0.2e-6
    assert by_hand == pytest.approx(2.758e-6, rel=1e-3)
    assert row.volts == pytest.approx(by_hand, rel=0.01)
