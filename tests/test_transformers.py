"""Transformers between the wall and devices: the supply behind them (leakage, hum frequencies,
earth paths), a device for another voltage (GC217), an isolating transformer's floating secondary
(GC218), the rating (GC219), and the statement's errors.  Plans of our own; every expected figure
is worked by hand here."""

import math

import pytest

from groundcheck import PlanErrors, load, load_text
from groundcheck.analysis import analyze

#: IEC 60028 annealed copper at 20 °C, Ω·m (as in test_installation's device earth-path test)
RHO_CU = 1.7241e-8

#: a room on a 220 V 60 Hz supply, one wall outlet on 10 m of 1.5 mm² protective wiring
ROOM = """plan "room"
supply {supply}, system TN-S
point met: earthing-terminal
point wall: outlet
wire run: met to wall, 10 m, 1.5 mm2, protective
"""

#: a device of our own with a full-wave rectifier whose charging current shares the wire 'shared'
#: with a stage: its hum lines are at even multiples of the mains frequency
RECTIFIED = """plan "rectified"
mains {mains}, fuse 1 A slow
metal chassis: steel 1 mm, 300 x 200 mm, touchable
point pe: stud, at 20,180 on chassis
wire pe_lead: mains.pe to pe, 30 mm, 1 mm2, protective
bolt pe_nut: pe to chassis
point ct: centre-tap, at 60,60 on chassis
point res: cap, at 100,60 on chassis
point star: star, at 150,100 on chassis
point in: sleeve, at 280,40 on chassis
wire ret: ct to star, 100 mm, 0.5 mm2, return
wire shared: res to star, 100 mm, 0.5 mm2, return
wire in_gnd: in to res, 150 mm, 0.5 mm2, signal
bolt star_bond: star to chassis
rectifier hv: res to ct, full-wave, secondary 250 V, winding 100 ohm, reservoir 47 uF, load 40 mA
stage v1: in to star, gain 30 dB
"""


def _room(tmp_path, body: str, supply: str = "220 V 60 Hz", devices: dict | None = None):
    for name, text in (devices or {}).items():
        (tmp_path / name).write_text(text)
    f = tmp_path / "room.gplan"
    f.write_text(ROOM.format(supply=supply) + body)
    return analyze(load(f))


def _leak(r, dev: str) -> tuple[float, float]:
    (cur,) = [c for c in r.plan.currents if c.name == f"{dev}.leakage"]
    (part,) = cur.parts
    return part


def test_a_device_behind_a_step_down_leaks_at_its_secondary_voltage(tmp_path):
    body = (
        "transformer sd: plugged wall, primary 220 V, secondary 120 V, rating 300 VA\ndevice "
        "behind: simple, plugged sd, y-capacitor 4.7 nF\ndevice beside: simple, plugged wall, "
        "y-capacitor 4.7 nF\n"
    )
    r = _room(tmp_path, body)
    # I = U0·2πf·C by hand: 120 V × 2π × 60 Hz × 4.7 nF = 0.2126 mA behind the step-down,
    # 220 V × 2π × 60 Hz × 4.7 nF = 0.3898 mA at the wall (the same device)
    amps, hz = _leak(r, "behind")
    assert hz == 60.0 and amps == pytest.approx(120 * 2 * math.pi * 60 * 4.7e-9, rel=1e-12)
    assert amps == pytest.approx(0.21262e-3, rel=1e-4)
    amps, hz = _leak(r, "beside")
    assert hz == 60.0 and amps == pytest.approx(0.38981e-3, rel=1e-4)
    assert not {"GC217", "GC218", "GC219"} & {f.code for f in r.findings}


