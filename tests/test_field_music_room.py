"""An outside technician's school music room on a TN-S supply (tests/field/school-music-room,
copied as written, his variants in variants/): a valve guitar combo he rebuilt (its 0.5 mm² earth
lead, a guard bonded through paint), a class AB power amplifier of his own with split ± rails from
one 30-0-30 V centre-tapped toroid (the centre tap wired to the input ground's tag, the
protective earth on the stud of the 0 V bond, a 10 A glass fuse), a class II piano and mixer, and
an unbalanced link to a passive wall box that feeds the hall 40 m away; sockets on a 32 A ring.

His verdict: the centre tap straight to the reservoir junction; the protective earth on a stud
of its own; a balanced link to the hall; never float the amplifier's 0 V (60 V end to end is not
extra-low voltage), never cut the unbalanced link's screen, never plug the hall's rack into the
music room."""

from pathlib import Path

from groundcheck import load
from groundcheck.advice.fixes import advised_fixes
from groundcheck.advice.repair import suggest
from groundcheck.analysis import Options, analyze
from groundcheck.language.loader import load_text

FIELD = Path(__file__).parent / "field" / "school-music-room"
AMP, ROOM = FIELD / "poweramp.gplan", FIELD / "musicroom.gplan"
QUICK = Options(hum=False)


def _advice(path, options=QUICK):
    return suggest(load(path), path.read_text(), options, path.parent.resolve(), path.resolve())


def test_the_centre_tap_joins_the_reservoir_and_the_0_v_bond_is_never_floated():
    r, evs = _advice(AMP, Options())
    joins = [e for e in evs if e.candidate.action == "join" and e.candidate.element == "ct_lead"]
    # his fix: ct_lead moved from the input's tag to the reservoir junction; the other ways of
    # joining them would leave a point wired to nothing, so none is judged against it
    assert joins and not joins[0].rejected
    own = next(e for e in evs if e.candidate.element == "ct_ret")
    assert own.rejected  # the parallel wire, beside a lead still on the input's tag
    # 2 × 30 V is 60 V across the winding: not extra-low voltage, no 0 V bond to remove
    assert not [e for e in evs if "extra-low-voltage" in e.candidate.title]


def test_the_negative_rails_fix_line_does_not_speak_of_the_positive_rails_current():
    # one join answers both rails' shared returns: its words name neither rail's current
    r, evs = _advice(AMP, Options())
    fixes = dict(zip(((f.code, f.elements[0]) for f in r.findings), advised_fixes(r, evs)))
    for rail in ("rail_neg", "rail_pos"):
        assert fixes[("GC102", rail)].startswith("join ct straight to res0 (ct_lead), so the ")
        assert "rail_pos" not in fixes[("GC102", rail)]


def test_the_rings_protective_loop_is_listed_and_never_a_ground_loop_to_open():
    r = analyze(load(ROOM), QUICK)
    (ring,) = [lp for lp in r.loops if lp.closed_by == "protective-wiring"]
    assert set(ring.loop.nodes) == {"db_music", "out_window", "out_front"}
    assert not [
        f for f in r.findings if f.code == "GC101" and set(f.elements) <= set(ring.loop.edges)
    ]


def test_the_wall_boxs_screen_is_never_cut_and_a_balanced_link_is_offered():
    _, evs = _advice(ROOM)
    cut = next(e for e in evs if e.candidate.element == "wallbox.room_shell")
    assert "going on to nothing" in cut.rejected and "mix_wall" in cut.rejected
    assert any(
        e.candidate.title.startswith("use a balanced interconnect for mix_wall") for e in evs
    )


def test_the_halls_rack_is_not_plugged_in_fifty_metres_away():
    path = FIELD / "variants" / "outlets-placed" / "musicroom.gplan"
    _, evs = _advice(path)
    (move,) = [e for e in evs if e.candidate.title.startswith("plug hall in at out_window")]
    assert "does not reach out_window" in move.rejected  # a simple device's 2 m default cord


def test_the_long_bonding_test_on_a_ring_and_behind_a_fused_plug():
    # the ring's 32 A breaker: 64 A for 4 min (IEC 60950-1:2005 Table 2E), which his 0.75 mm²
    # lead fails; the 13 A fuse in the plug he describes (a probe: the plan could not say it)
    # makes the rating 13 A, 26 A for 2 min, which the same lead passes
    r = analyze(load(AMP), QUICK)
    assert [(t.name, t.current, t.duration) for t in r.bonding.tests][1] == ("long", 64.0, 240.0)
    assert [f.elements[0] for f in r.findings if f.code == "GC223"] == ["pe_lead"]
    text = AMP.read_text().replace("breaker 32 A B,", "breaker 32 A B, plug-fuse 13 A,")
    fused = analyze(load_text(text, str(AMP)), QUICK)
    assert [(t.name, t.current, t.duration) for t in fused.bonding.tests][1] == (
        "long",
        26.0,
        120.0,
    )
    assert not [f for f in fused.findings if f.code == "GC223"]


def test_compare_keeps_the_short_and_the_long_bonding_test_apart():
    # his first fix, a 1 mm² lead: the short test's danger is fixed, the long test's fault kept
    # (the ring's 32 A, no plug fuse stated) — not the short test's danger shown as kept
    from groundcheck.advice.compare import compare

    d = compare(
        analyze(load(FIELD / "combo.gplan"), QUICK),
        analyze(load(FIELD / "variants" / "first-fix" / "combo.gplan"), QUICK),
    )
    fixed = [f for f in d["findings"]["fixed"] if f["code"] == "GC223"]
    kept = [f for f in d["findings"]["kept"] if f["code"] == "GC223"]
    assert [f["severity"] for f in fixed] == ["danger"] and "short bonding test" in fixed[0][
        "message"
    ]
    assert [f["severity"] for f in kept] == ["fault"] and "long bonding test" in kept[0]["message"]


def test_suggest_says_the_lengths_of_the_plan_as_written(cli):
    # the notice of lengths measured from positions is the written plan's, as check says it, not
    # the combined set's (which moved ct_lead)
    _, checked, _ = cli("check", str(AMP), "--advice-budget", "0")
    _, suggested, _ = cli("suggest", str(AMP))
    notice = [x for x in checked.splitlines() if "lengths not stated" in x]
    assert notice and notice[0] in suggested.splitlines()
