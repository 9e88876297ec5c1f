"""The terminal report (rich): summary first, then findings by severity, hum, protective earth,
loops.

Colour only when writing to a terminal; plain text when piped or with
``NO_COLOR`` set (rich honours both).
"""

from __future__ import annotations

import io
import math

from rich.console import Console
from rich.markup import escape as _escape
from rich.table import Table
from rich.text import Text

from ..core.caution import CAUTION
from ..core.errors import shown
from ..core.plain import readable
from ..core.units import db_of_ratio, dbv, format_si
from ..physics.humsettings import SIGNAL_FREQUENCY_TEXT, at_signal_frequency
from ..rules.results import Result
from ..rules.catalogue import SEVERITIES
from .coverage import coverage_words
from .fieldtable import field_axes_table

__all__ = ["print_report", "text_report", "figure_words", "CAUTION"]


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


def _fmt(x, unit="", digits=3):
    if x is None or (isinstance(x, float) and not math.isfinite(x)):
        return "–"
    return f"{readable(x, f'.{digits}g')}{unit}"


def print_report(result: Result, console: Console, *, caution: bool = True) -> None:
    """The whole terminal report: summary, findings, hum tables, protective-earth tables, loops."""
    _summary(result, console, caution)
    _findings(result, console)
    if result.hum is not None and result.hum.channels:
        _hum_tables(result, console)
    _rectifier_table(result, console)
    _protective_tables(result, console)
    _bonding_table(result, console)
    _outlet_table(result, console)
    if result.loops:
        _loop_table(result, console)


def _signed_words(h) -> str:
    """When the stages' drops partly cancel: the network's own sum beside the worst case the level
    shows."""
    if h.total_v <= 0 or (h.signed_v > 0 and db_of_ratio(h.total_v / h.signed_v) < 0.05):
        return ""
    signed = f"{dbv(h.signed_v):.2f} dBV" if h.signed_v > 0 else "they cancel"
    return f"; stages in phase, the worst case (with every stage non-inverting: {signed})"


def _summary(result: Result, console: Console, caution: bool) -> None:
    plan = result.plan
    counts = result.counts()
    worst = result.worst()
    console.print(
        Text(shown(plan.title), style="bold"), Text(f"  ({shown(plan.file)})", style="dim")
    )
    verdict = shown(result.verdict(LABEL.get))
    vstyle = "bold green" if result.clean() else STYLE.get(worst, "bold yellow")
    line = Text("Verdict: ")
    line.append(verdict, style=vstyle)
    line.append(
        "   "
        + "  ".join(f"{counts[s]} {s}" for s in SEVERITIES)
        + (f"  {counts['accepted']} accepted" if counts["accepted"] else "")
    )
    line.append(f"   loops: {result.loop_total}")
    console.print(line)
    for notice in result.notices:
        console.print(Text(f"Notice: {shown(notice)}", style="bold yellow"))
    if result.safety is not None and result.safety.parts:
        worst_pe = max(result.safety.parts, key=lambda p: p.path_resistance)
        ok = worst_pe.path_resistance <= result.safety.limit
        console.print(
            Text(
                f"Protective earth: worst path {worst_pe.path_resistance * 1e3:.2f} mΩ to "
                f"{worst_pe.part} (limit {result.safety.limit * 1e3:.0f} mΩ) — "
                + ("within limit" if ok else "OVER LIMIT"),
                style="green" if ok else "bold red",
            )
        )
    elif plan.mains is None and result.device_earths:
        broken = [d for d in result.device_earths if d.resistance is None or d.resistance > 1.0]
        n = len(result.device_earths)
        paths = "1 device's earth path" if n == 1 else f"{n} devices' earth paths"
        console.print(
            Text(
                f"Protective earth: installation — {paths} to the main earthing terminal, "
                f"{len(broken)} broken or over 1 Ω (each device's own wiring is checked with its "
                "own plan)",
                style="bold red" if broken else "green",
            )
        )
    elif plan.mains is None:
        console.print(Text("Protective earth: no mains statement, not checked", style="dim"))
    if result.hum is not None:
        for ch, h in result.hum.channels.items():
            verdict = {True: "audible", False: "inaudible", None: "no verdict"}[h.audible]
            level = _fmt(h.total_dbv, " dBV", 4) if h.total_v > 0 else "none computed (below 1 pV)"
            console.print(
                f"Hum, {escape(ch)}: {level} at the output, signal-to-hum "
                f"{_fmt(h.signal_to_hum, ' dB', 3) if h.total_v > 0 else 'unlimited'}, {verdict}"
                + (f" (margin {h.margin_db:+.1f} dB)" if h.margin_db is not None else "")
                + _signed_words(h)
            )
            if h.covers:
                console.print(Text(f"  (this figure {coverage_words(h.covers)})", style="dim"))
    if caution:
        console.print(Text(CAUTION, style="bold yellow"))
    console.print()


