"""Installations as they hum: the stated supply, device leakage, the EMF a loaded cable induces in
its protective core, the voltage between the outlets an interconnect joins (by hand and against
ngspice), shield landings (GC113), class II devices and umbilicals."""

import math
import re
from pathlib import Path

import pytest

from groundcheck import PlanErrors, load, load_text
from groundcheck.analysis import analyze
from groundcheck.physics.circuit import build_circuit
from groundcheck.physics.coupling import plan_sources
from groundcheck.renderers.spice import to_spice

import spicetools
from helpers import needs_ngspice

#: two outlets on their own cables back to the main earthing terminal; the far one's cable carries
#: a load
TWO_OUTLETS = """plan "two outlets"
{supply}
point met: earthing-terminal
point wall_a: outlet
point wall_b: outlet
cable run_a: wall_a to met, 8 m, 2.5 mm2
cable run_b: wall_b to met, 25 m, 2.5 mm2, load 10 A, cores {cores}
device mixer: simple, plugged wall_a{leak}
device amp: simple, plugged wall_b{leak}
interconnect link: mixer.gnd to amp.gnd, 4 m, 0.1 mm2, {ends}, unbalanced, gain 26 dB, channel amp
"""


def _plan(supply="", cores="L-N-PE", leak=", leakage 0 mA", ends="terminated both"):
    return load_text(
        TWO_OUTLETS.format(supply=supply, cores=cores, leak=leak, ends=ends), "two.gplan"
    )


# hand calculation: M' = (μ0/2π)·ln 2 = 2e-7 × 0.693147 = 1.386294e-7 H/m (flat cable, protective
# core beside the neutral: d_PN = p, d_PL = 2p; Ramo, Whinnery, Van Duzer §2.4, from memory); E =
# 2π·50 Hz × 1.386294e-7 H/m × 25 m × 10 A = 314.1593 × 1.386294e-7 × 250 = 1.088793e-2 V
HAND_EMF = 1.088793e-2


def test_a_loaded_flat_cable_induces_the_hand_calculated_emf_in_its_protective_core():
    o = analyze(_plan()).outlets
    ((cable, f, emf, m),) = o.emfs
    assert (cable, f) == ("run_b", 50.0)
    assert m == pytest.approx(1.386294e-7, rel=1e-6)
    assert emf == pytest.approx(HAND_EMF, rel=1e-5)


def test_a_cable_with_its_protective_core_between_line_and_neutral_induces_none():
    for cores in ("L-PE-N", "round"):
        o = analyze(_plan(cores=cores)).outlets
        assert o.emfs == [] and o.pairs[0].open_total == 0.0


def test_unplugged_the_outlet_pair_voltage_is_the_cables_emf():
    """With the interconnect unplugged no current flows round the loop: the meter between the two
    earth pins reads the EMF itself (no leakage stated here)."""
    (pair,) = analyze(_plan()).outlets.pairs
    assert (pair.interconnect, pair.a, pair.b) == ("link", "wall_a", "wall_b")
    assert pair.open[50.0] == pytest.approx(HAND_EMF, rel=1e-5)
    assert pair.drivers[0][:2] == ("run_b.induced", "induced")
    assert pair.planned_total < pair.open_total  # the loop current's drop in the cables lowers it


@needs_ngspice
def test_the_planned_outlet_pair_voltage_matches_ngspice_with_the_emf_as_a_series_source():
    """The exported network with the cable's EMF written as a voltage source in series with its
    protective core (not the equivalent current groundcheck solves with): ngspice's voltage between
    the outlets agrees to 1e-6."""
    plan = _plan()
    got = analyze(plan).outlets.pairs[0].planned[50.0]
    c = build_circuit(plan)
    sources = [
        (s.name, s.a, s.b, s.parts[50.0])
        for s in plan_sources(plan, {}, 50.0, c)
        if s.kind != "induced"
    ]
    net = to_spice(c, plan.title, sources, frequency=50.0, analysis="ac")
    # run_b's inductor ends on the main earthing terminal (node 0): put the EMF (peak = √2 × rms)
    # between them
    net, n = re.subn(r"^(L_run_b \S+) 0 ", r"\1 emf 0 ", net, flags=re.M)
    assert n == 1
    net = net.replace(".ac lin", f"Vemf emf 0 DC 0 AC {HAND_EMF * math.sqrt(2):.12g} 0\n.ac lin")
    na, nb = (f"n{c.point_node[x]}" for x in ("wall_a", "wall_b"))
    v = spicetools.run(net, "ac lin 1 50 50\nprint all > OUT")
    spice = abs(
        v[f"v({na})" if f"v({na})" in v else na] - v[f"v({nb})" if f"v({nb})" in v else nb]
    ) / math.sqrt(2)
    assert spice == pytest.approx(got, rel=1e-6)


