"""The HTML report: one self-contained file (no network fetches) to read, print and share.

Summary, findings, both drawings inline (SVG), a hum spectrum chart per channel (output level per
harmonic against the audibility limit) and the protective-earth table.  Every string from the plan
is escaped; the drawings' text is escaped by Graphviz.  The sections are in :mod:`.htmlsections`,
the chart in :mod:`.htmlchart`, what the pages share in :mod:`.htmlparts`.
"""

from __future__ import annotations

from ..core.caution import CAUTION
from ..core.errors import html_text as escape
from ..core.version import __version__
from ..rules.catalogue import SEVERITIES
from ..rules.results import Result
from .coverage import coverage_words
from .htmlchart import chart_frame, spectrum_svg
from .htmlparts import CSS, cell, plan_line_html
from .htmltables import pickup_section, rectifier_section
from .htmlsections import (
    findings_section,
    hum_section,
    installation_section,
    loops_section,
    protective_section,
)

__all__ = ["html_report", "spectrum_svg", "chart_frame", "plan_line_html", "CSS"]


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
    _summary(result, parts)
    findings_section(result, parts, physical_svg, topology_svg, renderer, lines or {})
    hum_section(result, parts)
    rectifier_section(result, parts)
    pickup_section(result, parts)
    protective_section(result, parts)
    installation_section(result, parts)
    loops_section(result, parts)
    parts.append("</body></html>")
    return "\n".join(parts) + "\n"


def _summary(result: Result, parts: list[str], e=escape) -> None:
    """The summary: verdict and counts, notices, the worst protective path and the hum per
    channel."""
    counts = result.counts()
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
            top = h.contributors[0].element if h.contributors else "–"
            parts.append(
                f"<tr><td>{e(ch)}</td><td class=num>{cell(h.total_dbv, '{:.1f} dBV')}</td><td "
                f"class=num>{cell(h.signal_to_hum, '{:.1f} dB')}</td><td>{verdict}</td><td "
                f"class=num>{cell(h.margin_db, '{:+.1f} dB')}</td><td>{e(top)}</td></tr>"
            )
        parts.append("</table>")
        parts += [
            f'<p class="covers">{e(ch)}: this figure {e(coverage_words(h.covers))}.</p>'
            for ch, h in result.hum.channels.items()
            if h.covers
        ]
