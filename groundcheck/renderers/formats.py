"""The output formats of a check, in one registry shared by the command and ``groundcheck.render()``.

Each format turns a list of results into one text.  Formats that describe one plan only (``html``,
``dot``) refuse several.  A renderer module is imported only when its format is asked for.
"""

from __future__ import annotations

import json
from dataclasses import dataclass
from typing import Callable

from ..rules.results import Result

__all__ = ["Format", "FORMATS", "render_results", "CHECK_FORMATS"]


@dataclass(frozen=True)
class Format:
    name: str
    render: Callable[[list[Result]], str]
    several: bool               # whether it can hold several plans in one output
    description: str


def _text(results: list[Result]) -> str:
    from .text import text_report
    return "\n".join(text_report(r) for r in results)


def _json(results: list[Result]) -> str:
    from .jsondoc import render_json, result_document
    if len(results) == 1:
        return render_json(results[0])
    return json.dumps({"plans": [result_document(r) for r in results]}, indent=2, ensure_ascii=False) + "\n"


def _sarif(results: list[Result]) -> str:
    from .sarif import render_sarif
    return render_sarif(results)


def _dot(results: list[Result]) -> str:
    from .dot import physical_dot
    return physical_dot(results[0])


def source_lines(plan) -> dict[str, list[str]]:
    """Each file the plan was read from (its own, includes, placed devices' plans) as lines; an unreadable one
    as none."""
    out = {}
    for f in (*plan.files, *plan.device_files):
        try:
            with open(f, encoding="utf-8", errors="replace") as fh:
                out[f] = fh.read().splitlines()
        except OSError:
            out[f] = []
    return out


def html_document(result: Result, renderer: str = "auto") -> tuple[str, str | None]:
    """The HTML report with both drawings, and a warning when they could not be drawn (None when they were)."""
    from .dot import physical_dot, topology_dot
    from .drawing import DrawingError, render_dot
    from .html import html_report
    try:
        phys, how_p = render_dot(physical_dot(result), "svg", "neato", renderer)
        topo, how_t = render_dot(topology_dot(result), "svg", "dot", renderer)
    except DrawingError as e:
        return html_report(result, None, None, "", source_lines(result.plan)), f"{e}; the report has no drawings"
    how = f"the physical view by {how_p}, the topology by {how_t}"
    return html_report(result, phys, topo, how, source_lines(result.plan)), None


def _html(results: list[Result]) -> str:
    return html_document(results[0])[0]


FORMATS: dict[str, Format] = {f.name: f for f in (
    Format("text", _text, True, "the terminal report as plain text"),
    Format("json", _json, True, "the JSON document (docs/json.md)"),
    Format("sarif", _sarif, True, "a SARIF 2.1.0 log"),
    Format("html", _html, False, "the self-contained HTML report, with drawings when a renderer is available"),
    Format("dot", _dot, False, "the physical drawing's DOT source"),
)}

#: the formats of `groundcheck check --format`
CHECK_FORMATS = ("text", "json", "sarif")


def render_results(results: list[Result], fmt: str) -> str:
    """The results in format ``fmt``; ValueError for an unknown format or several plans in a one-plan format."""
    f = FORMATS.get(fmt)
    if f is None:
        raise ValueError(f"unknown format {fmt!r} ({', '.join(FORMATS)})")
    if len(results) > 1 and not f.several:
        raise ValueError(f"the {fmt} format describes one plan at a time")
    return f.render(results)
