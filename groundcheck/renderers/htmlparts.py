"""What the HTML pages share: the style sheet, a table cell's number with a dash for none, an SVG
drawing made ready to inline, and a plan line coloured by the plan language's lexer."""

from __future__ import annotations

import math
import re

from ..core.plain import unsigned_zero

__all__ = ["CSS", "cell", "inline_svg", "plan_line_html"]

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
.drawing.fits{border:1px solid #ddd}
.zoom:checked~.drawing.fits{overflow:auto;max-height:90vh}
.zoom:checked~.drawing.fits svg{max-width:none}
pre.planline{margin:.3em 0;padding:.2em .4em;background:#f7f7f2;white-space:pre-wrap;
font-size:.85em}
.ok{color:#227722}.bad{color:#b00020;font-weight:bold}
@media print{body{margin:0;max-width:none}.zoom,.zoom+label{display:none}
.drawing{page-break-inside:avoid}
h2{page-break-after:avoid}}
"""


def cell(x, fmt="{:.3g}", dash="–") -> str:
    """``x`` formatted by ``fmt``, a dash for none or not finite, never a minus zero."""
    if x is None or (isinstance(x, float) and not math.isfinite(x)):
        return dash
    return unsigned_zero(fmt.format(x))


def inline_svg(svg: bytes | str | None) -> str:
    """A drawing to put inside the page: its XML header, document type and comments left out."""
    if not svg:
        return "<p>(no drawing: no renderer available)</p>"
    text = svg.decode("utf-8") if isinstance(svg, bytes) else svg
    text = re.sub(r"<\?xml[^>]*\?>", "", text)
    text = re.sub(r"<!DOCTYPE[^>]*>", "", text)
    text = re.sub(r"<!--.*?-->", "", text, flags=re.S)
    return text.strip()


def plan_line_html(text: str) -> str:
    """One plan line as HTML, coloured by the plan language's lexer (inline styles: the report
    stands alone)."""
    from pygments import highlight
    from pygments.formatters import HtmlFormatter
    from .lexer import PlanLexer

    return highlight(text, PlanLexer(), HtmlFormatter(nowrap=True, noclasses=True)).rstrip("\n")
