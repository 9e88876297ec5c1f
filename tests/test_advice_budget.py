"""The advisor's time budget (issue 31): counted from the command's start, the first analysis
included; a candidate is started only when the slowest analysis so far still fits, so the last
one never runs past the deadline; the progress total is what the time left allows, estimated from
the candidates actually tried; candidates refused without an analysis are always considered."""

import dataclasses
import time

import pytest

from groundcheck import load
from groundcheck.advice import budget as budget_module
from groundcheck.advice import repair
from groundcheck.advice.budget import Clock
from groundcheck.advice.evaluation import Evaluation
from groundcheck.advice.repair import NOT_TRIED, advise, suggest
from groundcheck.analysis import Options, analyze

from helpers import EXAMPLES

HEADPHONE = next(e for e in EXAMPLES if e.name.startswith("headphone"))


class _Time:
    """A monotonic clock the test moves by hand."""

    def __init__(self):
        self.now = 100.0

    def __call__(self):
        return self.now


def test_the_clock_estimates_from_the_slowest_and_counts_by_the_mean(monkeypatch):
    t = _Time()
    monkeypatch.setattr(budget_module.time, "monotonic", t)
    clock = Clock.of(10.0)  # deadline at 110
    clock.first = 4.0
    # before any candidate: the first analysis is the estimate; 100 + 4 <= 110
    assert clock.estimate() == 4.0 and clock.fits()
    assert clock.reachable(9) == 2  # 10 s left / 4 s

    def work(seconds):
        t.now += seconds
        return seconds

    assert clock.timed(work, 1.0) == 1.0 and clock.timed(work, 3.0) == 3.0
    # worked by hand: now 104, 6 s left; slowest 3 s fits, mean 2 s allows 3 more
    assert clock.estimate() == 3.0 and clock.fits() and clock.reachable(9) == 3
    t.now = 107.5  # 2.5 s left: the slowest (3 s) would end past the deadline
    assert not clock.fits() and clock.reachable(9) == 1
    # a phase's share: 70 % of the way from the start (100) to the deadline, the same estimates
    phase = clock.share(0.7, 100.0)
    assert phase.deadline == pytest.approx(107.0) and phase.spent is clock.spent
    assert Clock.of(None).fits() and Clock.of(None).reachable(5) == 5


@pytest.fixture(scope="module")
def headphone():
    plan = load(HEADPHONE)
    return plan, HEADPHONE.read_text(), analyze(plan, Options())


def _slow_evaluate(seconds):
    def evaluate(text, plan, before, cand, *rest):
        if cand.refused:
            return Evaluation(cand, None, rejected=cand.refused)
        time.sleep(seconds)
        return Evaluation(cand, None, rejected="stub")

    return evaluate


def test_the_last_candidate_never_runs_past_the_deadline(monkeypatch, headphone):
    plan, text, before = headphone
    real = repair.candidates
    n = 4 * len(real(plan, before, text))
    monkeypatch.setattr(repair, "candidates", lambda *a: real(*a) * 4)  # the same edits, 4 times
    monkeypatch.setattr(repair, "evaluate", _slow_evaluate(0.1))
    calls = []
    clock = Clock(time.monotonic() + 0.61, first=0.1)
    _, evs = suggest(
        plan, text, before=before, clock=clock, progress=lambda d, n: calls.append((d, n))
    )
    ended = time.monotonic()
    tried = [e for e in evs if e.rejected == "stub"]
    assert len(evs) == n and 1 <= len(tried) < n
    assert [e for e in evs if e.rejected == NOT_TRIED]
    # without the estimate the seventh 100 ms candidate would start before 0.61 s and end at 0.7
    assert ended <= clock.deadline + 0.04
    # the progress total is what the time allowed, not every candidate
    assert calls[-1][0] == len(tried) and calls[-1][1] <= len(tried) + 1


def test_a_budget_spent_before_the_first_candidate_tries_none_and_still_considers_refusals(
    monkeypatch, headphone
):
    plan, text, _ = headphone
    real = repair.candidates

    def with_refused(*a):
        cands = real(*a)
        return cands + [dataclasses.replace(cands[0], refused="bought equipment: not opened")]

    monkeypatch.setattr(repair, "candidates", with_refused)
    started = time.monotonic() - 60.0  # the command started a minute ago; the budget is 5 s
    _, evs, chosen, final = advise(plan, text, budget=5.0, started=started)
    assert chosen == [] and final.plan is plan
    reasons = sorted(e.rejected for e in evs)
    assert reasons.count(NOT_TRIED) == len(evs) - 1
    assert "bought equipment: not opened" in reasons


def test_progress_reaches_a_pipe_as_plain_lines_for_both_phases(cli, monkeypatch):
    # standard error is not a terminal here: the advice's progress is a plain line at most every
    # PIPE_EVERY seconds (set to 0: one at every step), the candidates' phase then the combined
    # set's, each with what the time left allows
    from groundcheck.cli import advice as cli_advice

    monkeypatch.setattr(cli_advice._progress, "PIPE_EVERY", 0.0)
    code, out, err = cli("suggest", str(HEADPHONE), "--budget", "60")
    lines = err.splitlines()
    trying = [x for x in lines if x.startswith("groundcheck: trying candidate changes: ")]
    combining = [x for x in lines if x.startswith(f"groundcheck: {repair.COMBINING}: ")]
    assert code in (0, 1) and trying and combining
    assert lines.index(trying[-1]) < lines.index(combining[0])
    assert all(" of about " in x and x.endswith(" s)") for x in trying + combining)
