"""The rectifier statement: a capacitor-input or choke-input rectifier of either polarity, its
diodes or valves, its reservoir, an optional filter section and its load.

Each phrase after the ends opens with a word that names what it states; :data:`_PHRASES` maps
that word to the function that reads the rest of the phrase into the record's fields.
"""

from __future__ import annotations

from dataclasses import dataclass, field

from ..core.errors import PlanError
from ..model.records import Rectifier
from .phrases import Reader, Statement, check_quantity
from .reading import Refs, first_phrase_ends, need_label, unknown

__all__ = ["rectifier", "VALVE_DROP", "VALVE_CURRENT"]

#: a valve rectifier's stated drop (V) and the current it is stated at (A): the range of real
#: rectifier valves, with a wide margin (data sheets give drops of tens of volts at tens to
#: hundreds of milliamperes; from memory)
VALVE_DROP = (0.5, 1000.0)
VALVE_CURRENT = (1e-4, 10.0)

#: phrases of one quantity: word -> (field, quantity kind)
_ONE_QUANTITY = {
    "secondary": ("secondary", "voltage"),
    "winding": ("winding", "resistance"),
    "reservoir": ("capacitance", "capacitance"),
}


@dataclass
class _Reading:
    """What one rectifier statement has stated so far: the record's fields, the points' places
    (for the plan's checks) and the place of each phrase (for this statement's own errors)."""

    stmt: Statement
    kw: dict = field(default_factory=dict)
    refs: Refs = field(default_factory=dict)
    places: dict = field(default_factory=dict)


def rectifier(stmt: Statement):
    """'rectifier NAME: A to B, full-wave, secondary 250 V, winding 120 ohm, reservoir 47 uF,
    load 25 mA' and its optional phrases (see docs/language.md)."""
    name = need_label(stmt)
    reading = _Reading(stmt)
    a, b = first_phrase_ends(stmt, reading.refs)
    for ph in stmt.phrases[1:]:
        r = Reader(ph, stmt)
        first = r.peek()
        read = _PHRASES.get(first.value) if first.kind == "word" else None
        if read is None:
            raise unknown(stmt, first, tuple(_PHRASES))
        if first.value in reading.places:  # the second would replace the first without a word
            raise PlanError(
                f"'{first.value}' is given twice in one rectifier",
                first.loc,
                "keep one (a rectifier has one filter section: fold further RC cells into the "
                "stage's supply rejection)"
                if first.value == "filter"
                else "keep one",
            )
        reading.places[first.value] = first.loc
        read(r, reading)
        r.finish()
    kw = reading.kw
    if "load_current" not in kw and "load_resistance" not in kw:
        raise PlanError(
            "rectifier needs its load", stmt.loc, "e.g. ', load 60 mA' or ', load 4.7 kohm'"
        )
    _check_choke_input(reading)
    _check_regulator(reading)
    _check_can_deliver(kw, stmt)
    return Rectifier(name=name, a=a, b=b, location=stmt.loc, **kw), reading.refs


def _topology(r: Reader, reading: _Reading) -> None:
    reading.kw["topology"] = r.word()


def _polarity(r: Reader, reading: _Reading) -> None:
    """'negative': the rectifier makes a rail below its reservoir's ground end (the diodes turned
    round), so its charging current flows the other way round the ground system; 'positive' is
    the default."""
    reading.kw["polarity"] = r.word()


def _diode(r: Reader, reading: _Reading) -> None:
    """'diode 0.8 V' (each diode's constant drop) or 'diode shockley' (the exponential law)."""
    r.word()
    it = r.peek()
    if it is not None and it.kind == "word":
        reading.kw["diode_law"] = r.word(
            "a diode law (a drop such as '1 V', or shockley)", ("shockley",)
        )
    else:
        reading.kw["diode_drop"] = r.quantity("voltage", "diode", allow_zero=True)


def _one_quantity(r: Reader, reading: _Reading) -> None:
    word = r.word()
    name, kind = _ONE_QUANTITY[word]
    reading.kw[name] = r.quantity(kind, word)


def _valve(r: Reader, reading: _Reading) -> None:
    """'valve 50 V at 250 mA': a valve rectifier, Child's law through the stated drop."""
    kw = reading.kw
    r.word()
    kw["diode_law"] = "valve"
    kw["valve_drop"] = r.quantity("voltage", "valve rectifier drop")
    r.expect("at")
    kw["valve_current"] = r.quantity("current", "the current of that drop")
    _valve_figures(kw["valve_drop"], kw["valve_current"], reading.stmt)


