"""What the terminal report's sections share: rich markup escaping, numbers with a dash for none,
a finding's figures and an outlet pair's drivers in words, the severities' styles and the table
sizes."""

from __future__ import annotations

import math

from rich.markup import escape as _escape

from ..core.errors import shown
from ..core.plain import readable
from ..core.units import format_si

__all__ = [
    "escape",
    "number",
    "figure_words",
    "driver_words",
    "STYLE",
    "LABEL",
    "TABLE_ROWS",
    "TABLE_LOOPS",
    "TABLE_OUTLETS",
    "TABLE_BONDING",
]

STYLE = {"danger": "bold white on red", "fault": "bold red", "warning": "yellow", "note": "cyan"}
LABEL = {"danger": "DANGER", "fault": "FAULT", "warning": "WARNING", "note": "NOTE"}


def escape(text) -> str:
    """Rich markup escaped, control characters shown (:func:`shown`)."""
    return _escape(shown(text))


#: rows of a channel's hum table (harmonics above the threshold of hearing are always shown) and
#: loops listed
TABLE_ROWS = 12
TABLE_LOOPS = 50

#: outlet pairs and device earth paths listed in the text report (the largest first when there are
#: more)
TABLE_OUTLETS = 50

#: conductors listed in the bonding-test table (the closest to their limit first; all in the JSON)
TABLE_BONDING = 8


def number(x, unit="", digits=3) -> str:
    """``x`` to ``digits`` significant digits with its unit; a dash for none or not finite."""
    if x is None or (isinstance(x, float) and not math.isfinite(x)):
        return "–"
    return f"{readable(x, f'.{digits}g')}{unit}"


#: a voltage between outlets' earths below this (V) is the solve's rounding, shown as such
VOLTS_FLOOR = 1e-12


def earth_volts(v: float) -> str:
    """A voltage between outlets' earths in words: its SI figure, or 'below 1 pV' for rounding
    (two outlets of one circuit, say).

    Parameters:
        v: the voltage, V.
    Returns:
        the words.
    References:
        none (formatting).
    """
    return format_si(v, "V") if v >= VOLTS_FLOOR else "below 1 pV"


def driver_words(pair) -> str:
    """An outlet pair's drivers in words: 'run_rack.induced 12.7 mV; desk.leakage 28.2 µV' (those
    below 1 pV left out)."""
    said = [f"{n} {format_si(v, 'V')}" for n, _, v in pair.drivers if v >= VOLTS_FLOOR]
    return "; ".join(said) or "none"


#: unit suffixes of figure keys and how they are shown
_UNITS = (
    ("_mohm", "mΩ"),
    ("_ohm", "Ω"),
    ("_mm2", "mm²"),
    ("_a2s", "A²s"),
    ("_dbv", "dBV"),
    ("_db", "dB"),
    ("_pct", "%"),
    ("_hz", "Hz"),
    ("_mm", "mm"),
    ("_va", "VA"),
    ("_a", "A"),
    ("_v", "V"),
    ("_s", "s"),
    ("_t", "T"),
    ("_c", "°C"),
)


def figure_words(figures: dict) -> str:
    """'transfer resistance 2.628 mΩ, stage gain 30 dB': a finding's figures in words, with their
    units."""
    out = []
    for key, value in figures.items():
        name, unit = key, ""
        for suffix, symbol in _UNITS:
            if key.endswith(suffix):
                name, unit = key[: -len(suffix)], symbol
                break
        if value is None or (isinstance(value, float) and not math.isfinite(value)):
            out.append(f"{name.replace('_', ' ')} not computed")
            continue
        if isinstance(value, bool):
            words = "yes" if value else "no"
        elif isinstance(value, float):
            words = readable(value, ".4g")
        else:
            words = str(value)
        out.append(f"{name.replace('_', ' ')} {words}{' ' + unit if unit else ''}")
    return ", ".join(out)


def opening_words(result, lp) -> str:
    """A listed loop's "open at" cell: the conductor to open, with what opening means when it is
    an unbalanced link between devices (its screen is the signal's return: the loop opens by a
    balanced link or both devices on one outlet, never by cutting the screen), or that it stays
    closed when only protective conductors close it.

    Parameters:
        result: the analysis.
        lp: one of its listed loops.
    Returns:
        the cell's words.
    References:
        common practice (an unbalanced link's screen carries its signal's return).
    """
    from ..model.kinds import joins_devices

    if not lp.open_at:
        return "protective: keep closed"
    c = result.plan.index.conductors.get(lp.open_at)
    if c is not None and joins_devices(c) and not getattr(c, "balanced", False):
        return f"{lp.open_at} (balanced, or both ends on one outlet; never cut its screen)"
    return lp.open_at
