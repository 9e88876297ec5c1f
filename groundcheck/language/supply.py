"""The supply statements: the mains supply and its protection, rectifiers, stated currents and
heaters."""

from __future__ import annotations

from ..core.errors import PlanError
from ..model.kinds import CURRENT_ROLES
from ..model.records import (
    CABLE_OPERATING_TEMPERATURE,
    SYSTEMS,
    Current,
    Heater,
    Mains,
    Rectifier,
    Supply,
)
from .phrases import PLAUSIBLE, Reader, Statement, check_quantity
from .reading import FUSE_KINDS, Refs, ends, first_phrase_ends, need_label, no_label, unknown

#: mains frequencies accepted, Hz: 50 and 60 Hz supplies, 16.7 Hz railway and 400 Hz aircraft
#: supplies fit
MAINS_FREQUENCY = (1.0, 1000.0)

__all__ = [
    "MAINS_FREQUENCY",
    "mains",
    "supply",
    "rectifier",
    "current",
    "heater",
    "MAINS_ATTRIBUTES",
    "MAINS_WORDS",
]

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
    "cable-temperature": (
        "cable_temperature",
        "installation cables' operating temperature",
        "temperature",
    ),
    "short-circuit": (
        "short_circuit",
        "prospective short-circuit current at the origin",
        "current",
    ),
}
MAINS_WORDS = (
    "fuse",
    "breaker",
    "cord",
    "circuit",
    "system",
    "class",
    "breaking",
    "inlet",
    *MAINS_ATTRIBUTES,
)


def _voltage_and_frequency(r: Reader, kw: dict, keyword: str = "mains") -> None:
    """The phrase of quantities that opens a mains or supply statement: '230 V 50 Hz'."""
    while not r.done:
        it = r.next("a quantity")
        if it.kind == "qty" and it.qkind == "voltage":
            kw["voltage"] = check_quantity(it, "voltage", f"{keyword} voltage")
        elif it.kind == "qty" and it.qkind == "frequency":
            kw["frequency"] = check_quantity(it, "frequency", f"{keyword} frequency")
            if not MAINS_FREQUENCY[0] <= kw["frequency"] <= MAINS_FREQUENCY[1]:
                raise PlanError(
                    f"{keyword} frequency {it.text} is outside "
                    f"{MAINS_FREQUENCY[0]:g}–{MAINS_FREQUENCY[1]:g} Hz",
                    it.loc,
                    "mains is 50 or 60 Hz (aircraft 400 Hz)",
                )
        else:
            raise PlanError(
                f"unexpected {it.text!r}",
                it.loc,
                "write the voltage and frequency, e.g. '230 V 50 Hz'",
            )


def _supply_statement(stmt: Statement, attribute) -> dict:
    """The fields of a mains or supply statement: the phrase of voltage and frequency, each other
    phrase read by ``attribute(reader, phrase, fields)``; both voltage and frequency are
    required."""
    no_label(stmt)
    kw: dict = {}
    for ph in stmt.phrases:
        r = Reader(ph, stmt)
        if r.peek().kind == "qty":
            _voltage_and_frequency(r, kw, stmt.keyword)
            continue
        attribute(r, ph, kw)
        r.finish()
    for need, example in (("voltage", "230 V"), ("frequency", "50 Hz")):
        if need not in kw:
            raise PlanError(
                f"{stmt.keyword} needs its {need}",
                stmt.loc,
                f"e.g. '{stmt.keyword} 230 V 50 Hz'; missing {example}",
            )
    return kw


def mains(stmt: Statement):
    kw = _supply_statement(stmt, lambda r, ph, kw: _mains_attribute(stmt, r, ph, kw))
    _check_earth_electrode(stmt, kw)
    _check_cable_temperature(stmt, kw)
    return Mains(location=stmt.loc, **kw), {}


