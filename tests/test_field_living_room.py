"""An outside reviewer's living-room system (tests/field/living-room-preamp, copied as written):
his class I valve line preamp with its own plan (earth lead under a transformer bolt, an anodised
front panel held by screws, a glass fuse, plain RCA sockets nutted to the panel), a bought class I
power amplifier and a class II player, joined by unbalanced RCA pairs. His verdict: the
installation must show the preamp's own dangers and fail `--fail-on danger`; the advisor must not
crash (it did: an edit of a shield inside the preamp's own plan was applied to the installation's
file); the first fixes are the preamp's protective earth (a stud of its own, a bond wire to the
front, a ceramic fuse); the rules' own lines must never lift an unbalanced link's shield, which is
the signal's return, nor keep a socket's nut as the signal ground's one bond instead of the
star."""

from pathlib import Path

import pytest

from groundcheck import load

from fieldadvice import GROUP, advised

FIELD = Path(__file__).parent / "field" / "living-room-preamp"
SYSTEM = FIELD / "system.gplan"

pytestmark = pytest.mark.xdist_group(GROUP)


def _advised():
    a = advised("living-room-preamp/system.gplan")  # once per test process (fieldadvice.py)
    return a.before, a.evs


def test_the_installation_shows_the_preamps_own_dangers_and_fails_on_them(cli):
    # (the hum budget is not needed for the protective earth's verdicts)
    code, out, err = cli(
        "check", str(SYSTEM), "--advice-budget", "0", "--no-hum", "--fail-on", "danger"
    )
    assert code == 1 and "internal error" not in err
    dangers = [line for line in out.splitlines() if line.startswith("  GC2")]
    assert any("GC206" in x and "pre's own wiring" in x for x in dangers), dangers
    assert any("GC211" in x and "pre's own wiring" in x for x in dangers), dangers


def test_the_rules_own_lines_keep_the_star_bond_and_every_links_return(cli):
    code, out, _ = cli("check", str(SYSTEM), "--advice-budget", "0")
    fixes = [line.strip() for line in out.splitlines() if line.strip().startswith("fix:")]
    gc105 = next(x for x in fixes if x.startswith("fix: keep the bond at"))
    assert gc105.startswith("fix: keep the bond at pre.star"), gc105
    assert "insulate pre.star_bond" not in gc105
    for link in ("src_l", "src_r", "link_l", "link_r"):
        assert not [x for x in fixes if f"open the loop at {link} (terminate the shield" in x]


def test_the_advisor_runs_and_puts_the_protective_earth_first():
    before, evs = _advised()
    assert not [e.candidate.title for e in evs if "does not load" in (e.rejected or "")]
    useful = [e for e in evs if not e.rejected]
    first = {(e.candidate.action, e.candidate.element) for e in useful[:3]}
    assert first == {("fuse", "mains"), ("bond", "pre.front"), ("own-stud", "pre.pe_lead")}, first
    # each of them edits the preamp's own plan, never the installation's file
    for e in useful[:3]:
        files = {x.file for x in e.candidate.edits}
        assert all(f is not None and f.endswith("preamp.gplan") for f in files), files


def test_a_building_cable_runs_as_it_likes():
    # docs/language.md: a building cable runs in walls and under floors, its length any; the
    # reviewer's 18 m radial between outlets 1.5 m apart on the plan was GC112
    from groundcheck.analysis import Options, analyze

    r = analyze(load(SYSTEM), Options(hum=False))
    assert not [f for f in r.findings if f.code == "GC112" and f.elements[0] in ("run_a", "run_b")]


def test_a_shared_returns_level_is_its_own_not_its_sources_whole():
    # the reviewer: the filter capacitor's ripple current (55 µA by his hand Fourier estimate,
    # verdict.md) through 1.118 mΩ shared with the left cathode follower (gain 0 dB) is about
    # 20·log10(55e-6 × 1.118e-3) = -144.2 dBV, yet GC102 showed the whole rectifiers' -66 dBV
    # and called it a fault
    from groundcheck.analysis import analyze

    r = analyze(load(FIELD / "preamp.gplan"))
    (f,) = [x for x in r.findings if x.code == "GC102" and x.elements[:2] == ("ht.filter", "cf_l")]
    assert f.severity == "note"
    assert f.figures["level_dbv"] == pytest.approx(-144.2, abs=1.0)
