"""Two changes to one statement, made one: the combined set's edits all refer to the plan's
original text, so two candidates that edit the same statement (an RCD and a high-breaking fuse,
both in the ``mains`` statement) overlap.  When each changes different characters of it, the two
are merged
into one edit (a three-way merge at the character level, against the original lines); when they
change the same characters, they conflict and the second is left out as before.
"""

from __future__ import annotations

import dataclasses
import difflib
from pathlib import Path

from .edits import Edit

__all__ = ["merge_into", "overlap"]


def merge_into(kept: list[Edit], more, text: str) -> tuple[list[Edit], tuple[Edit, ...]] | None:
    """``kept`` with ``more`` merged in: (the kept edits, each one that ``more`` overlaps merged
    with it; the edits of ``more`` that overlap none).  None when an overlap cannot be merged (a
    device plan that cannot be read, different line spans, a removal, or the same characters
    changed both ways).

    Parameters:
        kept: the combined set's edits so far (they do not overlap one another).
        more: a candidate's edits.
        text: the main plan's original text, which every edit refers to.
    Returns:
        (merged kept edits, the candidate's own remaining edits), or None.
    References:
        none (bookkeeping of text edits).
    """
    out = list(kept)
    rest = []
    lines = text.split("\n")
    for m in more:
        hits = [i for i, k in enumerate(out) if overlap(k, m)]
        if not hits:
            rest.append(m)
            continue
        if len(hits) > 1:
            return None
        k = out[hits[0]]
        if (k.file, k.line, k.last) != (m.file, m.line, m.last):
            return None
        if k.new is None or m.new is None:
            return None
        src = lines if k.file is None else _device_lines(k.file)
        if src is None:
            return None
        original = "\n".join(src[k.line - 1 : (k.last or k.line)])
        merged = _three_way(original, k.new, m.new)
        if merged is None:
            return None
        out[hits[0]] = dataclasses.replace(k, new=merged, extra=k.extra + m.extra)
    return out, tuple(rest)


def _device_lines(file: str) -> list[str] | None:
    """A device's own plan as it stands on disk, which its edits refer to (None if unreadable)."""
    try:
        return Path(file).read_text(encoding="utf-8").split("\n")
    except (OSError, UnicodeDecodeError):
        return None


def overlap(a: Edit, b: Edit) -> bool:
    """Whether two edits touch a line in common (of one file)."""
    return a.file == b.file and a.line <= (b.last or b.line) and b.line <= (a.last or a.line)


def _changes(o: str, x: str) -> list[tuple[int, int, str]]:
    """The changes that turn ``o`` into ``x``: (start, end in ``o``, replacement)."""
    ops = difflib.SequenceMatcher(None, o, x, autojunk=False).get_opcodes()
    return [(i1, i2, x[j1:j2]) for tag, i1, i2, j1, j2 in ops if tag != "equal"]


def _three_way(o: str, a: str, b: str) -> str | None:
    """``o`` with the changes of both ``a`` and ``b`` (each made against ``o``); None when they
    touch the same characters.  Two insertions at one place keep ``a``'s first."""
    ca, cb = _changes(o, a), _changes(o, b)
    for i1, i2, _ in ca:
        for j1, j2, _ in cb:
            # the same characters changed both ways, or one inserts inside the other's change
            if (i1 < j2 and j1 < i2) or j1 < i1 == i2 < j2 or i1 < j1 == j2 < i2:
                return None
    # apply from the end: at one place, b's insertion goes in first so that a's lands before it
    ordered = sorted(
        [(s, e, r, 0) for s, e, r in ca] + [(s, e, r, 1) for s, e, r in cb],
        key=lambda c: (c[0], c[1], c[3]),
        reverse=True,
    )
    out = o
    for s, e, r, _ in ordered:
        out = out[:s] + r + out[e:]
    return out
