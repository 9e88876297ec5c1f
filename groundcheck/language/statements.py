"""Statement builders: one function per plan keyword, turning a :class:`Statement` into a model record.

Names inside a record are still as written (resolved later by the loader) and
positions are in the frame of the block being placed.  Each builder returns
``(record, refs)`` where ``refs`` maps a field holding a name to the location
of that name, so an undefined name is reported where it was written.
"""

from __future__ import annotations

import difflib

from ..core.errors import Location, PlanError
from ..model.kinds import KINDS, default_role
from ..model.records import (SYSTEMS, Conductor, Current, Device, FieldSource, Heater, Listening, Mains, Metal, Point,
                    Rectifier, Stage, make)
from .phrases import Reader, Statement, check_quantity
from ..core.units import awg_diameter

__all__ = ["BUILDERS", "KEYWORDS", "MATERIALS", "build"]

MATERIALS = ("copper", "aluminium", "aluminum", "brass", "steel", "stainless", "tinned-copper", "silver")
ROLE_WORDS = ("protective", "return", "signal", "shield", "bond", "heater")
POINT_KINDS = ("junction", "stud", "star", "busbar", "tag", "sleeve", "jack", "pot", "pad", "cap",
               "centre-tap", "center-tap", "terminal", "inlet", "lug", "outlet", "earthing-terminal")
FIELD_KINDS = ("transformer", "toroid", "choke", "mains-wiring", "motor", "other")
FUSE_KINDS = {"slow": "slow", "time-lag": "slow", "T": "slow", "fast": "fast", "quick": "fast", "F": "fast"}
#: mains attributes that take one quantity: word -> (field, what, quantity kind)
MAINS_ATTRIBUTES = {
    "i2t": ("fuse_i2t", "fuse I²t", "energy integral"),
    "clears": ("clear_time", "clearing time", "time"),
    "line-conductor": ("line_area", "line-conductor cross-section", "area"),
    "loop-impedance": ("loop_impedance", "external earth-fault loop impedance", "resistance"),
    "rcd": ("rcd", "RCD rated residual current", "current"),
    "cpc": ("cpc_area", "circuit protective conductor area", "area"),
    "electrode": ("electrode", "earth-electrode resistance", "resistance"),
    "fuse-resistance": ("fuse_resistance", "fuse cold resistance", "resistance"),
}
MAINS_WORDS = ("fuse", "breaker", "cord", "circuit", "system", "class", "breaking", "inlet", *MAINS_ATTRIBUTES)

Refs = dict[str, Location]


def _unknown(stmt: Statement, item, expected: tuple[str, ...]) -> PlanError:
    close = difflib.get_close_matches(str(item.text), expected, n=1)
    hint = f"did you mean {close[0]!r}?" if close else "expected one of: " + ", ".join(expected)
    return PlanError(f"{stmt.keyword}: unknown attribute {item.text!r}", item.loc, hint)


def _need_label(stmt: Statement) -> str:
    if not stmt.label:
        raise PlanError(f"{stmt.keyword} needs a name", stmt.loc, f"write '{stmt.keyword} NAME: ...'")
    return stmt.label


def _no_label(stmt: Statement) -> None:
    if stmt.label:
        raise PlanError(f"{stmt.keyword} takes no name", stmt.label_loc or stmt.loc,
                        f"write '{stmt.keyword} ...' without 'NAME:'")


def _ends(stmt: Statement, r: Reader, refs: Refs) -> tuple[str, str]:
    a, aloc = r.name("the first end")
    r.expect("to")
    b, bloc = r.name("the second end")
    r.finish()
    refs["a"], refs["b"] = aloc, bloc
    return a, b


def _first_phrase_ends(stmt: Statement, refs: Refs) -> tuple[str, str]:
    if not stmt.phrases:
        raise PlanError(f"{stmt.keyword} needs its two ends", stmt.loc, f"write '{stmt.keyword} NAME: A to B, ...'")
    return _ends(stmt, Reader(stmt.phrases[0], stmt), refs)


def plan_header(stmt: Statement):
    _no_label(stmt)
    if len(stmt.phrases) != 1 or len(stmt.phrases[0]) != 1 or stmt.phrases[0][0].kind != "string":
        raise PlanError("plan takes a quoted title", stmt.loc, 'write: plan "My amplifier"')
    return stmt.phrases[0][0].value, {}