def _leakage(r: Reader, reading: _Reading) -> None:
    r.word()
    reading.kw["leakage"] = r.quantity("inductance", "leakage inductance", allow_zero=True)


def _choke(r: Reader, reading: _Reading) -> None:
    """'choke 10 H 150 ohm': a choke between the rectifiers and the reservoir (choke input), its
    winding's resistance optional."""
    r.word()
    reading.kw["choke_inductance"] = r.quantity("inductance", "input choke")
    if not r.done:
        reading.kw["choke_resistance"] = r.quantity(
            "resistance", "input choke's resistance", allow_zero=True
        )


def _load(r: Reader, reading: _Reading) -> None:
    r.word()
    it = r.next("a load current or resistance")
    if it.kind == "qty" and it.qkind == "resistance":
        reading.kw["load_resistance"] = check_quantity(it, "resistance", "load")
    else:
        reading.kw["load_current"] = check_quantity(it, "current", "load", allow_zero=True)


def _channel(r: Reader, reading: _Reading) -> None:
    r.word()
    reading.kw["channel"] = r.word("a channel name")


def _filter(r: Reader, reading: _Reading) -> None:
    """'filter 1 kohm 47 uF to FILT_NEG' (CRC) or 'filter 5 H 80 ohm 47 uF to FILT_NEG' (CLC): a
    filter section after the reservoir, its capacitor's negative landing on a point of the ground
    system."""
    kw = reading.kw
    r.word()
    while (
        r.peek() is not None
        and r.peek().kind == "qty"
        and r.peek().qkind in ("resistance", "inductance")
    ):
        it = r.next("a resistance or inductance")
        name = "filter_resistance" if it.qkind == "resistance" else "filter_inductance"
        kw[name] = check_quantity(it, it.qkind, "filter " + it.qkind, allow_zero=True)
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
    reading.refs["filter_point"] = it.loc
    if kw.get("filter_resistance", 0.0) == 0.0 and kw.get("filter_inductance", 0.0) == 0.0:
        raise PlanError(
            "a filter section needs its series resistance or choke",
            it.loc,
            "e.g. 'filter 1 kohm 47 uF to filt_neg' or 'filter 5 H 80 ohm 47 uF to filt_neg'",
        )


def _regulator(r: Reader, reading: _Reading) -> None:
    """'regulator series 300 V to REG_RET' or 'regulator shunt 150 V 10 kohm to REG_RET': a
    regulator after the reservoir, its load's current returning through the named point."""
    kw = reading.kw
    r.word()
    kw["regulator"] = r.word("the regulator's kind (series or shunt)", ("series", "shunt"))
    kw["regulator_voltage"] = r.quantity("voltage", "regulated output")
    if kw["regulator"] == "shunt":
        kw["regulator_resistance"] = r.quantity("resistance", "shunt regulator's feed resistor")
    r.expect("to")
    kw["regulator_point"], reading.refs["regulator_point"] = r.name(
        "the point the regulator's load current returns through"
    )


def _rejection(r: Reader, reading: _Reading) -> None:
    """'rejection 60 dB': the regulator's ripple rejection."""
    r.word()
    reading.kw["regulator_rejection"] = r.quantity("level", "ripple rejection", allow_zero=True)


def _dropout(r: Reader, reading: _Reading) -> None:
    """'dropout 3 V': a series regulator's least drop across its pass element."""
    r.word()
    reading.kw["regulator_dropout"] = r.quantity("voltage", "regulator's dropout", allow_zero=True)


def _quiescent(r: Reader, reading: _Reading) -> None:
    """'quiescent 5 mA': a series regulator's own current, or a shunt element's least current."""
    r.word()
    reading.kw["regulator_quiescent"] = r.quantity(
        "current", "regulator's quiescent current", allow_zero=True
    )


#: the first word of each phrase after the ends, and its reader
_PHRASES = {
    **dict.fromkeys(("full-wave", "bridge", "half-wave"), _topology),
    **dict.fromkeys(("positive", "negative"), _polarity),
    "load": _load,
    "channel": _channel,
    "leakage": _leakage,
    "choke": _choke,
    "filter": _filter,
    "regulator": _regulator,
    "rejection": _rejection,
    "dropout": _dropout,
    "quiescent": _quiescent,
    "valve": _valve,
    **dict.fromkeys(_ONE_QUANTITY, _one_quantity),
    "diode": _diode,
}


