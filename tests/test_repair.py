"""Repair advisor and comparison."""

import json
import math
import shutil
import subprocess

import pytest

from groundcheck import load, load_text
from groundcheck.analysis import Options, analyze
from groundcheck.advice.compare import compare
from groundcheck.advice.repair import apply_edits, candidates, greedy, suggest, unified_diff

from helpers import EXAMPLES

DUAL = next(e for e in EXAMPLES if e.name.startswith("dual-mono"))
HEADPHONE = next(e for e in EXAMPLES if e.name.startswith("headphone"))
HEAD = next(e for e in EXAMPLES if e.name.startswith("guitar-head"))


def _head_variant() -> str:
    """The guitar head with two more mistakes for the advisor: the transformer's frame clamped
    under the protective-earth stud (a shared fastener), and the input lead's shield terminated at
    both ends."""
    text = HEAD.read_text()
    text = text.replace(
        "metal cover: steel 0.8 mm, 400 x 200 mm, touchable\n",
        "metal cover: steel 0.8 mm, 400 x 200 mm, touchable\nmetal ptx_frame: steel 1 mm, 80 x 70 "
        "mm, at 50,100, internal\n",
    )
    text = text.replace(
        "bolt pe_nut: pe_stud to chassis\n",
        "bolt pe_nut: pe_stud to chassis\nbolt ptx_clamp: ptx_frame to pe_stud, contact 1 mohm\n",
    )
    return text + "shield in_shield: in_sleeve to v1_k, 95 mm, 0.2 mm2, terminated both\n"


def _suggest(path):
    return suggest(load(path), path.read_text(), Options(), path.resolve().parent, path.resolve())


def _codes_after(ev):
    return {f.code for f in ev.result.findings}


def test_dual_mono_suggestions_clear_each_planted_mistake():
    before, evs = _suggest(DUAL)
    best = evs[0]
    assert not best.rejected
    # the left channel's loop pickup (-86 dBV) is the largest hum: opening the loop at the second
    # bond ranks first
    assert best.candidate.title.startswith("remove arm_gnd") and not {
        "GC101",
        "GC105",
    } & _codes_after(best)  # 1
    # the shared filter return is a note (-105 dBV at the right output, below the contributor
    # level), still cleared; of the changes that gain as much, the smaller one ranks first: the
    # equalisation ground's own 36 mm wire to its star, not a 54 mm re-route of the supply's wiring
    # (lengths: straight route + 20 %, by hand from right.eq_gnd 255,170 to right.star 260,200:
    # 30.4 mm x 1.2 = 36 mm)
    shared = [e for e in evs if not e.rejected and e.candidate.reason == "GC102"]
    assert shared[0].candidate.title.startswith(
        "take right.eq_gnd to right.star"
    )  # planted mistake 3
    assert round(shared[0].candidate.wire, 3) == 0.036 and "GC102" not in _codes_after(shared[0])
    assert any(
        not e.rejected
        and "right_out" in e.candidate.title
        and not [f for f in e.result.findings if f.code == "GC103" and "right.star" in f.elements]
        for e in evs
    )  # planted mistake 2
    # the equalisation ground goes to its own channel's star, not to the nearest star by hops
    assert any("take right.eq_gnd to right.star" in e.candidate.title for e in evs)


def test_headphone_suggestions_clear_each_planted_mistake():
    before, evs = _suggest(HEADPHONE)
    useful = [e for e in evs if not e.rejected]
    assert useful[0].candidate.reason == "GC206"  # a danger cleared ranks first (mistake 1)
    join = next(
        e for e in useful if e.candidate.title.startswith("join br_neg straight to res_0v")
    )  # mistake 2
    assert not {"GC102", "GC301", "GC303"} & _codes_after(join)
    assert any(
        "hp_gnd" in e.candidate.title and "GC304" not in _codes_after(e) for e in useful
    )  # mistake 3


