"""The HTML report's sections: findings with their plan lines and the drawings, hum per channel,
protective earth, an installation's earth paths and outlet voltages, and the ground loops."""

from __future__ import annotations

from ..core.errors import html_text as escape
from ..core.units import format_si
from ..rules.results import Result
from .htmlchart import spectrum_svg
from .htmlparts import cell, inline_svg, plan_line_html
from .textearth import CLASS_II_WORDS, class_ii_devices
from .textwords import driver_words, earth_volts, figure_words, opening_words

__all__ = [
    "findings_section",
    "hum_section",
    "protective_section",
    "installation_section",
    "loops_section",
]


def findings_section(
    result: Result,
    parts: list[str],
    physical_svg,
    topology_svg,
    renderer: str,
    lines: dict[str, list[str]],
    e=escape,
) -> None:
    """The findings table (with each finding's plan line) and both drawings."""
    if not result.findings:
        parts.append("<h2>Findings</h2><p>No findings.</p>")
    else:
        parts.append(
            "<h2>Findings</h2><table "
            'id="findings"><tr><th>severity</th><th>code</th><th>where</th><th>finding</th></tr>'
        )
    for f in result.findings:
        figs = e(figure_words(f.figures))
        severity = f"accepted ({f.severity})" if f.accepted is not None else f.severity
        text = lines.get(f.location.file, [])
        line = text[f.location.line - 1] if 0 < f.location.line <= len(text) else ""
        shown = f'<pre class="planline">{plan_line_html(line)}</pre>' if line.strip() else ""
        parts.append(
            f'<tr><td><span class="sev {f.severity}">{e(severity)}</span></td><td>{f.code}</td>'
            f"<td>{e(str(f.location))}</td><td>{e(f.message)}{shown}"
            + (f'<div class="fig">{figs}</div>' if figs else "")
            + (
                f'<div class="fix">accepted: {e(f.accepted)}</div>'
                if f.accepted is not None
                else f'<div class="fix">fix: {e(f.fix)}</div>'
                if f.fix
                else ""
            )
            + "</td></tr>"
        )
    if result.findings:
        parts.append("</table>")
    parts.append(
        '<h2>Physical drawing</h2><div class="drawing" '
        f'id="physical">{inline_svg(physical_svg)}</div>'
    )
    parts.append(
        '<h2>Topology</h2><input type="checkbox" id="topology-zoom" class="zoom">'
        '<label for="topology-zoom" class="fig"> at full size (scroll to see all of it)</label>'
        f'<div class="drawing fits" id="topology">{inline_svg(topology_svg)}</div>'
    )
    if renderer:
        parts.append(f'<p class="fig">Drawings: {e(renderer)}.</p>')


def hum_section(result: Result, parts: list[str], e=escape) -> None:
    """The hum tables and spectrum charts of each channel."""
    if result.hum is not None and result.hum.channels:
        parts.append("<h2>Hum and buzz spectrum</h2>")
        for ch, h in result.hum.channels.items():
            # a channel heard through a placed device's own listening may have a verdict when
            # the plan's listening has none, and the other way round
            listening = any(r.threshold is not None for r in h.spectrum)
            parts.append(
                f"<h3>{e(ch)}</h3><div "
                f'class="chart">{spectrum_svg(h, listening, result.options.max_frequency)}</div>'
            )
            rows = h.spectrum_shown  # every harmonic the chart shows
            parts.append(
                '<table class="spectrum"><tr><th>Hz</th><th>dBV</th><th>dB '
                "SPL</th><th>threshold</th><th>margin</th></tr>"
            )
            for r in rows:
                parts.append(
                    f"<tr><td class=num>{r.frequency:g}</td><td "
                    f"class=num>{cell(r.dbv, '{:.1f}')}</td><td "
                    f"class=num>{cell(r.spl, '{:.1f}')}</td><td "
                    f"class=num>{cell(r.threshold, '{:.1f}')}</td><td "
                    f"class=num>{cell(r.margin, '{:+.1f}')}</td></tr>"
                )
            parts.append("</table>")


