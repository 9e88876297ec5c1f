"""Protective-earth figures against IEC 60364-5-54 and hand calculations."""

import math

import pytest

from groundcheck.analysis import analyze
from groundcheck.safety import ADIABATIC_K, clearing_time, protective_figures

from helpers import plan


def k_formula(theta_i, theta_f):
    # IEC 60364-5-54 543.1.2 / BS 7671: k = 226·√ln(1 + (θf − θi)/(234.5 + θi)) for copper
    return 226 * math.sqrt(math.log(1 + (theta_f - theta_i) / (234.5 + theta_i)))


@pytest.mark.parametrize("ins,in_cable,ti,tf", [("pvc", True, 70, 160), ("pvc", False, 30, 160),
                                                 ("xlpe", True, 90, 250), ("xlpe", False, 30, 250)])
def test_adiabatic_k_table_matches_formula(ins, in_cable, ti, tf):
    k = ADIABATIC_K[ins][0 if in_cable else 1]
    assert k == pytest.approx(k_formula(ti, tf), rel=0.005)


PE_PLAN = """
metal deck: aluminium 2 mm, 300 x 200 mm, touchable
point pe_stud: stud, at 20,180 on deck
wire pe_lead: mains.pe to pe_stud, 1 m, 1.0 mm2, protective
bolt pe_bolt: pe_stud to deck, contact 0.5 mohm
"""


def test_touch_voltage_and_fault_current_by_hand():
    hdr = 'plan "t"\nmains 230 V 50 Hz, fuse 2 A slow, line-conductor 0.75 mm2, cord 2 m 0.75 mm2, loop-impedance 0.8 ohm\n'
    s = protective_figures(plan(hdr + PE_PLAN, header=False))
    (deck,) = s.parts
    r_path = 1.7241e-8 * 1.0 / 1e-6 + 0.5e-3              # ρL/A (IEC 60028) plus the bolt's contact
    cord = 1.7241e-8 * 2.0 / 0.75e-6
    assert deck.path_resistance == pytest.approx(r_path, rel=1e-9)
    i_f = 230 / (0.8 + 2 * cord + r_path)
    assert deck.fault_current == pytest.approx(i_f, rel=1e-9)
    assert deck.touch_voltage == pytest.approx(i_f * (r_path + cord), rel=1e-9)


def test_adiabatic_worked_example():
    # REFERENCE.md worked example: 1 kA for 0.1 s (I²t = 1e5 A²s) with k = 115 → S = 2.75 mm²
    hdr = 'plan "t"\nmains 230 V 50 Hz, fuse 16 A slow, i2t 100000 A2s, line-conductor 0.75 mm2\n'
    s = protective_figures(plan(hdr + PE_PLAN, header=False))
    row = next(r for r in s.conductors if r["conductor"] == "pe_lead")
    assert row["required_mm2"] == pytest.approx(2.75, rel=1e-3) and row["survives"] is False
    found = analyze(plan(hdr + PE_PLAN, header=False)).findings
    assert any(f.code == "GC207" and "pe_lead" in f.elements for f in found)


def test_clearing_time_table():
    # from memory: IEC 60127-2 sheet 3 (T) at 10 In at most 0.3 s; below 2.75 In no assured clearing
    t, i2t = clearing_time("slow", 1.0, 10.0)
    assert t == pytest.approx(0.3) and i2t == pytest.approx(30.0)
    t, i2t = clearing_time("slow", 1.0, 100.0)          # adiabatic above 10 In: I²t no larger than at 10 In
    assert i2t == pytest.approx(30.0) and t == pytest.approx(30.0 / 1e4)
    assert clearing_time("slow", 1.0, 2.0) is None
    assert clearing_time("breaker-B", 16.0, 80.0) == pytest.approx((0.01, 64.0))   # IEC 60898-1 B: 5 In
    assert clearing_time("breaker-C", 16.0, 80.0) is None


def test_parallel_protective_conductor_never_raises_resistance():
    hdr = 'plan "t"\nmains 230 V 50 Hz, fuse 2 A slow, line-conductor 0.75 mm2\n'
    one = protective_figures(plan(hdr + PE_PLAN, header=False)).parts[0].path_resistance
    two = protective_figures(plan(hdr + PE_PLAN + "wire pe2: mains.pe to pe_stud, 3 m, 0.75 mm2, protective\n",
                                  header=False)).parts[0].path_resistance
    assert two < one
    assert two == pytest.approx(1 / (1 / (1.7241e-2) + 1 / (1.7241e-8 * 3 / 0.75e-6)) + 0.5e-3, rel=1e-9)


def test_no_mains_no_protective_figures():
    p = plan('plan "battery unit"\npoint a: pad\n', header=False)
    assert protective_figures(p) is None


def test_touch_voltage_held_too_long_is_a_danger():
    # a 1 Ω fastening in the protective path: I = U0/(Zs + 2 R_cord + R_path) lies between 4 and 10 times a 16 A
    # slow fuse's rating, so it may take up to 3 s (IEC 60127-2 sheet 3 limits, from memory) while the part
    # sits at I·(R_path + R_cord) > 50 V, the conventional touch-voltage limit of IEC 60364-4-41
    hdr = 'plan "t"\nmains 230 V 50 Hz, fuse 16 A slow, line-conductor 0.75 mm2, cord 2 m 0.75 mm2\n'
    text = hdr + PE_PLAN.replace("contact 0.5 mohm", "contact 1 ohm")
    found = [f for f in analyze(plan(text, header=False)).findings if f.code == "GC208"]
    assert len(found) == 1 and found[0].severity == "danger"
    r_path = 1.7241e-8 / 1e-6 + 1.0
    cord = 1.7241e-8 * 2.0 / 0.75e-6
    i_f = 230 / (0.8 + 2 * cord + r_path)
    assert 4 * 16 <= i_f < 10 * 16
    assert found[0].figures["touch_voltage_v"] == pytest.approx(i_f * (r_path + cord), abs=0.01)
    assert found[0].figures["clear_time_s"] == 3.0
