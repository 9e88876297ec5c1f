"""GC230 where the metal reaches the mains only through a part that can come out (a vintage set's
"ground switch" and its capacitor from one pole of the cord to the chassis): the part taken out and
the metal earthed in the same change — a protective conductor from the inlet's earth terminal to a
stud of its own (the cord then three-core).  Taking the capacitor out alone leaves the chassis
unearthed, earthing it with the capacitor in place shorts the mains through it: the two are one
job (common practice).  A chassis tied to the mains by wire (a transformerless set) gets no
candidate: its fix is an isolating transformer, which no edit of the plan makes."""

from __future__ import annotations

import math

from ..model.kinds import can_open, is_lift
from ..model.records import PE_POINT
from .changes import ROUTE_ALLOWANCE, STANDARD_SECTIONS_MM2, Candidate, ChangeContext
from .protective_changes import at_end, free_name, stud_position

__all__ = ["unlive"]

#: mm², the protective conductor of the new cord when the plan states no line conductor: the
#: smallest cord of IEC 60227's for equipment up to 6 A, 0.75 mm² (common practice)
_SMALLEST_CORD = 0.75


def unlive(ctx: ChangeContext, f, add) -> None:
    """GC230's finding ``f`` whose actions name the parts that tie the metal to the mains: one
    candidate that takes them out and earths the metal, passed to ``add``.

    Parameters:
        ctx: the change context.
        f: the finding.
        add: takes a candidate.
    Returns:
        nothing (the candidate goes to ``add``).
    References:
        common practice (a three-core cord, the protective conductor on a stud of its own).
    """
    names = _whole_parts(ctx, [a[1] for a in f.actions if a[0] == "remove" and a[1] in ctx.cond])
    m, part = ctx.plan.mains, f.elements[0] if f.elements else None
    metal = ctx.plan.metal(part) if part is not None else None
    if not names or m is None or metal is None or metal.size is None:
        return
    statements = [ctx.statement(ctx.cond[n]) for n in names]
    statements += [ctx.src.statement(p.location.line) for p in _left_alone(ctx, names)]
    if any(st is None or st.loc.file != ctx.plan.file for st in statements):
        return
    x0, y0 = metal.origin
    near = m.inlet or (x0 + metal.size[0] / 2, y0 + metal.size[1] / 2)
    where = stud_position(ctx, part, near)
    if where is None:
        return
    stud = free_name(ctx, ("pe_stud", "pe_stud2", "pe_stud3"))
    lead = free_name(ctx, ("pe_lead", "pe_lead2", "pe_lead3"))
    area = max((m.line_area or 0.0) * 1e6, _SMALLEST_CORD)
    area = next((s for s in STANDARD_SECTIONS_MM2 if s >= area * (1 - 1e-9)), area)
    length = max(math.dist(near, where) * (1 + ROUTE_ALLOWANCE), 30e-3) * 1e3
    extra = (
        f"point {stud}: stud, at {where[0] * 1e3:.0f},{where[1] * 1e3:.0f} on {part}",
        f"bolt {stud}_nut: {stud} to {part}, protective",
        f"wire {lead}: {PE_POINT} to {stud}, {length:.0f} mm, {area:g} mm2, protective",
    )
    edits = [ctx.src.delete(st) for st in statements] + [at_end(ctx, statements[0], extra)]
    add(
        Candidate(
            f"take {', '.join(names)} out and earth {part}: a three-core cord, its protective "
            f"conductor ({lead}, {area:g} mm²) from the inlet's earth terminal to a new stud "
            f"{stud} of its own on {part}; both in one job, by a qualified person",
            f.code,
            tuple(edits),
            touches_protective=False,
            action="bond",
            element=part,
        )
    )


def _whole_parts(ctx: ChangeContext, names: list[str]) -> list[str]:
    """``names`` with every other lift network or switch that shares a point with them, other than
    the metal or a pole of the mains: a ground switch's other position comes out with it."""
    out, grew = list(names), True
    metals = ctx.metals
    poles = {p.name for p in ctx.plan.points if p.kind == "mains-pole"}
    while grew:
        ends = {e for n in out for e in (ctx.cond[n].a, ctx.cond[n].b)} - metals - poles
        more = [
            c.name
            for c in ctx.plan.conductors
            if c.name not in out and (is_lift(c) or can_open(c)) and {c.a, c.b} & ends
        ]
        out += more
        grew = bool(more)
    return out


def _left_alone(ctx: ChangeContext, names: list[str]):
    """The points (not metal, not a pole of the mains) that no conductor joins once ``names`` are
    out: a ground switch's common lug, which would be left in the plan joined to nothing."""
    gone = set(names)
    ends = {e for n in names for e in (ctx.cond[n].a, ctx.cond[n].b)}
    used = {e for c in ctx.plan.conductors if c.name not in gone for e in (c.a, c.b)}
    return [
        p
        for p in ctx.plan.points
        if p.name in ends
        and p.name not in used
        and p.kind != "mains-pole"
        and p.location.file == ctx.plan.file
    ]
