"""A device plugged into a TT building is checked on the building's supply, not on the TN-S its own
plan assumes (an outside builder's review: a bass head written without a `system` passed in a
rehearsal room on a 300 Ω electrode with no RCD).

Hand figures, IEC 60364-4-41 411.5: the fault loop of a TT supply runs through the installation's
electrode R_A and the supply's own part (1 Ω: line and source earth, from memory), so with
R_A = 300 Ω it is at least 301 Ω and at most 301 Ω plus the cables (a 4 A fuse's cold resistance,
a 2 m cord and the 10 m final circuit of the plan below add well under 1.5 Ω at 70 °C):
230 V / 302.5 Ω = 0.760 A ≤ I ≤ 230 V / 301 Ω = 0.764 A — far below what opens a 4 A slow fuse
within 0.2 s, so the chassis stays live (GC208).  A 30 mA RCD sees 25 × IΔn and opens within
40 ms (IEC 61008-1's 5 × IΔn row, from memory), and R_A × IΔn = 300 × 0.03 = 9 V ≤ 50 V."""

import pytest

from groundcheck import PlanErrors, load
from groundcheck.analysis import analyze
from groundcheck.advice.repair import suggest
from groundcheck.analysis import Options

AMP = """plan "amp"
mains 230 V 50 Hz, fuse 4 A slow, cord 2 m 0.75 mm2, circuit 10 m 2.5 mm2, inlet at 10,10
metal chassis: steel 1.5 mm, 300 x 200 mm, touchable
point pe_stud: stud, at 20,10 on chassis
wire pe_lead: mains.pe to pe_stud, 40 mm, 1.5 mm2, protective
bolt pe_bolt: pe_stud to chassis, protective
"""

ROOM = """plan "room"
supply 230 V 50 Hz, {supply}
point met: earthing-terminal
point wall: outlet
cable run: met to wall, 12 m, 2.5 mm2, cores L-N-PE
device amp: "amp.gplan", plugged wall
"""


def _room(tmp_path, supply: str):
    (tmp_path / "amp.gplan").write_text(AMP)
    (tmp_path / "room.gplan").write_text(ROOM.format(supply=supply))
    return load(tmp_path / "room.gplan")


def _placed(result):
    return [f for f in result.findings if f.message.startswith("amp, plugged into")]


def test_a_tn_s_plan_in_a_tt_building_without_an_rcd_is_a_danger(tmp_path):
    r = analyze(_room(tmp_path, "system TT, electrode 300 ohm"), Options(hum=False))
    dangers = [f for f in _placed(r) if f.code == "GC208"]
    assert dangers and all(f.severity == "danger" for f in dangers)
    f = dangers[0]
    assert 0.760 <= f.figures["fault_current_a"] <= 0.764, f.figures
    assert (
        "TT supply, electrode 300 Ω, no RCD, its fault loop through run; its own plan assumes TN-S"
        in f.message
    )
    assert f.elements[0].startswith("amp.") and f.location.file.endswith("amp.gplan")
    assert any(f.code == "GC221" for f in _placed(r))


def test_the_buildings_rcd_clears_it(tmp_path):
    r = analyze(_room(tmp_path, "system TT, electrode 300 ohm, rcd 30 mA"), Options(hum=False))
    assert not [f for f in _placed(r) if f.severity in ("danger", "fault")], _placed(r)


def test_a_device_written_for_the_buildings_own_supply_adds_nothing(tmp_path):
    (tmp_path / "amp.gplan").write_text(
        AMP.replace("inlet at", "system TT, electrode 300 ohm, rcd 30 mA, inlet at")
    )
    (tmp_path / "room.gplan").write_text(
        ROOM.format(supply="system TT, electrode 300 ohm, rcd 30 mA")
    )
    r = analyze(load(tmp_path / "room.gplan"), Options(hum=False))
    assert not _placed(r)


