"""Attribute phrases: the comma-separated parts of a plan statement, read into typed items.

The grammar (``grammar/plan.lark``) only splits a statement into words,
numbers, coordinates and strings.  This module joins a number with the unit
that follows it into a quantity, and gives the statement builders a small
toolkit to read phrases with precise error locations.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

from .errors import Location, PlanError
from .units import UnitError, parse_quantity, unit_kind

__all__ = ["Item", "Statement", "make_items", "Reader"]


@dataclass(frozen=True)
class Item:
    """One item of a phrase: ``kind`` is word, number, qty, coord or string."""

    kind: str
    text: str
    loc: Location
    value: Any = None
    qkind: str | None = None     # for qty: the kind of quantity


@dataclass
class Statement:
    """One plan statement: keyword, optional label (the element's name) and phrases."""

    keyword: str
    loc: Location
    label: str | None = None
    label_loc: Location | None = None
    phrases: list[list[Item]] = field(default_factory=list)
    broken: bool = False          # an error was already reported inside it


def make_items(tokens, file: str, errors: list[PlanError]) -> list[Item]:
    """Items of one phrase from its lark tokens: a number followed by a unit becomes a quantity."""
    out: list[Item] = []
    i = 0
    while i < len(tokens):
        t = tokens[i]
        loc = Location(file, t.line, t.column)
        nxt = tokens[i + 1] if i + 1 < len(tokens) else None
        if t.type == "NUMBER":
            if nxt is not None and nxt.type == "WORD" and nxt.value not in ("x", "to", "at", "on"):
                try:
                    value, kind = parse_quantity(t.value, nxt.value)
                except UnitError as e:
                    errors.append(PlanError(str(e), Location(file, nxt.line, nxt.column), e.hint))
                    i += 2
                    continue
                out.append(Item("qty", f"{t.value} {nxt.value}", loc, value, kind))
                i += 2
                continue
            out.append(Item("number", t.value, loc, float(t.value)))
        elif t.type == "COORD":
            xs, ys = t.value.split(",")
            scale = 1e-3
            if nxt is not None and nxt.type == "WORD" and unit_kind(nxt.value) == "length":
                scale = parse_quantity("1", nxt.value)[0]
                i += 1
            elif nxt is not None and nxt.type == "WORD" and unit_kind(nxt.value) is not None:
                errors.append(PlanError(f"a position is a length, not a {unit_kind(nxt.value)}",
                                        Location(file, nxt.line, nxt.column), "positions are in mm, or give a length unit"))
                i += 1
            out.append(Item("coord", t.value, loc, (float(xs) * scale, float(ys) * scale)))
        elif t.type == "STRING":
            out.append(Item("string", t.value[1:-1], loc, t.value[1:-1]))
        else:
            out.append(Item("word", t.value, loc, t.value))
        i += 1
    return out


class Reader:
    """Reads the items of one phrase left to right, raising :class:`PlanError` at the offending item."""

    def __init__(self, items: list[Item], stmt: Statement):
        self.items = items
        self.stmt = stmt
        self.i = 0

    @property
    def done(self) -> bool:
        return self.i >= len(self.items)

    def peek(self) -> Item | None:
        return self.items[self.i] if self.i < len(self.items) else None

    def _end_loc(self) -> Location:
        if self.items:
            last = self.items[-1]
            return Location(last.loc.file, last.loc.line, last.loc.column + len(last.text))
        return self.stmt.loc

    def next(self, what: str) -> Item:
        it = self.peek()
        if it is None:
            raise PlanError(f"{self.stmt.keyword}: expected {what} here", self._end_loc(),
                            f"see the '{self.stmt.keyword}' entry of the language reference")
        self.i += 1
        return it

    def word(self, what: str = "a name", choices: tuple[str, ...] | None = None) -> str:
        it = self.next(what)
        if it.kind != "word":
            raise PlanError(f"expected {what}, found {it.text!r}", it.loc, "")
        if choices is not None and it.value not in choices:
            raise PlanError(f"{self.stmt.keyword}: unknown {what} {it.value!r}", it.loc,
                            "expected one of: " + ", ".join(choices))
        return it.value

    def name(self, what: str = "a name") -> tuple[str, Location]:
        it = self.next(what)
        if it.kind != "word":
            raise PlanError(f"expected {what}, found {it.text!r}", it.loc, "names start with a letter")
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

    def quantity(self, kind: str, what: str, positive: bool = True, allow_zero: bool = False) -> float:
        it = self.next(f"{what} ({kind})")
        return check_quantity(it, kind, what, positive=positive, allow_zero=allow_zero)

    def number(self, what: str) -> float:
        it = self.next(what)
        if it.kind != "number":
            raise PlanError(f"expected a plain number for {what}, found {it.text!r}", it.loc, "")
        return it.value

    def coord(self, what: str = "a position x,y") -> tuple[float, float]:
        it = self.next(what)
        if it.kind != "coord":
            raise PlanError(f"expected {what}, found {it.text!r}", it.loc, "write x,y in mm with no space, e.g. 25,200")
        return it.value

    def finish(self) -> None:
        it = self.peek()
        if it is not None:
            raise PlanError(f"{self.stmt.keyword}: unexpected {it.text!r}", it.loc,
                            "separate attributes with commas")


def check_quantity(it: Item, kind: str, what: str, positive: bool = True, allow_zero: bool = False) -> float:
    """The SI value of ``it`` if it is a quantity of ``kind``, else a :class:`PlanError` at the item."""
    if it.kind == "number":
        raise PlanError(f"{what} needs a unit", it.loc, f"give a {kind}, e.g. with {_example_unit(kind)}")
    if it.kind != "qty":
        raise PlanError(f"expected {what} ({kind}), found {it.text!r}", it.loc, "")
    if it.qkind != kind:
        raise PlanError(f"{what} must be a {kind}, not a {it.qkind}", it.loc, f"use a {kind} unit such as {_example_unit(kind)}")
    v = it.value
    if kind == "temperature":
        if v < -273.15:
            raise PlanError(f"temperature {it.text} is below absolute zero", it.loc, "")
        return v
    if positive and (v < 0 or (v == 0 and not allow_zero)):
        raise PlanError(f"{what} must be {'zero or more' if allow_zero else 'more than zero'}, got {it.text}", it.loc, "")
    return v


def _example_unit(kind: str) -> str:
    return {"length": "mm", "area": "mm2 or AWG", "resistance": "ohm or mohm", "current": "A or mA",
            "voltage": "V", "frequency": "Hz", "flux density": "uT", "capacitance": "uF",
            "level": "dB", "temperature": "C", "time": "s or ms", "energy integral": "A2s",
            "inductance": "uH", "resistance per length": "mohm/m"}.get(kind, "a unit")
