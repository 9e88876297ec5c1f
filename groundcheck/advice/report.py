"""The suggestions as people read them: the terminal text and the JSON document of ``groundcheck
suggest``.

Hum is shown as real levels before and after with the change in words, never as a clamped number.
"""

from __future__ import annotations


from pathlib import Path

from ..core.caution import CAUTION
from ..core.units import dbv
from ..model.records import Plan
from ..rules.results import Result
from .edits import unified_diff
from .repair import HUM_FLOOR_DBV, NOT_TRIED, Evaluation

__all__ = ["in_included_files", "suggestions_document", "suggestions_text"]


def _level(dbv: float) -> str:
    return f"below {HUM_FLOOR_DBV:.0f} dBV" if dbv <= HUM_FLOOR_DBV else f"{dbv:.1f} dBV"


def _hum_change_words(ch: str, before: float, after: float, heard: float | None = None) -> str:
    """'left: −47.1 → −96.3 dBV (49.2 dB quieter)': real levels, and the change in words; with
    ``heard`` (the change of how far it stands above hearing) when that tells another story."""
    words = _total_change_words(ch, before, after)
    if heard is not None and abs(heard - (after - before)) >= 1.0 and after > HUM_FLOOR_DBV:
        how = f"{-heard:.1f} dB less" if heard < 0 else f"{heard:.1f} dB more"
        words += f" [{how} above hearing at the seat]"
    return words


def _total_change_words(ch: str, before: float, after: float) -> str:
    if before <= HUM_FLOOR_DBV and after <= HUM_FLOOR_DBV:
        return f"hum {ch}: none above {HUM_FLOOR_DBV:.0f} dBV before or after"
    d = after - before
    change = (
        "unchanged"
        if abs(d) < 0.05
        else (f"{-d:.1f} dB quieter" if d < 0 else f"{d:.1f} dB louder")
    )
    if after <= HUM_FLOOR_DBV:
        change = "hum removed from this channel" if before > HUM_FLOOR_DBV else "unchanged"
    return f"hum {ch}: {_level(before)} → {_level(after)} ({change})"


def _hum_words(ch: str, h) -> str:
    level = f"{dbv(h.total_v):.1f} dBV" if h.total_v > 0 else "no hum (below 1 pV)"
    verdict = {True: "audible", False: "inaudible", None: "no verdict"}[h.audible]
    ripple = (h.covers or {}).get("supply_ripple")
    # as check says: a figure without the rails' own ripple says nothing of it
    if ripple and ripple != "included":
        verdict += f"; supply ripple {ripple}"
    return f"{ch} {level} ({verdict})"


def _counted(items: list[str]) -> str:
    """'GC101 warning ×3, GC102 fault': repeated items counted, in order of first appearance."""
    counts: dict[str, int] = {}
    for x in items:
        counts[x] = counts.get(x, 0) + 1
    return ", ".join(k if v == 1 else f"{k} ×{v}" for k, v in counts.items())


def _base(plan: Plan) -> Path:
    """The main plan's folder: device plans' paths in diffs are shown relative to it."""
    return Path(plan.file).parent


def suggestions_document(
    plan: Plan,
    text: str,
    name: str,
    evs: list[Evaluation],
    chosen: list[Evaluation],
    final: Result,
    notices=None,
    before: Result | None = None,
) -> dict:
    """The suggestions as plain data (``groundcheck suggest --format json``); ``notices`` those of
    the plan as written (default: ``before``'s, else the combined set's)."""
    if notices is None and before is not None:
        notices = before.notices
    return {
        "caution": CAUTION,
        "plan": plan.file,
        "notices": list(final.notices if notices is None else notices),
        "suggestions": [
            evaluation_json(e, unified_diff(text, e.candidate.edits, name, _base(plan)))
            for e in evs
            if not e.rejected
        ],
        "rejected": [evaluation_json(e) for e in evs if e.rejected and e.rejected != NOT_TRIED],
        "untried": [e.candidate.title for e in evs if e.rejected == NOT_TRIED],
        "left_in_included_files": [
            {
                "code": f.code,
                "severity": f.severity,
                "location": str(f.location),
                "fix": f.fix,
            }
            for f in in_included_files(plan, final, before)
        ],
        "combined": {
            "search": "useful changes best first, each re-analysed on the plan as changed so far "
            "and kept if it still helps",
            "changes": [e.candidate.title for e in chosen],
            "findings_left": [f"{f.code} {f.severity}" for f in final.findings],
            "verdict": final.verdict(),
            "not_checked": [n.as_dict() for n in final.not_checked],
            "diff": unified_diff(
                text, [x for e in chosen for x in e.candidate.edits], name, _base(plan)
            ),
        },
    }


