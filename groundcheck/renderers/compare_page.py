"""The comparison of two plans as one self-contained HTML page, in the report's style: totals
before and after, the findings cleared, kept and introduced, each channel's hum spectrum before and
after on one chart, the protective-earth paths, and both physical drawings side by side.  Every
string from the plans is escaped.
"""

from __future__ import annotations

import math
from ..core.errors import html_text as escape

from ..core.plain import readable
from ..core.units import format_si
from ..core.version import __version__
from ..rules.catalogue import SEVERITIES
from ..rules.results import Result
from .htmlchart import chart_frame
from .htmlparts import CSS, cell, inline_svg

__all__ = ["compare_page", "pair_chart"]

BEFORE_COLOUR, AFTER_COLOUR = "#9a9a9a", "#2c6fbb"


def _ohms(x) -> str:
    if x is None:
        return "absent"
    return f"{x:.3g} Ω" if x >= 1 else f"{x * 1e3:.3g} mΩ"


def _hum(v) -> str:
    return "no hum" if v is None else f"{readable(v, '.1f')} dBV"


def pair_chart(channel: str, rows: list[dict], max_freq: float) -> str:
    """One channel's hum per harmonic before (grey) and after (blue), dBV at the output, on a log
    frequency axis.

    ``rows``: the comparison's spectrum rows (frequency_hz, before_dbv, after_dbv; None where there
    is none).
    """
    W, H, L, R, T, B = 640, 240, 50, 10, 22, 35
    vals = [v for r in rows for v in (r["before_dbv"], r["after_dbv"]) if v is not None]
    top = max(vals + [-60.0]) + 5
    bottom = top - 120
    lo_f, hi_f = 20.0, max(1000.0, max_freq * 1.2)

    def X(f):
        return L + (math.log10(f) - math.log10(lo_f)) / (math.log10(hi_f) - math.log10(lo_f)) * (
            W - L - R
        )

    def Y(v):
        return T + (top - min(max(v, bottom), top)) / (top - bottom) * (H - T - B)

    out = chart_frame((W, H, L, R, T, B), X, hi_f, f"hum of channel {channel} before and after")
    out.append(
        f'<text x="{L + 4}" y="14" font-size="10" fill="{BEFORE_COLOUR}">■ before</text><text '
        f'x="{L + 64}" y="14" font-size="10" fill="{AFTER_COLOUR}">■ after</text>'
    )
    v = math.ceil(bottom / 20) * 20
    while v <= top:
        out.append(
            f'<text x="{L - 4}" y="{Y(v) + 3:.1f}" font-size="10" text-anchor="end">{v:.0f}</text>'
        )
        v += 20
    out.append(
        f'<text x="{(W + L) / 2:.0f}" y="{H - 4}" font-size="11" text-anchor="middle">frequency, '
        "Hz; "
        "dBV at the output</text>"
    )
    for r in rows:
        for key, colour, dx in (
            ("before_dbv", BEFORE_COLOUR, -1.6),
            ("after_dbv", AFTER_COLOUR, 1.6),
        ):
            if r[key] is not None and r["frequency_hz"] > 0:
                x = X(r["frequency_hz"]) + dx
                out.append(
                    f'<line x1="{x:.1f}" y1="{Y(bottom):.1f}" x2="{x:.1f}" y2="{Y(r[key]):.1f}" '
                    f'stroke="{colour}" stroke-width="3"><title>{r["frequency_hz"]:g} Hz '
                    f"{key[:-4]}: "
                    f"{r[key]:.1f} dBV</title></line>"
                )
    out.append("</svg>")
    return "".join(out)


def _totals(d: dict, before: Result, after: Result, e=escape) -> list[str]:
    cb, ca = before.counts(), after.counts()
    rows = [
        f"<tr><td>{s}</td><td class=num>{cb[s]}</td><td class=num>{ca[s]}</td></tr>"
        for s in SEVERITIES
    ]
    rows.append(
        f"<tr><td>ground loops</td><td class=num>{d['loops']['total_before']}</td><td "
        f"class=num>{d['loops']['total_after']}</td></tr>"
    )
    for ch, h in d["hum"].items():
        if h["change_db"] is not None:
            change = f" ({readable(h['change_db'], '+.1f')} dB)"
        else:
            change = " (removed)" if h["after_dbv"] is None and h["before_dbv"] is not None else ""
        rows.append(
            f"<tr><td>hum, {e(ch)}</td><td class=num>{_hum(h['before_dbv'])}</td><td "
            f"class=num>{_hum(h['after_dbv'])}{change}</td></tr>"
        )
    return [
        '<h2>Totals</h2><table id="totals"><tr><th></th><th>before</th><th>after</th></tr>',
        *rows,
        "</table>",
    ]


