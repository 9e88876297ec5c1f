"""An outside studio technician's garage studio on TN-C-S (tests/field/garage-studio-rod, copied
as written): a valve microphone preamplifier of his own, a bought interface, a bought power
amplifier whose plug's earth a previous owner cut, a class II computer, two daisy-chained strips,
and a "clean technical earth" — a rod in the garden wired to a busbar to which the chassis are
bonded.

His verdict: the power amplifier earthed only through the busbar and other devices' cords is the
danger, and restoring its own plug earth the first fix; the rod drives the supply's voltage round
the protective conductors (hum at the monitors); pin 1 of the preamp's outputs lands on its board;
his preamp's own protective earth is sound; never lift an earth, never rely on the rod."""

from pathlib import Path

from groundcheck import load
from groundcheck.advice.repair import suggest
from groundcheck.analysis import Options, analyze

FIELD = Path(__file__).parent / "field" / "garage-studio-rod"
ROOM, PRE = FIELD / "garage-studio.gplan", FIELD / "valve-mic-pre.gplan"
QUICK = Options(hum=False)


def test_the_amplifier_earthed_through_other_equipment_is_the_danger():
    r = analyze(load(ROOM), QUICK)
    dangers = [f for f in r.findings if f.severity == "danger"]
    assert [(f.code, f.elements[0]) for f in dangers] == [("GC232", "amp")]
    assert "amp_bond" in dangers[0].message and "iface" in dangers[0].message
    codes = {f.code for f in r.findings}
    assert {"GC113", "GC224", "GC101"} <= codes


def test_his_first_fix_comes_first_and_nothing_lifts_an_earth():
    _, evs = suggest(load(ROOM), ROOM.read_text(), QUICK, FIELD.resolve(), ROOM.resolve())
    good = [e for e in evs if not e.rejected]
    assert (good[0].candidate.action, good[0].candidate.element) == ("replug", "amp")
    assert not [e for e in good if e.candidate.touches_protective]
    rod = [e for e in good if e.candidate.element == "rod_lead"]
    assert all("qualified electrician" in e.candidate.title for e in rod)


def test_his_preamps_own_protective_earth_is_sound():
    r = analyze(load(PRE), QUICK)
    assert not [f for f in r.findings if f.severity == "danger"]
