"""One source of truth for fixes.

The ``fix:`` line of each finding in ``check`` is the advisor's best accepted candidate for it
(the best-ranked suggestion whose re-analysis clears that finding), or, when the advisor considered
changes for it and rejected them all, a sentence saying what was considered and why not.  Only a
finding the advisor has no change for (a fuse's breaking capacity, a length to measure again)
keeps its rule's own text, which describes no change of the plan that the advisor rejects.

A finding is the same finding before and after a change by its identity (:func:`identity`): its
code and elements (a loop by its conductors), never a line number.
"""

from __future__ import annotations

import dataclasses
import re

from ..rules.catalogue import RULES

__all__ = [
    "identity",
    "advised_fixes",
    "advised_result",
    "NONE_ACCEPTED",
    "NOT_TRIED",
    "SHOWN_BY_SUGGEST",
]

#: how a fix line begins when every change the advisor considered for the finding was rejected
NONE_ACCEPTED = "no change accepted by the advisor"

#: the reason given for a candidate the time budget left untried (suggest's --budget, check's
#: --advice-budget)
NOT_TRIED = "not tried: the time budget ran out"

#: what follows an accepted change's title in a fix line
SHOWN_BY_SUGGEST = " (groundcheck suggest shows the change and its predicted effect)"


def identity(f) -> tuple:
    """What makes a finding the same finding before and after a change, as its rule's entry
    states (``Rule.identity``): a loop is its conductors (in any order); a shared return or a
    contributor its (source, stage) or (element, source) pair, and the channel it reaches when it
    names one; crosstalk its (from, into) pair; a channel's verdict its channel alone; anything
    else its elements; a bonding test's finding its test too (short or long)."""
    kind = RULES[f.code].identity
    if kind == "first":  # a channel's verdict: the channel, whatever its contributors now are
        key = (f.code, *f.elements[:1])
    elif kind == "pair":
        key = (f.code, *f.elements[:2])
    else:
        key = (f.code, *sorted(f.elements))
    channel = f.figures.get("channel") if f.figures else None
    key = (*key, ("channel", channel)) if channel else key  # one element's share at each output
    test = f.figures.get("test") if f.figures else None
    return (*key, ("test", test)) if test else key  # one conductor in each bonding test


def _local(name: str) -> str:
    return name.rsplit(".", 1)[-1]


def _names_in(ev) -> set[str]:
    """The element names a candidate is about: its element and every name its title mentions, each
    also without its placement prefix (``left.in_gnd`` is also ``in_gnd``)."""
    c = ev.candidate
    words = {c.element, *re.findall(r"[A-Za-z_][\w.:\-]*\w", c.title)}
    return words | {w.rsplit(".", 1)[-1] for w in words} | {_local(c.element)}


def _reappears(f, ev) -> bool:
    """Whether a finding of ``f``'s rule is left on one of ``f``'s elements after the change."""
    after = ev.result.findings if ev.result is not None else []
    return any(g.code == f.code and set(g.elements) & set(f.elements) for g in after)


def _fix(f, clearing_by_key: dict, rejected_by_code: dict) -> str:
    if not RULES[f.code].actions:  # a note on the model's reach: its own text is the answer
        return f.fix
    clearing = clearing_by_key.get(identity(f), [])
    # best a change made for the finding's own rule (a shared return's own wire, not the socket
    # panel that clears it on the way), then any; in each, first one after which no finding of
    # the same rule lands on one of its elements (a chain that grew by another branch is cleared
    # by identity only); a change made for another rule after which it reappears is never its fix
    # (an earth moved to a stud of its own renames a loop through it, and opens nothing)
    own = [ev for ev in clearing if f.code in ev.candidate.reason.split(",")]
    for ev in [
        *(ev for ev in own if not _reappears(f, ev)),
        *own,
        *(ev for ev in clearing if not _reappears(f, ev)),
    ]:
        return ev.candidate.title + SHOWN_BY_SUGGEST
    # a candidate made for the finding: it answers its rule and names one of its elements (a change
    # in a block is made once for every placement: it answers each one's)
    tried, seen = [], set()
    acted = [("", a[1]) for a in (f.actions or ()) if len(a) > 1]
    keys = [(f.code, name) for name in dict.fromkeys([*f.elements, *map(_local, f.elements)])]
    for key in [*keys, *acted]:
        for i, ev in rejected_by_code.get(key, []):
            if i not in seen:
                seen.add(i)
                tried.append((i, ev))
    tried = [ev for _, ev in sorted(tried, key=lambda t: t[0])]
    rejected = [ev for ev in tried if ev.rejected != NOT_TRIED]
    untried = [ev.candidate.title for ev in tried if ev.rejected == NOT_TRIED]
    later = (
        f"not tried in the time allowed: {'; '.join(untried[:3])} (groundcheck suggest, or a "
        "larger --advice-budget, tries them)"
        if untried
        else ""
    )
    if rejected:
        why = "; ".join(f"{ev.candidate.title}: {ev.rejected}" for ev in rejected[:3])
        tail = f"; {later}" if later else ""
        return f"{NONE_ACCEPTED} — considered and rejected: {why}{tail}"
    if untried:
        return f"{NONE_ACCEPTED} — {later}"
    return f.fix


def advised_fixes(result, evs) -> list[str]:
    """The fix line of each of ``result``'s findings (in order), from the advisor's evaluations
    ``evs`` (groundcheck.advice.repair.suggest), best first."""
    clearing_by_key: dict = {}
    rejected_by_code: dict = {}
    for i, ev in enumerate(evs):  # indexed once: a rack's hundreds of findings look up their own
        if ev.rejected:
            for code in dict.fromkeys(ev.candidate.reason.split(",")):
                for name in _names_in(ev):
                    rejected_by_code.setdefault((code, name), []).append((i, ev))
            # and by the element it changes: a finding whose own action names that element (a
            # second bond's socket to insulate) was answered by it, whichever rule it was made for
            rejected_by_code.setdefault(("", ev.candidate.element), []).append((i, ev))
        else:
            for key in ev.cleared_keys:
                clearing_by_key.setdefault(key, []).append(ev)
    return [_fix(f, clearing_by_key, rejected_by_code) for f in result.findings]


def advised_result(result, evs):
    """``result`` with each finding's fix line replaced by the advisor's
    (:func:`advised_fixes`)."""
    fixes = advised_fixes(result, evs)
    findings = [dataclasses.replace(f, fix=x) for f, x in zip(result.findings, fixes)]
    return dataclasses.replace(result, findings=findings)
