"""GC231: an IT supply's first fault — the touch voltage it leaves on earthed metal, the
installation's earth electrode R_A times the supply's first-fault current I_d, within 50 V (IEC
60364-4-41 411.6.2).

A first fault from a line to earthed metal in an IT supply is not disconnected: no point of the
supply is earthed (or only through a high impedance), so the fault current is the network's small
capacitive and leakage current, and the supply runs on until an insulation monitor's alarm has the
fault found (411.6.3). The second fault, on the other line, is a short through the protective
conductors, checked like a TN fault (GC208, :func:`groundcheck.physics.fault_loop.fault_emf`).
"""

from __future__ import annotations

from ..physics.safety import TOUCH_LIMIT
from .catalogue import Finding
from .context import AuditContext
from .registry import rule
from .earthing_system import electrode_target

__all__ = ["rule_it_first_fault"]


@rule("GC231")
def rule_it_first_fault(ctx: AuditContext) -> list[Finding]:
    """GC231 at a plan's IT mains, or an installation's IT supply, that earths the metal of class I
    equipment: a danger when R_A × I_d is over 50 V, a note when the plan does not state both.

    Parameters:
        ctx: the audit context.
    Returns:
        the finding, or nothing.
    References:
        IEC 60364-4-41 411.6.2 and 411.6.3, from memory.
    """
    plan = ctx.plan
    if plan.supply is not None:  # an installation
        record, element = plan.supply, "supply"
        earthed = any(d.equipment_class == "I" and d.plugged is not None for d in plan.devices)
    else:
        record, element = plan.mains, "mains"
        earthed = record is not None and record.equipment_class == "I" and bool(plan.metals)
    if record is None or record.system != "IT" or not earthed:
        return []
    r_a, i_d = record.electrode, record.first_fault
    if r_a is None or i_d is None:
        return [_not_checked(record, element, r_a, i_d)]
    return _over_the_limit(record, element, r_a, i_d)


def _not_checked(record, element: str, r_a, i_d) -> Finding:
    """GC231's note: the plan states no electrode or no first-fault current, so the first fault's
    touch voltage is not worked."""
    missing = " and ".join(
        w for w, v in (("'electrode'", r_a), ("'first-fault'", i_d)) if v is None
    )
    return Finding(
        "GC231",
        "note",
        "IT supply: a first fault to earthed metal is not disconnected and leaves the "
        "installation's electrode times the supply's first-fault current on it (at most "
        f"{TOUCH_LIMIT:g} V); not checked, the {element} statement states no {missing}",
        record.location,
        (element,),
        {},
        "state the installation's earth electrode and the supply's first-fault current (the "
        f"network operator gives it) in the {element} statement, e.g. ', electrode 10 ohm, "
        "first-fault 1 A'; an insulation monitor must signal a first fault",
    )


def _over_the_limit(record, element: str, r_a: float, i_d: float) -> list[Finding]:
    """GC231's danger when R_A × I_d is over the touch-voltage limit (nothing within it)."""
    u = r_a * i_d
    if u <= TOUCH_LIMIT:
        return []
    return [
        Finding(
            "GC231",
            "danger",
            f"IT supply: a first fault to earthed metal draws {i_d:g} A through the earth "
            f"electrode ({r_a:g} Ω) and is not disconnected: {u:.3g} V against earth, over "
            f"{TOUCH_LIMIT:g} V, stays on the metal until the fault is found",
            record.location,
            (element,),
            {
                "electrode_ohm": r_a,
                "first_fault_a": i_d,
                "touch_limit_v": TOUCH_LIMIT,
                "electrode_times_first_fault_v": u,
            },
            f"have the installation's earth electrode improved to at most "
            f"{electrode_target(i_d):g} Ω (a qualified electrician measures and repairs it); keep "
            "the insulation monitor that signals a first fault; follow local electrical codes",
        )
    ]
