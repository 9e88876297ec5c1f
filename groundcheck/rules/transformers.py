"""Transformer rules: what each device of an installation is plugged into, and what a
transformer between the wall and the devices changes.

GC217: a device (or a transformer's primary) plugged into a supply of another voltage.
GC218: an isolating transformer's floating secondary: one device on it (a note), its separation
lost through an earthed chassis, or two devices sharing it.
GC219: the devices behind a transformer drawing more than its rating.
"""

from __future__ import annotations

from ..model.installation import supply_at, suits, transformer_feeds
from ..model.records import PE_POINT
from .catalogue import Finding
from .context import AuditContext
from .registry import rule

__all__ = ["rule_supply_voltage", "rule_isolating_secondary", "rule_transformer_rating"]


def _feeds(plan) -> dict:
    devices = plan.index.devices
    return transformer_feeds(plan.transformers, plan.conductors, devices)


def _where(point: str, feeds: dict) -> str:
    t = feeds.get(point)
    return f"transformer {t.name}'s secondary" if t is not None else "the installation's supply"


def _outlets_for(plan, volts: float, feeds: dict) -> list[str]:
    """The plug points named in the plan (transformer secondaries and outlets) whose supply
    suits ``volts``."""
    named = [t.name for t in plan.transformers]
    named += [p.name for p in plan.points if p.kind == "outlet"]
    return [n for n in dict.fromkeys(named) if suits(volts, supply_at(n, feeds, plan.supply))]


@rule("GC217")
def rule_supply_voltage(ctx: AuditContext) -> list[Finding]:
    """GC217: a device whose own plan is for another voltage than the point it is plugged into
    gives (beyond IEC 60038's ±10 %), or a transformer whose primary is.

    Parameters:
        ctx: the audit context.
    Returns:
        GC217 findings, one per device or transformer.
    References:
        IEC 60038 (standard voltages, ±10 % supply tolerance), from memory.
    """
    plan = ctx.plan
    if plan.supply is None:
        return []
    feeds = _feeds(plan)
    return _devices_off_voltage(plan, feeds) + _primaries_off_voltage(plan, feeds)


def _devices_off_voltage(plan, feeds: dict) -> list[Finding]:
    """GC217 for each device plugged into a point that does not give its own plan's voltage, with
    the plug points that do (or a transformer to add)."""
    own = {n: v for n, v, _ in plan.device_supplies}
    out = []
    for d in plan.devices:
        at = supply_at(d.plugged, feeds, plan.supply)
        if d.plugged is None or d.name not in own or suits(own[d.name], at):
            continue
        volts = own[d.name]
        there = [n for n in _outlets_for(plan, volts, feeds) if n != d.plugged]
        if there:
            fix = (
                f"plug {d.name} into {' or '.join(there[:3])}, which "
                f"give{'s' if len(there) == 1 else ''} {volts:g} V"
            )
        else:
            fix = (
                f"plug {d.name} in behind a transformer from {at[0]:g} V to {volts:g} V (a "
                "'transformer' statement) rated for what it draws"
            )
        out.append(
            Finding(
                "GC217",
                "danger",
                f"device {d.name} is for {volts:g} V but is plugged into {d.plugged}, which gives "
                f"{at[0]:g} V ({_where(d.plugged, feeds)})",
                d.location,
                (d.name, d.plugged),
                {"rated_v": volts, "supplied_v": at[0]},
                f"{fix}; have a qualified person check it before it is used again",
            )
        )
    return out


def _primaries_off_voltage(plan, feeds: dict) -> list[Finding]:
    """GC217 for each transformer whose primary is not for the voltage it is plugged into."""
    out = []
    for t in plan.transformers:
        at = supply_at(t.plugged, feeds, plan.supply)
        if suits(t.primary, at):
            continue
        gives = t.secondary * at[0] / t.primary
        out.append(
            Finding(
                "GC217",
                "danger",
                f"transformer {t.name}'s primary is for {t.primary:g} V but {t.plugged} gives "
                f"{at[0]:g} V ({_where(t.plugged, feeds)}): its secondary gives about {gives:.4g} "
                f"V, not {t.secondary:g} V",
                t.location,
                (t.name, t.plugged),
                {"rated_v": t.primary, "supplied_v": at[0], "secondary_v": gives},
                f"plug {t.name} into a {t.primary:g} V outlet, or use a transformer whose primary "
                f"is for {at[0]:g} V",
            )
        )
    return out


def _behind(plan, t, feeds) -> list:
    return [d for d in plan.devices if d.plugged is not None and feeds.get(d.plugged) is t]


def _separation_lost(d, t, count: int) -> Finding:
    return Finding(
        "GC218",
        "warning",
        f"device {d.name} is on the floating secondary of {t.name}, but its chassis reaches the "
        "main earthing terminal through its interconnects: the separation is lost, and a fault "
        "to its chassis drives current through their shields",
        d.location,
        (d.name, t.name),
        {"devices": count},
        "keep a separated device's chassis off every earth, or plug it into an earthed outlet; "
        "never lift a protective earth to do either",
    )


