"""The HTML report's hum spectrum chart (inline SVG): a stem per harmonic against the threshold of
hearing, on a logarithmic frequency axis."""

from __future__ import annotations

import math

from ..core.errors import html_text as escape
from ..physics.hearing import threshold_of_hearing

__all__ = ["chart_frame", "spectrum_svg"]


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


def _level(r, listening: bool) -> float | None:
    """A spectrum line's stem height: dB SPL at the listener, or dBV at the output."""
    x = r.spl if listening else r.dbv
    return x if x is not None and math.isfinite(x) else None


def spectrum_svg(channel, listening: bool, max_freq: float) -> str:
    """A chart of one channel's hum: a stem per harmonic, and the threshold of hearing as a line.

    With a listening context the axis is dB SPL at the listener; otherwise dBV at the output.
    """
    W, H, L, R, T, B = 640, 260, 50, 10, 15, 35
    rows = channel.spectrum_shown
    vals = [_level(r, listening) for r in rows if _level(r, listening) is not None]
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
    out += _marks(rows, listening, X, Y, (lo_f, hi_f, bottom), (W, R, T))
    out.append("</svg>")
    return "".join(out)


def _marks(rows, listening, X, Y, span, box) -> list[str]:
    """The threshold of hearing as a line (with a listening context) and a stem per harmonic;
    ``span``: the lowest and highest frequency and the lowest level; ``box``: the width and the
    right and top margins."""
    lo_f, hi_f, bottom = span
    W, R, T = box
    out: list[str] = []
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
        y = _level(r, listening)
        if y is None:
            continue
        audible = listening and r.audible
        color = "#c0392b" if audible else "#2c6fbb"
        out.append(
            f'<line x1="{X(r.frequency):.1f}" y1="{Y(bottom):.1f}" '
            f'x2="{X(r.frequency):.1f}" '
            f'y2="{Y(y):.1f}" stroke="{color}" stroke-width="3"><title>{r.frequency:g} '
            "Hz: "
            f"{y:.1f}{' dB SPL' if listening else ' dBV'}</title></line>"
        )
    return out
