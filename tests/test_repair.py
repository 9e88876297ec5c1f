"""Repair advisor and comparison."""

import json
import shutil
import subprocess

import pytest

from groundcheck import load, load_text
from groundcheck.analysis import Options, analyze
from groundcheck.compare import compare
from groundcheck.repair import apply_edits, candidates, greedy, suggest, unified_diff

from helpers import EXAMPLES

DUAL = next(e for e in EXAMPLES if e.name.startswith("dual-mono"))
MONO = next(e for e in EXAMPLES if e.name.startswith("monoblock"))


def _suggest(path):
    return suggest(load(path), path.read_text(), Options(), path.resolve().parent, path.resolve())


def _codes_after(ev):
    return {f.code for f in ev.result.findings}


def test_dual_mono_best_suggestion_clears_the_shared_return():
    before, evs = _suggest(DUAL)
    best = evs[0]
    assert not best.rejected
    assert "GC102" not in _codes_after(best) and "GC303" not in _codes_after(best)      # seeded mistake 1
    assert any(not e.rejected and "channel_tie" in e.candidate.title and
               not any(f.code == "GC101" for f in e.result.findings) for e in evs)           # seeded mistake 2


def test_monoblock_suggestions_clear_each_seeded_mistake():
    before, evs = _suggest(MONO)
    useful = [e for e in evs if not e.rejected]
    assert any("GC202" not in _codes_after(e) for e in useful)                 # mistake 1: own protective stud
    assert any("GC105" not in _codes_after(e) for e in useful)                 # mistake 2: bonded twice
    assert any("GC108" not in _codes_after(e) for e in useful)                 # mistake 3: shield both ends


@pytest.mark.parametrize("path", [DUAL, MONO], ids=["dual", "mono"])
def test_predicted_gain_matches_the_applied_plan(path, tmp_path):
    before, evs = _suggest(path)
    best = next(e for e in evs if not e.rejected)
    new = tmp_path / path.name
    new.write_text(apply_edits(path.read_text(), best.candidate.edits))
    again = analyze(load(new))
    for ch, h in best.result.hum.channels.items():
        assert again.hum.channels[ch].total_v == pytest.approx(h.total_v, rel=1e-9, abs=1e-15)
    assert sorted(f.code for f in again.findings) == sorted(f.code for f in best.result.findings)


@pytest.mark.skipif(shutil.which("patch") is None, reason="the patch program is not installed")
def test_printed_diff_applies_with_patch(tmp_path):
    before, evs = _suggest(DUAL)
    best = next(e for e in evs if not e.rejected)
    work = tmp_path / DUAL.name
    work.write_text(DUAL.read_text())
    diff = unified_diff(DUAL.read_text(), best.candidate.edits, DUAL.name)
    subprocess.run(["patch", "-p1", "-s"], input=diff, text=True, cwd=tmp_path, check=True)
    assert work.read_text() == apply_edits(DUAL.read_text(), best.candidate.edits)
    load(work)


PE_ONLY_LOOP = """plan "two protective leads"
mains 230 V 50 Hz, fuse 2 A slow, line-conductor 0.75 mm2
metal deck: steel 1 mm, 200 x 100 mm, touchable
point pe1: stud, at 20,20 on deck
point pe2: stud, at 180,80 on deck
wire pe_a: mains.pe to pe1, 100 mm, 1 mm2, protective
wire pe_b: mains.pe to pe2, 250 mm, 1 mm2, protective
bolt n1: pe1 to deck
bolt n2: pe2 to deck
"""


def test_loop_closed_by_the_protective_earth_gets_no_suggestion_touching_it(tmp_path):
    p = tmp_path / "pe.gplan"
    p.write_text(PE_ONLY_LOOP)
    plan = load(p)
    result = analyze(plan)
    assert result.loop_total == 1
    protective = {"pe_a", "pe_b"}
    for c in candidates(plan, result, PE_ONLY_LOOP):
        lines = {e.line for e in c.edits}
        touched = {x.name for x in plan.conductors if x.location.line in lines}
        assert not (touched & protective) or c.touches_protective
    _, evs = suggest(plan, PE_ONLY_LOOP, Options(), tmp_path, p.resolve())
    for e in evs:
        if e.candidate.touches_protective:
            assert e.rejected


def test_compare_with_itself_reports_no_change():
    r = analyze(load(MONO))
    d = compare(r, analyze(load(MONO)))
    assert d["findings"]["fixed"] == [] and d["findings"]["introduced"] == []
    assert d["loops"]["removed"] == [] and d["loops"]["added"] == []
    for h in d["hum"].values():
        assert h["change_db"] == pytest.approx(0.0, abs=1e-9)
    for p in d["protective_earth"]:
        assert p["before_ohm"] == p["after_ohm"]


def test_greedy_search_reaches_the_goal_on_examples():
    for path in (DUAL, MONO):
        chosen, final, text = greedy(load(path), path.read_text(), Options(), path.resolve().parent, path.resolve())
        assert chosen
        assert not any(f.severity in ("danger", "fault") for f in final.findings)
        assert all(h.audible is not True for h in final.hum.channels.values())
        load_text(text, path.name, root=path.resolve().parent)


def test_suggest_apply_and_compare_commands(cli, tmp_path):
    out = tmp_path / "fixed.gplan"
    code, text, err = cli("suggest", str(DUAL), "--apply", str(out))
    assert code == 0 and "Combined (greedy search)" in text and out.exists()
    code, _, err = cli("suggest", str(DUAL), "--apply", str(out))
    assert code == 2 and "never replaces one" in err
    code, text, _ = cli("compare", str(DUAL), str(out), "--format", "json")
    d = json.loads(text)
    assert code == 0 and any(f["code"] == "GC102" for f in d["findings"]["fixed"])
    assert d["hum"]["left"]["audible_before"] is True and d["hum"]["left"]["audible_after"] is False
    code, text, _ = cli("compare", str(DUAL), str(out))
    assert "fixed" in text and "Hum, left" in text
    code, text, _ = cli("compare", str(DUAL), str(out), "--format", "html")
    assert text.startswith("<!DOCTYPE html>")
    code, text, _ = cli("suggest", str(MONO), "--format", "json")
    doc = json.loads(text)
    assert doc["suggestions"] and all(s["diff"].startswith("--- a/") for s in doc["suggestions"])


def test_installation_suggestions_work_on_the_signal_side():
    studio = DUAL.parent / "studio" / "project-studio.gplan"
    before, evs = _suggest(studio)
    useful = [e for e in evs if not e.rejected]
    bal = next(e for e in useful if e.candidate.title == "use a balanced interconnect for mix_out")
    assert bal.hum_change_db["monitors"] < -40                 # 50 dB common-mode rejection assumed
    for e in useful:                                             # nothing re-routes or removes a cable or a protective conductor
        assert "cord" not in e.candidate.title and "run_" not in e.candidate.title
    chosen, final, _ = greedy(load(studio), studio.read_text(), Options(), studio.resolve().parent, studio.resolve())
    assert all(h.audible is not True for h in final.hum.channels.values())
