"""Protective-earth rules: the route from the inlet's earth terminal to every metal part, its
fastener, its conductors' roles and sections, class II equipment, and the verdicts on the
protective-earth figures (resistance, disconnection time, breaking capacity, fault survival, device
earth paths).
"""

from __future__ import annotations

from typing import TYPE_CHECKING

import networkx as nx

from ..model.records import Plan
from ..physics.protection import STANDARD_PE_LIMIT, device_clearing
from ..physics.safety import supply_figures

from ..model.kinds import can_carry_protective, cross_section, section_checked
from ..model.records import PE_POINT
from .catalogue import Finding
from .pe_fastener import pe_fastener as _pe_fastener
from .context import AuditContext
from .registry import rule

if TYPE_CHECKING:
    from ..physics.safety import SafetyResult
    from .electrical import Solved

__all__ = [
    "rule_mains_not_described",
    "rule_protective_earth",
    "rule_class_ii",
    "rule_protective_figures",
    "rule_device_earths",
    "DEVICE_EARTH_LIMIT",
]


@rule("GC201", "GC202", "GC203", "GC204", "GC205", "GC209", "GC210")
def rule_protective_earth(ctx: AuditContext) -> list[Finding]:
    """GC201–GC205, GC209, GC210: the protective route of a class I plan with a mains inlet.

    Parameters:
        ctx: the audit context.
    Returns:
        GC201–GC205, GC209, GC210 findings.
    References:
        the rule catalogue (rules/catalogue.py), which names each code's sources.
    """
    plan = ctx.plan
    if plan.mains is None or plan.mains.equipment_class == "II" or PE_POINT not in ctx.G:
        return []
    route = ctx.route
    bonded = route.reached & ctx.metals
    out: list[Finding] = []
    if not bonded:
        out.append(_pe_not_reaching(ctx))
    out.extend(_pe_fastener(ctx))
    out.extend(_pe_terminal_other_use(ctx))
    out.extend(_pe_unmarked(ctx))
    out.extend(_pe_sections(ctx))
    for m in plan.metals:
        if m.touchable and not m.signal_only and m.name not in bonded:
            out.append(
                Finding(
                    "GC205",
                    "danger",
                    f"touchable part {m.name} is not bonded to the protective earth by protective "
                    "conductors",
                    m.location,
                    (m.name,),
                    {},
                    f"bond {m.name} to the protective-earth stud with a protective conductor or a "
                    "fastening rated for it",
                )
            )
    return out


def _pe_not_reaching(ctx: AuditContext) -> Finding:
    """GC203 when the inlet reaches metal only through something that cannot be protective, else
    GC201."""
    G, mloc = ctx.G, ctx.plan.mains.location
    reach = nx.node_connected_component(G, PE_POINT) & ctx.metals
    if not reach:
        return Finding(
            "GC201",
            "danger",
            "the mains inlet's protective terminal reaches no metal part",
            mloc,
            (PE_POINT,),
            {},
            "run a green-and-yellow protective conductor from the inlet's earth terminal straight "
            "to a chassis stud of its own",
        )
    target = sorted(reach)[0]
    path = nx.shortest_path(G, PE_POINT, target)
    bad = [
        k
        for u, v in zip(path, path[1:])
        for k, d in G[u][v].items()
        if not can_carry_protective(d["conductor"]) or (v in ctx.signal_points and v != target)
    ]
    return Finding(
        "GC203",
        "danger",
        f"the protective earth reaches {target} only through "
        f"{', '.join(bad) or 'the signal circuit'}, which is not a protective conductor",
        ctx.loc(bad[0]) if bad else mloc,
        tuple(bad),
        {},
        "connect the inlet's protective terminal straight to the chassis with a protective "
        "conductor; lift networks and switches belong between signal ground and chassis, never in "
        "the protective path",
    )


def _pe_terminal_other_use(ctx: AuditContext) -> list[Finding]:
    """GC210: a conductor on the inlet's protective terminal that is not part of the protective
    route."""
    out = []
    for keys in ctx.G.adj[PE_POINT].values():
        for k in sorted(keys):
            if k in ctx.route:
                continue
            c = ctx.conductors[k]
            out.append(
                Finding(
                    "GC210",
                    "fault",
                    f"{c.kind} {c.name} ({c.role}) lands on the inlet's protective terminal",
                    c.location,
                    (c.name, PE_POINT),
                    {},
                    f"take {c.name} to its own place (a signal ground bonds to the chassis near "
                    "the protective-earth stud, not on the inlet's terminal); only the "
                    "protective conductor belongs on the inlet's earth terminal",
                )
            )
    return out


def _pe_unmarked(ctx: AuditContext) -> list[Finding]:
    """GC209: conductors the protective earth relies on whose role does not say protective."""
    return [
        Finding(
            "GC209",
            "warning",
            f"{ctx.conductors[k].kind} {k} carries the protective earth but is written as "
            f"{ctx.conductors[k].role}",
            ctx.loc(k),
            (k,),
            {},
            f"write {k} as 'protective' and use green-and-yellow wire of at least the line "
            "conductor's size; groundcheck treats it as protective and never suggests removing "
            "it",
        )
        for k in ctx.route.unmarked
    ]