def _check_choke_input(reading: _Reading) -> None:
    """A choke input is modelled after full-wave or bridge rectifiers (a half-wave one's choke
    would drive its current back through the winding), the paths sharing its current through the
    winding's resistance while it changes over: the transformer's leakage, which shares it through
    its inductance, is refused beside it (the model would take it as part of the choke)."""
    kw = reading.kw
    if kw.get("choke_inductance", 0.0) > 0 and kw.get("topology") == "half-wave":
        raise PlanError(
            "a choke input is modelled after full-wave or bridge rectifiers, not half-wave",
            reading.places["choke"],
            "write the rectifier full-wave or bridge, or put the choke in a filter section "
            "after the reservoir ('filter 10 H 150 ohm 47 uF to FILT_NEG')",
        )
    if kw.get("choke_inductance", 0.0) > 0 and kw.get("leakage", 0.0) > 0:
        raise PlanError(
            "a choke input and the transformer's leakage cannot be modelled together",
            reading.places.get("leakage", reading.stmt.loc),
            "with a choke input the choke's current changes over between the windings through "
            "their leakage, which this model leaves out: remove 'leakage' (the choke's "
            "inductance is usually tens of times larger)",
        )


def _check_regulator(reading: _Reading) -> None:
    """A regulator follows the reservoir directly (not a filter section), a rejection belongs to a
    regulator, and a shunt regulator's feed resistor must pass its load at the secondary's peak
    (less the rectifiers' drop at most)."""
    kw, places = reading.kw, reading.places
    for key, word in (
        ("regulator_rejection", "rejection"),
        ("regulator_dropout", "dropout"),
        ("regulator_quiescent", "quiescent"),
    ):
        if key in kw and "regulator" not in kw:
            raise PlanError(
                f"a {'ripple rejection' if word == 'rejection' else word} belongs to a regulator",
                places[word],
                "add the regulator, e.g. ', regulator series 300 V to reg_ret', or remove it",
            )
    if "regulator" not in kw:
        return
    if "regulator_dropout" in kw and kw["regulator"] == "shunt":
        raise PlanError(
            "a shunt regulator has no dropout: its feed resistor sets what it needs",
            places["dropout"],
            "remove 'dropout'; state the shunt element's least current with 'quiescent 5 mA'",
        )
    if "filter_capacitance" in kw or "choke_inductance" in kw:
        raise PlanError(
            "a regulator is modelled straight after the reservoir, not after a filter section "
            "or with an input choke",
            places["regulator"],
            "remove the filter (or the choke), or leave the regulator out",
        )
    load = kw.get("load_current")
    if load is None:
        load = kw["regulator_voltage"] / kw["load_resistance"]
    load += kw.get("regulator_quiescent", 0.0)
    needed = (
        kw["regulator_voltage"]
        + kw.get("regulator_dropout", 0.0)
        + load * kw.get("regulator_resistance", 0.0)
    )
    peak = 2**0.5 * kw.get("secondary", 250.0)
    if needed >= peak:
        raise PlanError(
            f"the secondary's {peak:.4g} V peak cannot feed a {kw['regulator_voltage']:g} V "
            f"regulator: it needs {needed:.4g} V at its load",
            places["regulator"],
            "check the regulated voltage, the feed resistor, the load and their units",
        )


def _check_can_deliver(kw: dict, stmt: Statement) -> None:
    """A load current the rectifier cannot deliver is refused before any simulation (which would
    search for a steady state that does not exist): its rectifiers pass at least the load current
    at some instant, so the secondary's peak must exceed their drop at that current (Child's law
    for valves, I = K·V^1.5 through the stated point; the stated drop for diodes) plus the load
    current times the filter resistor and the input choke's resistance."""
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
    needed = drop + load * (kw.get("filter_resistance", 0.0) + kw.get("choke_resistance", 0.0))
    peak = 2**0.5 * kw.get("secondary", 250.0)
    if needed >= peak:
        raise PlanError(
            f"rectifier {stmt.label}: the secondary's {peak:.4g} V peak cannot deliver {load:g} "
            f"A: the rectifiers' drop and the series resistors take {needed:.4g} V at that "
            "current",
            stmt.loc,
            "check the secondary voltage, the load, the filter resistor and the choke, and "
            "their units",
        )


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
