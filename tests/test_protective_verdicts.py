"""Protective-earth verdicts that no default, option or stated figure can talk out of a danger: the
TT fault loop through the installation's electrode, the TT rules of IEC 60364-4-41 411.5, stated
figures that only make a verdict stricter, touchable by default, breaking capacity against every
prospective current, the protective conductor sized against the cord, breakers' let-through, and
the fault loop at the cables' operating temperature.

Every expected figure is worked by hand here from the tables named beside it (IEC 60228 class 2 and
5 maximum resistances, IEC 60127-2 pre-arcing limits and IEC 61008-1 break times from memory, IEC
60364-4-41 Table 41.1).
"""

import math

import pytest

from groundcheck import load_text
from groundcheck.analysis import analyze
from groundcheck.core.errors import PlanErrors

from helpers import plan

BODY = """
metal deck: aluminium 2 mm, 300 x 200 mm{exposure}
point pe_stud: stud, at 20,180 on deck
wire pe_lead: mains.pe to pe_stud, 1 m, {area}, protective
bolt pe_bolt: pe_stud to deck, contact 0.5 mohm
"""

RHO = 1.7241e-8  # IEC 60028 annealed copper at 20 °C, Ω·m
HOT = (230.0 + 70.0) / 250.0  # IEC 60228's factor to 70 °C (PVC, IEC 60364-5-52 Table 52.1)
CIRCUIT = 12.1e-3 * 20.0  # IEC 60228 class 2, 1.5 mm², 20 m (the default final circuit)
CORD = 26.0e-3 * 2.0  # IEC 60228 class 5, 0.75 mm², 2 m (the default cord)


def r_path(area_mm2: float) -> float:
    return RHO * 1.0 / (area_mm2 * 1e-6) + 0.5e-3  # the 1 m protective wire and the bolt's contact


def run(mains: str, area: str = "1.0 mm2", exposure: str = ", touchable"):
    return analyze(
        plan(
            f'plan "t"\nmains {mains}\n' + BODY.format(area=area, exposure=exposure), header=False
        )
    )


def found(r, code):
    return [f for f in r.findings if f.code == code]


def test_tt_electrode_is_in_the_fault_loop():
    # 200 Ω electrode, no loop stated: Ze = R_A + the supply's own 1 Ω (TT_SOURCE_LOOP, from
    # memory)
    r = run("230 V 50 Hz, system TT, electrode 200 ohm, fuse 500 mA slow, breaking high")
    z = 201 + 0.2 / 0.5 + 2 * CIRCUIT * HOT + 2 * CORD * HOT + r_path(1.0)
    i_f = 230 / z  # ≈ 1.13 A, below 2.75 In = 1.375 A: no assured opening
    (p,) = r.safety.parts
    assert p.fault_current == pytest.approx(i_f, rel=1e-9)
    assert p.touch_voltage == pytest.approx(
        i_f * (r_path(1.0) + CORD * HOT + CIRCUIT * HOT + 200), rel=1e-9
    )
    assert 220 < p.touch_voltage < 230  # the chassis sits near U0, never above it
    (f,) = found(r, "GC208")
    assert f.severity == "danger" and "too little" in f.message
    # the neighbouring case: a 30 mA RCD sees about 38 × IΔn and opens within 0.04 s; 200 Ω × 30 mA
    # = 6 V
    r = run(
        "230 V 50 Hz, system TT, electrode 200 ohm, fuse 500 mA slow, breaking high, rcd 30 mA"
    )
    assert not found(r, "GC208") and not found(r, "GC220")
    assert r.safety.parts[0].device == "rcd" and r.safety.parts[0].clear_time == 0.04


@pytest.mark.parametrize(
    "text,where",
    [
        (
            "230 V 50 Hz, system TT, loop-impedance 21 ohm, electrode 200 ohm",
            "larger than the whole external loop",
        ),
        ("230 V 50 Hz, system TN-S, electrode 20 ohm", "of a TT or an IT supply only"),
    ],
)
def test_an_electrode_that_cannot_be_is_a_located_error(text, where):
    with pytest.raises(PlanErrors) as e:
        load_text(f'plan "t"\nmains {text}\n', "t.gplan")
    assert where in str(e.value) and "t.gplan:2:" in str(e.value)