def test_the_earth_path_behind_an_earthed_transformer_runs_through_its_cord(tmp_path):
    body = (
        "transformer sd: plugged wall, primary 220 V, secondary 120 V, cord 1.8 m 0.75 "
        "mm2\ndevice a: simple, plugged sd, cord 2 m 0.75 mm2\n"
    )
    r = _room(tmp_path, body)
    (earth,) = r.device_earths
    # ρL/A by hand: the device's 2 m and the transformer's 1.8 m of 0.75 mm², the run's 10 m of
    # 1.5 mm² = 1.7241e-8 × (2.6667e6 + 2.4e6 + 6.6667e6) = 0.20229 Ω
    hand = RHO_CU * (2 / 0.75e-6 + 1.8 / 0.75e-6 + 10 / 1.5e-6)
    assert earth.resistance == pytest.approx(hand, rel=1e-9)
    assert earth.resistance == pytest.approx(0.20229, rel=1e-4)
    assert not any(f.code == "GC215" for f in r.findings)


def test_a_60_hz_device_behind_a_step_down_hums_at_120_hz_multiples(tmp_path):
    """A 120 V 60 Hz device of our own on a 220 V 60 Hz supply through a step-down: its rectifier's
    charging current (full wave) has lines at 2f multiples, 120, 240, 360 Hz; none at 100 Hz."""
    dev = RECTIFIED.format(mains="120 V 60 Hz")
    r = _room(
        tmp_path,
        "transformer sd: plugged wall, primary 220 V, secondary 120 V\n"
        'device amp: "amp.gplan", plugged sd\n',
        devices={"amp.gplan": dev},
    )
    lines = [x.frequency for x in r.hum.channels["amp.main"].spectrum if x.volts > 0]
    assert lines[:3] == [120.0, 240.0, 360.0]
    assert all(f % 120 == 0 for f in lines) and not any(f % 100 == 0 and f % 120 for f in lines)
    assert not any(f.code == "GC217" for f in r.findings)
    # the same device alone (its own 120 V 60 Hz mains): the same lines and levels
    (tmp_path / "alone.gplan").write_text(dev)
    alone = analyze(load(tmp_path / "alone.gplan")).hum.channels["main"]
    assert [x.volts for x in r.hum.channels["amp.main"].spectrum] == pytest.approx(
        [x.volts for x in alone.spectrum], rel=1e-9, abs=1e-15
    )


@pytest.mark.parametrize("plugged, danger", [("wall", True), ("sd", False)])
def test_a_120_v_device_needs_the_step_down(tmp_path, plugged, danger):
    dev = RECTIFIED.format(mains="120 V 60 Hz")
    r = _room(
        tmp_path,
        "transformer sd: plugged wall, primary 220 V, secondary 120 V\n"
        f'device amp: "amp.gplan", plugged {plugged}\n',
        devices={"amp.gplan": dev},
    )
    got = [f for f in r.findings if f.code == "GC217"]
    if not danger:
        assert got == []
        return
    (f,) = got
    assert f.severity == "danger" and f.figures == {"rated_v": 120.0, "supplied_v": 220.0}
    assert "is for 120 V but is plugged into wall, which gives 220 V" in f.message
    assert "plug amp into sd" in f.fix  # the outlet that gives 120 V


@pytest.mark.parametrize("plugged, danger", [("sd", True), ("wall", False)])
def test_a_230_v_device_behind_a_120_v_step_down_is_a_danger(tmp_path, plugged, danger):
    dev = RECTIFIED.format(mains="230 V 50 Hz")
    r = _room(
        tmp_path,
        "transformer sd: plugged wall, primary 230 V, secondary 120 V\n"
        f'device amp: "amp.gplan", plugged {plugged}\n',
        supply="230 V 50 Hz",
        devices={"amp.gplan": dev},
    )
    got = [(f.severity, f.figures) for f in r.findings if f.code == "GC217"]
    assert got == ([("danger", {"rated_v": 230.0, "supplied_v": 120.0})] if danger else [])


