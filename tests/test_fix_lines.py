"""Fix lines on a plan of the project's own (tests/plans/valve-line-preamp.gplan: a stereo valve
line preamplifier with a valve rectifier, its protective stud holding the transformer's foot, one
input socket bolted to the chassis and wired to the star): each finding's fix line is the change
that answers it."""

from functools import cache
from pathlib import Path

from groundcheck import load
from groundcheck.advice.fixes import advised_result
from groundcheck.advice.repair import suggest
from groundcheck.analysis import Options, analyze

PLAN = Path(__file__).resolve().parent / "plans" / "valve-line-preamp.gplan"


@cache
def _advised():
    plan = load(PLAN)
    _, evs = suggest(plan, PLAN.read_text(), Options(), PLAN.parent, PLAN)
    return advised_result(analyze(plan), evs), evs


def test_each_finding_gets_the_change_that_answers_it():
    r, evs = _advised()
    fix = {f.code: f.fix for f in r.findings}
    assert {"GC202", "GC101", "GC105", "GC107"} <= set(fix)
    assert fix["GC202"].startswith("give the protective earth a stud of its own")
    assert fix["GC101"].startswith("insulate in_r_nut: in_r off chassis")
    # each input sleeve wired to its stage's cathode pad, then on to the star, is that stage's
    # input pair as the trade wires it, no chain (GC103 once asked for a wire of its own), before
    # and after the other socket is insulated
    assert "GC103" not in fix
    insulate = next(e for e in evs if e.candidate.title.startswith("insulate in_r_nut"))
    assert not any(f.code == "GC103" for f in insulate.result.findings)


def test_nothing_offered_touches_the_protective_earth_or_a_sockets_only_return():
    _, evs = _advised()
    for e in evs:
        if e.rejected:
            continue
        assert e.candidate.element not in {"pe_lead", "pe_nut", "pt_bolts"} or (
            e.candidate.action == "own-stud"
        )
        assert (
            e.candidate.element not in {"in_l_gnd", "in_r_gnd"} or e.candidate.action != "remove"
        )


def test_a_findings_own_action_rejected_for_another_rule_is_its_fix_line():
    # a second bond's socket (GC105's action) insulated by a change made for a loop (GC101) and
    # rejected there: GC105's fix line says so, never its own "insulate" (an outside builder read
    # both in one output)
    from groundcheck.advice.changes import Candidate
    from groundcheck.advice.evaluation import Evaluation
    from groundcheck.advice.fixes import NONE_ACCEPTED, advised_fixes
    from groundcheck.core.errors import Location
    from groundcheck.rules.catalogue import Finding
    from types import SimpleNamespace

    f = Finding(
        "GC105",
        "warning",
        "signal ground at k is bonded to the chassis at 2 places",
        Location("p.gplan", 3, 1),
        ("in_gnd", "star_bond"),
        {"bonds": 2},
        "keep the bond at star; insulate in_nut from the metal",
        (("insulate", "in_nut"),),
    )
    cand = Candidate("insulate in_nut: in off chassis", "GC101", (), False, element="in_nut")
    ev = Evaluation(cand, None, rejected="it would make the head hum louder")
    (line,) = advised_fixes(SimpleNamespace(findings=[f]), [ev])
    assert line.startswith(NONE_ACCEPTED) and "it would make the head hum louder" in line
