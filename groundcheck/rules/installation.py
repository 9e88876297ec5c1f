"""Installation rules: how the devices of an installation meet each other.

Each rule is a pure function of an :class:`~groundcheck.rules.context.AuditContext` returning
findings, registered under the codes it makes (:mod:`groundcheck.rules.registry`).
"""

from __future__ import annotations

from collections import deque

from ..model.installation import conductors_by_device, device_chassis, device_of, shield_ends
from ..model.kinds import (
    LEAKAGE,
    PROTECTIVE_ROLES,
    can_open,
    in_device_ground,
    is_fastening,
    is_lift,
    joins_devices,
)
from .catalogue import Finding
from .context import AuditContext
from .registry import rule

__all__ = [
    "rule_shield_on_signal_ground",
    "rule_leakage_limit",
    "signal_ground_path",
    "LEAKAGE_LIMIT",
]

#: the largest leakage current of a plug-connected class I device and of a class II device, A (IEC
#: 60950-1:2005,
#: 5.1.7 and Table 5A; see GC216 in the catalogue)
LEAKAGE_LIMIT = {"I": 3.5e-3, "II": 0.25e-3}


def signal_ground_path(conductors, start: str, chassis: str, dev: str, metals) -> list[str]:
    """The device's signal-ground wiring between a point and its chassis.

    Parameters:
        conductors: the device's own conductors.
        start: the point (where a shield lands).
        chassis: the device's chassis (a metal part).
        dev: the device's name (its conductors' prefix).
        metals: the plan's metal parts by name.
    Returns:
        the device's own conductors on the path of fewest conductors from ``start`` to the chassis,
        protective conductors and fastenings left out of the answer (not of the search); [] when
        fastenings alone join them, or they are not joined.
    References:
        breadth-first search (Cormen et al., *Introduction to Algorithms*).
    """
    adj: dict = {}
    for c in conductors:
        if c.connects and c.name.startswith(dev + ".") and in_device_ground(c):
            adj.setdefault(c.a, []).append((c.b, c))
            adj.setdefault(c.b, []).append((c.a, c))
    parent: dict = {start: None}
    q = deque([start])
    while q:
        u = q.popleft()
        if u == chassis:
            break
        for v, c in adj.get(u, ()):
            if v not in parent:
                parent[v] = (u, c)
                q.append(v)
    if chassis not in parent:
        return []
    out, v = [], chassis
    while parent[v] is not None:
        u, c = parent[v]
        if c.role not in PROTECTIVE_ROLES and not is_fastening(c, metals):
            out.append(c.name)
        v = u
    return out[::-1]


@rule("GC113")
def rule_shield_on_signal_ground(ctx: AuditContext) -> list[Finding]:
    """GC113: an interconnect's shield, conducting at both ends, lands on a device's signal ground
    inside the device, so the current it carries crosses the device's signal-ground wiring to reach
    the chassis.

    Parameters:
        ctx: the audit context.
    Returns:
        GC113 findings, one per shield end.
    References:
        the rule catalogue (rules/catalogue.py), which names each code's sources.
    """
    plan = ctx.plan
    devices = plan.index.devices
    if not devices:
        return []
    metals = plan.index.metals
    own = conductors_by_device(plan.conductors, devices)
    out = []
    for c in plan.conductors:
        if not joins_devices(c) or not c.connects or not c.balanced:
            continue  # an unbalanced link's shield is its signal return: it belongs there
        for end, landing in zip((c.a, c.b), shield_ends(c)):
            dev = device_of(end, devices) if landing == "signal" else None
            chassis = device_chassis(dev, own.get(dev, []), metals, end) if dev else None
            if chassis is None:
                continue
            if not _amplifies(plan, dev, devices):
                continue  # a passive box (a transformer DI, a step-up): no circuit ground to cross
            path = signal_ground_path(own.get(dev, []), end, chassis, dev, metals)
            if not path or _through_a_lift(own.get(dev, []), path):
                continue
            advice = (
                "land the shield on the chassis where the cable enters ('shield-to chassis'), "
                f"leaving {dev}'s signal ground one bond of its own"
            )
            out.append(
                Finding(
                    "GC113",
                    "warning",
                    f"the shield of {c.name} lands on {dev}'s signal ground at {end}: the current "
                    f"it carries crosses {', '.join(path)} on its way to {chassis}",
                    c.location,
                    (c.name, end, *path),
                    {"conductors": len(path)},
                    f"{advice}; never lift the protective earth",
                    (("shield-to", c.name, end),),
                )
            )
    return out


def _amplifies(plan, dev: str, devices) -> bool:
    """Whether device ``dev`` holds a stage of its own (a circuit whose ground a shield's current
    would add to its signal); a passive box has none."""
    return any(device_of(s.a, devices) == dev == device_of(s.b, devices) for s in plan.stages)


def _through_a_lift(conductors, path: list[str]) -> bool:
    """Whether the shield's way to the chassis runs through a ground-lift switch or network: the
    builder's own lift (a box's pin 1 to its case through a switch), which a shield landed on the
    chassis would bypass."""
    by_name = {c.name: c for c in conductors}
    return any(n in by_name and (can_open(by_name[n]) or is_lift(by_name[n])) for n in path)


@rule("GC216")
def rule_leakage_limit(ctx: AuditContext) -> list[Finding]:
    """GC216: a device whose leakage current (stated, or from its Y capacitance at its supply) is
    above the limit of its protection class.

    Parameters:
        ctx: the audit context.
    Returns:
        GC216 findings, one per device over its limit.
    References:
        IEC 60950-1:2005, 5.1.7 and Table 5A (LEAKAGE_LIMIT).
    """
    plan = ctx.plan
    leaks = {c.name: c for c in plan.currents if c.role == LEAKAGE}
    out = []
    for dev in plan.devices:
        cur = leaks.get(f"{dev.name}.leakage")
        limit = LEAKAGE_LIMIT.get(dev.equipment_class)
        if cur is None or limit is None:
            continue
        amps = max(abs(a) for a, _ in cur.parts)
        if amps <= limit:
            continue
        how = "stated" if dev.leakage is not None else "from its Y capacitance at its supply"
        if dev.equipment_class == "I":
            what = (
                f"a plug-connected class I device may leak at most {limit * 1e3:g} mA into its "
                "protective conductor, and with its earth lost this current flows through "
                "whoever touches the chassis"
            )
        else:
            what = (
                f"a class II device may give at most {limit * 1e3:g} mA to parts that are "
                "touched: it has no protective conductor to take it"
            )
        then = (
            "needs a permanent or industrial connection and a qualified person's check; never "
            "lift its protective earth"
            if dev.equipment_class == "I"
            else "is not safe to touch as built: have it checked by a qualified person, and do "
            "not earth it yourself"
        )
        out.append(
            Finding(
                "GC216",
                "fault",
                f"{dev.name} leaks {amps * 1e3:.3g} mA ({how}): {what}",
                dev.location,
                (dev.name,),
                {"leakage_a": amps, "limit_a": limit},
                "check the figure against the maker's data or a measurement (a Y capacitance in "
                f"nF, not µF); a device that truly leaks this much {then}",
            )
        )
    return out
