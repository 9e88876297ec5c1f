"""Statement builders: one function per plan keyword, turning a :class:`Statement` into a model
record.

Names inside a record are still as written (resolved later by the loader) and
positions are in the frame of the block being placed.  Each builder returns
``(record, refs)`` where ``refs`` maps a field holding a name to the location
of that name, so an undefined name is reported where it was written.

This module builds the elements of a chassis (metal parts, points, stages, field sources) and
gathers every builder in :data:`BUILDERS`: the header statements are in :mod:`.headers`, the
conductors in :mod:`.conductors`, the supply statements in :mod:`.supply` and the transformer in
:mod:`.transformer`.
"""

from __future__ import annotations

from ..core.errors import PlanError
from ..core.units import ratio_of_db
from ..model.kinds import CONDUCTOR_KINDS, KINDS
from ..model.records import FieldSource, Metal, Point, Stage, make
from .conductors import conductor
from .headers import ambient, device, library, listening, plan_header
from .phrases import Reader, Statement, check_quantity
from .reading import (
    FIELD_KINDS,
    MATERIALS,
    POINT_KINDS,
    Refs,
    first_phrase_ends,
    it_number,
    material,
    need_label,
    unknown,
)
from .heaters import heater
from .supply import current, mains, rectifier, supply
from .transformer import transformer

__all__ = ["BUILDERS", "KEYWORDS", "build", "builder_of", "MAX_PART_SIDE"]

#: the largest metal part, m: a rack or a bench is a few metres (the plate model's grid is sized
#: for parts)
MAX_PART_SIDE = 10.0


def metal(stmt: Statement):
    name = need_label(stmt)
    kw: dict = {}
    for ph in stmt.phrases:
        r = Reader(ph, stmt)
        first = r.peek()
        if first.kind == "word" and first.value in MATERIALS:
            kw["material"] = material(r.word())
            if not r.done:
                kw["thickness"] = r.quantity("length", "thickness")
        elif first.kind == "number":
            w = r.number("width")
            r.expect("x")
            it = r.next("depth with a unit")
            d = check_quantity(it, "length", "depth")
            scale = d / it_number(it)
            if w <= 0:
                raise PlanError("width must be more than zero", first.loc, "")
            for side, text in ((w * scale, first.text), (d, it.text)):
                if side > MAX_PART_SIDE:
                    raise PlanError(
                        f"a metal part {text} across is larger than groundcheck models "
                        f"({MAX_PART_SIDE:g} m)",
                        first.loc,
                        "describe chassis parts, panels and racks, each under 10 m",
                    )
            kw["size"] = (w * scale, d)
        elif first.kind == "qty":
            kw["thickness"] = r.quantity("length", "thickness")
        elif first.kind == "word" and first.value == "at":
            r.next("at")
            kw["origin"] = r.coord()
        elif first.kind == "word" and first.value == "touchable":
            r.next("")
            kw["touchable"] = True
        elif first.kind == "word" and first.value == "internal":
            r.next("")
            kw["touchable"] = False
        elif first.kind == "word" and first.value == "signal-only":
            r.next("")
            kw["signal_only"] = True
        elif first.kind == "word" and first.value == "permeability":
            kw["permeability"] = _permeability(r)
        else:
            raise unknown(
                stmt,
                first,
                MATERIALS
                + ("W x D mm", "at", "touchable", "internal", "signal-only", "permeability"),
            )
        r.finish()
    kw.setdefault("touchable", None)
    return Metal(name=name, location=stmt.loc, **kw), {}


#: the relative permeabilities a metal part may state: 1 (non-magnetic) to 100,000 (beyond any
#: sheet steel's initial permeability; mild steel sheet is a few hundred at the weak fields of a
#: return current, from memory)
PERMEABILITY_RANGE = (1.0, 1e5)


def _permeability(r) -> float:
    """``permeability 300``: a plain number within :data:`PERMEABILITY_RANGE`."""
    r.next("permeability")
    it = r.peek()
    value = r.number("the relative permeability")
    lo, hi = PERMEABILITY_RANGE
    if not lo <= value <= hi:
        raise PlanError(
            f"relative permeability {it.text} is outside {lo:g} to {hi:g}",
            it.loc,
            "a relative permeability is a plain number: 1 for aluminium or copper, a few hundred "
            "for mild steel sheet",
        )
    return value


def point(stmt: Statement):
    name = need_label(stmt)
    kw: dict = {}
    refs: Refs = {}
    for ph in stmt.phrases:
        r = Reader(ph, stmt)
        first = r.peek()
        if first.kind == "word" and first.value == "at":
            r.next("at")
            kw["pos"] = r.coord()
            if r.keyword("on"):
                kw["on"], refs["on"] = r.name("a metal part")
        elif first.kind == "word" and first.value == "on":
            r.next("on")
            kw["on"], refs["on"] = r.name("a metal part")
        elif first.kind == "word" and first.value in POINT_KINDS:
            kw["kind"] = {"center-tap": "centre-tap"}.get(first.value, first.value)
            r.next("")
        elif str(first.value) in _POINT_WORDS:
            raise PlanError(
                f"point: no point kind {first.text!r}", first.loc, _POINT_WORDS[str(first.value)]
            )
        else:
            raise unknown(stmt, first, POINT_KINDS + ("at", "on"))
        r.finish()
    return make(Point, name=name, location=stmt.loc, **kw), refs


#: words of the trade for points the language writes another way
_POINT_WORDS = {
    "strip": "a mains strip (a power strip) is an 'outlet' point, joined to the outlet it is "
    "plugged into by a 'wire … protective'",
    "socket": "a mains socket is an 'outlet' point; a signal socket a 'sleeve' or 'jack'",
}


