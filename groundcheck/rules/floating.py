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
    fix = "bond the signal star to the chassis at one place near the protective-earth stud"
    loose = sorted(p.name for p in ctx.plan.points if p.name in comp and p.on is not None)
    if not loose:
        return fix
    p = ctx.plan.point(loose[0])
    return (
        f"{fix}. {', '.join(loose[:4])} sit on {p.on} but nothing fastens them to it ('on' gives "
        "a point's place; a fastening joins it): if one is meant as the bond, write e.g. 'bolt "
        f"{p.name}_nut: {p.name} to {p.on}'"
    )
