"""GC229: touchable metal of a box fed at extra-low voltage that makes a hazardous voltage inside.

A valve headphone amplifier on a double-insulated low-voltage adapter has no protective earth, and
needs none for the adapter's 16 V; but it steps its supply up to the high tension its valves need
inside the box. A chafed high-tension lead that touches the case then makes the case live, unless
the case is tied to the high tension's own return: the fault is a short of that supply, which its
fuse or its own impedance ends, and the case stays near 0 V (common practice; IEC 61140's single
fault: a part that can become live under a single fault is held by a bond, from memory). The bond
is held to the same 0.1 Ω as a protective bond (IEC 60065 15.2's limit, REFERENCE.md): a screw
through an anodised or painted finish is no bond to count on.

The high-tension supply is any rectifier whose winding is above the extra-low-voltage limit (50 V
rms); the box is fed at extra-low voltage when its ``mains`` is 50 V or less.
"""

from __future__ import annotations

from ..model.supplies import elv_fed_high_tension, winding_span
from ..physics.dc_paths import dc_resistance, element_nodes
from ..physics.safety import STANDARD_PE_LIMIT
from .catalogue import Finding
from .electrical import Solved
from .equipment import ELV_LIMIT
from .registry import rule

__all__ = ["rule_elv_fed_high_tension"]


@rule("GC229", needs="solve")
def rule_elv_fed_high_tension(s: Solved) -> list[Finding]:
    """GC229: in a box fed at extra-low voltage, touchable metal not bonded within 0.1 Ω to the
    return of a supply above the extra-low-voltage limit.

    Parameters:
        s: the solved network with its context (the plan's circuit: each part's worst spot).
    Returns:
        GC229 findings, one per touchable part (dangers, as GC206's over the same limit in class I
        equipment).
    References:
        the module's description (common practice; IEC 61140, from memory; IEC 60065 15.2).
    """
    plan = s.plan
    m = plan.mains
    if not elv_fed_high_tension(m, plan.rectifiers):
        return []
    ht = sorted(
        (r for r in plan.rectifiers if winding_span(r, plan.rectifiers) > ELV_LIMIT),
        key=lambda r: (-r.secondary, r.name),
    )
    parts = [x for x in plan.metals if x.touchable and not x.signal_only]
    if not ht or not parts:
        return []
    supply = ht[0]
    peak = supply.secondary * 2**0.5
    ret = element_nodes(s.circuit, supply.a)
    out = []
    for part in parts:
        spots = element_nodes(s.circuit, part.name)
        r = dc_resistance(s.circuit, spots, ret) if spots and ret else None
        if r is not None and r <= STANDARD_PE_LIMIT:
            continue
        where = (
            "nothing joins it to that supply's return, so a chafed high-tension lead would "
            f"leave it at up to {peak:.0f} V"
            if r is None
            else f"its bond to that supply's return is {r * 1e3:.0f} mΩ, over the "
            f"{STANDARD_PE_LIMIT * 1e3:.0f} mΩ a bond is held to: should that joint open, a "
            f"chafed high-tension lead would leave it at up to {peak:.0f} V"
        )
        out.append(
            Finding(
                "GC229",
                "danger",
                f"{part.name} is touchable metal of a box fed at {m.voltage:g} V that makes "
                f"{supply.secondary:g} V rms inside ({supply.name}): {where}",
                part.location,
                (part.name, supply.name),
                {} if r is None else {"path_resistance_mohm": r * 1e3},
                f"bond {part.name} to {supply.a} (the high tension's return, or the star it is "
                "wired to) by a wire of its own "
                "on a stud with a toothed washer on bare metal — a screw through an anodised or "
                "painted finish is no bond",
            )
        )
    return out