def _check_earth_electrode(stmt: Statement, kw: dict) -> None:
    """An earth electrode belongs to a TT supply, and lies inside the external loop that a TT plan
    states."""
    electrode, loop = kw.get("electrode"), kw.get("loop_impedance")
    if electrode is None:
        return
    loc = _phrase_loc(stmt, "electrode")
    if kw.get("system", "TN-S") != "TT":
        raise PlanError(
            f"an earth electrode is stated for a {kw.get('system', 'TN-S')} supply",
            loc,
            "the installation's own electrode is in the fault loop of a TT supply only: add "
            "'system TT', or remove 'electrode'",
        )
    if loop is not None and electrode > loop * (1 + 1e-12):
        raise PlanError(
            f"the earth electrode ({electrode:g} Ω) is larger than the whole external loop "
            f"({loop:g} Ω) that includes it",
            loc,
            "in a TT supply the external loop runs through the installation's electrode: state a "
            "loop at least as large as the electrode, or state the electrode alone",
        )


def _check_cable_temperature(stmt: Statement, kw: dict) -> None:
    """A stated cable temperature may only make the fault loop stricter: at or above PVC's
    operating temperature, at which the loop is verified."""
    t = kw.get("cable_temperature")
    if t is not None and t < CABLE_OPERATING_TEMPERATURE:
        raise PlanError(
            f"a cable temperature of {t:g} °C is below the {CABLE_OPERATING_TEMPERATURE:g} °C at "
            "which the fault loop is verified",
            _phrase_loc(stmt, "cable-temperature"),
            "the loop is checked with the cables at their operating temperature (PVC 70 °C); "
            "state a higher one for cables that run hotter (XLPE 90 °C), never a lower one",
        )


def _phrase_loc(stmt: Statement, word: str):
    """Where the phrase that opens with ``word`` starts (the statement's own place when it has
    none)."""
    for ph in stmt.phrases:
        if ph and ph[0].kind == "word" and ph[0].value == word:
            return ph[0].loc
    return stmt.loc


def _mains_attribute(stmt: Statement, r: Reader, ph, kw: dict) -> None:
    word = r.word("an attribute")
    if word in ("fuse", "breaker"):
        kw["fuse"] = r.rating(word, f"{word} rating")
        if word == "fuse":
            kind = r.word("fuse type (slow or fast)", tuple(FUSE_KINDS)) if not r.done else "slow"
            kw["fuse_kind"] = FUSE_KINDS[kind]
        else:
            kind = r.word("breaker curve (B, C or D)", ("B", "C", "D")) if not r.done else "B"
            kw["fuse_kind"] = f"breaker-{kind}"
    elif word in MAINS_ATTRIBUTES:
        field, what, kind = MAINS_ATTRIBUTES[word]
        if word in PLAUSIBLE:
            kw[field] = r.rating(word, what)
        else:
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
            kw["breaking"] = r.word(
                "a breaking capacity (low, enhanced, high, or a current)",
                ("low", "enhanced", "high"),
            )
    elif word == "inlet":
        r.expect("at")
        kw["inlet"] = r.coord()
    else:
        raise unknown(stmt, ph[0], MAINS_WORDS)


def supply(stmt: Statement):
    """An installation's supply: 'supply 230 V 50 Hz, system TN-S'."""

    def attribute(r: Reader, ph, kw: dict) -> None:
        if r.word("an attribute") != "system":
            raise unknown(stmt, ph[0], ("230 V 50 Hz", "system"))
        kw["system"] = r.word("an earthing system (TN-S, TN-C-S or TT)", SYSTEMS)

    return Supply(location=stmt.loc, **_supply_statement(stmt, attribute)), {}