def test_a_poorly_bonded_panel_gets_a_protective_wire_of_its_own(tmp_path):
    # mistake 1 of the headphone amplifier: the front panel's only protective path is 4 ohm of
    # anodised threads
    before, evs = _suggest(HEADPHONE)
    (e,) = [e for e in evs if e.candidate.title.startswith("bond front by a protective wire")]
    assert not e.rejected and e.candidate.reason == "GC206"
    after = _codes_after(e)
    assert (
        "GC206" not in after and "GC202" not in after
    )  # the inlet's stud keeps its fastener to itself
    new = load_text(
        apply_edits(HEADPHONE.read_text(), e.candidate.edits),
        str(tmp_path / "h.gplan"),
        root=HEADPHONE.parent,
    )
    wire = next(c for c in new.conductors if c.name == "front_pe_bond")
    assert wire.role == "protective" and wire.area >= new.mains.line_area
    # its length: the straight line between its two new studs plus the stated 20 %, to the
    # millimetre, and never under 100 mm (slack to take the panel off: common practice)
    a, b = new.point("case_bond").pos, new.point("front_pe").pos
    assert wire.length == pytest.approx(max(round(math.dist(a, b) * 1.2, 3), 0.1), abs=1e-3)
    assert new.point("case_bond").on == "case" and new.point("front_pe").on == "front"
    front = next(p for p in analyze(new).safety.parts if p.part == "front")
    assert front.path_resistance < 0.1  # the default limit, 0.1 ohm
    # the old contact stays: nothing protective is removed
    assert any(c.name == "front_screws" for c in new.conductors)


def test_guitar_head_suggestions_answer_its_planted_mistakes():
    before, evs = _suggest(HEAD)
    useful = [e for e in evs if not e.rejected]
    assert any(
        e.candidate.title.startswith("join filt_neg straight to res_neg")
        and "GC102" not in _codes_after(e)
        for e in useful
    )  # mistake 1
    assert any(
        e.candidate.title.startswith("insulate jack_nut")
        and not {"GC101", "GC105"} & _codes_after(e)
        for e in useful
    )  # mistake 2


def test_advisor_gives_the_protective_earth_its_own_stud_and_weighs_lifting_a_shield(tmp_path):
    before, evs = _evs(_head_variant(), tmp_path, "head.gplan")
    assert {"GC202", "GC108"} <= {f.code for f in before.findings}
    useful = [e for e in evs if not e.rejected]
    assert any("GC202" not in _codes_after(e) for e in useful)
    # the transformer drives a current I round chassis – jack_nut – in_sleeve – star – bond_stud;
    # at in_sleeve it splits between in_gnd (150 mm of 0.5 mm², 5.17 mΩ) and the shield with k_gnd
    # (95 mm of 0.2 mm², 8.19 mΩ, and 90 mm of 0.5 mm², 3.10 mΩ; copper 17.241 nΩ·m, IEC 60028).
    # The stage reads the drop along its least-resistance path from in_sleeve to v1_k, the shield:
    # 5.17/(5.17 + 8.19 + 3.10) · 8.19 mΩ · I = 2.57 mΩ · I.  Lifted, the whole current runs in
    # in_gnd and k_gnd carries none: 5.17 mΩ · I, about 6 dB louder (current division and Ohm's law
    # by hand).  So the lift clears GC108 and is rejected as louder.
    (lift,) = [e for e in evs if e.candidate.title.startswith("terminate shield in_shield")]
    assert "GC108" not in _codes_after(lift) and lift.rejected and "louder" in lift.rejected


@pytest.mark.parametrize("path", [DUAL, HEADPHONE], ids=["dual", "headphone"])
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
    # both leads and both studs' nuts carry the protective earth: nothing of the loop is offered
    # for opening
    assert {"pe_a", "pe_b", "n1", "n2"} <= result.protective
    assert [lp.open_at for lp in result.loops] == [""]
    # (its glass fuse is GC211's: a high-breaking fuse is offered, an edit of the mains statement)
    assert [c for c in candidates(plan, result, PE_ONLY_LOOP) if c.action != "fuse"] == []
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
    r = analyze(load(HEADPHONE))
    d = compare(r, analyze(load(HEADPHONE)))
    assert d["findings"]["fixed"] == [] and d["findings"]["introduced"] == []
    assert d["loops"]["removed"] == [] and d["loops"]["added"] == []
    for h in d["hum"].values():
        assert h["change_db"] == pytest.approx(0.0, abs=1e-9)
    for p in d["protective_earth"]:
        assert p["before_ohm"] == p["after_ohm"]


