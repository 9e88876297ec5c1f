"""The product bonding test (GC223): test currents, adiabatic and steady-state temperatures, and
the verdict, against figures worked by hand here.

Sources named beside each check: IEC 60949 eq. 1 and IEC 60364-5-54 Annex A (adiabatic relation,
copper K = 226 A·√s/mm², β = 234.5 K, final temperatures); F. P. Incropera and D. P. DeWitt,
*Fundamentals of Heat and Mass Transfer*, eq. 9.34 (Churchill–Chu, horizontal cylinder) and
Table A.4 (air; from memory); IEC 60287-2-1 (insulation wall, ρT of PVC 5.0 K·m/W, from memory);
the test currents of IEC 60065 15.2 and IEC 61010-1 6.5.2.4 (25 A, 1 min), IEC 60950-1:2005
2.6.3.4 (200 %, 2 min), IEC 60335-1 27.5 and IEC 62368-1 5.6.6.2 (from memory).
"""

import math

import pytest
from hypothesis import given, settings, strategies as st

from groundcheck.analysis import analyze
from groundcheck.physics import heat
from groundcheck.physics.heat import adiabatic_temperature, steady_temperature
from groundcheck.renderers.jsondoc import result_document
from groundcheck.renderers.text import text_report

from groundcheck import load
from helpers import EXAMPLES, ROOT, plan

RHO20, ALPHA20 = 1.7241e-8, 0.00393  # IEC 60028 annealed copper

#: Incropera & DeWitt Table A.4, air at 1 atm (from memory):
#: T (K), ν (m²/s), k (W/(m·K)), α (m²/s), Pr
AIR_ROWS = (
    (300.0, 15.89e-6, 26.3e-3, 22.5e-6, 0.707),
    (350.0, 20.92e-6, 30.0e-3, 29.9e-6, 0.700),
    (400.0, 26.41e-6, 33.8e-3, 38.3e-6, 0.690),
    (450.0, 32.39e-6, 37.3e-3, 47.2e-6, 0.686),
)


def shed_per_metre(theta_s, theta_a, D, eps):
    """Heat a horizontal cylinder sheds per metre (W/m), worked from the textbook: Churchill–Chu
    (Incropera eq. 9.34) with air at the film temperature, plus radiation εσ(Ts⁴ − Ta⁴)."""
    ts, ta = theta_s + 273.15, theta_a + 273.15
    film = (ts + ta) / 2
    lo, hi = next((a, b) for a, b in zip(AIR_ROWS, AIR_ROWS[1:]) if a[0] <= film <= b[0])
    f = (film - lo[0]) / (hi[0] - lo[0])
    nu, k, alpha, pr = (x + (y - x) * f for x, y in zip(lo[1:], hi[1:]))
    ra = 9.81 * (1 / film) * (ts - ta) * D**3 / (nu * alpha)
    nusselt = (0.60 + 0.387 * ra ** (1 / 6) / (1 + (0.559 / pr) ** (9 / 16)) ** (8 / 27)) ** 2
    convection = nusselt * k / D * math.pi * D * (ts - ta)
    radiation = eps * 5.670e-8 * math.pi * D * (ts**4 - ta**4)
    return convection + radiation


def pvc_wire_balance(s_mm2, amps, theta_c, theta_a):
    """(heat made, heat shed) per metre of a PVC hook-up wire (0.6 mm wall, ε 0.9) at conductor
    temperature θc: the wall's resistance T1 = ρT ln(D/d)/(2π) (IEC 60287-2-1) sets the surface."""
    d = math.sqrt(4 * s_mm2 / math.pi) * 1e-3
    D = d + 1.2e-3
    t1 = 5.0 * math.log(D / d) / (2 * math.pi)
    q = amps**2 * RHO20 * (1 + ALPHA20 * (theta_c - 20)) / (s_mm2 * 1e-6)
    return q, shed_per_metre(theta_c - q * t1, theta_a, D, 0.9)


