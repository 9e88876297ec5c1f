"""The output formats of a check, in one registry shared by the command and
``groundcheck.render()``.

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
    several: bool  # whether it can hold several plans in one output
    description: str


def _text(results: list[Result]) -> str:
    from .text import text_report

    return "\n".join(text_report(r) for r in results)


def _json(results: list[Result]) -> str:
    from .jsondoc import render_json, result_document

    if len(results) == 1:
        return render_json(results[0])
    return (
        json.dumps({"plans": [result_document(r) for r in results]}, indent=2, ensure_ascii=False)
        + "\n"
    )


def _sarif(results: list[Result]) -> str:
    from .sarif import render_sarif

    return render_sarif(results)


def _dot(results: list[Result]) -> str:
    from .dot import physical_dot

    return physical_dot(results[0])


def source_lines(plan) -> dict[str, list[str]]:
    """Each file the plan was read from (its own, includes, placed devices' plans) as lines; an
    unreadable one as none."""
    out = {}
    for f in (*plan.files, *plan.device_files):
        try:
            with open(f, encoding="utf-8", errors="replace") as fh:
                out[f] = fh.read().splitlines()
        except OSError:
            out[f] = []
    return out


def both_views(
    result: Result, renderer: str = "auto", physical: bool = True
) -> tuple[list, list[str]]:
    """The physical and topology drawings as SVG, drawn side by side (two Graphviz runs at once).

    Returns ([(svg, what drew it) or None for each view], [why a view could not be drawn]);
    ``physical`` False leaves the physical view out (None, no reason given).
    """
    from concurrent.futures import ThreadPoolExecutor
    from .dot import physical_dot, topology_dot
    from .drawing import DrawingError, render_dot

    jobs = [(physical_dot(result), "neato")] if physical else []
    jobs.append((topology_dot(result), "dot"))
    problems: list[str] = []

    def draw(job):
        try:
            return render_dot(job[0], "svg", job[1], renderer)
        except DrawingError as e:
            problems.append(str(e))
            return None

    with ThreadPoolExecutor(len(jobs)) as pool:
        views = list(pool.map(draw, jobs))
    return ([None] if not physical else []) + views, problems


def html_document(result: Result, renderer: str = "auto") -> tuple[str, str | None]:
    """The HTML report with both drawings, and a warning when they could not be drawn (None when
    they were)."""
    from .html import html_report

    (phys, topo), problems = both_views(result, renderer)
    if problems or phys is None or topo is None:
        return html_report(
            result, None, None, "", source_lines(result.plan)
        ), f"{problems[0]}; the report has no drawings"
    how = f"the physical view by {phys[1]}, the topology by {topo[1]}"
    return html_report(result, phys[0], topo[0], how, source_lines(result.plan)), None


def _html(results: list[Result]) -> str:
    return html_document(results[0])[0]


FORMATS: dict[str, Format] = {
    f.name: f
    for f in (
        Format("text", _text, True, "the terminal report as plain text"),
        Format("json", _json, True, "the JSON document (docs/json.md)"),
        Format("sarif", _sarif, True, "a SARIF 2.1.0 log"),
        Format(
            "html",
            _html,
            False,
            "the self-contained HTML report, with drawings when a renderer is available",
        ),
        Format("dot", _dot, False, "the physical drawing's DOT source"),
    )
}

#: the formats of `groundcheck check --format`
CHECK_FORMATS = ("text", "json", "sarif")


def render_results(results: list[Result], fmt: str) -> str:
    """The results in format ``fmt``; ValueError for an unknown format or several plans in a
    one-plan format."""
    f = FORMATS.get(fmt)
    if f is None:
        raise ValueError(f"unknown format {fmt!r} ({', '.join(FORMATS)})")
    if len(results) > 1 and not f.several:
        raise ValueError(f"the {fmt} format describes one plan at a time")
    return f.render(results)
