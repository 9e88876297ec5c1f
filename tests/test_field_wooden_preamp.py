"""An outside builder's valve line and phono preamplifier in a wooden sleeve (tests/field/
wooden-preamp-knobs, copied as written): a steel top plate, an anodised front panel that carries
the mains switch and the volume pot but no protective bond, line and output sockets bolted to a
small rear plate, the phono ground reaching the star through the pot's can, in a TN-C-S room
with a bought power amplifier; beside it his own variant with the tool's fixes applied and the
solid metal volume knob written as touchable metal on the pot's shaft.

His verdict: the unbonded front is the danger and its own protective wire the first fix; the
sockets bond the signal ground more than once; the supply's ripple shares the pot's wiring;
never rely on the pot's bushing as the panel's earth, never insulate the pot so that the panel
floats, never land anything but the protective conductor on the inlet's earth."""

from pathlib import Path

from groundcheck import load
from groundcheck.advice.repair import suggest
from groundcheck.analysis import Options, analyze

FIELD = Path(__file__).parent / "field" / "wooden-preamp-knobs"
PREAMP, ROOM = FIELD / "preamp.gplan", FIELD / "room.gplan"
KNOB = FIELD / "preamp-knob-modelled.gplan"
QUICK = Options(hum=False)


def _evaluated(path: Path, options=QUICK):
    root, resolved = path.resolve().parent, path.resolve()
    return suggest(load(path), path.read_text(), options, root, resolved)[1]


def test_the_unbonded_front_is_the_danger_and_its_own_protective_wire_comes_first():
    r = analyze(load(PREAMP), QUICK)
    (front,) = [f for f in r.findings if f.severity == "danger"]
    assert front.code == "GC205" and front.elements == ("front",)
    good = [e for e in _evaluated(PREAMP) if not e.rejected]
    assert (good[0].candidate.action, good[0].candidate.element) == ("bond", "front")
    assert "protective" in good[0].candidate.edits[0].new


def test_the_sockets_bond_twice_and_the_ripple_shares_the_pots_wiring():
    r = analyze(load(PREAMP), QUICK)
    codes = {f.code for f in r.findings}
    assert {"GC101", "GC105"} <= codes
    ripple = [f for f in r.findings if f.code == "GC102" and "ht.filter" in f.elements]
    assert len(ripple) == 2  # one per channel's line stage
    assert all(f.severity == "fault" and "ph_to_pot" in f.elements for f in ripple)


def test_the_pot_is_never_insulated_while_it_is_the_panels_only_way_to_earth():
    evs = _evaluated(PREAMP)
    pot = [e for e in evs if e.candidate.element == "pot_nut"]
    assert pot and all(e.rejected for e in pot)


def test_a_metal_knob_on_the_pot_gets_no_wire_and_keeps_its_pots_bushing():
    # with the front bonded the knob is earthed through the pot's anodised bushing and its grub
    # screw: a danger over 0.1 Ω (GC206), answered by the fastenings, never a wire to the knob
    r = analyze(load(KNOB), QUICK)
    (knob,) = [f for f in r.findings if f.severity == "danger"]
    assert (knob.code, knob.elements) == ("GC206", ("vol_knob",))
    assert "fastenings" in knob.fix
    insulated = KNOB.read_text().replace(
        "bolt pot_nut: pot_can to front", "# pot on insulating washers"
    )
    assert insulated != KNOB.read_text()
    from groundcheck import load_text

    (loose,) = [
        f for f in analyze(load_text(insulated, str(KNOB)), QUICK).findings if f.code == "GC205"
    ]
    assert loose.elements == ("vol_knob",) and "no wire can be fixed" in loose.fix
    assert "bushing" in loose.fix
    evs = _evaluated(KNOB)
    assert not [
        e for e in evs if e.candidate.action == "bond" and e.candidate.element == "vol_knob"
    ]
    # insulating the pot would leave the knob earthed through the signal ground alone
    assert all(e.rejected for e in evs if e.candidate.element == "pot_nut")


def test_nothing_but_the_protective_conductor_lands_on_an_inlets_earth():
    # a stated capacitive current from the supply to the inlet's earth had made the advisor offer
    # 'join pre.star straight to pre.mains.pe'
    for e in _evaluated(ROOM):
        for row in (line for x in e.candidate.edits for line in (x.new or "").split("\n")):
            assert "mains.pe" not in row or row.rstrip().endswith("protective"), row
