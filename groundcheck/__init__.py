"""groundcheck: audit the ground (earthing) wiring plan of mains-powered audio equipment.

Library entry points, one per stage of the pipeline::

    plan = groundcheck.load("amp.gplan")        # text -> model
    result = groundcheck.analyze(plan)          # model -> network -> analyses -> findings
    text = groundcheck.render(result, "json")   # findings -> a report

The figures are estimates from the plan, not a substitute for measurement.
"""

from .errors import GroundcheckError, Location, PlanError, PlanErrors
from .loader import load, load_text

__version__ = "0.1.0"
__all__ = ["load", "load_text", "GroundcheckError", "PlanError", "PlanErrors", "Location", "__version__"]
