"""The conductor statements (wire, trace, busbar, bolt, strap, cable, core, shield, interconnect,
lift, switch): one builder for every kind, the geometry each kind needs coming from
:mod:`groundcheck.model.kinds`."""

from __future__ import annotations

from ..core.errors import PlanError
from ..core.units import UnitError, awg_diameter, awg_number
from ..model.kinds import KINDS, ROLES, default_role, owners
from ..model.records import CABLE_CORES, Conductor, make
from .phrases import Reader, Statement, check_quantity
from .reading import MATERIALS, Refs, first_phrase_ends, material, unknown

__all__ = ["conductor", "CONDUCTOR_NAMED"]


CONDUCTOR_NAMED = (
    "via",
    "width",
    "thickness",
    "copper",
    "contact",
    "resistance",
    "insulation",
    "channel",
    "terminated",
    "separate",
    "in-cable",
    "open",
    "closed",
    "diameter",
    "balanced",
    "unbalanced",
    "gain",
    "cmrr",
    "imbalance",
    "common-mode",
    "load",
    "cores",
    "line-cores",
    "shield-to",
    "in",
    "capacitance",
    "twisted",
    "diodes",
)
#: where an interconnect's shield end can land
SHIELD_LANDINGS = ("chassis", "signal")
#: the field a bare quantity of each kind sets on a conductor
_CONDUCTOR_QTY = {
    "length": "length",
    "area": "area",
    "resistance": "resistance",
    "capacitance": "capacitance",
}


def _named(r: Reader, word: str, kw: dict, a: str, b: str) -> None:
    """A conductor attribute that starts with a word of :data:`CONDUCTOR_NAMED`."""
    if word == "via":
        pts = [r.coord()]
        while not r.done:
            pts.append(r.coord())
        kw["route"] = tuple(pts)
    elif word in ("width", "thickness", "copper", "diameter"):
        kw[{"copper": "thickness"}.get(word, word)] = r.quantity("length", word)
    elif word in ("contact", "resistance"):
        kw[word] = r.quantity("resistance", word, allow_zero=True)
    elif word == "insulation":
        kw["insulation"] = r.word("an insulation (pvc, xlpe, bare)", ("pvc", "xlpe", "bare"))
    elif word == "channel":
        kw["channel"] = r.word("a channel name")
    elif word == "terminated":
        it = r.next("which end is terminated")
        if it.kind != "word" or it.value not in ("both", a, b):
            raise PlanError(f"terminated takes 'both' or one of the ends ({a}, {b})", it.loc, "")
        kw["terminated"] = "both" if it.value == "both" else ("a" if it.value == a else "b")
    elif word == "separate":
        kw["in_cable"] = False
    elif word == "in-cable":
        kw["in_cable"] = True
    elif word in ("open", "closed"):
        kw["closed"] = word == "closed"
    elif word in ("balanced", "unbalanced"):
        kw["balanced"] = word == "balanced"
    elif word in ("gain", "cmrr"):
        kw[word] = r.quantity("level", word, positive=False)
    elif word == "imbalance":
        kw["imbalance"] = r.quantity("resistance", "source impedance imbalance", allow_zero=True)
    elif word == "common-mode":
        kw["common_mode"] = r.quantity("resistance", "common-mode input impedance")
    elif word == "load":
        amps = r.quantity("current", "load current", allow_zero=True)
        hz = r.quantity("frequency", "load current's frequency") if not r.done else 0.0
        kw["loads"] = kw.get("loads", ()) + ((amps, hz),)
    elif word == "cores":
        kw["cores"] = r.word("how the cores lie (L-N-PE, L-PE-N or round)", CABLE_CORES)
    elif word == "line-cores":
        kw["line_area"] = r.quantity("area", "the line and neutral cores' area")
    elif word == "shield-to":
        first = r.word("where the shield lands (chassis or signal)", SHIELD_LANDINGS)
        kw["shield_ends"] = (
            first,
            r.word("where the B end lands", SHIELD_LANDINGS) if not r.done else first,
        )
    elif word == "in":
        kw["bundle"] = r.word("the umbilical's name")
    elif word == "twisted":
        r.expect("with")
        kw["twisted_with"] = r.word("the conductor it is twisted with")
    elif word == "diodes":
        kw["diodes"] = True
    elif word == "capacitance":
        kw["capacitance"] = check_quantity(
            r.next("the capacitor (capacitance)"), "capacitance", "capacitance"
        )


