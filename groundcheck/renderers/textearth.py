"""The terminal report's protective-earth sections: the line-to-part fault table, the device earth
paths of an installation, the bonding test and the voltage between the outlets' earths."""

from __future__ import annotations

import math

from rich.console import Console
from rich.table import Table

from ..core.units import format_si
from ..rules.results import Result
from .textwords import TABLE_BONDING, TABLE_OUTLETS, driver_words, earth_volts, escape, number

__all__ = [
    "protective_tables",
    "bonding_table",
    "outlet_table",
    "class_ii_devices",
    "CLASS_II_WORDS",
]

#: what the reports say of a class II device, which has no earth path to list
CLASS_II_WORDS = (
    "class II, its cord has no protective core: no earth path to check, none listed or drawn"
)


def class_ii_devices(plan) -> list[str]:
    """The names of an installation's class II devices, in the plan's order."""
    return [d.name for d in plan.devices if d.equipment_class == "II"]


def _loop_origin(result: Result) -> str:
    """Where the external loop's figure came from: stated, the TT electrode plus the supply's part,
    or default."""
    sup, m = result.safety.supply, result.plan.mains
    if sup.ze_stated:
        return " stated"
    if sup.system == "TT" and m is not None and m.electrode is not None:
        return (
            f": the stated electrode {sup.electrode:.4g} Ω and the supply's own "
            f"{sup.ze - sup.electrode:.3g} Ω"
        )
    return " by default"


def _first_fault(sup) -> str:
    """An IT supply's first fault in words, for the table's title ("" elsewhere)."""
    if sup.system != "IT":
        return ""
    if sup.first_fault_v is None:
        return "; IT: second fault shown, first fault not worked (GC231)"
    return (
        f"; IT: second fault shown, first fault R_A × I_d {sup.first_fault_v:.3g} V (limit 50 V)"
    )


def protective_tables(result: Result, console: Console) -> None:
    if result.safety is not None and result.safety.parts:
        sup = result.safety.supply
        limit = "none set below 50 V" if sup.max_time is None else f"{sup.max_time:g} s"
        t = Table(
            title=f"Protective earth (line-to-part fault; {sup.system}, external loop "
            f"{sup.ze:.4g} Ω{_loop_origin(result)}; cables at {sup.cable_temperature:g} °C; "
            f"disconnection limit {limit}{_first_fault(sup)})",
            title_justify="left",
        )
        for col in (
            "part",
            "path mΩ",
            "fault A",
            "touch V to earth",
            "cleared by",
            "in",
            "I²t A²s (bound)",
        ):
            t.add_column(col, justify="right" if col not in ("part", "cleared by") else "left")
        for p in result.safety.parts:
            device = (
                "nothing assured"
                if p.device is None
                else ("stated in plan" if p.device == "stated" else p.device)
            )
            i2t = number(p.i2t, "", 3) + (" (stated in plan)" if "i2t" in p.stated else "")
            t.add_row(
                escape(p.part),
                f"{p.path_resistance * 1e3:.3g}",
                number(p.fault_current, "", 4),
                number(p.touch_voltage, "", 3),
                device,
                number(p.clear_time, " s", 2),
                i2t,
            )
        console.print(t)
        console.print()
    if result.device_earths:
        _device_earth_table(result.device_earths, console, _ahead_of_fuse(result))
    for d in class_ii_devices(result.plan):
        console.print(f"  {escape(d)}: {CLASS_II_WORDS}")
    if class_ii_devices(result.plan):
        console.print()


def bonding_table(result: Result, console: Console) -> None:
    """The product bonding test: the conductors closest to their temperature limit, per test, and
    the fastenings whose contacts dissipate most."""
    b = result.bonding
    rows = [] if b is None else [c for c in b.conductors if c.passes is not None]
    if not rows:
        return
    _bonding_rows(b, rows, console)
    joints = sorted(
        (c for c in b.conductors if c.passes is None and c.power is not None),
        key=lambda c: -c.power,
    )
    if joints:
        shown = "; ".join(
            f"{escape(c.conductor)} ({c.test}) {number(c.drop, ' V', 3)}, "
            f"{number(c.power, ' W', 3)} at {number(c.current, ' A', 3)}"
            for c in joints[:TABLE_JOINTS]
        )
        more = f" and {len(joints) - TABLE_JOINTS} more" if len(joints) > TABLE_JOINTS else ""
        console.print(
            f"  fastenings (contact voltage and power, not judged): {shown}{more} (all are in "
            "--format json)"
        )
    console.print()


#: fastenings named under the bonding table, the most dissipating first
TABLE_JOINTS = 3


