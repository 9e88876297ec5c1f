"""The advisor's candidates tried by several processes (advice/trying.py, physics/sweep.run_while):
the same evaluations as one process, the deadline kept, nothing started once it has passed."""

import dataclasses
import os
import time
from pathlib import Path

import pytest

from groundcheck import load
from groundcheck.advice import repair
from groundcheck.advice.budget import Clock
from groundcheck.advice.evaluation import Evaluation
from groundcheck.advice.repair import NOT_TRIED, suggest
from groundcheck.analysis import Options, analyze
from groundcheck.core.runtime import can_fork
from groundcheck.physics import sweep

HEADPHONE = Path(__file__).parent.parent / "examples" / "headphone-amp-100v.gplan"

forking = pytest.mark.skipif(not can_fork(), reason="worker processes are forked on Linux only")


def _square(i):
    return i * i, os.getpid(), sweep._WORKER


@pytest.mark.parametrize("jobs", [1, 2])
def test_every_task_ends_once_with_its_own_result(jobs):
    got = {}
    left = sweep.run_while(
        [lambda i=i: _square(i) for i in range(7)], jobs, lambda: True, got.__setitem__
    )
    assert left == [] and sorted(got) == list(range(7))
    assert [got[i][0] for i in range(7)] == [i * i for i in range(7)]
    pids = {got[i][1] for i in range(7)}
    if jobs == 1 or not can_fork():
        assert pids == {os.getpid()} and not any(got[i][2] for i in range(7))
    else:  # the workers' own processes, which run any work they are given in one process
        assert os.getpid() not in pids and all(got[i][2] for i in range(7))


@pytest.mark.parametrize("jobs", [1, 2])
def test_nothing_starts_once_it_may_not(jobs):
    starts = []

    def may_start():
        starts.append(1)
        return len(starts) <= 3

    got = {}
    left = sweep.run_while([lambda i=i: i for i in range(8)], jobs, may_start, got.__setitem__)
    assert sorted(got) == [0, 1, 2] and left == [3, 4, 5, 6, 7]


@pytest.fixture(scope="module")
def headphone():
    plan = load(HEADPHONE)
    return plan, HEADPHONE.read_text(), analyze(plan, Options())


def _summary(evs):
    return [
        (
            e.candidate.title,
            e.rejected,
            round(e.score, 9),
            sorted((k, round(v, 9)) for k, v in e.hum_change_db.items()),
            e.cleared,
            e.introduced,
        )
        for e in evs
    ]


@forking
def test_two_processes_give_the_same_advice_as_one(monkeypatch, headphone):
    plan, text, before = headphone
    root = (HEADPHONE.parent, HEADPHONE.resolve())
    fixed = repair.candidates(plan, before, text)
    monkeypatch.setattr(repair, "candidates", lambda *a: list(fixed))
    _, one = suggest(plan, text, Options(), *root, before=before)
    _, two = suggest(plan, text, Options(jobs=2), *root, before=before)
    assert len(one) >= 3 and _summary(one) == _summary(two)
    # the evaluations carry the caller's candidates, not copies made in a worker
    assert sorted(id(e.candidate) for e in two) == sorted(id(c) for c in fixed)
    assert all(e.result is not None for e in two if not e.rejected)


@forking
def test_two_processes_keep_the_deadline(monkeypatch, headphone):
    plan, text, before = headphone
    real = repair.candidates
    n = 6 * len(real(plan, before, text))
    monkeypatch.setattr(repair, "candidates", lambda *a: real(*a) * 6)

    def slow(text, plan, before, cand, *rest):
        if cand.refused or cand.touches_protective:
            return Evaluation(cand, None, rejected="refused")
        time.sleep(0.1)
        return Evaluation(cand, None, rejected="stub")

    monkeypatch.setattr(repair, "evaluate", slow)
    before = analyze(plan, Options(jobs=2))  # the run's own settings: not analysed again
    calls = []
    clock = Clock(time.monotonic() + 0.61, first=0.1)
    _, evs = suggest(
        plan,
        text,
        Options(jobs=2),
        before=before,
        clock=clock,
        progress=lambda d, t: calls.append((d, t)),
    )
    ended = time.monotonic()
    tried = [e for e in evs if e.rejected == "stub"]
    assert len(evs) == n and [e for e in evs if e.rejected == NOT_TRIED]
    # two at a time: more than one process could try in 0.61 s (six), none started late
    assert 7 <= len(tried) <= 12
    assert ended <= clock.deadline + 0.1
    assert calls and calls[-1][0] <= len(evs)


def test_a_free_candidate_is_judged_whatever_the_time(headphone):
    plan, text, before = headphone
    cands = repair.candidates(plan, before, text)
    refused = dataclasses.replace(cands[0], refused="bought equipment: not opened")
    clock = Clock(time.monotonic() - 1.0)  # the deadline has passed
    from groundcheck.advice.trying import tried

    evs = tried([cands[0], refused], lambda c: Evaluation(c, None, rejected="judged"), clock, 2)
    assert [e.rejected for e in evs] == [NOT_TRIED, "judged"]
    assert evs[1].candidate is refused


@forking
def test_an_interrupt_ends_the_workers_at_once():
    """Ctrl-C while candidates are being tried (here an alarm half a second in, while the parent
    waits for its workers): the run stops without waiting for the tasks they run, and no worker is
    left behind."""
    import multiprocessing
    import signal

    def interrupt(signum, frame):
        raise KeyboardInterrupt

    old = signal.signal(signal.SIGALRM, interrupt)
    t = time.monotonic()
    try:
        signal.setitimer(signal.ITIMER_REAL, 0.5)
        with pytest.raises(KeyboardInterrupt):
            sweep.run_while([lambda: time.sleep(5)] * 4, 2, lambda: True, lambda i, r: None)
    finally:
        signal.setitimer(signal.ITIMER_REAL, 0)
        signal.signal(signal.SIGALRM, old)
    assert time.monotonic() - t < 3.0
    deadline = time.monotonic() + 3.0
    while multiprocessing.active_children() and time.monotonic() < deadline:
        time.sleep(0.05)
    assert not multiprocessing.active_children()