def test_greedy_search_reaches_the_goal_on_examples():
    for path in (DUAL, HEADPHONE):
        chosen, final, text = greedy(
            load(path), path.read_text(), Options(), path.resolve().parent, path.resolve()
        )
        assert chosen
        assert not any(f.severity in ("danger", "fault") for f in final.findings)
        assert all(h.audible is not True for h in final.hum.channels.values())
        load_text(text, path.name, root=path.resolve().parent)


def test_suggest_apply_and_compare_commands(cli, tmp_path):
    out = tmp_path / "fixed.gplan"
    code, text, err = cli("suggest", str(HEADPHONE), "--apply", str(out))
    assert code == 0 and "Combined" in text and out.exists()
    code, _, err = cli("suggest", str(DUAL), "--apply", str(out))
    assert code == 2 and "--force" in err  # refused before any analysis
    code, _, err = cli("suggest", str(DUAL), "--apply", str(DUAL), "--force")
    assert code == 2 and DUAL.read_text().startswith(
        "#"
    )  # never over the plan itself, even with --force
    code, _, err = cli("suggest", str(DUAL), "--pick", "1")
    assert code == 2 and "--apply" in err
    code, text, _ = cli("compare", str(HEADPHONE), str(out), "--format", "json")
    d = json.loads(text)
    assert code == 0 and any(f["code"] == "GC102" for f in d["findings"]["fixed"])
    assert (
        d["hum"]["left"]["audible_before"] is True and d["hum"]["left"]["audible_after"] is False
    )
    code, text, _ = cli("compare", str(HEADPHONE), str(out))
    assert "fixed" in text and "Hum, left" in text
    code, text, _ = cli("compare", str(HEADPHONE), str(out), "--format", "html")
    assert text.startswith("<!DOCTYPE html>")
    code, text, _ = cli("suggest", str(HEADPHONE), "--format", "json")
    doc = json.loads(text)
    assert doc["suggestions"] and all(s["diff"].startswith("--- a/") for s in doc["suggestions"])


def test_installation_suggestions_work_on_the_signal_side():
    studio = DUAL.parent / "studio" / "project-studio.gplan"
    before, evs = _suggest(studio)
    useful = [e for e in evs if not e.rejected]
    bal = next(e for e in useful if e.candidate.title == "use a balanced interconnect for mix_out")
    assert bal.hum_change_db["monitors"] < -40  # 50 dB common-mode rejection assumed
    # nothing re-routes or removes a cable or a protective conductor
    for e in useful:  # (a plug move's title may end "— if its cord reaches (…)")
        change = e.candidate.title.split(" — ")[0]
        assert "cord" not in change and "run_" not in change
    chosen, final, _ = greedy(
        load(studio), studio.read_text(), Options(), studio.resolve().parent, studio.resolve()
    )
    assert all(h.audible is not True for h in final.hum.channels.values())


ROLELESS_PE = """plan "Headphone amplifier, role-less earth lead"
mains 230 V 50 Hz, fuse 500 mA slow, breaking high, line-conductor 0.75 mm2
metal case: aluminium 2 mm, 200 x 150 mm, touchable
point pe_stud: stud, at 20,130 on case
wire pe_lead: mains.pe to pe_stud, 60 mm, 0.75 mm2
bolt pe_nut: pe_stud to case
point star: star, at 100,60 on case
point gnd_lug: lug, at 40,130 on case
bolt lug_nut: gnd_lug to case
wire star_bond: star to gnd_lug, 70 mm, 0.5 mm2
point in_sleeve: sleeve, at 180,60 on case
bolt jack_nut: in_sleeve to case
wire in_gnd: in_sleeve to star, 80 mm, 0.5 mm2
point k1: pad
wire k_ret: k1 to star, 40 mm, 0.5 mm2
stage amp: in_sleeve to k1, gain 20 dB, channel main
"""


def _evs(text, tmp_path, name="plan.gplan"):
    f = tmp_path / name
    f.write_text(text)
    return suggest(load(f), text, Options(), tmp_path, f.resolve())


def test_role_less_protective_wire_is_never_touched(tmp_path):
    before, evs = _evs(ROLELESS_PE, tmp_path)
    assert "pe_lead" in before.protective
    assert any(f.code == "GC209" for f in before.findings)
    pe_line = (
        ROLELESS_PE.split("\n").index("wire pe_lead: mains.pe to pe_stud, 60 mm, 0.75 mm2") + 1
    )
    for e in evs:
        if any(ed.line == pe_line for ed in e.candidate.edits):
            assert e.rejected, e.candidate.title
    # the second chassis bond (the uninsulated jack) is still answered
    assert any(not e.rejected and "jack_nut" in e.candidate.title for e in evs)