BOX = """
metal box: steel 1 mm, touchable
point pe_stud: stud
wire pe_lead: mains.pe to pe_stud, 50 mm, {area}, protective
bolt pe_bolt: pe_stud to box, contact 2 mohm, protective
"""


def bonding(text, header=True):
    r = analyze(plan(text, header=header))
    return r, {(c.conductor, c.test): c for c in r.bonding.conductors}


# --- the adiabatic relation, IEC 60949 eq. 1: θf = (β + θi)·exp(I²t/(K²S²)) − β ---


def test_adiabatic_temperature_by_hand():
    # 0.75 mm², 25 A for 60 s from 20 °C: I²t = 625 × 60 = 37 500 A²s; K²S² = 226² × 0.75² =
    # 51 076 × 0.5625 = 28 730.25; x = 1.305245; e^x = e^1.3 × e^0.005245 = 3.669297 × 1.005259
    # = 3.688594; θf = 254.5 × 3.688594 − 234.5 = 704.25 °C
    got = adiabatic_temperature("copper", 25.0, 60.0, 0.75e-6, 20.0)
    assert got == pytest.approx(704.25, abs=0.05)
    # 2.5 mm²: K²S² = 51 076 × 6.25 = 319 225; x = 0.117472; e^x = 1.124650;
    # θf = 254.5 × 1.124650 − 234.5 = 51.72 °C
    got = adiabatic_temperature("copper", 25.0, 60.0, 2.5e-6, 20.0)
    assert got == pytest.approx(51.72, abs=0.02)
    # 0.2 mm²: x = 37 500 / (51 076 × 0.04) = 18.36, beyond ln((1084.6 + 234.5)/254.5) = 1.645:
    # it would melt (copper melts at 1084.6 °C, CRC Handbook)
    assert math.isinf(adiabatic_temperature("copper", 25.0, 60.0, 0.2e-6, 20.0))
    # steel has no constants here: no adiabatic figure
    assert adiabatic_temperature("steel", 25.0, 60.0, 1e-6, 20.0) is None


@pytest.mark.parametrize(
    "k,theta_i,theta_f",
    [(143.0, 30.0, 160.0), (115.0, 70.0, 160.0), (176.0, 30.0, 250.0), (159.0, 30.0, 200.0)],
)
def test_adiabatic_temperature_meets_the_k_tables(k, theta_i, theta_f):
    # IEC 60364-5-54 Tables A.54.2/A.54.3 (PVC 143 separate, 115 in a cable; XLPE 176) and A.54.5
    # (bare, normal conditions, 159 — from memory): I²t = k²S² takes θi to θf; k is rounded to
    # three figures, hence 1 K
    t = 1.0
    amps = k * 1.0 / math.sqrt(t)  # S = 1 mm²
    got = adiabatic_temperature("copper", amps, t, 1e-6, theta_i)
    assert got == pytest.approx(theta_f, abs=1.0)


# --- the steady state in still air ---


def test_steady_state_of_a_bare_wire_by_hand():
    # bare 1 mm² copper (d = 1.128379 mm, ε 0.05) at 120 °C in 20 °C air: film 343.15 K, between
    # Table A.4's 300 K and 350 K rows; the current that holds it there is √(q S / ρ(120 °C))
    d = 1.128379e-3
    shed = shed_per_metre(120.0, 20.0, d, 0.05)
    amps = math.sqrt(shed * 1e-6 / (RHO20 * (1 + ALPHA20 * 100.0)))
    got = steady_temperature(amps, 1e-6, d, 0.0, "bare", RHO20, ALPHA20, 20.0)
    assert got == pytest.approx(120.0, abs=0.1)


def test_steady_state_of_a_pvc_wire_balances_by_hand():
    # 0.75 mm² PVC at 25 A: the temperature the code reports balances heat made and shed by hand
    d = math.sqrt(3e-6 / math.pi)
    got = steady_temperature(25.0, 0.75e-6, d, 0.6e-3, "pvc", RHO20, ALPHA20, 20.0)
    made, shed = pvc_wire_balance(0.75, 25.0, got, 20.0)
    assert made == pytest.approx(shed, rel=2e-3)
    assert 100.0 < got < 160.0


