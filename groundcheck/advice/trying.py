"""The candidates tried under the advisor's clock, in one process or shared among ``--jobs``
processes.

A candidate refused before any analysis (it touches the protective earth, or bought equipment) is
judged here whatever the time left.  The others are tried in their order, each started only when
the slowest analysis so far still fits before the deadline (:class:`~.budget.Clock`); with ``jobs``
> 1 that many are tried at once by forked workers, each of which inherits the plan, its text and
its analysis and sends back only the candidate's evaluation.  Each candidate's evaluation is the
same whichever process made it, and the evaluations come back in the candidates' order, so with
time enough for all of them the advice does not depend on the number of processes.
"""

from __future__ import annotations

import time
from functools import partial

from ..physics.sweep import run_while
from .budget import Clock
from .changes import Candidate
from .evaluation import Evaluation
from .fixes import NOT_TRIED

__all__ = ["tried", "is_free"]


def is_free(c: Candidate) -> bool:
    """A candidate refused before any analysis (it touches the protective earth, or is bought
    equipment's): considered whatever the time left."""
    return c.touches_protective or bool(c.refused)


def _timed(judge, cand: Candidate) -> tuple[Evaluation, float]:
    t = time.monotonic()
    ev = judge(cand)
    return ev, time.monotonic() - t


def tried(cands: list[Candidate], judge, clock: Clock, jobs: int = 1, progress=None) -> list:
    """Each candidate's evaluation, in the candidates' order: ``judge(candidate)`` for those the
    clock allows, an untried evaluation (:data:`NOT_TRIED`) for the rest.

    Parameters:
        cands: the candidates, the most urgent first.
        judge: a candidate's evaluation (its re-analysis and score).
        clock: the advisor's clock; each analysis's time is recorded on it.
        jobs: processes trying candidates at once.
        progress: ``progress(done, total)`` after each evaluation, ``total`` the number the time
            left allows (by the candidates tried so far).
    Returns:
        the evaluations.
    References:
        none (scheduling).
    """
    out: list = [None] * len(cands)
    for i, c in enumerate(cands):
        if is_free(c):
            out[i] = judge(c)
    rest = [i for i, c in enumerate(cands) if not is_free(c)]
    done = len(cands) - len(rest)

    def finished(k: int, got: tuple[Evaluation, float]) -> None:
        nonlocal done
        ev, spent = got
        clock.spent.append(spent)
        ev.candidate = cands[rest[k]]  # the caller's own candidate, not the worker's copy
        out[rest[k]] = ev
        done += 1
        if progress is not None:
            left = len(cands) - done
            progress(done, done + min(left, clock.reachable(left) * jobs))

    never = run_while([partial(_timed, judge, cands[i]) for i in rest], jobs, clock.fits, finished)
    for k in never:
        out[rest[k]] = Evaluation(cands[rest[k]], None, rejected=NOT_TRIED)
    return out
