"""An outside builder's two-box single-ended stereo amplifier in a TN-C-S flat
(tests/field/two-box-se-flat, copied as written, his variants in variants/): the amplifier and
its supply box joined by a 1.5 m umbilical (a 0.5 mm² earth core landing at the amplifier on the
stud that also takes the signal ground's bond, the HT return on the braid), a powder-coated lid
on four screws, DC heaters referenced twice; a bought subwoofer and a class II streamer.

His verdict: the lid's own bond first; the earth core on a stud of its own and thicker; the
heater referenced once; an ordinary mains cord is no danger; never an earth lifted."""

from pathlib import Path

from groundcheck import load
from groundcheck.advice.compare import compare
from groundcheck.advice.repair import suggest
from groundcheck.analysis import Options, analyze

FIELD = Path(__file__).parent / "field" / "two-box-se-flat"
AMP, FLAT = FIELD / "se300.gplan", FIELD / "flat.gplan"
QUICK = Options(hum=False)


def test_the_earth_core_sharing_the_signal_bonds_stud_is_found_and_given_its_own():
    # GC202 was looked for at the inlet's stud only; the umbilical's earth core lands at the
    # amplifier on the stud that also takes the star's bond
    r = analyze(load(AMP), QUICK)
    (f,) = [f for f in r.findings if f.code == "GC202"]
    assert f.elements[:2] == ("ub_pe", "amp_pe_stud") and "amp_bond" in f.elements
    _, evs = suggest(load(AMP), AMP.read_text(), QUICK, FIELD.resolve(), AMP.resolve())
    own = next(e for e in evs if e.candidate.action == "own-stud")
    assert not own.rejected and "bare metal under a toothed washer" in own.candidate.title
    # the core keeps its length: an umbilical's cores run its whole length
    assert "1.5 m" in own.candidate.edits[0].new


def test_the_lid_bond_is_his_first_fix_and_introduces_nothing():
    before = analyze(load(AMP), QUICK)
    (lid,) = [f for f in before.findings if f.code == "GC206"]
    assert lid.figures["path_resistance_mohm"] > 1000  # the coated threads' 1.5 Ω
    d = compare(before, analyze(load(FIELD / "variants" / "se300-lidbond.gplan"), QUICK))
    assert [f["code"] for f in d["findings"]["fixed"]] == ["GC206"]
    # his 150 mm flying lead lets the lid off: no GC112 "too long"
    assert d["findings"]["introduced"] == []


def test_an_ordinary_mains_cord_on_a_16_a_breaker_is_no_danger():
    r = analyze(load(FLAT), QUICK)
    assert not [
        f for f in r.findings if f.code == "GC207" and f.elements[0].endswith("mains cord")
    ]
    dangers = {f.code for f in r.findings if f.severity == "danger"}
    assert dangers == {"GC204", "GC206", "GC223"}  # the thin core and the lid, as he planted