def test_device_leakage_from_the_default_y_capacitor_at_the_stated_supply():
    """A class I simple device leaks U0·2πf·C through its 2.2 nF line-to-chassis capacitor: by hand
    230 V × 314.1593 × 2.2e-9 F = 1.589645e-4 A at 230 V 50 Hz; 120 V × 376.9911 × 2.2e-9 =
    9.952565e-5 A at 120 V 60 Hz."""
    for supply, amps, hz in (
        ("supply 230 V 50 Hz", 1.589645e-4, 50.0),
        ("supply 120 V 60 Hz", 9.952565e-5, 60.0),
    ):
        plan = _plan(supply=supply, leak="")
        leaks = {c.name: c.parts for c in plan.currents if c.role == "leakage"}
        assert set(leaks) == {"mixer.leakage", "amp.leakage"}
        ((i, f),) = leaks["amp.leakage"]
        assert i == pytest.approx(amps, rel=1e-6) and f == hz
    stated = _plan(supply="supply 230 V 50 Hz", leak=", y-capacitor 4.7 nF")
    assert stated.currents[0].parts[0][0] == pytest.approx(
        230 * 2 * math.pi * 50 * 4.7e-9, rel=1e-9
    )
    assert not [c for c in _plan(leak="").currents]  # no supply stated: no default leakage


def test_studio_type_outlet_voltages_name_every_driver():
    plan = _plan(supply="supply 230 V 50 Hz", leak="")
    (pair,) = analyze(plan).outlets.pairs
    assert {d[0] for d in pair.drivers} == {"run_b.induced", "mixer.leakage", "amp.leakage"}
    # the cable's EMF (HAND_EMF, by hand above) dominates: the two leakage currents (0.16 mA each,
    # 230 V × 2π·50 Hz × 2.2 nF) drop tens of µV in the cords, adding under 0.01 % in power
    assert pair.open_total == pytest.approx(HAND_EMF, rel=1e-4)


@pytest.mark.parametrize(
    "supply, message",
    [
        ("supply 230 V 50 Hz\nmains 230 V 50 Hz", "both 'mains' and 'supply'"),
        ("supply 230 V 60 Hz", None),
        ("supply 1e309 V 50 Hz", "supply voltage must be a finite number"),
        ("supply 230 V 2000 Hz", "supply frequency 2000 Hz is outside"),
    ],
)
def test_supply_errors(supply, message):
    if message is None:
        _plan(supply=supply)  # simple devices take the stated supply
        return
    with pytest.raises(PlanErrors) as e:
        _plan(supply=supply)
    assert message in str(e.value)


def test_a_device_for_another_supply_is_refused(tmp_path):
    (tmp_path / "us.gplan").write_text(
        'plan "us"\nmains 120 V 60 Hz\nmetal case: steel 1 mm, touchable\n'
        "wire pe: mains.pe to case, 30 mm, 1 mm2, protective\n"
    )
    text = 'plan "i"\nsupply 230 V 50 Hz\npoint w: outlet\ndevice us: "us.gplan", plugged w\n'
    with pytest.raises(PlanErrors) as e:
        load_text(text, str(tmp_path / "i.gplan"), root=tmp_path)
    assert "for a 120 V 60 Hz supply, but the installation's supply is 230 V 50 Hz" in str(e.value)


def test_cable_attributes_belong_to_cables():
    with pytest.raises(PlanErrors) as e:
        load_text(
            'plan "x"\npoint a: outlet\npoint b: outlet\nwire w: a to b, 1 m, 1 mm2, load 3 A\n',
            "x.gplan",
        )
    assert "load is an attribute of a cable, not of a wire" in str(e.value)


ROOM = Path(__file__).resolve().parent.parent / "examples" / "studio" / "recording-room.gplan"