def stage(stmt: Statement):
    name = need_label(stmt)
    refs: Refs = {}
    a, b = first_phrase_ends(stmt, refs)
    kw: dict = {}
    for ph in stmt.phrases[1:]:
        r = Reader(ph, stmt)
        first = r.peek()
        if first.kind == "word" and first.value == "gain":
            r.word()
            kw["gain"] = r.quantity("level", "gain", positive=False)
        elif first.kind == "word" and first.value == "channel":
            r.word()
            kw["channel"] = r.word("a channel name")
        elif first.kind == "word" and first.value == "reference":
            r.word()
            kw["reference"], refs["reference"] = r.name("the input's reference point")
        elif first.kind == "word" and first.value in ("fed", "rejection"):
            _stage_supply(r, kw, refs)
        else:
            raise unknown(stmt, first, ("gain", "channel", "reference", "fed", "rejection"))
        r.finish()
    if "supply_rejection" in kw and "supply" not in kw:
        raise PlanError(
            "a stage's supply rejection needs its supply",
            refs["supply_rejection"],
            "say which rectifier feeds it, e.g. ', fed from hv, rejection 20 dB'",
        )
    return Stage(name=name, a=a, b=b, location=stmt.loc, **kw), refs


def _stage_supply(r: Reader, kw: dict, refs: Refs) -> None:
    """'fed from NAME' (the rail rectifier NAME feeds its load from), 'fed from NAME reservoir'
    (its reservoir), or 'rejection 20 dB' (the stage's supply rejection, referred to its input)."""
    first = r.peek()
    r.word()
    if first.value == "rejection":
        refs["supply_rejection"] = first.loc
        kw["supply_rejection"] = r.quantity("level", "supply rejection", allow_zero=True)
        return
    r.expect("from")
    kw["supply"], refs["supply"] = r.name("the rectifier that feeds the stage")
    if not r.done:
        kw["supply_tap"] = r.word("which rail (reservoir)", ("reservoir",))


def field_source(stmt: Statement):
    name = need_label(stmt)
    kw: dict = {"kind": "transformer"}
    harmonics = []
    for ph in stmt.phrases:
        r = Reader(ph, stmt)
        first = r.peek()
        if first.kind == "word" and first.value in FIELD_KINDS:
            kw["kind"] = r.word()
        elif first.kind == "word" and first.value == "at":
            r.word()
            kw["pos"] = r.coord()
        elif first.kind == "qty":
            kw["b_ref"] = r.quantity("flux density", "stray flux density")
            r.expect("at")
            kw["r_ref"] = r.quantity("length", "reference distance")
        elif first.kind == "word" and first.value in ("height", "size"):
            r.word()
            kw[first.value] = r.quantity(
                "length", f"the source's {first.value}", allow_zero=first.value == "height"
            )
        elif first.kind == "word" and first.value == "axis":
            r.word()
            kw["axis"] = r.word("an axis (x, y, z or worst)", ("x", "y", "z", "worst"))
            axis_at = first.loc
        elif first.kind == "word" and first.value == "harmonic":
            r.word()
            n = r.number("a harmonic number")
            if n != int(n) or n < 2:
                raise PlanError(
                    "harmonic number must be a whole number of 2 or more", first.loc, ""
                )
            level = r.quantity("level", "level relative to the fundamental", positive=False)
            harmonics.append((int(n), ratio_of_db(level)))
        else:
            raise unknown(
                stmt,
                first,
                FIELD_KINDS + ("at", "30 uT at 5 cm", "height", "axis", "size", "harmonic"),
            )
        r.finish()
    for need, ex in (("pos", "at 60,180"), ("b_ref", "30 uT at 5 cm")):
        if need not in kw:
            raise PlanError(
                f"field needs {ex.split()[0] if need == 'pos' else 'its strength'}",
                stmt.loc,
                f"e.g. ', {ex}'",
            )
    size, height = kw.get("size"), kw.get("height", 0.0)
    if size is not None and kw.get("axis") in ("x", "y") and height < size / 2:
        raise PlanError(
            f"a source of size {size * 1e3:g} mm with its axis {kw['axis']} at height "
            f"{height * 1e3:g} mm would reach {(size / 2 - height) * 1e3:g} mm through the deck",
            axis_at,
            f"give its centre's height (at least {size / 2 * 1e3:g} mm: half its size), a smaller "
            "size, or axis z",
        )
    return FieldSource(name=name, harmonics=tuple(harmonics), location=stmt.loc, **kw), {}


BUILDERS = {
    "plan": plan_header,
    "mains": mains,
    "supply": supply,
    "ambient": ambient,
    "listening": listening,
    "metal": metal,
    "point": point,
    **{k: conductor for k in CONDUCTOR_KINDS},
    "rectifier": rectifier,
    "current": current,
    "heater": heater,
    "stage": stage,
    "field": field_source,
    "device": device,
    "library": library,
    "transformer": transformer,
}

#: every keyword of the language, including those the loader handles itself
KEYWORDS = tuple(BUILDERS) + ("include", "place", "block")


def builder_of(keyword: str):
    """The builder of a keyword, or None: every row of the kinds table is a conductor keyword."""
    return conductor if keyword in KINDS else BUILDERS.get(keyword)


def build(stmt: Statement):
    """Build the record of one statement: ``(record, refs)``; raises :class:`PlanError`."""
    return builder_of(stmt.keyword)(stmt)
