"""The values a plan may state: each kind of quantity within its physical range, and protective
ratings within the range a real installation can have, refused where they are written."""

from __future__ import annotations

import re

from ..core.errors import Location, PlanError

__all__ = [
    "check_quantity",
    "check_range",
    "check_plausible",
    "RANGES",
    "PLAUSIBLE",
    "MIN_TEMPERATURE",
    "fuse_marking",
]


def _a(word: str) -> str:
    """The word with its indefinite article ("an area", "a length")."""
    return f"{'an' if word[:1] in 'aeiou' else 'a'} {word}"


def check_quantity(
    it, kind: str, what: str, positive: bool = True, allow_zero: bool = False
) -> float:
    """The SI value of ``it`` (an :class:`~.phrases.Item`) if it is a quantity of ``kind``, else a
    :class:`PlanError` at the item."""
    if it.kind == "number":
        raise PlanError(
            f"{what} needs a unit", it.loc, f"give {_a(kind)}, e.g. with {_example_unit(kind)}"
        )
    if it.kind != "qty":
        raise PlanError(f"expected {what} ({kind}), found {it.text!r}", it.loc, "")
    if it.qkind != kind:
        raise PlanError(
            f"{what} must be {_a(kind)}, not {_a(it.qkind)}",
            it.loc,
            f"use {_a(kind)} unit such as {_example_unit(kind)}",
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
    "plug-fuse": (
        1.0,
        16.0,
        "current",
        "A",
        "fused plugs take cartridge fuses of 1 to 13 A; none is made above 16 A (from memory)",
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
        "residual-current devices trip from 4-6 mA (North American ground-fault interrupters) to "
        "30 mA, 100 mA, 300 mA, 500 "
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
    "first-fault": (
        1e-3,
        100.0,
        "current",
        "A",
        "an IT supply's first-fault current is its capacitive and leakage current to earth: some "
        "mA for a small isolated system, up to tens of A for a large public network (from memory)",
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


def check_plausible(v: float, word: str, what: str, it, allow_zero: bool) -> None:
    """A :class:`PlanError` at the item ``it`` unless the rating ``v`` (of the kind ``word`` of
    :data:`PLAUSIBLE`) is within its plausible range; zero passes where ``allow_zero``."""
    lo, hi, kind, unit, source = PLAUSIBLE[word]
    if not (allow_zero and v == 0) and not lo * (1 - 1e-9) <= v <= hi * (1 + 1e-9):
        raise PlanError(
            f"{what} {it.text} is outside the plausible range {_si(lo, unit)} to {_si(hi, unit)}",
            it.loc,
            f"{source}; see 'Plausible ratings' in docs/language.md",
        )


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


#: a fuse's marking as printed on its end cap: T (time-lag) or F (quick-acting) and its rating
_MARKING = re.compile(r"^([TtFf])(\d+(?:\.\d+)?)(m?)A$")


def fuse_marking(r) -> None:
    """A fuse written as it is marked ('T250mA'): a located error that says how to write it.

    Parameters:
        r: the phrase's reader, at the fuse's rating.
    Returns:
        nothing: raises the PlanError when the next word is a marking.
    References:
        IEC 60127-1 (a miniature fuse's marking: T time-lag, F quick-acting, then its rating).
    """
    it = r.peek()
    m = _MARKING.match(str(it.value)) if it is not None and it.kind == "word" else None
    if m is None:
        return
    kind = "slow" if m.group(1) in "Tt" else "fast"
    unit = "mA" if m.group(3) else "A"
    raise PlanError(
        f"'{it.value}' is a fuse's marking, not its rating",
        it.loc,
        f"write 'fuse {m.group(2)} {unit} {kind}' ({m.group(1).upper()}: "
        f"{'time-lag' if kind == 'slow' else 'quick-acting'})",
    )
