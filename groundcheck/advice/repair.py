"""Repair advisor: candidate changes to a plan, each tried by re-running the analysis.

Each candidate is a small edit of the plan's text (so the user can apply it as a unified diff):
lift a shield at one end, remove a redundant chassis bond, re-route a return to its star, join a
rectifier's two return ends directly, give the protective earth a stud of its own, thicken an
undersized protective conductor, or turn a second chassis bond into a lift network.

Each candidate is judged by :mod:`groundcheck.advice.evaluation` (the safety rejections, the
findings cleared and introduced, the hum change and the score).

The combined search takes the useful candidates best first and tries each on the plan as changed so
far, keeping it when it still improves the plan; it stops after :data:`MAX_STEPS` kept changes,
when no finding is left, or when the time budget runs out (the untried candidates are listed as
such).
"""

from __future__ import annotations

import dataclasses
import time
from pathlib import Path

from ..analysis import Options, Result, analyze
from ..model.records import Plan
from ..rules.catalogue import RULES, SAFETY_RULES, protective_earth_rule, severity_rank
from ..rules.selection import codes_of
from .budget import Clock
from .candidates import Candidate, candidates
from .edits import Edit, apply_edits, text_diff, unified_diff
from .evaluation import (
    ADDS_DANGER,
    HUM_FLOOR_DBV,
    MAKES_LOUDER,
    MORE_PE_CURRENT,
    Evaluation,
    evaluate,
)
from .fixes import NOT_TRIED
from .trying import tried
from .merge import merge_into, overlap

__all__ = [
    "Edit",
    "Candidate",
    "Evaluation",
    "candidates",
    "evaluate",
    "suggest",
    "advise",
    "greedy",
    "apply_edits",
    "unified_diff",
    "text_diff",
    "MAX_STEPS",
    "HUM_FLOOR_DBV",
    "NOT_TRIED",
]

MAX_STEPS = 8


#: the share of the budget (counted from the command's start) that trying the candidates may use;
#: the combined set has the rest
TRYING_SHARE = 0.7


def judging(options: Options) -> Options:
    """The settings the advisor judges changes with: the run's, with every protective-earth rule
    and every rule that can find a danger put back when the rule selection left them out (a change
    that adds a danger is refused whatever the run checks; ``check`` lists what it left out, the
    advisor never looks away from it).

    Parameters:
        options: the run's settings.
    Returns:
        ``options`` itself when nothing is put back, else a copy with the selection widened.
    References:
        none (the safety rejections of :mod:`groundcheck.advice.evaluation`).
    """
    wanted = (
        codes_of(options.only_rules, options.only_rules_origin) if options.only_rules else None
    )
    unwanted = codes_of(options.leave_out, options.leave_out_origin)
    if (wanted is None or SAFETY_RULES <= wanted) and not SAFETY_RULES & unwanted:
        return options
    return dataclasses.replace(
        options,
        only_rules=tuple(sorted(wanted | SAFETY_RULES)) if wanted is not None else (),
        leave_out=tuple(sorted(unwanted - SAFETY_RULES)),
    )


def _judged(plan: Plan, options: Options, before: Result | None) -> Result | None:
    """``before`` when it was analysed with the advisor's settings, else None (to analyse)."""
    return before if before is not None and before.options == options else None


def suggest(
    plan: Plan,
    text: str,
    options: Options = Options(),
    root: Path | None = None,
    resolved: Path | None = None,
    *,
    budget: float | None = None,
    progress=None,
    before: Result | None = None,
    clock: Clock | None = None,
) -> tuple[Result, list[Evaluation]]:
    """Every candidate evaluated (answers to the most serious findings first), the useful ones
    first in the result, then the rejected ones.  With a ``budget`` (seconds from the call, the
    first analysis included) or a ``clock``, a candidate is started only when the slowest analysis
    so far still fits before the deadline; those left are listed as untried.  ``progress(done,
    total)`` is called after each evaluation, ``total`` the number the time left allows (by the
    candidates tried so far).  With ``options.jobs`` > 1 that many candidates are tried at once
    (:mod:`groundcheck.advice.trying`)."""
    clock = clock or Clock.of(budget)
    options = judging(options)
    before = _judged(plan, options, before)
    if before is None:
        before = clock.timed(analyze, plan, options)
        clock.first = clock.spent.pop()
    # answers to the most serious findings first (the worst severity their rule found in this
    # plan, else the catalogue's; of one severity, the protective earth's first), so a short
    # budget tries them
    found: dict[str, int] = {}
    for f in before.findings:
        found[f.code] = min(found.get(f.code, 9), severity_rank(f.severity))

    def urgency(c: Candidate) -> tuple:
        code = c.reason.split(",")[0]
        rank = found.get(code, severity_rank(RULES[code].severity))
        return rank, not protective_earth_rule(code)

    cands = sorted(candidates(plan, before, text), key=urgency)

    def judge(c: Candidate) -> Evaluation:
        return evaluate(text, plan, before, c, options, root, resolved)

    evs = tried(cands, judge, clock, options.jobs, progress)
    _dominated(evs)
    evs.sort(key=lambda e: e.rank_key())
    return before, evs


