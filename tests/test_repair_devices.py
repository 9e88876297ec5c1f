"""The repair advisor inside a device's own plan: a phono stage whose supply box sends the
rectifier's centre tap and reservoir negative down the umbilical on separate wires (a trial plan of
our own), so that the charging current crosses into the phono stage and through its cathode wire.
The trade's fix is inside the supply box: join the two ends there (common practice)."""

import json
import shutil
from pathlib import Path

from groundcheck import load
from groundcheck.analysis import Options
from groundcheck.advice.repair import suggest

HERE = Path(__file__).resolve().parent / "plans" / "outboard-supply"


def _copy(tmp_path) -> Path:
    shutil.copytree(HERE, tmp_path / "plans")
    return tmp_path / "plans" / "phono.gplan"


def test_the_best_suggestion_edits_the_supply_box_own_plan(tmp_path):
    path = _copy(tmp_path)
    before, evs = suggest(load(path), path.read_text(), Options(), path.parent, path)
    assert {f.code for f in before.findings} >= {"GC102", "GC303"}
    best = evs[0]
    assert not best.rejected
    (edit,) = best.candidate.edits
    assert edit.file is not None and Path(edit.file).name == "supply-box.gplan"
    assert "device's own plan devices/supply-box.gplan" in best.candidate.title
    assert "join psu." in best.candidate.title
    assert not {"GC102", "GC303"} & {f.code for f in best.result.findings}
    # the umbilical carries supply current: a balanced interconnect is never the answer for it
    assert not any("balanced" in e.candidate.title for e in evs)


def test_apply_writes_a_changed_copy_and_never_the_device_plan(cli, tmp_path):
    path = _copy(tmp_path)
    device = path.parent / "devices" / "supply-box.gplan"
    original = device.read_bytes()
    out = tmp_path / "fixed.gplan"
    code, text, err = cli("suggest", str(path), "--apply", str(out))
    assert code == 0, err
    assert "--- a/devices/supply-box.gplan" in text and "+wire ct_lead: ct to res_neg" in text
    copy = tmp_path / "fixed.supply-box.gplan"
    assert copy.exists() and device.read_bytes() == original
    assert 'device psu: "fixed.supply-box.gplan"' in out.read_text()
    shutil.copytree(path.parent / "devices", tmp_path / "devices")  # the new plan's library folder
    code, text, _ = cli("check", str(out), "--format", "json")
    assert code == 0 and not {"GC102", "GC303"} & {f["code"] for f in json.loads(text)["findings"]}
    out.unlink()
    code, _, err = cli("suggest", str(path), "--apply", str(out))
    assert code == 2 and "fixed.supply-box.gplan exists" in err and not out.exists()


def test_a_device_plan_statement_names_points_without_the_devices_prefix():
    # a wire inside a block placed in a device's own plan, moved to the device's star: written
    # "star" there (the device's prefix and the placement's dropped), never "phono.star", which
    # that file does not know (the advisor once offered such edits as load errors)
    from groundcheck.advice.changes import local_name

    assert local_name("phono.right.in_gnd", "in_gnd", "phono.star") == "star"
    assert local_name("phono.right.in_gnd", "in_gnd", "phono.right.k1") == "k1"
    assert local_name("right.in_gnd", "in_gnd", "star") == "star"
    assert local_name("in_gnd", "in_gnd", "star") == "star"


def test_a_change_to_a_plan_placed_twice_names_both_placements(tmp_path):
    # two monoblocks placed from one plan: the change in that plan is made in each, and the title
    # says so (a builder told of mono_l alone would rewire one amplifier)
    from types import SimpleNamespace

    from groundcheck.advice.changes import Candidate, device_note
    from groundcheck.advice.edits import Edit

    own = str(tmp_path / "monoblock.gplan")
    plan = SimpleNamespace(
        device_plans=(
            ("mono_l", SimpleNamespace(file=own)),
            ("mono_r", SimpleNamespace(file=own)),
            ("pre", SimpleNamespace(file=str(tmp_path / "preamp.gplan"))),
        )
    )
    edit = Edit(3, "x", (), 3, own)
    c = Candidate("take mono_l.spk_com to mono_l.star", "GC306", (edit,), False)
    title = device_note(c, str(tmp_path / "room.gplan"), plan).title
    assert "placed as mono_l and mono_r: the change is made in each" in title