def conductor(stmt: Statement):
    kind = stmt.keyword
    refs: Refs = {}
    a, b = first_phrase_ends(stmt, refs)
    row = KINDS[kind]
    kw: dict = {"role": default_role(kind)}
    if row.contact is not None:
        kw["contact"] = row.contact
    if row.thickness is not None:
        kw["thickness"] = row.thickness
    only = owners()  # the attribute words that belong to some kinds only
    named = CONDUCTOR_NAMED
    said: dict = {}  # each figure or word given, where: a second one is an error
    for ph in stmt.phrases[1:]:
        r = Reader(ph, stmt)
        first = ph[0]  # phrases are never empty
        if first.kind == "qty":
            _once(said, _CONDUCTOR_QTY.get(first.qkind), first, kind)
            _bare_quantity(r, kind, row, only, kw)
        elif first.kind == "word" and first.value.upper() == "AWG":
            _once(said, "area", first, kind)
            _awg(r, first, kw)
        elif first.kind == "word" and first.value in ROLES:
            _once(said, "role", first, kind)
            kw["role"] = r.word()
        elif first.kind == "word" and first.value in MATERIALS and len(ph) == 1:
            kw["material"] = material(r.word())
        elif first.kind == "word" and first.value in named:
            if first.value in only and first.value not in row.attributes:
                owner = _a(" or ".join(only[first.value]))
                raise PlanError(
                    f"{first.value} is an attribute of {owner}, not of {_a(kind)}",
                    first.loc,
                    _HINTS[first.value],
                )
            if first.value == "twisted":
                refs["twisted_with"] = first.loc
                if row.impedance != "round":
                    raise PlanError(
                        f"only a round conductor can be twisted, not {_a(kind)}",
                        first.loc,
                        "twist wires or cores: 'wire NAME: A to B, 0.3 mm2, twisted with OTHER'",
                    )
            _once(said, first.value, first, kind)
            _named(r, r.word(), kw, a, b)
        else:
            raise _misplaced(stmt, first, kind) or unknown(
                stmt, first, attribute_words(kind), _UNKNOWN_HINTS.get(row.impedance, "")
            )
        r.finish()
    _check_geometry(stmt, kind, kw)
    return make(
        Conductor, name=stmt.label or "", kind=kind, a=a, b=b, location=stmt.loc, **kw
    ), refs


#: what a second one of each is called in the error
_TWICE = {"area": "cross-section (an area or AWG size)", "role": "role"}
#: attributes a statement may give several times, each adding to the others (a cable's loads)
_REPEATABLE = {"load"}


def _once(said: dict, what: str | None, tok, kind: str) -> None:
    """A figure or attribute given a second time in one statement is an error: the second would
    replace the first without a word (a typo corrected by typing on)."""
    if what is None or what in _REPEATABLE:
        return
    if what in said:
        line, col = said[what]
        at = f"column {col}" if line == tok.loc.line else f"line {line}, column {col}"
        raise PlanError(
            f"{kind}: {_TWICE.get(what, what)} given twice (first at {at})",
            tok.loc,
            "give it once: the second would replace the first without a word",
        )
    said[what] = (tok.loc.line, tok.loc.column)


def _bare_quantity(r: Reader, kind: str, row, only: dict, kw: dict) -> None:
    """A quantity written without a word: the length, area, resistance or capacitance (the last
    only on the kinds that take one)."""
    it = r.next("")
    field = _CONDUCTOR_QTY.get(it.qkind)
    if field is None or (field in only and field not in row.attributes):
        lifts = _a(" or ".join(only.get("capacitance", ())))
        raise PlanError(
            f"{kind}: a {it.qkind} is not expected here",
            it.loc,
            f"give lengths, areas (mm2 or AWG) and resistances; a capacitance only on {lifts}",
        )
    kw[field] = check_quantity(it, it.qkind, field, allow_zero=field == "resistance")
    if field == "area" and it.text.upper().endswith("AWG"):
        # the area is AWG 0000-aware
        kw["diameter"] = (4 * kw["area"] / 3.141592653589793) ** 0.5


def _awg(r: Reader, first, kw: dict) -> None:
    """``AWG 20``: a whole gauge from 0000 (-3) to 46, its area and diameter."""
    r.next("")
    it = r.peek()
    r.number("an AWG size")
    try:
        n = awg_number(it.text)
    except UnitError as e:
        raise PlanError(str(e), first.loc, e.hint) from None
    d = awg_diameter(n)
    kw["area"], kw["diameter"] = 3.141592653589793 * d * d / 4, d


#: what a kind that reads its values as bare quantities says beside an unknown attribute
_UNKNOWN_HINTS = {"lift": "a lift's resistor and capacitor are quantities: ', 10 ohm, 47 nF'"}