def rectifier(stmt: Statement):
    name = need_label(stmt)
    refs: Refs = {}
    a, b = first_phrase_ends(stmt, refs)
    kw: dict = {}
    spec = {
        "secondary": ("secondary", "voltage"),
        "winding": ("winding", "resistance"),
        "diode": ("diode_drop", "voltage"),
        "reservoir": ("capacitance", "capacitance"),
    }
    for ph in stmt.phrases[1:]:
        r = Reader(ph, stmt)
        first = r.peek()
        if first.kind == "word" and first.value in ("full-wave", "bridge", "half-wave"):
            kw["topology"] = r.word()
        elif (
            first.kind == "word"
            and first.value == "diode"
            and len(ph) > 1
            and ph[1].kind == "word"
        ):
            r.word()
            kw["diode_law"] = r.word(
                "a diode law (a drop such as '1 V', or shockley)", ("shockley",)
            )
        elif first.kind == "word" and first.value in spec:
            word = r.word()
            field, kind = spec[word]
            kw[field] = r.quantity(kind, word, allow_zero=word == "diode")
        elif first.kind == "word" and first.value == "filter":
            _filter(r, kw, refs)
        elif first.kind == "word" and first.value == "valve":
            r.word()
            kw["diode_law"] = "valve"
            kw["valve_drop"] = r.quantity("voltage", "valve rectifier drop")
            r.expect("at")
            kw["valve_current"] = r.quantity("current", "the current of that drop")
            _valve_figures(kw["valve_drop"], kw["valve_current"], stmt)
        elif first.kind == "word" and first.value == "leakage":
            r.word()
            kw["leakage"] = r.quantity("inductance", "leakage inductance", allow_zero=True)
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
            raise unknown(
                stmt,
                first,
                (
                    "full-wave",
                    "bridge",
                    "half-wave",
                    "load",
                    "channel",
                    "leakage",
                    "filter",
                    "valve",
                )
                + tuple(spec),
            )
        r.finish()
    if "load_current" not in kw and "load_resistance" not in kw:
        raise PlanError(
            "rectifier needs its load", stmt.loc, "e.g. ', load 60 mA' or ', load 4.7 kohm'"
        )
    _check_can_deliver(kw, stmt)
    return Rectifier(name=name, a=a, b=b, location=stmt.loc, **kw), refs


def _check_can_deliver(kw: dict, stmt: Statement) -> None:
    """A load current the rectifier cannot deliver is refused before any simulation (which would
    search for a steady state that does not exist): its rectifiers pass at least the load current
    at some instant, so the secondary's peak must exceed their drop at that current (Child's law
    for valves, I = K·V^1.5 through the stated point; the stated drop for diodes) plus the load
    current times the filter resistor."""
    load = kw.get("load_current") or 0.0
    if load <= 0:
        return
    in_series = 2 if kw.get("topology") == "bridge" else 1
    law = kw.get("diode_law", "constant")
    if law == "valve":
        drop = in_series * kw["valve_drop"] * (load / kw["valve_current"]) ** (2 / 3)
    elif law == "constant":
        drop = in_series * kw.get("diode_drop", 0.7)
    else:
        drop = 0.0
    needed = drop + load * kw.get("filter_resistance", 0.0)
    peak = 2**0.5 * kw.get("secondary", 250.0)
    if needed >= peak:
        raise PlanError(
            f"rectifier {stmt.label}: the secondary's {peak:.4g} V peak cannot deliver {load:g} "
            f"A: the rectifiers' drop and the filter resistor take {needed:.4g} V at that current",
            stmt.loc,
            "check the secondary voltage, the load and the filter resistor, and their units",
        )


