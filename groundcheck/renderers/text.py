"""The terminal report (rich): summary first, then findings by severity, hum, protective earth,
loops.

Colour only when writing to a terminal; plain text when piped or with
``NO_COLOR`` set (rich honours both).  The hum sections are in :mod:`.texthum`, the
protective-earth ones in :mod:`.textearth`, what they share in :mod:`.textwords`.
"""

from __future__ import annotations

import io
import os

from rich.console import Console
from rich.table import Table
from rich.text import Text

from ..core.caution import CAUTION
from ..core.errors import shown
from ..model.supplies import DEVICE_EARTH_LIMIT
from ..rules.results import Result
from ..rules.catalogue import RULES, SEVERITIES
from ..rules.rule_families import PROTECTIVE_EARTH
from .coverage import coverage_words
from .textearth import bonding_table, outlet_table, protective_tables
from .texthum import axis_words, hum_tables, rectifier_table, signed_words
from .textwords import (
    LABEL,
    STYLE,
    TABLE_LOOPS,
    driver_words,
    escape,
    figure_words,
    number,
    opening_words,
)

__all__ = [
    "print_report",
    "text_report",
    "figure_words",
    "driver_words",
    "axis_words",
    "escape",
    "CAUTION",
]


def print_report(result: Result, console: Console, *, caution: bool = True) -> None:
    """The whole terminal report: summary, findings, hum tables, protective-earth tables, loops."""
    _summary(result, console, caution)
    _findings(result, console)
    if result.hum is not None and result.hum.channels:
        hum_tables(result, console)
    rectifier_table(result, console)
    protective_tables(result, console)
    bonding_table(result, console)
    outlet_table(result, console)
    if result.loops:
        _loop_table(result, console)


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
    _earth_line(result, console)
    _hum_lines(result, console)
    if caution:
        console.print(Text(CAUTION, style="bold yellow"))
    console.print()


def _earth_line(result: Result, console: Console) -> None:
    """The summary's protective-earth line: the worst path, an installation's device earth paths,
    or why it was not checked."""
    plan = result.plan
    # a path within its limit says nothing of a shared stud or a slow fuse: those are named
    others = sorted(
        {
            f.code
            for f in result.open_findings()
            if RULES[f.code].family == PROTECTIVE_EARTH and f.severity in ("danger", "fault")
        }
    )
    if result.safety is not None and result.safety.parts:
        worst_pe = max(result.safety.parts, key=lambda p: p.path_resistance)
        ok = worst_pe.path_resistance <= result.safety.limit
        verdict = "within limit" if ok else "OVER LIMIT"
        if ok and others:
            verdict += f", but see {', '.join(others)} below"
        console.print(
            Text(
                f"Protective earth: worst path {worst_pe.path_resistance * 1e3:.2f} mΩ to "
                f"{worst_pe.part} (limit {result.safety.limit * 1e3:.0f} mΩ) — {verdict}",
                style="green" if ok and not others else "bold red",
            )
        )
    elif plan.mains is None and result.device_earths:
        broken = [
            d
            for d in result.device_earths
            if d.resistance is None or d.resistance > DEVICE_EARTH_LIMIT
        ]
        n = len(result.device_earths)
        paths = "1 device's earth path" if n == 1 else f"{n} devices' earth paths"
        own = (
            _placed_words(plan.supply)
            if plan.supply is not None
            else "each device's own wiring is checked with its own plan"
        )
        see = f"; see {', '.join(others)} below" if others else ""
        console.print(
            Text(
                f"Protective earth: installation — {paths} to the main earthing terminal, "
                f"{len(broken)} broken or over {DEVICE_EARTH_LIMIT:g} Ω ({own}){see}",
                style="bold red" if broken or others else "green",
            )
        )
    elif plan.mains is None:
        console.print(Text("Protective earth: no mains statement, not checked", style="dim"))


def _hum_lines(result: Result, console: Console) -> None:
    """The summary's hum line per channel: level, signal-to-hum, verdict and margin."""
    if result.hum is not None:
        for ch, h in result.hum.channels.items():
            verdict = {True: "audible", False: "inaudible", None: "no verdict"}[h.audible]
            level = (
                number(h.total_dbv, " dBV", 4) if h.total_v > 0 else "none computed (below 1 pV)"
            )
            console.print(
                f"Hum, {escape(ch)}: {level} at the output, signal-to-hum "
                f"{number(h.signal_to_hum, ' dB', 3) if h.total_v > 0 else 'unlimited'}, {verdict}"
                + (f" (margin {h.margin_db:+.1f} dB)" if h.margin_db is not None else "")
                + signed_words(h)
            )
            if h.covers:
                console.print(Text(f"  (this figure {coverage_words(h.covers)})", style="dim"))


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
            head.append(f"{shown(_where(f.location))}  ", style="dim")
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


def _loop_table(result: Result, console: Console) -> None:
    t = Table(title=f"Ground loops ({result.loop_total} independent)", title_justify="left")
    for col in ("#", "closed by", "area mm²", "open at", "members"):
        t.add_column(col)
    for i, lp in enumerate(result.loops[:TABLE_LOOPS], 1):
        t.add_row(
            str(i),
            lp.closed_by,
            "–" if lp.area is None else f"{lp.area * 1e6:.0f}",
            escape(opening_words(result, lp)),
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


def _placed_words(supply) -> str:
    """How an installation's devices are checked on its supply, in words."""
    head = (
        f"each device with a plan of its own is checked on this {supply.system} supply, its fault "
        "loop through the wiring to where it is plugged in"
    )
    if supply.breaker is not None or supply.rcd is not None:
        return head + ", and a simple class I device on the supply's breaker or RCD"
    tail = " (GC221 says what the electrode lets through)" if supply.system == "TT" else ""
    return (
        head + "; a simple device's own fuse is not known: state the supply's breaker to check "
        "it" + tail
    )


def _where(loc) -> str:
    """A finding's place as the plan's own are shown: a device's plan, read by its full path, under
    the folder the command runs in is shown from there (``devices/amp.gplan:43:1``, as the plan
    that places it is), any other as read."""
    f = loc.file
    if os.path.isabs(f):
        rel = os.path.relpath(f)
        if not rel.startswith(".."):
            return str(loc).replace(f, rel, 1)
    return str(loc)