#: protective devices, which a plan states on its supply, not on a conductor
_SUPPLY_WORDS = ("breaker", "rcd")


def _misplaced(stmt: Statement, first, kind: str) -> PlanError | None:
    """The error for a word that belongs elsewhere: a supply's protective device written on a
    conductor, or a value written without its attribute ('round' for 'cores round')."""
    if first.value in _SUPPLY_WORDS:  # protection belongs to the supply, not a cable
        return PlanError(
            f"{stmt.keyword}: a {first.text} is no attribute of a {kind}",
            first.loc,
            f"the installation's {first.text} is written on its 'supply' statement (one for "
            "every outlet), e.g. 'supply 230 V 50 Hz, breaker 16 A B, rcd 30 mA'",
        )
    if first.value in CABLE_CORES:
        return PlanError(
            f"{stmt.keyword}: {first.text!r} needs its attribute",
            first.loc,
            f"write 'cores {first.text}': how the cores lie, one of {', '.join(CABLE_CORES)}",
        )
    return None


def attribute_words(kind: str) -> tuple[str, ...]:
    """The attribute words a conductor of ``kind`` takes (an unknown word's error lists these
    only)."""
    row = KINDS[kind]
    geometric = bool(row.needs) and row.impedance in ("round", "strip")
    words = [*ROLES, *(MATERIALS if geometric else ()), "resistance", "channel", "via"]
    if geometric:
        words += (
            ["width", "thickness", "copper"] if row.impedance == "strip" else ["diameter", "AWG"]
        )
        words += ["insulation", "twisted"] if row.impedance == "round" else []
    if row.hookup:
        words += ["separate", "in-cable"]
    if row.contact is not None or row.impedance == "strip":
        words.append("contact")
    if row.shield_like:
        words.append("terminated")
    if row.switched:
        words += ["open", "closed", "contact"]
    if row.joins_devices:
        words += ["balanced", "unbalanced", "gain", "cmrr", "imbalance", "common-mode"]
    words += sorted(row.attributes)
    return tuple(dict.fromkeys(words))


def _a(word: str) -> str:
    return ("an " if word[0] in "aeiou" else "a ") + word


_HINTS = {
    "load": "building wiring is a 'cable NAME: A to B, 15 m, 2.5 mm2, load 10 A'",
    "cores": "building wiring is a 'cable NAME: A to B, 15 m, 2.5 mm2, cores L-N-PE'",
    "line-cores": "twin and earth: 'cable NAME: A to B, 15 m, 1.5 mm2, line-cores 2.5 mm2'",
    "shield-to": "e.g. 'interconnect NAME: A to B, 3 m, 0.1 mm2, shield-to chassis'",
    "in": "an umbilical's core: 'core NAME: A to B, in UMBILICAL, 1.2 m, 0.5 mm2'",
    "capacitance": "a ground-lift network: 'lift NAME: A to B, 10 ohm, 47 nF'",
    "diodes": "a ground-lift network's fault-current diodes: 'lift NAME: A to B, 10 ohm, 47 nF, "
    "diodes'",
}


#: what to say when a kind's required geometry is missing: field -> (what it needs, an example)
_GEOMETRY_HINTS = {
    "length": ("a length (or a stated resistance)", "e.g. ', 120 mm'"),
    "area": (
        "a cross-section (mm2 or AWG) or a stated resistance",
        "e.g. ', 0.5 mm2' or ', AWG 20'",
    ),
    "width": ("a width (or an area, or a stated resistance)", "e.g. ', width 2 mm'"),
    "resistance": ("its resistor", "e.g. ', 10 ohm, 47 nF'"),
}


def _check_geometry(stmt: Statement, kind: str, kw: dict) -> None:
    """The geometry the kinds table says a kind needs (a stated resistance satisfies any of it).  A
    length left out is taken along the ends' positions and route when the plan is assembled, for a
    conductor inside one piece of equipment (not a link between devices, a building cable or an
    umbilical's core, which run as they like)."""
    row = KINDS[kind]
    for options in row.needs:
        if not any(f in kw for f in options) and "resistance" not in kw:
            if options[0] == "length" and not (
                row.joins_devices or row.carries_load or "in" in row.attributes
            ):
                kw["length_computed"] = True
                continue
            what, example = _GEOMETRY_HINTS[options[0]]
            label = f" {stmt.label}" if stmt.label and options[0] == "length" else ""
            raise PlanError(f"{kind}{label} needs {what}", stmt.loc, example)