@pytest.mark.parametrize("rcd_ma,electrode", [(30, 2000), (100, 600), (300, 200)])
def test_tt_electrode_times_residual_current_over_50_v_is_a_danger(rcd_ma, electrode):
    # IEC 60364-4-41 411.5.3: R_A × IΔn ≤ 50 V; each case is 60 V
    r = run(
        f"230 V 50 Hz, system TT, electrode {electrode} ohm, fuse 2 A slow, breaking high, rcd "
        f"{rcd_ma} mA"
    )
    (f,) = found(r, "GC220")
    assert f.severity == "danger" and f.figures["electrode_times_rcd_v"] == pytest.approx(60.0)
    # the fix names the electrode to reach (50 V / IΔn, two figures rounded down, never above a
    # 200 Ω electrode that soil and season move: 1667 → 200, 500 → 200, 166.7 → 160 Ω, as the
    # advisor's target) and a 30 mA RCD where the electrode allows it (the additional protection
    # socket outlets need too), else the largest preferred rating it allows (IEC 61008-1's 10,
    # 30, 100, 300 mA, from memory): 2 kΩ → 10 mA, 600 Ω → 30 mA, 200 Ω → 30 mA
    assert f"at most { {30: 200, 100: 200, 300: 160}[rcd_ma] } Ω" in f.fix
    assert {30: "10 mA RCD", 100: "30 mA RCD", 300: "30 mA RCD"}[rcd_ma] in f.fix
    if rcd_ma != 30:  # the RCD first, and once
        assert f.fix.startswith("protect the circuit with a 30 mA RCD")
    # the neighbour at 45 V passes
    ok = run(
        f"230 V 50 Hz, system TT, electrode {electrode * 0.75:g} ohm, fuse 2 A slow, breaking "
        f"high, rcd {rcd_ma} mA"
    )
    assert not found(ok, "GC220")


def test_rcd_timed_at_the_actual_fault_current():
    # 5 kΩ electrode: I ≈ 230/5001 ≈ 46 mA = 1.5 × IΔn, where a general-type RCD may take 0.3 s
    # (IEC 61008-1, from memory), over TT's 0.2 s at 230 V
    r = run("230 V 50 Hz, system TT, electrode 5 kohm, fuse 2 A slow, breaking high, rcd 30 mA")
    (p,) = r.safety.parts
    assert 1.0 <= p.fault_current / 0.03 < 2.0 and p.clear_time == 0.3
    assert found(r, "GC208")[0].severity == "danger"
    assert found(r, "GC220")


def test_tt_without_rcd_gets_a_note_that_says_so():
    r = run("230 V 50 Hz, system TT, loop-impedance 2 ohm, fuse 2 A fast, breaking high")
    assert not found(r, "GC208") and [f.severity for f in found(r, "GC221")] == ["note"]


def test_stated_clearing_time_never_loosens_the_verdict():
    # TT, default loop 21 Ω: I ≈ 10.5 A = 5.3 In of a 2 A time-lag fuse → up to 3 s pre-arcing (4
    # In limit, IEC 60127-2 sheet 3, from memory) plus 10 ms arcing; the plan's 'clears 0.1 s'
    # cannot remove the danger
    r = run("230 V 50 Hz, system TT, fuse 2 A slow, breaking high, clears 0.1 s")
    (f,) = found(r, "GC208")
    assert f.severity == "danger" and f.figures["clear_time_s"] == pytest.approx(3.01)
    assert found(r, "GC214")  # the contradiction is a finding of its own
    # a stricter stated figure is kept: 0.35 s where the table gives some 0.01 s (a 1 A fuse far
    # above 10 In); the larger, 0.35 s, is used and is still within TN's 0.4 s
    r = run("230 V 50 Hz, fuse 1 A slow, breaking high, clears 0.35 s")
    assert (
        r.safety.parts[0].clear_time == pytest.approx(0.35)
        and r.safety.parts[0].device == "stated"
    )


def test_stated_i2t_never_hides_the_adiabatic_danger():
    # 0.1 mm² protective wire, TN-S 0.8 Ω, 2 A time-lag fuse: far above 10 In, so the fuse lets
    # through its pre-arcing I²t at 10 In, (20 A)² × 0.3 s = 120 A²s, plus I² over 10 ms of arcing;
    # the cold case is worst
    r = run("230 V 50 Hz, fuse 2 A slow, breaking high, i2t 1 A2s", area="0.1 mm2")
    i_cold = 230 / (0.8 + 0.1 + 2 * CIRCUIT + 2 * CORD + r_path(0.1))
    i2t = 120 + i_cold**2 * 0.01
    row = next(c for c in r.safety.conductors if c.conductor == "pe_lead")
    assert row.k == 115.0  # IEC 60364-5-54 Table A.54.2, PVC, a core of a cable
    assert row.required * 1e6 == pytest.approx(math.sqrt(i2t) / 115, rel=1e-6)
    assert not row.survives and any(f.severity == "danger" for f in found(r, "GC207"))