def _findings(result: Result, console: Console) -> None:
    groups = [
        (LABEL[sev], STYLE[sev], [f for f in result.open_findings() if f.severity == sev])
        for sev in SEVERITIES
    ]
    groups.append(
        ("ACCEPTED IN THE PLAN", "dim", [f for f in result.findings if f.accepted is not None])
    )
    for label, style, group in groups:
        if not group:
            continue
        console.print(Text(f"{label} ({len(group)})", style=style))
        for f in group:
            head = Text(f"  {f.code} ", style="bold")
            head.append(f"{shown(f.location)}  ", style="dim")
            head.append(shown(f.message))
            console.print(head)
            if f.figures:
                console.print(
                    Text(shown(f"      figures: {figure_words(f.figures)}"), style="dim")
                )
            if f.accepted is not None:
                console.print(
                    Text(shown(f"      accepted ({f.severity}): {f.accepted}"), style="dim")
                )
            elif f.fix:
                console.print(Text(shown(f"      fix: {f.fix}"), style="green"))
        console.print()


def _hum_tables(result: Result, console: Console) -> None:
    t = Table(title="Hum and buzz at the output", title_justify="left")
    for col in ("channel", "Hz", "dBV", "dB SPL", "threshold", "margin"):
        t.add_column(col, justify="right" if col != "channel" else "left")
    left_out = {}
    for ch, h in result.hum.channels.items():
        rows = [r for r in h.spectrum if r["volts"] > 0]
        # every harmonic above the threshold is shown; the others up to TABLE_ROWS, the rest
        # counted
        shown_rows = [
            r for i, r in enumerate(rows) if i < TABLE_ROWS or (r.get("margin_db") or -1) > 0
        ]
        left_out[ch] = len(rows) - len(shown_rows)
        for r in shown_rows:
            t.add_row(
                escape(ch),
                f"{r['frequency_hz']:g}",
                _fmt(r["dbv"], "", 4),
                _fmt(r.get("spl_db"), "", 3),
                _fmt(r.get("threshold_db"), "", 3),
                _fmt(r.get("margin_db"), "", 3),
            )
        t.add_row(
            escape(ch),
            "total",
            _fmt(h.total_dbv, "", 4),
            "",
            "",
            _fmt(h.margin_db, "", 3),
            style="bold",
        )
    console.print(t)
    for ch, n in left_out.items():
        if n:
            console.print(
                f"  {n} more harmonics of {escape(ch)}, each below the threshold of hearing, not "
                "listed (every one is in --format json)"
            )
    for ch, h in result.hum.channels.items():
        if h.contributors:
            top = "; ".join(
                f"{escape(c['element'])} ({escape(c['source'])}) {c['share_pct']:.0f} %"
                for c in h.contributors[:3]
            )
            console.print(f"  main contributors, {escape(ch)}: {top}")
    xt = [r for r in result.hum.crosstalk if at_signal_frequency(r["frequency_hz"])]
    for r in xt:
        console.print(
            f"  crosstalk {escape(str(r['from']))} → {escape(str(r['to']))} "
            f"at {SIGNAL_FREQUENCY_TEXT}: "
            + ("below −200 dB" if r["db"] is None or r["db"] <= -200 else f"{r['db']:.1f} dB")
        )
    for r in result.hum.feedback:
        if at_signal_frequency(r["frequency_hz"]) and r["input_db"] > -200:
            console.print(
                f"  ground feedback of {escape(r['source'])} into its own "
                f"{escape(str(r['channel']))} output at {SIGNAL_FREQUENCY_TEXT}: {r['db']:.1f} dB "
                f"({r['input_db']:.1f} dB through its input stages)"
            )
    for note in result.hum.notes:
        console.print(Text(f"  note: {note}", style="dim"))
    console.print()
    field_axes_table(result.hum.channels, console)
    if result.hum.loops:
        _pickup_table(result, console)


