"""An outside technician's valve line preamplifier and lounge (tests/field/lounge-line-preamp,
copied as written): the preamp with its own plan on a strip, a bought class I power amplifier at
another outlet, a class II converter and a computer, all on unbalanced links in a TN-C-S house.
His verdict: the preamp's faults count in the lounge; the amplifier's loop through the building
wiring is a warning; never a balanced link or a lift in bought equipment, never a shield landed on
a chassis, never a change that makes a channel louder."""

from pathlib import Path

from groundcheck import load
from groundcheck.analysis import Options, analyze

FIELD = Path(__file__).parent / "field" / "lounge-line-preamp"


def _line(result, channel: str, hz: float) -> float:
    rows = result.hum.channels[channel].spectrum
    return next(r.dbv for r in rows if abs(r.frequency - hz) < 1e-9)


def test_the_preamps_own_pickup_is_the_same_placed_in_the_lounge():
    # alone, the preamp's 50 Hz line (the transformer's field in loops inside its case) is
    # -62.5 dBV; placed, its loops closed through cords with no outline and counted nothing
    # (-74.4 dBV): the loops now close inside the case, and the line stays within the lounge's
    # own additions (its leakages, a few tenths of a dB)
    alone = analyze(load(FIELD / "valve-line-pre.gplan"), Options())
    lounge = analyze(load(FIELD / "lounge-system.gplan"), Options())
    for ch in ("left", "right"):
        a, b = _line(alone, ch, 50.0), _line(lounge, f"pre.{ch}", 50.0)
        assert abs(a - b) < 1.0, (ch, a, b)


def test_no_fix_line_offers_a_balanced_link_or_a_lift_to_unbalanced_bought_equipment():
    r = analyze(load(FIELD / "lounge-system.gplan"), Options())
    leak = [f for f in r.findings if f.code == "GC102" and f.elements[0].endswith(".leakage")]
    via = [f for f in leak if "through the shield of" in f.fix]
    assert via
    for f in leak:
        assert "use a balanced interconnect" not in f.fix, f.fix
    for f in via:
        assert "which stays" in f.fix and "one outlet or strip" in f.fix, f.fix


def test_the_builders_fixed_lounge_has_no_fault_left_for_leakage_heard_nowhere():
    # his own fixed copy: every device on the strip, the preamp rewired; what is left is the class
    # II converter's leakage through its RCA braids, 22 dB below hearing: notes, not faults
    r = analyze(load(FIELD / "lounge-fixed-by-builder.gplan"), Options())
    assert not [f for f in r.findings if f.severity in ("danger", "fault")], [
        (f.code, f.elements[:2]) for f in r.findings if f.severity == "fault"
    ]
    leak = [f for f in r.findings if f.code == "GC102" and f.elements[0].endswith(".leakage")]
    assert leak and all(f.severity == "note" for f in leak)
    # and on the lounge as first written, where the preamp hums audibly, the leakage that reaches
    # an audible channel stays a fault
    first = analyze(load(FIELD / "lounge-system.gplan"), Options())
    assert [f for f in first.findings if f.code == "GC102" and f.severity == "fault"]


def test_sockets_louder_before_the_return_fix_are_insulated_after_it():
    # the preamp's bolted sockets carry part of the supplies' return currents past the bus, so
    # insulating them alone makes the hum louder (rejected); once those returns are wired as the
    # trade wires them (the reservoir's to the centre tap, the right bus to the star by its own
    # wire, the heater's return to its own reservoir) they only close loops, and the combined set
    # takes them
    from groundcheck.advice.candidates import candidates
    from groundcheck.advice.evaluation import MAKES_LOUDER, evaluate
    from groundcheck.advice.repair import greedy

    path = FIELD / "valve-line-pre.gplan"
    plan, text = load(path), path.read_text(encoding="utf-8")
    before = analyze(plan, Options())
    picked = [
        c
        for c in candidates(plan, before, text)
        if c.title.startswith(("join ht_ct straight", "take bus_r to star by its own wire (bus2)"))
        or c.title.startswith(("join htr_ret straight to h_res_neg", "insulate every socket"))
    ]
    evs = [evaluate(text, plan, before, c, Options(), path.parent, path) for c in picked]
    panel = [e for e in evs if e.candidate.title.startswith("insulate every socket")]
    join = [e for e in evs if e.candidate.element == "ct_lead"]
    assert panel and join and panel[0].rejected.startswith(MAKES_LOUDER), panel[0].rejected
    assert not join[0].rejected
    chosen, final, _ = greedy(plan, text, Options(), path.parent, path, evs=evs, before=before)
    titles = [e.candidate.title for e in chosen]
    assert join[0].candidate.title in titles and titles[-1] == panel[0].candidate.title, titles


def test_the_preamps_own_glass_fuse_warning_is_the_lounges_too():
    # GC211 (breaking capacity not stated, a warning in the preamp's own plan) was lost in the
    # lounge: only the device's dangers and faults were carried
    r = analyze(load(FIELD / "lounge-system.gplan"), Options(hum=False))
    (f,) = [f for f in r.findings if f.code == "GC211"]
    assert f.severity == "warning" and f.message.startswith("pre's own wiring")


def test_no_candidate_runs_a_bolt_across_the_case():
    # an outside reviewer was offered 'take pre.l_out_sleeve to pre.star by its own wire
    # (pre.l_out_nut)': its diff moved the socket's bolt 214 mm onto the star tag, with no wire
    from groundcheck.advice.candidates import candidates
    from groundcheck.model.kinds import is_fastening_kind

    path = FIELD / "lounge-system.gplan"
    plan = load(path)
    before = analyze(plan, Options())
    kinds = {c.name: c.kind for c in plan.conductors}
    moved = [
        c.title
        for c in candidates(plan, before, path.read_text(encoding="utf-8"))
        if c.action in ("move", "join") and is_fastening_kind(kinds.get(c.element, "wire"))
    ]
    assert moved == []


def test_no_contributor_fix_line_offers_a_balanced_link_or_a_lift_to_this_lounge():
    # the recheck found GC301 on the computer's cord still advising 'balanced interconnect or
    # ground-lift network' for bought, unbalanced equipment
    r = analyze(load(FIELD / "lounge-fixed-by-builder.gplan"), Options())
    lines = [f.fix for f in r.findings if f.code == "GC301"]
    assert [x for x in lines if "pc.cord" in x]
    assert not [x for x in lines if "balanced interconnect" in x or "break the loop" in x], lines
