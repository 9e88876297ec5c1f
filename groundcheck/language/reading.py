"""What every statement builder shares: the attribute words of the language, and reading a
statement's name, its two ends and unknown attributes (with a "did you mean" hint)."""

from __future__ import annotations

import difflib

from ..core.errors import Location, PlanError
from ..model.materials import MATERIAL_ALIASES
from ..model.materials import MATERIALS as MATERIAL_TABLE
from .phrases import Reader, Statement

__all__ = [
    "MATERIALS",
    "POINT_KINDS",
    "FIELD_KINDS",
    "FUSE_KINDS",
    "Refs",
    "unknown",
    "need_label",
    "no_label",
    "ends",
    "first_phrase_ends",
    "it_number",
    "material",
]

#: the material words: every material of the physics' table, and its other spellings
MATERIALS = (*MATERIAL_TABLE, *MATERIAL_ALIASES)
POINT_KINDS = (
    "junction",
    "stud",
    "star",
    "busbar",
    "tag",
    "sleeve",
    "jack",
    "pot",
    "pad",
    "cap",
    "centre-tap",
    "center-tap",
    "terminal",
    "inlet",
    "lug",
    "outlet",
    "earthing-terminal",
    "mains-pole",
)
FIELD_KINDS = ("transformer", "toroid", "choke", "mains-wiring", "motor", "other")
FUSE_KINDS = {
    "slow": "slow",
    "time-lag": "slow",
    "T": "slow",
    "fast": "fast",
    "quick": "fast",
    "F": "fast",
}
Refs = dict[str, Location]


def unknown(stmt: Statement, item, expected: tuple[str, ...], more: str = "") -> PlanError:
    if item.kind == "number":
        return PlanError(
            f"{stmt.keyword}: the number {item.text} needs a unit",
            item.loc,
            "add a unit, e.g. 10 mm, 0.5 mm2, 2 A, 50 Hz",
        )
    expected = tuple(dict.fromkeys(expected))
    close = difflib.get_close_matches(str(item.text), expected, n=1)
    hint = f"did you mean {close[0]!r}?" if close else "expected one of: " + ", ".join(expected)
    hint += f"; {more}" if more else ""
    return PlanError(f"{stmt.keyword}: unknown attribute {item.text!r}", item.loc, hint)


def need_label(stmt: Statement) -> str:
    if not stmt.label:
        raise PlanError(
            f"{stmt.keyword} needs a name", stmt.loc, f"write '{stmt.keyword} NAME: ...'"
        )
    return stmt.label


def no_label(stmt: Statement) -> None:
    if stmt.label:
        raise PlanError(
            f"{stmt.keyword} takes no name",
            stmt.label_loc or stmt.loc,
            f"write '{stmt.keyword} ...' without 'NAME:'",
        )


def ends(stmt: Statement, r: Reader, refs: Refs) -> tuple[str, str]:
    a, aloc = r.name("the first end")
    r.expect("to")
    b, bloc = r.name("the second end")
    r.finish()
    refs["a"], refs["b"] = aloc, bloc
    return a, b


def first_phrase_ends(stmt: Statement, refs: Refs) -> tuple[str, str]:
    if not stmt.phrases:
        raise PlanError(
            f"{stmt.keyword} needs its two ends",
            stmt.loc,
            f"write '{stmt.keyword} NAME: A to B, ...'",
        )
    return ends(stmt, Reader(stmt.phrases[0], stmt), refs)


def it_number(it) -> float:
    """The number written in front of a quantity's unit."""
    return float(it.text.split()[0])


def material(word: str) -> str:
    return MATERIAL_ALIASES.get(word, word)