def test_role_less_building_runs_stay_on_the_protective_route(tmp_path):
    studio = EXAMPLES[0].parent / "studio" / "project-studio.gplan"
    text = studio.read_text().replace(", protective\n", "\n")
    (tmp_path / "devices").mkdir()
    for f in (studio.parent / "devices").iterdir():
        (tmp_path / "devices" / f.name).write_text(f.read_text())
    before, evs = _evs(text, tmp_path, "studio.gplan")
    assert {"run_a", "run_b", "strip_cord"} <= before.protective
    for e in evs:
        if not e.rejected:
            assert e.result.plan is not None
            assert {"run_a", "run_b", "strip_cord"} <= e.result.protective, e.candidate.title
            assert not any(f.code == "GC215" for f in e.result.findings), e.candidate.title


def test_suggestions_read_as_levels(tmp_path):
    from groundcheck.advice.report import suggestions_text

    before, evs = _evs(ROLELESS_PE, tmp_path)
    text = suggestions_text(before.plan, ROLELESS_PE, "plan.gplan", evs, [], before, "caution")
    assert "finding(s)" not in text


def test_uninsulated_socket_is_insulated_not_unwired(tmp_path):
    # the trade's fix for a socket bonded to the chassis: insulate the socket, keep its ground wire
    # and the one bond next to the protective-earth stud (common practice)
    before, evs = _evs(ROLELESS_PE, tmp_path)
    (f,) = [f for f in before.findings if f.code == "GC105"]
    assert f.actions == (("insulate", "jack_nut"),)
    assert "keep the bond at gnd_lug" in f.fix and "insulate jack_nut" in f.fix
    useful = [e for e in evs if not e.rejected]
    assert useful[0].candidate.title.startswith("insulate jack_nut")
    assert not any(
        "in_gnd" in e.candidate.title or "star_bond" in e.candidate.title for e in useful
    )


def test_statement_over_two_lines_is_edited_by_its_spans(tmp_path):
    # the shield statement continues on a second line: the 'terminate at one end' candidate still
    # appears, and only the words 'terminated both' change
    text = _head_variant()
    line = next(x for x in text.split("\n") if x.startswith("shield in_shield:"))
    head, tail = line.split(", ", 1)
    text = text.replace(line, head + ",\n    " + tail)
    before, evs = _evs(text, tmp_path, "head.gplan")
    (e,) = [e for e in evs if e.candidate.title.startswith("terminate shield in_shield")]
    assert "GC108" not in _codes_after(e)  # weighed (and rejected as louder: see the test above)
    new = apply_edits(text, e.candidate.edits)
    assert new.count("\n") == text.count("\n") and "terminated v1_k" in new


def test_new_protective_stud_is_clear_of_the_transformer(tmp_path):
    text = _head_variant()
    before, evs = _evs(text, tmp_path, "head.gplan")
    (e,) = [e for e in evs if "stud of its own" in e.candidate.title]
    new = apply_edits(text, e.candidate.edits)
    p = load_text(new, str(tmp_path / "m.gplan"), root=tmp_path)
    stud = p.point("pe_stud2")
    frame = p.metal("ptx_frame")
    assert p.metal("chassis").contains(stud.pos) and not frame.contains(stud.pos)
    others = [q for q in p.points if q.pos is not None and q.name != "pe_stud2"]
    assert (
        min(((q.pos[0] - stud.pos[0]) ** 2 + (q.pos[1] - stud.pos[1]) ** 2) ** 0.5 for q in others)
        >= 15e-3
    )
    lead = next(c for c in p.conductors if c.name == "pe_lead")
    # straight line from the inlet to the stud, plus the stated 20 % allowance
    inlet = p.point("mains.pe").pos
    straight = ((inlet[0] - stud.pos[0]) ** 2 + (inlet[1] - stud.pos[1]) ** 2) ** 0.5
    assert lead.length == pytest.approx(round(straight * 1.2, 3), abs=1e-3)
    assert "pe_stud2" in next(x for x in new.split("\n") if x.startswith("wire pe_lead"))


