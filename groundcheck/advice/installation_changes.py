"""Candidate changes between the devices of an installation: a balanced interconnect, a ground-lift
network on a device's signal side, a shield landed on the chassis where it enters, and plugging
devices in elsewhere (two devices an interconnect joins into one outlet or strip; a device whose
earth path is broken into an outlet whose path is sound).  See :mod:`groundcheck.advice.candidates`
for the rest.
"""

from __future__ import annotations

import math

from ..model.kinds import is_fastening_kind, joins_devices
from ..model.installation import rated_voltage, shield_ends, suits, supply_at
from ..model.index import outermost
from ..model.records import DEFAULT_CORD, Plan
from ..rules.pe_figures import DEVICE_EARTH_LIMIT
from ..rules.results import Result
from .changes import Answer, Candidate, ChangeContext, appended, squeeze
from .earth_wires import earth_wire_moves
from .edits import Edit
from .returns import refuse, refused_balanced

__all__ = ["installation_candidates", "earthed_outlets", "shield_to_chassis"]


def installation_candidates(ctx: ChangeContext, answer: Answer, add) -> None:
    """The candidates between devices for loops through their interconnects, passed to ``add``.

    Parameters:
        ctx: the change context.
        answer: the rules naming the action (their code is the candidates' reason).
        add: takes a candidate (or None).
    Returns:
        nothing (the candidates go to ``add``).
    References:
        common practice (the candidates' titles say what each does).
    """
    _link_candidates(ctx, answer.reason, add)
    earth_wire_moves(ctx, answer.reason, add)
    _replug_candidates(ctx, answer.reason, add)
    _loop_replug_candidates(ctx, answer.reason, add)


def _installation_interconnects(plan: Plan, result: Result) -> set[str]:
    """Interconnects in loops through mains cords, or sharing a supply or leakage current with a
    stage."""
    links = {c.name for c in plan.conductors if joins_devices(c)}
    names = {
        e
        for lp in result.loops
        if lp.closed_by == "mains-cords"
        for e in lp.loop.edges
        if e in links
    }
    # a cable that shares a rectifier's charging current is a power umbilical: balancing it cures
    # nothing (the cure is inside the supply: the shared-return changes of candidates.py), so only
    # leakage and stated currents count
    names |= {
        e for row in result.coupling if row.kind != "rectifier" for e in row.shared if e in links
    }
    return names


def _link_candidates(ctx: ChangeContext, reason: str, add) -> None:
    """Between pieces of equipment: a balanced interconnect, or a lift network on a device's signal
    side."""
    for name in sorted(_installation_interconnects(ctx.plan, ctx.result)):
        c = ctx.cond[name]
        st = ctx.statement(c)
        if st is None:
            continue
        ph = ctx.src.find(st, "unbalanced")
        if ph:
            edit = ctx.src.replace(st, [(ph[0], "balanced")])
            add(
                refuse(
                    Candidate(
                        f"use a balanced interconnect for {name}" + _own_ends(ctx, c),
                        reason,
                        (edit,),
                        action="balance",
                        element=name,
                    ),
                    refused_balanced(ctx, c),
                )
            )
        for end in (c.a, c.b):
            pt = ctx.plan.point(end)
            if pt is None or not pt.group:
                continue
            dev = outermost(pt.group)
            bond = ctx.cond.get(f"{dev}.gnd_bond")
            fastened = bond is not None and is_fastening_kind(bond.kind)
            dst = ctx.statement(bond) if fastened else None
            if dst is None:
                continue
            ph = ctx.src.find(dst, "signal-ground")
            edit = (
                ctx.src.replace(dst, [(ph[1], "lift")])
                if ph and len(ph) > 1
                else appended(ctx, dst, "signal-ground lift")
            )
            # a device placed by a 'device ...: simple' statement is bought equipment: its inside
            # is its maker's
            lift = Candidate(
                f"give {dev} a ground-lift network between its signal ground and chassis (never "
                "the protective earth)",
                reason,
                (edit,),
                action="device-lift",
                element=dev,
            )
            add(
                refuse(
                    lift,
                    f"{dev} is bought equipment: a ground-lift switch of its maker's, or a "
                    "qualified technician, only",
                )
            )


def _replug_candidates(ctx: ChangeContext, reason: str, add) -> None:
    """An interconnect in a loop through two outlets' earths: plug either device in where the other
    is (one outlet or strip for both), so that the loop no longer runs through the building's
    protective wiring."""
    from ..physics.outlets import outlet_pairs

    devices = ctx.plan.index.devices
    looped = {e for lp in ctx.result.loops if lp.closed_by == "mains-cords" for e in lp.loop.edges}
    pairs, names = outlet_pairs(ctx.plan)
    fits = _fits(ctx)
    for (a, b), name in zip(pairs, names):
        c = ctx.cond[name]
        if name not in looped:
            continue
        for end, there, other in ((c.b, a, c.a), (c.a, b, c.b)):
            dev = devices.get(ctx.plan.index.device_of(end))
            mate = ctx.plan.index.device_of(other) or other
            why = (
                f"beside {mate} (one outlet or strip for both, within its current rating: the "
                f"loop of {name} no longer runs through the building's earth wiring)"
            )
            add(_plug_move(ctx, dev, there, why, reason, fits))


