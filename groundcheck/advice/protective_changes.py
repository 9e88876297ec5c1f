"""The protective earth's own repairs (common practice): a stud of its own for the protective
conductor that shares a fastening (GC202), the line conductor's section for an undersized
protective conductor (GC204), and a protective wire of its own for a touchable part with no
protective path or one through a poor contact (GC205, GC206).  Each only strengthens the
protective earth: a protective conductor is never removed, lifted, thinned or lengthened beyond
its new route."""

from __future__ import annotations

import math

from ..model.kinds import is_hookup
from ..model.records import PE_POINT
from ..rules.protective import shafts_holding
from .changes import (
    ROUTE_ALLOWANCE,
    SOURCE_CLEARANCE,
    STANDARD_SECTIONS_MM2,
    STUD_CLEARANCE,
    Candidate,
    ChangeContext,
)
from .edits import Edit

__all__ = [
    "bonding_wire",
    "stud_position",
    "free_name",
    "at_end",
    "device_frame",
    "equipment_mains",
]


#: how far a new stud stays inside its part's edge, m: the radius of an M4 or M5 washer and a
#: little metal beyond it (common practice)
EDGE_CLEARANCE = 6e-3


def stud_position(ctx: ChangeContext, part: str, near, avoid=()) -> tuple[float, float] | None:
    """A place for a new stud on ``part`` near ``near``: on the part, at least STUD_CLEARANCE
    outside every other part's outline, outside every field source's footprint, and at least
    STUD_CLEARANCE from the part's other points and from the places in ``avoid``."""
    metal = ctx.plan.metal(part)
    area = abs(metal.size[0] * metal.size[1]) if metal.size else math.inf
    # parts mounted on it (smaller than it: a transformer frame, a bracket); a cover or bottom
    # plate the size of the part lies over or under all of it and takes no room on its face
    others = [
        m
        for m in ctx.plan.metals
        if m.name != part and m.size is not None and abs(m.size[0] * m.size[1]) < area
    ]
    taken = [p.pos for p in ctx.plan.points if p.pos is not None] + [q for q in avoid if q]
    sources = [s.pos for s in ctx.plan.fields]
    # a nut and its washer need metal all round the hole: places clear of the part's edge first,
    # then (a narrow strip) any place on it
    # (farther rings, in finer steps, for a corner crowded by a transformer's frame and its field)
    radii = [(r, 8) for r in (20e-3, 30e-3, 40e-3, 60e-3)] + [
        (r, 16) for r in (80e-3, 100e-3, 120e-3)
    ]
    rings = [(r, edge, n) for edge in (EDGE_CLEARANCE, 0.0) for r, n in radii]
    for r, edge, steps in rings:
        for k in range(steps):
            a = 2 * math.pi / steps * k
            q = (near[0] + r * math.cos(a), near[1] + r * math.sin(a))
            if edge and not all(
                metal.contains((q[0] + dx, q[1] + dy))
                for dx, dy in ((edge, 0), (-edge, 0), (0, edge), (0, -edge))
            ):
                continue
            # clear of the other parts' outlines too, by the room a nut and its lug take
            near_q = [q] + [
                (
                    q[0] + STUD_CLEARANCE * math.cos(math.pi / 4 * j),
                    q[1] + STUD_CLEARANCE * math.sin(math.pi / 4 * j),
                )
                for j in range(8)
            ]
            if not metal.contains(q) or any(m.contains(x) for m in others for x in near_q):
                continue
            if any(math.dist(q, t) < STUD_CLEARANCE for t in taken) or any(
                math.dist(q, s) < SOURCE_CLEARANCE for s in sources
            ):
                continue
            return q
    return None