def test_an_rcd_only_the_devices_own_plan_assumes_is_not_counted(tmp_path):
    # an outside builder's village hall: the amplifier's own plan assumes a 100 mA RCD, the room's
    # supply states none. On TT the fault loop runs through the electrodes: 230 V over some 300 Ω
    # is under 1 A, which opens no breaker (IEC 60898-1: type B at once from 5 x In, from memory),
    # so with no RCD in the building nothing clears it
    (tmp_path / "amp.gplan").write_text(
        AMP.replace("inlet at", "system TT, electrode 300 ohm, rcd 100 mA, inlet at")
    )
    (tmp_path / "room.gplan").write_text(ROOM.format(supply="system TT, electrode 300 ohm"))
    r = analyze(load(tmp_path / "room.gplan"), Options(hum=False))
    dangers = [f for f in _placed(r) if f.severity == "danger" and f.code == "GC208"]
    assert dangers, _placed(r)
    assert "no RCD" in dangers[0].message
    assert "an RCD of 100 mA, not counted here" in dangers[0].message


def test_suggest_offers_the_buildings_rcd_first(tmp_path):
    plan = _room(tmp_path, "system TT, electrode 300 ohm")
    text = (tmp_path / "room.gplan").read_text()
    _, evs = suggest(plan, text, Options(hum=False), tmp_path, tmp_path / "room.gplan")
    first = evs[0].candidate
    assert first.action == "rcd" and "installation's outlets" in first.title
    assert "rcd 30 mA" in first.edits[0].new


def test_an_electrode_on_a_tn_supply_is_an_error(tmp_path):
    with pytest.raises(PlanErrors) as e:
        _room(tmp_path, "system TN-S, electrode 30 ohm")
    assert "an earth electrode is stated for a TN-S supply" in str(e.value)


def test_a_simple_device_in_a_tt_building_without_an_rcd_the_rcd_answers(tmp_path):
    # a simple device has no fuse or wiring of its own to check: on a 300 Ω electrode its fault
    # draws at most 230 / 301 = 0.76 A, which trips no breaker at once (a danger); on a 5 Ω one
    # at most 230 / 6 = 38 A, over the 30 A that trips a 6 A type B breaker at once, so the supply
    # only says it rests on an overcurrent device (a note); the building's RCD answers both
    (tmp_path / "amp.gplan").write_text(AMP)
    room = ROOM.format(supply="system TT, electrode 300 ohm") + (
        "device desk: simple, plugged wall, cord 2 m 0.75 mm2\n"
    )
    (tmp_path / "room.gplan").write_text(room)
    r = analyze(load(tmp_path / "room.gplan"), Options(hum=False))
    (found,) = [f for f in r.findings if f.code == "GC221" and "desk" in f.elements]
    assert found.severity == "danger" and "electrode (300 Ω)" in found.message
    (tmp_path / "room.gplan").write_text(room.replace("300 ohm", "5 ohm"))
    r = analyze(load(tmp_path / "room.gplan"), Options(hum=False))
    (note,) = [f for f in r.findings if f.code == "GC221" and "desk" in f.elements]
    assert note.severity == "note" and "electrode (5 Ω)" in note.message
    (tmp_path / "room.gplan").write_text(room.replace("300 ohm", "300 ohm, rcd 30 mA"))
    r = analyze(load(tmp_path / "room.gplan"), Options(hum=False))
    assert not [f for f in r.findings if f.code == "GC221"]


def test_a_device_behind_a_transformer_is_not_checked_on_the_buildings_supply(tmp_path):
    # its supply is the transformer's secondary (here an isolating one: no earth fault loop at
    # all), not the building's TT wiring
    (tmp_path / "amp.gplan").write_text(AMP)
    room = ROOM.format(supply="system TT, electrode 300 ohm").replace(
        'device amp: "amp.gplan", plugged wall\n',
        "transformer iso: plugged wall, primary 230 V, secondary 230 V, rating 500 VA, isolating\n"
        'device amp: "amp.gplan", plugged iso\n',
    )
    (tmp_path / "room.gplan").write_text(room)
    r = analyze(load(tmp_path / "room.gplan"), Options(hum=False))
    assert not _placed(r)


