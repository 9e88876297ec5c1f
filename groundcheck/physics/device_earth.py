"""An installation's device earth paths: each placed device's protective path from its earth pin to
the main earthing terminal (cord, strips, the building's protective wiring), for GC215."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..network.building_earth import building_graph, isolators_on

from ..model.installation import separated_devices
from ..model.records import PE_POINT, Plan
from ..network.earthing import ProtectiveRoute
from .safety import protective_circuit

__all__ = ["DeviceEarth", "installation_earths"]


@dataclass(frozen=True)
class DeviceEarth:
    """An installation device's protective path from its earth pin to the main earthing
    terminal."""

    device: str
    inlet: str
    resistance: float | None  # Ω, None when the path is broken
    #: a device with a plan of its own, checked on the installation's supply: its worst part's
    #: line-to-part fault (:class:`groundcheck.physics.safety.PartFigures`), None otherwise
    fault: object = None
    #: the galvanic isolators (lift networks with diodes at the installation's level) its earth
    #: reaches the main earthing terminal through, and only through
    through: tuple[str, ...] = ()


#: devices' earth paths solved together (each a column of nodes)
EARTH_COLUMNS = 64


def installation_earths(
    plan: Plan, route: ProtectiveRoute, circuit=None
) -> tuple[DeviceEarth, ...] | None:
    """Each placed device's earth-pin path to the main earthing terminal; None when the plan has no
    placed device or no point of kind ``earthing-terminal``.

    Parameters:
        plan: the plan.
        route: the protective route.
        circuit: the circuit.
    Returns:
        each placed device's earth path, or None when the plan places no device.
    References:
        IEC 60364-5-54.
    """
    class_ii = {d.name for d in plan.devices if d.equipment_class == "II"}  # no earth pin to check
    class_ii |= separated_devices(plan)  # on a floating secondary: no earth path by design
    device_of = plan.index.device_of
    inlets = sorted(
        p.name
        for p in plan.points
        if p.kind == "inlet" and p.name != PE_POINT and device_of(p.name) not in class_ii
    )
    mets = [p.name for p in plan.points if p.kind == "earthing-terminal"]
    if not inlets or not mets:
        return None
    circ = protective_circuit(plan, route, circuit)
    _, labels = circ.components
    met = circ.point_node[mets[0]]
    reach = [n for n in inlets if labels[circ.point_node[n]] == labels[met] and n in route.reached]
    R: dict[str, float] = {}
    factored = circ.dc() if reach else None
    for lo in range(
        0, len(reach), EARTH_COLUMNS
    ):  # in slices: nodes × devices would not fit in memory
        part = reach[lo : lo + EARTH_COLUMNS]
        J = np.zeros((len(circ.nodes), len(part)), dtype=complex)
        for k, n in enumerate(part):
            J[circ.point_node[n], k] += 1.0
            J[met, k] -= 1.0
        sol = factored.solve(J, currents=False)
        for k, n in enumerate(part):
            R[n] = float(abs(sol.V[circ.point_node[n], k] - sol.V[met, k]))
    group = {p.name: p.group for p in plan.points}
    graph = building_graph(plan)
    devices = plan.index.devices
    out = []
    for n in inlets:
        name = group.get(n) or n
        dev = devices.get(name)
        through = tuple(isolators_on(plan, graph, dev.plugged)) if dev is not None else ()
        out.append(DeviceEarth(name, n, R.get(n), through=through))
    return tuple(out)