def _pe_sections(ctx: AuditContext) -> list[Finding]:
    """GC204: a conductor on the protective route thinner than the line conductor."""
    m = ctx.plan.mains
    line = (
        m.line_area or m.cord_section
    )  # the cord's cores are the line conductor when none is stated
    stated = m.line_area is not None
    out = []
    for c in ctx.plan.conductors:
        area = cross_section(c)
        if (
            c.name in ctx.route
            and section_checked(c)
            and area is not None
            and area < line * (1 - 1e-6)
        ):
            out.append(
                Finding(
                    "GC204",
                    "danger",
                    f"protective conductor {c.name} is {area * 1e6:.3g} mm², thinner than the "
                    f"line conductor ({line * 1e6:.3g} mm²{'' if stated else ', the mains cord'})",
                    c.location,
                    (c.name,),
                    {"area_mm2": round(area * 1e6, 4), "line_area_mm2": round(line * 1e6, 4)},
                    f"use at least {line * 1e6:.3g} mm² (IEC 60364-5-54 Table 54.2)",
                )
            )
    return out


@rule("GC212", "GC213")
def rule_class_ii(ctx: AuditContext) -> list[Finding]:
    """GC212, GC213: a class II plan has no protective earth to check; a conductor on its earth
    terminal is a functional earth (a note).

    Parameters:
        ctx: the audit context.
    Returns:
        GC212, GC213 findings.
    References:
        the rule catalogue (rules/catalogue.py), which names each code's sources.
    """
    m = ctx.plan.mains
    if m is None or m.equipment_class != "II":
        return []
    out = [
        Finding(
            "GC213",
            "note",
            "class II equipment: safety rests on double or reinforced insulation, which the plan "
            "does not describe; protective-earth figures are skipped",
            m.location,
            ("mains",),
            {},
            "have the insulation checked against the product-safety standard by a "
            "qualified person",
        )
    ]
    if PE_POINT in ctx.G:
        for _, v, k in sorted(ctx.G.edges(PE_POINT, keys=True)):
            c = ctx.conductors[k]
            out.append(
                Finding(
                    "GC212",
                    "note",
                    f"{c.kind} {k} joins {v} to the earth terminal of class II equipment: a "
                    "functional earth, not a protective one",
                    c.location,
                    (k, v),
                    {},
                    "keep it functional: the double or reinforced insulation must protect on its "
                    "own; if the metal relies on this earth for safety, the equipment is class I",
                )
            )
    return out


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
    m = plan.mains
    for p in safety.parts:
        part = plan.metal(p.part)
        figs = {
            "path_resistance_mohm": round(p.path_resistance * 1e3, 3),
            "limit_mohm": safety.limit * 1e3,
        }
        if p.path_resistance > safety.limit:
            out.append(
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
            )
        elif safety.relaxed and p.path_resistance > STANDARD_PE_LIMIT:
            out.append(
                Finding(
                    "GC206",
                    "note",
                    f"protective path to {p.part} is {p.path_resistance * 1e3:.1f} mΩ, over the "
                    f"{STANDARD_PE_LIMIT * 1e3:.0f} mΩ product-safety limit; passed only because "
                    f"--pe-limit relaxed the limit to {safety.limit * 1e3:.0f} mΩ",
                    part.location,
                    (p.part,),
                    {**figs, "standard_limit_mohm": STANDARD_PE_LIMIT * 1e3},
                    "shorten or thicken the protective conductor; clean and tighten the "
                    "fastenings on its path",
                )
            )
        out.extend(_disconnection(plan, safety, p))
    if m.fuse is None and m.clear_time is None and m.rcd is None and safety.parts:
        out.append(
            Finding(
                "GC208",
                "note",
                "no fuse, breaker or RCD in the mains statement: disconnection not checked",
                m.location,
                ("mains",),
                {},
                "add e.g. ', fuse 2 A slow' to the mains statement",
            )
        )
    out.extend(_breaking(plan, safety.supply))
    out.extend(_stated_contradictions(plan, safety))
    for row in safety.conductors:
        if not row.survives:
            c = plan_conductor(plan, row.conductor)
            out.append(
                Finding(
                    "GC207",
                    "danger",
                    f"{row.conductor} ({row.area * 1e6:.4g} mm²) would not survive the fault "
                    f"until it is cleared: it needs {row.required * 1e6:.4g} mm² (k = {row.k:g})",
                    c.location if c else m.location,
                    (row.conductor,),
                    row.as_dict(),
                    "use a thicker protective conductor, or a faster or lower-rated fuse the "
                    "equipment allows",
                )
            )
    return out


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
        what = (
            "a line-to-neutral short inside the equipment"
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
                    "fault_current_a": round(worst, 2),
                    "earth_fault_a": round(sup.earth_fault_max, 2),
                    "short_circuit_a": round(sup.short_circuit, 2),
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
    return next((c for c in plan.conductors if c.name == name), None)


def _device_text(m) -> str:
    parts = []
    if m.fuse is not None:
        what = " breaker" if m.fuse_kind.startswith("breaker") else " fuse"
        parts.append(f"{m.fuse:g} A {m.fuse_kind.replace('breaker-', 'type ') + what}")
    if m.rcd is not None:
        parts.append(f"{m.rcd * 1e3:g} mA RCD")
    return " and ".join(parts) or "stated clearing"


def _disconnection(plan: Plan, safety: SafetyResult, p) -> list[Finding]:
    """GC208: the protective device does not disconnect within IEC 60364-4-41's maximum time."""
    m, sup = plan.mains, safety.supply
    if m.fuse is None and m.clear_time is None and m.rcd is None:
        return []
    part = plan.metal(p.part)
    limit = sup.max_time
    figs = {
        "fault_current_a": round(p.fault_current, 3),
        "touch_voltage_v": round(p.touch_voltage, 2),
        "max_disconnection_s": limit,
    }
    system = "TT" if sup.system == "TT" else "TN"
    where = f"{system} at {m.voltage:g} V"
    if p.clear_time is None:
        return [
            Finding(
                "GC208",
                "danger",
                f"a line-to-{p.part} fault draws {p.fault_current:.3g} A, too little to be sure "
                f"of opening the {_device_text(m)}; {p.touch_voltage:.0f} V against earth would "
                f"stay on {p.part}",
                part.location,
                (p.part,),
                figs,
                "add a 30 mA RCD to the supply, or lower the fault loop's resistance or the fuse "
                "rating the equipment allows",
            )
        ]
    if limit is not None and p.clear_time > limit:
        stated = " (stated in plan)" if p.device == "stated" else ""
        return [
            Finding(
                "GC208",
                "danger",
                f"a line-to-{p.part} fault ({p.fault_current:.3g} A) is cleared by the "
                f"{_device_text(m)} in up to {p.clear_time:.3g} s{stated}; IEC 60364-4-41 allows "
                f"{limit:g} s ({where}), and {p.touch_voltage:.0f} V against earth is on {p.part} "
                "meanwhile",
                part.location,
                (p.part,),
                {**figs, "clear_time_s": round(p.clear_time, 6)},
                "protect the supply with a 30 mA RCD, or lower the fault loop's resistance or the "
                "fuse rating so that the fuse clears within the limit",
            )
        ]
    return []


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
                    f"the plan states a {what} of {stated:.3g} {unit}; the {_device_text(m)}'s "
                    f"time-current limits give {tab} at {p.fault_current:.3g} A",
                    m.location,
                    ("mains",),
                    {"stated": stated, "table": table},
                    f"check the stated {what} against the fuse maker's data sheet, or remove it "
                    "to use the table",
                )
            )
    return out


