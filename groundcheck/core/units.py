"""Physical quantities: units of the plan language converted to SI in one place.

Every quantity in a plan carries a unit.  :func:`parse_quantity` turns the
number and the unit word into an SI value and the *kind* of quantity (length,
area, resistance ...), so that a length given in ohms is caught.

References:
    ASTM B258, *Standard Specification for Standard Nominal Diameters and
    Cross-Sectional Areas of AWG Sizes of Solid Round Wires*: the AWG
    diameter formula used by :func:`awg_diameter`.
"""

from __future__ import annotations

import math
from functools import lru_cache

__all__ = [
    "KINDS",
    "UnitError",
    "parse_quantity",
    "wire_size",
    "awg_diameter",
    "awg_area",
    "awg_number",
    "unit_kind",
    "db_of_ratio",
    "ratio_of_db",
    "dbv",
]

#: kinds of quantity, with the SI unit each is stored in
KINDS = {
    "length": "m",
    "area": "m²",
    "resistance": "Ω",
    "resistance per length": "Ω/m",
    "current": "A",
    "voltage": "V",
    "frequency": "Hz",
    "flux density": "T",
    "capacitance": "F",
    "inductance": "H",
    "level": "dB",
    "temperature": "°C",
    "time": "s",
    "energy integral": "A²s",
    "apparent power": "VA",
}

_PREFIX = {
    "": 1.0,
    "k": 1e3,
    "M": 1e6,
    "m": 1e-3,
    "u": 1e-6,
    "µ": 1e-6,
    "μ": 1e-6,
    "n": 1e-9,
    "p": 1e-12,
}


class UnitError(ValueError):
    """A unit word that is unknown, or of the wrong kind.  ``hint`` says what would do."""

    def __init__(self, message: str, hint: str = ""):
        super().__init__(message)
        self.hint = hint


def db_of_ratio(ratio: float) -> float:
    """Decibels of an amplitude (voltage or current) ratio, 20·log10(ratio); −inf for zero.

    Parameters:
        ratio: a ratio of two voltages or two currents, ≥ 0.
    Returns:
        the level difference in dB.
    References:
        IEC 60027-3, *Letter symbols: logarithmic quantities* (the field-quantity decibel).
    """
    return 20 * math.log10(ratio) if ratio > 0 else -math.inf


def ratio_of_db(db: float) -> float:
    """Amplitude ratio of a level difference in dB, 10^(dB/20): the inverse of
    :func:`db_of_ratio`."""
    return 10 ** (db / 20)


def dbv(volts: float) -> float:
    """Level in dBV (0 dBV = 1 V rms); −inf for zero."""
    return db_of_ratio(volts)


def _build_table() -> dict[str, tuple[float, str]]:
    t: dict[str, tuple[float, str]] = {}

    def add(symbols, kind, prefixes=("",), scale=1.0):
        for sym in symbols:
            for p in prefixes:
                t[p + sym] = (_PREFIX[p] * scale, kind)

    add(["m"], "length", ("", "m", "k", "u", "µ", "μ"))
    t["cm"] = (1e-2, "length")
    t["in"] = (0.0254, "length")
    t["mil"] = (25.4e-6, "length")
    t["ft"] = (0.3048, "length")
    for sym in ("mm2", "mm²", "sqmm"):
        t[sym] = (1e-6, "area")
    t["cm2"] = t["cm²"] = (1e-4, "area")
    t["m2"] = t["m²"] = (1.0, "area")
    add(["ohm", "ohms", "Ω", "Ω"], "resistance", ("", "m", "k", "M", "u", "µ", "μ"))
    add(["ohm/m", "Ω/m", "Ω/m"], "resistance per length", ("", "m", "u", "µ", "μ"))
    add(["A"], "current", ("", "m", "u", "µ", "μ", "k"))
    add(["V"], "voltage", ("", "m", "u", "µ", "μ", "k"))
    add(["Hz"], "frequency", ("", "k"))
    add(["T"], "flux density", ("", "m", "u", "µ", "μ", "n"))
    add(["F"], "capacitance", ("", "m", "u", "µ", "μ", "n", "p"))
    add(["H"], "inductance", ("", "m", "u", "µ", "μ", "n"))
    t["dB"] = (1.0, "level")
    for sym in ("C", "°C", "degC"):
        t[sym] = (1.0, "temperature")
    add(["s"], "time", ("", "m", "u", "µ", "μ"))
    for sym in ("A2s", "A²s"):
        t[sym] = (1.0, "energy integral")
    add(["VA"], "apparent power", ("", "k", "m"))
    return t


_TABLE = _build_table()
_LOWER = {}
for _k, _v in _TABLE.items():
    _LOWER.setdefault(_k.lower(), []).append(_k)