def test_a_relaxed_path_limit_is_announced_in_an_installation_whose_devices_it_judges(tmp_path):
    # the devices are checked on the building's supply with the run's limit: relaxing it must be
    # said, as it is for one piece of equipment
    r = analyze(_room(tmp_path, "system TT, electrode 300 ohm"), Options(hum=False, pe_limit=0.5))
    assert any("--pe-limit" in n for n in r.notices)


HEAD = """plan "head"
mains 230 V 50 Hz, breaker 16 A B, system TN-C-S, cord 2 m 0.75 mm2, inlet at 10,10
metal chassis: aluminium 1.5 mm, 300 x 200 mm, touchable
point pe_stud: stud, at 20,10 on chassis
wire pe_lead: mains.pe to pe_stud, 40 mm, 1.5 mm2, protective
bolt pe_bolt: pe_stud to chassis, protective
"""

STAGE = """plan "stage"
supply 230 V 50 Hz, system TN-C-S
point met: earthing-terminal
point wall: outlet
point reel_out: outlet
cable radial: met to wall, 20 m, 2.5 mm2, cores L-N-PE
cable reel: wall to reel_out, 50 m, 1.0 mm2, cores round
device head: "head.gplan", plugged {outlet}
"""


def _stage(tmp_path, outlet: str):
    (tmp_path / "head.gplan").write_text(HEAD)
    (tmp_path / "stage.gplan").write_text(STAGE.format(outlet=outlet))
    return analyze(load(tmp_path / "stage.gplan"), Options(hum=False))


def test_a_long_reel_in_a_tn_fault_loop_is_a_danger(tmp_path):
    # An outside reviewer's stage: the device's own plan assumed 20 m of final circuit; plugged at
    # the end of a 50 m reel of 1 mm² flex its fault loop is, by hand at 70 °C (IEC 60228 maxima
    # × (230 + 70)/250 = 1.2; Ze 0.35 Ω, TN-C-S's default): radial 2 × 20 m × 7.41 Ω/km × 1.2 =
    # 0.3557 Ω, reel 2 × 50 m × 19.5 Ω/km × 1.2 = 2.34 Ω, cord 2 × 2 m × 26 Ω/km × 1.2 = 0.1248
    # Ω: 3.1705 Ω before the breaker and the head's own 40 mm lead, so I ≤ 230 / 3.1705 = 72.54 A,
    # under the 80 A (5 × In) that trips a type B 16 A breaker at once (IEC 60898-1): not within
    # 0.4 s (IEC 60364-4-41 Table 41.1, TN at 230 V) — a danger.
    r = _stage(tmp_path, "reel_out")
    (f, *_) = [x for x in r.findings if x.code == "GC208" and x.message.startswith("head,")]
    assert f.severity == "danger"
    assert 68.0 <= f.figures["fault_current_a"] <= 72.545, f.figures
    assert "its fault loop through radial, reel" in f.message
    # at the wall the loop is 0.35 + 0.3557 + 0.1248 = 0.83 Ω: about 277 A, tripped at once
    assert not [x for x in _stage(tmp_path, "wall").findings if x.code == "GC208"]


def test_a_devices_own_protective_earth_danger_is_the_installations_too(tmp_path):
    # the head's own plan with its protective lead far too long and thin: its own plan finds the
    # path over the limit, and so does the installation, under the device's name
    (tmp_path / "head.gplan").write_text(
        HEAD.replace("40 mm, 1.5 mm2, protective", "4 m, 0.2 mm2, protective")
    )
    (tmp_path / "stage.gplan").write_text(STAGE.format(outlet="wall"))
    alone = analyze(load(tmp_path / "head.gplan"), Options(hum=False))
    assert [f for f in alone.findings if f.code == "GC206" and f.severity == "danger"]
    r = analyze(load(tmp_path / "stage.gplan"), Options(hum=False))
    (f,) = [x for x in r.findings if x.code == "GC206"]
    assert f.severity == "danger" and f.elements[0].startswith("head.")
    assert f.message.startswith("head's own wiring (its own plan finds it too)")