@pytest.mark.parametrize(
    "rated, danger", [("240 V", False), ("250 V", True), ("200 V", False), ("197 V", True)]
)
def test_the_voltage_tolerance_is_ten_percent_of_the_supply(tmp_path, rated, danger):
    # IEC 60038's ±10 % (from memory) of the 220 V the step-up gives: 198 V to 242 V by hand
    dev = RECTIFIED.format(mains=f"{rated} 60 Hz")
    r = _room(
        tmp_path,
        "transformer up: plugged wall, primary 220 V, secondary 220 V\n"
        'device amp: "amp.gplan", plugged up\n',
        devices={"amp.gplan": dev},
    )
    assert any(f.code == "GC217" for f in r.findings) is danger


def test_a_primary_on_the_wrong_voltage_gives_the_wrong_secondary(tmp_path):
    r = _room(
        tmp_path,
        "transformer sd: plugged wall, primary 120 V, secondary 60 V\n",
        supply="230 V 50 Hz",
    )
    (f,) = [f for f in r.findings if f.code == "GC217"]
    # the turns ratio by hand: 60 V × 230 V / 120 V = 115 V
    assert f.severity == "danger" and f.figures["secondary_v"] == pytest.approx(115.0)
    assert "about 115 V, not 60 V" in f.message
    fine = _room(
        tmp_path,
        "transformer sd: plugged wall, primary 230 V, secondary 60 V\n",
        supply="230 V 50 Hz",
    )
    assert not any(f.code == "GC217" for f in fine.findings)


def test_one_device_on_an_isolating_secondary_has_no_earth_path_to_check(tmp_path):
    r = _room(
        tmp_path,
        "transformer iso: plugged wall, primary 220 V, secondary 220 V, isolating\ndevice a: "
        "simple, plugged iso, y-capacitor 4.7 nF\n",
    )
    codes = {f.code: f for f in r.findings}
    assert codes["GC218"].severity == "note" and "no loop to earth" in codes["GC218"].message
    assert "GC215" not in codes
    assert not any("iso" in f.elements for f in r.findings if f.code == "GC109")
    assert r.device_earths is None or all(d.device != "a" for d in r.device_earths)
    # its Y capacitors' current returns to the floating winding: none reaches the main earthing
    # terminal
    assert not [c for c in r.plan.currents if c.role == "leakage"]
    # the same device behind an earthed transformer: its earth path is checked, no GC218
    r = _room(
        tmp_path,
        "transformer sd: plugged wall, primary 220 V, secondary 220 V, earthed\ndevice a: simple, "
        "plugged sd\n",
    )
    assert not any(f.code == "GC218" for f in r.findings)
    assert [d.device for d in r.device_earths] == ["a"]


def test_an_idle_isolating_outlet_is_no_unwired_outlet(tmp_path):
    r = _room(
        tmp_path,
        "transformer iso: plugged wall, primary 220 V, secondary 220 V, isolating\ndevice w: "
        "simple, plugged wall\n",
    )
    assert not any(f.code in ("GC109", "GC218") for f in r.findings)
    # the same outlet earthed: reached through its cord, no GC109 either
    r = _room(
        tmp_path,
        "transformer sd: plugged wall, primary 220 V, secondary 220 V\ndevice w: simple, plugged "
        "wall\n",
    )
    assert not any(f.code == "GC109" for f in r.findings)


def test_two_devices_sharing_a_floating_secondary_are_a_danger(tmp_path):
    body = (
        "transformer iso: plugged wall, primary 220 V, secondary 220 V, isolating\ndevice a: "
        "simple, plugged iso\ndevice b: simple, plugged iso\n"
    )
    r = _room(tmp_path, body)
    (f,) = [f for f in r.findings if f.code == "GC218"]
    assert f.severity == "danger" and f.figures == {"devices": 2, "secondary_v": 220.0}
    assert "second fault" in f.message and "nothing in the plan clears it" in f.message
    # a class II device has no exposed metal to meet the second fault: one class I device is a note
    r = _room(
        tmp_path,
        body.replace("device b: simple, plugged iso", "device b: simple, class II, plugged iso"),
    )
    assert [f.severity for f in r.findings if f.code == "GC218"] == ["note"]