@pytest.mark.parametrize("s_mm2,amps", [(0.5, 10.0), (0.75, 25.0), (1.0, 25.0), (2.5, 40.0)])
def test_the_steady_state_is_the_root_of_the_balance_by_hand(s_mm2, amps):
    # the heat made less the heat shed (worked above from the textbook) changes sign within 1e-9
    # relative of the temperature reported: the root is found to the last digits, not to a step
    d = math.sqrt(4 * s_mm2 / math.pi) * 1e-3
    got = steady_temperature(amps, s_mm2 * 1e-6, d, 0.6e-3, "pvc", RHO20, ALPHA20, 20.0)
    below = pvc_wire_balance(s_mm2, amps, got * (1 - 1e-9), 20.0)
    above = pvc_wire_balance(s_mm2, amps, got * (1 + 1e-9), 20.0)
    assert below[0] > below[1] and above[0] < above[1]


def test_the_root_finder_keeps_its_bracket():
    # f(x) = 2 − x² on [0, 100]: √2 (math.sqrt); a kinked f, steep on one side of its root at 3
    # and flat on the other, still to the last digits; a bracket with no sign change: infinite
    assert heat._root(lambda x: 2 - x * x, 0.0, 100.0) == pytest.approx(math.sqrt(2), rel=1e-15)
    kinked = heat._root(lambda x: (3 - x) * (1e4 if x < 3 else 1e-4), -50.0, 1000.0)
    assert kinked == pytest.approx(3.0, rel=1e-14)
    assert heat._root(lambda x: 1.0, 0.0, 1.0) == math.inf


def test_wire_sizes_for_the_25_a_test_by_hand():
    # at the PVC limit (160 °C) a wire that makes more heat than it sheds has its steady state
    # above the limit, and its adiabatic figure is above it too (0.2 to 1 mm²: x ≥ 0.734,
    # e^x ≥ 2.08, beyond (160 + 234.5)/(20 + 234.5) = 1.55); one that sheds more stays below it
    for s_mm2, fails in ((0.2, True), (0.5, True), (0.75, False), (1.0, False)):
        made, shed = pvc_wire_balance(s_mm2, 25.0, 160.0, 20.0)
        assert (made > shed) == fails, s_mm2
        _, rows = bonding(BOX.format(area=f"{s_mm2} mm2"))
        assert rows[("pe_lead", "short")].passes is (not fails), s_mm2
    # 0.2 mm² at 160 °C: q = 625 × 1.7241e-8 × 1.5502 / 0.2e-6 = 83.5 W/m, far beyond what it sheds
    made, shed = pvc_wire_balance(0.2, 25.0, 160.0, 20.0)
    assert made == pytest.approx(83.52, rel=1e-3) and shed < 15.0


# --- the test currents and the verdict ---


def test_test_currents_from_the_standards():
    r, rows = bonding(BOX.format(area="1.0 mm2"))
    tests = {t.name: t for t in r.bonding.tests}
    # IEC 60065 15.2 / IEC 61010-1 6.5.2.4: 25 A for 1 min; IEC 60950-1 2.6.3.4: 200 % of the
    # 2 A fuse (the helpers' header) for 2 min
    assert (tests["short"].current, tests["short"].duration) == (25.0, 60.0)
    assert (tests["long"].current, tests["long"].duration) == (4.0, 120.0)
    big = 'plan "t"\nmains 230 V 50 Hz, fuse 20 A slow, breaking high, line-conductor 2.5 mm2\n'
    r2, _ = bonding(big + BOX.format(area="2.5 mm2"), header=False)
    tests = {t.name: t for t in r2.bonding.tests}
    # IEC 60335-1 27.5 (from memory): 1.5 × 20 A = 30 A > 25 A; the long test 40 A
    assert tests["short"].current == 30.0 and tests["long"].current == 40.0
    no_fuse = 'plan "t"\nmains 230 V 50 Hz, line-conductor 0.75 mm2\n'
    r3, _ = bonding(no_fuse + BOX.format(area="1.0 mm2"), header=False)
    assert [t.name for t in r3.bonding.tests] == ["short"]