SIMPLE_ROOM = """plan "studio"
supply 230 V 50 Hz, system TT, {supply}
point met: earthing-terminal
point wall: outlet
cable run: met to wall, 12 m, 2.5 mm2, cores L-N-PE
device mon: simple, plugged wall, cord 2 m 0.75 mm2, signal-ground chassis
"""


def _simple(tmp_path, supply: str):
    (tmp_path / "studio.gplan").write_text(SIMPLE_ROOM.format(supply=supply))
    return analyze(load(tmp_path / "studio.gplan"), Options(hum=False)).findings


def test_bought_devices_on_a_tt_supply_with_no_rcd_are_a_danger(tmp_path):
    # an outside electrician's garden studio with bought equipment only, on a 200 Ω rod and no RCD:
    # a fault to a monitor's metal draws at most 230 / (200 + 1) = 1.144 A (the supply's own part
    # 1 Ω, docs/language.md; the cables only add), far below the 30 A at which even a 6 A type B
    # breaker trips at once (5 × In, IEC 60898-1, from memory): only an RCD clears it, and the
    # metal stays at 230 × 200 / 201 = 228.9 V against earth
    (f,) = [x for x in _simple(tmp_path, "electrode 200 ohm") if x.code == "GC221"]
    assert f.severity == "danger"
    assert f.figures["fault_current_max_a"] == pytest.approx(230 / 201, rel=1e-12)
    assert f.figures["touch_voltage_v"] == pytest.approx(230 * 200 / 201, rel=1e-12)
    assert not [x for x in _simple(tmp_path, "electrode 200 ohm, rcd 30 mA") if x.code == "GC221"]


def test_a_tt_electrode_over_its_rcd_is_the_installations_danger_at_its_supply(tmp_path):
    # the same studio on a 650 Ω rod behind a 100 mA RCD: 650 × 0.1 = 65 V, over 50 V (IEC
    # 60364-4-41 411.5.3, from memory), whatever is plugged in; at 500 Ω it is 50 V, within it
    (f,) = [x for x in _simple(tmp_path, "electrode 650 ohm, rcd 100 mA") if x.code == "GC220"]
    assert f.severity == "danger" and f.elements == ("supply",)
    assert f.figures["electrode_times_rcd_v"] == pytest.approx(65.0)
    assert not [x for x in _simple(tmp_path, "electrode 500 ohm, rcd 100 mA") if x.code == "GC220"]


def test_the_cord_the_installation_states_is_in_the_fault_loop(tmp_path):
    # a re-review: a device line's 'cord 50 m 0.75 mm2' was in the earth path but not in the fault
    # loop, which kept the device plan's own 2 m cord. By hand at 70 °C: radial 2 × 20 m × 7.41
    # Ω/km × 1.2 = 0.3557 Ω, cord 2 × 50 m × 26 Ω/km × 1.2 = 3.12 Ω (IEC 60228 class 5, 0.75 mm²),
    # Ze 0.35 Ω: I ≤ 230 / 3.8257 = 60.12 A, under the 80 A that trips a 16 A type B breaker at
    # once
    (tmp_path / "head.gplan").write_text(HEAD)
    (tmp_path / "stage.gplan").write_text(
        STAGE.format(outlet="wall").replace("plugged wall", "plugged wall, cord 50 m 0.75 mm2")
    )
    r = analyze(load(tmp_path / "stage.gplan"), Options(hum=False))
    (f, *_) = [x for x in r.findings if x.code == "GC208" and x.message.startswith("head,")]
    assert f.severity == "danger" and 55.0 <= f.figures["fault_current_a"] <= 60.12


# ---- the installation's breaker and loop impedance (supply …, breaker, loop-impedance) ----------

BOUGHT = """plan "stage"
supply 230 V 50 Hz, system TN-C-S, {supply}
point met: earthing-terminal
point wall: outlet
point reel_out: outlet
cable radial: met to wall, 20 m, 2.5 mm2, cores L-N-PE
cable reel: wall to reel_out, 50 m, 1.0 mm2, cores round
device keys: simple, plugged {outlet}, cord 2 m 0.75 mm2, signal-ground chassis
"""


