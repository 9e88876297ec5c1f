"""An outside builder's living room on TN-C-S (tests/field/tuner-cable-tv, copied as written, his
variants in variants/): a valve FM tuner of his own (its earth under a transformer screw, an
anodised front panel carrying the mains switch on 2.5 Ω screws, the centre tap on the audio
stage's grid tag) fed by 17 m of cable-TV coax whose screen is bonded to the main earthing
terminal where it enters, a valve integrated amplifier of his own (a 0.25 mm² earth lead, a glass
fuse, nutted phono sockets), one strip.

His verdict: the earth on its own stud first, the front panel's own bond wire, the amplifier's
earth lead and fuse, the centre tap to the reservoir; the coax loop cured at the tuner by an
aerial isolator; never the entry's bonding undone, never the coax swapped."""

from pathlib import Path

from groundcheck import load
from groundcheck.advice.repair import suggest
from groundcheck.analysis import Options, analyze

FIELD = Path(__file__).parent / "field" / "tuner-cable-tv"
ROOM, TUNER, AMP = (
    FIELD / n for n in ("living_room.gplan", "fm_tuner.gplan", "valve_integrated.gplan")
)
VARIANTS = FIELD / "variants"
QUICK = Options(hum=False)


def _codes(r, severity=None):
    return {f.code for f in r.findings if severity is None or f.severity == severity}


def test_what_he_planted_is_found():
    tuner, amp = analyze(load(TUNER), QUICK), analyze(load(AMP), QUICK)
    assert {"GC202", "GC206"} <= _codes(tuner, "danger")
    assert {"GC204", "GC223", "GC211"} <= _codes(amp, "danger")
    room = analyze(load(ROOM))
    assert {"GC101", "GC102", "GC105", "GC108", "GC303"} <= _codes(room)


def test_the_cable_networks_screen_keeps_its_bond_where_it_enters():
    room = analyze(load(ROOM))
    (gc108,) = [f for f in room.findings if f.code == "GC108" and "catv_coax" in f.elements]
    assert gc108.fix.startswith("keep both ends") and "galvanic isolator" in gc108.fix
    assert "screened pair" not in gc108.fix and not gc108.actions
    _, evs = suggest(load(ROOM), ROOM.read_text(), QUICK, FIELD.resolve(), ROOM.resolve())
    assert not [e for e in evs if "catv_coax" in e.candidate.title]
    assert not [e for e in evs if e.candidate.element == "catv_bond"]


def test_the_front_panel_gets_its_bond_wire_wherever_his_new_stud_sits():
    # his first fix put the earth on a stud of its own at 262,228, in a corner crowded by the
    # transformer's frame and field: the front panel's bond wire was no longer offered (the stud
    # for it found no room within 60 mm) and GC206 fell back to "shorten or thicken"
    for name in ("fm_tuner.gplan", "probe_pe_own_253.gplan"):
        path = VARIANTS / name
        _, evs = suggest(load(path), path.read_text(), QUICK, VARIANTS.resolve(), path.resolve())
        bond = [e for e in evs if e.candidate.title.startswith("bond front by a protective wire")]
        assert bond and not bond[0].rejected, name
        assert "GC206" in bond[0].candidate.reason


def test_a_building_cable_a_slow_fault_would_melt_names_the_devices_own_path():
    # the front panel's 2.5 Ω makes the tuner's fault slow to clear (60 s on the 20 A breaker), so
    # the radial's 1.5 mm² core "needs 4.5 mm²": the cure is the bond wire inside the tuner, not
    # the house's wiring, and the finding says so
    room = analyze(load(ROOM), QUICK)
    radial = [f for f in room.findings if f.code == "GC207" and f.elements == ("radial",)]
    assert radial and "because tuner's own path to front is poor" in radial[0].message
    assert "bond front properly there first" in radial[0].fix


def test_a_return_wire_that_closes_a_new_loop_is_not_offered_beside_a_clean_join():
    # his tuner alone: the centre tap joined straight to the reservoir clears the shared return
    # and introduces nothing; a wire of its own between them also closes a loop and a new shared
    # return (GC101, GC102): it is rejected, naming the better change
    _, evs = suggest(load(TUNER), TUNER.read_text(), Options(), FIELD.resolve(), TUNER.resolve())
    own = next(e for e in evs if "(ht_ct_ret," in e.candidate.title)
    assert own.rejected.startswith("join ht_ct straight to res_neg (ct_lead)")