def test_metal_is_touchable_unless_written_internal():
    # TT, no RCD, 2 A time-lag fuse: 3.01 s against 0.2 s — a danger whether or not 'touchable' is
    # written
    default = run("230 V 50 Hz, system TT, fuse 2 A slow, breaking high", exposure="")
    assert default.plan.metal("deck").touchable
    assert found(default, "GC208")[0].severity == "danger"
    internal = run("230 V 50 Hz, system TT, fuse 2 A slow, breaking high", exposure=", internal")
    assert not found(internal, "GC208")


def test_breaking_capacity_is_checked_whatever_is_touchable():
    # a glass fuse on a stiff TN-C-S supply, no part touchable: the prospective current (cables
    # cold, 20 °C; the fuse replaced by a link, as breaking capacities are rated: IEC 60127-1) is
    # about 230/(0.35 + 2·0.242 + 2·0.052) ≈ 245 A, beyond 35 A (IEC 60127-2 low breaking, from
    # memory)
    r = run("230 V 50 Hz, system TN-C-S, fuse 500 mA slow, breaking low", exposure=", internal")
    (f,) = found(r, "GC211")
    z = 0.35 + 2 * CIRCUIT + 2 * CORD
    assert f.severity == "danger" and f.figures["fault_current_a"] == pytest.approx(
        230 / z, rel=1e-4
    )
    ok = run("230 V 50 Hz, system TN-C-S, fuse 500 mA slow, breaking high", exposure=", internal")
    assert not found(ok, "GC211")


def test_a_line_to_neutral_short_defeats_a_glass_fuse_in_tt_too():
    # TT with a 100 Ω electrode: the earth fault is about 2.3 A, but a line-to-neutral short inside
    # the equipment does not pass through the electrode: 230/(0.35 + 2·0.242 + 2·0.052) ≈ 245 A
    # (the fuse replaced by a link)
    r = run("230 V 50 Hz, system TT, electrode 100 ohm, fuse 500 mA slow, breaking low, rcd 30 mA")
    (f,) = found(r, "GC211")
    assert "line-to-neutral" in f.message
    assert f.figures["short_circuit_a"] == pytest.approx(
        230 / (0.35 + 2 * CIRCUIT + 2 * CORD), rel=1e-4
    )
    assert f.figures["earth_fault_a"] < 3


def test_protective_conductor_sized_against_the_cord_when_no_line_conductor_is_stated():
    r = run("230 V 50 Hz, fuse 2 A slow, breaking high", area="0.2 mm2")
    (f,) = found(r, "GC204")
    assert f.severity == "danger" and "0.75 mm², the mains cord" in f.message
    assert not found(run("230 V 50 Hz, fuse 2 A slow, breaking high", area="0.75 mm2"), "GC204")


def test_breaker_let_through_matches_the_clearing_time_it_reports():
    # B16 at ≥ 5 In opens within 0.1 s (IEC 60898-1, from memory), the time reported; from 1.5 × 5
    # In = 120 A on, its let-through is I² over one period of the mains, 20 ms (the magnetic
    # release's milliseconds, from memory); cold case worst
    r = run("230 V 50 Hz, breaker 16 A B", area="0.1 mm2")
    i_cold = 230 / (0.8 + 2 * CIRCUIT + 2 * CORD + r_path(0.1))
    assert i_cold > 120
    row = next(c for c in r.safety.conductors if c.conductor == "pe_lead")
    assert r.safety.parts[0].clear_time == 0.1
    assert row.required * 1e6 == pytest.approx(math.sqrt(i_cold**2 * 0.02) / 115, rel=1e-6)
    assert not row.survives
    # 0.2 mm² survives: √(I²·0.02)/115 ≈ 0.18 mm²
    r = run("230 V 50 Hz, breaker 16 A B", area="0.2 mm2")
    assert next(c for c in r.safety.conductors if c.conductor == "pe_lead").survives
    # near the band's edge (a 1.7 Ω loop: about 92 A, 5.8 In, under 120 A) the 0.1 s bound stays
    r = run("230 V 50 Hz, breaker 16 A B, loop-impedance 1.7 ohm", area="0.2 mm2")
    i = r.safety.parts[0].fault_current
    assert 80 < i < 120
    row = next(c for c in r.safety.conductors if c.conductor == "pe_lead")
    assert row.required * 1e6 == pytest.approx(math.sqrt(i**2 * 0.1) / 115, rel=0.05)