def _bonding_rows(b, rows: list, console: Console) -> None:
    """The bonding table's rows: the conductors closest to their temperature limit."""
    tests = {t.name: t for t in b.tests}
    said = "; ".join(f"{t.name} {t.current:.3g} A for {t.duration:g} s" for t in b.tests)
    title = f"Bonding test ({said}; from {b.ambient:g} °C)"
    rows.sort(key=lambda c: -c.reached / c.limit)
    t = Table(title=title, title_justify="left")
    for col in (
        "conductor",
        "test",
        "A",
        "mm²",
        "adiabatic °C",
        "steady °C",
        "at most °C",
        "limit °C",
    ):
        t.add_column(col, justify="left" if col in ("conductor", "test") else "right")
    for c in rows[:TABLE_BONDING]:
        at_most = "melts" if math.isinf(c.reached) else f"{c.reached:.0f}"
        over = " OVER" if not c.passes else ""
        t.add_row(
            escape(c.conductor),
            tests[c.test].name,
            number(c.current, "", 3),
            f"{c.area * 1e6:.3g}",
            _deg(c.adiabatic),
            _deg(c.steady),
            at_most + over,
            f"{c.limit:g}",
        )
    console.print(t)
    if len(rows) > TABLE_BONDING:
        console.print(
            f"  {len(rows) - TABLE_BONDING} more rows not listed here (all are in --format json)"
        )


def _deg(x) -> str:
    return "–" if x is None else ("melts" if math.isinf(x) else f"{x:.0f}")


def _ahead_of_fuse(result: Result) -> bool:
    """Whether the placed devices' fault figures are for a fault ahead of their own fuse: the
    installation states its breaker, which alone clears a fault at a device's inlet."""
    supply = result.plan.supply
    return supply is not None and supply.breaker is not None


def _device_earth_table(earths, console: Console, ahead: bool = False) -> None:
    """Each device's earth-pin path: all of them, or the broken and the highest first when there
    are many."""
    title = "Device earth paths to the main earthing terminal"
    shown = list(earths)
    if len(shown) > TABLE_OUTLETS:
        shown = sorted(shown, key=lambda d: -math.inf if d.resistance is None else -d.resistance)[
            :TABLE_OUTLETS
        ]
        title += f" (broken and highest first, {TABLE_OUTLETS} of {len(earths)})"
    t = Table(title=title, title_justify="left", min_width=len(title))  # the title on one line
    faults = any(d.fault is not None for d in shown)
    cols = ("device", "earth pin", "resistance")
    if faults:  # devices with plans of their own, checked on this supply
        cols += ("fault (worst part)", "touch", "cleared")
    for col in cols:
        t.add_column(col)
    for d in shown:
        row = [
            escape(d.device),
            escape(d.inlet),
            (
                f"through isolator {', '.join(d.through)}"
                if d.through and d.resistance is None
                else "BROKEN"
                if d.resistance is None
                else format_si(d.resistance, "Ω")
            ),
        ]
        if faults:
            row += _fault_cells(d.fault)
        t.add_row(*row)
    console.print(t)
    if ahead and faults:
        console.print(
            "  A device's fault is taken at its inlet, ahead of its own fuse, reaching its worst "
            "part: the supply's breaker or RCD alone clears it (a fault behind the fuse draws "
            "less and the fuse clears it; the device's own plan checks that one)."
        )
    if len(earths) > len(shown):
        console.print(
            f"  {len(earths) - len(shown)} more devices not listed here (all are in --format json)"
        )
    console.print()


def _fault_cells(p) -> list[str]:
    """A placed device's worst line-to-part fault: current at the part, touch voltage, and what
    clears it how fast (or never)."""
    if p is None:
        return ["–", "–", "–"]
    cleared = (
        "never (nothing opens)"
        if p.clear_time is None
        else f"in up to {p.clear_time:.3g} s by the {p.device}"
    )
    return [
        f"{p.fault_current:.3g} A at {escape(p.part)}",
        f"{p.touch_voltage:.3g} V" if p.touch_voltage is not None else "–",
        cleared,
    ]


def outlet_table(result: Result, console: Console) -> None:
    """Each outlet pair an interconnect spans: the voltage between their earths, unplugged and as
    planned."""
    o = result.outlets
    if o is None or not (o.pairs or o.emfs):
        return
    if o.pairs:
        t = Table(
            title="Voltage between the outlets' earths that each interconnect joins",
            title_justify="left",
        )
        for col in ("interconnect", "between", "unplugged", "as planned", "drivers (unplugged)"):
            t.add_column(col)
        shown = o.pairs
        if (
            len(shown) > TABLE_OUTLETS
        ):  # the largest as planned, in that order; every pair is in the JSON
            shown = sorted(shown, key=lambda p: -p.planned_total)[:TABLE_OUTLETS]
            t.title += f" (the {TABLE_OUTLETS} largest as planned)"
        for p in shown:
            t.add_row(
                escape(p.interconnect),
                escape(f"{p.a} – {p.b}"),
                earth_volts(p.open_total),
                earth_volts(p.planned_total),
                escape(driver_words(p)),
            )
        console.print(t)
        if len(o.pairs) > len(shown):
            console.print(
                f"  {len(o.pairs) - len(shown)} more outlet pairs not listed here (all "
                f"{len(o.pairs)} are in --format json)"
            )
    for c, f, e, m in o.emfs:
        console.print(
            f"  {escape(c)}: its load induces {format_si(e, 'V')} at {f:g} Hz along its "
            f"protective core (M' {m * 1e9:.4g} nH/m)"
        )
    for note in o.notes:
        console.print(f"  note: {escape(note)}")
    console.print()