def mains(stmt: Statement):
    _no_label(stmt)
    kw: dict = {}
    for ph in stmt.phrases:
        r = Reader(ph, stmt)
        first = r.peek()
        if first.kind == "qty":
            while not r.done:
                it = r.next("a quantity")
                if it.kind == "qty" and it.qkind == "voltage":
                    kw["voltage"] = check_quantity(it, "voltage", "mains voltage")
                elif it.kind == "qty" and it.qkind == "frequency":
                    kw["frequency"] = check_quantity(it, "frequency", "mains frequency")
                else:
                    raise PlanError(f"mains: unexpected {it.text!r}", it.loc, "write e.g. 'mains 230 V 50 Hz'")
            continue
        word = r.word("an attribute")
        if word in ("fuse", "breaker"):
            kw["fuse"] = r.quantity("current", f"{word} rating")
            if word == "fuse":
                kind = r.word("fuse type (slow or fast)", tuple(FUSE_KINDS)) if not r.done else "slow"
                kw["fuse_kind"] = FUSE_KINDS[kind]
            else:
                kind = r.word("breaker curve (B, C or D)", ("B", "C", "D")) if not r.done else "B"
                kw["fuse_kind"] = f"breaker-{kind}"
        elif word in MAINS_ATTRIBUTES:
            field, what, kind = MAINS_ATTRIBUTES[word]
            kw[field] = r.quantity(kind, what, allow_zero=kind == "resistance")
        elif word == "cord":
            kw["cord_length"] = r.quantity("length", "cord length", allow_zero=True)
            if not r.done:
                kw["cord_area"] = r.quantity("area", "cord conductor area")
        elif word == "circuit":
            kw["circuit_length"] = r.quantity("length", "final-circuit length", allow_zero=True)
            if not r.done:
                kw["circuit_area"] = r.quantity("area", "final-circuit line-conductor area")
        elif word == "system":
            kw["system"] = r.word("an earthing system (TN-S, TN-C-S or TT)", SYSTEMS)
        elif word == "class":
            kw["equipment_class"] = r.word("a protection class (I or II)", ("I", "II"))
        elif word == "breaking":
            it = r.peek()
            if it is not None and it.kind == "qty":
                kw["breaking_current"] = r.quantity("current", "breaking capacity")
            else:
                kw["breaking"] = r.word("a breaking capacity (low, enhanced, high, or a current)", ("low", "enhanced", "high"))
        elif word == "inlet":
            r.expect("at")
            kw["inlet"] = r.coord()
        else:
            raise _unknown(stmt, ph[0], MAINS_WORDS)
        r.finish()
    for need, example in (("voltage", "230 V"), ("frequency", "50 Hz")):
        if need not in kw:
            raise PlanError(f"mains needs its {need}", stmt.loc, f"e.g. 'mains 230 V 50 Hz'; missing {example}")
    return Mains(location=stmt.loc, **kw), {}


def ambient(stmt: Statement):
    _no_label(stmt)
    if len(stmt.phrases) != 1:
        raise PlanError("ambient takes one temperature", stmt.loc, "e.g. 'ambient 35 C'")
    r = Reader(stmt.phrases[0], stmt)
    t = r.quantity("temperature", "ambient temperature")
    r.finish()
    return t, {}


def listening(stmt: Statement):
    _no_label(stmt)
    kw: dict = {}
    spec = {"output": ("rated_output", "voltage"), "amp-gain": ("amp_gain", "level"),
            "speaker": ("sensitivity", "level"), "impedance": ("impedance", "resistance"),
            "distance": ("distance", "length")}
    for ph in stmt.phrases:
        r = Reader(ph, stmt)
        first = r.peek()
        word = r.word("an attribute")
        if word not in spec:
            raise _unknown(stmt, first, tuple(spec))
        field, kind = spec[word]
        kw[field] = r.quantity(kind, word, positive=kind != "level")
        r.finish()
    return Listening(location=stmt.loc, **kw), {}


