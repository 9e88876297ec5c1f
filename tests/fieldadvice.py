"""The advisor's answer on each plan of the field corpus, worked out once per test process and
shared by every module that reads it (tests/test_field*.py): the suggestions with every candidate
tried, the combined set and check's fix lines.  The modules that use it run in one process
(``xdist_group("field-advice")``), so each plan is advised once per suite."""

from __future__ import annotations

import functools
from pathlib import Path
from typing import NamedTuple

from groundcheck import load
from groundcheck.advice.fixes import advised_fixes
from groundcheck.advice.repair import greedy, suggest
from groundcheck.analysis import Options
from groundcheck.model.records import Plan
from groundcheck.rules.results import Result

FIELD = Path(__file__).resolve().parent / "field"
GROUP = "field-advice"


class Advised(NamedTuple):
    plan: Plan
    before: Result
    evs: list
    chosen: list
    final: Result
    fixes: list


@functools.lru_cache(maxsize=None)
def advised(rel: str) -> Advised:
    """(plan, findings before, evaluations best first, combined set, result after it, fix lines)
    of the field plan at ``rel`` (under tests/field/)."""
    path = FIELD / rel
    plan, text = load(path), path.read_text(encoding="utf-8")
    root, resolved = path.resolve().parent, path.resolve()
    before, evs = suggest(plan, text, Options(), root, resolved)
    chosen, final, _ = greedy(plan, text, Options(), root, resolved, evs=evs, before=before)
    return Advised(plan, before, evs, chosen, final, advised_fixes(before, evs))
