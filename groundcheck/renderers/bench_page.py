"""The bench record as one self-contained HTML page: the cautions, per channel a chart of the
measured against
the planned spectrum and the fit's bars, the table, the bonding measurements and the findings.  No
script, no
network fetch; every text from a plan or a file is escaped."""

from __future__ import annotations

from ..core.errors import html_text as esc
from .bench import db, signed, unit_of, worst

__all__ = ["render_bench_html"]

STYLE = """body{font:15px/1.45 system-ui,sans-serif;margin:2em auto;max-width:1000px;color:#222}
.caution{border:2px solid #b00;background:#fff4f4;padding:.6em 1em;margin:1em 0}
table{border-collapse:collapse;margin:.6em 0}td,th{border:1px solid #ccc;padding:2px
7px;text-align:right}
td.l,th.l{text-align:left}.bad{color:#b00;font-weight:600}.ok{color:#060}svg{background:#fafafa}
.legend span{margin-right:1.2em}"""

W, H, LEFT, BOTTOM = 900, 300, 60, 40


LEGEND = (
    '<p class="legend"><span style="color:#1f5fbf">■ measured</span><span style="color:#c33">■ '
    'not explained by the plan</span><span style="color:#e08a00">○ planned</span><span '
    'style="color:#999">— noise in the line\'s bandwidth</span></p>'
)


def _marks(r, x, y, bottom: float, bar: float, unit: str) -> list[str]:
    """One harmonic's noise tick, measured bar and planned circle."""
    out = []
    cx = x(r.harmonic)
    nv, pv = db(r.noise), db(r.predicted)
    mv = db(r.measured) if r.above_noise else None
    if nv is not None:
        out.append(
            f'<line x1="{cx - bar:.1f}" x2="{cx + bar:.1f}" y1="{y(nv):.1f}" y2="{y(nv):.1f}" '
            'stroke="#999"/>'
        )
    if mv is not None:
        colour = "#c33" if r.unexplained else "#1f5fbf"
        out.append(
            f'<rect x="{cx - bar / 2:.1f}" y="{y(mv):.1f}" width="{bar:.1f}" '
            f'height="{max(y(bottom) - y(mv), 0):.1f}" fill="{colour}"><title>'
            f"{r.frequency_hz:.1f} Hz measured {mv:.1f} {unit}</title></rect>"
        )
    if pv is not None:
        out.append(
            f'<circle cx="{cx:.1f}" cy="{y(pv):.1f}" r="4" fill="none" stroke="#e08a00" '
            f'stroke-width="2"><title>{r.plan_frequency_hz:g} Hz planned {pv:.1f} dBV'
            "</title></circle>"
        )
    return out