def test_the_recording_room_names_every_driver_of_its_outlet_voltages():
    r = analyze(load(ROOM))
    pairs = {p.interconnect: p for p in r.outlets.pairs}
    assert set(pairs) == {"pre_out", "desk_out"}  # the USB cable's ends share the desk's outlet
    p = pairs["desk_out"]
    # by hand: 2π·50·1.386294e-7·25·10 = 10.888 mV and 2π·150·1.386294e-7·25·2 = 6.533 mV, in power
    # 12.698 mV; the leakage drops (tens of µV, in quadrature) add under 0.01 %
    assert p.open_total == pytest.approx(math.hypot(10.88793e-3, 6.532758e-3), rel=1e-3)
    assert {d[0] for d in p.drivers} == {"run_rack.induced", "monitors.leakage", "desk.leakage"}
    # each leakage's own drop, by hand from annealed copper's 1.7241e-8 Ω·m (IEC 60028) at 20 °C:
    # the monitors' 230 V × 2π·50 Hz × 2.2 nF = 0.15896 mA over the strip cord (1.5 m of 1 mm²,
    # 25.862 mΩ) and the rack cable (25 m of 2.5 mm², 172.41 mΩ) is 31.52 µV; the desk's 0.33961 mA
    # (4.7 nF) over its cable (12 m, 82.757 mΩ) 28.11 µV (the cables' reactance at 50 Hz adds under
    # 1 %)
    volts = {name: v for name, _, v in p.drivers}
    assert volts["monitors.leakage"] == pytest.approx(31.52e-6, rel=0.01)
    assert volts["desk.leakage"] == pytest.approx(28.11e-6, rel=0.01)


def test_a_shield_on_the_signal_ground_is_found_and_landing_it_on_the_chassis_removes_its_hum():
    r = analyze(load(ROOM))
    (f,) = [f for f in r.findings if f.code == "GC113"]
    assert "micpre.in_gnd" in f.elements and f.actions == (
        ("shield-to", "pre_out", "micpre.out_pin1"),
    )
    assert r.hum.channels["micpre.main"].total_v > 1e-3
    fixed = ROOM.read_text().replace("shield-to signal chassis", "shield-to chassis")
    r2 = analyze(load_text(fixed, str(ROOM), root=ROOM.parent))
    assert not [f for f in r2.findings if f.code == "GC113"]
    assert r2.hum.channels["micpre.main"].total_v < 1e-9


def test_a_class_ii_device_has_no_protective_terminal_and_leaks_through_its_interconnect():
    plan = load(ROOM)
    names = {p.name for p in plan.points}
    assert "laptop.mains.pe" not in names and "desk.mains.pe" in names
    (leak,) = [c for c in plan.currents if c.name == "laptop.leakage"]
    assert leak.a == "laptop.gnd"
    # 230 V × 2π·50 Hz × 1 nF = 72.257 µA (by hand)
    assert leak.parts[0][0] == pytest.approx(72.2566e-6, rel=1e-5)


def test_umbilical_cores_are_conductors_of_their_own_kind_and_must_share_a_length(tmp_path):
    plan = load(ROOM)
    cores = {c.name: c for c in plan.conductors if c.kind == "core"}
    assert set(cores) == {"micpre.ub_0v", "micpre.ub_pe"}
    assert cores["micpre.ub_pe"].role == "protective" and cores["micpre.ub_0v"].role == "return"
    text = (
        'plan "u"\npoint a: tag\npoint b: tag\npoint c: tag\npoint d: tag\n'
        "core x: a to b, in ub, 1.5 m, 0.5 mm2\ncore y: c to d, in ub, 2 m, 0.5 mm2\n"
    )
    with pytest.raises(PlanErrors) as e:
        load_text(text, "u.gplan")
    assert "core y is 2 m but x, in the same umbilical ub, is 1.5 m" in str(e.value)


def test_the_reports_show_the_outlet_voltages(cli, tmp_path):
    code, out, _ = cli("check", str(ROOM))
    assert "Voltage between the outlets' earths that each interconnect joins" in out
    assert "desk_out" in out and "12.7 mV" in out and "run_rack.induced 12.7 mV" in out
    assert "run_rack: its load induces 10.9 mV at 50 Hz along its protective core" in out
    page = tmp_path / "room.html"
    cli("report", str(ROOM), "-o", str(page))
    html = page.read_text()
    assert 'id="outlet-voltages"' in html and "12.7 mV" in html and 'id="device-earths"' in html


