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

__all__ = ["Item", "Statement", "split_phrases", "Reader"]


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
                errors.append(
                    PlanError(
                        "unexpected ','", Location(file, line, col), "an attribute is missing here"
                    )
                )
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
            hint = (
                "only elements take 'NAME:'; header keywords (plan, mains, ambient, listening) "
                "take none"
                if value == ":"
                else NOT_ASCII
                if not value.isascii()
                else "names start with a letter; positions are x,y with no space; strings use "
                "double quotes"
            )
            code = "" if value.isascii() else f" (U+{ord(value):04X})"
            errors.append(PlanError(f"unexpected character {value!r}{code}", loc, hint))
            return []
    if pend is not None:
        cur.append(_plain(pend))
    if not (cur or dropped) and phrases:  # a trailing comma
        errors.append(
            PlanError(
                "the statement ends with a comma",
                Location(file, line, len(text) - line_start + 1),
                "remove the comma, or continue the attributes on the next line",
            )
        )
        return []
    return phrases + [cur] if (cur or dropped) else phrases


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
        lo, hi, kind, unit, source = PLAUSIBLE[word]
        if not (allow_zero and v == 0) and not lo * (1 - 1e-9) <= v <= hi * (1 + 1e-9):
            raise PlanError(
                f"{what} {it.text} is outside the plausible range {_si(lo, unit)} to "
                f"{_si(hi, unit)}",
                it.loc,
                f"{source}; see 'Plausible ratings' in docs/language.md",
            )
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
            raise PlanError(
                f"{self.stmt.keyword}: unexpected {it.text!r}",
                it.loc,
                "separate attributes with commas",
            )


def check_quantity(
    it: Item, kind: str, what: str, positive: bool = True, allow_zero: bool = False
) -> float:
    """The SI value of ``it`` if it is a quantity of ``kind``, else a :class:`PlanError` at the
    item."""
    if it.kind == "number":
        raise PlanError(
            f"{what} needs a unit", it.loc, f"give a {kind}, e.g. with {_example_unit(kind)}"
        )
    if it.kind != "qty":
        raise PlanError(f"expected {what} ({kind}), found {it.text!r}", it.loc, "")
    if it.qkind != kind:
        raise PlanError(
            f"{what} must be a {kind}, not a {it.qkind}",
            it.loc,
            f"use a {kind} unit such as {_example_unit(kind)}",
        )
    v = it.value
    check_range(v, kind, what, it.loc, it.text)
    if kind == "temperature":
        return v
    if positive and (v < 0 or (v == 0 and not allow_zero)):
        raise PlanError(
            f"{what} must be {'zero or more' if allow_zero else 'more than zero'}, got {it.text}",
            it.loc,
            "",
        )
    return v


#: the physical range of each kind of quantity, SI: (smallest magnitude other than zero, largest
#: magnitude). Wide enough for any audio installation, narrow enough that no analysis meets an
#: infinity, a NaN, an overflow or an absurd allocation (common practice for input validation; the
#: bounds are the project's own)
RANGES = {
    "length": (1e-7, 5e3),
    "area": (1e-13, 1e-2),
    "resistance": (1e-15, 1e15),
    "current": (1e-12, 1e5),
    "voltage": (1e-9, 1e6),
    "frequency": (1e-2, 1e6),
    "flux density": (1e-12, 10.0),
    "capacitance": (1e-15, 10.0),
    "inductance": (1e-12, 1e4),
    "level": (0.0, 300.0),
    "temperature": (0.0, 1000.0),
    "time": (1e-9, 1e6),
    "energy integral": (1e-9, 1e12),
    "resistance per length": (1e-9, 1e9),
    "apparent power": (1e-3, 1e8),
    "number": (0.0, 1e9),
    "position": (0.0, 1e4),
}
#: ratings of protection and of the earth path that a real installation can have: word -> (lowest,
#: highest, kind, unit, source).  A value outside is a typing slip (a nanoampere breaker, a loop of
#: no impedance) that would make a danger vanish; it is refused where it is written
PLAUSIBLE = {
    "fuse": (
        1e-3,
        125.0,
        "current",
        "A",
        "miniature fuses (IEC 60127) start at a few mA; a final circuit's fuse is at most 125 A "
        "(from memory)",
    ),
    "breaker": (
        0.5,
        125.0,
        "current",
        "A",
        "IEC 60898-1 covers breakers rated up to 125 A; the smallest made are 0.5 A (from memory)",
    ),
    "rcd": (
        4e-3,
        3.0,
        "current",
        "A",
        "residual-current devices trip from 4-6 mA (UL 943 class A) to 30 mA, 100 mA, 300 mA, 500 "
        "mA and a few A (IEC 61008-1, IEC 60947-2 Annex B; from memory)",
    ),
    "loop-impedance": (
        0.01,
        100e3,
        "resistance",
        "Ω",
        "an external earth-fault loop is never below about 10 mΩ, even beside the transformer; a "
        "TT loop with a poor electrode reaches tens of kΩ (common practice)",
    ),
    "electrode": (
        0.1,
        100e3,
        "resistance",
        "Ω",
        "an earth electrode is 0.1 Ω (a foundation electrode) to tens of kΩ (dry rock); over 200 "
        "Ω may not be stable (common practice)",
    ),
    "leakage": (
        0.0,
        0.1,
        "current",
        "A",
        "a device's protective-conductor current is at most some mA (IEC 60950-1 5.1.7 sets 3.5 "
        "mA for a plug-connected device); 100 mA is far beyond any (common practice)",
    ),
}


def _si(v: float, unit: str) -> str:
    for scale, prefix in ((1e3, "k"), (1.0, ""), (1e-3, "m"), (1e-6, "µ")):
        if v >= scale or scale == 1e-6:
            return f"{v / scale:g} {prefix}{unit}"
    return f"{v:g} {unit}"


#: the lowest temperature accepted, °C (copper's resistivity would vanish near −234.5 °C)
MIN_TEMPERATURE = -200.0


def check_range(v: float, kind: str, what: str, loc: Location, text: str) -> None:
    """A :class:`PlanError` at ``loc`` unless ``v`` is finite and within the physical range of
    ``kind``."""
    if v != v or v in (float("inf"), float("-inf")):
        raise PlanError(
            f"{what} must be a finite number, got {text}",
            loc,
            "write the value in ordinary digits",
        )
    lo, hi = RANGES.get(kind, (0.0, 1e12))
    if kind == "temperature" and v < MIN_TEMPERATURE:
        raise PlanError(
            f"{what} {text} is below {MIN_TEMPERATURE:g} C",
            loc,
            "give a temperature from -200 C to 1000 C",
        )
    if abs(v) > hi or (v != 0 and abs(v) < lo):
        raise PlanError(
            f"{what} {text} is outside the range groundcheck accepts for a {kind} ({lo:g} to "
            f"{hi:g} in SI units)",
            loc,
            f"check the number and its unit ({_example_unit(kind)})",
        )


def _example_unit(kind: str) -> str:
    return {
        "length": "mm",
        "area": "mm2 or AWG",
        "resistance": "ohm or mohm",
        "current": "A or mA",
        "voltage": "V",
        "frequency": "Hz",
        "flux density": "uT",
        "capacitance": "uF",
        "level": "dB",
        "temperature": "C",
        "time": "s or ms",
        "energy integral": "A2s",
        "inductance": "uH",
        "resistance per length": "mohm/m",
        "apparent power": "VA or kVA",
    }.get(kind, "a unit")
