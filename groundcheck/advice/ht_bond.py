"""GC229's repair: a touchable part of a box fed at extra-low voltage tied to its high tension's
return by a wire of its own — from a new stud on the part (a toothed washer on bare metal) to the
stud that already bonds the signal ground to another part of the case, or, with none, to the
return's own point (common practice: a lid's flying lead to the star-bond screw)."""

from __future__ import annotations

import math

from .changes import ROUTE_ALLOWANCE, Candidate, ChangeContext
from .protective_changes import at_end, free_name, stud_position, device_frame

__all__ = ["ht_return_bond"]

#: the bond's section, mm²: a hook-up wire that carries a high-tension supply's short until its
#: fuse or its impedance ends it (common practice)
BOND_MM2 = 0.75


def ht_return_bond(ctx: ChangeContext, f) -> Candidate | None:
    """A wire of its own from a new stud on GC229's part to the case's signal-ground stud (a stud
    on another part of the case that no GC229 names), else to the supply's return point.

    Parameters:
        ctx: the change context.
        f: a GC229 finding (its part, then its rectifier).
    Returns:
        the candidate, or None (no room for a stud, no position to start from).
    References:
        the module's description (common practice).
    """
    part, supply = f.elements[0], f.elements[1]
    metal = ctx.plan.metal(part)
    rect = next((r for r in ctx.plan.rectifiers if r.name == supply), None)
    if metal is None or metal.size is None or rect is None:
        return None
    flagged = {x.elements[0] for x in ctx.result.findings if x.code == f.code}
    target = _target(ctx, part, flagged, rect.a)
    st = ctx.statement(next(c for c in ctx.plan.conductors if c.a == rect.a or c.b == rect.a))
    if target is None or st is None or not ctx.same_file(st, target.name):
        return None
    here = stud_position(ctx, part, target.pos)
    if here is None:
        return None
    stud = free_name(ctx, (f"{part}_ht_bond", f"{part}_ht_bond2", f"{part}_ht_bond3"))
    length = max(math.dist(here, target.pos) * (1 + ROUTE_ALLOWANCE), 0.1) * 1e3
    xy = [round(v * 1e3) for v in device_frame(ctx, part, here)]
    n = {x: ctx.file_name(x, st) for x in (stud, part, target.name)}
    extra = (
        f"point {n[stud]}: stud, at {xy[0]},{xy[1]} on {n[part]}",
        f"bolt {n[stud]}_nut: {n[stud]} to {n[part]}",
        f"wire {n[stud]}_wire: {n[stud]} to {n[target.name]}, {length:.0f} mm, {BOND_MM2:g} mm2, "
        "bond",
    )
    return Candidate(
        f"bond {part} to {target.name} by a wire of its own ({stud}_wire, {BOND_MM2:g} mm², from "
        f"a new stud {stud} on {part}, a toothed washer on bare metal), so that a chafed "
        f"high-tension lead shorts {supply} instead of making {part} live",
        f.code,
        (at_end(ctx, st, extra),),
        wire=length / 1e3,
        action="ht-bond",
        element=part,
    )


def _target(ctx: ChangeContext, part: str, flagged: set, ret: str):
    """Where the bond goes: a stud fastened to a part of the case no such finding names (the signal
    ground's bond to the case), nearest ``part``'s centre; else the return's own point."""
    metal = ctx.plan.metal(part)
    centre = (metal.origin[0] + metal.size[0] / 2, metal.origin[1] + metal.size[1] / 2)
    studs = [
        p
        for p in ctx.plan.points
        if p.pos is not None
        and p.kind in ("stud", "tag", "lug", "star")
        and (home := ctx.fastened_to(p.name)) is not None
        and home != part
        and home not in flagged
        and home in ctx.metals
    ]
    if studs:
        return min(studs, key=lambda p: (math.dist(p.pos, centre), p.name))
    point = ctx.points.get(ret)
    return point if point is not None and point.pos is not None else None
