"""The terminal report's hum sections: the hum and buzz table per channel with its contributors,
crosstalk and feedback, the loop pickup table and the rectifier table."""

from __future__ import annotations

from rich.console import Console
from rich.table import Table
from rich.text import Text

from ..core.plain import unsigned_zero
from ..core.units import db_of_ratio, dbv
from ..physics.humsettings import SIGNAL_FREQUENCY_TEXT, at_signal_frequency
from ..rules.results import Result
from .fieldtable import field_axes_table
from .textwords import TABLE_LOOPS, TABLE_ROWS, escape, number

__all__ = ["hum_tables", "rectifier_table", "axis_words", "signed_words"]


def signed_words(h) -> str:
    """When the stages' drops partly cancel: the network's own sum beside the worst case the level
    shows."""
    if h.total_v <= 0 or (h.signed_v > 0 and db_of_ratio(h.total_v / h.signed_v) < 0.05):
        return ""
    signed = f"{dbv(h.signed_v):.2f} dBV" if h.signed_v > 0 else "they cancel"
    return f"; stages in phase, the worst case (with every stage non-inverting: {signed})"


def hum_tables(result: Result, console: Console) -> None:
    """The hum and buzz table of every channel, what is under it, the field-source directions and
    the loop pickup."""
    t = Table(title="Hum and buzz at the output", title_justify="left")
    for col in ("channel", "Hz", "dBV", "dB SPL", "threshold", "margin"):
        t.add_column(col, justify="right" if col != "channel" else "left")
    left_out = {}
    for ch, h in result.hum.channels.items():
        rows = h.spectrum_shown  # rounding (160 dB under the largest) is no figure
        # every harmonic above the threshold is shown; the others up to TABLE_ROWS, the rest
        # counted
        shown_rows = [r for i, r in enumerate(rows) if i < TABLE_ROWS or r.audible]
        left_out[ch] = sum(1 for r in h.spectrum if r.volts > 0) - len(shown_rows)
        for r in shown_rows:
            t.add_row(
                escape(ch),
                f"{r.frequency:g}",
                number(r.dbv, "", 4),
                number(r.spl, "", 3),
                number(r.threshold, "", 3),
                number(r.margin, "", 3),
            )
        t.add_row(
            escape(ch),
            "total",
            number(h.total_dbv, "", 4),
            "",
            "",
            number(h.margin_db, "", 3),
            style="bold",
        )
    console.print(t)
    _hum_notes(result, left_out, console)
    console.print()
    field_axes_table(result.hum.channels, console)
    if result.hum.loops:
        _pickup_table(result, console)


def _hum_notes(result: Result, left_out: dict, console: Console) -> None:
    """Under the hum table: the harmonics not listed, the main contributors, crosstalk and ground
    feedback at the signal frequency, and the analysis's notes."""
    for ch, n in left_out.items():
        if n:
            console.print(
                f"  {n} more harmonics of {escape(ch)}, each below the threshold of hearing, not "
                "listed (every one is in --format json)"
            )
    for ch, h in result.hum.channels.items():
        if h.contributors:
            top = "; ".join(
                f"{escape(c.element)} ({escape(c.source)}) {unsigned_zero(f'{c.share:.0f}')} %"
                for c in h.contributors[:3]
            )
            console.print(f"  main contributors, {escape(ch)}: {top}")
    xt = [r for r in result.hum.crosstalk if at_signal_frequency(r.frequency)]
    for r in xt:
        console.print(
            f"  crosstalk {escape(str(r.source))} → {escape(str(r.to))} "
            f"at {SIGNAL_FREQUENCY_TEXT}: "
            + ("below −200 dB" if r.db <= -200 else f"{r.db:.1f} dB")
        )
    for r in result.hum.feedback:
        if at_signal_frequency(r.frequency) and r.input_db > -200:
            console.print(
                f"  ground feedback of {escape(r.source)} into its own "
                f"{escape(str(r.channel))} output at {SIGNAL_FREQUENCY_TEXT}: {r.db:.1f} dB "
                f"({r.input_db:.1f} dB through its input stages)"
            )
    for note in result.hum.notes:
        console.print(Text(f"  note: {note}", style="dim"))


def rectifier_table(result: Result, console: Console) -> None:
    """Each rectifier's steady-state figures (and its filter's output when one is stated)."""
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
        tuple(abs(round(x, 4)) for x in axis)
    )
    shown = named or "(" + ", ".join(f"{x:.2g}" for x in axis) + ")"
    return f"worst: {shown}" if stated == "worst" else shown


#: an EMF below this (V) is the rounding of an outline that encloses nothing in plan (a lid on a
#: tray through two screws), printed as such rather than as 3e-15 µV
EMF_FLOOR = 1e-12


def _emf_uv(volts: float | None) -> str:
    """A loop's EMF in µV for the pickup table; "below 1 pV" under :data:`EMF_FLOOR`."""
    if volts is not None and abs(volts) < EMF_FLOOR:
        return "below 1 pV"
    return number(None if volts is None else volts * 1e6, "", 3)


def _pickup_table(result: Result, console: Console) -> None:
    t = Table(title="Loop pickup (EMF at the source's fundamental)", title_justify="left")
    for col in ("loop", "source", "height mm", "axis", "model", "closest mm", "EMF µV"):
        t.add_column(col, justify="left" if col in ("source", "axis", "model") else "right")
    rows = 0
    for row in result.hum.loops[:TABLE_LOOPS]:
        for name, e in row.sources.items():
            first = e.lines[0].emf if e.lines else None
            t.add_row(
                str(row.loop),
                escape(name),
                f"{round(e.height * 1e3, 3):g}",
                axis_words(e.axis, e.axis_stated),
                e.model,
                f"{round(e.closest * 1e3, 1):g}",
                _emf_uv(first),
            )
            rows += 1
    if rows:
        console.print(t)
        console.print()