HEAD_PLAN = """plan "Guitar head, TT supply (trial)"
mains 120 V 60 Hz, fuse 3.15 A slow, line-conductor 18 AWG, cord 2.5 m 18 AWG, system TT, \
loop-impedance 12 ohm,
      inlet at 10,150
metal chassis: steel 1.2 mm, 450 x 180 mm, touchable
metal back_panel: steel 1 mm, 450 x 60 mm, touchable
point pe_stud: stud, at 30,160 on chassis
wire pe_lead: mains.pe to pe_stud, 40 mm, 18 AWG, protective
bolt pe_nut: pe_stud to chassis, contact 0.5 mohm
wire panel_lead: pe_stud to back_panel, 150 mm, 22 AWG
"""


def test_protective_fixes_are_proposed_and_applied(tmp_path):
    # a role-less, thin bonding lead sharing the protective stud: the advisor thickens it to the
    # next size at least the line conductor's, and gives the protective
    # earth a stud of its own (the bonding path grows by a few milliohms, still far within the 0.1
    # ohm limit)
    before, evs = _evs(HEAD_PLAN, tmp_path, "head.gplan")
    useful = {e.candidate.reason: e for e in evs if not e.rejected}
    # (the lead is written in AWG: the thinnest common gauge of at least the 18 AWG line
    # conductor's 0.823 mm², by ASTM B258, is 18 AWG itself)
    assert "use 18 AWG" in useful["GC204"].candidate.title and "GC204" not in _codes_after(
        useful["GC204"]
    )
    assert "GC202" not in _codes_after(useful["GC202"])
    assert all(p.path_resistance < 0.1 for p in useful["GC202"].result.safety.parts)
    # panel_lead is protective by topology: never removed, whatever else is tried (only made
    # thicker: to the line conductor's size, GC204, or to what passes the bonding test, GC223; or,
    # with the earth given its own stud, moved off the shared stud to a second one of its own)
    assert all(
        "panel_lead" not in e.candidate.title or e.candidate.action in ("thicken", "own-stud")
        for e in evs
    )
    moved = useful["GC202"]
    assert "panel_lead to a second stud of its own" in moved.candidate.title
    assert "panel_lead" in {c.name for c in moved.result.plan.conductors}


@pytest.mark.parametrize("path", [DUAL, HEADPHONE], ids=["dual", "headphone"])
def test_every_fix_given_as_actions_has_the_advisors_candidate(path):
    # the fix line of a finding and the advisor come from the same structured actions: for every
    # action of every finding the advisor makes a candidate naming the same element (one source of
    # truth)
    before = analyze(load(path))
    titles = [c.title for c in candidates(load(path), before, path.read_text())]
    for f in before.findings:
        for action in f.actions:
            element = action[1]
            assert any(element in t for t in titles), (f.code, action, titles)
            assert element in f.fix


@pytest.mark.parametrize("path", [DUAL, HEADPHONE], ids=["dual", "headphone"])
def test_every_fix_line_is_rechecked_by_the_advisor(path):
    # the repair a finding's fix line names is tried by the advisor on the plan, and it clears that
    # finding: a fix that would not clear its finding would show up here
    from groundcheck.advice.evaluation import _label

    before, evs = _suggest(path)
    for f in before.findings:
        for action in f.actions:
            tried = [e for e in evs if action[1] in e.candidate.title and not e.rejected]
            assert any(_label(f) in e.cleared for e in tried), (
                f.code,
                action,
                [e.candidate.title for e in tried],
            )