def _bought(tmp_path, supply: str, outlet: str):
    (tmp_path / "stage.gplan").write_text(BOUGHT.format(supply=supply, outlet=outlet))
    r = analyze(load(tmp_path / "stage.gplan"), Options(hum=False))
    return [f for f in r.findings if f.code == "GC208"], r


def test_a_bought_device_at_the_end_of_a_reel_is_not_disconnected_in_time(tmp_path):
    # a keyboard amplifier with no plan of its own, at the end of the 50 m reel of 1 mm² flex: by
    # hand, as for the head above (IEC 60228 maxima × 1.2 at 70 °C): Ze 0.35 Ω (stated) + radial
    # 0.3557 + reel 2.34 + cord 0.1248 = 3.1705 Ω before the breaker's own resistance, so
    # I ≤ 230 / 3.1705 = 72.54 A, under the 80 A (5 × In) that trips a 16 A type B breaker at once
    # (IEC 60898-1): not cleared within 0.4 s (IEC 60364-4-41 Table 41.1, TN at 230 V)
    found, r = _bought(tmp_path, "loop-impedance 0.35 ohm, breaker 16 A B", "reel_out")
    (f,) = found
    assert f.severity == "danger" and f.elements == ("keys",)
    assert 68.0 <= f.figures["fault_current_a"] <= 72.545, f.figures
    assert "radial, reel" in f.message and "16 A type B breaker" in f.message
    assert "RCD" in f.fix and "nearer the board" in f.fix  # on TN a shorter lead helps too
    assert f.location.line == 8  # the device's own line
    # the device earth table carries the same fault
    (row,) = [d for d in r.device_earths if d.device == "keys"]
    assert row.fault.fault_current == pytest.approx(f.figures["fault_current_a"], rel=1e-12)
    # at the wall: 0.35 + 0.3557 + 0.1248 = 0.8305 Ω, about 277 A, tripped at once
    assert _bought(tmp_path, "loop-impedance 0.35 ohm, breaker 16 A B", "wall")[0] == []


def test_the_supplys_loop_impedance_is_the_loop_a_bought_device_is_checked_on(tmp_path):
    # at the wall with a stated Ze of 2.5 Ω: 2.5 + 0.3557 + 0.1248 = 2.98 Ω, I ≤ 77.2 A < 80 A: a
    # danger; with 1.2 Ω: 1.68 Ω, I ≤ 136.9 A, tripped at once by the type B breaker
    assert _bought(tmp_path, "loop-impedance 2.5 ohm, breaker 16 A B", "wall")[0]
    assert not _bought(tmp_path, "loop-impedance 1.2 ohm, breaker 16 A B", "wall")[0]
    # a 30 mA RCD clears any such fault within 0.3 s (IEC 61008-1 at IΔn; 40 ms at 5 IΔn)
    assert not _bought(tmp_path, "loop-impedance 2.5 ohm, breaker 16 A B, rcd 30 mA", "wall")[0]


def test_without_a_breaker_or_rcd_a_bought_devices_disconnection_is_not_judged(tmp_path):
    assert _bought(tmp_path, "loop-impedance 2.5 ohm", "reel_out")[0] == []


def test_the_buildings_breaker_replaces_the_one_a_devices_plan_assumed(tmp_path):
    # the head's own plan assumes a 16 A type B breaker: 277 A at the wall trips it at once. The
    # building has 32 A type C: 277 A is 8.7 × In, under the 10 × In at which type C trips at once
    # (IEC 60898-1), so only its thermal release acts, in seconds: over 0.4 s, a danger
    (tmp_path / "head.gplan").write_text(HEAD)
    stage = STAGE.replace("system TN-C-S", "system TN-C-S, breaker 32 A C")
    (tmp_path / "stage.gplan").write_text(stage.format(outlet="wall"))
    r = analyze(load(tmp_path / "stage.gplan"), Options(hum=False))
    (f, *_) = [x for x in r.findings if x.code == "GC208" and x.message.startswith("head,")]
    assert f.severity == "danger" and "32 A type C breaker" in f.message
    assert 250.0 <= f.figures["fault_current_a"] <= 277.0, f.figures
    assert not [x for x in _stage(tmp_path, "wall").findings if x.code == "GC208"]