@lru_cache(maxsize=1024)
def unit_kind(unit: str) -> str | None:
    """The kind of quantity a unit word measures, or None when it is not a unit."""
    if unit in _TABLE:
        return _TABLE[unit][1]
    if unit.upper() == "AWG":
        return "area"
    if unit == "K":
        return "temperature"
    return None


def awg_diameter(n: float) -> float:
    """Diameter of solid round wire of AWG size ``n``, in m.

    d = 0.127 mm × 92^((36 − n)/39); sizes 0, 00, 000, 0000 are n = 0, −1, −2, −3.

    References: ASTM B258 (the defining formula of the American Wire Gauge).
    """
    return 0.127e-3 * 92.0 ** ((36.0 - n) / 39.0)


def awg_number(text: str) -> float:
    """The gauge number of an AWG size as written: 0, 00, 000 and 0000 (the trade's 1/0 to 4/0)
    are 0, −1, −2 and −3; otherwise a whole number from −3 to 46.

    Parameters:
        text: the size as the plan writes it ("18", "00", "-2").
    Returns:
        the gauge number n of :func:`awg_diameter`.
    Raises:
        UnitError: no such gauge (a fraction, a size beyond the table, more than four zeros).
    References:
        ASTM B258 (the sizes 0000 to 46 and how they are written).
    """
    t = text.strip()
    if t and set(t) == {"0"}:
        if len(t) > 4:
            raise UnitError(
                f"AWG size {t} is no gauge",
                "the thickest gauge is 0000 (4/0): write 0, 00, 000 or 0000",
            )
        return float(1 - len(t))
    value = float(t)
    if not math.isfinite(value) or value != int(value) or not -3 <= value <= 46:
        raise UnitError(f"AWG size {t} is not a whole gauge", "use a size from 0000 (-3) to 46")
    return value


def awg_area(n: float) -> float:
    """Cross-section of solid round wire of AWG size ``n``, in m² (π d²/4, ASTM B258)."""
    d = awg_diameter(n)
    return math.pi * d * d / 4.0


def wire_size(area: float) -> tuple[str, str]:
    """A wire's cross-section as a plan writes it and as a report shows it: its AWG size when it is
    one (a new wire as thick as a 20 AWG one is written '20 AWG', not '0.517619 mm2'), else mm² to
    three significant figures.

    Parameters:
        area: the cross-section, m².
    Returns:
        (plan text, shown text), e.g. ("20 AWG", "20 AWG") or ("0.5 mm2", "0.5 mm²").
    References:
        ASTM B258 (:func:`awg_area`).
    """
    for n in range(-3, 41):
        if abs(awg_area(n) - area) <= 1e-6 * area:
            # the sizes above 0 AWG as the trade writes them: 00, 000, 0000 (-1, -2, -3)
            word = "0" * (1 - n) if n <= 0 else str(n)
            return f"{word} AWG", f"{word} AWG"
    mm2 = f"{area * 1e6:.3g}"
    return f"{mm2} mm2", f"{mm2} mm²"


@lru_cache(maxsize=8192)
def parse_quantity(number: str, unit: str) -> tuple[float, str]:
    """Convert ``number`` with ``unit`` to ``(SI value, kind)``.

    ``"18", "AWG"`` gives the wire area of AWG 18 in m².  Temperatures are
    kept in °C (``K`` is converted).  Raises :class:`UnitError` for a word
    that is not a unit, with a hint naming the closest unit.
    """
    if unit.upper() == "AWG":
        return awg_area(awg_number(number)), "area"
    value = float(number)
    if unit == "K":
        return value - 273.15, "temperature"
    if unit in _TABLE:
        scale, kind = _TABLE[unit]
        return value * scale, kind
    close = _LOWER.get(unit.lower())
    hint = (
        f"did you mean {close[0]!r}?"
        if close
        else "units: mm, cm, m, in; mm2, AWG; ohm, mohm; A, mA; V; Hz; uT; uF, nF; dB; C"
    )
    raise UnitError(f"unknown unit {unit!r}", hint)


def format_si(value: float, unit: str, digits: int = 3) -> str:
    """A human-readable figure with an SI prefix, e.g. ``format_si(0.0123, 'Ω')`` → ``'12.3
    mΩ'``."""
    if not math.isfinite(value):
        return "not computed"
    if value == 0:
        return f"0 {unit}"  # a negative zero reads as zero
    # the prefix of the value as it is printed (rounded to ``digits``): 999.96 µA is 1 mA
    shown = float(f"{value:.{digits}g}")
    exp = int(math.floor(math.log10(abs(shown)) / 3.0) * 3)
    exp = max(-12, min(12, exp))
    prefix = {-12: "p", -9: "n", -6: "µ", -3: "m", 0: "", 3: "k", 6: "M", 9: "G", 12: "T"}[exp]
    return f"{value / 10**exp:.{digits}g} {prefix}{unit}"