def test_path_voltage_and_contact_power_by_hand():
    r, rows = bonding(BOX.format(area="1.0 mm2"))
    # pe_lead: ρL/A = 1.7241e-8 × 0.05 / 1e-6 = 0.86205 mΩ, plus the bolt's 2 mΩ:
    # 25 A × 2.86205 mΩ
    drop = {(p.part, p.test): p.voltage for p in r.bonding.parts}
    assert drop[("box", "short")] == pytest.approx(25 * 2.86205e-3, rel=1e-6)
    bolt = rows[("pe_bolt", "short")]
    assert bolt.power == pytest.approx(25**2 * 2e-3) and bolt.drop == pytest.approx(0.05)
    assert bolt.passes is None  # a joint is reported, not judged


def test_parallel_wires_share_the_current():
    text = BOX.format(area="0.5 mm2") + (
        "wire pe_lead2: mains.pe to pe_stud, 50 mm, 0.5 mm2, protective\n"
    )
    _, rows = bonding(text)
    # two equal wires in parallel: 12.5 A each (Kirchhoff), and at 12.5 A a 0.5 mm² wire passes
    for name in ("pe_lead", "pe_lead2"):
        assert rows[(name, "short")].current == pytest.approx(12.5, rel=1e-6)
        assert rows[(name, "short")].passes


def test_thin_protective_wire_fails_the_bonding_test():
    r, rows = bonding(BOX.format(area="0.2 mm2"))
    found = [f for f in r.findings if f.code == "GC223"]
    assert len(found) == 1 and found[0].severity == "danger" and found[0].elements == ("pe_lead",)
    msg = found[0].message
    row = rows[("pe_lead", "short")]
    assert "pe_lead" in msg and "short bonding test" in msg and "160 °C" in msg
    assert f"{row.reached:.0f} °C" in msg and row.reached > 160.0
    # the smallest nominal size that passes, by hand above: 0.5 mm² fails, 0.75 mm² passes
    assert "0.75 mm²" in found[0].fix and row.thicker == pytest.approx(0.75e-6)


def test_a_wire_that_the_hand_figures_pass_is_not_flagged():
    for area in ("0.75 mm2", "1.0 mm2"):
        r, rows = bonding(BOX.format(area=area))
        assert not [f for f in r.findings if f.code == "GC223"], area
        assert rows[("pe_lead", "short")].passes and rows[("pe_lead", "long")].passes


def test_insulation_sets_the_limit():
    # IEC 60364-5-54 Annex A final temperatures: XLPE 250 °C; bare 200 °C (from memory)
    _, rows = bonding(BOX.format(area="1.0 mm2, insulation xlpe"))
    assert rows[("pe_lead", "short")].limit == 250.0
    _, rows = bonding(BOX.format(area="1.0 mm2, insulation bare"))
    assert rows[("pe_lead", "short")].limit == 200.0
    assert rows[("pe_lead", "short")].continuous_limit is None


def test_no_bonding_test_for_class_ii_or_without_mains():
    assert analyze(plan(BOX.format(area="1.0 mm2"))).bonding is not None
    ii = 'plan "t"\nmains 230 V 50 Hz, fuse 1 A slow, class II\nmetal box: steel 1 mm, touchable\n'
    assert analyze(plan(ii, header=False)).bonding is None
    bare = 'plan "t"\nmetal box: steel 1 mm, touchable\n'
    assert analyze(plan(bare, header=False)).bonding is None


def test_figures_reach_json_and_text():
    r, _ = bonding(BOX.format(area="0.2 mm2"))
    doc = result_document(r)["bonding_test"]
    row = next(
        c for c in doc["conductors"] if c["conductor"] == "pe_lead" and c["test"] == "short"
    )
    assert row["passes"] is False and row["limit_c"] == 160.0 and row["thicker_mm2"] == 0.75
    assert [t["current_a"] for t in doc["tests"]] == [25.0, 4.0]
    text = text_report(r)
    assert "Bonding test" in text and "OVER" in text


