"""An outside builder's lounge (tests/field/adapter-headphone-lounge, copied as written): a valve
headphone amplifier and line preamplifier of his own on a double-insulated 16 V AC adapter (written
as its class II `mains`), which steps the 16 V up to some 140 V of high tension inside an aluminium
case whose anodised lid hangs on four screws (5 Ω each by his estimate); a class I valve power
amplifier with a glass fuse and a class II streamer, on TN-C-S. His verdict: the lid is the one
danger (a chafed high-tension lead with the screws' contact open puts the lid at the high tension;
the first fix, a flying lead from the lid to the star-bond screw); the power amplifier's glass fuse
faces some 259 A; never remove the star-to-case screw, never lift an unbalanced link's braid, and
— from his review — never leave the right output transformer's return joined to its star only
through the links to the power amplifier (an applied suggestion did: with the power amplifier
unplugged the headphone channel had no return)."""

from pathlib import Path

import pytest

from groundcheck import load, load_text
from groundcheck.advice.candidates import candidates
from groundcheck.advice.evaluation import evaluate
from groundcheck.advice.returns import lost_wired_returns
from groundcheck.analysis import Options, analyze

FIELD = Path(__file__).parent / "field" / "adapter-headphone-lounge"
BOX, ROOM = FIELD / "headamp.gplan", FIELD / "lounge.gplan"
QUICK = Options(hum=False)


def test_the_lid_over_the_high_tension_is_the_danger():
    # by hand: the lid's four 5 Ω screws in parallel, 1.25 Ω, over the 0.1 Ω a bond is held to;
    # the tray is tied to the high tension's return by the star's screw (no finding)
    r = analyze(load(BOX), QUICK)
    found = {f.elements[0]: f for f in r.findings if f.code == "GC229"}
    assert set(found) == {"lid"} and found["lid"].severity == "danger"
    assert found["lid"].figures["path_resistance_mohm"] == pytest.approx(1253, rel=2e-3)
    room = analyze(load(ROOM), QUICK)
    assert {"pre.lid"} == {f.elements[0] for f in room.findings if f.code == "GC229"}
    # the power amplifier's stated glass fuse against the prospective short, by his hand: cables
    # cold (the 18 m radial at IEC 60228 class 1/2, whether its cores are written round or flat),
    # 0.890 Ω, 230 / 0.890 = 258.4 A against the glass fuse's 35 A
    (fuse,) = [f for f in room.findings if f.code == "GC211"]
    assert fuse.severity == "danger"
    assert fuse.figures["fault_current_a"] == pytest.approx(230 / 0.890, rel=2e-3)


def test_the_first_fix_is_the_lids_own_lead_to_the_star():
    plan, text = load(BOX), BOX.read_text()
    before = analyze(plan, QUICK)
    (bond,) = [c for c in candidates(plan, before, text) if c.action == "ht-bond"]
    assert bond.element == "lid" and "lid to star" in bond.title
    ev = evaluate(text, plan, before, bond, QUICK, FIELD, BOX.resolve())
    assert not ev.rejected and "GC229" not in {f.code for f in ev.result.findings}
    # never offered: the star's screw to the case removed or insulated (the case would float
    # round the high tension)
    for c in candidates(plan, before, text):
        assert not (c.action in ("remove", "insulate") and c.element == "star_bond"), c.title


def test_a_return_that_reaches_its_star_only_through_another_box_is_refused(tmp_path):
    # the builder's right output transformer: its cold end wired to the headphone jack, which is
    # wired to the star; moving that wire's end to the star leaves the cold end joined only to the
    # line-out socket, whose link reaches the power amplifier's star — not its own
    text = BOX.read_text()
    moved = text.replace("wire w_otr: ot_r_cold to hp_sleeve,", "wire w_otr: star to hp_sleeve,")
    assert moved != text
    for name in ("lounge.gplan", "poweramp.gplan"):
        (tmp_path / name).write_text((FIELD / name).read_text())
    (tmp_path / "headamp.gplan").write_text(text)
    before = load(tmp_path / "lounge.gplan")
    (tmp_path / "headamp.gplan").write_text(moved)
    after = load(tmp_path / "lounge.gplan")
    assert "pre.ot_r_cold" in lost_wired_returns(before, after)


def test_a_star_named_star_is_said_once():
    # the builder's review: "flows through the star star" in every GC103
    r = analyze(load(BOX), QUICK)
    chains = [f.message for f in r.findings if f.code == "GC103"]
    assert chains and all("star star" not in m and "through the star:" in m for m in chains)