def _bonding_home(ctx: ChangeContext, landing, part: str) -> str | None:
    """The metal a new bonding stud beside the protective earth's landing goes on: of the part the
    landing sits on and the part its fastening holds it to, the larger — the chassis, never a
    transformer's frame or bracket that a service takes out (the protective earth on a tag under a
    transformer's foot sits on the chassis and is held to the frame, or the other way round: a bond
    from the frame would hang on the transformer's screws, GC202's trap).

    Parameters:
        ctx: the change context.
        landing: the point the protective earth's lead lands on.
        part: the part to be bonded (never its own home).
    Returns:
        the metal part's name, or None.
    References:
        common practice (each bond from the main chassis, on a fixing of its own).
    """
    names = [landing.on, ctx.fastened_to(landing.name)]
    homes = [n for n in dict.fromkeys(names) if n in ctx.metals and n != part]
    if not homes:
        return None

    def area(name: str) -> float:
        m = ctx.plan.metal(name)
        return m.size[0] * m.size[1] if m is not None and m.size is not None else 0.0

    return max(homes, key=lambda n: (area(n), n == names[1]))


def free_name(ctx: ChangeContext, names) -> str:
    """The first of ``names`` that names no point of the plan yet."""
    return next(n for n in names if ctx.plan.point(n) is None)


def equipment_mains(ctx: ChangeContext, element: str | None):
    """The mains record that feeds ``element``'s equipment and the prefix of its names: the plan's
    own (prefix ""), or in an installation the placed device's own plan's (prefix "DEVICE.");
    (None, "") when there is none."""
    if ctx.plan.mains is not None:
        return ctx.plan.mains, ""
    dev = ctx.plan.index.device_of(element) if element else None
    own = dict(ctx.plan.device_plans).get(dev) if dev else None
    if own is None or own.mains is None:
        return None, ""
    return own.mains, f"{dev}."


def device_frame(ctx: ChangeContext, element: str | None, xy: tuple[float, float]):
    """A position of the installation's drawing (m) in the frame of the device ``element``
    belongs to, where its own plan writes it (the placement's ``at`` taken off, its ``mirror``
    undone); the position itself outside a placed device."""
    dev = ctx.plan.index.device_of(element) if element else None
    record = ctx.plan.index.devices.get(dev) if dev else None
    if record is None or record.source == "simple":
        return xy
    ox, oy = record.at
    return xy[0] - ox, (xy[1] - oy) * (-1.0 if record.mirror else 1.0)


def _protective_lead(ctx: ChangeContext, element: str | None = None):
    """The mains cord's protective lead (a hook-up wire from the protective-earth point) of
    ``element``'s equipment, the point it lands on and its statement; None when the plan has none
    of them."""
    mains, prefix = equipment_mains(ctx, element)
    pe = prefix + PE_POINT
    lead = next(
        (
            c
            for c in ctx.plan.conductors
            if pe in (c.a, c.b) and is_hookup(c) and ctx.protective(c)
        ),
        None,
    )
    if lead is None or mains is None:
        return None
    landing = ctx.points.get(lead.b if lead.a == pe else lead.a)
    st = ctx.statement(lead)
    if landing is None or landing.pos is None or st is None:
        return None
    return lead, landing, st


def _bond_ends(ctx: ChangeContext, home: str, landing, part: str):
    """The new bonding stud beside the protective earth's landing on ``home`` and the new stud on
    ``part`` nearest it, with their names; None when either finds no room."""
    metal = ctx.plan.metal(part)
    # not where the protective earth's own new stud would go (GC202's fix): both may be made
    own = stud_position(ctx, home, landing.pos)
    start = stud_position(ctx, home, landing.pos, avoid=(own,))
    (x0, y0), (w, h) = metal.origin, metal.size
    near = (min(max(landing.pos[0], x0), x0 + w), min(max(landing.pos[1], y0), y0 + h))
    end = stud_position(ctx, part, near)
    if start is None or end is None:
        return None
    a = free_name(ctx, (f"{home}_bond", f"{home}_bond2", f"{home}_bond3"))
    b = free_name(ctx, (f"{part}_pe", f"{part}_pe2", f"{part}_pe3"))
    return start, end, a, b


#: the shortest bonding lead to another part: long enough to take the part off for service with
#: its lead still on (a plan is flat: a bottom plate drawn under the stud is still a deck's depth
#: away; common practice)
SERVICE_SLACK = 0.1


