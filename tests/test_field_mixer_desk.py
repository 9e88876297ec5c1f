"""An outside builder's six-channel valve mixing desk (tests/field/valve-mixer-desk, copied as
written, his variants in variants/): one 480 × 250 × 2 mm aluminium plate, the supply in an
included file (psu.gplan), mistakes planted on purpose: the protective earth under a transformer
screw, the HT centre tap to a tag under another, open-frame jacks bolted through the plate, the
mix-bus screen at both ends, the heater pair untwisted.

His verdict (verdict.md): the protective earth's shared fastening is a danger and its fix a stud
of its own; the charging current's 100 Hz line ≈ −42 dBV at the output by his ladder reduction of
the bus; never lift an earth. What he found (his report): suggest said nothing of the danger, whose
statement is in the included file, and said "No change found that improves the plan" while it
remained; the include's findings were located as psu.gplan, a name that led nowhere from where he
ran the command; the 50 Hz field line about 10 dB over his estimate (open, below)."""

import json
from pathlib import Path

import pytest

from groundcheck import load
from groundcheck.analysis import Options, analyze

FIELD = Path(__file__).parent / "field" / "valve-mixer-desk"


@pytest.fixture(scope="module")
def desk():
    return analyze(load(FIELD / "mixer.gplan"))


def test_the_shared_transformer_screw_is_the_danger_named_in_the_included_file(desk):
    (d,) = [f for f in desk.findings if f.severity == "danger"]
    assert d.code == "GC202" and d.location.line == 13
    assert Path(d.location.file) == FIELD / "psu.gplan"  # beside the plan, as it was named
    assert "stud of its own" in d.fix
    # what he wired right is not flagged: the rectifier valve's floating heater, the 1 mm²
    # protective lead (thicker than the 0.75 mm² line conductor), the ceramic fuse
    assert not {"GC204", "GC206", "GC207", "GC211"} & {f.code for f in desk.findings}
    assert not [f for f in desk.findings if "rh" in f.elements]
    # his plan has a ground bus and no star: the shared returns' fixes say where a return goes
    # without sending him to a star he has not got
    shared = [f for f in desk.findings if f.code == "GC102"]
    assert shared and all("star" not in f.fix for f in shared)
    assert "then one wire to the signal ground's common point" in shared[0].fix


def test_the_charging_currents_100_hz_line_is_his_ladder_estimate(desk):
    # his hand reduction of the bus as a ladder (50 mm segments of 2 mm², each channel's jack
    # wire of 140 mm × 0.5 mm² and its nut to the plate, 27 mA rms at 100 Hz from a valve
    # rectifier's wide pulses, each input stage reading 0.9 of its bus voltage, × 100): 7.6 mV,
    # −42 dBV (verdict.md, "My hand estimate", item 1)
    line = next(x for x in desk.hum.channels["mix"].spectrum if x.frequency == 100.0)
    assert line.dbv == pytest.approx(-42.0, abs=0.5)


@pytest.mark.xfail(
    strict=True,
    reason="open: an input stage reads its pair along the least-resistance path (through the "
    "plate and the whole bus), not along the jack's own wire its screened lead runs beside; his "
    "estimate of the transformer field's 50 Hz line is −47 dBV, the tool's −37.6",
)
def test_the_fields_50_hz_line_is_within_3_db_of_his_estimate(desk):
    line = next(x for x in desk.hum.channels["mix"].spectrum if x.frequency == 50.0)
    assert line.dbv == pytest.approx(-47.0, abs=3.0)


def test_suggest_mends_the_danger_in_the_included_file_as_a_copy(cli, tmp_path, monkeypatch):
    # the advisor never looked at the included file: no own-stud change, and "No change found
    # that improves the plan" while the danger remained. It now changes the files the plan itself
    # includes, written as copies beside the new plan, which names them; the originals unchanged
    for p in FIELD.glob("*.gplan"):
        (tmp_path / p.name).write_bytes(p.read_bytes())
    monkeypatch.chdir(tmp_path)
    code, out, err = cli(
        "suggest", "mixer.gplan", "--budget", "20", "--no-hum", "--apply", "fixed.gplan"
    )
    first = next(x for x in out.splitlines() if x.startswith("1. "))
    assert first.startswith("1. give the protective earth a stud of its own")
    assert "in the included file psu.gplan" in first
    assert "wrote a changed copy of psu.gplan to fixed.psu.gplan" in err
    assert (
        'include "fixed.psu.gplan"   # changed copy of psu.gplan'
        in Path("fixed.gplan").read_text()
    )
    assert Path("psu.gplan").read_bytes() == (FIELD / "psu.gplan").read_bytes()
    code, out, _ = cli("check", "fixed.gplan", "--no-hum", "--format", "json")
    assert not [f for f in json.loads(out)["findings"] if f["severity"] == "danger"]


