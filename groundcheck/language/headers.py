"""The statements of a plan's header and an installation's: the title, the ambient temperature,
the listening chain, library folders and placed devices (one record each; the supply statements
are in :mod:`.supply`, the transformer in :mod:`.transformer`)."""

from __future__ import annotations

from pathlib import PurePath

from ..core.errors import PlanError
from ..model.records import Device, Listening
from .phrases import Reader, Statement
from .reading import Refs, need_label, no_label, unknown

__all__ = ["plan_header", "ambient", "listening", "device", "library"]


def plan_header(stmt: Statement):
    no_label(stmt)
    if len(stmt.phrases) != 1 or len(stmt.phrases[0]) != 1 or stmt.phrases[0][0].kind != "string":
        raise PlanError("plan takes a quoted title", stmt.loc, 'write: plan "My amplifier"')
    return stmt.phrases[0][0].value, {}


def ambient(stmt: Statement):
    no_label(stmt)
    if len(stmt.phrases) != 1:
        raise PlanError("ambient takes one temperature", stmt.loc, "e.g. 'ambient 35 C'")
    r = Reader(stmt.phrases[0], stmt)
    t = r.quantity("temperature", "ambient temperature")
    r.finish()
    return t, {}


def listening(stmt: Statement):
    no_label(stmt)
    kw: dict = {}
    spec = {
        "output": ("rated_output", "voltage"),
        "amp-gain": ("amp_gain", "level"),
        "speaker": ("sensitivity", "level"),
        "impedance": ("impedance", "resistance"),
        "distance": ("distance", "length"),
    }
    for ph in stmt.phrases:
        r = Reader(ph, stmt)
        first = r.peek()
        word = r.word("an attribute")
        if word == "speakers":
            n = r.number("the number of speakers")
            if n != int(n) or not 1 <= n <= 16:
                raise PlanError(
                    "speakers takes a whole number from 1 to 16", first.loc, "e.g. 'speakers 2'"
                )
            kw["speakers"] = int(n)
        elif word == "room-gain":
            kw["room_gain"] = r.quantity("level", "room gain", positive=False)
        elif word == "background":
            kw["background"] = r.quantity(
                "level", "background noise per third-octave band", positive=False
            )
        elif word == "headphones":
            kw["phones"] = r.quantity("level", "headphone sensitivity", positive=False)
            r.expect("per")
            kw["phones_per"] = r.word(
                "the sensitivity's reference power or voltage (mW or V)", ("mW", "V")
            )
        elif word in spec:
            field, kind = spec[word]
            kw[field] = r.quantity(kind, word, positive=kind != "level")
        else:
            raise unknown(
                stmt, first, (*spec, "speakers", "room-gain", "headphones", "background")
            )
        r.finish()
    if "phones" in kw and "sensitivity" in kw:
        raise PlanError(
            "listening gives both a speaker and headphones",
            stmt.loc,
            "describe one listening chain per plan: 'speaker 88 dB' or 'headphones 100 dB per mW'",
        )
    return Listening(location=stmt.loc, **kw), {}


#: the attribute words of a device
_DEVICE_WORDS = (
    "at",
    "mirror",
    "plugged",
    "cord",
    "signal-ground",
    "leakage",
    "y-capacitor",
    "class",
    "draws",
    "sockets",
)


def device(stmt: Statement):
    name = need_label(stmt)
    kw: dict = {"source": _device_source(stmt)}
    refs: Refs = {}
    for ph in stmt.phrases[1:]:
        r = Reader(ph, stmt)
        it = r.peek()
        word = r.word("an attribute")
        if word not in _DEVICE_WORDS:
            raise unknown(stmt, it, _DEVICE_WORDS)
        _device_attribute(r, word, kw, refs)
        r.finish()
    _check_device(stmt, kw)
    return Device(name=name, location=stmt.loc, **kw), refs


def _device_source(stmt: Statement) -> str:
    """A device's first phrase: its quoted plan file, or the word simple."""
    if not stmt.phrases:
        raise PlanError(
            "device needs its plan file or 'simple'",
            stmt.loc,
            'e.g. device amp: "amp.gplan", plugged wall1',
        )
    first = stmt.phrases[0]
    if (
        len(first) != 1
        or first[0].kind not in ("string", "word")
        or (first[0].kind == "word" and first[0].value != "simple")
    ):
        raise PlanError(
            "device: first give a quoted plan file or the word simple",
            first[0].loc,
            'e.g. device amp: "amp.gplan" or device mixer: simple',
        )
    return first[0].value


def _device_attribute(r: Reader, word: str, kw: dict, refs: Refs) -> None:
    """One attribute of a device, after its word (one of :data:`_DEVICE_WORDS`)."""
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
    elif word == "leakage":
        kw["leakage"] = r.rating(
            "leakage", "protective-conductor (leakage) current", allow_zero=True
        )
    elif word == "y-capacitor":
        kw["y_capacitance"] = r.quantity(
            "capacitance", "line-to-chassis capacitance", allow_zero=True
        )
    elif word == "class":
        kw["equipment_class"] = r.word("a protection class (I or II)", ("I", "II"))
    elif word == "draws":
        kw["draws"] = r.quantity("apparent power", "apparent power drawn")
    elif word == "sockets":
        kw["sockets"] = r.word("balanced or unbalanced", ("balanced", "unbalanced"))


def _check_device(stmt: Statement, kw: dict) -> None:
    """The attributes that belong to a simple device only, and leakage stated once."""
    if "sockets" in kw and kw["source"] != "simple":
        raise PlanError(
            "'sockets' is an attribute of a simple device",
            stmt.loc,
            "a device with a plan of its own shows its sockets in that plan (an unbalanced "
            "socket's return is a 'sleeve' point)",
        )
    if kw.get("equipment_class") == "II" and kw["source"] != "simple":
        raise PlanError(
            "class II is an attribute of a simple device",
            stmt.loc,
            "a device with a plan of its own states 'class II' in that plan's mains statement",
        )
    if "leakage" in kw and "y_capacitance" in kw:
        raise PlanError(
            "device gives both its leakage and its Y capacitance",
            stmt.loc,
            "keep one: the leakage current is the supply voltage times 2·π·f·C",
        )


def library(stmt: Statement):
    no_label(stmt)
    if len(stmt.phrases) != 1 or len(stmt.phrases[0]) != 1 or stmt.phrases[0][0].kind != "string":
        raise PlanError("library takes one quoted folder", stmt.loc, 'e.g. library "devices"')
    item = stmt.phrases[0][0]
    folder = PurePath(item.value)
    if folder.is_absolute() or ".." in folder.parts:
        raise PlanError(
            f"library {item.value!r} lies outside the plan's folder",
            item.loc,
            "a plan's library is a folder inside its own folder; name other folders with "
            "GROUNDCHECK_LIBRARY",
        )
    return item.value, {}