def test_path_voltage_limit_above_16_a():
    # IEC 60950-1:2005 2.6.3.4: with a protective device above 16 A, at most 2.5 V at 200 % of its
    # rating.  20 A fuse: 40 A; pe_lead 2.5 mm², 50 mm: 1.7241e-8 × 0.05 / 2.5e-6 = 0.34482 mΩ
    hdr = 'plan "t"\nmains 230 V 50 Hz, fuse {} A slow, breaking high, line-conductor 2.5 mm2\n'
    box = BOX.format(area="2.5 mm2").replace("contact 2 mohm", "contact {}")
    over = analyze(plan(hdr.format(20) + box.format("70 mohm"), header=False))
    found = [f for f in over.findings if f.code == "GC223"]
    # 40 A × (0.34482 + 70) mΩ = 2.81379 V > 2.5 V, although the path is under 0.1 Ω (no GC206)
    assert len(found) == 1 and found[0].elements == ("box",)
    assert found[0].figures["path_voltage_v"] == pytest.approx(2.8138, abs=1e-4)
    assert not [f for f in over.findings if f.code == "GC206"]
    # 40 A × 50.34482 mΩ = 2.01379 V: within the limit
    near = analyze(plan(hdr.format(20) + box.format("50 mohm"), header=False))
    assert not [f for f in near.findings if f.code == "GC223"]
    # a 16 A device is not above 16 A: the 0.1 Ω limit alone applies (32 A × 70.34 mΩ = 2.25 V)
    at16 = analyze(plan(hdr.format(16) + box.format("70 mohm"), header=False))
    assert not [f for f in at16.findings if f.code == "GC223"]
    assert all(p.limit is None for p in at16.bonding.parts)


@settings(max_examples=60, deadline=None)
@given(
    st.floats(0.05, 10.0),
    st.floats(0.1, 60.0),
    st.floats(-20.0, 60.0),
    st.sampled_from(["pvc", "xlpe", "bare"]),
)
def test_a_thicker_wire_never_runs_hotter(s_mm2, amps, ambient, ins):
    # invariants of the heat balance: more copper at the same current makes less heat per metre and
    # has more surface, so neither figure rises; a larger current never cools; none falls below
    # the ambient
    def temps(s, i):
        d = math.sqrt(4 * s * 1e-6 / math.pi)
        wall = 0.0 if ins == "bare" else 0.6e-3
        return (
            adiabatic_temperature("copper", i, 60.0, s * 1e-6, ambient),
            steady_temperature(i, s * 1e-6, d, wall, ins, RHO20, ALPHA20, ambient),
        )

    ad, ss = temps(s_mm2, amps)
    ad2, ss2 = temps(s_mm2 * 1.5, amps)
    ad3, ss3 = temps(s_mm2, amps * 1.5)
    assert ad2 <= ad and ss2 <= ss + 1e-6
    assert ad3 >= ad and ss3 >= ss - 1e-6
    assert min(ad, ss) >= ambient - 1e-6


DEVICE_PLANS = sorted((ROOT / "examples" / "studio" / "devices").glob("*.gplan"))


@pytest.mark.parametrize("path", [*EXAMPLES, *DEVICE_PLANS], ids=lambda p: p.name)
def test_bundled_examples_pass_the_bonding_test(path):
    # their protective leads are 0.75–1 mm² PVC: about 104–140 °C in the 25 A test, under 160 °C
    r = analyze(load(path))
    assert r.bonding is not None
    assert not [f for f in r.findings if f.code == "GC223"]
    assert all(c.passes is not False for c in r.bonding.conductors)