def test_the_advice_plugs_the_desk_in_beside_the_preamp_then_lands_the_shield_on_the_chassis(cli):
    code, out, _ = cli("suggest", str(ROOM))
    first = out.split("\n2. ")[0]
    # the case's own fix (pin 1 to the chassis, AES48) comes next; the output's pin 1 run to the
    # preamp's star by a wire of its own, while the shield lands there, is refused: the shield's
    # current would cross the box to the star (a balanced shield goes to the chassis at the entry)
    second = out.split("\n2. ")[1].split("\n3. ")[0]
    refused = out.split("Considered and rejected:")[1]
    assert "\n3. " not in out.split("Considered and rejected:")[0]
    assert (
        "run micpre.out_pin1 to micpre.star by its own wire (micpre.out_gnd)" in refused
        and "micpre.out_pin1 is where the shield of pre_out lands (a balanced socket's pin 1)"
        in refused
    )
    assert "1. plug desk in at strip, beside micpre" in first and "[answers GC101]" in first
    assert (
        "-device desk: simple, plugged wall_desk" in first
        and "+device desk: simple, plugged strip" in first
    )
    # the figures it predicts are those of a fresh analysis of the plan and of the plan as changed
    # (the desk's statement, as its diff shows), and "quieter" is their difference
    m = re.search(r"hum monitors: (-?[\d.]+) dBV → (-?[\d.]+) dBV \(([\d.]+) dB quieter\)", first)
    before = analyze(load(ROOM)).hum.channels["monitors"].total_v
    text = ROOM.read_text().replace("plugged wall_desk, cord", "plugged strip, cord")
    after = analyze(load_text(text, str(ROOM), root=ROOM.parent)).hum.channels["monitors"].total_v
    shown = [float(m.group(k)) for k in (1, 2, 3)]
    assert shown[0] == pytest.approx(20 * math.log10(before), abs=0.05)
    assert shown[1] == pytest.approx(20 * math.log10(after), abs=0.05)
    assert shown[2] == pytest.approx(shown[0] - shown[1], abs=0.15)  # each shown to 0.1 dB
    assert (
        "land the shield of pre_out on the chassis where it enters" in second
        and "[answers GC113]" in second
    )
    assert "-    shield-to signal chassis\n   +    shield-to chassis" in second
    before = analyze(load(ROOM)).hum.channels["micpre.main"].total_v
    m = re.search(r"hum micpre\.main: (-?[\d.]+) dBV → below -140 dBV", second)
    assert float(m.group(1)) == pytest.approx(20 * math.log10(before), abs=0.05)
    # and landed on the chassis, nothing is left (the GC113 test below checks the plan so changed)


def test_the_planned_outlet_voltages_read_from_the_hum_solves_equal_their_own_solve():
    from groundcheck.physics.outlets import outlet_voltages

    plan = load(ROOM)
    r = analyze(plan)
    own = outlet_voltages(
        plan, r.circuit, {rr.name: rr for rr in r.rectifiers}, r.options.max_frequency
    )
    for a, b in zip(r.outlets.pairs, own.pairs):
        assert a.planned.keys() == b.planned.keys()
        for f in a.planned:
            assert a.planned[f] == pytest.approx(b.planned[f], rel=1e-9, abs=1e-15)


def test_an_umbilicals_0v_core_gets_the_advice_of_any_return(cli):
    """The supply box's umbilical written as cores ('core … in umb') gets the same first
    suggestion, with the same predicted figures, as the same umbilical written as plain wires: its
    0 V core is a return like any other."""
    plans = Path(__file__).resolve().parent / "plans" / "outboard-supply"
    firsts = []
    for name in ("phono.gplan", "phono-cores.gplan"):
        _, out, _ = cli("suggest", str(plans / name))
        firsts.append(out.split("\n1. ")[1].split("\n   ---")[0])
    assert firsts[0] == firsts[1] and "[answers GC102]" in firsts[0]
    plan = load(plans / "phono-cores.gplan")
    assert {c.name: (c.kind, c.bundle) for c in plan.conductors if c.bundle} == {
        "umb_0v": ("core", "umb"),
        "umb_ct": ("core", "umb"),
    }