def test_a_separated_device_earthed_through_its_interconnect_loses_the_separation(tmp_path):
    body = (
        "transformer iso: plugged wall, primary 220 V, secondary 220 V, isolating\ndevice a: "
        "simple, plugged iso\ndevice b: simple, plugged wall\ninterconnect link: a.gnd to b.gnd, "
        "3 m, 0.2 mm2, balanced, gain 0 dB\n"
    )
    r = _room(tmp_path, body)
    assert [(f.severity, f.elements) for f in r.findings if f.code == "GC218"] == [
        ("warning", ("a", "iso"))
    ]
    # the floating secondary's outlet has no earth: no voltage between it and the wall's to list
    assert r.outlets is None or not r.outlets.pairs
    # the link's shield open at one end: the chassis floats again, a note
    r = _room(tmp_path, body.replace("balanced, gain", "balanced, terminated a.gnd, gain"))
    assert [f.severity for f in r.findings if f.code == "GC218"] == ["note"]


@pytest.mark.parametrize("draws, fault", [((150, 100), True), ((150, 40), False)])
def test_the_devices_behind_a_transformer_against_its_rating(tmp_path, draws, fault):
    body = (
        "transformer sd: plugged wall, primary 220 V, secondary 120 V, rating 200 VA\ndevice a: "
        f"simple, plugged sd, draws {draws[0]} VA\ndevice b: simple, plugged sd, draws {draws[1]} "
        "VA\ndevice c: simple, plugged wall, draws 500 VA\n"  # on the wall: not behind it
        "device d: simple, plugged sd\n"
    )  # states no draw: not counted
    got = [f for f in _room(tmp_path, body).findings if f.code == "GC219"]
    if not fault:
        assert got == []  # 150 + 40 = 190 VA ≤ 200 VA
        return
    (f,) = got  # 150 + 100 = 250 VA > 200 VA
    assert f.severity == "fault" and f.figures == {"draws_va": 250.0, "rating_va": 200.0}
    assert "draw 250 VA, over its rating of 200 VA; d states no draw" in f.message


def test_a_strip_behind_a_transformer_gives_its_secondary(tmp_path):
    body = (
        "transformer sd: plugged wall, primary 220 V, secondary 120 V\npoint sd_strip: "
        "terminal\nwire sd_strip_cord: sd_strip to sd, 1.5 m, 1 mm2, protective\ndevice a: "
        "simple, plugged sd_strip, y-capacitor 4.7 nF\n"
    )
    amps, _ = _leak(_room(tmp_path, body), "a")
    assert amps == pytest.approx(120 * 2 * math.pi * 60 * 4.7e-9, rel=1e-12)


@pytest.mark.parametrize(
    "body, message",
    [
        ("transformer sd: plugged wall, secondary 120 V\n", "transformer sd needs 'primary'"),
        (
            "transformer sd: plugged wall, primary 230 V, secondary 120 V, earthed, isolating\n",
            "earthed or isolating, not both",
        ),
        (
            "transformer sd: plugged wall, primary 230 V, secondary 120 V 60 Hz\n",
            "a secondary at 60 Hz from a 50 Hz supply",
        ),
        (
            "transformer sd: plugged nowhere, primary 230 V, secondary 120 V\n",
            "6:25: error: undefined point or metal part 'nowhere'",
        ),
        (
            "transformer sd: plugged nowhere, primary 230 V, secondary 120 V, isolating\n",
            "6:25: error: undefined outlet 'nowhere'",
        ),
        (
            "transformer sd: plugged sd, primary 230 V, secondary 120 V\n",
            "6:25: error: transformer sd is plugged into its own secondary",
        ),
        (
            "transformer sd: plugged wall, primary 230 V, secondary 120 V, rating 500 W\n",
            "unknown unit",
        ),
        (
            "transformer sd: plugged wall, primary 230 V, secondary 120 V, ratng 500 VA\n",
            "did you mean 'rating'",
        ),
        (
            "block b {\n  transformer sd: plugged wall, primary 230 V, secondary 120 V\n}\nplace "
            "b as x\n",
            "belongs at the top level",
        ),
    ],
)
def test_transformer_errors_are_located(body, message):
    with pytest.raises(PlanErrors) as e:
        load_text(ROOM.format(supply="230 V 50 Hz") + body, "room.gplan")
    assert message in str(e.value)
    assert all(x.location.line >= 1 and x.location.file == "room.gplan" for x in e.value.errors)


