"""Accept comments applied to a run's findings: ``# accept [ELEMENT] CODE[, CODE]: reason`` accepts
the findings of those rules located on its line (of that element only, when one is named: one
placement of a block).  What a comment accepts is listed as not checked; a comment that accepts
nothing, names a danger without ``--allow-accept-danger``, or covers several placements of a block
says so in a notice naming its FILE:LINE."""

from __future__ import annotations

from dataclasses import dataclass, field, replace

from .selection import NotChecked, codes_of

__all__ = ["Accepted", "apply_acceptances"]


@dataclass
class Accepted:
    """The findings with acceptances applied, what they leave unchecked, and what is said of the
    comments."""

    findings: list
    not_checked: list[NotChecked] = field(default_factory=list)
    notices: list[str] = field(default_factory=list)


def _placements(f) -> set[str]:
    """The block placements (or devices) a finding's elements are in: each dotted name's prefix
    (the inlet's ``mains.pe`` is no placement)."""
    return {e.rsplit(".", 1)[0] for e in f.elements if "." in e and not e.startswith("mains.")}


def apply_acceptances(
    findings: list, acceptances, allow_danger: bool, judged: set[str]
) -> Accepted:
    """Apply the plan's accept comments to ``findings``.

    Parameters:
        findings: the run's findings.
        acceptances: the plan's comments, (file, line, words, reason, columns[, element]).
        allow_danger: whether a danger may be accepted (it still counts as a danger).
        judged: the codes this run judged (a comment for a rule not judged is not said to match
        nothing).
    Returns:
        an :class:`Accepted`.
    References:
        none (the plan's own comments).
    """
    out = Accepted([])
    at: dict[tuple, list[int]] = {}
    for i, (file, line, words, *_rest) in enumerate(acceptances):
        for code in codes_of(words):
            at.setdefault((file, line, code), []).append(i)
    matched: dict[int, list] = {}
    for f in findings:
        for i in at.get((f.location.file, f.location.line, f.code), ()):
            element = acceptances[i][5] if len(acceptances[i]) > 5 else None
            if element is not None and element not in f.elements:
                continue
            matched.setdefault(i, []).append(f)
            reason = acceptances[i][3]
            if f.severity != "danger" or allow_danger:
                f = replace(f, accepted=reason)
                out.not_checked.append(
                    NotChecked(
                        (f.code,), f"accepted in the plan: {reason}", f.location, f.severity
                    )
                )
            else:
                out.notices.append(
                    f"the accept comment at {f.location.file}:{f.location.line} names a danger "
                    f"({f.code}): a danger is accepted only with --allow-accept-danger, so it "
                    "stays open"
                )
            break
        out.findings.append(f)
    for i, (file, line, words, *rest) in enumerate(acceptances):
        out.notices += _said(
            file, line, words, rest[2] if len(rest) > 2 else None, matched.get(i), judged
        )
    return out


def _said(
    file: str, line: int, words, element: str | None, matched: list | None, judged: set[str]
) -> list:
    """What is said of one comment: that it accepts nothing, or which placements it covers."""
    named = ", ".join(words)
    if not matched:
        if not codes_of(words) & judged:  # its rules were not run: the verdict says so already
            return []
        whose = f" of {element}" if element else ""
        return [
            f"warning: the accept comment at {file}:{line} ({named}) matches no finding{whose} on "
            "its line and accepts nothing (a finding is accepted on the line its FILE:LINE names)"
        ]
    places = sorted(set().union(*(_placements(f) for f in matched)))
    if element is None and len(places) > 1:
        return [
            f"the accept comment at {file}:{line} ({named}) covers {len(places)} placements: "
            f"{', '.join(places)} (name an element, 'accept {places[0]}.NAME {words[0]}: …', to "
            "accept one)"
        ]
    return []