def metal(stmt: Statement):
    name = _need_label(stmt)
    kw: dict = {}
    for ph in stmt.phrases:
        r = Reader(ph, stmt)
        first = r.peek()
        if first.kind == "word" and first.value in MATERIALS:
            kw["material"] = _material(r.word())
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
        else:
            raise _unknown(stmt, first, MATERIALS + ("W x D mm", "at", "touchable", "internal"))
        r.finish()
    return Metal(name=name, location=stmt.loc, **kw), {}


def it_number(it) -> float:
    """The number written in front of a quantity's unit."""
    return float(it.text.split()[0])


def _material(word: str) -> str:
    return {"aluminum": "aluminium", "tinned-copper": "copper"}.get(word, word)


def point(stmt: Statement):
    name = _need_label(stmt)
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
        else:
            raise _unknown(stmt, first, POINT_KINDS + ("at", "on"))
        r.finish()
    return make(Point, name=name, location=stmt.loc, **kw), refs


#: attributes of a conductor that start with a word of their own
CONDUCTOR_NAMED = ("via", "width", "thickness", "copper", "contact", "resistance", "insulation", "channel",
                   "terminated", "separate", "in-cable", "open", "closed", "diameter", "balanced", "unbalanced", "gain", "cmrr")
#: the field a bare quantity of each kind sets on a conductor
_CONDUCTOR_QTY = {"length": "length", "area": "area", "resistance": "resistance", "capacitance": "capacitance"}


def conductor(stmt: Statement):
    kind = stmt.keyword
    refs: Refs = {}
    a, b = _first_phrase_ends(stmt, refs)
    kw: dict = {"role": default_role(kind)}
    if kind == "bolt":
        kw["contact"] = 0.5e-3
    if kind == "trace":
        kw["thickness"] = 35e-6
    named = CONDUCTOR_NAMED
    for ph in stmt.phrases[1:]:
        r = Reader(ph, stmt)
        first = ph[0]                    # phrases are never empty
        if first.kind == "qty":
            it = r.next("")
            field = _CONDUCTOR_QTY.get(it.qkind)
            if field is None or (field == "capacitance" and kind != "lift"):
                raise PlanError(f"{kind}: a {it.qkind} is not expected here", it.loc,
                                "give lengths, areas (mm2 or AWG) and resistances; a capacitance only on a lift")
            kw[field] = check_quantity(it, it.qkind, field, allow_zero=field == "resistance")
            if field == "area" and it.text.upper().endswith("AWG"):
                kw["diameter"] = awg_diameter(it_number(it))
        elif first.kind == "word" and first.value.upper() == "AWG":
            r.next("")
            n = r.number("an AWG size")
            if n != int(n) or not -3 <= n <= 46:
                raise PlanError(f"AWG size {n:g} is not a whole gauge", first.loc, "use a size from 0000 (-3) to 46")
            d = awg_diameter(n)
            kw["area"], kw["diameter"] = 3.141592653589793 * d * d / 4, d
        elif first.kind == "word" and first.value in ROLE_WORDS:
            kw["role"] = r.word()
        elif first.kind == "word" and first.value in MATERIALS and len(ph) == 1:
            kw["material"] = _material(r.word())
        elif first.kind == "word" and first.value in named:
            word = r.word()
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
        else:
            raise _unknown(stmt, first, ROLE_WORDS + MATERIALS + named + ("AWG",))
        r.finish()
    _check_geometry(stmt, kind, kw)
    return make(Conductor, name=stmt.label or "", kind=kind, a=a, b=b, location=stmt.loc, **kw), refs


#: what to say when a kind's required geometry is missing: field -> (what it needs, an example)
_GEOMETRY_HINTS = {
    "length": ("a length (or a stated resistance)", "e.g. ', 120 mm'"),
    "area": ("a cross-section (mm2 or AWG) or a stated resistance", "e.g. ', 0.5 mm2' or ', AWG 20'"),
    "width": ("a width (or an area, or a stated resistance)", "e.g. ', width 2 mm'"),
    "resistance": ("its resistor", "e.g. ', 10 ohm, 47 nF'"),
}


