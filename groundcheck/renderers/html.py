"""The HTML report: one self-contained file (no network fetches) to read, print and share.

Summary, findings, both drawings inline (SVG), a hum spectrum chart per channel (output level per
harmonic against the audibility limit) and the protective-earth table.  Every string from the plan
is escaped; the drawings' text is escaped by Graphviz.
"""

from __future__ import annotations

import math
import re
from ..core.errors import html_text as escape

from ..core.plain import unsigned_zero
from ..core.version import __version__
from ..rules.results import Result
from ..rules.catalogue import SEVERITIES
from ..physics.hearing import threshold_of_hearing
from ..core.caution import CAUTION
from ..core.units import format_si
from .text import driver_words, figure_words
from .coverage import coverage_words

__all__ = ["html_report", "spectrum_svg", "chart_frame", "plan_line_html"]

CSS = """
body{font-family:system-ui,Helvetica,Arial,sans-serif;margin:2em auto;max-width:1100px;color:#222;
line-height:1.4}
h1{font-size:1.5em;margin-bottom:.2em}
h2{font-size:1.15em;border-bottom:1px solid #ccc;padding-bottom:.2em;margin-top:1.6em}
.caution{background:#fff6e0;border-left:4px solid #e0a000;padding:.5em .8em;font-size:.9em}
.notice{background:#ffe8e0;border-left:4px solid #c03000;padding:.4em .8em}
table{border-collapse:collapse;margin:.5em 0;font-size:.9em}
td,th{border:1px solid #ccc;padding:.25em .6em;text-align:left}
th{background:#f2f2f2}td.num{text-align:right;font-variant-numeric:tabular-nums}
.sev{font-weight:bold;padding:0 .4em;border-radius:3px;color:#fff}.danger{background:#b00020}
.fault{background:#d9480f}
.warning{background:#b08800}.note{background:#1f6f8b}.fix{color:#225522}
.fig{color:#555;font-size:.85em}
.drawing svg{max-width:100%;height:auto}
.drawing.natural{overflow:auto;max-height:90vh;border:1px solid #ddd}
.drawing.natural svg{max-width:none}
pre.planline{margin:.3em 0;padding:.2em .4em;background:#f7f7f2;white-space:pre-wrap;
font-size:.85em}
.ok{color:#227722}.bad{color:#b00020;font-weight:bold}
@media print{body{margin:0;max-width:none}.drawing{page-break-inside:avoid}
h2{page-break-after:avoid}}
"""


def _f(x, fmt="{:.3g}", dash="–"):
    if x is None or (isinstance(x, float) and not math.isfinite(x)):
        return dash
    return unsigned_zero(fmt.format(x))


def _inline_svg(svg: bytes | str | None) -> str:
    if not svg:
        return "<p>(no drawing: no renderer available)</p>"
    text = svg.decode("utf-8") if isinstance(svg, bytes) else svg
    text = re.sub(r"<\?xml[^>]*\?>", "", text)
    text = re.sub(r"<!DOCTYPE[^>]*>", "", text)
    text = re.sub(r"<!--.*?-->", "", text, flags=re.S)
    return text.strip()


def chart_frame(box: tuple, X, hi_f: float, label: str) -> list[str]:
    """The start of a spectrum chart: the SVG element (``label`` for screen readers), its plot area
    and the frequency grid with its labels.  ``box``: width, height and the left, right, top and
    bottom margins; ``X``: frequency -> x."""
    W, H, L, R, T, B = box
    out = [
        f'<svg xmlns="http://www.w3.org/2000/svg" width="{W}" height="{H}" viewBox="0 0 {W} {H}" '
        f'role="img" aria-label="{escape(label)}">',
        f'<rect x="{L}" y="{T}" width="{W - L - R}" height="{H - T - B}" fill="#fbfbfb" '
        'stroke="#bbb"/>',
    ]
    for f in (20, 50, 100, 200, 500, 1000, 2000, 5000, 10000):
        if f <= hi_f:
            out.append(
                f'<line x1="{X(f):.1f}" y1="{T}" x2="{X(f):.1f}" y2="{H - B}" '
                f'stroke="#e4e4e4"/><text x="{X(f):.1f}" y="{H - B + 14}" font-size="10" '
                f'text-anchor="middle">{f if f < 1000 else str(f // 1000) + "k"}</text>'
            )
    return out