def test_fault_loop_at_the_cables_operating_temperature():
    # TN-S, Ze 3 Ω, T6.3A: at 70 °C the fault current is just under 10 In, so the 4 In limit
    # applies (3 s pre-arcing): over TN's 0.4 s. With the cables at 20 °C it would be just over 10
    # In (≈ 0.31 s) and pass.
    hot = run("230 V 50 Hz, fuse 6.3 A slow, breaking high, loop-impedance 3 ohm")
    z = 3 + 0.2 / 6.3 + 2 * CIRCUIT * HOT + 2 * CORD * HOT + r_path(1.0)
    z20 = 3 + 0.2 / 6.3 + 2 * CIRCUIT + 2 * CORD + r_path(1.0)
    assert 230 / z / 6.3 < 10 < 230 / z20 / 6.3
    assert hot.safety.parts[0].fault_current == pytest.approx(230 / z, rel=1e-9)
    assert found(hot, "GC208")[0].figures["clear_time_s"] == pytest.approx(3.01)
    # the neighbour: a 2.8 Ω loop reaches 10 In with the cables hot and clears within 0.4 s
    ok = run("230 V 50 Hz, fuse 6.3 A slow, breaking high, loop-impedance 2.8 ohm")
    assert 230 / (z - 0.2) / 6.3 > 10 and not found(ok, "GC208")
    # a hotter cable (XLPE, 90 °C) may be stated; a colder one would loosen the verdict and is
    # refused
    xlpe = run(
        "230 V 50 Hz, fuse 6.3 A slow, breaking high, loop-impedance 2.8 ohm, cable-temperature "
        "90 C"
    )
    assert xlpe.safety.supply.circuit_line == pytest.approx(CIRCUIT * (230 + 90) / 250, rel=1e-9)
    with pytest.raises(PlanErrors) as e:
        load_text(
            'plan "t"\nmains 230 V 50 Hz, fuse 6.3 A slow, cable-temperature 20 C\n', "t.gplan"
        )
    assert "t.gplan:2:" in str(e.value) and "below the 70 °C" in str(e.value)


def test_a_stated_short_circuit_current_only_makes_the_breaking_check_stricter():
    # computed line-to-neutral prospective current on TN-C-S (the fuse replaced by a link):
    # 230/(0.35 + 2·0.242 + 2·0.052) ≈ 245 A
    computed = 230 / (0.35 + 2 * CIRCUIT + 2 * CORD)
    low = run("230 V 50 Hz, system TN-C-S, fuse 500 mA slow, breaking 150 A, short-circuit 100 A")
    assert low.safety.supply.short_circuit == pytest.approx(computed, rel=1e-9)
    assert found(low, "GC211")[0].severity == "danger"
    high = run("230 V 50 Hz, system TN-C-S, fuse 500 mA slow, breaking high, short-circuit 3 kA")
    assert high.safety.supply.short_circuit == 3000.0 and found(high, "GC211")


def test_signal_only_metal_is_exempt_and_says_so():
    text = (
        BODY.format(area="1.0 mm2", exposure=", touchable")
        + "metal pedal: steel 1 mm, 120 x 90 mm, at 500,0{}\n"
    )
    head = 'plan "t"\nmains 230 V 50 Hz, fuse 2 A slow, breaking high\n'
    r = analyze(plan(head + text.format(""), header=False))
    assert [f.severity for f in found(r, "GC205")] == ["danger"]
    r = analyze(plan(head + text.format(", signal-only"), header=False))
    assert not found(r, "GC205") and [f.elements for f in found(r, "GC222")] == [("pedal",)]


@pytest.mark.parametrize("electrode", [1, 10, 50, 200, 1000, 5000, 20000])
@pytest.mark.parametrize("rcd", ["", ", rcd 30 mA"])
def test_touch_voltage_never_exceeds_the_supply(electrode, rcd):
    r = run(
        f"230 V 50 Hz, system TT, electrode {electrode} ohm, fuse 1 A slow, breaking high{rcd}"
    )
    assert 0 < r.safety.parts[0].touch_voltage < 230