def test_loop_currents_get_loop_advice_not_return_path_advice():
    """A leakage current or a cable's induced EMF reaches a stage only round a loop: the advice
    breaks the loop or moves the shield, never 'give it a return path', and never asks for a
    balanced link that already is one."""
    r = analyze(load(ROOM))
    fixes = {f.elements[0]: f.fix for f in r.findings if f.code == "GC301"}
    assert "shield-to chassis" in fixes["micpre.in_gnd"]
    assert (
        "balanced interconnect" not in fixes["pre_out"] and "shield-to chassis" in fixes["pre_out"]
    )
    # desk_out joins two bought devices with unbalanced sockets: its shield is the signal's
    # return and stays; no balanced link or lift is offered for them (the advisor refuses both)
    assert "which stays" in fixes["desk_out"] and "one outlet or strip" in fixes["desk_out"]
    assert "use a balanced interconnect" not in fixes["desk_out"]
    assert all(
        "return path of its own" not in x and "never lift the protective earth" in x
        for x in fixes.values()
    )
    assert all(
        f.message.startswith("leakage current ")
        for f in r.findings
        if f.code == "GC102" and f.elements[0].endswith(".leakage")
    )


def test_the_live_view_shows_the_installation_tables():
    from groundcheck.renderers.live import live_state

    st = live_state(analyze(load(ROOM)), None, None, None, {}, 0.1)
    panel = st["sections"]["protective"]
    assert 'id="device-earths"' in panel and 'id="outlet-voltages"' in panel and "12.7 mV" in panel


def test_an_installation_without_positions_is_drawn_as_the_whole_system(cli, tmp_path):
    plan = tmp_path / "two.gplan"
    plan.write_text(
        TWO_OUTLETS.format(
            supply="supply 120 V 60 Hz", cores="L-N-PE", leak="", ends="terminated both"
        )
    )
    code, _, err = cli("draw", str(plan), "-o", str(tmp_path / "two.svg"))
    assert code == 0 and "wrote the physical view" in err and "topology view" not in err
    assert (
        "note: devices are drawn as boxes; a device's own wiring is in the drawing of its own plan"
        in err
    )
    svg = (tmp_path / "two.svg").read_text()
    assert all(
        name in svg for name in ("mixer", "amp", "wall_a", "wall_b", "met", "run_b", "link")
    )


def test_compare_shows_the_outlet_voltage_change_of_a_cable_with_its_protective_core_in_the_middle(
    cli, tmp_path
):
    """The same room with the rack circuit's cable laid L-PE-N: no EMF along its protective core,
    so only the leakage drops remain between the outlets and the monitors' hum falls by more than
    40 dB."""
    after = tmp_path / "l-pe-n.gplan"
    after.write_text(
        ROOM.read_text().replace("cores L-N-PE, load 10 A", "cores L-PE-N, load 10 A")
    )
    (tmp_path / "devices").mkdir()  # a plan's library lies inside its own folder: a copy beside it
    for g in (ROOM.parent / "devices").glob("*.gplan"):
        (tmp_path / "devices" / g.name).write_bytes(g.read_bytes())
    code, out, _ = cli("compare", str(ROOM), str(after))
    cli("compare", str(ROOM), str(after), "--format", "html", "-o", str(tmp_path / "c.html"))
    page = (tmp_path / "c.html").read_text()
    assert 'id="outlet-voltages"' in page and "12.7 mV" in page
    line = next(x for x in out.splitlines() if x.startswith("Outlet voltage across desk_out"))
    # by hand, from annealed copper's 1.7241e-8 Ω·m (IEC 60028) at 20 °C: the monitors' 0.15896 mA
    # over the strip cord (1.5 m of 1 mm², 25.862 mΩ) and the rack cable (25 m of 2.5 mm², 172.41
    # mΩ) gives 31.52 µV; the desk's 0.33961 mA (230 V × 2π·50 Hz × 4.7 nF) over its cable (12 m of
    # 2.5 mm², 82.757 mΩ) 28.11 µV. Both leakages flow from the one mains line through capacitance
    # to earth, in phase, and each raises its own outlet's earth: between the outlets, their
    # difference, 3.41 µV (in power it would be 42.23 µV). The cables' reactance at 50 Hz adds
    # under 1 %.
    before, after_mv = line.split("unplugged ")[1].split(", as planned")[0].split(" → ")
    before, after_mv = before.removesuffix(" mV"), after_mv.removesuffix(" mV")
    assert before == "12.7" and float(after_mv) * 1e-3 == pytest.approx(3.41e-6, rel=0.01)
    hum = next(x for x in out.splitlines() if x.startswith("Hum, monitors:"))
    assert float(hum.split("(")[1].split(" dB")[0]) < -40


