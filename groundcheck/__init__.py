"""groundcheck: audit the ground (earthing) wiring plan of mains-powered audio equipment.

Library entry points, one per stage of the pipeline::

    plan = groundcheck.load("amp.gplan")        # text -> model
    result = groundcheck.analyze(plan)          # model -> network -> analyses -> findings
    text = groundcheck.render(result, "json")   # findings -> a report (text, json, sarif, html, dot)

The figures are estimates from the plan, not a substitute for measurement.
"""

from .core.errors import GroundcheckError, Location, PlanError, PlanErrors
from .language.loader import load, load_text

from .core.version import __version__
__all__ = ["load", "load_text", "analyze", "render", "GroundcheckError", "PlanError", "PlanErrors", "Location",
           "__version__"]


def analyze(plan, options=None):
    """Run every analysis on a loaded plan; see :func:`groundcheck.analysis.analyze`."""
    from .analysis import Options, analyze as _analyze
    return _analyze(plan, options or Options())


def render(result, fmt: str = "text") -> str:
    """A report of a result as text: ``text``, ``json``, ``sarif``, ``html`` (drawings when a renderer is
    available) or ``dot`` (the physical drawing's source)."""
    if fmt == "text":
        from .renderers.text import text_report
        return text_report(result)
    if fmt == "json":
        from .renderers.jsondoc import render_json
        return render_json(result)
    if fmt == "sarif":
        from .renderers.sarif import render_sarif
        return render_sarif([result])
    if fmt == "dot":
        from .renderers.dot import physical_dot
        return physical_dot(result)
    if fmt == "html":
        from .renderers.drawing import DrawingError, render_dot
        from .renderers.dot import physical_dot, topology_dot
        from .renderers.html import html_report
        try:
            phys, how = render_dot(physical_dot(result), "svg", "neato")
            topo, _ = render_dot(topology_dot(result), "svg", "dot")
        except DrawingError:
            phys = topo = None
            how = ""
        return html_report(result, phys, topo, how)
    raise ValueError(f"unknown format {fmt!r} (text, json, sarif, html, dot)")
