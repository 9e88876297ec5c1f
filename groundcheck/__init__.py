"""groundcheck: audit the ground (earthing) wiring plan of mains-powered audio equipment.

Library entry points, one per stage of the pipeline::

    plan = groundcheck.load("amp.gplan")        # text -> model
    result = groundcheck.analyze(plan)          # model -> network -> analyses -> findings
    text = groundcheck.render(result, "json")   # findings -> a report (text, json, sarif, html,
    dot)

The figures are estimates from the plan, not a substitute for measurement.
"""

from .core.errors import GroundcheckError, Location, PlanError, PlanErrors
from .core.version import __version__

__all__ = [
    "load",
    "load_text",
    "analyze",
    "render",
    "GroundcheckError",
    "PlanError",
    "PlanErrors",
    "Location",
    "__version__",
]


def __getattr__(name: str):
    """``load`` and ``load_text`` (:mod:`groundcheck.language.loader`), imported when first asked
    for: the ``groundcheck`` command's first step, its signal handler, runs before the parser is
    imported."""
    if name in ("load", "load_text"):
        from .language import loader

        return getattr(loader, name)
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")


def analyze(plan, options=None):
    """Run every analysis on a loaded plan; see :func:`groundcheck.analysis.analyze`."""
    from .analysis import Options, analyze as _analyze

    return _analyze(plan, options or Options())


def render(result, fmt: str = "text") -> str:
    """A report of a result as text: ``text``, ``json``, ``sarif``, ``html`` (drawings when a
    renderer is available) or ``dot`` (the physical drawing's source); see
    :mod:`groundcheck.renderers.formats`."""
    from .renderers.formats import render_results

    return render_results([result], fmt)