def _dominated(evs: list[Evaluation]) -> None:
    """Rejects a change that introduces findings when another change for the same finding clears
    all it clears, introduces none and ranks before it (a return's own wire that closes a new loop
    beside a join of the same return that closes none)."""
    ok = [e for e in evs if not e.rejected and e.result is not None]
    for a in ok:
        if not a.introduced:
            continue
        code = a.candidate.reason.split(",")[0]
        better = next(
            (
                b
                for b in ok
                if b is not a
                and not b.introduced
                and not b.rejected
                and b.candidate.reason.split(",")[0] == code
                and b.cleared_keys >= a.cleared_keys
                and b.rank_key() < a.rank_key()
            ),
            None,
        )
        if better is not None:
            a.rejected = (
                f"{better.candidate.title} answers the same finding, clears all it clears and "
                "introduces nothing"
            )


def advise(
    plan: Plan,
    text: str,
    options: Options = Options(),
    root: Path | None = None,
    resolved: Path | None = None,
    *,
    budget: float | None = None,
    started: float | None = None,
    progress=None,
) -> tuple[Result, list[Evaluation], list[Evaluation], Result]:
    """The whole advice under one ``budget`` (seconds) counted from ``started``
    (``time.monotonic()``, default now): the first analysis, every candidate (until
    :data:`TRYING_SHARE` of the budget) and the combined set (the rest).  Returns the plan's
    result, the evaluations (:func:`suggest`), the combined set and its result (:func:`greedy`).
    ``progress(done, total)`` follows the candidates tried, then ``progress(done, total,
    COMBINING)`` the combined set's steps."""
    start = time.monotonic() if started is None else started
    clock = Clock.of(budget, start)
    asked, options = options, judging(options)
    before = clock.timed(analyze, plan, options)
    clock.first = clock.spent.pop()
    trying = clock.share(TRYING_SHARE, start)
    before, evs = suggest(
        plan, text, options, root, resolved, before=before, clock=trying, progress=progress
    )
    step = None if progress is None else (lambda d, n: progress(d, n, COMBINING))
    chosen, final, _ = greedy(
        plan, text, options, root, resolved, evs=evs, before=before, clock=clock, progress=step
    )
    if options is not asked:
        said = judged_notice(asked)
        for r in {id(before): before, id(final): final}.values():
            r.notices.append(said)
    return before, evs, chosen, final


#: the phase :func:`advise` names to its progress once the candidates are tried
COMBINING = "combining the accepted changes"


def judged_notice(asked: Options) -> str:
    """What the advice says when the run's rule selection left out rules it judges with."""
    origins = [
        o
        for words, o in (
            (asked.only_rules, asked.only_rules_origin),
            (asked.leave_out, asked.leave_out_origin),
        )
        if words
    ]
    return (
        "the advice judges every change, and the plan before and after it, with every "
        "protective-earth rule and every rule that can find a danger, whatever "
        f"{' and '.join(origins)} leaves out: a change that adds a danger is never offered"
    )


#: the actions that move a supply's return off a shared path
RETURN_MOVES = frozenset({"join", "return-to"})


def _overlaps(edits, more) -> bool:
    """Whether any of ``more`` edits a line of a file that ``edits`` already edit (lines of a
    device's own plan and of the main plan are apart)."""
    return any(overlap(e, m) for e in edits for m in more)