def _rectifier_table(result: Result, console: Console) -> None:
    if result.rectifiers:
        t = Table(title="Rectifiers (simulated to steady state)", title_justify="left")
        filters = any(r.filter_current is not None for r in result.rectifiers)
        chokes = any(r.critical_inductance is not None for r in result.rectifiers)
        for col in (
            "rectifier",
            "DC V",
            "ripple Vpp",
            "peak A",
            "rms A",
            "conduction °",
            *(("filter out V", "out ripple Vpp") if filters else ()),
            *(("choke crit. H", "choke current") if chokes else ()),
        ):
            t.add_column(col, justify="right" if col != "rectifier" else "left")
        for r in result.rectifiers:
            extra = (
                ()
                if not filters
                else ("–", "–")
                if r.output_dc is None
                else (f"{r.output_dc:.1f}", f"{r.output_ripple_pp:.3g}")
            )
            t.add_row(
                escape(r.name),
                f"{r.dc_voltage:.1f}",
                f"{r.ripple_pp:.3g}",
                f"{r.peak_current:.3g}",
                f"{r.rms_current:.3g}",
                f"{r.conduction_angle:.1f}",
                *extra,
                *(() if not chokes else _choke_cells(r)),
            )
        console.print(t)
        console.print()


def _choke_cells(r) -> tuple[str, str]:
    """A choke input's critical inductance and whether its current is continuous."""
    if r.critical_inductance is None:
        return "–", "–"
    return f"{r.critical_inductance:.3g}", "continuous" if r.continuous else "intermittent"


def axis_words(axis: list[float], stated: str) -> str:
    """'z', or 'worst: (0.31, -0.52, 0.8)': the moment direction a loop's pickup was computed with
    (for ``worst``, the direction that puts the most flux through that loop)."""
    if stated == "pair":
        return "heater pair"
    named = {(1.0, 0.0, 0.0): "x", (0.0, 1.0, 0.0): "y", (0.0, 0.0, 1.0): "z"}.get(
        tuple(abs(x) for x in axis)
    )
    shown = named or "(" + ", ".join(f"{x:.2g}" for x in axis) + ")"
    return f"worst: {shown}" if stated == "worst" else shown


def _pickup_table(result: Result, console: Console) -> None:
    t = Table(title="Loop pickup (EMF at the source's fundamental)", title_justify="left")
    for col in ("loop", "source", "height mm", "axis", "model", "closest mm", "EMF µV"):
        t.add_column(col, justify="left" if col in ("source", "axis", "model") else "right")
    rows = 0
    for row in result.hum.loops[:TABLE_LOOPS]:
        for name, e in row["sources"].items():
            first = e["per_frequency"][0]["emf_v"] if e["per_frequency"] else None
            t.add_row(
                str(row["loop"]),
                escape(name),
                f"{e['height_mm']:g}",
                axis_words(e["axis"], e["axis_stated"]),
                e["model"],
                f"{e['closest_mm']:g}",
                _fmt(None if first is None else first * 1e6, "", 3),
            )
            rows += 1
    if rows:
        console.print(t)
        console.print()


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


