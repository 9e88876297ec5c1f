"""What both drawings share: the colours of the visual scheme (see
:mod:`groundcheck.renderers.dot`), DOT quoting, the SVG class of each plan element, the finding
codes per element, and the legend."""

from __future__ import annotations

from collections import defaultdict
from ..core.errors import html_text as escape, shown

from ..model.kinds import BOND, HEATER, PROTECTIVE, RETURN, SHIELD, SIGNAL
from ..rules.results import Result

__all__ = [
    "ROLE_STYLE",
    "LIFT_STYLE",
    "LOOP_HALO",
    "PROBLEM_HALO",
    "DRAWING_CAUTION",
    "dot_quote",
    "element_class",
    "attrs",
    "problems",
    "legend",
    "LEGEND_ROWS",
    "LEGEND_SIZE",
]

ROLE_STYLE = {
    PROTECTIVE: {"color": "#2f7d32:#f2c200:#2f7d32", "penwidth": "2.2"},
    RETURN: {"color": "#d2691e", "penwidth": "2.0"},
    SIGNAL: {"color": "#1f5fa8", "penwidth": "1.6"},
    SHIELD: {"color": "#7a7a7a", "penwidth": "1.4", "style": "dashed"},
    BOND: {"color": "#404040", "penwidth": "1.2", "style": "dotted"},
    HEATER: {"color": "#b8860b", "penwidth": "1.6"},
}
LIFT_STYLE = {"color": "#7b3fa0", "penwidth": "1.8", "style": "dashed"}
LOOP_HALO = "#f5a80066"
#: the caution as the drawings carry it (short lines under the legend); every other output has it
#: whole
DRAWING_CAUTION = (
    "Caution: lethal voltages in mains and valve circuits;",
    "never lift the protective earth.",
    "Estimates from the plan, not measurements;",
    "follow local codes, have mains work checked.",
)
PROBLEM_HALO = "#e0303088"


def dot_quote(text: str) -> str:
    """A DOT double-quoted string: backslashes and quotes escaped, line breaks flattened."""
    s = shown(text).replace("\\", "\\\\").replace('"', '\\"').replace("\r", " ").replace("\n", " ")
    return f'"{s}"'


def element_class(name: str) -> str:
    """The SVG class that marks a plan element's shapes in both drawings (the live view highlights
    by it).

    Letters and digits are kept; every other character becomes ``_`` and its code in hex, so the
    class is one token that no other name maps to.
    """
    return "gc-" + "".join(
        ch if ch.isascii() and ch.isalnum() else f"_{ord(ch):x}_" for ch in name
    )


def attrs(d: dict) -> str:
    return ", ".join(f"{k}={dot_quote(v)}" for k, v in d.items())


def problems(result: Result):
    """Finding codes per element name (conductors, points, parts), sorted."""
    marks: dict[str, set[str]] = defaultdict(set)
    for f in result.findings:
        if f.severity == "note":
            continue
        for e in f.elements:
            marks[e].add(f.code)
    return {k: sorted(v) for k, v in marks.items()}


#: the legend's rows: a swatch's colour and what it stands for (both renderers draw these)
LEGEND_ROWS = (
    ("#2f7d32", "protective earth (green-and-yellow)"),
    ("#d2691e", "supply return"),
    ("#1f5fa8", "signal reference"),
    ("#7a7a7a", "shield (dashed)"),
    ("#404040", "fastening (dotted)"),
    ("#7b3fa0", "lift network (dashed)"),
    ("#f5a800", "ground loop (band)"),
    ("#e03030", "problem (halo, codes)"),
)
#: the legend's size in points as Graphviz lays out its table (the node asks for as much, so that a
#: Graphviz without HTML labels leaves the same room; :func:`~.drawing.draw_legend` fills it)
LEGEND_SIZE = (245.0, 194.0)


def legend(x: float, y: float) -> str:
    """The legend node: a table of swatches and the drawing's caution, at (x, y) points."""
    cells = "".join(
        f'<TR><TD BGCOLOR="{c}" WIDTH="18"> </TD><TD ALIGN="LEFT">{t}</TD></TR>'
        for c, t in LEGEND_ROWS
    )
    caution = "<BR/>".join(escape(x) for x in DRAWING_CAUTION)
    label = (
        '<<TABLE BORDER="1" CELLBORDER="0" CELLSPACING="2" COLOR="#999999"><TR><TD '
        f'COLSPAN="2"><B>legend</B></TD></TR>{cells}<TR><TD COLSPAN="2" ALIGN="LEFT"><FONT '
        f'COLOR="#8a4b00">{caution}</FONT></TD></TR></TABLE>>'
    )
    # a little under the table's size: the table decides it where HTML labels are read
    w, h = (v / 72 - 0.005 for v in LEGEND_SIZE)
    return (
        f"  legend [shape=plaintext, fontsize=9, width={w:.3f}, height={h:.3f}, "
        f'pos="{x:.1f},{y:.1f}!", label={label}];'
    )