def _take_merged(chosen: list[Evaluation], before: list, after: list) -> None:
    """The chosen changes whose edit a merge replaced carry the merged edit (each kept edit is one
    chosen change's: the combined set's diff is the chosen changes' edits, none twice)."""
    swapped = {id(a): b for a, b in zip(before, after) if a is not b}
    if not swapped:
        return
    for ev in chosen:
        edits = tuple(swapped.get(id(x), x) for x in ev.candidate.edits)
        ev.candidate = dataclasses.replace(ev.candidate, edits=edits)


def _queue(evs: list[Evaluation]) -> tuple[list[Evaluation], list[Evaluation]]:
    """The combined set's candidates in the order tried, and those waiting for a return to move.

    The useful ones best first; then a change that brought a danger on the plan as it was (a bond
    whose wire could not survive a fault the installation's RCD now clears), and one that was
    louder (sockets insulated once the supply's return no longer runs on the bus they bypassed);
    last, one that sent working current through a protective conductor while a return still ran
    on the path it opened (an input socket insulated before the reservoir's return is moved),
    which is tried next as soon as a kept change moves a return."""
    useful = [e for e in evs if not e.rejected and e.score > 1e-9]
    useful += [e for e in evs if (e.rejected or "").startswith(ADDS_DANGER)]
    useful += [e for e in evs if (e.rejected or "").startswith(MAKES_LOUDER)]
    waiting = [e for e in evs if e.rejected == MORE_PE_CURRENT]
    return useful + waiting, waiting


def _growing(items: list):
    """(index, item) over a list that may be reordered after the current index while walked."""
    i = 0
    while i < len(items):
        yield i, items[i]
        i += 1


def greedy(
    plan: Plan,
    text: str,
    options: Options = Options(),
    root: Path | None = None,
    resolved: Path | None = None,
    *,
    evs: list[Evaluation] | None = None,
    before: Result | None = None,
    budget: float | None = None,
    clock: Clock | None = None,
    progress=None,
) -> tuple[list[Evaluation], Result, str]:
    """The combined set: the useful candidates, best first, each tried on the plan as changed so
    far and kept when it still improves it (re-analysed, with every safety rejection of
    :func:`evaluate`), until :data:`MAX_STEPS` are kept, nothing is left, or the ``budget``
    (seconds) or the ``clock`` runs out (a step is started only when the slowest analysis so far
    fits).  Candidates' edits all refer to the original text, so the kept ones are applied to it
    together; one that edits a statement a kept one edits is merged into it when they change
    different words (:mod:`.merge`), and skipped when they conflict.  ``progress(done, total)``
    follows the steps tried."""
    clock = clock or Clock.of(budget)
    options = judging(options)
    if evs is None:
        before, evs = suggest(plan, text, options, root, resolved, before=before, clock=clock)
    current = _judged(plan, options, before) or analyze(plan, options)
    chosen: list[Evaluation] = []
    edits: list = []
    useful, waiting = _queue(evs)
    requeued: set = set()
    for i, e in _growing(useful):
        if len(chosen) >= MAX_STEPS or not current.findings or not clock.fits():
            break
        kept, own = edits, e.candidate.edits
        if _overlaps(edits, own):  # merged into a kept edit of the same statement, or left out
            merged = merge_into(edits, own, text)
            if merged is None:
                continue
            kept, own = merged
        # the candidate's own action and element, with the kept edits before its own
        combined = dataclasses.replace(e.candidate, edits=tuple(kept) + own)
        ev = clock.timed(evaluate, text, plan, current, combined, options, root, resolved)
        if progress is not None:
            progress(i + 1, i + 1 + clock.reachable(len(useful) - i - 1))
        if ev.rejected or ev.score <= 1e-9:
            if ev.rejected == MORE_PE_CURRENT and id(e) in requeued:
                waiting.append(e)  # another return may still run there: tried after the next move
            continue
        _take_merged(chosen, edits, kept)
        ev.candidate = dataclasses.replace(e.candidate, edits=own)
        chosen.append(ev)
        if waiting and e.candidate.action in RETURN_MOVES:
            ids = {id(x) for x in waiting}
            requeued |= ids
            useful[i + 1 :] = waiting + [x for x in useful[i + 1 :] if id(x) not in ids]
            waiting = []
        edits = list(kept) + list(own)
        current = ev.result
    return chosen, current, apply_edits(text, edits)