def _protective_tables(result: Result, console: Console) -> None:
    if result.safety is not None and result.safety.parts:
        sup = result.safety.supply
        limit = "none set below 50 V" if sup.max_time is None else f"{sup.max_time:g} s"
        t = Table(
            title=f"Protective earth (line-to-part fault; {sup.system}, external loop "
            f"{sup.ze:.4g} Ω{_loop_origin(result)}; cables at {sup.cable_temperature:g} °C; "
            f"disconnection limit {limit})",
            title_justify="left",
        )
        for col in (
            "part",
            "path mΩ",
            "fault A",
            "touch V to earth",
            "cleared by",
            "in",
            "I²t A²s",
        ):
            t.add_column(col, justify="right" if col not in ("part", "cleared by") else "left")
        for p in result.safety.parts:
            device = (
                "nothing assured"
                if p.device is None
                else ("stated in plan" if p.device == "stated" else p.device)
            )
            i2t = _fmt(p.i2t, "", 3) + (" (stated in plan)" if "i2t" in p.stated else "")
            t.add_row(
                escape(p.part),
                f"{p.path_resistance * 1e3:.3g}",
                _fmt(p.fault_current, "", 4),
                _fmt(p.touch_voltage, "", 3),
                device,
                _fmt(p.clear_time, " s", 2),
                i2t,
            )
        console.print(t)
        console.print()
    if result.device_earths:
        _device_earth_table(result.device_earths, console)


#: conductors listed in the bonding-test table (the closest to their limit first; all in the JSON)
TABLE_BONDING = 8


def _bonding_table(result: Result, console: Console) -> None:
    """The product bonding test: the conductors closest to their temperature limit, per test."""
    b = result.bonding
    rows = [] if b is None else [c for c in b.conductors if c.passes is not None]
    if not rows:
        return
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
            _fmt(c.current, "", 3),
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
    console.print()


def _deg(x) -> str:
    return "–" if x is None else ("melts" if math.isinf(x) else f"{x:.0f}")


def _device_earth_table(earths, console: Console) -> None:
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
    for col in ("device", "earth pin", "resistance"):
        t.add_column(col)
    for d in shown:
        t.add_row(
            escape(d.device),
            escape(d.inlet),
            "BROKEN" if d.resistance is None else f"{d.resistance * 1e3:.3g} mΩ",
        )
    console.print(t)
    if len(earths) > len(shown):
        console.print(
            f"  {len(earths) - len(shown)} more devices not listed here (all are in --format json)"
        )
    console.print()


def driver_words(pair) -> str:
    """An outlet pair's drivers in words: 'run_rack.induced 12.7 mV; desk.leakage 28.2 µV'."""
    return "; ".join(f"{n} {format_si(v, 'V')}" for n, _, v in pair.drivers) or "none"


def _outlet_table(result: Result, console: Console) -> None:
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
                format_si(p.open_total, "V"),
                format_si(p.planned_total, "V"),
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


def _loop_table(result: Result, console: Console) -> None:
    t = Table(title=f"Ground loops ({result.loop_total} independent)", title_justify="left")
    for col in ("#", "closed by", "area mm²", "open at", "members"):
        t.add_column(col)
    for i, lp in enumerate(result.loops[:TABLE_LOOPS], 1):
        t.add_row(
            str(i),
            lp.closed_by,
            "–" if lp.area is None else f"{lp.area * 1e6:.0f}",
            escape(lp.open_at or "protective: keep closed"),
            escape(" → ".join(lp.loop.nodes)),
        )
    console.print(t)
    if result.loop_total > min(len(result.loops), TABLE_LOOPS):
        console.print(
            f"  {result.loop_total - min(len(result.loops), TABLE_LOOPS)} more loops not listed "
            f"here (the first {len(result.loops)} are in --format json)"
        )


def text_report(result: Result, width: int | None = None, color: bool = False) -> str:
    """The report as a string, for files and pipes: with no ``width`` nothing is wrapped (one
    finding per line, its details indented below it) and no line ends in blanks."""
    buf = io.StringIO()
    console = Console(
        file=buf,
        width=width or 100_000,
        force_terminal=color,
        no_color=not color,
        highlight=False,
        color_system="standard" if color else None,
    )
    print_report(result, console)
    return "\n".join(line.rstrip() for line in buf.getvalue().split("\n"))


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