def protective_section(result: Result, parts: list[str], e=escape) -> None:
    """The protective-earth tables."""
    if result.safety is not None and result.safety.parts:
        sup = result.safety.supply
        parts.append(
            f"<h2>Protective earth</h2><p>{e(sup.system)}, external loop {sup.ze:.3g} Ω "
            f"({'stated' if sup.ze_stated else 'default'}); maximum disconnection time "
            f"{'none below 50 V' if sup.max_time is None else f'{sup.max_time:g} s'} "
            "(IEC 60364-4-41 Table 41.1).</p>"
            '<table id="protective-earth"><tr><th>part</th><th>path resistance</th>'
            "<th>fault current</th><th>touch voltage to earth</th><th>cleared "
            "by</th><th>in</th><th>I²t</th></tr>"
        )
        for p in result.safety.parts:
            device = (
                "nothing assured"
                if p.device is None
                else ("stated in plan" if p.device == "stated" else p.device)
            )
            parts.append(
                f"<tr><td>{e(p.part)}</td><td class=num>{p.path_resistance * 1e3:.3g} mΩ</td><td "
                f"class=num>{cell(p.fault_current, '{:.4g} A')}</td><td "
                f"class=num>{cell(p.touch_voltage, '{:.3g} V')}</td><td>{e(device)}</td><td "
                f"class=num>{cell(p.clear_time, '{:.2g} s')}</td><td "
                f"class=num>{cell(p.i2t, '{:.3g} A²s')}</td></tr>"
            )
        parts.append("</table>")
        if result.safety.conductors:
            parts.append(
                "<table><tr><th>protective "
                "conductor</th><th>area</th><th>k</th><th>needs</th><th>survives</th></tr>"
            )
            for c in result.safety.conductors:
                parts.append(
                    f"<tr><td>{e(c.conductor)}</td><td class=num>{c.area * 1e6:.4g} mm²</td><td "
                    f"class=num>{c.k:g}</td><td class=num>{c.required * 1e6:.4g} "
                    f"mm²</td><td>{'yes' if c.survives else 'NO'}</td></tr>"
                )
            parts.append("</table>")


def installation_section(result: Result, parts: list[str], e=escape) -> None:
    """An installation's device earth paths and the voltage between the outlets each interconnect
    joins."""
    if result.device_earths:
        parts.append(
            '<h2>Installation</h2><table id="device-earths"><tr><th>device</th><th>earth pin</th>'
            "<th>path to the main earthing terminal</th></tr>"
        )
        for d in result.device_earths:
            shown = (
                f"through isolator {', '.join(d.through)}"
                if d.through and d.resistance is None
                else "BROKEN"
                if d.resistance is None
                else f"{d.resistance * 1e3:.3g} mΩ"
            )
            parts.append(
                f"<tr><td>{e(d.device)}</td><td>{e(d.inlet)}</td><td class=num>{shown}</td></tr>"
            )
        parts.append("</table>")
    for d in class_ii_devices(result.plan):
        parts.append(f"<p>{e(d)}: {e(CLASS_II_WORDS)}.</p>")
    o = result.outlets
    if o is not None and o.pairs:
        parts.append(
            "<table "
            'id="outlet-voltages"><tr><th>interconnect</th><th>between</th><th>unplugged</th>'
            "<th>as planned</th><th>drivers (unplugged)</th></tr>"
        )
        for p in o.pairs:
            parts.append(
                f"<tr><td>{e(p.interconnect)}</td><td>{e(p.a)} – {e(p.b)}</td>"
                f"<td class=num>{earth_volts(p.open_total)}</td>"
                f"<td class=num>{earth_volts(p.planned_total)}</td>"
                f"<td>{e(driver_words(p))}</td></tr>"
            )
        parts.append("</table>")
    if o is not None:
        for c, f, emf, m in o.emfs:
            parts.append(
                f"<p>{e(c)}: its load induces {format_si(emf, 'V')} at {f:g} Hz along its "
                f"protective core (M′ {m * 1e9:.4g} nH/m).</p>"
            )


def loops_section(result: Result, parts: list[str], e=escape) -> None:
    """The table of listed ground loops."""
    if result.loops:
        parts.append(
            '<h2>Ground loops</h2><table id="loops"><tr><th>#</th><th>closed by</th>'
            "<th>area</th><th>open at</th><th>members</th></tr>"
        )
        for i, lp in enumerate(result.loops[:200], 1):
            area = cell(None if lp.area is None else lp.area * 1e6, "{:.0f} mm²")
            parts.append(
                f"<tr><td>{i}</td><td>{e(lp.closed_by)}</td><td class=num>{area}</td>"
                f"<td>{e(opening_words(result, lp))}</td>"
                f"<td>{e(' → '.join(lp.loop.nodes))}</td></tr>"
            )
        parts.append("</table>")