def test_a_secondary_at_the_supply_frequency_is_accepted_and_a_transformer_needs_a_supply():
    load_text(
        ROOM.format(supply="230 V 50 Hz")
        + "transformer sd: plugged wall, primary 230 V, secondary 120 V 50 Hz\n",
        "room.gplan",
    )
    text = ROOM.replace("supply {supply}, system TN-S\n", "")
    with pytest.raises(PlanErrors) as e:
        load_text(
            text + "transformer sd: plugged wall, primary 230 V, secondary 120 V\n", "room.gplan"
        )
    assert "transformer sd needs the installation's supply" in str(e.value)


def test_a_60_hz_device_behind_a_50_hz_transformer_is_refused(tmp_path):
    (tmp_path / "amp.gplan").write_text(RECTIFIED.format(mains="120 V 60 Hz"))
    text = (
        ROOM.format(supply="230 V 50 Hz")
        + "transformer sd: plugged wall, primary 230 V, secondary 120 V\n"
        'device amp: "amp.gplan", plugged sd\n'
    )
    with pytest.raises(PlanErrors) as e:
        load_text(text, str(tmp_path / "room.gplan"), root=tmp_path)
    assert "a transformer changes the voltage, not the frequency" in str(e.value)


def test_a_transformer_belongs_to_the_installation_not_to_a_device_plan(tmp_path):
    (tmp_path / "box.gplan").write_text(
        ROOM.format(supply="230 V 50 Hz")
        + "transformer sd: plugged wall, primary 230 V, secondary 120 V\n"
    )
    text = ROOM.format(supply="230 V 50 Hz") + 'device box: "box.gplan", plugged wall\n'
    with pytest.raises(PlanErrors) as e:
        load_text(text, str(tmp_path / "room.gplan"), root=tmp_path)
    assert "device box's plan has a transformer" in str(e.value)


def test_a_large_flat_file_with_a_transformer_is_read_whole():
    from groundcheck.language.bigfile import split_point

    body = "".join(f"point p{i}: junction\n" for i in range(200))
    text = ROOM.format(supply="230 V 50 Hz") + body
    assert split_point(text, min_lines=10) is not None  # a flat file is cut in two
    xf = "transformer sd: plugged wall, primary 230 V, secondary 120 V\n"
    assert split_point(text + xf, min_lines=10) is None  # one with a transformer is not


def test_the_json_document_lists_the_transformers_and_validates(cli, tmp_path):
    import json

    import jsonschema
    from helpers import ROOT

    schema = json.loads((ROOT / "docs" / "schema" / "groundcheck-result.schema.json").read_text())
    f = tmp_path / "room.gplan"
    f.write_text(
        ROOM.format(supply="230 V 50 Hz")
        + "transformer sd: plugged wall, primary 230 V, secondary 120 V, rating 1 kVA\n"
        "transformer iso: plugged wall, primary 230 V, secondary 230 V, isolating\ndevice a: "
        "simple, plugged sd\n"
    )
    code, out, _ = cli("check", str(f), "--format", "json")
    doc = json.loads(out)
    jsonschema.validate(doc, schema, cls=jsonschema.Draft202012Validator)
    assert doc["plan"]["transformers"] == [
        {
            "name": "sd",
            "plugged": "wall",
            "primary_v": 230.0,
            "secondary_v": 120.0,
            "rating_va": 1000.0,
            "isolating": False,
        },
        {
            "name": "iso",
            "plugged": "wall",
            "primary_v": 230.0,
            "secondary_v": 230.0,
            "rating_va": None,
            "isolating": True,
        },
    ]