def spectrum_svg(channel, listening: bool, max_freq: float) -> str:
    """A chart of one channel's hum: a stem per harmonic, and the threshold of hearing as a line.

    With a listening context the axis is dB SPL at the listener; otherwise dBV at the output.
    """
    W, H, L, R, T, B = 640, 260, 50, 10, 15, 35
    rows = [r for r in channel.spectrum if r["volts"] > 0]
    key = "spl_db" if listening else "dbv"
    vals = [r[key] for r in rows if r.get(key) is not None]
    thr = [threshold_of_hearing(f) for f in (20, 50, 100, 200, 500, 1000, 2000, 5000, 10000)]
    lo_f, hi_f = 20.0, max(1000.0, max_freq * 1.2)
    if listening:
        top = max(vals + thr[:3] + [20.0])
        bottom = min(vals + [-10.0]) if vals else -10.0
        bottom = max(bottom, top - 120)
    else:
        top = max(vals + [-40.0]) + 5
        bottom = top - 120

    def X(f):
        return L + (math.log10(f) - math.log10(lo_f)) / (math.log10(hi_f) - math.log10(lo_f)) * (
            W - L - R
        )

    def Y(v):
        v = min(max(v, bottom), top)
        return T + (top - v) / (top - bottom) * (H - T - B)

    out = chart_frame((W, H, L, R, T, B), X, hi_f, f"hum spectrum of channel {channel.channel}")
    step = 20
    v = math.ceil(bottom / step) * step
    while v <= top:
        out.append(
            f'<line x1="{L}" y1="{Y(v):.1f}" x2="{W - R}" y2="{Y(v):.1f}" stroke="#eee"/><text '
            f'x="{L - 4}" y="{Y(v) + 3:.1f}" font-size="10" text-anchor="end">{v:.0f}</text>'
        )
        v += step
    out.append(
        f'<text x="{(W + L) / 2:.0f}" y="{H - 4}" font-size="11" text-anchor="middle">frequency, '
        "Hz</text>"
    )
    axis = "dB SPL at the listener" if listening else "dBV at the output"
    out.append(
        f'<text x="12" y="{(H - B + T) / 2:.0f}" font-size="11" text-anchor="middle" '
        f'transform="rotate(-90 12 {(H - B + T) / 2:.0f})">{axis}</text>'
    )
    if listening:
        fs = [lo_f * (hi_f / lo_f) ** (i / 60) for i in range(61)]
        pts = " ".join(f"{X(f):.1f},{Y(threshold_of_hearing(f)):.1f}" for f in fs)
        out.append(
            f'<polyline points="{pts}" fill="none" stroke="#2a8a2a" stroke-width="2" '
            'stroke-dasharray="5,3"/>'
            f'<text x="{W - R - 4}" y="{T + 12}" font-size="10" text-anchor="end" '
            'fill="#2a8a2a">threshold of '
            "hearing (ISO 226)</text>"
        )
    for r in rows:
        if r.get(key) is None:
            continue
        audible = listening and r.get("margin_db") is not None and r["margin_db"] > 0
        color = "#c0392b" if audible else "#2c6fbb"
        out.append(
            f'<line x1="{X(r["frequency_hz"]):.1f}" y1="{Y(bottom):.1f}" '
            f'x2="{X(r["frequency_hz"]):.1f}" '
            f'y2="{Y(r[key]):.1f}" stroke="{color}" stroke-width="3"><title>{r["frequency_hz"]:g} '
            "Hz: "
            f"{r[key]:.1f}{' dB SPL' if listening else ' dBV'}</title></line>"
        )
    out.append("</svg>")
    return "".join(out)


