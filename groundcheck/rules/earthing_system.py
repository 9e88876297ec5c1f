"""Rules on the earthing system the equipment is plugged into, and on metal the protective earth
need not reach: a TT supply's electrode against its RCD (GC220), a TT supply protected by an
overcurrent device alone (GC221), and metal written ``signal-only`` (GC222).
"""

from __future__ import annotations

import math

from typing import TYPE_CHECKING

from ..physics.fault_loop import external_loop
from ..physics.safety import TOUCH_LIMIT
from ..model.installation import transformer_feeds
from ..model.records import Plan
from ..model.supplies import elv_fed_high_tension
from .catalogue import Finding
from .context import AuditContext
from .registry import rule

if TYPE_CHECKING:
    from .electrical import Solved

__all__ = ["rule_tt_supply", "rule_signal_only_metal", "INSTANT_TRIP_FLOOR"]

#: A, the least fault current that trips the smallest circuit breaker a socket circuit has at once:
#: a 6 A type B breaker's instantaneous band starts at 5 × In (IEC 60898-1, from memory); below it
#: a TT fault through the electrode is cleared by nothing but an RCD or a device's own small fuse
INSTANT_TRIP_FLOOR = 30.0


@rule("GC220", "GC221", needs="solve")
def rule_tt_supply(s: Solved) -> list[Finding]:
    """GC220: a TT supply whose electrode R_A times the RCD's IΔn exceeds 50 V (IEC 60364-4-41
    411.5.3); GC221: a TT supply protected by a fuse or breaker alone (an installation's: one that
    feeds simple devices, whose own fuse nothing here can check).

    Parameters:
        s: the solved network with its context.
    Returns:
        GC220 and GC221 findings.
    References:
        IEC 60364-4-41 411.5 (TT systems), from memory.
    """
    if s.plan.supply is not None:  # an installation (it states no mains of its own)
        return _electrode_in_tt(s.plan) + _unchecked_in_tt(s.plan)
    m = s.plan.mains
    if s.safety is None or m is None or m.system != "TT" or not s.safety.parts:
        return []
    if m.rcd is not None:
        return _electrode_over_rcd(s.safety.supply.electrode, m.rcd, m.location, "mains", "metal")
    if m.fuse is None:
        return []
    return [
        Finding(
            "GC221",
            "note",
            "TT supply protected by a fuse or breaker alone: disconnection relies on a low fault "
            f"loop through the earth electrode ({s.safety.supply.ze:g} Ω in the figures), which "
            "soil and season change",
            m.location,
            ("mains",),
            {"external_loop_ohm": s.safety.supply.ze},
            "protect the circuit with an RCD (30 mA for socket outlets), as TT installations "
            "usually are; have the loop measured by a qualified electrician",
        )
    ]


def _electrode_over_rcd(r_a: float, rcd: float, location, element: str, metal: str):
    """GC220 when the electrode R_A times the RCD's IΔn is over 50 V (IEC 60364-4-41 411.5.3),
    at the statement that states them; nothing otherwise."""
    u = r_a * rcd
    if u <= TOUCH_LIMIT:
        return []
    return [
        Finding(
            "GC220",
            "danger",
            f"TT supply: the earth electrode ({r_a:g} Ω) times the RCD's rated residual current "
            f"({rcd * 1e3:g} mA) is {u:.3g} V, over {TOUCH_LIMIT:g} V: a fault below the RCD's "
            f"rating can leave the {metal} above the touch-voltage limit",
            location,
            (element,),
            {
                "electrode_ohm": r_a,
                "rcd_a": rcd,
                "touch_limit_v": TOUCH_LIMIT,
                "electrode_times_rcd_v": u,
            },
            _tt_fix(r_a, rcd),
        )
    ]


def _electrode_in_tt(plan: Plan) -> list[Finding]:
    """GC220 at an installation's TT supply whose stated electrode times its RCD's rating is over
    50 V, when it feeds any class I device: the building's own breach, at its supply line (each
    device with a plan of its own also gets it under its name)."""
    supply = plan.supply
    class_i = [d for d in plan.devices if d.equipment_class == "I" and d.plugged is not None]
    if supply.system != "TT" or supply.rcd is None or supply.electrode is None or not class_i:
        return []
    return _electrode_over_rcd(
        supply.electrode, supply.rcd, supply.location, "supply", "metal of every class I device"
    )


def _unchecked_devices(plan: Plan) -> list[str]:
    """The class I devices with no plan of their own whose disconnection nothing checks: all of
    them, or with the supply's breaker stated those behind a transformer (GC208 checks the rest
    at each device, :mod:`.simple_disconnection`)."""
    own = {name for name, p in plan.device_plans if p.mains is not None}
    simple = [
        d
        for d in plan.devices
        if d.name not in own and d.equipment_class == "I" and d.plugged is not None
    ]
    if plan.supply.breaker is not None:
        behind = transformer_feeds(plan.transformers, plan.conductors, plan.index.devices)
        simple = [d for d in simple if d.plugged in behind]
    return sorted(d.name for d in simple)


