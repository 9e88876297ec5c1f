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
