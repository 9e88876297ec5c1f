"""Placed devices' protective earth on the installation's supply.

A device's own plan states the mains it was written for (TN-S when it says nothing); plugged into
an installation it is supplied by the installation's: its earthing system, and the electrode and
RCD the ``supply`` statement gives.  A TN-S plan that disconnects by its fuse in 30 ms can leave
its chassis at 229 V in a TT building with no RCD, where an earth fault draws under an ampere.
Each device whose own plan states a mains is therefore analysed once more with that mains on the
installation's supply (:meth:`groundcheck.model.supplies.Supply.for_device`); the protective-earth
findings this gives that its own plan does not are the installation's, under the device's name.

Its fault loop runs through the installation as written: the conductors from the outlet it is
plugged into to the main earthing terminal (cables, whose protective core's area is stated and
whose line core is taken as the same unless ``line-cores`` gives its own, and protective wires,
whose line conductor is taken to run beside them at the same size), in place of the final circuit
its own plan assumes. A reel of 50 m of 1 mm² flex puts over 3 Ω in the loop, which no 16 A breaker
clears in 0.4 s. Cables with round cores (cords, reels) and protective wires are taken at IEC 60228
class 5 (flexible), flat cables at class 1/2.

References: IEC 60364-4-41 411.4 (TN) and 411.5 (TT: the fault loop through the electrode, RCDs);
IEC 60228 (conductor resistance).
"""

from __future__ import annotations

import math
from collections import OrderedDict
from dataclasses import replace
from typing import Callable

import networkx as nx

from ..model.installation import suits, transformer_feeds
from ..network.building_earth import building_graph, galvanic_isolator, is_cable, route_factors
from ..model.records import Plan
from ..physics.safety import adiabatic_k
from .pe_figures import installation_survival
from .catalogue import Finding, protective_earth_rule, severity_rank
from .results import Options, Result

__all__ = ["placed_supply_findings", "as_placed", "building_graph", "gives_own_supply"]

#: a device's own plan analysed for the installation, kept by the plan's content: the advisor
#: re-analyses the installation for every candidate, most of which leave the device's plan alone
_ANALYSED: OrderedDict = OrderedDict()
_ANALYSED_MAX = 16

#: rules that judge only the supply a plan states, never what is plugged into it (the outlets'
#: RCD): in an installation the supply is judged once, at its statement (a TT electrode against
#: the RCD is told per device too: it is the touch voltage left on that device's metal)
SUPPLY_RULES = frozenset({"GC225"})


def placed_supply_findings(
    plan: Plan, options: Options, analyze: Callable[[Plan, Options], Result], faults=None
) -> list[Finding]:
    """The protective-earth findings each placed device gets on the installation's supply and not
    on the mains its own plan states.

    Parameters:
        plan: an installation.
        options: the run's settings (the hum budget is not run for these checks).
        analyze: the analysis (:func:`groundcheck.analysis.analyze`).
        faults: a dict that receives, per device, its worst part's fault figures on this supply
            (the part whose fault is cleared last, or never).
    Returns:
        the findings, elements prefixed with the device's name, each message saying which supply.
    References:
        the module's description.
    """
    if plan.supply is None:
        return []
    quick = replace(options, hum=False, jobs=1)
    done: dict = {}
    alone: dict = {}
    worst: dict = {}
    needs: dict = {}  # the installation's conductor -> (area it needs, device, k)
    out: list[Finding] = []
    # a device behind a transformer is supplied by its secondary, not by the building
    behind = transformer_feeds(plan.transformers, plan.conductors, plan.index.devices)
    plugged = {d.name: d.plugged for d in plan.devices}
    graph = building_graph(plan)
    for name, own in plan.device_plans:
        m = own.mains
        if m is not None and (
            m.equipment_class == "II" or gives_own_supply(behind.get(plugged.get(name)), plan)
        ):
            out += _own_findings(name, own, alone, analyze, quick)
            continue
        if m is None:
            continue
        placed, route = as_placed(plan, graph, name, m)
        if id(own) not in alone:
            alone[id(own)] = _analysed(analyze, own, quick)
        key = (id(own), placed)
        if key not in done:
            result = (
                _analysed(analyze, replace(own, mains=placed), quick)
                if placed != m
                else alone[id(own)]
            )
            worst[key] = _worst_part(result)
            done[key] = _reported(result.findings, alone[id(own)].findings)
        out += _as_reported(
            done[key], name, placed, m, unreached=route is None and plugged.get(name)
        )
        if faults is not None and worst.get(key) is not None and (route or not plugged.get(name)):
            faults[name] = worst[key]
        if route is not None and worst.get(key) is not None:
            _route_survival(plan, name, route, worst[key], needs)
    return out + installation_survival(plan, needs)


