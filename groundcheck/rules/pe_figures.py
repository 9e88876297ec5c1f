"""Verdicts on the protective-earth figures (:mod:`groundcheck.physics.safety`): the path
resistance to each part (GC206), conductors that would not survive the fault (GC207), the
disconnection time (GC208), the breaking capacity (GC211), stated clearing figures the fuse table
contradicts (GC214), and each placed device's earth path to the main earthing terminal (GC215).

Pure functions of the solved network (:class:`~groundcheck.rules.electrical.Solved`), registered
under their codes (:mod:`groundcheck.rules.registry`).
"""

from __future__ import annotations

from typing import TYPE_CHECKING

from ..model.supplies import DEVICE_EARTH_LIMIT
from ..model.records import Plan
from ..physics.protection import STANDARD_PE_LIMIT, device_clearing, max_disconnection_time
from ..physics.safety import supply_figures
from .catalogue import Finding
from .disconnection import device_text, disconnection, no_clearing_device
from .registry import rule

if TYPE_CHECKING:
    from ..physics.safety import SafetyResult
    from .electrical import Solved

__all__ = [
    "rule_protective_figures",
    "rule_device_earths",
    "plan_conductor",
    "installation_survival",
    "DEVICE_EARTH_LIMIT",
]


@rule("GC206", "GC207", "GC208", "GC211", "GC214", needs="solve")
def rule_protective_figures(s: Solved) -> list[Finding]:
    """GC206, GC207, GC208, GC211, GC214 from the protective-earth figures.

    Parameters:
        s: the solved network with its context.
    Returns:
        GC206–GC208, GC211, GC214 findings.
    References:
        the rule catalogue (rules/catalogue.py), which names each code's sources.
    """
    if s.safety is None:
        m = s.plan.mains
        return (
            _breaking(s.plan, supply_figures(s.plan))
            if m is not None and m.fuse is not None
            else []
        )
    plan, safety = s.plan, s.safety
    out = []
    for p in safety.parts:
        out.extend(_path_resistance(plan, safety, p))
        out.extend(disconnection(plan, safety, p))
    out.extend(no_clearing_device(plan, safety))
    out.extend(_breaking(plan, safety.supply))
    out.extend(_stated_contradictions(plan, safety))
    out.extend(_survival(plan, safety))
    return out


def _path_resistance(plan: Plan, safety: SafetyResult, p) -> list[Finding]:
    """GC206: the protective path to a part over the limit (a warning when only a relaxed
    ``--pe-limit`` passed it)."""
    part = plan.metal(p.part)
    figs = {
        "path_resistance_mohm": p.path_resistance * 1e3,
        "limit_mohm": safety.limit * 1e3,
    }
    if p.path_resistance > safety.limit:
        return [
            Finding(
                "GC206",
                "danger",
                f"protective path to {p.part} is {p.path_resistance * 1e3:.1f} mΩ, over the "
                f"{safety.limit * 1e3:.0f} mΩ limit",
                part.location,
                (p.part,),
                figs,
                "shorten or thicken the protective conductor; clean and tighten the "
                "fastenings on its path",
            )
        ]
    if safety.relaxed and p.path_resistance > STANDARD_PE_LIMIT:
        return [
            Finding(
                "GC206",
                "warning",
                f"protective path to {p.part} is {p.path_resistance * 1e3:.1f} mΩ, over the "
                f"{STANDARD_PE_LIMIT * 1e3:.0f} mΩ product-safety limit; passed only because "
                f"--pe-limit relaxed the limit to {safety.limit * 1e3:.0f} mΩ",
                part.location,
                (p.part,),
                {**figs, "standard_limit_mohm": STANDARD_PE_LIMIT * 1e3},
                "shorten or thicken the protective conductor; clean and tighten the "
                "fastenings on its path",
            )
        ]
    return []


def _survival(plan: Plan, safety: SafetyResult) -> list[Finding]:
    """GC207: a conductor on the fault's path too thin to survive until the fault is cleared."""
    out = []
    worst = max((p for p in safety.parts if p.i2t is not None), key=lambda p: p.i2t, default=None)
    # the fault ahead of the equipment's fuse is the breaker's: no fuse of its own shortens it
    fix = (
        "use a thicker protective conductor: the worst fault (at the inlet, ahead of the "
        "equipment's fuse) is the breaker's to clear, which no faster fuse shortens"
        if worst is not None and worst.device == "breaker" and plan.mains.fuse is not None
        else "use a thicker protective conductor, or a faster or lower-rated fuse the "
        "equipment allows"
    )
    for row in safety.conductors:
        if not row.survives:
            c = plan_conductor(plan, row.conductor)
            out.append(
                Finding(
                    "GC207",
                    "danger",
                    f"{row.conductor} ({row.area * 1e6:.4g} mm²) would not survive the fault "
                    f"until it is cleared: it needs {row.required * 1e6:.4g} mm² (k = {row.k:g})",
                    c.location if c else plan.mains.location,
                    (row.conductor,),
                    {
                        "conductor": row.conductor,
                        "area_mm2": row.area * 1e6,
                        "k": row.k,
                        "required_mm2": row.required * 1e6,
                        "survives": row.survives,
                    },
                    fix,
                )
            )
    return out