def test_an_attribute_of_another_kind_is_named_with_its_article():
    text = (
        'plan "x"\npoint a: outlet\npoint b: outlet\ninterconnect i: a to b, 1 m, 0.1 mm2,\n'
        "    in ub\n"
    )
    with pytest.raises(PlanErrors) as e:
        load_text(text, "x.gplan")
    assert "x.gplan:5:5: error: in is an attribute of a core, not of an interconnect" in str(
        e.value
    )


def test_the_text_report_lists_the_largest_outlet_pairs_and_counts_the_rest(cli, tmp_path):
    """Sixty devices on sixty outlets, each linked to the first: 59 outlet pairs, of which the text
    lists the 50 largest as planned (largest first) and counts the other 9; the JSON keeps all
    59."""
    lines = [
        'plan "long bench"',
        "supply 230 V 50 Hz, system TN-S",
        "point met: earthing-terminal",
    ]
    for k in range(60):
        lines += [
            f"point o{k}: outlet",
            f"wire run{k}: o{k} to met, {5 + k * 0.5:g} m, 2.5 mm2, protective",
            f"device d{k}: simple, plugged o{k}",
        ]
    lines += [
        f"interconnect ic{k}: d0.gnd to d{k}.gnd, 2 m, 0.1 mm2, terminated both, unbalanced, gain "
        f"0 dB, channel c{k % 2}"
        for k in range(1, 60)
    ]
    path = tmp_path / "bench.gplan"
    path.write_text("\n".join(lines) + "\n")
    code, out, _ = cli("check", str(path), "--advice-budget", "0")  # the tables, not the fixes
    assert "(the 50 largest as planned)" in out
    assert "9 more outlet pairs not listed here (all 59 are in --format json)" in out
    table = out.split("(the 50 largest as planned)")[1].split("more outlet pairs")[0]
    rows = re.findall(r"│ (ic\d+) +│", table)
    assert len(rows) == 50
    doc = analyze(load(path))
    planned = {p.interconnect: p.planned_total for p in doc.outlets.pairs}
    assert len(planned) == 59
    assert [planned[r] for r in rows] == sorted((planned[r] for r in rows), reverse=True)
    assert min(planned[r] for r in rows) >= max(v for k, v in planned.items() if k not in rows)
    # the sixty devices' earth paths: the 50 highest listed (run lengths 5 m + 0.5 m per outlet:
    # d59's first)
    assert (
        "Device earth paths to the main earthing terminal (broken and highest first, 50 of 60)"
        in out
    )
    assert "10 more devices not listed here (all are in --format json)" in out
    earths = out.split("(broken and highest first, 50 of 60)")[1].split("more devices")[0]
    listed = re.findall(r"│ (d\d+) +│", earths)
    assert len(listed) == 50 and listed[0] == "d59" and "d0" not in listed


LEAKY = """plan "leaky rack"
supply 230 V 50 Hz, system TN-S
point met: earthing-terminal
point wall: outlet
wire run: wall to met, 10 m, 2.5 mm2, protective
device psu: simple, plugged wall, y-capacitor 50 nF
device mixer: simple, plugged wall, y-capacitor 47 nF
device laptop: simple, plugged wall, class II, y-capacitor 4.7 nF
device tablet: simple, plugged wall, class II
device desk: simple, plugged wall, leakage 4 mA
interconnect a: mixer.gnd to psu.gnd, 2 m, 0.1 mm2, terminated both, balanced, gain 0 dB, \
channel main
interconnect b: laptop.gnd to mixer.gnd, 2 m, 0.1 mm2, terminated both, unbalanced, gain 0 dB, \
channel main
interconnect c: tablet.gnd to mixer.gnd, 2 m, 0.1 mm2, terminated both, unbalanced, gain 0 dB, \
channel main
"""