def _shared(t, devs: list) -> Finding:
    names = ", ".join(d.name for d in devs)
    return Finding(
        "GC218",
        "danger",
        f"{names} share the floating secondary of {t.name}: a first fault in one has no loop to "
        f"earth, but a second fault, on the other pole in another, puts the full {t.secondary:g} "
        "V between their chassis, and nothing in the plan clears it (no fault loop through "
        "earth)",
        t.location,
        (t.name, *(d.name for d in devs)),
        {"devices": len(devs), "secondary_v": t.secondary},
        "give each device its own isolating transformer, or plug them into earthed outlets; a "
        "shared separated circuit needs an unearthed bond between the chassis and a device that "
        "disconnects a second fault, designed by a qualified person",
    )


def _separated(d, t) -> Finding:
    return Finding(
        "GC218",
        "note",
        f"device {d.name} is on the floating secondary of {t.name} (electrical separation): a "
        "single fault to its chassis has no loop to earth, so nothing trips and no current flows "
        "through a person touching it and earth",
        d.location,
        (d.name, t.name),
        {"devices": 1},
        f"keep {d.name} the only device on {t.name} and its chassis off every earth",
    )


@rule("GC218")
def rule_isolating_secondary(ctx: AuditContext) -> list[Finding]:
    """GC218: the devices on an isolating transformer's floating secondary.  A single fault there
    has no loop to earth (what electrical separation removes); a device whose chassis reaches
    earth all the same (through an interconnect) has lost it; two class I devices sharing the
    secondary meet a second fault, on the other pole in the other device, with the full
    secondary voltage between their chassis and nothing in the plan to clear it.

    Parameters:
        ctx: the audit context.
    Returns:
        GC218 findings: a note per separated device, a warning per separation lost, a danger per
        shared secondary.
    References:
        IEC 60364-4-41 clause 413 (protective measure: electrical separation; one item of
        equipment per source where ordinary persons use it), from memory.
    """
    plan = ctx.plan
    isolating = [t for t in plan.transformers if t.isolating]
    if not isolating:
        return []
    feeds = _feeds(plan)
    order, labels, _ = ctx.parts
    label = dict(zip(order, labels.tolist()))
    mets = {label.get(p.name) for p in plan.points if p.kind == "earthing-terminal"}
    metal: dict = {}
    for m in plan.metals:
        dev = plan.index.device_of(m.name)
        if dev is not None:
            metal.setdefault(dev, []).append(m.name)
    out = []
    for t in isolating:
        devs = [d for d in _behind(plan, t, feeds) if d.equipment_class == "I"]
        # its protective terminal or any of its metal (a cord with no earth in it: the chassis
        # reached through the links' shields all the same)
        earthed = [
            d
            for d in devs
            if any(
                label.get(n, -1) in mets for n in (f"{d.name}.{PE_POINT}", *metal.get(d.name, ()))
            )
        ]
        out += [_separation_lost(d, t, len(devs)) for d in earthed]
        if len(devs) >= 2:
            out.append(_shared(t, devs))
        elif devs and not earthed:
            out.append(_separated(devs[0], t))
    return out


@rule("GC219")
def rule_transformer_rating(ctx: AuditContext) -> list[Finding]:
    """GC219: the devices plugged in behind a transformer draw (as each states with ``draws``)
    more than its rated apparent power.

    Parameters:
        ctx: the audit context.
    Returns:
        GC219 findings, one per overloaded transformer.
    References:
        a transformer's rating is the apparent power it delivers continuously within its
        temperature rise (IEC 61558-1, from memory); the loads' apparent powers are added
        (an upper bound: common practice).
    """
    plan = ctx.plan
    if not any(t.rating is not None for t in plan.transformers):
        return []
    feeds = _feeds(plan)
    out = []
    for t in plan.transformers:
        devs = _behind(plan, t, feeds)
        total = sum(d.draws for d in devs if d.draws is not None)
        if t.rating is None or total <= t.rating:
            continue
        unknown = [d.name for d in devs if d.draws is None]
        verb = "states" if len(unknown) == 1 else "state"
        more = f"; {', '.join(unknown)} {verb} no draw" if unknown else ""
        out.append(
            Finding(
                "GC219",
                "fault",
                f"the devices behind {t.name} draw {total:g} VA, over its rating of {t.rating:g} "
                f"VA{more}",
                t.location,
                (t.name, *(d.name for d in devs)),
                {"draws_va": total, "rating_va": t.rating},
                "use a transformer rated for what they draw, or plug some of them in elsewhere at "
                "their own voltage",
            )
        )
    return out
