"""GC225: socket outlets protected by an RCD less sensitive than additional protection asks.

IEC 60364-4-41 411.3.3 asks for additional protection by an RCD of rated residual operating
current IΔn ≤ 30 mA on socket outlets used by ordinary persons (rated up to 32 A in its current
edition, up to 20 A in the one before; from memory). A 100 mA or 300 mA RCD still disconnects a
fault to earthed metal (GC208 and GC220 judge that), but not a current through a person who
touches a live part: the stated rating is judged here, the local rules decide where it applies.
"""

from __future__ import annotations

from .catalogue import Finding
from .context import AuditContext
from .registry import rule

__all__ = ["rule_outlet_rcd", "ADDITIONAL_PROTECTION"]

#: A, the largest rated residual current that gives additional protection (IEC 60364-4-41 411.3.3,
#: from memory)
ADDITIONAL_PROTECTION = 0.03


@rule("GC225")
def rule_outlet_rcd(ctx: AuditContext) -> list[Finding]:
    """GC225: the RCD stated for the outlets (an installation's ``supply``, or the ``mains`` a
    single piece of equipment is plugged into) rated above 30 mA.

    Parameters:
        ctx: the audit context.
    Returns:
        GC225 findings (at most one).
    References:
        IEC 60364-4-41 411.3.3 (additional protection by a 30 mA RCD), from memory.
    """
    plan = ctx.plan
    stated = plan.supply if plan.supply is not None else plan.mains
    if stated is None or stated.rcd is None or stated.rcd <= ADDITIONAL_PROTECTION * (1 + 1e-9):
        return []
    if plan.supply is not None and not any(p.kind == "outlet" for p in plan.points):
        return []
    word = "supply" if plan.supply is not None else "mains"
    return [
        Finding(
            "GC225",
            "warning",
            f"the outlets are protected by a {stated.rcd * 1e3:g} mA RCD: it disconnects a fault "
            "to earthed metal, but socket outlets used by ordinary persons also need additional "
            f"protection against a current through a person, an RCD of at most "
            f"{ADDITIONAL_PROTECTION * 1e3:g} mA",
            stated.location,
            (word,),
            {"rcd_a": stated.rcd, "additional_protection_a": ADDITIONAL_PROTECTION},
            f"have the outlets protected by a {ADDITIONAL_PROTECTION * 1e3:g} mA RCD: "
            "installation work for a qualified electrician, to the local wiring rules",
        )
    ]