#: supplies at or below this (V) take fuses rated at 125 V, whose breaking capacity at their
#: voltage is often far above IEC 60127's low-breaking 35 A at 250 V (the North American
#: miniature-fuse standard for 125 V fuses, from memory)
LOW_MAINS = 130.0


def _breaking(plan: Plan, sup) -> list[Finding]:
    """GC211: a prospective current — a line-to-protective fault at the inlet or a line-to-neutral
    short inside the equipment, the cables cold — beyond what the fuse or breaker can break,
    whatever is touchable."""
    m, out = plan.mains, []
    worst = sup.prospective
    if sup.breaking_capacity is not None and worst > sup.breaking_capacity:
        stated = (
            m.breaking is not None
            or m.breaking_current is not None
            or m.fuse_kind.startswith("breaker")
        )
        device = (
            "breaker"
            if m.fuse_kind.startswith("breaker")
            else f"{m.breaking or 'low'}-breaking fuse"
        )
        assumed = (
            "" if stated else " (breaking capacity not stated: a low-breaking glass fuse assumed)"
        )
        if not stated and m.voltage <= LOW_MAINS:
            # IEC 60127's low-breaking figure is at 250 V; fuses rated at 125 V often break more
            assumed += (
                f"; that figure is IEC 60127's at 250 V: on a {m.voltage:g} V supply, state "
                "your fuse's breaking rating at that voltage from its data sheet (', breaking "
                "10000 A', say) to have it checked instead"
            )
        what = (
            f"a {'line-to-line' if m.system == 'IT' else 'line-to-neutral'} short inside the "
            "equipment"
            if sup.short_circuit >= sup.earth_fault_max
            else "a line-to-protective fault at the inlet"
        )
        out.append(
            Finding(
                "GC211",
                "danger" if stated else "warning",
                f"{what} draws up to {worst:.0f} A, beyond the {sup.breaking_capacity:.0f} A the "
                f"{m.fuse:g} A {device} can break: it may keep arcing or burst instead of "
                f"clearing{assumed}",
                m.location,
                ("mains",),
                {
                    "fault_current_a": worst,
                    "earth_fault_a": sup.earth_fault_max,
                    "short_circuit_a": sup.short_circuit,
                    "breaking_capacity_a": sup.breaking_capacity,
                },
                "use a fuse of a higher breaking capacity (a sand-filled ceramic, high-breaking "
                "type) of the same rating and characteristic, and say so: ', breaking high'",
            )
        )
    return out


def plan_conductor(plan: Plan, name: str):
    """The plan's conductor of that name.

    Parameters:
        plan: the plan.
        name: a conductor's name.
    Returns:
        the conductor record, or None.
    References:
        none (lookup).
    """
    return plan.index.conductors.get(name)


def _stated_contradictions(plan: Plan, safety: SafetyResult) -> list[Finding]:
    """GC214: a clearing time or I²t stated in the plan that the fuse table contradicts by more
    than 2×."""
    m = plan.mains
    if m.fuse is None or (m.clear_time is None and m.fuse_i2t is None) or not safety.parts:
        return []
    p = max(safety.parts, key=lambda x: x.fault_current)
    cl = device_clearing(m.fuse_kind, m.fuse, p.fault_current, m.frequency)
    out = []
    for stated, table, what, unit in (
        (m.clear_time, cl.time if cl else None, "clearing time", "s"),
        (m.fuse_i2t, cl.i2t if cl else None, "I²t", "A²s"),
    ):
        if stated is None:
            continue
        if table is None or not 0.5 <= stated / table <= 2.0:
            tab = "no assured clearing" if table is None else f"{table:.3g} {unit}"
            out.append(
                Finding(
                    "GC214",
                    "warning",
                    f"the plan states a {what} of {stated:.3g} {unit}; the {device_text(m)}'s "
                    f"time-current limits give {tab} at {p.fault_current:.3g} A",
                    m.location,
                    ("mains",),
                    {"stated": stated, "table": table},
                    f"check the stated {what} against the fuse maker's data sheet, or remove it "
                    "to use the table",
                )
            )
    return out


def _through_isolator(device: str, where: str, isolators: list, loc, inlet: str) -> Finding:
    """GC215 (a warning) for a device whose earth reaches the main earthing terminal only through
    galvanic isolators: their diodes carry a fault's current (the fault loop is checked through
    them), their resistor and capacitor read open to a continuity tester."""
    names = ", ".join(isolators)
    return Finding(
        "GC215",
        "warning",
        f"device {device}{where}: its earth pin reaches the main earthing terminal only through "
        f"{names}, a lift network with diodes (a galvanic isolator): its diodes carry a fault's "
        "current, and its fault loop is checked through it, but a continuity test at a low "
        "voltage reads the path open",
        loc,
        (device, inlet),
        {"isolators": len(isolators)},
        f"fit {names} of a fail-safe type rated for the supply's fault current, with a status "
        "indicator, and have the path's continuity tested across it by a qualified person (its "
        "maker's test link) — never bypass it in use, and never take the earth off",
    )