def _loop_replug_candidates(ctx: ChangeContext, reason: str, add) -> None:
    """A loop through mains cords whose devices are joined by a chain of links (a computer, a
    bus-powered converter on its USB lead, the amplifier): each device plugged in on the loop is
    offered the outlet of another device on it, so that the loop no longer runs through the
    building's wiring (the pairs one interconnect joins are :func:`_replug_candidates`')."""
    devices = ctx.plan.index.devices
    device_of = ctx.plan.index.device_of
    fits = _fits(ctx)
    for lp in ctx.result.loops:
        if lp.closed_by != "mains-cords":
            continue
        on = [d for d in dict.fromkeys(device_of(e) for e in lp.loop.edges) if d in devices]
        plugged = [d for d in on if devices[d].plugged]
        for name in plugged:
            for mate in plugged:
                why = (
                    f"beside {mate} (one outlet or strip for both, within its current rating: "
                    f"the loop through {', '.join(on)} no longer runs through the building's "
                    "earth wiring)"
                )
                add(_plug_move(ctx, devices[name], devices[mate].plugged, why, reason, fits))


def _plug_move(ctx: ChangeContext, dev, there: str, why: str, reason: str, fits):
    """The change that plugs ``dev`` in at ``there`` (its statement's 'plugged' word replaced),
    titled with ``why``; refused when its cord does not reach; None when the device is written
    elsewhere, is plugged there already, or the voltage there does not suit it.

    Parameters:
        ctx: the change context.
        dev: the device (None: no candidate).
        there: the outlet or strip.
        why: the title's words after "plug DEV in at THERE, ".
        reason: the rule the change answers.
        fits: :func:`_fits` of the plan.
    Returns:
        the candidate, or None.
    References:
        none (bookkeeping).
    """
    if dev is None or dev.location.file != ctx.plan.file:
        return None
    there, why = _supply_side(ctx.feeds, dev, there, why)
    if there == dev.plugged:
        return None
    st = ctx.src.statement(dev.location.line)
    ph = ctx.src.find(st, "plugged") if st is not None else None
    if not ph or len(ph) != 2 or not fits(dev, there):
        return None
    reach = out_of_reach(ctx, dev, st, there)
    # a plan that places them nowhere cannot say the cord reaches: the title says so
    unsure = "" if reach is not None else " — if its cord reaches (the plan does not say where)"
    return refuse(
        Candidate(
            f"plug {dev.name} in at {there}, {why}{unsure}",
            reason,
            (ctx.src.replace(st, [(ph[1], there)]),),
            moves_plug=True,
            action="replug",
            element=dev.name,
        ),
        reach or "",
    )


def out_of_reach(ctx: ChangeContext, dev, st, there: str) -> str | None:
    """Why ``dev`` cannot be plugged in at outlet ``there`` as drawn (empty when it can, None when
    the plan does not say where both are): its cord is shorter than the straight distance between
    the device's stated position and the outlet's, and a lead to bridge it would be part of its
    fault loop and is not in the plan.

    Parameters:
        ctx: the change context.
        dev: the device.
        st: its statement.
        there: the outlet's name.
    Returns:
        the refusal, "" when the cord reaches, or None when the plan cannot say.
    References:
        none (geometry: a cord reaches no farther than its length).
    """
    outlet = ctx.points.get(there)
    if st is None or outlet is None or outlet.pos is None or not ctx.src.find(st, "at"):
        return None
    cord = dev.cord_length
    if cord is None:
        own = dict(ctx.plan.device_plans).get(dev.name)
        cord = own.mains.cord_length if own is not None and own.mains is not None else None
    if cord is None:  # the cord its fault loop is checked with (a simple device's, unstated)
        cord = DEFAULT_CORD[0]
    far = math.dist(dev.at, outlet.pos)
    if far <= cord:
        return ""
    return (
        f"{dev.name}'s cord ({cord:g} m) does not reach {there}, {far:.1f} m away as the plan "
        "places them: the extension lead it would need is part of its fault loop and is not in "
        "the plan (move the device, or write the lead and check again)"
    )