def test_filter_capacitor_return_is_joined_to_the_reservoir(tmp_path):
    # a CRC supply whose second capacitor's negative lands on the cathode pad: the trade's fix is a
    # wire of its own from the filter capacitor's negative to the reservoir's (common practice),
    # and it clears GC102
    text = """plan "CRC head (trial)"
listening output 5 V, speaker 100 dB, distance 1 m, impedance 16 ohm
metal chassis: steel 1.2 mm, 400 x 200 mm, touchable
point ct: centre-tap, at 80,120 on chassis
point res_neg: cap, at 140,120 on chassis
point filt_neg: cap, at 200,120 on chassis
point star: star, at 250,100 on chassis
point in_sleeve: sleeve, at 380,40 on chassis
point v1_k: pad, at 330,60 on chassis
wire ct_lead: ct to res_neg, 70 mm, 0.5 mm2, return
wire res_star: res_neg to star, 120 mm, 0.75 mm2, return
wire filt_lead: filt_neg to v1_k, 140 mm, 0.5 mm2, return
wire k_gnd: v1_k to star, 90 mm, 0.5 mm2, signal
wire in_gnd: in_sleeve to star, 150 mm, 0.5 mm2, signal
bolt star_bond: star to chassis
rectifier hv: res_neg to ct, full-wave, secondary 280 V, winding 90 ohm, reservoir 32 uF,
    filter 2.2 kohm 22 uF to filt_neg, load 30 mA
stage v1: in_sleeve to v1_k, gain 34 dB, channel guitar
"""
    path = tmp_path / "crc.gplan"
    path.write_text(text)
    before, evs = _suggest(path)
    assert any(f.code == "GC102" and "hv.filter" in f.message for f in before.findings)
    best = evs[0]
    assert "join filt_neg straight to res_neg (filt_lead)" in best.candidate.title
    assert "GC102" not in _codes_after(best)


UNBONDED_LID = """plan "an unbonded lid"
mains 230 V 50 Hz, fuse 1 A slow, breaking high, line-conductor 0.75 mm2
metal deck: aluminium 2 mm, 100 x 100 mm, touchable
metal lid: steel 1 mm, 100 x 60 mm, at 0,100, touchable
point pe: stud, at 10,10 on deck
wire pe_lead: mains.pe to pe, 50 mm, 1 mm2, protective
bolt b: pe to deck
"""


def test_an_unbonded_touchable_part_gets_a_protective_wire(tmp_path):
    before, evs = _evs(UNBONDED_LID, tmp_path)
    assert any(f.code == "GC205" for f in before.findings)
    (e,) = [e for e in evs if e.candidate.reason == "GC205"]
    assert not e.rejected and not any(f.severity == "danger" for f in e.result.findings)
    new = apply_edits(UNBONDED_LID, e.candidate.edits)
    assert "wire lid_pe_bond: deck_bond to lid_pe" in new
    assert [x for x in new.split("\n") if x in UNBONDED_LID.split("\n")] == UNBONDED_LID.split(
        "\n"
    )  # only added


def test_a_channel_star_chained_through_the_other_channels_star(tmp_path):
    # the phono stage with its right channel's star wired to the left channel's star instead of the
    # supply star
    text = DUAL.read_text().replace(
        "wire right_link: right.star to psu_star, 140 mm, 0.75 mm2, signal",
        "wire right_link: right.star to left.star, 120 mm, 0.75 mm2, signal",
    )
    before, evs = _evs(text, tmp_path, "chain.gplan")
    (f,) = [f for f in before.findings if f.code == "GC103" and "left.star" in f.elements]
    assert (
        f.location.line
        == text.split("\n").index(
            next(x for x in text.split("\n") if x.startswith("wire right_link"))
        )
        + 1
    )
    assert "right.star reaches psu_star only through left.star" in f.message
    assert f.actions == (("reroute", "right_link", "psu_star"),)
    (e,) = [
        e
        for e in evs
        if e.candidate.title.startswith("run right.star to psu_star by its own wire")
    ]
    assert not e.rejected and not any(
        g.code == "GC103" and "left.star" in g.elements for g in e.result.findings
    )
    # its new length: right.star (260,200) to psu_star (150,160), 117.0 mm straight, + 20 %: 140 mm
    assert "right_link: right.star to psu_star, 140 mm" in apply_edits(text, e.candidate.edits)
    # the phono stage as written (each channel star on its own wire to the supply star) has no such
    # finding
    assert not any(
        g.code == "GC103" and "left.star" in g.elements for g in analyze(load(DUAL)).findings
    )


BOOTH = EXAMPLES[0].parents[1] / "tests" / "plans" / "booth" / "podcast-booth.gplan"