#: a device's earth path to the main earthing terminal over this is reported, Ω: a final circuit's
#: protective conductor of 40 m of 1.5 mm² (about 0.5 Ω) plus a cord — a broken or corroded path,
#: not a long one (common practice)
DEVICE_EARTH_LIMIT = 1.0


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
    points = {p.name: p for p in s.plan.points}
    for d in s.device_earths:
        loc = points[d.inlet].location
        if d.resistance is None:
            out.append(
                Finding(
                    "GC215",
                    "danger",
                    f"device {d.device}: its earth pin does not reach the main earthing terminal "
                    "through protective conductors",
                    loc,
                    (d.device, d.inlet),
                    {},
                    f"plug {d.device} into an earthed outlet and repair the protective connection "
                    "on its path",
                )
            )
        elif d.resistance > DEVICE_EARTH_LIMIT:
            out.append(
                Finding(
                    "GC215",
                    "danger",
                    f"device {d.device}: its earth path to the main earthing terminal is "
                    f"{d.resistance:.3g} Ω",
                    loc,
                    (d.device, d.inlet),
                    {"resistance_ohm": round(d.resistance, 4)},
                    "find and repair the high-resistance joint on the path (cord, strip or "
                    "building run)",
                )
            )
    return out


@rule("GC111")
def rule_mains_not_described(ctx: AuditContext) -> list[Finding]:
    """GC111: touchable metal and no supply described: the protective earth is unchecked, not
    clean.

    Parameters:
        ctx: the audit context.
    Returns:
        GC111 findings.
    References:
        the rule catalogue (rules/catalogue.py), which names each code's sources.
    """
    plan = ctx.plan
    if (
        plan.mains is not None
        or plan.device_supplies
        or any(p.kind == "inlet" for p in plan.points)
    ):
        return []
    touchable = [m for m in plan.metals if m.touchable]
    if not touchable:
        return []
    return [
        Finding(
            "GC111",
            "note",
            f"{touchable[0].name} is touchable but the plan has no mains statement: the "
            "protective earth is not checked",
            touchable[0].location,
            tuple(m.name for m in touchable),
            {},
            "describe the supply ('mains 230 V 50 Hz, fuse 1 A slow, ...') or, for "
            "double-insulated equipment, 'mains ..., class II'",
        )
    ]
