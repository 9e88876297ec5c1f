"""GC208: the disconnection of a line-to-metal fault within IEC 60364-4-41's time — at each part
of the plan's own equipment (from :func:`groundcheck.physics.safety.protective_figures`), and at
each bought class I device of an installation (:mod:`.simple_disconnection`)."""

from __future__ import annotations

from typing import TYPE_CHECKING

from ..model.records import Plan
from .catalogue import Finding

if TYPE_CHECKING:
    from ..physics.safety import SafetyResult

__all__ = [
    "time_row",
    "second_fault",
    "device_text",
    "disconnection",
    "no_clearing_device",
    "late_simple_device",
]


def time_row(system: str) -> str:
    """The column of IEC 60364-4-41 Table 41.1 a system's faults are timed by, in words.

    Parameters:
        system: the earthing system.
    Returns:
        TT's, or TN's (an IT supply's second fault takes TN's, said as such).
    References:
        IEC 60364-4-41 411.6.4 a) (an IT supply's metal joined by protective conductors).
    """
    return {"TT": "TT", "IT": "IT, second fault, as TN"}.get(system, "TN")


def second_fault(system: str, fault: str) -> str:
    """A fault in words, said as the second fault an IT supply needs before a current flows that
    a protective device sees (the first is GC231's).

    Parameters:
        system: the earthing system.
        fault: the fault in words ("a line-to-deck fault").
    Returns:
        the words, unchanged for other systems.
    References:
        IEC 60364-4-41 411.6.4.
    """
    if system != "IT":
        return fault
    return f"{fault} with a first fault on the other line (an IT supply)"


def device_text(m) -> str:
    """The devices that clear a fault at the inlet, in words ("16 A type B breaker and 30 mA RCD").

    Parameters:
        m: the mains record.
    Returns:
        the words ("stated clearing" when the plan states only a clearing time).
    References:
        none (wording).
    """
    parts = []
    rating, kind = m.inlet_device
    if rating is not None:
        what = " breaker" if kind.startswith("breaker") else " fuse"
        parts.append(f"{rating:g} A {kind.replace('breaker-', 'type ') + what}")
    if m.rcd is not None:
        parts.append(f"{m.rcd * 1e3:g} mA RCD")
    return " and ".join(parts) or "stated clearing"


#: GC208's fix on an IT supply, where an RCD over both faulty circuits sees no residual current
IT_FIX = (
    "on an IT supply a second fault's current goes out on one line and back on the other, so an "
    "RCD over both circuits does not see it: lower the fault loop's resistance or the rating of "
    "the device that must open, so that it clears within the limit; for a portable generator of "
    "the installation's own, have a qualified person link its neutral to its frame and earth "
    "(a TN-S supply of its own, whose RCD then disconnects an earth fault); follow local "
    "electrical codes"
)


#: GC208's fix for a fault too small to be sure of opening the device, and for one cleared late
NEVER_FIX = (
    "add a 30 mA RCD to the supply, or lower the fault loop's resistance or the fuse rating the "
    "equipment allows"
)
LATE_FIX = (
    "protect the supply with a 30 mA RCD, or lower the fault loop's resistance or the fuse "
    "rating so that the fuse clears within the limit"
)


def _ahead(m) -> str:
    """Beside the equipment's fuse the breaker clears a fault at the inlet, ahead of the fuse: the
    words that say so after the device's name."""
    if m.fuse is not None and m.breaker is not None:
        return " (a fault at the inlet, ahead of the equipment's fuse)"
    return ""


def _fix(system: str, fix: str) -> str:
    """GC208's fix line: ``fix``, or on an IT supply :data:`IT_FIX`."""
    return IT_FIX if system == "IT" else fix