def test_the_long_tests_bound_past_the_limit_is_a_fault_and_the_short_tests_a_danger():
    # A 1 mm² PVC lead, 30 mm from the inlet to the stud, in equipment with a 250 mA fuse on a
    # 16 A type B breaker: the long test is 200 % of the breaker's 16 A (IEC 60950-1:2005
    # 2.6.3.4), 32 A for 120 s.  The steady state in still air worked by hand by an outside
    # builder (Churchill–Chu, Incropera & DeWitt eq. 9.34, air at the film temperature, 0.6 mm
    # PVC wall): 162.3 °C, over PVC's 160 °C (IEC 60364-5-54 Annex A) — the path stays whole, a
    # fault, not a danger; its 25 A minute ends near 104 °C (the docs' worked example): passes.
    hdr = (
        'plan "t"\nmains 230 V 50 Hz, fuse 250 mA slow, breaking high, breaker 16 A B, '
        "line-conductor 1 mm2\n"
    )
    box = BOX.format(area="1 mm2").replace("50 mm", "30 mm")
    r, rows = bonding(hdr + box, header=False)
    long = rows[("pe_lead", "long")]
    assert long.current == pytest.approx(32.0) and long.reached == pytest.approx(162.3, rel=5e-3)
    assert rows[("pe_lead", "short")].passes
    (found,) = [f for f in r.findings if f.code == "GC223"]
    assert found.severity == "fault" and "long bonding test (32 A for 120 s)" in found.message
    assert "may reach up to 162 °C" in found.message and "a bound" in found.message
    # 0.2 mm² melts in the long test (adiabatic: x = 32²·120/(226²·0.2²) = 60.1, far past
    # ln((1084.6 + 234.5)/(20 + 234.5)) = 1.645, IEC 60949 eq. 1): the path opens, a danger
    r, rows = bonding(hdr + BOX.format(area="0.2 mm2"), header=False)
    long = [f for f in r.findings if f.code == "GC223" and "long" in f.message]
    assert rows[("pe_lead", "long")].reached == math.inf
    assert [f.severity for f in long] == ["danger"] and "would melt" in long[0].message


def test_the_long_test_takes_the_breakers_rating_at_the_inlets_part_alone():
    # A fault ahead of the fuse (the inlet's line pin, the fuse holder) lands on the part the inlet
    # sits on and is the 16 A breaker's to clear: 200 % of 16 A, 32 A for 2 min, through the
    # inlet's lead.  A fault on the lid, behind the 500 mA fuse, is the fuse's: 200 % of 0.5 A,
    # 1 A through the lid's lead (IEC 60950-1:2005 2.6.3.4 and IEC 62368-1 5.6.6.2, the
    # protective current rating of the circuit the part can meet, from memory).
    text = (
        'plan "t"\nmains 230 V 50 Hz, fuse 500 mA slow, breaking high, breaker 16 A B, '
        "line-conductor 0.75 mm2, inlet at 20,20\n"
        "metal chassis: aluminium 2 mm, 300 x 200 mm, touchable\n"
        "metal lid: steel 1 mm, 300 x 200 mm, at 0,300, touchable\n"
        "point pe_stud: stud, at 30,30 on chassis\n"
        "wire pe_lead: mains.pe to pe_stud, 30 mm, 1 mm2, protective\n"
        "bolt pe_bolt: pe_stud to chassis, protective\n"
        "point lid_tag: tag, at 30,330 on lid\n"
        "bolt lid_bolt: lid_tag to lid, protective\n"
        "wire lid_lead: pe_stud to lid_tag, 300 mm, 0.75 mm2, protective\n"
    )
    r, rows = bonding(text, header=False)
    assert rows[("pe_lead", "long")].current == pytest.approx(32.0, rel=1e-6)
    assert rows[("lid_lead", "long")].current == pytest.approx(1.0, rel=1e-6)
    assert rows[("lid_lead", "long")].passes
    lid = next(p for p in r.bonding.parts if p.part == "lid" and p.test == "long")
    short = next(p for p in r.bonding.parts if p.part == "lid" and p.test == "short")
    assert lid.voltage == pytest.approx(short.voltage / 25.0, rel=1e-9)  # 1 A against 25 A


