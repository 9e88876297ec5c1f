"""GC226: a signal ground whose only way to the protective earth is a ground-lift network.

A lift network (a resistor of some ohms beside a capacitor) between the signal ground and the
chassis breaks a hum loop, but in class I equipment it is also the signal ground's protective path:
a fault from a mains or high-voltage winding onto the signal ground (a transformer's insulation
breaking down, a high-voltage lead chafed through) must reach the protective earth through it and
open the fuse. A 10 Ω resistor alone passes some 23 A at 230 V and burns open well before a slow
fuse opens, leaving the sockets, pot shafts and every screen on the signal ground at the fault's
voltage. The trade bridges the resistor with anti-parallel power diodes (or a bridge rectifier)
rated for the fault current: they pass nothing at the hum's millivolts and carry a fault until the
fuse opens (common practice); the plan states them with the word ``diodes`` on the lift.
Equipment whose transformer separates its windings by reinforced insulation needs none (accept the
finding in the plan with that reason).
"""

from __future__ import annotations

from ..model.kinds import is_lift
from .catalogue import Finding
from .context import AuditContext
from .registry import rule
from .signal_networks import signal_grounds

__all__ = ["rule_lift_fault_path"]


@rule("GC226")
def rule_lift_fault_path(ctx: AuditContext) -> list[Finding]:
    """GC226: class I equipment whose signal ground reaches its chassis only through lift networks.

    Parameters:
        ctx: the audit context.
    Returns:
        GC226 findings, one per signal-ground network.
    References:
        the module's description (common practice); IEC 61140 (a part that can become live under
        a single fault is bonded to the protective earth), from memory.
    """
    m = ctx.plan.mains
    if m is None or m.equipment_class != "I":
        return []
    out = []
    for _, places in signal_grounds(ctx):
        names = sorted({k for ks in places.values() for k in ks})
        lifts = [ctx.conductors.get(k) for k in names]
        if not lifts or not all(c is not None and is_lift(c) for c in lifts):
            continue
        if any(c.diodes for c in lifts):
            continue  # a fault passes the stated diodes until the fuse opens
        first = lifts[0]
        out.append(
            Finding(
                "GC226",
                "warning",
                f"the signal ground reaches the protective earth only through the lift network "
                f"{', '.join(names)}: a fault from a mains or high-voltage winding onto it would "
                "drive amperes through the resistor, which burns open and leaves the sockets and "
                "everything on the signal ground at the fault's voltage",
                first.location,
                tuple(names),
                {},
                "bridge the resistor with anti-parallel power diodes (or a bridge rectifier) "
                "rated for the fault current: they pass nothing at hum levels and carry a fault "
                "until the fuse opens (not needed where the transformer separates its windings by "
                "reinforced insulation); the lift then says 'diodes'; never lift the protective "
                "earth",
            )
        )
    return out
