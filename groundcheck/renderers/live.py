"""The live view's state: what the page shows for one analysis, as plain data the page's script
applies.

One state per analysis (or per failed load): the verdict, the sections as HTML fragments (summary,
findings, hum, protective earth, what the last edit changed), both drawings as inline SVG, and for
the drawings' interaction the SVG classes each finding marks and each conductor's figures.  Every
string from the plan is escaped here; the page's script inserts only these fragments and sets plain
text.
"""

from __future__ import annotations

import math
import re
from ..core.errors import html_text as escape

from ..advice.compare import compare
from ..core.plain import readable
from ..core.caution import CAUTION
from ..core.errors import PlanError
from ..core.units import dbv
from ..rules.results import Result
from .dot import element_class
from .htmlparts import inline_svg
from .htmlsections import hum_section, installation_section, protective_section
from .text import figure_words
from .coverage import coverage_words

__all__ = ["live_state", "error_state", "status_line", "main_hum_line"]


def main_hum_line(result: Result) -> float | None:
    """The frequency (Hz) of the largest spectrum line over every channel, None without hum."""
    rows = [
        r
        for h in (result.hum.channels.values() if result.hum else ())
        for r in h.spectrum
        if r.volts > 0
    ]
    return max(rows, key=lambda r: r.volts).frequency if rows else None


def _verdict(result: Result) -> str:
    return result.verdict()


def _findings(result: Result, lines: dict[str, list[str]], e=escape) -> tuple[str, list[dict]]:
    """The findings as rows the page makes hoverable, and per row the classes it marks and its plan
    line."""
    if not result.findings:
        return "<p>No findings.</p>", []
    rows, marks = (
        ['<table id="findings"><tr><th>severity</th><th>code</th><th>finding</th></tr>'],
        [],
    )
    for i, f in enumerate(result.findings):
        loc = f.location
        text = lines.get(loc.file, [])
        line = text[loc.line - 1].rstrip() if 0 < loc.line <= len(text) else ""
        marks.append(
            {
                "classes": sorted({element_class(x) for x in f.elements}),
                "where": str(loc),
                "line": line,
            }
        )
        severity = f"accepted ({f.severity})" if f.accepted is not None else f.severity
        figs = figure_words(f.figures)
        rows.append(
            f'<tr class="finding" data-index="{i}" tabindex="0"><td><span class="sev '
            f'{f.severity}">'
            f"{e(severity)}</span></td><td>{f.code}</td><td>{e(f.message)}"
            + (f'<div class="fig">{e(figs)}</div>' if figs else "")
            + (f'<div class="fix">fix: {e(f.fix)}</div>' if f.fix and f.accepted is None else "")
            + f'<div class="where">{e(str(loc))}</div></td></tr>'
        )
    rows.append("</table>")
    return "".join(rows), marks


def _summary(result: Result, e=escape) -> str:
    counts = result.counts()
    ok = "ok" if result.clean() else "bad"
    out = [
        f'<p><b id="verdict" class="{ok}">{e(_verdict(result))}</b> — '
        + ", ".join(f"{counts[s]} {s}" for s in ("danger", "fault", "warning", "note"))
        + f"; {result.loop_total} independent ground "
        f"loop{'' if result.loop_total == 1 else 's'}.</p>"
    ]
    out += [f'<p class="notice">{e(n)}</p>' for n in result.notices]
    if result.hum is not None and result.hum.channels:
        out.append(
            '<table id="hum-summary"><tr><th>channel</th><th>hum at output</th><th>verdict</th>'
            "<th>margin</th></tr>"
        )
        for ch, h in result.hum.channels.items():
            verdict = {True: "audible", False: "inaudible", None: "no verdict"}[h.audible]
            margin = "–" if h.margin_db is None else f"{h.margin_db:+.1f} dB"
            out.append(
                f"<tr><td>{e(ch)}</td><td class=num>{_dbv(h.total_v)}</td><td>{verdict}</td><td "
                f"class=num>{margin}</td></tr>"
            )
        out.append("</table>")
        out += [
            f'<p class="covers">{e(ch)}: this figure {e(coverage_words(h.covers))}.</p>'
            for ch, h in result.hum.channels.items()
            if h.covers
        ]
    return "".join(out)


def _dbv(v: float) -> str:
    return "none" if not v or v <= 0 else f"{dbv(v):.1f} dBV"


def _changes(before: Result | None, after: Result, e=escape) -> str:
    """What the last edit changed: findings cleared and introduced, hum per channel (dB)."""
    if before is None:
        return "<p>The first analysis since the view started.</p>"
    d = compare(before, after)
    fixed, new = d["findings"]["fixed"], d["findings"]["introduced"]
    out = [
        f'<p id="change-count">{len(fixed)} cleared, {len(new)} introduced; loops '
        f"{d['loops']['total_before']} → "
        f'{d["loops"]["total_after"]}.</p><ul class="changes">'
    ]
    out += [f'<li class="cleared">cleared {e(f["code"])} {e(f["message"])}</li>' for f in fixed]
    out += [
        f'<li class="introduced">new {e(f["code"])} ({e(f["severity"])}) {e(f["message"])}</li>'
        for f in new
    ]
    out.append("</ul>")
    for ch, h in d["hum"].items():
        b, a = (
            ("no hum" if v is None else f"{readable(v, '.1f')} dBV")
            for v in (h["before_dbv"], h["after_dbv"])
        )
        change = (
            "" if h["change_db"] is None else f" (<b>{readable(h['change_db'], '+.1f')} dB</b>)"
        )
        out.append(f'<p class="humchange">hum, {e(ch)}: {b} → {a}{change}</p>')
    return "".join(out)