@rule("GC215", needs="solve")
def rule_device_earths(s: Solved) -> list[Finding]:
    """GC215: a placed device whose earth pin does not reach the main earthing terminal, or only
    through a high resistance.

    Parameters:
        s: the solved network with its context.
    Returns:
        GC215 findings.
    References:
        the rule catalogue (rules/catalogue.py), which names each code's sources.
    """
    if s.device_earths is None:
        return []
    out = []
    devices = s.plan.index.devices
    for d in s.device_earths:
        # where the installation plugs it in, not its own plan's inlet: the break is on the way
        # from there
        dev = devices[d.device]
        loc = dev.location
        where = f" (plugged into {dev.plugged})" if dev.plugged else ""
        if d.through and (d.resistance is None or d.resistance > DEVICE_EARTH_LIMIT):
            out.append(_through_isolator(d.device, where, list(d.through), loc, d.inlet))
        elif d.resistance is None:
            out.append(
                Finding(
                    "GC215",
                    "danger",
                    f"device {d.device}{where}: its earth pin does not reach the main earthing "
                    "terminal through protective conductors",
                    loc,
                    (d.device, d.inlet),
                    {},
                    f"plug {d.device} into an earthed outlet and repair the protective connection "
                    "on its path",
                )
            )
        elif d.resistance > DEVICE_EARTH_LIMIT:
            cleared = _cleared_in_time(s.plan, d)
            out.append(
                Finding(
                    "GC215",
                    "fault" if cleared else "danger",
                    f"device {d.device}: its earth path to the main earthing terminal is "
                    f"{d.resistance:.3g} Ω{cleared}",
                    loc,
                    (d.device, d.inlet),
                    {"resistance_ohm": d.resistance},
                    "a long or thin lead on the path (a reel, an extension, a strip's cord) or a "
                    "high-resistance joint: use a shorter or heavier lead, or find and repair the "
                    "joint, and have the path's continuity measured",
                )
            )
    return out


def _cleared_in_time(plan: Plan, d) -> str:
    """Why a device's long earth path is no danger (empty when it is one, or not known): its
    worst line-to-part fault, worked on the installation's supply through that path, is cleared
    within IEC 60364-4-41's time (by an RCD, say) — the path stays a fault to repair."""
    p, supply = d.fault, plan.supply
    if p is None or p.clear_time is None or supply is None:
        return ""
    limit = max_disconnection_time(supply.voltage, supply.system)
    if limit is None or p.clear_time > limit:
        return ""
    return (
        f"; a fault to its metal through it is still cleared in up to {p.clear_time:.3g} s by the "
        f"{p.device} (IEC 60364-4-41 allows {limit:g} s), so it is a fault to repair, not a danger"
    )


def installation_survival(plan: Plan, needs: dict) -> list[Finding]:
    """GC207 for the installation's own protective conductors that a placed device's fault would
    melt before it is cleared (a reel's 1 mm² core on a 16 A breaker's 60 s band).

    Parameters:
        plan: the installation.
        needs: conductor -> (the area it needs, m², the device whose fault, k, the part's
            fault figures), from :mod:`groundcheck.rules.placed_supply`.
    Returns:
        GC207 findings.
    References:
        IEC 60364-5-54 543.1.2 (adiabatic equation and k values).
    """
    out = []
    for cond, (need, device, k, part) in sorted(needs.items(), key=lambda kv: kv[0]):
        c = plan.index.conductors[cond]
        fix = (
            "protect the outlets by a 30 mA RCD (it clears the fault at once), or use a "
            "shorter or heavier lead so that the breaker clears within its instantaneous band"
        )
        slow = part.path_resistance > STANDARD_PE_LIMIT
        if slow:
            # the fault is slow because the device's own path is poor: mend that, not the building
            fix = (
                f"the fault is slow to clear because {device}'s {part.part} reaches the "
                f"protective earth through {part.path_resistance * 1e3:.4g} mΩ inside the device "
                f"(its own GC206): bond {part.part} properly there first, and {cond} needs no "
                "change; or "
                "protect the outlets by a 30 mA RCD"
            )
        out.append(
            Finding(
                "GC207",
                "danger",
                f"{cond} ({c.area * 1e6:.4g} mm², the installation's, in the fault loop of "
                f"{device}) would not survive that device's fault until it is cleared: it needs "
                f"{need * 1e6:.4g} mm² (k = {k:g})"
                + (f", because {device}'s own path to {part.part} is poor" if slow else ""),
                c.location,
                (cond,),
                {
                    "conductor": cond,
                    "area_mm2": c.area * 1e6,
                    "k": k,
                    "required_mm2": need * 1e6,
                    "survives": False,
                },
                fix,
            )
        )
    return out