def _filter(r: Reader, kw: dict, refs: Refs) -> None:
    """'filter 1 kohm 47 uF to FILT_NEG' (CRC) or 'filter 5 H 80 ohm 47 uF to FILT_NEG' (CLC): a
    filter section after the reservoir, its capacitor's negative landing on a point of the ground
    system."""
    r.word()
    while (
        r.peek() is not None
        and r.peek().kind == "qty"
        and r.peek().qkind in ("resistance", "inductance")
    ):
        it = r.next("a resistance or inductance")
        field = "filter_resistance" if it.qkind == "resistance" else "filter_inductance"
        kw[field] = check_quantity(it, it.qkind, "filter " + it.qkind, allow_zero=True)
    kw["filter_capacitance"] = r.quantity("capacitance", "filter capacitor")
    r.expect("to")
    it = r.next("the point the filter capacitor's negative lands on")
    if it.kind != "word":
        raise PlanError(
            "filter ... to POINT: name the point the filter capacitor's negative lands on",
            it.loc,
            "e.g. 'filter 1 kohm 47 uF to filt_neg'",
        )
    kw["filter_point"] = it.value
    refs["filter_point"] = it.loc
    if kw.get("filter_resistance", 0.0) == 0.0 and kw.get("filter_inductance", 0.0) == 0.0:
        raise PlanError(
            "a filter section needs its series resistance or choke",
            it.loc,
            "e.g. 'filter 1 kohm 47 uF to filt_neg' or 'filter 5 H 80 ohm 47 uF to filt_neg'",
        )


def current(stmt: Statement):
    name = need_label(stmt)
    refs: Refs = {}
    a, b = first_phrase_ends(stmt, refs)
    parts = []
    kw: dict = {}
    for ph in stmt.phrases[1:]:
        r = Reader(ph, stmt)
        first = r.peek()
        if first.kind == "qty":
            amp = r.quantity("current", "current", allow_zero=True)
            freq = r.quantity("frequency", "frequency", allow_zero=True) if not r.done else 0.0
            parts.append((amp, freq))
        elif first.kind == "word" and first.value in CURRENT_ROLES:
            kw["role"] = r.word()
        elif first.kind == "word" and first.value == "channel":
            r.word()
            kw["channel"] = r.word("a channel name")
        else:
            raise unknown(stmt, first, CURRENT_ROLES + ("channel", "120 mA 100 Hz"))
        r.finish()
    if not parts:
        raise PlanError(
            "current needs its size", stmt.loc, "e.g. ', 20 mA 100 Hz' (no frequency means DC)"
        )
    return Current(name=name, a=a, b=b, parts=tuple(parts), location=stmt.loc, **kw), refs


def heater(stmt: Statement):
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
        elif first.kind == "word" and first.value == "wiring":
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
        elif first.kind == "word" and first.value in ("spacing", "height"):
            r.word()
            kw["spacing" if first.value == "spacing" else "wiring_height"] = r.quantity(
                "length", f"heater wiring {first.value}", allow_zero=first.value == "height"
            )
        elif first.kind == "word" and first.value == "twisted":
            r.word()
            kw["twisted"] = True
        else:
            raise unknown(
                stmt,
                first,
                (
                    "ac",
                    "dc",
                    "reference",
                    "floating",
                    "wiring",
                    "spacing",
                    "height",
                    "twisted",
                    "A to B",
                    "2.4 A",
                ),
            )
        r.finish()
    if "current" not in kw:
        raise PlanError("heater needs its current", stmt.loc, "e.g. ', 2.4 A'")
    return Heater(name=name, location=stmt.loc, **kw), refs


#: a valve rectifier's stated drop (V) and the current it is stated at (A): the range of real
#: rectifier valves, with a wide margin (data sheets give drops of tens of volts at tens to
#: hundreds of milliamperes; from memory)
VALVE_DROP = (0.5, 1000.0)
VALVE_CURRENT = (1e-4, 10.0)


def _valve_figures(drop: float, current: float, stmt) -> None:
    """A located error for a valve rectifier's drop or current outside what a rectifier valve can
    be."""
    for value, (lo, hi), what, unit, scale in (
        (drop, VALVE_DROP, "drop", "V", 1.0),
        (current, VALVE_CURRENT, "current", "mA", 1e3),
    ):
        if not lo <= value <= hi:
            raise PlanError(
                f"a valve rectifier's {what} of {value * scale:g} {unit} is outside "
                f"{lo * scale:g} to {hi * scale:g} {unit}",
                stmt.loc,
                "give the drop a data sheet states and the current it is stated at, e.g. 'valve "
                "50 V at 250 mA'",
            )