def earthed_outlets(ctx: ChangeContext, answer: Answer, add) -> None:
    """A device whose earth pin does not reach the main earthing terminal (or only through a
    high resistance; the findings of ``answer``, GC215's): plug it in where a device with a sound
    earth path is plugged, its interconnects' other devices first.  The broken path still needs
    repair; this takes the device off it."""
    earths = ctx.result.device_earths or ()
    devices = ctx.plan.index.devices
    fits = _fits(ctx)
    sound = [
        devices[e.device].plugged
        for e in earths
        if e.resistance is not None
        and e.resistance <= DEVICE_EARTH_LIMIT
        and e.device in devices
        and devices[e.device].plugged
    ]
    for f in answer.findings:
        if f.elements[0] not in devices:
            continue
        dev = devices[f.elements[0]]
        device_of = ctx.plan.index.device_of
        mates = [
            device_of(x)
            for c in ctx.plan.conductors
            if joins_devices(c)
            for x, y in ((c.a, c.b), (c.b, c.a))
            if device_of(y) == dev.name
        ]
        near = [devices[m].plugged for m in mates if m in devices and devices[m].plugged in sound]
        why = (
            "whose earth path is sound (and take "
            f"{dev.plugged} out of use until a qualified person has repaired its protective "
            "connection; an adaptor or cord without an earth is thrown away)"
        )
        for there in list(dict.fromkeys(near + sound))[:3]:
            add(_plug_move(ctx, dev, there, why, f.code, fits))


def _supply_side(feeds: dict, dev, there: str, why: str) -> tuple[str, str]:
    """Where a device moved to ``there`` is plugged in: never in behind a transformer it is not
    behind already — a transformer serves what the plan puts behind it (a step-down for the unit
    made for its voltage, a variable one for the device brought up slowly on it, an isolating one
    for the one device it separates) — but at the outlet that feeds that transformer, which
    joins the same earth; ``why`` then says so, its reason in brackets kept (``feeds``:
    :attr:`ChangeContext.feeds`)."""
    own = feeds.get(dev.plugged)
    t = feeds.get(there)
    while t is not None and t is not own:
        reason = why[why.index(" (") :] if " (" in why else ""
        there, why = t.plugged, f"the outlet that feeds transformer {t.name}{reason}"
        t = feeds.get(there)
    return there, why


def _fits(ctx: ChangeContext):
    """Whether a device may be plugged in at a point: the voltage there suits the one it is for
    (its own plan's, else where the plan plugs it in), within IEC 60038's ±10 %: never a 230 V
    device behind a 120 V transformer, nor the reverse (a point behind a transformer the device is
    not behind is never offered: :func:`_supply_side` moves it to the outlet that feeds it)."""
    plan, feeds = ctx.plan, ctx.feeds
    if not feeds:
        return lambda dev, there: True
    return lambda dev, there: suits(
        rated_voltage(plan, dev, feeds), supply_at(there, feeds, plan.supply)
    )


def shield_to_chassis(ctx: ChangeContext, f):
    """GC113: land the interconnect's shield on the chassis at the end where it lands on a signal
    ground."""
    ((_, name, end),) = f.actions
    c = ctx.cond.get(name)
    st = ctx.statement(c) if c is not None else None
    if st is None:
        return None
    ends = list(shield_ends(c))
    ends[0 if end == c.a else 1] = "chassis"
    new = (
        "shield-to chassis" if ends == ["chassis", "chassis"] else f"shield-to {ends[0]} {ends[1]}"
    )
    ph = ctx.src.find(st, "shield-to")
    edit = (
        ctx.src.replace(st, [(ph[0], new)] + [(it, "") for it in ph[1:]])
        if ph
        else appended(ctx, st, new)
    )
    edit = Edit(edit.line, squeeze(edit.new, new), edit.extra, edit.last, edit.file)
    cand = Candidate(
        f"land the shield of {name} on the chassis where it enters, not on the signal ground at "
        f"{end}",
        f.code,
        (edit,),
        action="shield-to-chassis",
        element=name,
    )
    # an unbalanced link's shield is its signal return: on the chassis, the signal would return
    # through it
    return refuse(
        cand,
        f"{name} is not balanced: its shield is the return of what it carries and stays on the "
        "ground it returns to"
        if not c.balanced
        else "",
    )


def _own_ends(ctx: ChangeContext, c) -> str:
    """What a balanced link asks of the builder's own equipment at its ends: a balanced output
    (a transformer or a balanced driver) and a balanced input, not the cable alone."""
    own = sorted(
        {
            dev
            for end in (c.a, c.b)
            if (dev := ctx.plan.index.device_of(end)) is not None
            and dev in dict(ctx.plan.device_plans)
        }
    )
    if not own:
        return ""
    return (
        f" — with a balanced socket and circuit at its end in {', '.join(own)} (an output "
        "transformer or a balanced driver and input), not the cable alone"
    )