def suggestions_text(
    plan: Plan,
    text: str,
    name: str,
    evs: list[Evaluation],
    chosen: list[Evaluation],
    final: Result,
    caution: str,
    notices=None,
    before: Result | None = None,
) -> str:
    """The suggestions as the terminal shows them: each with its predicted effect and its diff;
    ``notices`` those of the plan as written (default: ``before``'s, else the combined set's)."""
    if notices is None and before is not None:
        notices = before.notices
    useful = [e for e in evs if not e.rejected]
    rejected = [e for e in evs if e.rejected and e.rejected != NOT_TRIED]
    untried = [e for e in evs if e.rejected == NOT_TRIED]
    out = [f"Suggestions for {plan.file} (each re-analysed; best first)", caution]
    out += [
        f"{n.sentence()[0].upper()}{n.sentence()[1:]} (no suggestion answers a rule not checked)"
        for n in final.not_checked
        if n.location is None
    ]
    out += [f"Notice: {n}" for n in (final.notices if notices is None else notices)]
    shared = in_included_files(plan, final, before)
    out += [
        f"DANGER left in an included file: {f.code} at {f.location} (see the end)"
        for f in shared
        if f.severity == "danger"
    ]
    out.append("")
    if not useful:
        out.append(
            "No change found that improves the plan"
            + (" in the files the advisor changes." if shared else ".")
        )
    for i, e in enumerate(useful, 1):
        out += _suggestion_lines(i, e, plan, text, name)
    if rejected:
        out.append("Considered and rejected:")
        out.extend(f"  - {e.candidate.title}: {e.rejected}" for e in rejected)
    if untried:
        out.append(
            f"Not tried within the time budget: {len(untried)} candidate"
            + ("" if len(untried) == 1 else "s")
            + " (raise --budget to try them), first: "
            + "; ".join(e.candidate.title for e in untried[:3])
        )
        out.append("")
    out += _combined_lines(chosen, final, {e.candidate.title for e in rejected})
    if shared:
        out.append("")
        out.append(
            f"Left in included files after the combined set ({len(shared)}); check's fix lines:"
        )
        out.extend(
            f"  - {f.code} {f.severity} at {f.location}: {f.fix or f.message}" for f in shared
        )
    return "\n".join(out) + "\n"


def in_included_files(plan: Plan, result: Result, before: Result | None = None) -> list:
    """The findings ``result`` leaves in files the plan includes, worst first: as the plan as
    written (``before``) has them, so that their lines are the user's own (a change the combined
    set made in an include moves the lines of its copy).

    Parameters:
        plan: the plan as written.
        result: the combined set's result.
        before: the plan as written's result (None: ``result``'s own findings).
    Returns:
        the findings whose place is an included file.
    References:
        none (bookkeeping).
    """
    included = set(plan.files) - {plan.file}
    left = [f for f in result.findings if f.location.file in included]
    if before is not None:
        # the same rule about the same first element (a shared return's source, a bond's
        # conductor): its other elements may have moved with the changes
        still = {(f.code, f.elements[:1]) for f in left}
        left = [
            f
            for f in before.findings
            if f.location.file in included and (f.code, f.elements[:1]) in still
        ]
    return sorted(left, key=lambda f: f.sort_key())


def _suggestion_lines(i: int, e: Evaluation, plan: Plan, text: str, name: str) -> list[str]:
    """Suggestion ``i``: its title, its predicted effect and its diff."""
    out = []
    hum = "; ".join(
        _hum_change_words(ch, e.hum_before_dbv[ch], e.hum_after_dbv[ch], e.heard_change_db.get(ch))
        for ch in e.hum_change_db
    )
    out.append(f"{i}. {e.candidate.title}  [answers {e.candidate.reason}]")
    cleared = f"clears {len(e.cleared)} finding" + ("" if len(e.cleared) == 1 else "s")
    out.append(
        f"   predicted: {hum or 'no hum figures'}; {cleared}"
        + (f"; introduces: {', '.join(e.introduced)}" if e.introduced else "")
    )
    out.append(
        "   "
        + unified_diff(text, e.candidate.edits, name, _base(plan)).replace("\n", "\n   ").rstrip()
    )
    out.append("")
    return out


def _combined_lines(chosen: list[Evaluation], final: Result, alone=frozenset()) -> list[str]:
    """The combined set: its changes (those rejected when tried alone, ``alone``, marked: kept
    after the changes before them), the findings it leaves, the verdict and hum after."""
    out = []
    n = len(chosen)
    said = [
        e.candidate.title
        + (
            " (rejected alone above; it helps after the changes before it)"
            if e.candidate.title in alone
            else ""
        )
        for e in chosen
    ]
    out.append(
        f"Combined (best first, each re-checked on the plan as changed so far): {n} change"
        + ("" if n == 1 else "s")
        + (": " + "; ".join(said) if chosen else "")
    )
    left = [f"{f.code} {f.severity}" for f in final.findings]
    partial = any(n.location is None for n in final.not_checked)
    among = " among the rules checked" if partial else ""
    out.append(
        f"  leaves no finding{among}"
        if not left
        else f"  leaves {len(left)}{among}: " + _counted(left)
    )
    out.append(f"  verdict after: {final.verdict()}")
    if final.hum is not None:
        out.append(
            "  hum after: " + ", ".join(_hum_words(ch, h) for ch, h in final.hum.channels.items())
        )
    return out


def evaluation_json(ev, diff: str = "") -> dict:
    """A change's entry in the suggestions' JSON document: its title, what it answers, its
    predicted effect (rounded here, and nowhere else) and its diff."""
    c = ev.candidate
    return {
        "title": c.title,
        "answers": c.reason,
        "action": c.action,
        "element": c.element,
        "score": round(ev.score, 3),
        "hum_change_db": {k: round(v, 2) for k, v in ev.hum_change_db.items()},
        "heard_change_db": {k: round(v, 2) for k, v in ev.heard_change_db.items()},
        "findings_cleared": ev.cleared,
        "findings_introduced": ev.introduced,
        "rejected": ev.rejected or None,
        "diff": diff,
    }