def _beside(q, landing) -> str:
    """Where a new stud is said to be: beside the landing, or how far from it when a crowded
    corner put it farther than the nearest places looked at."""
    d = math.dist(q, landing.pos)
    return (
        f"beside {landing.name}" if d <= 60e-3 + 1e-9 else f"{d * 1e3:.0f} mm from {landing.name}"
    )


def bonding_wire(ctx: ChangeContext, f) -> Candidate | None:
    """GC205, GC206: a touchable part with no protective path, or one through a poor contact
    (hinges, paint, anodised threads), gets a protective wire of its own from a new bonding stud
    beside the protective earth's stud (the protective earth keeps its fastener to itself, GC202)
    to a new stud on the part (common practice: each touchable part bonded by a conductor, never
    through its fixings)."""
    part = next((e for e in f.elements if e in ctx.metals), None)
    if part is not None and shafts_holding(ctx.plan, part):
        return None  # a knob turns: no wire is fixed to it (the rule's own fix says what to do)
    found = _protective_lead(ctx, part) if part is not None else None
    metal = ctx.plan.metal(part) if found is not None else None
    if found is None or metal is None or metal.size is None:
        return None
    lead, landing, st = found
    home = _bonding_home(ctx, landing, part)
    if home is None or home == part:
        return None  # the path is the part itself: GC206's own fix (fastenings, the lead)
    ends = _bond_ends(ctx, home, landing, part)
    if ends is None:
        return None
    start, end, a, b = ends
    needs = [
        x.figures.get("thicker_mm2") or 0.0  # a bonding test's smallest passing size
        for x in ctx.result.findings
        if lead.name in x.elements
    ]
    mains, prefix = equipment_mains(ctx, part)
    line = mains.line_area if mains is not None else None
    area = max([(lead.area or 0.0) * 1e6, (line or 0.0) * 1e6, *needs])
    area = next((x for x in STANDARD_SECTIONS_MM2 if x >= area * (1 - 1e-9)), area)
    length = max(math.dist(start, end) * (1 + ROUTE_ALLOWANCE), SERVICE_SLACK) * 1e3
    here = device_frame(ctx, part, start) + device_frame(ctx, part, end)
    mm = [round(v * 1e3) for v in here]  # as the plan the new statements go in writes them
    # in a device's own plan its names are written without the device's prefix
    n = {x: x[len(prefix) :] if st.loc.file != ctx.plan.file else x for x in (a, b, home, part)}
    extra = (
        f"point {n[a]}: stud, at {mm[0]},{mm[1]} on {n[home]}",
        f"bolt {n[a]}_nut: {n[a]} to {n[home]}",
        f"point {n[b]}: stud, at {mm[2]},{mm[3]} on {n[part]}",
        f"bolt {n[b]}_nut: {n[b]} to {n[part]}",
        f"wire {n[b]}_bond: {n[a]} to {n[b]}, {length:.0f} mm, {area:g} mm2, protective",
    )
    return Candidate(
        f"bond {part} by a protective wire of its own ({b}_bond, {area:g} mm², from a new stud "
        f"{a} on {home} {_beside(start, landing)} to a new stud {b} on {part}; bare metal under "
        "toothed washers)",
        f.code,
        (at_end(ctx, st, extra),),
        touches_protective=False,
        wire=length / 1e3,
        action="bond",
        element=part,
    )


def at_end(ctx: ChangeContext, st, extra: tuple[str, ...]) -> Edit:
    """New statements at the end of the file ``st`` is in (top level), so that they never share
    lines with another change's edit (the combined set keeps both)."""
    lines = ctx.src.lines_of(st.loc.file)
    file = None if st.loc.file == ctx.plan.file else st.loc.file
    n = len(lines)
    if lines[-1] == "":
        return Edit(n, "\n".join(extra) + "\n", (), n, file)
    return Edit(n, lines[-1], extra, n, file)
