"""GC106's fix line: where a floating signal ground could be bonded, and which of its points only
look bonded (placed ``on`` a metal part, fastened by nothing)."""

from __future__ import annotations

from .context import AuditContext

__all__ = ["floating_fix"]


def floating_fix(ctx: AuditContext, comp) -> str:
    """GC106's fix: bond once near the protective earth; points of the ground that sit ``on`` a
    metal part with nothing fastening them are named (``on`` places a point, a fastening joins it).

    Parameters:
        ctx: the audit context.
        comp: the floating ground's points.
    Returns:
        the fix line.
    References:
        the rule catalogue (rules/catalogue.py), GC106.
    """
    m = ctx.plan.mains
    earthed = m is not None and m.equipment_class == "I"
    # a box with no protective earth (class II, or fed by a low-voltage adapter) has no stud to
    # bond near: its case is tied to the signal ground (the high tension's return) at one place
    fix = "bond the signal star to the chassis at one place" + (
        " near the protective-earth stud" if earthed or m is None else ""
    )
    stars = [p.name for p in ctx.plan.points if p.kind == "star"]
    supplies = [r for r in ctx.plan.rectifiers if r.a in comp]
    if supplies and stars and not set(stars) & set(comp):
        # a supply's return cut off from the circuit it feeds: its wire to the star is missing
        ends = ", ".join(f"{r.a} ({r.name}'s return)" for r in supplies[:3])
        fix = (
            f"wire the supply's return to {stars[0]} ({ends}): its current has no way back to "
            "the circuit it feeds"
        )
    loose = sorted(p.name for p in ctx.plan.points if p.name in comp and p.on is not None)
    if not loose:
        return fix
    p = ctx.plan.point(loose[0])
    return (
        f"{fix}. {', '.join(loose[:4])} sit on {p.on} but nothing fastens them to it ('on' gives "
        "a point's place; a fastening joins it): if one is meant as the bond, write e.g. 'bolt "
        f"{p.name}_nut: {p.name} to {p.on}'"
    )