def test_the_drop_limit_follows_the_device_that_protects_each_part():
    # IEC 60950-1:2005 2.6.3.4 (REFERENCE.md, confirmed): 0.1 Ω when the protective device is
    # 16 A or less, else 2.5 V at 200 % of its rating.  On a 32 A breaker with a 2 A fuse: the
    # chassis the inlet sits on is the breaker's (2.5 V at 64 A); the lid, behind the fuse, is the
    # fuse's, 2 A ≤ 16 A: no voltage limit, its 0.1 Ω is GC206's
    text = (
        'plan "t"\nmains 230 V 50 Hz, fuse 2 A slow, breaking high, breaker 32 A B, '
        "line-conductor 1.5 mm2, inlet at 20,20\n"
        "metal chassis: aluminium 2 mm, 300 x 200 mm, touchable\n"
        "metal lid: steel 1 mm, 300 x 200 mm, at 0,300, touchable\n"
        "point pe_stud: stud, at 30,30 on chassis\n"
        "wire pe_lead: mains.pe to pe_stud, 30 mm, 1.5 mm2, protective\n"
        "bolt pe_bolt: pe_stud to chassis, protective\n"
        "point lid_tag: tag, at 30,330 on lid\n"
        "bolt lid_bolt: lid_tag to lid, protective, contact 60 mohm\n"
        "wire lid_lead: pe_stud to lid_tag, 300 mm, 1 mm2, protective\n"
    )
    r, _ = bonding(text, header=False)
    long = {p.part: p for p in r.bonding.parts if p.test == "long"}
    assert long["chassis"].limit == 2.5 and long["chassis"].current == pytest.approx(64.0)
    assert long["lid"].limit is None and long["lid"].current == pytest.approx(4.0)
    assert not [f for f in r.findings if f.code == "GC223" and "lid" in f.elements]


def test_behind_a_fuse_above_16_a_the_part_keeps_the_drop_limit_at_its_fuses_current():
    # a 20 A fuse behind a 32 A breaker: the lid is the fuse's, 20 A > 16 A, so 2.5 V at 40 A
    # (IEC 60950-1:2005 2.6.3.4); its path: the 1 mm² lead, 300 mm at 20 °C, 1.7241e-8 × 0.3 /
    # 1e-6 = 5.172 mΩ, and the lid's 60 mΩ screw: 40 A × 65.2 mΩ ≈ 2.61 V > 2.5 V — GC223 names
    # the fuse
    text = (
        'plan "t"\nmains 230 V 50 Hz, fuse 20 A slow, breaking high, breaker 32 A B, '
        "line-conductor 2.5 mm2, inlet at 20,20\n"
        "metal chassis: aluminium 2 mm, 300 x 200 mm, touchable\n"
        "metal lid: steel 1 mm, 300 x 200 mm, at 0,300, touchable\n"
        "point pe_stud: stud, at 30,30 on chassis\n"
        "wire pe_lead: mains.pe to pe_stud, 30 mm, 2.5 mm2, protective\n"
        "bolt pe_bolt: pe_stud to chassis, protective\n"
        "point lid_tag: tag, at 30,330 on lid\n"
        "bolt lid_bolt: lid_tag to lid, protective, contact 60 mohm\n"
        "wire lid_lead: pe_stud to lid_tag, 300 mm, 1 mm2, protective\n"
    )
    r, _ = bonding(text, header=False)
    lid = next(p for p in r.bonding.parts if p.part == "lid" and p.test == "long")
    assert lid.limit == 2.5 and lid.current == pytest.approx(40.0)
    (f,) = [f for f in r.findings if f.code == "GC223" and f.elements == ("lid",)]
    assert "200 % of the 20 A fuse that protects it" in f.message
    assert 2.55 < f.figures["path_voltage_v"] < 2.7