def disconnection(plan: Plan, safety: SafetyResult, p) -> list[Finding]:
    """GC208: the protective device does not disconnect a fault at one part within IEC
    60364-4-41's maximum time.

    Parameters:
        plan: the plan.
        safety: its protective-earth figures.
        p: the part's fault figures.
    Returns:
        the finding, or nothing when the fault is cleared in time.
    References:
        IEC 60364-4-41 411.3.2 (Table 41.1).
    """
    m, sup = plan.mains, safety.supply
    if m.fuse is None and m.clear_time is None and m.rcd is None:
        return []
    part = plan.metal(p.part)
    limit = sup.max_time
    figs = {
        "fault_current_a": p.fault_current,
        "touch_voltage_v": p.touch_voltage,
        "max_disconnection_s": limit,
    }
    where = f"{time_row(sup.system)} at {m.voltage:g} V"
    fault = second_fault(sup.system, f"a line-to-{p.part} fault")
    ahead = _ahead(m)
    if p.clear_time is None:
        return [
            Finding(
                "GC208",
                "danger",
                f"{fault} draws {p.fault_current:.3g} A, too little to be sure of opening the "
                f"{device_text(m)}{ahead}; {p.touch_voltage:.0f} V against earth would stay on "
                f"{p.part}",
                part.location,
                (p.part,),
                figs,
                _fix(sup.system, NEVER_FIX),
            )
        ]
    if limit is not None and p.clear_time > limit:
        stated = " (stated in plan)" if p.device == "stated" else ""
        return [
            Finding(
                "GC208",
                "danger",
                f"{fault} ({p.fault_current:.3g} A) is cleared by the {device_text(m)}{ahead} in "
                f"up to {p.clear_time:.3g} s{stated}; IEC 60364-4-41 allows {limit:g} s "
                f"({where}), and {p.touch_voltage:.0f} V against earth is on {p.part} meanwhile",
                part.location,
                (p.part,),
                {**figs, "clear_time_s": p.clear_time},
                _fix(sup.system, LATE_FIX),
            )
        ]
    return []


def no_clearing_device(plan: Plan, safety: SafetyResult) -> list[Finding]:
    """GC208 (a note): no fuse, breaker or RCD stated, so disconnection is not checked.

    Parameters:
        plan: the plan.
        safety: its protective-earth figures.
    Returns:
        the note, or nothing.
    References:
        none (what the plan leaves unsaid).
    """
    m = plan.mains
    if m.fuse is None and m.clear_time is None and m.rcd is None and safety.parts:
        return [
            Finding(
                "GC208",
                "note",
                "no fuse, breaker or RCD in the mains statement: disconnection not checked",
                m.location,
                ("mains",),
                {},
                "add e.g. ', fuse 2 A slow' to the mains statement",
            )
        ]
    return []


def late_simple_device(device, m, limit, part, route) -> list[Finding]:
    """GC208 at a bought class I device (no plan of its own) whose fault is not cleared within
    ``limit`` seconds, or at all.

    Parameters:
        device: the installation's device record.
        m: its mains as the installation supplies it.
        limit: the longest disconnection time allowed, s (None: no limit known).
        part: its fault figures (:func:`groundcheck.physics.safety.line_to_part`).
        route: the installation's conductors its fault loop runs through, or None.
    Returns:
        the finding, or nothing when the fault is cleared in time.
    References:
        IEC 60364-4-41 Table 41.1.
    """
    if part.clear_time is not None and (limit is None or part.clear_time <= limit):
        return []
    through = ", ".join(r[0] for r in route) if route else "the supply's default final circuit"
    clears = device_text(m).replace(" and ", " or ")
    system = time_row(m.system)
    figs = {
        "fault_current_a": part.fault_current,
        "touch_voltage_v": part.touch_voltage,
        "max_disconnection_s": limit,
    }
    head = (
        f"{device.name}, a class I device with no plan of its own plugged into {device.plugged}: "
        f"{second_fault(m.system, 'a fault to its metal')} draws {part.fault_current:.3g} A "
        f"through {through} and its cord "
        "(its own earth path taken as nothing, the best case)"
    )
    if part.clear_time is None:
        said = f"too little to be sure of opening the {clears}"
    else:
        said = (
            f"cleared by the {clears} in up to {part.clear_time:.3g} s; IEC 60364-4-41 allows "
            f"{limit:g} s ({system} at {m.voltage:g} V)"
        )
        figs["clear_time_s"] = part.clear_time
    return [
        Finding(
            "GC208",
            "danger",
            f"{head}, {said}, and {part.touch_voltage:.0f} V against earth would stay on its "
            "metal meanwhile",
            device.location,
            (device.name,),
            figs,
            _late_fix(m),
        )
    ]


def _late_fix(m) -> str:
    """The fix for a bought device's fault not cleared in time: an RCD; on TN also a shorter or
    thicker lead (on TT the earth electrode, not the lead, limits the fault current); on IT
    :data:`IT_FIX` (an RCD does not see a second fault)."""
    rcd = "protect the outlets with a 30 mA RCD (have a qualified electrician fit it)"
    if m.system == "IT":
        return IT_FIX
    if m.system == "TT":
        return rcd + ": on a TT supply the earth electrode, not the lead, limits the fault current"
    return (
        rcd + ", or plug the device in nearer the board: a shorter or thicker lead lowers the loop"
    )