def test_a_tt_supplys_breaker_makes_the_bought_devices_disconnection_a_figure(tmp_path):
    # TT, 200 Ω electrode, no RCD, a 16 A breaker stated: 230 / (200 + 1 + cables) < 1.15 A, which
    # no breaker clears; the finding is GC208 at the device (its figures), not GC221's bound
    (tmp_path / "studio.gplan").write_text(
        SIMPLE_ROOM.format(supply="electrode 200 ohm, breaker 16 A B")
    )
    found = analyze(load(tmp_path / "studio.gplan"), Options(hum=False)).findings
    (f,) = [x for x in found if x.code == "GC208"]
    assert f.severity == "danger" and f.elements == ("mon",)
    assert f.figures["fault_current_a"] < 230 / 201 and "too little" in f.message
    assert not [x for x in found if x.code == "GC221"]
    # on TT the electrode, not the lead, limits the current: the fix is the RCD alone
    assert "RCD" in f.fix and "nearer the board" not in f.fix


@pytest.mark.parametrize(
    "supply, says",
    [
        ("breaker 16 A B, breaker 20 A B", "'breaker' is given twice"),
        ("fuse 2 A", "loop-impedance"),
        ("breaker 16 A E", "breaker curve"),
    ],
)
def test_the_supplys_new_attributes_are_read_with_clear_errors(tmp_path, supply, says):
    from groundcheck.core.errors import PlanErrors

    (tmp_path / "stage.gplan").write_text(BOUGHT.format(supply=supply, outlet="wall"))
    with pytest.raises(PlanErrors) as e:
        load(tmp_path / "stage.gplan")
    (err,) = e.value.errors
    assert says in str(err) and err.location.line == 2


def test_a_bought_device_behind_a_transformer_keeps_gc221_when_the_breaker_is_stated(tmp_path):
    # the stated breaker checks the devices on the building's outlets (GC208 at each); one behind
    # a step-down transformer is not checked by it, so GC221 still names it: stating a breaker must
    # not silence a TT supply with no RCD
    room = (
        'plan "studio"\n'
        "supply 230 V 50 Hz, system TT, electrode 200 ohm, breaker 16 A B\n"
        "point met: earthing-terminal\npoint wall: outlet\n"
        "cable run: met to wall, 12 m, 2.5 mm2, cores L-N-PE\n"
        "transformer sd: plugged wall, primary 230 V, secondary 120 V\n"
        "device old: simple, plugged sd, cord 2 m 0.75 mm2, signal-ground chassis\n"
    )
    (tmp_path / "studio.gplan").write_text(room)
    found = analyze(load(tmp_path / "studio.gplan"), Options(hum=False)).findings
    (f,) = [x for x in found if x.code == "GC221"]
    assert f.severity == "danger" and "old" in f.elements


def test_the_bought_devices_touch_voltage_is_its_return_path_times_its_fault_current(tmp_path):
    # the keyboard amplifier at the end of the reel, as above: the fault current returns through
    # its cord's protective core, the reel's and the radial's (IEC 60228 maxima x 1.2 at 70 C):
    # 2 m x 26 + 50 m x 19.5 + 20 m x 7.41 mohm/m, x 1.2 = 0.0624 + 1.17 + 0.17784 = 1.41024 ohm.
    # Its touch voltage is that times its current (TN: no electrode in it), at most
    # 230 x 1.41024 / 3.1705 = 102.30 V (the loop by hand, above)
    (f,) = _bought(tmp_path, "loop-impedance 0.35 ohm, breaker 16 A B", "reel_out")[0]
    touch, current = f.figures["touch_voltage_v"], f.figures["fault_current_a"]
    assert touch / current == pytest.approx(1.41024, rel=1e-3)
    assert 95.0 <= touch <= 102.31