def html_report(
    result: Result,
    physical_svg: bytes | None,
    topology_svg: bytes | None,
    renderer: str = "",
    lines: dict[str, list[str]] | None = None,
) -> str:
    """The report as one HTML document.

    ``lines``: each plan file's lines, to show (coloured by the plan language's lexer) the line
    each finding points at; none shown without them.
    """
    plan = result.plan
    counts = result.counts()
    e = escape
    parts = [
        "<!DOCTYPE html>",
        '<html lang="en"><head><meta charset="utf-8">',
        f"<title>groundcheck: {e(plan.title)}</title>",
        '<meta name="viewport" content="width=device-width, initial-scale=1">',
        f"<style>{CSS}</style></head><body>",
        f"<h1>{e(plan.title)}</h1>",
        f"<p>Plan <code>{e(plan.file)}</code> — checked by groundcheck {e(__version__)}.</p>",
        f'<p class="caution">{e(CAUTION)}</p>',
        "<h2>Summary</h2>",
    ]
    verdict = result.verdict()
    ok = "ok" if result.clean() else "bad"
    parts.append(
        f'<p><b>Verdict:</b> <span class="{ok}">{e(verdict)}</span>. '
        + ", ".join(f"{counts[s]} {s}" for s in SEVERITIES)
        + (f", {counts['accepted']} accepted in the plan" if counts["accepted"] else "")
        + f"; {result.loop_total} independent ground "
        f"loop{'' if result.loop_total == 1 else 's'}.</p>"
    )
    for notice in result.notices:
        parts.append(f'<p class="notice"><b>Notice:</b> {e(notice)}</p>')
    if result.safety is not None and result.safety.parts:
        w = max(result.safety.parts, key=lambda p: p.path_resistance)
        ok = w.path_resistance <= result.safety.limit
        parts.append(
            f'<p><b>Protective earth:</b> <span class="{"ok" if ok else "bad"}">worst path '
            f"{w.path_resistance * 1e3:.2f} mΩ to {e(w.part)} (limit "
            f"{result.safety.limit * 1e3:.0f} "
            "mΩ)</span>.</p>"
        )
    if result.hum is not None:
        parts.append(
            '<table id="hum-summary"><tr><th>channel</th><th>hum at '
            "output</th><th>signal-to-hum</th>"
            "<th>verdict</th><th>margin</th><th>main contributor</th></tr>"
        )
        for ch, h in result.hum.channels.items():
            verdict = {True: "audible", False: "inaudible", None: "no verdict"}[h.audible]
            top = h.contributors[0]["element"] if h.contributors else "–"
            parts.append(
                f"<tr><td>{e(ch)}</td><td class=num>{_f(h.total_dbv, '{:.1f} dBV')}</td><td "
                f"class=num>{_f(h.signal_to_hum, '{:.1f} dB')}</td><td>{verdict}</td><td "
                f"class=num>{_f(h.margin_db, '{:+.1f} dB')}</td><td>{e(top)}</td></tr>"
            )
        parts.append("</table>")
        parts += [
            f'<p class="covers">{e(ch)}: this figure {e(coverage_words(h.covers))}.</p>'
            for ch, h in result.hum.channels.items()
            if h.covers
        ]
    _findings_section(result, parts, physical_svg, topology_svg, renderer, lines or {})
    _hum_section(result, parts)
    _protective_section(result, parts)
    _installation_section(result, parts)
    _loops_section(result, parts)
    parts.append("</body></html>")
    return "\n".join(parts) + "\n"


def plan_line_html(text: str) -> str:
    """One plan line as HTML, coloured by the plan language's lexer (inline styles: the report
    stands alone)."""
    from pygments import highlight
    from pygments.formatters import HtmlFormatter
    from .lexer import PlanLexer

    return highlight(text, PlanLexer(), HtmlFormatter(nowrap=True, noclasses=True)).rstrip("\n")


def _findings_section(
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
        f'id="physical">{_inline_svg(physical_svg)}</div>'
    )
    parts.append(
        '<h2>Topology</h2><p class="fig">At full size: scroll to see all of it.</p><div '
        f'class="drawing natural" id="topology">{_inline_svg(topology_svg)}</div>'
    )
    if renderer:
        parts.append(f'<p class="fig">Drawings: {e(renderer)}.</p>')


