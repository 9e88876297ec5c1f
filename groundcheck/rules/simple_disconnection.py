"""The disconnection of a fault in a bought class I device that has no plan of its own.

When the installation's ``supply`` states the breaker of the final circuits that feed its outlets
(or the RCD that protects them), a fault from line to the metal of such a device is checked as a
placed device's is: through the cables and protective wires from the outlet it is plugged into to
the main earthing terminal (:func:`groundcheck.rules.placed_supply.as_placed`), its cord, the
supply's external loop, and the breaker or RCD that must clear it within IEC 60364-4-41's time.
The device's own protective path inside it is unknown and taken as nothing, the best case: a
fault that is not cleared in time with it is not cleared in time in the device as built.

References: IEC 60364-4-41 411.3.2 (Table 41.1), 411.4 (TN), 411.5 (TT); IEC 60898-1 (breakers).
"""

from __future__ import annotations

from dataclasses import replace

from ..model.installation import transformer_feeds
from ..model.records import Plan
from ..physics.safety import line_to_part, supply_figures
from .catalogue import Finding
from .disconnection import late_simple_device
from .placed_supply import as_placed, building_graph

__all__ = ["simple_device_disconnection"]


def simple_device_disconnection(plan: Plan, faults: dict | None = None) -> list[Finding]:
    """GC208 for each class I device without a plan of its own whose fault the installation's
    breaker (or RCD) does not clear in time.

    Parameters:
        plan: an installation.
        faults: a dict that receives, per such device, its fault figures on this supply.
    Returns:
        the findings, at each device's own line.
    References:
        the module's description.
    """
    supply = plan.supply
    if supply is None or (supply.breaker is None and supply.rcd is None):
        return []
    own = {name for name, p in plan.device_plans if p.mains is not None}
    behind = transformer_feeds(plan.transformers, plan.conductors, plan.index.devices)
    graph = building_graph(plan)
    out = []
    for d in plan.devices:
        if d.name in own or d.equipment_class != "I" or d.plugged is None or d.plugged in behind:
            continue
        placed, route = as_placed(plan, graph, d.name, None)
        as_plan = replace(plan, mains=placed)
        loop = supply_figures(as_plan)
        part = line_to_part(as_plan, loop, d.name, 0.0)
        if faults is not None:
            faults[d.name] = part
        out += late_simple_device(d, placed, loop.max_time, part, route)
    return out