def _verdicts(d: dict, e=escape) -> list[str]:
    """Each plan's verdict, and what each run relaxed, left out or accepted."""
    out = []
    for when in ("before", "after"):
        cls = "ok" if d["verdict"][when] == "clean" else "bad"
        out.append(
            f'<p><b>Verdict {when}:</b> <span class="{cls}">{e(d["verdict"][when])}</span></p>'
        )
        out += [
            f'<p class="notice"><b>Notice ({when}):</b> {e(n)}</p>' for n in d["notices"][when]
        ]
    return out


def compare_page(d: dict, before: Result, after: Result, drawings: tuple | None = None) -> str:
    """The comparison page.

    Parameters:
        d: the comparison (:func:`groundcheck.advice.compare.compare`).
        before, after: the two analyses.
        drawings: (before SVG, after SVG) physical drawings, or None.
    Returns:
        one HTML document.
    """
    e = escape
    parts = [
        "<!DOCTYPE html>",
        '<html lang="en"><head><meta charset="utf-8"><title>groundcheck: '
        f"{e(d['before'])} → {e(d['after'])}</title><style>{CSS}</style></head><body>",
        f"<h1>{e(d['before'])} → {e(d['after'])}</h1><p>Compared by groundcheck "
        f"{e(__version__)}.</p>",
        f'<p class="caution">{e(d["caution"])}</p>',
        *_verdicts(d),
        *_totals(d, before, after),
    ]
    parts.append(
        '<h2>Findings</h2><table id="changes"><tr><th>change</th><th>severity</th><th>code</th>'
        "<th>finding</th></tr>"
    )
    for tag in ("introduced", "worse", "fixed", "kept"):
        for f in d["findings"].get(tag, []):
            if tag == "worse":
                f = {**f, "message": f"kept, and worse: {f['how']}"}
            parts.append(
                f'<tr><td>{tag}</td><td><span class="sev '
                f'{e(f["severity"])}">{e(f["severity"])}</span></td>'
                f"<td>{e(f['code'])}</td><td>{e(f['message'])}</td></tr>"
            )
    parts.append("</table>")
    if d["hum"]:
        parts.append("<h2>Hum and buzz, before and after</h2>")
        for ch, h in d["hum"].items():
            parts.append(
                f'<h3>{e(ch)}</h3><div class="chart">'
                f"{pair_chart(ch, h['spectrum'], after.options.max_frequency)}</div>"
            )
    _earth_and_outlets(d, parts)
    if drawings:
        parts.append(
            '<h2>Physical drawings</h2><div style="display:flex;gap:1em;flex-wrap:wrap">'
            f'<div class="drawing" id="before" style="flex:1 1 400px"><h3>before</h3>'
            f"{inline_svg(drawings[0])}</div>"
            f'<div class="drawing" id="after" style="flex:1 1 400px"><h3>after</h3>'
            f"{inline_svg(drawings[1])}</div></div>"
        )
    parts.append("</body></html>")
    return "\n".join(parts) + "\n"


def _earth_and_outlets(d: dict, parts: list[str], e=escape) -> None:
    """The protective-earth paths and the voltage between the outlets each interconnect joins,
    before and after."""
    parts.append(
        '<h2>Protective earth</h2><table id="protective-earth"><tr><th>part</th><th>path '
        "before</th>"
        "<th>path after</th><th>touch voltage before</th><th>after</th></tr>"
    )
    for p in d["protective_earth"]:
        ohms = [_ohms(p[k]) for k in ("before_ohm", "after_ohm")]
        parts.append(
            f"<tr><td>{e(p['part'])}</td><td class=num>{ohms[0]}</td><td "
            f"class=num>{ohms[1]}</td><td "
            f"class=num>{cell(p['touch_before_v'], '{:.3g} V')}</td><td "
            f"class=num>{cell(p['touch_after_v'], '{:.3g} V')}</td></tr>"
        )
    parts.append("</table>")
    if d.get("outlets"):
        parts.append(
            "<h2>Voltage between the outlets each interconnect joins</h2><table "
            'id="outlet-voltages"><tr>'
            "<th>interconnect</th><th>between</th><th>unplugged before</th><th>after</th>"
            "<th>as planned before</th><th>after</th></tr>"
        )
        for o in d["outlets"]:
            cells = "".join(
                f"<td class=num>{'–' if o[k] is None else format_si(o[k], 'V')}</td>"
                for k in (
                    "unplugged_before_v",
                    "unplugged_after_v",
                    "planned_before_v",
                    "planned_after_v",
                )
            )
            parts.append(
                f"<tr><td>{e(o['interconnect'])}</td><td>{e(o['between'])}</td>{cells}</tr>"
            )
        parts.append("</table>")