def _as_reported(reported, name: str, placed, own, unreached) -> list[Finding]:
    """A device's findings on the installation's supply as reported there; ``unreached``: it is
    plugged into an outlet whose earth reaches no main earthing terminal (GC215), where no fault
    loop through the protective earth exists, so figures worked on the circuit its own plan
    assumed would describe a path it does not have: only its own findings are kept."""
    if unreached:
        reported = [(f, its_own) for f, its_own in reported if its_own]
    return [_placed(f, name, placed, own, its_own) for f, its_own in reported]


def gives_own_supply(t, plan: Plan) -> bool:
    """Whether a device plugged in behind transformer ``t`` (None: on the building's outlets) is
    on a supply of the transformer's own rather than the building's: behind an isolating one (its
    secondary floats) or one that changes the voltage. Behind an earthed transformer at the
    supply's voltage (a 1:1 or variable autotransformer at full output) a fault to the device's
    metal is the building's: its current flows out on the supply's line and back through the
    protective conductors, so the building's RCD and breaker see it, and the fault loop runs
    through the transformer's cord (its winding's own resistance left out, the best case).

    Parameters:
        t: the transformer the device is behind, or None.
        plan: the installation.
    Returns:
        True when the device is checked on its own plan's mains only.
    References:
        IEC 60364-4-41 411.4, 411.5 (the fault loop); IEC 60038 (the ±10 % a supply may vary,
        from memory).
    """
    if t is None:
        return False
    return t.isolating or not suits(t.secondary, (plan.supply.voltage, plan.supply.frequency))


def _reported(there, alone) -> list[tuple[Finding, bool]]:
    """The protective-earth findings a device gets on the installation's supply that its own
    plan does not give, and its own dangers, faults and warnings (the installation's too: a glass
    fuse whose breaking capacity is not stated was lost in the installation): each with whether its
    own plan finds it too."""
    mine = {(f.code, f.elements) for f in alone}
    return [
        (f, (f.code, f.elements) in mine)
        for f in there
        if protective_earth_rule(f.code)
        and f.code not in SUPPLY_RULES
        and (
            (f.code, f.elements) not in mine
            or severity_rank(f.severity) <= severity_rank("warning")
        )
    ]


def _own_findings(name: str, own: Plan, alone: dict, analyze, quick: Options) -> list[Finding]:
    """A class II device, or one behind a transformer (supplied by its secondary, not by the
    building), is not checked on the installation's supply; its own plan's protective-earth
    dangers, faults and warnings are still the installation's (a box on a low-voltage adapter that
    makes its high tension inside; a class I box with no earth in its cord behind an isolating
    transformer)."""
    if id(own) not in alone:
        alone[id(own)] = _analysed(analyze, own, quick)
    return [_own(f, name) for f, _ in _reported(alone[id(own)].findings, [])]


def _own(f: Finding, name: str) -> Finding:
    """A class II device's own protective-earth finding as the installation reports it."""
    return replace(
        f,
        message=f"{name}'s own wiring (its own plan finds it too): {f.message}",
        elements=tuple(f"{name}.{e}" for e in f.elements),
    )


def _analysed(analyze, own: Plan, options: Options) -> Result:
    key = (own, options)
    try:
        hit = _ANALYSED.get(key)
    except TypeError:  # a plan that cannot be hashed is analysed each time
        return analyze(own, options)
    if hit is None:
        hit = _ANALYSED[key] = analyze(own, options)
        if len(_ANALYSED) > _ANALYSED_MAX:
            _ANALYSED.popitem(last=False)
    return hit


