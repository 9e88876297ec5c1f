"""The bonding tests of an installation's placed equipment: each device with a plan of its own is
tested as it would be on the bench, alone (its cord's protective terminal to each touchable part,
nothing plugged into it), with the protective device the installation puts ahead of it (the
building's breaker beside its fuse): IEC 60950-1:2005 2.6.3.4 takes 200 % of that rating."""

from __future__ import annotations

from dataclasses import replace

from ..model.records import Plan

__all__ = ["placed_bonding"]


def placed_bonding(plan: Plan, figures):
    """The bonding tests of every placed device with a plan of its own and a class I ``mains``,
    merged into one result whose tests are named by device (``amp long``) and whose conductors and
    parts carry the device's prefix, as the installation names them; None when no device is
    tested.

    Parameters:
        plan: the installation's plan.
        figures: :func:`groundcheck.physics.bonding_test.bonding_figures` (a plan and its
            protective route -> its BondingResult or None).
    Returns:
        the BondingResult, or None.
    References:
        IEC 60950-1:2005 2.6.3.4 and IEC 62368-1 5.6.6.2 (from memory): the rating of the
        protective device ahead of the equipment; the tests themselves in
        :mod:`groundcheck.physics.bonding_test`.
    """
    from ..network.earthing import protective_route
    from ..network.graph import build_graph

    supply = plan.supply
    if plan.mains is not None or supply is None or not plan.device_plans:
        return None
    tests, rows, parts, done, made = [], [], [], {}, None
    for dev, own in plan.device_plans:
        if own.mains is None or own.mains.equipment_class == "II":
            continue
        if id(own) not in done:  # one plan placed as several devices is tested once
            placed = replace(own, mains=supply.for_device(own.mains))
            done[id(own)] = figures(
                placed, protective_route(placed, dict(build_graph(placed).adjacency()))
            )
        b = done[id(own)]
        if b is None:
            continue
        made = type(b)  # the BondingResult (its module calls this one)
        tests += [replace(t, name=f"{dev} {t.name}") for t in b.tests]
        rows += [
            replace(c, conductor=f"{dev}.{c.conductor}", test=f"{dev} {c.test}")
            for c in b.conductors
        ]
        parts += [replace(p, part=f"{dev}.{p.part}", test=f"{dev} {p.test}") for p in b.parts]
    if made is None:
        return None
    return made(tuple(tests), tuple(rows), tuple(parts), plan.ambient)