def _hum_section(result: Result, parts: list[str], e=escape) -> None:
    """The hum tables and spectrum charts of each channel."""
    if result.hum is not None and result.hum.channels:
        plan = result.plan
        listening = plan.listening is not None and plan.listening.verdict
        parts.append("<h2>Hum and buzz spectrum</h2>")
        for ch, h in result.hum.channels.items():
            parts.append(
                f"<h3>{e(ch)}</h3><div "
                f'class="chart">{spectrum_svg(h, listening, result.options.max_frequency)}</div>'
            )
            rows = [r for r in h.spectrum if r["volts"] > 0]  # every harmonic the chart shows
            parts.append(
                '<table class="spectrum"><tr><th>Hz</th><th>dBV</th><th>dB '
                "SPL</th><th>threshold</th><th>margin</th></tr>"
            )
            for r in rows:
                parts.append(
                    f"<tr><td class=num>{r['frequency_hz']:g}</td><td "
                    f"class=num>{_f(r['dbv'], '{:.1f}')}</td><td "
                    f"class=num>{_f(r.get('spl_db'), '{:.1f}')}</td><td "
                    f"class=num>{_f(r.get('threshold_db'), '{:.1f}')}</td><td "
                    f"class=num>{_f(r.get('margin_db'), '{:+.1f}')}</td></tr>"
                )
            parts.append("</table>")


def _protective_section(result: Result, parts: list[str], e=escape) -> None:
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
                f"class=num>{_f(p.fault_current, '{:.4g} A')}</td><td "
                f"class=num>{_f(p.touch_voltage, '{:.3g} V')}</td><td>{e(device)}</td><td "
                f"class=num>{_f(p.clear_time, '{:.2g} s')}</td><td "
                f"class=num>{_f(p.i2t, '{:.3g} A²s')}</td></tr>"
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


def _installation_section(result: Result, parts: list[str], e=escape) -> None:
    """An installation's device earth paths and the voltage between the outlets each interconnect
    joins."""
    if result.device_earths:
        parts.append(
            '<h2>Installation</h2><table id="device-earths"><tr><th>device</th><th>earth pin</th>'
            "<th>path to the main earthing terminal</th></tr>"
        )
        for d in result.device_earths:
            shown = "BROKEN" if d.resistance is None else f"{d.resistance * 1e3:.3g} mΩ"
            parts.append(
                f"<tr><td>{e(d.device)}</td><td>{e(d.inlet)}</td><td class=num>{shown}</td></tr>"
            )
        parts.append("</table>")
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
                f"<td class=num>{format_si(p.open_total, 'V')}</td>"
                f"<td class=num>{format_si(p.planned_total, 'V')}</td>"
                f"<td>{e(driver_words(p))}</td></tr>"
            )
        parts.append("</table>")
    if o is not None:
        for c, f, emf, m in o.emfs:
            parts.append(
                f"<p>{e(c)}: its load induces {format_si(emf, 'V')} at {f:g} Hz along its "
                f"protective core (M′ {m * 1e9:.4g} nH/m).</p>"
            )


def _loops_section(result: Result, parts: list[str], e=escape) -> None:
    """The table of listed ground loops."""
    if result.loops:
        parts.append(
            '<h2>Ground loops</h2><table id="loops"><tr><th>#</th><th>closed by</th>'
            "<th>area</th><th>open at</th><th>members</th></tr>"
        )
        for i, lp in enumerate(result.loops[:200], 1):
            area = _f(None if lp.area is None else lp.area * 1e6, "{:.0f} mm²")
            parts.append(
                f"<tr><td>{i}</td><td>{e(lp.closed_by)}</td><td class=num>{area}</td>"
                f"<td>{e(lp.open_at or 'protective: keep closed')}</td>"
                f"<td>{e(' → '.join(lp.loop.nodes))}</td></tr>"
            )
        parts.append("</table>")
