"""Attribute phrases: the comma-separated parts of a plan statement, read into typed items.

The grammar (``grammar/plan.lark``) only splits a statement into words,
numbers, coordinates and strings.  This module joins a number with the unit
that follows it into a quantity, and gives the statement builders a small
toolkit to read phrases with precise error locations.
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field
from typing import Any, NamedTuple

from ..core.errors import Location, PlanError
from ..core.units import UnitError, parse_quantity, unit_kind
from .quantities import PLAUSIBLE, RANGES, check_plausible, check_quantity, check_range

#: the range checks live in :mod:`.quantities`; the builders import them from here too
__all__ = [
    "Item",
    "Statement",
    "split_phrases",
    "Reader",
    "check_quantity",
    "check_range",
    "RANGES",
    "PLAUSIBLE",
]


class Item(NamedTuple):
    """One item of a phrase: ``kind`` is word, number, qty, coord or string."""

    kind: str
    text: str
    loc: Location
    value: Any = None
    qkind: str | None = None  # for qty: the kind of quantity


@dataclass
class Statement:
    """One plan statement: keyword, optional label (the element's name) and phrases."""

    keyword: str
    loc: Location
    label: str | None = None
    label_loc: Location | None = None
    phrases: list[list[Item]] = field(default_factory=list)
    broken: bool = False  # an error was already reported inside it


# numbers are ASCII digits only, and words ASCII letters, digits, '_', '.', '-', '/' with the unit
# signs µ, μ, Ω, Ω and °: a digit of another script or a look-alike letter is an error where it
# stands, never a value or a second name that looks like the first
_NUM = r"[+-]?(?:[0-9]+(?:\.[0-9]*)?|\.[0-9]+)"
_UNIT_SIGNS = "\u00b5\u03bc\u03a9\u2126\u00b0"
_TOK = re.compile(
    rf"""[ \t\r]*(?:
    (\n)
  | (,)
  | ("[^"\n]*")
  | ({_NUM},{_NUM})
  | ({_NUM}(?:[eE][+-]?[0-9]+)?)
  | ((?:[A-Za-z_{_UNIT_SIGNS}])[A-Za-z0-9_.\-/{_UNIT_SIGNS}]*)
  | ([^ \t\r\n])
)""",
    re.X,
)
NL, COMMA, STRING, COORD, NUMBER, WORD, BAD = range(1, 8)
#: the hint for a letter or digit outside ASCII
NOT_ASCII = (
    "names and numbers are ASCII letters, digits, '_', '-' and '.' (a look-alike letter or a "
    "digit of another script would read as something else); only quoted text may hold other "
    "characters"
)
_NOT_UNITS = frozenset(("x", "to", "at", "on"))
_new = tuple.__new__


def split_phrases(
    text: str, line: int, column: int, file: str, errors: list[PlanError]
) -> list[list[Item]]:
    """The comma-separated phrases of a statement's rest (from line:column) in one pass: a number
    and its unit make a quantity, a position and a length unit a scaled position; 25,200 (no space)
    is a position, not two phrases.  Errors are appended to ``errors`` (and the statement gives no
    phrases)."""
    phrases: list[list[Item]] = []
    cur = []
    pend = None  # a number or coordinate waiting to see whether a unit follows
    dropped = False  # the current phrase lost a quantity to a unit error (already reported)
    line_start = -column + 1
    for m in _TOK.finditer(text):
        g = m.lastindex
        if g == NL:
            line += 1
            line_start = m.end()
            continue
        start = m.start(g)
        col = start - line_start + 1
        if g == COMMA:
            if pend is not None:
                cur.append(_plain(pend))
                pend = None
            if not cur and not dropped:
                errors.append(_empty_phrase(Location(file, line, col)))
                return []
            phrases.append(cur)
            cur = []
            dropped = False
            continue
        value = m.group(g)
        if g == WORD:
            if pend is not None:
                took = _take_unit(pend, value, file, line, col, cur, errors)
                pend = None
                if took:
                    dropped = dropped or took == _DROPPED
                    continue
            cur.append(_new(Item, ("word", value, _new(Location, (file, line, col)), value, None)))
            continue
        if pend is not None:
            cur.append(_plain(pend))
            pend = None
        loc = _new(Location, (file, line, col))
        if g == NUMBER or g == COORD:
            pend = (g, value, loc)
        elif g == STRING:
            cur.append(_new(Item, ("string", value[1:-1], loc, value[1:-1], None)))
        else:
            errors.append(_unexpected(value, loc))
            return []
    if pend is not None:
        cur.append(_plain(pend))
    if not (cur or dropped) and phrases:  # a trailing comma
        errors.append(_trailing_comma(Location(file, line, len(text) - line_start + 1)))
        return []
    return phrases + [cur] if (cur or dropped) else phrases


def _empty_phrase(loc: Location) -> PlanError:
    return PlanError("unexpected ','", loc, "an attribute is missing here")


def _trailing_comma(loc: Location) -> PlanError:
    return PlanError(
        "the statement ends with a comma",
        loc,
        "remove the comma, or continue the attributes on the next line",
    )


def _unexpected(value: str, loc: Location) -> PlanError:
    """A character that starts no item: a colon where no name is taken, a letter or digit outside
    ASCII, anything else."""
    hint = (
        "only elements take 'NAME:'; header keywords (plan, mains, ambient, listening) take none"
        if value == ":"
        else NOT_ASCII
        if not value.isascii()
        else "names start with a letter; positions are x,y with no space; strings use double "
        "quotes"
    )
    code = "" if value.isascii() else f" (U+{ord(value):04X})"
    return PlanError(f"unexpected character {value!r}{code}", loc, hint)


_TAKEN, _DROPPED = 1, 2


def _take_unit(pend, value: str, file: str, line: int, col: int, cur: list, errors: list) -> int:
    """A word after a pending number or position: its unit (the quantity goes into ``cur``:
    _TAKEN), a bad unit (reported: _DROPPED), or not a unit at all (the number goes into ``cur`` as
    it is: 0)."""
    if pend[0] == NUMBER and value not in _NOT_UNITS:
        try:
            qv, qk = parse_quantity(pend[1], value)
        except UnitError as e:
            errors.append(PlanError(str(e), Location(file, line, col), e.hint))
            return _DROPPED
        cur.append(_new(Item, ("qty", f"{pend[1]} {value}", pend[2], qv, qk)))
        return _TAKEN
    if pend[0] == COORD:
        k = unit_kind(value)
        if k == "length":
            cur.append(_coord(pend, parse_quantity("1", value)[0]))
            return _TAKEN
        if k is not None:
            errors.append(
                PlanError(
                    f"a position is a length, not a {k}",
                    Location(file, line, col),
                    "positions are in mm, or give a length unit",
                )
            )
            cur.append(_coord(pend, 1e-3))
            return _TAKEN
    cur.append(_plain(pend))
    return 0


def _plain(pend) -> Item:
    g, value, loc = pend
    if g == NUMBER:
        return _new(Item, ("number", value, loc, float(value), None))
    return _coord(pend, 1e-3)


def _coord(pend, scale: float) -> Item:
    xs, ys = pend[1].split(",")
    return _new(Item, ("coord", pend[1], pend[2], (float(xs) * scale, float(ys) * scale), None))


class Reader:
    """Reads the items of one phrase left to right, raising :class:`PlanError` at the offending
    item."""

    __slots__ = ("items", "stmt", "i")

    def __init__(self, items: list[Item], stmt: Statement):
        self.items = items
        self.stmt = stmt
        self.i = 0

    @property
    def done(self) -> bool:
        return self.i >= len(self.items)

    def peek(self) -> Item | None:
        i = self.i
        return self.items[i] if i < len(self.items) else None

    def _end_loc(self) -> Location:
        if self.items:
            last = self.items[-1]
            return Location(last.loc.file, last.loc.line, last.loc.column + len(last.text))
        return self.stmt.loc

    def next(self, what: str) -> Item:
        i, items = self.i, self.items
        if i >= len(items):
            raise PlanError(
                f"{self.stmt.keyword}: expected {what} here",
                self._end_loc(),
                f"see the '{self.stmt.keyword}' entry of the language reference",
            )
        self.i = i + 1
        return items[i]

    def word(self, what: str = "a name", choices: tuple[str, ...] | None = None) -> str:
        it = self.next(what)
        if it.kind != "word":
            raise PlanError(f"expected {what}, found {it.text!r}", it.loc, "")
        if choices is not None and it.value not in choices:
            bare = what.split(" ", 1)[1] if what.split(" ", 1)[0] in ("a", "an", "the") else what
            raise PlanError(
                f"{self.stmt.keyword}: unknown {bare} {it.value!r}",
                it.loc,
                "expected one of: " + ", ".join(choices),
            )
        return it.value

    def name(self, what: str = "a name") -> tuple[str, Location]:
        it = self.next(what)
        if it.kind != "word" or not it.value.isascii():
            raise PlanError(
                f"expected {what}, found {it.text!r}",
                it.loc,
                "names start with a letter" if it.kind != "word" else NOT_ASCII,
            )
        return it.value, it.loc

    def keyword(self, word: str) -> bool:
        it = self.peek()
        if it is not None and it.kind == "word" and it.value == word:
            self.i += 1
            return True
        return False

    def expect(self, word: str) -> None:
        if not self.keyword(word):
            it = self.peek()
            loc = it.loc if it else self._end_loc()
            found = f", found {it.text!r}" if it else ""
            raise PlanError(f"{self.stmt.keyword}: expected '{word}'{found}", loc, "")

    def quantity(
        self, kind: str, what: str, positive: bool = True, allow_zero: bool = False
    ) -> float:
        it = self.next(f"{what} ({kind})")
        return check_quantity(it, kind, what, positive=positive, allow_zero=allow_zero)

    def rating(self, word: str, what: str, allow_zero: bool = False) -> float:
        """A protective rating, which must also lie in its plausible range (:data:`PLAUSIBLE`)."""
        it = self.peek()
        v = self.quantity(PLAUSIBLE[word][2], what, allow_zero=allow_zero)
        check_plausible(v, word, what, it, allow_zero)
        return v

    def number(self, what: str) -> float:
        it = self.next(what)
        if it.kind != "number":
            raise PlanError(f"expected a plain number for {what}, found {it.text!r}", it.loc, "")
        check_range(it.value, "number", what, it.loc, it.text)
        return it.value

    def coord(self, what: str = "a position x,y") -> tuple[float, float]:
        it = self.next(what)
        if it.kind != "coord":
            raise PlanError(
                f"expected {what}, found {it.text!r}",
                it.loc,
                "write x,y in mm with no space, e.g. 25,200",
            )
        for v in it.value:
            check_range(v, "position", what, it.loc, it.text)
        return it.value

    def finish(self) -> None:
        if self.i < len(self.items):
            it = self.items[self.i]
            head = self.items[0]
            hint = "separate attributes with commas"
            if head.kind == "word" and head.value == "rcd" and it.kind == "word":
                # a type letter after the rating (time-delayed S, or A, F, B)
                hint = (
                    "an RCD is written by its rated residual current alone ('rcd 100 mA'); its "
                    "type is not modelled (a time-delayed one: check its delay against the "
                    "disconnection time by hand)"
                )
            raise PlanError(f"{self.stmt.keyword}: unexpected {it.text!r}", it.loc, hint)
