"""Which plan files are fragments of other plans: a file that another plan includes is checked as
part of that plan, never on its own (it may lack the supply statement its includer gives it).

Only the grammar reads the include statements (no second pattern); a file that cannot be read or
parsed includes nothing, and its own check says why.
"""

from __future__ import annotations

import os

from pathlib import Path

from ..core.errors import PlanErrors
from .limits import LIMITS
from .planfile import PLAN_SUFFIX, read_plan_file
from .syntax import parse_text

__all__ = ["includes_of", "fragments_among", "neighbours", "resolved"]


def resolved(p: Path) -> Path:
    """``p`` with its links followed; a link in a loop (or one that cannot be followed) as written,
    made absolute — the reader then refuses it with a located error."""
    try:
        return Path(p).resolve()
    except (RuntimeError, OSError):
        return Path(os.path.abspath(p))


def includes_of(path: Path) -> list[Path]:
    """The existing files that ``path`` includes directly, resolved against its folder."""
    try:
        text = read_plan_file(path, str(path))
    except PlanErrors:
        return []
    if "include" not in text:  # no parse of a file that cannot include anything
        return []
    errors: list = []  # the file's own check reports them
    items, _ = parse_text(text, str(path), errors)
    out = []
    for it in items:
        if (
            getattr(it, "keyword", None) != "include"
            or len(it.phrases) != 1
            or len(it.phrases[0]) != 1
        ):
            continue
        word = it.phrases[0][0]
        if word.kind == "string" and not Path(word.value).is_absolute():
            target = resolved((path.parent / word.value))
            if target.is_file():
                out.append(target)
    return out


def fragments_among(plans: list[Path]) -> dict[Path, list[Path]]:
    """Each file that one of ``plans`` includes, directly or through other includes (up to the
    include depth limit), resolved, with the plans that include it."""
    found: dict[Path, list[Path]] = {}
    known: dict[Path, list[Path]] = {}
    for plan in plans:
        root = resolved(plan)
        todo, seen = [(root, 0)], {root}
        while todo:
            here, depth = todo.pop()
            if depth >= LIMITS["include_depth"]:
                continue
            if here not in known:
                known[here] = includes_of(here)
            for target in known[here]:
                if target not in seen:
                    seen.add(target)
                    if target != root:
                        found.setdefault(target, []).append(plan)
                    todo.append((target, depth + 1))
    return found


def neighbours(path: Path, top: Path) -> list[Path]:
    """The plans that could include ``path``: those in its own folder and in each folder above it,
    up to ``top`` (an include is confined to its main plan's folder and below, so no other plan
    can)."""
    folder, top = resolved(path).parent, resolved(top)
    if folder != top and top not in folder.parents:
        return []
    out = []
    while True:
        try:
            out.extend(
                sorted(
                    p
                    for p in folder.iterdir()
                    if p.suffix == PLAN_SUFFIX
                    and p.is_file()
                    and not p.is_symlink()
                    and not p.name.startswith(".")
                )
            )
        except OSError:
            pass
        if folder == top:
            return out
        folder = folder.parent