def _chart(c, unit: str) -> str:
    """The measured spectrum (bars), the planned one (circles) and the noise (ticks), in dB."""
    rows = [r for r in c.rows if r.above_noise or r.predicted]
    if not rows:
        return "<p>No line above the noise and none planned.</p>"
    values = [
        v
        for r in rows
        for v in (db(r.measured) if r.above_noise else None, db(r.predicted), db(r.noise))
        if v is not None
    ]
    top, bottom = max(values) + 5, min(values) - 5
    n = max(r.harmonic for r in c.rows)

    def x(h):
        return LEFT + (W - LEFT - 10) * (h - 0.5) / n

    def y(v):
        return 10 + (H - BOTTOM - 10) * (top - v) / max(top - bottom, 1e-9)

    parts = [
        f'<svg width="{W}" height="{H}" role="img" aria-label="measured and planned spectrum">'
    ]
    for k in range(6):
        v = bottom + (top - bottom) * k / 5
        parts.append(
            f'<line x1="{LEFT}" x2="{W - 10}" y1="{y(v):.1f}" y2="{y(v):.1f}" '
            f'stroke="#ddd"/><text x="4" y="{y(v) + 4:.1f}" font-size="11">'
            f"{v:.0f} {unit}</text>"
        )
    bar = max(2.0, (W - LEFT) / n * 0.35)
    for r in c.rows:
        parts += _marks(r, x, y, bottom, bar, unit)
    for h in range(1, n + 1, max(1, n // 10)):
        parts.append(
            f'<text x="{x(h):.1f}" y="{H - 18}" font-size="11" text-anchor="middle">'
            f"{c.rows[h - 1].frequency_hz:.0f}</text>"
        )
    parts.append(
        f'<text x="{W / 2:.0f}" y="{H - 3}" font-size="12" text-anchor="middle">Hz</text></svg>'
    )
    return "".join(parts) + LEGEND


def _bars(c, unit: str) -> str:
    if not c.suspects:
        return "<p>The plan predicts no hum in this channel: nothing to fit.</p>"
    vals = [v for s in c.suspects for v in (db(s.planned), db(s.explained)) if v is not None]
    lo, hi = min(vals) - 5, max(vals) + 5
    out = [
        '<table><tr><th class="l">suspect</th><th '
        'class="l">mechanism</th><th>planned</th><th>fitted</th><th>against plan</th><th '
        'class="l">planned (orange) and fitted (blue)</th></tr>'
    ]
    for s in c.suspects:

        def width(v):
            return 0 if v is None else max(1, int(300 * (v - lo) / (hi - lo)))

        off = "not seen" if s.off_db is None else f"{signed(s.off_db):+.1f} dB"
        cls = "bad" if s.off_db is not None and s.off_db > 6 else ""
        out.append(
            f'<tr><td class="l">{esc(", ".join(s.members))}</td><td '
            f'class="l">{esc(s.mechanism)}</td>'
            f"<td>{_n(db(s.planned))}</td><td>{_n(db(s.explained))}</td><td "
            f'class="{cls}">{off}</td>'
            '<td class="l"><svg width="310" height="22"><rect y="2" height="8" '
            f'width="{width(db(s.planned))}"'
            f' fill="#e08a00"/><rect y="12" height="8" width="{width(db(s.explained))}" '
            'fill="#1f5fbf"/>'
            "</svg></td></tr>"
        )
    return "".join(out) + "</table>"


def _n(x, spec=".1f") -> str:
    return "–" if x is None else format(x, spec)


def _rows(c, unit: str) -> str:
    out = [
        f"<table><tr><th>harmonic</th><th>Hz</th><th>measured {unit}</th><th>planned "
        "dBV</th><th>diff dB</th>"
        '<th>SPL / threshold dB</th><th class="l">the plan\'s contributors</th></tr>'
    ]
    for r in c.rows:
        if not r.above_noise and not r.predicted:
            continue
        meas = _n(db(r.measured)) if r.above_noise else f"&lt;{_n(db(r.noise), '.0f')}"
        diff = "–"
        if r.above_noise and r.predicted:
            diff = f"{signed(db(r.measured) - db(r.predicted)):+.1f}"
        spl = "–" if r.spl_db is None else f"{r.spl_db:.1f} / {r.threshold_db:.1f}"
        who = esc(", ".join(r.contributors)) or (
            "<span class=bad>none: not in the plan</span>" if r.unexplained else "–"
        )
        out.append(
            f"<tr><td>{r.harmonic}</td><td>{r.frequency_hz:.1f}</td><td>{meas}</td>"
            f"<td>{_n(db(r.predicted))}</td><td>{diff}</td><td>{spl}</td>"
            f"<td class=l>{who}</td></tr>"
        )
    return "".join(out) + "</table>"


def _bonds(record) -> str:
    if not record.bonds:
        return ""
    out = [
        '<h2>Bonding measurements</h2><table><tr><th class="l">where</th><th '
        'class="l">between</th>'
        "<th>measured mΩ</th><th>test A</th><th>plan mΩ</th><th>limit mΩ</th><th "
        'class="l">verdict</th>'
        '<th class="l">joints on the path</th></tr>'
    ]
    for b in record.bonds:
        cls = "ok" if b.verdict == "as planned" else "bad"
        planned = "not joined" if b.planned_ohm is None else format(b.planned_ohm * 1e3, ".2f")
        out.append(
            f'<tr><td class="l">{esc(str(b.location))}</td><td class="l">{esc(b.a)} to '
            f"{esc(b.b)}</td>"
            f"<td>{b.measured_ohm * 1e3:.2f}</td><td>{_n(b.test_current, 'g')}</td>"
            f"<td>{planned}</td>"
            f"<td>{'–' if b.limit_ohm is None else format(b.limit_ohm * 1e3, '.0f')}</td>"
            f'<td class="l {cls}">{esc(b.verdict)}</td><td '
            f'class="l">{esc(", ".join(b.joints))}</td></tr>'
        )
    return "".join(out) + "</table>"


def render_bench_html(record) -> str:
    """The bench record as a self-contained HTML page.

    Parameters:
        record: the bench record.
    Returns:
        the page.
    References:
        none (presentation).
    """
    unit = unit_of(record)
    body = [f"<h1>Bench record: {esc(record.plan_title)}</h1><p>Plan {esc(record.plan_path)}</p>"]
    body += [f'<div class="caution">{esc(c)}</div>' for c in record.cautions]
    m = record.measured
    if m is not None:
        cal = esc(m.calibration) if m.calibrated else "not calibrated: levels in dBFS"
        body.append(
            f"<p>Recording {esc(m.path)}: {m.seconds:.1f} s at {m.rate} Hz, channel "
            f"{m.channel + 1} of {m.channels}; {cal}. Mains {m.mains_hz:.2f} Hz. Method: "
            f"{esc(m.window)}.</p>"
        )
    for c in record.channels:
        verdict = {None: "audibility not judged", True: "audible", False: "inaudible"}[c.audible]
        body.append(f"<h2>Channel {esc(c.channel)}: {verdict}</h2>")
        body += [f"<p><b>{esc(s)}</b></p>" for s in c.summary]
        body += [
            _chart(c, unit),
            "<h3>Which conductor to suspect</h3>",
            _bars(c, unit),
            "<h3>Each harmonic</h3>",
            _rows(c, unit),
        ]
    body.append(_bonds(record))
    if record.findings:
        body.append(
            "<h2>Findings</h2><ul>"
            + "".join(
                f"<li><b>{esc(f.severity)} {esc(f.code)}</b> {esc(str(f.location))}: "
                f"{esc(f.message)}{'<br>fix: ' + esc(f.fix) if f.fix else ''}</li>"
                for f in record.findings
            )
            + "</ul>"
        )
    body += [f"<p>Note: {esc(n)}</p>" for n in record.notes]
    verdict = f"worst finding: {esc(worst(record))}" if record.findings else "No bench finding."
    body.append(f"<p>{verdict}</p>")
    return (
        '<!DOCTYPE html><html lang="en"><head><meta charset="utf-8"><title>groundcheck bench: '
        f"{esc(record.plan_title)}</title><style>{STYLE}</style></head><body>"
        f"{''.join(body)}</body></html>\n"
    )