def _check_geometry(stmt: Statement, kind: str, kw: dict) -> None:
    """The geometry the kinds table says a kind needs (a stated resistance satisfies any of it)."""
    for options in KINDS[kind].needs:
        if not any(f in kw for f in options) and "resistance" not in kw:
            what, example = _GEOMETRY_HINTS[options[0]]
            label = f" {stmt.label}" if stmt.label and options[0] == "length" else ""
            raise PlanError(f"{kind}{label} needs {what}", stmt.loc, example)


def rectifier(stmt: Statement):
    name = _need_label(stmt)
    refs: Refs = {}
    a, b = _first_phrase_ends(stmt, refs)
    kw: dict = {}
    spec = {"secondary": ("secondary", "voltage"), "winding": ("winding", "resistance"),
            "diode": ("diode_drop", "voltage"), "reservoir": ("capacitance", "capacitance")}
    for ph in stmt.phrases[1:]:
        r = Reader(ph, stmt)
        first = r.peek()
        if first.kind == "word" and first.value in ("full-wave", "bridge", "half-wave"):
            kw["topology"] = r.word()
        elif first.kind == "word" and first.value in spec:
            word = r.word()
            field, kind = spec[word]
            kw[field] = r.quantity(kind, word, allow_zero=word == "diode")
        elif first.kind == "word" and first.value == "load":
            r.word()
            it = r.next("a load current or resistance")
            if it.kind == "qty" and it.qkind == "resistance":
                kw["load_resistance"] = check_quantity(it, "resistance", "load")
            else:
                kw["load_current"] = check_quantity(it, "current", "load", allow_zero=True)
        elif first.kind == "word" and first.value == "channel":
            r.word()
            kw["channel"] = r.word("a channel name")
        else:
            raise _unknown(stmt, first, ("full-wave", "bridge", "half-wave", "load", "channel") + tuple(spec))
        r.finish()
    if "load_current" not in kw and "load_resistance" not in kw:
        raise PlanError("rectifier needs its load", stmt.loc, "e.g. ', load 60 mA' or ', load 4.7 kohm'")
    return Rectifier(name=name, a=a, b=b, location=stmt.loc, **kw), refs


def current(stmt: Statement):
    name = _need_label(stmt)
    refs: Refs = {}
    a, b = _first_phrase_ends(stmt, refs)
    parts = []
    kw: dict = {}
    for ph in stmt.phrases[1:]:
        r = Reader(ph, stmt)
        first = r.peek()
        if first.kind == "qty":
            amp = r.quantity("current", "current", allow_zero=True)
            freq = r.quantity("frequency", "frequency", allow_zero=True) if not r.done else 0.0
            parts.append((amp, freq))
        elif first.kind == "word" and first.value in ("return", "load", "heater", "leakage", "signal"):
            kw["role"] = r.word()
        elif first.kind == "word" and first.value == "channel":
            r.word()
            kw["channel"] = r.word("a channel name")
        else:
            raise _unknown(stmt, first, ("return", "load", "heater", "leakage", "signal", "channel", "120 mA 100 Hz"))
        r.finish()
    if not parts:
        raise PlanError("current needs its size", stmt.loc, "e.g. ', 20 mA 100 Hz' (no frequency means DC)")
    return Current(name=name, a=a, b=b, parts=tuple(parts), location=stmt.loc, **kw), refs


def heater(stmt: Statement):
    name = _need_label(stmt)
    refs: Refs = {}
    kw: dict = {}
    phrases = stmt.phrases
    if phrases and any(it.kind == "word" and it.value == "to" for it in phrases[0]):
        kw["a"], kw["b"] = _ends(stmt, Reader(phrases[0], stmt), refs)
        phrases = phrases[1:]
    for ph in phrases:
        r = Reader(ph, stmt)
        first = r.peek()
        if first.kind == "qty" and first.qkind == "voltage":
            r.quantity("voltage", "heater voltage")
        elif first.kind == "qty":
            kw["current"] = r.quantity("current", "heater current")
        elif first.kind == "word" and first.value in ("ac", "dc"):
            kw["ac"] = r.word() == "ac"
        elif first.kind == "word" and first.value == "reference":
            r.word()
            kw["reference"], refs["reference"] = r.name("the reference point")
        elif first.kind == "word" and first.value == "floating":
            r.word()
            kw["reference"] = None
        else:
            raise _unknown(stmt, first, ("ac", "dc", "reference", "floating", "A to B", "2.4 A"))
        r.finish()
    if "current" not in kw:
        raise PlanError("heater needs its current", stmt.loc, "e.g. ', 2.4 A'")
    return Heater(name=name, location=stmt.loc, **kw), refs


