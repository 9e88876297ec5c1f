"""The heater statement: a valve heater supply, its reference and its wiring on the deck."""

from __future__ import annotations

from ..core.errors import PlanError
from ..model.records import Heater
from .phrases import Reader, Statement
from .reading import Refs, ends, need_label, unknown

__all__ = ["heater"]


def heater(stmt: Statement):
    """'heater NAME: [A to B,] 6.3 V, 2.4 A, ac, reference POINT, wiring X,Y X,Y ...'."""
    name = need_label(stmt)
    refs: Refs = {}
    kw: dict = {}
    phrases = stmt.phrases
    if phrases and any(it.kind == "word" and it.value == "to" for it in phrases[0]):
        kw["a"], kw["b"] = ends(stmt, Reader(phrases[0], stmt), refs)
        phrases = phrases[1:]
    for ph in phrases:
        r = Reader(ph, stmt)
        first = r.peek()
        if first.kind == "qty":
            _heater_size(r, first, kw)
        elif first.kind == "word" and first.value in _HEATER_PHRASES:
            _HEATER_PHRASES[first.value](r, first, kw, refs)
        else:
            raise unknown(stmt, first, (*_HEATER_PHRASES, "A to B", "2.4 A"))
        r.finish()
    if "current" not in kw:
        raise PlanError("heater needs its current", stmt.loc, "e.g. ', 2.4 A'")
    if kw.get("rectifier") and (kw.get("reference") or "a" in kw):
        raise PlanError(
            "a valve rectifier's filament winding sits at the HT: it has no reference and no "
            "return in the ground system",
            refs["rectifier"],
            "write it 'floating' (or leave out the reference and 'A to B'); never ground it",
        )
    return Heater(name=name, location=stmt.loc, **kw), refs


def _heater_size(r: Reader, first, kw: dict) -> None:
    """The heater's voltage (read, for the reader of the plan) or its current."""
    if first.qkind == "voltage":
        r.quantity("voltage", "heater voltage")
    else:
        kw["current"] = r.quantity("current", "heater current")


def _heater_kind(r: Reader, first, kw: dict, refs: Refs) -> None:
    kw["ac"] = r.word() == "ac"


def _heater_reference(r: Reader, first, kw: dict, refs: Refs) -> None:
    r.word()
    kw["reference"], refs["reference"] = r.name("the reference point")


def _heater_floating(r: Reader, first, kw: dict, refs: Refs) -> None:
    r.word()
    kw["reference"] = None


def _heater_wiring(r: Reader, first, kw: dict, refs: Refs) -> None:
    """'wiring X,Y X,Y ...': the pair's centre line, from the winding to the filament."""
    r.word()
    pts = [r.coord()]
    while not r.done:
        pts.append(r.coord())
    if len(pts) < 2:
        raise PlanError(
            "heater wiring needs at least two points",
            first.loc,
            "e.g. 'wiring 40,150 200,150'",
        )
    kw["route"] = tuple(pts)


def _heater_geometry(r: Reader, first, kw: dict, refs: Refs) -> None:
    """'spacing 3 mm' (between the pair's wires) or 'height 5 mm' (above the deck)."""
    r.word()
    kw["spacing" if first.value == "spacing" else "wiring_height"] = r.quantity(
        "length", f"heater wiring {first.value}", allow_zero=first.value == "height"
    )


def _heater_twisted(r: Reader, first, kw: dict, refs: Refs) -> None:
    r.word()
    kw["twisted"] = True


#: the heater's phrases that open with a word, and their readers
def _heater_rectifier(r: Reader, first, kw: dict, refs: Refs) -> None:
    """'rectifier NAME': the winding heats that valve rectifier's filament, which is its HT."""
    r.word()
    kw["rectifier"], refs["rectifier"] = r.name("the valve rectifier it heats")


_HEATER_PHRASES = {
    "rectifier": _heater_rectifier,
    "ac": _heater_kind,
    "dc": _heater_kind,
    "reference": _heater_reference,
    "floating": _heater_floating,
    "wiring": _heater_wiring,
    "spacing": _heater_geometry,
    "height": _heater_geometry,
    "twisted": _heater_twisted,
}