def _unchecked_in_tt(plan: Plan) -> list[Finding]:
    """GC221 at a TT supply with no RCD stated when it feeds class I devices that have no plan of
    their own to check (simple devices): a fault in one is disconnected only if its own fuse opens
    on the current the earth electrode lets through, which nothing here can tell. With the
    supply's breaker stated each device's disconnection is checked instead (GC208,
    :mod:`.simple_disconnection`)."""
    supply = plan.supply
    simple = _unchecked_devices(plan)
    if supply.system != "TT" or supply.rcd is not None or not simple:
        return []
    # the external loop as a device's fault loop takes it (the stated electrode and the supply's
    # own part, or the TT default loop); at most its current: the cables, cord and device only
    # add to the loop (IEC 60364-4-41 411.5)
    loop, r_a = external_loop(supply.for_device(None))
    electrode = f"{r_a:g} Ω" if supply.electrode is not None else f"not stated: {r_a:g} Ω taken"
    most = supply.voltage / loop
    figures = {"electrode_ohm": r_a, "fault_current_max_a": most}
    fix = (
        "protect the installation's outlets with an RCD (30 mA for socket outlets), as TT "
        "installations usually are; have the electrode measured by a qualified electrician"
    )
    has = "has" if len(simple) == 1 else "have"
    who = f"{', '.join(simple)} {has} no plan of its own to check"
    if most < INSTANT_TRIP_FLOOR:
        touch = supply.voltage * r_a / loop
        return [
            Finding(
                "GC221",
                "danger",
                f"TT supply with no RCD stated for its outlets: a fault to the metal of a class "
                f"I device draws at most {most:.3g} A through the earth electrode ({electrode}), "
                f"below the {INSTANT_TRIP_FLOOR:g} A that trips even a 6 A type B breaker at "
                "once; "
                f"{who}, so nothing known clears it, and about {touch:.0f} V against earth would "
                "stay on its metal",
                supply.location,
                ("supply", *simple),
                {**figures, "touch_voltage_v": touch},
                fix,
            )
        ]
    return [
        Finding(
            "GC221",
            "note",
            f"TT supply with no RCD stated for its outlets: {who}, and a fault to its metal is "
            "disconnected only if its own fuse opens on the current the earth electrode "
            f"({electrode}) lets through",
            supply.location,
            ("supply", *simple),
            figures,
            fix,
        )
    ]


#: Ω, the electrode resistance above which an electrode may not stay as measured through the
#: seasons (common practice; docs/language.md's range of plausible ratings says the same)
STABLE_ELECTRODE = 200.0


def electrode_target(current: float) -> float:
    """The electrode resistance R_A, Ω, to aim for: the largest at two significant figures rounded
    down for which R_A × the current (an RCD's IΔn, an IT supply's first-fault current I_d) stays
    within the touch-voltage limit (IEC 60364-4-41 411.5.3: R_A × IΔn ≤ 50 V; 411.6.2: R_A × I_d
    ≤ 50 V), and never above :data:`STABLE_ELECTRODE` (a 500 Ω target for a 100 mA RCD sat
    exactly on the limit, on an electrode that soil and season move).

    Parameters:
        current: the RCD's rated residual current or the first-fault current, A.
    Returns:
        the target, Ω.
    References:
        IEC 60364-4-41 411.5.3 and 411.6.2.
    """
    r = TOUCH_LIMIT / current
    step = 10.0 ** (math.floor(math.log10(r)) - 1)
    return min(math.floor(r / step + 1e-9) * step, STABLE_ELECTRODE)


#: rated residual currents of general-purpose RCDs, A (IEC 61008-1 preferred values, from memory)
RCD_RATINGS = (0.006, 0.01, 0.03, 0.1, 0.3, 0.5)


def _tt_fix(r_a: float, rated: float) -> str:
    """GC220's fix: a 30 mA RCD first when the electrode as it is allows it (it is also the
    additional protection socket outlets need, GC225), else the electrode to reach with this
    RCD (:func:`electrode_target`) and the largest standard RCD rating the electrode allows (none
    when even 6 mA does not)."""
    fits = [x for x in RCD_RATINGS if x < rated and r_a * x <= TOUCH_LIMIT]
    rcd = 0.03 if 0.03 in fits else max(fits, default=None)
    target = electrode_target(rated)
    electrode = (
        f"have the installation's earth electrode improved to at most {target:g} Ω (a qualified "
        "electrician measures and repairs it"
        + (
            f"; an electrode above {STABLE_ELECTRODE:g} Ω may not stay so through the seasons)"
            if target >= STABLE_ELECTRODE
            else ")"
        )
    )
    if rcd is None:
        return electrode + "; follow local electrical codes"
    with_rcd = (
        f"protect the circuit with a {rcd * 1e3:g} mA RCD ({r_a * rcd:.3g} V at its rating"
        + ("; the additional protection socket outlets need too)" if rcd == 0.03 else ")")
    )
    if rcd == 0.03:
        return f"{with_rcd}, or {electrode}; follow local electrical codes"
    return f"{electrode}, or {with_rcd}; follow local electrical codes"


@rule("GC222")
def rule_signal_only_metal(ctx: AuditContext) -> list[Finding]:
    """GC222: metal written ``signal-only`` in a plan with a protective earth is not held to
    protective bonding; the note says so, with the reason, so the exemption is never silent.

    Parameters:
        ctx: the audit context.
    Returns:
        GC222 findings.
    References:
        IEC 61140 (a part that cannot become live under a single fault needs no protective
        bonding), from memory.
    """
    m = ctx.plan.mains
    # held to bonding: class I equipment, and a box on a low-voltage adapter that makes its high
    # tension inside (GC229)
    if m is None or not (m.equipment_class == "I" or elv_fed_high_tension(m, ctx.plan.rectifiers)):
        return []
    return [
        Finding(
            "GC222",
            "note",
            f"{part.name} is written signal-only: it holds no mains circuit and cannot become "
            "live under a single fault, so it is not held to protective bonding",
            part.location,
            (part.name,),
            {},
            f"make sure nothing in {part.name} connects to mains (no mains switch, lamp or supply "
            "inside it); if anything does, remove 'signal-only' and bond it with a protective "
            "conductor",
        )
        for part in ctx.plan.metals
        if part.signal_only
    ]
