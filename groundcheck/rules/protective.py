"""Protective-earth rules on the plan's wiring: the route from the inlet's earth terminal to every
metal part (GC201, GC203, GC205), its fastener (GC202, :mod:`.pe_fastener`), what else lands on
the inlet's terminal (GC210), its conductors' roles and sections (GC209, GC204), class II
equipment (GC212, GC213), and touchable metal with no supply described (GC111).

The verdicts on the protective-earth figures are :mod:`.pe_figures`.
"""

from __future__ import annotations

import networkx as nx

from ..model.kinds import (
    PROTECTIVE,
    can_carry_protective,
    cross_section,
    is_fastening,
    section_checked,
)
from ..model.records import PE_POINT
from .catalogue import Finding
from .context import AuditContext
from .live_chassis import live_metals
from .pe_fastener import pe_fastener as _pe_fastener
from .registry import rule

__all__ = [
    "rule_mains_not_described",
    "rule_protective_earth",
    "rule_class_ii",
    "shafts_holding",
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
    # metal on a pole of the mains (GC230) is never to be bonded to the protective earth: no
    # finding here may ask for it
    live = set(live_metals(ctx))
    out: list[Finding] = []
    if not bonded and not live:
        out.append(_pe_not_reaching(ctx))
    out.extend(_pe_fastener(ctx))
    out.extend(_pe_terminal_other_use(ctx))
    out.extend(_pe_unmarked(ctx))
    out.extend(_pe_sections(ctx))
    for m in plan.metals:
        if m.touchable and not m.signal_only and m.name not in bonded | live:
            out.append(
                Finding(
                    "GC205",
                    "danger",
                    f"touchable part {m.name} is not bonded to the protective earth by protective "
                    "conductors",
                    m.location,
                    (m.name,),
                    {},
                    _bond_fix(plan, m.name),
                )
            )
    return out


def shafts_holding(plan, part: str) -> list[str]:
    """The pots whose shafts alone hold a metal part (a knob): the points of kind ``pot`` its
    fastenings join, when it has fastenings and every one of them goes to a pot; else none.

    Parameters:
        plan: the plan.
        part: a metal part's name.
    Returns:
        the pots' point names, sorted (empty when anything else holds the part).
    References:
        none (the plan's own statements).
    """
    metals = {m.name for m in plan.metals}
    held = [
        c.b if c.a == part else c.a
        for c in plan.conductors
        if part in (c.a, c.b) and is_fastening(c, metals)
    ]
    kinds = {getattr(plan.point(p), "kind", None) for p in held}
    return sorted(held) if held and kinds == {"pot"} else []


def _bond_fix(plan, part: str) -> str:
    """GC205's fix: a protective conductor to the part — or, for a part held only on a pot's
    shaft (a metal knob), its pot's bushing fastened to bonded metal, since no wire can be fixed
    to a part that turns."""
    held = shafts_holding(plan, part)
    if held:
        return (
            f"{part} turns on the shaft of {', '.join(sorted(held))}, where no wire can be "
            "fixed: fasten the pot's bushing to bonded metal with its nut (never on insulating "
            "washers), or fit a knob with no metal a finger can reach"
        )
    return (
        f"bond {part} to the protective-earth stud with a protective conductor or a fastening "
        "rated for it"
    )


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
            "to a chassis stud of its own — unless the chassis is joined to a pole of the mains "
            "(a transformerless set): then never, and write that point as a 'mains-pole' (GC230 "
            "says what the set needs)",
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
                    {"area_mm2": area * 1e6, "line_area_mm2": line * 1e6},
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
            out.append(_functional_earth(ctx, ctx.conductors[k], v))
    return out


def _functional_earth(ctx: AuditContext, c, v: str) -> Finding:
    """GC212 for one conductor on a class II plan's earth terminal: a note, or a warning when it
    is built as a protective earth is — written ``protective``, or landing on metal directly or on
    a stud fastened to it — since the plan's word 'class II' then skips the checks the metal may
    rely on (common practice: a functional earth goes to the signal ground, not to a stud on the
    case)."""
    metals = {m.name for m in ctx.plan.metals}
    held = sorted(
        {
            x.b if x.a == v else x.a
            for x in ctx.plan.conductors
            if v in (x.a, x.b) and is_fastening(x, metals)
        }
    )
    landing = (
        f"landing on {v}"
        if v in metals
        else f"landing on {v}, fastened to {held[0]}"
        if held
        else ""
    )
    shape = (
        f"written protective{' and ' + landing if landing else ''}"
        if c.role == PROTECTIVE
        else landing
    )
    if not shape:
        return Finding(
            "GC212",
            "note",
            f"{c.kind} {c.name} joins {v} to the earth terminal of class II equipment: a "
            "functional earth, not a protective one",
            c.location,
            (c.name, v),
            {},
            "keep it functional: the double or reinforced insulation must protect on its "
            "own; if the metal relies on this earth for safety, the equipment is class I",
        )
    return Finding(
        "GC212",
        "warning",
        f"{c.kind} {c.name} joins {v} to the earth terminal of equipment written class II, "
        f"{shape}: that is how a protective earth is made, and class II skips every "
        "protective-earth check (path resistance, touch voltage, disconnection time)",
        c.location,
        (c.name, v),
        {},
        "if the metal's safety relies on this earth (anything short of double or reinforced "
        "insulation between it and mains), the equipment is class I: remove 'class II' from "
        "the mains statement to have its protective earth checked; if the insulation is double "
        "throughout, accept this finding in the plan with the reason",
    )


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
