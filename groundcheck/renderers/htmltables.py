"""The HTML report's supply and pickup tables: each rectifier's steady-state figures and each
loop's EMF per field source and harmonic, the figures the JSON document holds (``rectifiers``,
``hum.loops``), in the same units."""

from __future__ import annotations

import math

from ..core.errors import html_text as escape
from ..core.units import format_si
from ..rules.results import Result
from .htmlparts import cell
from .texthum import axis_words

__all__ = ["rectifier_section", "pickup_section", "TABLE_PICKUP_LOOPS"]

#: loops listed in the pickup table (the JSON holds every loop the analysis lists)
TABLE_PICKUP_LOOPS = 200


def rectifier_section(result: Result, parts: list[str], e=escape) -> None:
    """Each rectifier's steady state: DC voltage and ripple at the reservoir, the charging
    current's peak, rms and mean, the conduction angle, and the filter's output when stated."""
    if not result.rectifiers:
        return
    filters = any(r.filter_current is not None for r in result.rectifiers)
    head = ["rectifier", "DC voltage", "ripple", "peak current", "rms current", "DC current"]
    chokes = any(r.critical_inductance is not None for r in result.rectifiers)
    head += ["conduction angle"] + (["filter output", "output ripple"] if filters else [])
    head += ["choke's critical inductance", "choke current"] if chokes else []
    parts.append(
        "<h2>Rectifiers</h2><p>Simulated to steady state; the ripple is peak to peak at the "
        "reservoir capacitor; what each channel's hum figure takes from a supply's ripple is "
        'said beside its hum.</p><table id="rectifiers"><tr>'
        + "".join(f"<th>{h}</th>" for h in head)
        + "</tr>"
    )
    for r in result.rectifiers:
        cells = [
            cell(r.dc_voltage, "{:.1f} V"),
            cell(r.ripple_pp, "{:.3g} V"),
            _si(r.peak_current, "A"),
            _si(r.rms_current, "A"),
            _si(r.dc_current, "A"),
            cell(r.conduction_angle, "{:.1f}°"),
        ]
        if filters:
            cells += (
                ["–", "–"]
                if r.output_dc is None
                else [cell(r.output_dc, "{:.1f} V"), cell(r.output_ripple_pp, "{:.3g} V")]
            )
        if chokes:
            cells += (
                ["–", "–"]
                if r.critical_inductance is None
                else [
                    cell(r.critical_inductance, "{:.3g} H"),
                    "continuous" if r.continuous else "intermittent",
                ]
            )
        parts.append(
            f"<tr><td>{e(r.name)}</td>"
            + "".join(f"<td class=num>{c}</td>" for c in cells)
            + "</tr>"
        )
    parts.append("</table>")


def pickup_section(result: Result, parts: list[str], e=escape) -> None:
    """Each loop's pickup: per field source the model and direction its figures use, and per
    harmonic the EMF around the loop and the current it drives there."""
    loops = [] if result.hum is None else result.hum.loops[:TABLE_PICKUP_LOOPS]
    rows = [(row, name, s) for row in loops for name, s in row.sources.items()]
    if not rows:
        return
    parts.append(
        "<h2>Loop pickup</h2><p>The EMF each field source induces around each ground loop (rms, "
        "per harmonic) and the current it drives round the loop; the loop numbers are those of "
        'the ground-loop table.</p><table id="pickup"><tr><th>loop</th><th>area</th>'
        "<th>source</th><th>model</th><th>direction</th><th>closest</th><th>frequency</th>"
        "<th>EMF</th>"
        "<th>loop current</th></tr>"
    )
    for row, name, s in rows:
        area = None if row.area is None else row.area * 1e6
        head = (
            f"<td>{row.loop}</td><td class=num>{cell(area, '{:.0f} mm²')}</td>"
            f"<td>{e(name)}</td><td>{e(s.model)}</td>"
            f"<td>{e(axis_words(s.axis, s.axis_stated))}</td>"
            f"<td class=num>{cell(round(s.closest * 1e3, 1), '{:g} mm')}</td>"
        )
        for h in s.lines or [None]:
            tail = (
                "<td class=num>–</td>" * 3
                if h is None
                else f"<td class=num>{cell(h.frequency, '{:g} Hz')}</td>"
                f"<td class=num>{_si(h.emf, 'V')}</td>"
                f"<td class=num>{_si(h.current, 'A')}</td>"
            )
            parts.append(f"<tr>{head}{tail}</tr>")
    parts.append("</table>")
    if result.hum is not None and len(result.hum.loops) > len(loops):
        parts.append(
            f"<p>{len(result.hum.loops) - len(loops)} more loops not listed here (all are in the "
            "JSON document).</p>"
        )


def _si(x, unit: str) -> str:
    """``x`` with an SI prefix to three digits, a dash for none."""
    if x is None or not math.isfinite(x):
        return "–"
    if 0 < abs(x) < 1e-12:  # below the smallest prefix: a rounding residue, not a figure
        return f"below 1 p{unit}"
    return format_si(x, unit)
