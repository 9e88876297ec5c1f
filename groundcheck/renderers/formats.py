"""The output formats, in one registry shared by the commands and ``groundcheck.render()``.

``FORMATS`` turn a list of results into one text (``check``, ``groundcheck.render()``); formats
that describe one plan only (``html``, ``dot``) refuse several.  The other tables hold the formats
of the other outputs: a comparison (``compare``), the advisor's suggestions (``suggest``), the
network as a netlist (``export``), a drawing (``draw``) and a bench record (``bench``); each
command's choices are the names of its table, the first its default.  A renderer module is
imported only when its format is asked for.
"""

from __future__ import annotations


from ..core.jsontext import dumps as json_text
from dataclasses import dataclass
from typing import Callable

from ..rules.results import Result

__all__ = [
    "Format",
    "FORMATS",
    "render_results",
    "CHECK_FORMATS",
    "COMPARISON_FORMATS",
    "SUGGESTION_FORMATS",
    "NETLIST_FORMATS",
    "DRAWING_FORMATS",
    "BENCH_FORMATS",
]


@dataclass(frozen=True)
class Format:
    """One output format: ``render`` takes what its table says (a list of results for
    ``FORMATS``) and returns the text (bytes for a drawing)."""

    name: str
    render: Callable[..., str]
    several: bool  # whether it can hold several plans in one output
    description: str


def _text(results: list[Result]) -> str:
    from .text import text_report

    return "\n".join(text_report(r) for r in results)


def _json(results: list[Result]) -> str:
    from .jsondoc import render_json, result_document

    if len(results) == 1:
        return render_json(results[0])
    return json_text({"plans": [result_document(r) for r in results]}) + "\n"


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

#: the formats of ``groundcheck check --format``: those that can hold several plans, as check takes
#: several
CHECK_FORMATS = tuple(name for name, f in FORMATS.items() if f.several)


def render_results(results: list[Result], fmt: str) -> str:
    """The results in format ``fmt``; ValueError for an unknown format or several plans in a
    one-plan format."""
    f = FORMATS.get(fmt)
    if f is None:
        raise ValueError(f"unknown format {fmt!r} ({', '.join(FORMATS)})")
    if len(results) > 1 and not f.several:
        raise ValueError(f"the {fmt} format describes one plan at a time")
    return f.render(results)


def _comparison_text(d: dict, before: Result, after: Result, warn=None) -> str:
    from ..advice.compare import compare_text

    return compare_text(d)


def _comparison_json(d: dict, before: Result, after: Result, warn=None) -> str:
    from ..advice.compare import compare_json

    return compare_json(d)


def _comparison_html(d: dict, before: Result, after: Result, warn=None) -> str:
    """The comparison page, with both physical drawings when they can be drawn (``warn`` is told
    why when they cannot)."""
    from .compare_page import compare_page
    from .dot import physical_dot
    from .drawing import DrawingError, render_dot

    try:
        drawings = tuple(render_dot(physical_dot(r), "svg", "neato")[0] for r in (before, after))
    except DrawingError as e:
        if warn is not None:
            warn(f"{e}; the comparison has no drawings")
        drawings = None
    return compare_page(d, before, after, drawings)


#: a comparison of two plans (``advice.compare.compare``): render(comparison, before, after, warn)
COMPARISON_FORMATS: dict[str, Format] = {
    f.name: f
    for f in (
        Format("text", _comparison_text, False, "the changes as plain text"),
        Format("json", _comparison_json, False, "the changes as a JSON document"),
        Format("html", _comparison_html, False, "a page with both drawings and the changes"),
    )
}


def _suggestions_text(plan, text: str, name: str, evs, chosen, final, before=None) -> str:
    from ..advice.report import suggestions_text
    from ..core.caution import CAUTION

    return suggestions_text(plan, text, name, evs, chosen, final, CAUTION, before=before)


def _suggestions_json(plan, text: str, name: str, evs, chosen, final, before=None) -> str:
    from ..advice.report import suggestions_document
    from ..core.plain import clean

    doc = suggestions_document(plan, text, name, evs, chosen, final, before=before)
    return json_text(clean(doc)) + "\n"


#: the advisor's suggestions: render(plan, plan text, file name, evaluations, chosen set, result,
#: the result of the plan as written)
SUGGESTION_FORMATS: dict[str, Format] = {
    f.name: f
    for f in (
        Format("text", _suggestions_text, False, "the ranked changes as plain text"),
        Format("json", _suggestions_json, False, "the ranked changes as a JSON document"),
    )
}


def _spice(
    plan, frequency: float | None = None, group=None, channel=None, plate_current="resistive"
) -> str:
    """The plan's ground network as a SPICE netlist with the hum budget's sources at
    ``frequency`` (an AC analysis there; None or 0: the DC operating point): its currents, its
    loops' EMFs (the field directions it uses for ``channel``) and its stages' readings; ``group``
    one source group alone; ``plate_current`` how loop currents cross plates
    (:func:`groundcheck.analysis.netlist_of`)."""
    from ..analysis import netlist_of
    from .spice import to_spice

    f = frequency or 0.0
    circuit, ns = netlist_of(plan, f, group, channel, plate_current)
    notes = [
        f"sources at {f:g} Hz: {', '.join(ns.groups) or 'none'}; "
        + (f"this netlist holds {ns.group} alone" if ns.group else "this netlist holds them all")
        + (f"; loop EMFs for the field directions of channel {ns.channel}" if ns.emfs else ""),
        "groundcheck adds the groups by power (their phases are unrelated): export each with "
        "--source and add its stages' readings as docs/language.md says",
    ]
    sources = [(name, a, b, amps) for name, a, b, amps in ns.currents]
    return to_spice(
        circuit,
        plan.title,
        sources,
        frequency=f,
        analysis="ac" if frequency else "op",
        emfs=ns.emfs,
        readings=ns.readings,
        notes=notes,
    )


#: the ground network of a plan: render(plan, frequency, source group, channel)
NETLIST_FORMATS: dict[str, Format] = {
    "spice": Format(
        "spice",
        _spice,
        False,
        "a plain SPICE netlist, elements named after the plan's conductors (R, L, C, the "
        "plan's current sources, its loops' EMFs and its stages' readings)",
    )
}


def _drawing(fmt: str):
    def render(source: str, engine: str, renderer: str = "auto"):
        from .drawing import render_dot

        return render_dot(source, fmt, engine, renderer)

    return render


#: a drawing of a plan from its DOT source: render(source, layout engine, renderer) gives (the
#: drawing, what drew it)
DRAWING_FORMATS: dict[str, Format] = {
    f.name: f
    for f in (
        Format("svg", _drawing("svg"), False, "an SVG drawing"),
        Format("png", _drawing("png"), False, "a PNG image"),
        Format("dot", _drawing("dot"), False, "the drawing's DOT source"),
    )
}


def _bench(module: str, function: str):
    def render(record) -> str:
        from importlib import import_module

        return getattr(import_module(f".{module}", __package__), function)(record)

    return render


#: a bench record (``measure.bench``): render(record)
BENCH_FORMATS: dict[str, Format] = {
    f.name: f
    for f in (
        Format("text", _bench("bench", "render_bench_text"), False, "the bench record as text"),
        Format("json", _bench("bench", "render_bench_json"), False, "a JSON document"),
        Format("html", _bench("bench_page", "render_bench_html"), False, "a page with charts"),
    )
}