def test_a_loop_that_encloses_nothing_in_plan_picks_up_no_printed_figure():
    # the lid on the tray through its screws: loops of no area in plan, whose ring integral rounds
    # to some 3e-15 µV; printed "below 1 pV" (as the HTML report does), never as a figure
    from groundcheck.renderers.text import text_report

    text = text_report(analyze(load(BOX)))
    table = text[text.index("Loop pickup") :].split("\n\n")[0]
    assert "below 1 pV" in table and "e-1" not in table


def test_the_heater_return_moves_off_the_cathode_never_the_cathode_off_the_star():
    # his review: the heater regulator's return is on the left cathode's tag (kl); the trade
    # moves the heater return to its reservoir (h_res) and leaves the cathode's wire to the star
    plan, text = load(BOX), BOX.read_text()
    before = analyze(plan, QUICK)
    (chain,) = [f for f in before.findings if f.code == "GC103" and "kl" in f.elements]
    assert "take the regulator's return off kl to h_res" in chain.fix
    cands = candidates(plan, before, text)
    (move,) = [c for c in cands if c.action == "return-to"]
    assert move.element == "hsup" and "off kl to h_res" in move.title
    ev = evaluate(text, plan, before, move, QUICK, FIELD, BOX.resolve())
    assert not ev.rejected and not [
        f for f in ev.result.findings if f.code == "GC103" and "kl" in f.elements
    ]
    # never: the cathode's own wire moved, nor the heater reservoir hung on the cathode's tag
    assert not [c for c in cands if c.element == "w_kl" and not c.refused]
    hung = [c for c in cands if c.action == "join" and "h_res straight to kl" in c.title]
    assert hung and all(c.refused for c in hung)


def test_a_supply_cut_off_from_the_star_is_told_to_be_wired_back():
    # his variant: the only wire from the supply's tag to the star removed — the supplies' returns
    # float as a network of their own; the fix wires them back (a class II box has no protective
    # earth stud to bond near), and a floating star in that box is bonded "at one place"
    text = BOX.read_text()
    (cut,) = [line for line in text.splitlines() if line.startswith("wire w_psu:")]
    r = analyze(load_text(text.replace(cut + "\n", ""), "v4.gplan"), QUICK)
    (f,) = [f for f in r.findings if f.code == "GC106"]
    assert f.fix.startswith("wire the supply's return to star (h_res") and "ht_res" in f.fix
    floating = text.replace("bolt star_bond: star to tray\n", "").replace(
        "bolt hp_nut: hp_sleeve to tray\n", ""
    )
    r = analyze(load_text(floating, "v2.gplan"), QUICK)
    fixes = [f.fix for f in r.findings if f.code == "GC106"]
    assert fixes and all("protective-earth stud" not in x for x in fixes)


def test_a_class_i_box_behind_the_adapter_keeps_its_own_dangers(tmp_path):
    # his variant: the box written class I (no earth in its cord) behind the isolating adapter;
    # its case reaches the main earthing terminal through the line-out braids and the power
    # amplifier, so the separation is lost (GC218's warning, as the docs say), and its own plan's
    # dangers (no protective earth reaches its metal) are the room's too
    text = BOX.read_text().replace("16 V 50 Hz, class II,", "16 V 50 Hz,")
    assert text != BOX.read_text()
    (tmp_path / "headamp.gplan").write_text(text)
    for name in ("lounge.gplan", "poweramp.gplan"):
        (tmp_path / name).write_text((FIELD / name).read_text())
    r = analyze(load(tmp_path / "lounge.gplan"), QUICK)
    (lost,) = [f for f in r.findings if f.code == "GC218"]
    assert lost.severity == "warning" and lost.elements[0] == "pre"
    own = {f.code for f in r.findings if f.message.startswith("pre's own wiring")}
    assert {"GC201", "GC205"} <= own


def test_contributions_far_below_hearing_are_notes():
    # his review: eleven GC301/GC302 warnings for contributions in channels 20–47 dB below hearing
    r = analyze(load(ROOM))
    quiet = {
        ch
        for ch, h in r.hum.channels.items()
        if h.audible is False and h.margin_db is not None and h.margin_db <= -20
    }
    found = [f for f in r.findings if f.code in ("GC301", "GC302")]
    assert quiet and found
    for f in found:
        if f.figures["channel"] in quiet:
            assert f.severity == "note" and "dB below hearing" in f.message
        else:
            assert f.severity == "warning"


def test_audible_supply_ripple_is_answered_by_filtering_it():
    # his review: GC303's fix named the stage ("left (ht, 100 %)"), not a remedy
    r = analyze(load(BOX))
    (left,) = [f for f in r.findings if f.code == "GC303" and f.elements[0] == "left"]
    assert "filter ht further" in left.fix and "regulate it" in left.fix