def as_placed(plan: Plan, graph: nx.Graph, name: str, m):
    """A placed device's mains as the installation supplies it, and its route to the origin: the
    supply's earthing system, electrode, RCD, loop impedance and breaker, the cables from its
    outlet in place of its own circuit, and the cord the installation states for it (as its earth
    path has it).

    Parameters:
        plan: the installation.
        graph: its own protective wiring (:func:`building_graph`).
        name: the device's name.
        m: the device's own mains statement, or None (a device with no plan of its own).
    Returns:
        (the Mains it is checked with, its route or None).
    References:
        IEC 60364-4-41 411.4, 411.5 (the fault loop).
    """
    device = plan.index.devices[name]
    placed = plan.supply.for_device(m)
    route = _route(plan, graph, device.plugged)
    if route is not None:
        placed = replace(
            placed, route=route, route_factors=route_factors(graph, device.plugged, route)
        )
    if device.cord_length is not None:
        area = device.cord_area or placed.cord_area
        placed = replace(placed, cord_length=device.cord_length, cord_area=area)
    return placed, route


def _route_survival(plan: Plan, device: str, route, part, needs: dict) -> None:
    """The cross-section each of the installation's protective conductors on a device's fault
    loop needs to survive the device's worst fault until it is cleared (adiabatic, IEC 60364-5-54
    543.1.2: S ≥ √(I²t)/k, k of a PVC-insulated core of a cable, Annex A), kept per conductor at
    the largest device's."""
    if part.i2t is None:
        return
    k = adiabatic_k("pvc", True)
    need = math.sqrt(part.i2t) / k * 1e-6  # m²
    for cond, _, _, pe_area, _ in route:
        if pe_area < need and need > needs.get(cond, (0.0, None))[0]:
            needs[cond] = (need, device, k, part)


def _worst_part(result: Result | None):
    """A result's line-to-part fault that is cleared last (never, first), then the highest touch
    voltage; None without figures."""
    safety = result.safety if result is not None else None
    parts = [p for p in (safety.parts if safety is not None else ()) if p.fault_current]
    if not parts:
        return None
    return max(
        parts,
        key=lambda p: (p.clear_time is None, p.clear_time or 0.0, p.touch_voltage or 0.0, p.part),
    )


def _route(plan: Plan, graph: nx.Graph, outlet: str | None):
    """The conductors from ``outlet`` to the main earthing terminal along the least resistance,
    as the fault loop takes them: (name, length, line area, protective area, flexible); None when
    the outlet reaches no earthing terminal through them (GC215 reports that)."""
    mets = [p.name for p in plan.points if p.kind == "earthing-terminal" and p.name in graph]
    if outlet is None or outlet not in graph or not mets:
        return None
    try:
        _, path = nx.multi_source_dijkstra(graph, set(mets), outlet, weight="weight")
    except nx.NetworkXNoPath:
        return None
    out = []
    for a, b in zip(path, path[1:]):
        c = graph[a][b]["conductor"]
        if galvanic_isolator(c):
            continue  # no length, no section: its diodes' drop is left out of the loop
        flexible = not is_cable(c) or c.cores == "round"
        out.append((c.name, c.length, c.line_area or c.area, c.area, flexible))
    return tuple(out)


def _placed(f: Finding, name: str, placed, own, its_own: bool = False) -> Finding:
    """A device's finding as the installation reports it (``its_own``: its own plan finds it
    too)."""
    said = [f"{placed.system} supply"]
    if placed.electrode is not None:
        said.append(f"electrode {placed.electrode:g} Ω")
    said.append(f"RCD {placed.rcd * 1e3:g} mA" if placed.rcd is not None else "no RCD")
    if placed.route:
        said.append("its fault loop through " + ", ".join(r[0] for r in placed.route))
    where = (
        f"{name}'s own wiring (its own plan finds it too), plugged into this installation"
        if its_own
        else f"{name}, plugged into this installation"
    )
    assumed = own.system
    if own.rcd is not None and own.rcd != placed.rcd:
        assumed += f" and an RCD of {own.rcd * 1e3:g} mA, not counted here"
    return replace(
        f,
        message=f"{where} ({', '.join(said)}; its own plan assumes {assumed}): {f.message}",
        elements=tuple(f"{name}.{e}" for e in f.elements),
    )