def test_suggest_takes_the_centre_tap_off_its_tag_straight_to_the_reservoir(cli, monkeypatch):
    # his F1 and his own first fix (v2_firstfix): the HT centre tap's lead off the transformer
    # screw's tag, straight to the reservoir negative. The advisor once moved only wires whose far
    # end was not fastened to metal, tried the reservoir's lead to the bus instead (refused: the
    # bus lost its wired return) and left fourteen GC102 in the include; the winding's own lead to
    # a tag may now move when the ground keeps another bond
    monkeypatch.chdir(FIELD)
    code, out, _ = cli("suggest", "mixer.gplan", "--budget", "20", "--no-hum")
    assert "-wire ctlead: ct to ct_tag, 60 mm, 0.5 mm2, return" in out
    assert "+wire ctlead: ct to res_neg, 84 mm, 0.5 mm2, return" in out
    combined = out[out.index("Combined (best first") :]
    assert "join ct straight to res_neg (ctlead)" in combined
    assert "Left in included files" not in out
    # the old tool's applied plan (v3): the way through the chassis tag is no better way to refuse
    # it by
    monkeypatch.chdir(FIELD / "variants" / "v3_tool_applied")
    code, out, _ = cli("suggest", "mixer.gplan", "--budget", "20", "--no-hum")
    assert "+wire ctlead: ct to res_neg, 84 mm, 0.5 mm2, return" in out


def test_suggest_lists_what_it_leaves_in_included_files(cli, tmp_path, monkeypatch):
    # what the combined set leaves in an include is listed at the end with check's fix lines, and
    # in JSON; the danger it mended is not among them. His plan, copied, with one length in the
    # include made implausible (a note no change mends)
    for p in FIELD.glob("*.gplan"):
        (tmp_path / p.name).write_bytes(p.read_bytes())
    psu = tmp_path / "psu.gplan"
    text = psu.read_text()
    assert "wire hctw: hct to bus_ps, 50 mm," in text
    psu.write_text(
        text.replace("wire hctw: hct to bus_ps, 50 mm,", "wire hctw: hct to bus_ps, 5 mm,")
    )
    monkeypatch.chdir(tmp_path)
    code, out, _ = cli("suggest", "mixer.gplan", "--budget", "20", "--no-hum")
    tail = out[out.index("Left in included files after the combined set") :]
    assert "  - GC112 note at psu.gplan:36:1: measure the route of hctw again" in tail
    assert "GC202" not in tail
    code, out, _ = cli("suggest", "mixer.gplan", "--budget", "20", "--no-hum", "--format", "json")
    left = json.loads(out)["left_in_included_files"]
    assert [x["location"] for x in left] == ["psu.gplan:36:1"]


def test_the_signal_grounds_bond_is_never_kept_on_the_centre_taps_lead():
    # his v2b: the centre tap joined to the reservoir's negative by a wire of its own, its old lead
    # to a tag under a transformer screw left in place. GC105 kept that tag as the signal ground's
    # one bond ("nearest the protective earth") and offered to cut the bus from its intended bond
    # tag (b0): unbolt the transformer and the signal ground floats. A bond made by a wire from a
    # rectifier's winding side is kept last: the tag's lead goes
    plan = load(FIELD / "variants" / "v2b_parallel" / "mixer_ctret.gplan")
    (f,) = [f for f in analyze(plan, Options(hum=False)).findings if f.code == "GC105"]
    assert f.fix.startswith("keep the bond at bus_gt (the bond at ct_tag is a supply's own lead")
    assert ("remove", "ctlead") in f.actions and ("remove", "b0") not in f.actions


def test_the_hum_table_prints_no_rounding_as_a_figure(cli, desk, tmp_path):
    # a full-wave supply puts nothing at 250 Hz: its line there is the rounding of a sum that
    # cancels, −214 dBV, 177 dB under the 50 Hz line; the reports leave it out (the JSON keeps
    # every line)
    line = next(x for x in desk.hum.channels["mix"].spectrum if x.frequency == 250.0)
    assert line.dbv < -200
    code, out, _ = cli("check", str(FIELD / "mixer.gplan"))
    table = out[out.index("Hum and buzz at the output") :]
    assert "│   250 │" not in table and "│   300 │" in table
    # the HTML report's spectrum table and chart alike (ChannelHum.spectrum_shown)
    code, _, _ = cli("report", str(FIELD / "mixer.gplan"), "-o", str(tmp_path / "r.html"))
    page = (tmp_path / "r.html").read_text()
    assert "<td class=num>250</td>" not in page and "<td class=num>300</td>" in page
