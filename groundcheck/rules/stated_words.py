"""GC227: metal written ``internal`` that holds sockets a plug reaches from outside.

A part nobody wrote as out of reach is checked as one a hand can reach (the safe default); the word
``internal`` takes it out of the protective-earth figures (its path resistance, touch voltage and
disconnection time are not worked). A part that input or output sockets, jacks or the mains
inlet sit on, or are bolted to, is a wall of the case: a plug's shell and a hand reach it. The word
then hides the checks the part needs, so the contradiction is said rather than taken silently
(common practice: sockets and the inlet are mounted through the case's walls).
"""

from __future__ import annotations

from ..model.kinds import is_fastening
from .catalogue import Finding
from .context import AuditContext
from .registry import rule

__all__ = ["rule_internal_with_sockets", "OUTSIDE_KINDS"]

#: point kinds mounted through a case's wall, reached by a plug or a hand from outside
OUTSIDE_KINDS = ("sleeve", "jack", "inlet")


@rule("GC227")
def rule_internal_with_sockets(ctx: AuditContext) -> list[Finding]:
    """GC227: metal written ``internal`` in class I equipment that sockets or the inlet sit on.

    Parameters:
        ctx: the audit context.
    Returns:
        GC227 findings, one per such part.
    References:
        the module's description (common practice); IEC 61140 (accessible conductive parts are
        bonded to the protective earth), from memory.
    """
    plan = ctx.plan
    m = plan.mains
    if m is None or m.equipment_class != "I":
        return []
    # written internal: unwritten, a class I part with mains is touchable; signal-only has GC222
    inner = {x.name: x for x in plan.metals if x.touchable is False and not x.signal_only}
    if not inner:
        return []
    held: dict[str, list[str]] = {}
    kinds = {p.name: p.kind for p in plan.points}
    for p in plan.points:
        if p.on in inner and p.kind in OUTSIDE_KINDS:
            held.setdefault(p.on, []).append(p.name)
    for c in plan.conductors:
        if not is_fastening(c, inner):
            continue
        for part, other in ((c.a, c.b), (c.b, c.a)):
            if part in inner and kinds.get(other) in OUTSIDE_KINDS:
                if other not in held.setdefault(part, []):
                    held[part].append(other)
    out = []
    for name in sorted(held):
        points = sorted(held[name])
        shown = ", ".join(points[:3]) + (f" and {len(points) - 3} more" if len(points) > 3 else "")
        out.append(
            Finding(
                "GC227",
                "warning",
                f"{name} is written internal, yet {shown} ({kinds[points[0]]}) is mounted on "
                "it: a part that holds sockets or the inlet is a wall of the case, which a plug "
                "or a hand reaches; its protective path, touch voltage and disconnection time "
                "are not worked",
                inner[name].location,
                (name, *points),
                {},
                f"remove 'internal' from {name} (unwritten, it is checked as a part a hand can "
                "reach); if it really is out of reach, accept this finding in the plan with the "
                "reason",
            )
        )
    return out
