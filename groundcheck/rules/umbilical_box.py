"""GC233: a box with no mains of its own, fed by an umbilical from a class I supply box, whose
touchable metal is not bonded to that box's protective earth.

An amplifier whose supply is in another box (its high tension, heaters and 0 V arriving by an
umbilical's cores) has no protective earth of its own: a core that chafes against its case, or a
valve that fails, makes the case live unless the case is bonded to the supply box's protective
earth — in practice by a protective core of the umbilical — within the 0.1 Ω a bond is held to.
Written as one plan with both boxes, the bond is checked like any other (GC201, GC206); written as
two placed devices joined by cores in an installation, this rule checks it: each touchable part of
the mains-less box, its worst spot, against the supply box's inlet protective terminal, through its
protective conductors and bonds (a DC solve; a 0 V core that also joins the case is a return, never
its protective earth).
"""

from __future__ import annotations

from ..model.kinds import PROTECTIVE_ROLES, can_carry_protective
from ..model.records import PE_POINT
from ..physics.dc_paths import dc_resistance, element_nodes
from ..physics.safety import STANDARD_PE_LIMIT
from .catalogue import Finding
from .electrical import Solved
from .registry import rule

__all__ = ["rule_umbilical_box"]


@rule("GC233", needs="solve")
def rule_umbilical_box(s: Solved) -> list[Finding]:
    """GC233: touchable metal of a mains-less placed box fed by an umbilical, not bonded within
    0.1 Ω to the protective earth of the class I box at the umbilical's other end.

    Parameters:
        s: the solved network with its context (the installation's circuit).
    Returns:
        GC233 findings, one per touchable part (dangers, as GC206's over the same limit).
    References:
        the module's description (common practice; IEC 61140, from memory; IEC 60065 15.2,
        0.1 Ω).
    """
    plan = s.plan
    device_of, own = plan.index.device_of, dict(plan.device_plans)
    out = []
    for d in plan.devices:
        sub = own.get(d.name)
        if sub is None or sub.mains is not None or d.plugged is not None:
            continue
        feeder = _feeder(plan, d.name, own)
        parts = [
            m
            for m in plan.metals
            if device_of(m.name) == d.name and m.touchable and not m.signal_only
        ]
        if feeder is None or not parts:
            continue
        # protective conductors and bonds only: a 0 V core that also joins the case is a return,
        # never its protective earth
        circ = s.circuit.restricted(
            {
                c.name
                for c in plan.conductors
                if can_carry_protective(c) and c.role in PROTECTIVE_ROLES
            }
        )
        out += _unbonded(circ, parts, d.name, feeder)
    return out


def _unbonded(circ, parts, box: str, feeder: str) -> list[Finding]:
    """GC233's findings for the box's touchable parts not bonded within 0.1 Ω to the feeder's
    inlet protective terminal over the protective circuit ``circ``."""
    out = []
    pe = element_nodes(circ, f"{feeder}.{PE_POINT}")
    for part in parts:
        spots = element_nodes(circ, part.name)
        r = dc_resistance(circ, spots, pe) if spots and pe else None
        if r is not None and r <= STANDARD_PE_LIMIT:
            continue
        where = (
            f"nothing joins it to {feeder}'s protective earth"
            if r is None
            else f"its path to {feeder}'s protective earth is {r * 1e3:.0f} mΩ, over the "
            f"{STANDARD_PE_LIMIT * 1e3:.0f} mΩ a bond is held to"
        )
        out.append(
            Finding(
                "GC233",
                "danger",
                f"{part.name} is touchable metal of {box}, a box with no mains of its own "
                f"fed by an umbilical from {feeder}: {where}, so a core chafing against it "
                "would leave it live",
                part.location,
                (part.name, feeder),
                {} if r is None else {"path_resistance_mohm": r * 1e3},
                f"bond {part.name} to {feeder}'s protective earth by a protective core of "
                "the umbilical (at least as thick as the supply box's line conductor), "
                "landed on a stud of its own with a toothed washer on bare metal at each end",
            )
        )
    return out


def _feeder(plan, name: str, own: dict) -> str | None:
    """The class I box with a mains of its own that an umbilical's cores join to box ``name``
    (the first by name), or None."""
    device_of = plan.index.device_of
    found = set()
    for c in plan.conductors:
        if not c.bundle:  # (an umbilical's cores name it)
            continue
        ends = {device_of(c.a), device_of(c.b)}
        if name in ends:
            found |= ends - {name, None}
    for other in sorted(found):
        m = own[other].mains if other in own else None
        if m is not None and m.equipment_class == "I":
            return other
    return None