def stage(stmt: Statement):
    name = _need_label(stmt)
    refs: Refs = {}
    a, b = _first_phrase_ends(stmt, refs)
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
        else:
            raise _unknown(stmt, first, ("gain", "channel"))
        r.finish()
    return Stage(name=name, a=a, b=b, location=stmt.loc, **kw), refs


def field_source(stmt: Statement):
    name = _need_label(stmt)
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
        elif first.kind == "word" and first.value == "harmonic":
            r.word()
            n = r.number("a harmonic number")
            if n != int(n) or n < 2:
                raise PlanError("harmonic number must be a whole number of 2 or more", first.loc, "")
            level = r.quantity("level", "level relative to the fundamental", positive=False)
            harmonics.append((int(n), 10 ** (level / 20)))
        else:
            raise _unknown(stmt, first, FIELD_KINDS + ("at", "30 uT at 5 cm", "harmonic"))
        r.finish()
    for need, ex in (("pos", "at 60,180"), ("b_ref", "30 uT at 5 cm")):
        if need not in kw:
            raise PlanError(f"field needs {ex.split()[0] if need == 'pos' else 'its strength'}", stmt.loc, f"e.g. ', {ex}'")
    return FieldSource(name=name, harmonics=tuple(harmonics), location=stmt.loc, **kw), {}


def device(stmt: Statement):
    name = _need_label(stmt)
    if not stmt.phrases:
        raise PlanError("device needs its plan file or 'simple'", stmt.loc, 'e.g. device amp: "amp.gplan", plugged wall1')
    first = stmt.phrases[0]
    if len(first) != 1 or first[0].kind not in ("string", "word") or (first[0].kind == "word" and first[0].value != "simple"):
        raise PlanError("device: first give a quoted plan file or the word simple", first[0].loc,
                        'e.g. device amp: "amp.gplan" or device mixer: simple')
    kw: dict = {"source": first[0].value}
    refs: Refs = {}
    for ph in stmt.phrases[1:]:
        r = Reader(ph, stmt)
        it = r.peek()
        word = r.word("an attribute")
        if word == "at":
            kw["at"] = r.coord()
        elif word == "mirror":
            kw["mirror"] = True
        elif word == "plugged":
            r.keyword("into")
            kw["plugged"], refs["plugged"] = r.name("an outlet")
        elif word == "cord":
            kw["cord_length"] = r.quantity("length", "cord length")
            if not r.done:
                kw["cord_area"] = r.quantity("area", "cord conductor area")
        elif word == "signal-ground":
            kw["signal_ground"] = r.word("chassis, lift or floating", ("chassis", "lift", "floating"))
        else:
            raise _unknown(stmt, it, ("at", "mirror", "plugged", "cord", "signal-ground"))
        r.finish()
    return Device(name=name, location=stmt.loc, **kw), refs


def library(stmt: Statement):
    _no_label(stmt)
    if len(stmt.phrases) != 1 or len(stmt.phrases[0]) != 1 or stmt.phrases[0][0].kind != "string":
        raise PlanError("library takes one quoted folder", stmt.loc, 'e.g. library "devices"')
    return stmt.phrases[0][0].value, {}


BUILDERS = {
    "plan": plan_header, "mains": mains, "ambient": ambient, "listening": listening,
    "metal": metal, "point": point,
    "wire": conductor, "trace": conductor, "busbar": conductor, "bolt": conductor, "strap": conductor,
    "shield": conductor, "interconnect": conductor, "lift": conductor, "switch": conductor,
    "rectifier": rectifier, "current": current, "heater": heater, "stage": stage, "field": field_source,
    "device": device, "library": library,
}

#: every keyword of the language, including those the loader handles itself
KEYWORDS = tuple(BUILDERS) + ("include", "place", "block")


def build(stmt: Statement):
    """Build the record of one statement: ``(record, refs)``; raises :class:`PlanError`."""
    return BUILDERS[stmt.keyword](stmt)