def conductor_figures(result: Result) -> dict[str, dict]:
    """Per conductor (by its SVG class): its name and rows of figures — resistance, inductance,
    impedance at the main hum line, the current each source drives through it there, and its share
    of each channel's hum."""
    circuit, f_main = result.circuit, main_hum_line(result)
    out: dict[str, dict] = {}
    if circuit is None:
        return out
    z = circuit.impedance(f_main) if f_main else None
    for bi, b in enumerate(circuit.branches):
        if not b.conductor:
            continue
        rows = [["resistance", f"{b.r * 1e3:.4g} mΩ"]]
        if b.l:
            rows.append(["inductance", f"{b.l * 1e9:.4g} nH"])
        if z is not None:
            rows.append([f"impedance at {f_main:g} Hz", f"{abs(z[bi]) * 1e3:.4g} mΩ"])
        out[element_class(b.conductor)] = {"name": b.conductor, "rows": rows}
    hum = result.hum
    for row in hum.network if hum else ():
        for c in row["conductors"]:
            entry = out.get(element_class(c["branch"]))
            if entry is not None:
                entry["rows"].append(
                    [
                        f"current from {row['source']} at {row['frequency_hz']:g} Hz",
                        f"{c['current_a'] * 1e3:.4g} mA",
                    ]
                )
    for ch, h in hum.channels.items() if hum else ():
        for c in h.contributors:
            entry = out.get(element_class(c.element)) if c.kind == "conductor" else None
            if entry is not None:
                entry["rows"].append([f"share of {ch}'s hum ({c.source})", f"{c.share:.3g} %"])
    return out


def live_state(
    result: Result,
    physical: str | None,
    topology: str | None,
    before: Result | None,
    lines: dict[str, list[str]],
    seconds: float,
) -> dict:
    """The page's state after a successful analysis.

    Parameters:
        result: the analysis.
        physical, topology: the drawings as SVG text (None when they could not be drawn).
        before: the previous successful analysis (None for the first).
        lines: each plan file's lines, for showing a finding's plan line.
        seconds: how long the analysis and drawing took.
    Returns:
        plain data for the page (JSON-serialisable).
    """
    findings, marks = _findings(result, lines)
    hum: list[str] = []
    hum_section(result, hum)
    pe: list[str] = []
    protective_section(result, pe)
    installation_section(result, pe)  # an installation's device earth paths and outlet voltages
    hum_html, pe_html = (
        re.sub(r"<h2>[^<]*</h2>", "", "".join(x)) for x in (hum, pe)
    )  # the page has its own
    sections = {
        "summary": _summary(result),
        "findings": findings,
        "hum": hum_html or "<p>No hum budget (no sources or stages).</p>",
        "protective": pe_html or "<p>No protective-earth figures.</p>",
        "changes": _changes(before, result),
    }
    return {
        "ok": True,
        "title": result.plan.title,
        "file": result.plan.file,
        "verdict": _verdict(result),
        "worst": result.worst(),
        "clean": result.clean(),
        "seconds": round(seconds, 3),
        "caution": CAUTION,
        "not_checked": [n.as_dict() for n in result.not_checked],
        "sections": sections,
        "physical": inline_svg(physical) if physical else None,
        "topology": inline_svg(topology) if topology else None,
        "marks": marks,
        "conductors": conductor_figures(result),
        "error": None,
    }


def error_state(errors: list[PlanError], last_good: dict | None) -> dict:
    """The page's state when the plan cannot be loaded: the errors with their places, the last good
    drawings kept (the page greys them)."""
    rows = [
        {
            "where": str(e.location),
            "message": e.message,
            "hint": e.hint,
            "line": (e.source_line or "").rstrip("\n"),
        }
        for e in errors
    ]
    state = (
        dict(last_good)
        if last_good
        else {
            "title": "",
            "file": "",
            "sections": {},
            "physical": None,
            "topology": None,
            "marks": [],
            "conductors": {},
            "caution": CAUTION,
        }
    )
    state.update(ok=False, verdict="plan error", worst=None, error=rows)
    return state


def status_line(result: Result, seconds: float) -> str:
    """One terminal line per change: verdict, worst finding, hum per channel, time taken."""
    worst = min(result.open_findings(), key=lambda f: f.sort_key(), default=None)
    parts = [_verdict(result)]
    if worst is not None:
        parts.append(f"{worst.code} {worst.rule.name}")
    for ch, h in result.hum.channels.items() if result.hum else ():
        parts.append(f"{ch} {_dbv(h.total_v)}")
    parts.append(f"{seconds * 1e3:.0f} ms" if math.isfinite(seconds) else "")
    return " · ".join(p for p in parts if p)