@pytest.mark.parametrize(
    "rcd, warned",
    [("", False), (", rcd 30 mA", False), (", rcd 100 mA", True), (", rcd 0.3 A", True)],
)
def test_outlets_behind_an_rcd_above_30_ma_are_warned_once(tmp_path, rcd, warned):
    # IEC 60364-4-41 411.3.3 (from memory): socket outlets for ordinary persons get additional
    # protection by an RCD of at most 30 mA; a 100 mA or 300 mA one only protects against faults
    # to earthed metal. Said once, at the building's supply, never again for the device plugged in
    r = analyze(_room(tmp_path, f"system TT, electrode 30 ohm{rcd}"), Options(hum=False))
    found = [f for f in r.findings if f.code == "GC225"]
    assert len(found) == int(warned)
    if warned:
        assert found[0].severity == "warning" and found[0].elements == ("supply",)
        assert found[0].location.file.endswith("room.gplan")
    # the device's own plan assuming a 100 mA RCD is no finding of the room's
    (tmp_path / "amp.gplan").write_text(AMP.replace("inlet at", "rcd 100 mA, inlet at"))
    alone = analyze(load(tmp_path / "amp.gplan"), Options(hum=False))
    assert [f.elements for f in alone.findings if f.code == "GC225"] == [("mains",)]
    room = analyze(load(tmp_path / "room.gplan"), Options(hum=False))
    assert len([f for f in room.findings if f.code == "GC225"]) == int(warned)


def test_no_outlet_no_rcd_warning(tmp_path):
    text = ROOM.format(supply="system TT, electrode 30 ohm, rcd 100 mA").replace(
        "point wall: outlet\n", "point wall: junction\n"
    )
    (tmp_path / "amp.gplan").write_text(AMP)
    (tmp_path / "room.gplan").write_text(text)
    try:
        r = analyze(load(tmp_path / "room.gplan"), Options(hum=False))
    except PlanErrors:
        pytest.skip("a device must be plugged into an outlet")
    assert not [f for f in r.findings if f.code == "GC225"]


def test_a_twin_and_earth_cables_thinner_protective_core_is_in_the_loop(tmp_path):
    # a flat cable of 2.5 mm² line and neutral cores beside a 1.5 mm² protective core (common
    # practice for twin-and-earth), written with its protective core's area and 'line-cores': by
    # hand at 70 °C (IEC 60228 class 1/2 maxima, 7.41 and 12.1 Ω/km, × (230 + 70)/250 = 1.2):
    # Ze 0.35 + line 20 m × 7.41 Ω/km × 1.2 = 0.17784 + protective 20 m × 12.1 Ω/km × 1.2 =
    # 0.2904 + the cord's 0.1248 = 0.94304 Ω, I = 230 / 0.94304 = 243.89 A; with both at 2.5 mm²
    # 0.83048 Ω, 276.95 A (the test above)
    supply = "loop-impedance 0.35 ohm, breaker 16 A B"
    (tmp_path / "s.gplan").write_text(
        BOUGHT.format(supply=supply, outlet="wall").replace(
            "20 m, 2.5 mm2", "20 m, 1.5 mm2, line-cores 2.5 mm2"
        )
    )
    r = analyze(load(tmp_path / "s.gplan"), Options(hum=False))
    (row,) = [d for d in r.device_earths if d.device == "keys"]
    assert row.fault.fault_current == pytest.approx(230 / 0.94304, rel=1e-6)
    # the word is a cable's: on a wire it is a located error naming the kinds that take it
    (tmp_path / "w.gplan").write_text(
        AMP + "point p: stud, at 40,10 on chassis\n"
        "wire w: pe_stud to p, 30 mm, 1 mm2, line-cores 2.5 mm2\n"
    )
    with pytest.raises(PlanErrors) as e:
        load(tmp_path / "w.gplan")
    assert "line-cores" in str(e.value) and "cable" in str(e.value)
