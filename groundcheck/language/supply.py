"""The supply statements: the mains supply and its protection, an installation's supply, rectifiers
and stated currents (heaters: :mod:`.heaters`)."""

from __future__ import annotations

from ..core.errors import PlanError
from ..model.kinds import CURRENT_ROLES
from ..model.records import (
    CABLE_OPERATING_TEMPERATURE,
    EARTHED_LOCALLY,
    SYSTEMS,
    Current,
    Mains,
    Supply,
)
from .phrases import PLAUSIBLE, Reader, Statement, check_quantity
from .quantities import fuse_marking
from .reading import FUSE_KINDS, Refs, first_phrase_ends, need_label, no_label, unknown
from .rectifiers import rectifier

#: mains frequencies accepted, Hz: 50 and 60 Hz supplies, 16.7 Hz railway and 400 Hz aircraft
#: supplies fit
MAINS_FREQUENCY = (1.0, 1000.0)

__all__ = [
    "MAINS_FREQUENCY",
    "mains",
    "supply",
    "rectifier",
    "current",
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
    "first-fault": ("first_fault", "first-fault current", "current"),
    "fuse-resistance": ("fuse_resistance", "fuse cold resistance", "resistance"),
    "plug-fuse": ("plug_fuse", "plug fuse rating", "current"),
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


def _devices(kw: dict) -> None:
    """The protective devices stated: a fuse (the equipment's) or a breaker (the supply
    circuit's) alone is the one device that clears a fault; both: the fuse is the equipment's
    (its breaking capacity, the bonding test's rating) and the breaker clears a fault at the
    inlet, ahead of the fuse."""
    kw.pop("_said", None)
    fuse = (kw.pop("_fuse", None), kw.pop("_fuse_kind", None))
    breaker = (kw.pop("_breaker", None), kw.pop("_breaker_kind", None))
    first = fuse if fuse[0] is not None else breaker
    if first[0] is not None:
        kw["fuse"], kw["fuse_kind"] = first
    if fuse[0] is not None and breaker[0] is not None:
        kw["breaker"], kw["breaker_kind"] = breaker


def mains(stmt: Statement):
    kw = _supply_statement(stmt, lambda r, ph, kw: _mains_attribute(stmt, r, ph, kw))
    _devices(kw)
    _check_earth_electrode(stmt, kw)
    _check_cable_temperature(stmt, kw)
    return Mains(location=stmt.loc, **kw), {}


def _check_earth_electrode(stmt: Statement, kw: dict) -> None:
    """An earth electrode belongs to a TT or IT supply, and lies inside the external loop that a
    TT plan states; a first-fault current belongs to an IT supply."""
    system = kw.get("system", "TN-S")
    if kw.get("first_fault") is not None and system != "IT":
        raise PlanError(
            f"a first-fault current is stated for a {system} supply",
            _phrase_loc(stmt, "first-fault"),
            "only an IT supply (no point of it earthed, or earthed through a high impedance) "
            "stays on at a first fault: add 'system IT', or remove 'first-fault'",
        )
    electrode, loop = kw.get("electrode"), kw.get("loop_impedance")
    if electrode is None:
        return
    loc = _phrase_loc(stmt, "electrode")
    if system not in EARTHED_LOCALLY:
        raise PlanError(
            f"an earth electrode is stated for a {system} supply",
            loc,
            "the installation's own electrode earths the metal of a TT or an IT supply only: add "
            "'system TT' (or 'system IT'), or remove 'electrode'",
        )
    if system == "TT" and loop is not None and electrode > loop * (1 + 1e-12):
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
    _once(stmt, ph, kw, word)
    if word == "fuse":
        fuse_marking(r)
        kw["_fuse"] = r.rating(word, "fuse rating")
        kind = r.word("fuse type (slow or fast)", tuple(FUSE_KINDS)) if not r.done else "slow"
        kw["_fuse_kind"] = FUSE_KINDS[kind]
    elif word == "breaker":
        kw["_breaker"] = r.rating(word, "breaker rating")
        kind = r.word("breaker curve (B, C or D)", ("B", "C", "D")) if not r.done else "B"
        kw["_breaker_kind"] = f"breaker-{kind}"
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
        kw["system"] = r.word("an earthing system (TN-S, TN-C-S, TT or IT)", SYSTEMS)
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
    """An installation's supply: 'supply 230 V 50 Hz, system TT, electrode 120 ohm, rcd 30 mA' (the
    electrode and the RCD that protects its outlets, as a device's own ``mains`` states them)."""

    def attribute(r: Reader, ph, kw: dict) -> None:
        word = r.word("an attribute")
        _once(stmt, ph, kw, word)
        if word == "system":
            kw["system"] = r.word("an earthing system (TN-S, TN-C-S, TT or IT)", SYSTEMS)
        elif word in ("electrode", "rcd", "loop-impedance", "first-fault"):
            field, what, kind = MAINS_ATTRIBUTES[word]
            if word in PLAUSIBLE:
                kw[field] = r.rating(word, what)
            else:
                kw[field] = r.quantity(kind, what, allow_zero=kind == "resistance")
        elif word == "breaker":
            kw["breaker"] = r.rating(word, "breaker rating")
            kind = r.word("breaker curve (B, C or D)", ("B", "C", "D")) if not r.done else "B"
            kw["breaker_kind"] = f"breaker-{kind}"
        else:
            raise unknown(stmt, ph[0], SUPPLY_WORDS)

    kw = _supply_statement(stmt, attribute)
    kw.pop("_said", None)
    _check_earth_electrode(stmt, kw)
    return Supply(location=stmt.loc, **kw), {}


#: the attributes of an installation's supply
SUPPLY_WORDS = (
    "230 V 50 Hz",
    "system",
    "electrode",
    "first-fault",
    "rcd",
    "loop-impedance",
    "breaker",
)


def _once(stmt: Statement, ph, kw: dict, word: str) -> None:
    """An attribute given twice is an error: the second would replace the first silently."""
    said = kw.setdefault("_said", set())
    if word in said:
        raise PlanError(
            f"{stmt.keyword}: '{word}' is given twice",
            ph[0].loc,
            "the second would replace the first without a word: give it once",
        )
    said.add(word)


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