def test_leakage_above_the_product_safety_limits_is_a_fault():
    """GC216 against hand calculations of U0·2πf·C at 230 V 50 Hz (2πf = 314.159 s⁻¹) and the
    limits of IEC 60950-1:2005 (5.1.7: 3.5 mA for a plug-connected class I device; Table 5A: 0.25
    mA for a class II device): psu 50 nF -> 230 × 314.159 × 50e-9 = 3.6128 mA, over; mixer 47 nF ->
    3.3960 mA, under; laptop (class II)
    4.7 nF -> 0.33960 mA, over; tablet (class II, the 1 nF default) -> 0.072257 mA, under; desk
    stated 4 mA, over."""
    found = {
        f.elements[0]: f
        for f in analyze(
            load_text(LEAKY, "leaky.gplan"),
        ).findings
        if f.code == "GC216"
    }
    assert set(found) == {"psu", "laptop", "desk"}
    assert found["psu"].figures["leakage_a"] == pytest.approx(3.6128e-3, rel=1e-4)
    assert (
        found["psu"].figures["limit_a"] == 3.5e-3
        and "3.61 mA (from its Y capacitance" in found["psu"].message
    )
    assert found["laptop"].figures["leakage_a"] == pytest.approx(0.33960e-3, rel=1e-4)
    assert found["laptop"].figures["limit_a"] == 0.25e-3 and "class II" in found["laptop"].message
    assert "4 mA (stated)" in found["desk"].message
    for f in found.values():
        assert f.severity == "fault" and f.location.line in (6, 8, 10)
        assert "never lift" in f.fix or "do not earth it yourself" in f.fix


def test_a_device_whose_own_plan_is_class_ii_has_no_earth_pin_and_leaks_through_its_interconnect(
    tmp_path,
):
    """A placed device whose plan says 'class II': its cord has no protective conductor (no earth
    path to check, no unconnected-inlet warning); its stated 0.5 mA leaves through the
    interconnect's shield, and is over the class II limit of 0.25 mA (IEC 60950-1:2005, Table
    5A)."""
    (tmp_path / "box.gplan").write_text(
        'plan "class II box"\nmains 230 V 50 Hz, class II\n'
        "metal case: steel 1 mm, 100 x 100 mm\npoint gnd: star, at 10,10 on case\n"
    )
    (tmp_path / "room.gplan").write_text(
        'plan "room"\nsupply 230 V 50 Hz, system TN-S\npoint met: earthing-terminal\npoint wall: '
        "outlet\n"
        "wire run: wall to met, 10 m, 2.5 mm2, protective\n"
        'device box: "box.gplan", plugged wall, leakage 0.5 mA\ndevice amp: simple, plugged wall\n'
        "interconnect l: box.gnd to amp.gnd, 2 m, 0.1 mm2, terminated both, unbalanced, gain 0 "
        "dB, channel main\n"
    )
    plan = load(tmp_path / "room.gplan")
    assert {d.name: d.equipment_class for d in plan.devices} == {"box": "II", "amp": "I"}
    assert "box.cord" not in {c.name for c in plan.conductors} and "amp.cord" in {
        c.name for c in plan.conductors
    }
    (leak,) = [c for c in plan.currents if c.name == "box.leakage"]
    assert leak.a == "box.gnd"  # where its interconnect lands, not its (unwired) inlet
    r = analyze(plan)
    assert [d.device for d in r.device_earths] == ["amp"]
    codes = {f.code for f in r.findings}
    assert "GC109" not in codes and {"GC102", "GC301", "GC216"} <= codes
    (limit,) = [f for f in r.findings if f.code == "GC216"]
    assert limit.figures["limit_a"] == 0.25e-3 and limit.figures["leakage_a"] == 0.5e-3
    # all of it crosses the shield, whose resistance the input reads (gain 0 dB): by hand from IEC
    # 60028 copper, R = 1.7241e-8 Ω·m × 2 m / 0.1e-6 m² = 0.34482 Ω, V = 0.5 mA × 0.34482 Ω =
    # 172.41 µV = -75.27 dBV
    (shared,) = [f for f in r.findings if f.code == "GC102"]
    assert shared.severity == "fault" and shared.figures["level_dbv"] == pytest.approx(
        -75.27, abs=0.005
    )
    assert r.hum.channels["main"].total_v == pytest.approx(172.41e-6, rel=2e-3)
