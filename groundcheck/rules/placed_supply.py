"""Placed devices' protective earth on the installation's supply.

A device's own plan states the mains it was written for (TN-S when it says nothing); plugged into
an installation it is supplied by the installation's: its earthing system, and the electrode and
RCD the ``supply`` statement gives.  A TN-S plan that disconnects by its fuse in 30 ms can leave
its chassis at 229 V in a TT building with no RCD, where an earth fault draws under an ampere.
Each device whose own plan states a mains is therefore analysed once more with that mains on the
installation's supply (:meth:`groundcheck.model.supplies.Supply.for_device`); the protective-earth
findings this gives that its own plan does not are the installation's, under the device's name.

References: IEC 60364-4-41 411.4 (TN) and 411.5 (TT: the fault loop through the electrode, RCDs).
"""

from __future__ import annotations

from dataclasses import replace
from typing import Callable

from ..model.installation import transformer_feeds
from ..model.records import Plan
from .catalogue import Finding, protective_earth_rule
from .results import Options, Result

__all__ = ["placed_supply_findings"]


def placed_supply_findings(
    plan: Plan, options: Options, analyze: Callable[[Plan, Options], Result]
) -> list[Finding]:
    """The protective-earth findings each placed device gets on the installation's supply and not
    on the mains its own plan states.

    Parameters:
        plan: an installation.
        options: the run's settings (the hum budget is not run for these checks).
        analyze: the analysis (:func:`groundcheck.analysis.analyze`).
    Returns:
        the findings, elements prefixed with the device's name, each message saying which supply.
    References:
        the module's description.
    """
    supply = plan.supply
    if supply is None:
        return []
    quick = replace(options, hum=False, jobs=1)
    done: dict = {}
    out: list[Finding] = []
    # a device behind a transformer is supplied by its secondary, not by the building
    behind = transformer_feeds(plan.transformers, plan.conductors, plan.index.devices)
    plugged = {d.name: d.plugged for d in plan.devices}
    for name, own in plan.device_plans:
        m = own.mains
        if m is None or m.equipment_class == "II" or plugged.get(name) in behind:
            continue
        placed = supply.for_device(m)
        if placed == m:
            continue  # its own check is the installation's
        key = (id(own), placed)
        if key not in done:
            alone = {(f.code, f.elements) for f in analyze(own, quick).findings}
            there = analyze(replace(own, mains=placed), quick).findings
            done[key] = [
                f
                for f in there
                if protective_earth_rule(f.code) and (f.code, f.elements) not in alone
            ]
        out += [_placed(f, name, placed, m) for f in done[key]]
    return out


def _placed(f: Finding, name: str, placed, own) -> Finding:
    """A device's finding as the installation reports it."""
    said = [f"{placed.system} supply"]
    if placed.electrode is not None:
        said.append(f"electrode {placed.electrode:g} Ω")
    said.append(f"RCD {placed.rcd * 1e3:g} mA" if placed.rcd is not None else "no RCD")
    return replace(
        f,
        message=(
            f"{name}, plugged into this installation ({', '.join(said)}; its own plan assumes "
            f"{own.system}): {f.message}"
        ),
        elements=tuple(f"{name}.{e}" for e in f.elements),
    )