@pytest.mark.parametrize(
    "breaker, minutes", [(16, 2), (25, 2), (32, 4), (63, 6), (100, 6), (125, 8)]
)
def test_the_long_tests_duration_follows_the_rating(breaker, minutes):
    # IEC 60950-1:2005 Table 2E: 2 min up to 30 A, 4 min to 60 A, 6 min to 100 A, 8 min to 200 A
    text = (
        f'plan "t"\nmains 230 V 50 Hz, fuse 2 A slow, breaking high, breaker {breaker} A B, '
        "line-conductor 0.75 mm2\n"
    )
    r, _ = bonding(text + BOX.format(area="10 mm2"), header=False)
    (long,) = [t for t in r.bonding.tests if t.name == "long"]
    assert (long.current, long.duration) == (2.0 * breaker, 60.0 * minutes)


def test_a_fused_plug_sets_the_long_tests_rating():
    # a ring circuit's 32 A breaker and a 13 A plug fuse: the device ahead of the equipment is the
    # plug's (IEC 60950-1 2.6.3.3, from memory), 200 % of 13 A = 26 A for 2 min, where the ring's
    # breaker alone asks 64 A for 4 min (Table 2E)
    ring = (
        'plan "t"\nmains 230 V 50 Hz, fuse 2 A slow, breaking high, breaker 32 A B, '
        "line-conductor 0.75 mm2{}\n"
    )
    r, rows = bonding(ring.format(", plug-fuse 13 A") + BOX.format(area="1.0 mm2"), header=False)
    (long,) = [t for t in r.bonding.tests if t.name == "long"]
    assert (long.current, long.duration) == (26.0, 120.0) and "plug fuse" in long.basis
    # 1 mm² of PVC wire carries 26 A for 2 min: the IEC 60949 adiabatic bound by hand,
    # (234.5 + 20)·exp(26²·120/(226²·1²)) − 234.5 = 1011 °C, far over PVC's 160 °C short-time
    # limit, so the steady state decides: the textbook heat balance (pvc_wire_balance, worked
    # above) holds at the temperature reached, about 111 °C; the same lead fails the ring's 64 A
    # for 4 min
    lead = rows[("pe_lead", "long")]
    assert lead.passes and lead.reached < 160.0
    made, shed = pvc_wire_balance(1.0, 26.0, lead.reached, r.plan.ambient)
    assert made == pytest.approx(shed, rel=0.05)
    r2, rows2 = bonding(ring.format("") + BOX.format(area="1.0 mm2"), header=False)
    assert not rows2[("pe_lead", "long")].passes
    # a plug fuse above the breaker does not raise the rating
    r3, _ = bonding(
        ring.replace("breaker 32 A", "breaker 6 A").format(", plug-fuse 13 A")
        + BOX.format(area="1.0 mm2"),
        header=False,
    )
    assert [t.current for t in r3.bonding.tests if t.name == "long"] == [12.0]


def test_a_plug_fuse_out_of_its_range_is_a_located_error():
    from groundcheck.core.errors import PlanErrors

    text = 'plan "t"\nmains 230 V 50 Hz, fuse 2 A slow, plug-fuse 32 A\n'
    with pytest.raises(PlanErrors, match=r"1 A to 16 A|16 A"):
        plan(text + BOX.format(area="1.0 mm2"), header=False)


def test_the_text_names_the_fastenings_that_dissipate_most(cli):
    """docs/language.md: a fastening's contact power and voltage are reported, not judged — in the
    text too, under the bonding table. Worked by hand for the outside builder's line preamp: its
    front panel hangs on two 5 Ω screws in parallel, so the 25 A short test puts 12.5 A through
    each: 12.5 A × 5 Ω = 62.5 V and 12.5² × 5 = 781 W."""
    from pathlib import Path

    plan = Path(__file__).parent / "plans" / "line-preamp-anodised-facia.gplan"
    _, out, _ = cli("check", str(plan), "--fail-on", "never", "--no-hum")
    (line,) = [x for x in out.splitlines() if x.startswith("  fastenings (contact voltage")]
    assert "facia_l (short) 62.5 V, 781 W at 12.5 A" in line
    assert "facia_r (short) 62.5 V, 781 W at 12.5 A" in line