def test_advice_that_makes_a_channel_hum_louder_or_gains_nothing_is_rejected_not_suggested():
    """The podcast booth (two preamps on one outlet, the mixer and a class II laptop on another): a
    ground-lift network in the mixer breaks its shields' loops but sends the flat cable's induced
    current through its signal ground (louder); one in the class II laptop changes nothing. Both
    are listed as considered and rejected."""
    import dataclasses
    from groundcheck.advice.repair import evaluate

    before, evs = _suggest(BOOTH)
    by_title = {e.candidate.title: e for e in evs}
    mixer = by_title[
        "give mixer a ground-lift network between its signal ground and chassis (never the "
        "protective earth)"
    ]
    laptop = by_title[
        "give laptop a ground-lift network between its signal ground and chassis (never the "
        "protective earth)"
    ]
    # both are bought equipment ('device ...: simple'): considered, never tried (issue 29)
    assert mixer.rejected.startswith("mixer is bought equipment") and laptop.rejected.startswith(
        "laptop is bought"
    )
    # tried all the same, the mixer's makes the host louder and the laptop's gains nothing: both
    # rejected
    tried = {
        n: evaluate(
            BOOTH.read_text(),
            load(BOOTH),
            before,
            dataclasses.replace(e.candidate, refused=""),
            Options(),
            BOOTH.resolve().parent,
            BOOTH.resolve(),
        )
        for n, e in (("mixer", mixer), ("laptop", laptop))
    }
    assert tried["mixer"].rejected.startswith("it would make the host hum")
    assert max(tried["mixer"].hum_change_db.values()) > 0.5
    assert tried["laptop"].rejected.startswith("no predicted gain")
    for e in evs:
        if not e.rejected:
            assert e.score > 0 and max(e.hum_change_db.values()) <= 0.05


def test_a_loop_through_two_outlets_closed_by_a_balanced_link_is_not_told_to_use_a_balanced_link():
    r = analyze(load(BOOTH))
    loops = [f for f in r.findings if f.code == "GC101"]
    assert loops and all(f.elements and "is balanced: its input rejects" in f.fix for f in loops)
    assert not any("use a balanced interconnect" in f.fix for f in loops)


def test_a_loop_through_two_outlets_is_answered_by_plugging_the_devices_in_together():
    """The booth's mixer plugged in beside the preamps: the loops of its balanced links no longer
    run through the building's protective wiring, where the loaded flat cable induces 4.7 mV, so
    both channels lose most of their hum; the edit changes only the plug point (the mixer's earth
    path is checked again, GC215)."""
    before, evs = _suggest(BOOTH)
    best = evs[0]
    assert not best.rejected and best.candidate.moves_plug
    assert best.candidate.title.startswith("plug mixer in at wall_l, beside pre_")
    assert best.hum_change_db["guest"] < -20 and best.hum_change_db["host"] < -10
    (edit,) = best.candidate.edits
    assert edit.new.strip() == "device mixer: simple, plugged wall_l"
    assert "GC215" not in _codes_after(best)


def test_a_device_on_an_unwired_outlet_is_plugged_in_where_the_earth_path_is_sound_first(tmp_path):
    """The amplifier's outlet has no protective wiring (GC215, a danger); the first suggestion
    plugs it in beside the keyboard, whose earth path is sound, and says the broken outlet still
    needs repair. Its hum also falls, as its leakage no longer reaches the earth through the
    interconnect's shield."""
    path = tmp_path / "corner.gplan"
    path.write_text(
        'plan "rehearsal corner"\nsupply 230 V 50 Hz, system TN-S\npoint met: earthing-terminal\n'
        "point wall: outlet\npoint spare: outlet\nwire run: wall to met, 15 m, 2.5 mm2, "
        "protective\n"
        "device amp: simple, plugged spare\ndevice keys: simple, plugged wall\n"
        "interconnect k: keys.gnd to amp.gnd, 3 m, 0.1 mm2, terminated both, unbalanced, gain 10 "
        "dB, "
        "channel main\n"
    )
    before, evs = _suggest(path)
    assert any(f.code == "GC215" and f.severity == "danger" for f in before.findings)
    best = evs[0]
    assert not best.rejected and best.candidate.reason == "GC215" and best.candidate.moves_plug
    assert best.candidate.title.startswith("plug amp in at wall, whose earth path is sound")
    assert (
        "take spare out of use until a qualified person has repaired its protective connection"
        in best.candidate.title
    )
    assert "GC215" not in _codes_after(best) and best.hum_change_db["main"] < 0
    # the outlet left empty is still reported as unwired, as an outlet
    (left,) = [f for f in best.result.findings if f.code == "GC109"]
    assert (
        left.message == "outlet spare does not reach the main earthing terminal"
        and "repaired" in left.fix
    )
