"""The signal-ground networks of a plan: each connected part of the ground graph, without the
chassis side and protective conductors, that holds a signal point, with its bonds to the chassis
side — what GC105, GC106 and GC226 read (:mod:`.signal_bonds`, :mod:`.lift_fault`)."""

from __future__ import annotations

from ..model.kinds import PROTECTIVE, bonds_metal, joins_devices
from ..network.graph import part_labels
from .context import AuditContext

__all__ = ["signal_grounds", "floating_signal_grounds", "chassis_proper"]


def floating_signal_grounds(ctx: AuditContext) -> list[set[str]]:
    """The points of each signal-ground network that reaches neither the chassis nor the
    protective earth (GC106's networks).

    Parameters:
        ctx: the audit context.
    Returns:
        one set of point names per floating network.
    References:
        see :func:`rule_signal_bonds`.
    """
    return [set(comp) for comp, places in signal_grounds(ctx) if not places]


def chassis_proper(ctx: AuditContext) -> set[str]:
    """The chassis side less metal written signal-only (a reverb pan, a footswitch box) and the
    points fastened to nothing else: such metal is part of the signal circuit it carries, and a
    ground that reaches only it reaches neither the chassis nor the protective earth.

    Parameters:
        ctx: the audit context.
    Returns:
        the chassis side's node names.
    References:
        none (bookkeeping).
    """
    only = {m.name for m in ctx.plan.metals if m.signal_only}
    if not only:
        return ctx.chassis_side
    held: dict[str, set[str]] = {}
    for c in ctx.plan.conductors:
        if c.connects and bonds_metal(c):
            for x, y in ((c.a, c.b), (c.b, c.a)):
                if x in ctx.metals:
                    held.setdefault(y, set()).add(x)
    out = {n for n in ctx.chassis_side if n not in only}
    return {n for n in out if not (n in held and held[n] <= only)}


def signal_grounds(ctx: AuditContext) -> list[tuple[list[str], dict[str, list[str]]]]:
    """Each signal-ground network (a connected part of the graph without the chassis side and
    protective conductors that holds a signal point): its points, and its bonds to the chassis side
    by chassis point.

    Parameters:
        ctx: the audit context.
    Returns:
        (its points, its bonds' conductors by chassis point) per network.
    References:
        none (bookkeeping).
    """
    G, side = ctx.G, chassis_proper(ctx)
    order = list(G.nodes)
    idx = {n: i for i, n in enumerate(order)}
    rows, cols = [], []
    crossing = []  # (signal-side node, chassis-side node, conductor): the bonds
    linked = []  # signal-side nodes an interconnect joins to another equipment's chassis side
    for u, v, k, d in ctx.edges:
        us, vs = u in side, v in side
        if not us and not vs:
            if d["conductor"].role != PROTECTIVE:
                rows.append(idx[u])
                cols.append(idx[v])
        elif us != vs and not joins_devices(d["conductor"]):
            crossing.append((v, u, k) if us else (u, v, k))
        elif us != vs:
            linked.append(v if us else u)
    n = len(order)
    _, labels = part_labels(n, rows, cols)
    members: dict[int, list[str]] = {}
    for name in order:
        if name not in side:
            members.setdefault(int(labels[idx[name]]), []).append(name)
    bonds_of: dict[int, dict[str, list[str]]] = {}
    for node, chassis, k in crossing:
        bonds_of.setdefault(int(labels[idx[node]]), {}).setdefault(chassis, []).append(k)
    # a class II or unplugged device's ground (a turntable, a passive step-up box) is referenced
    # through its links to the equipment it feeds: it floats by design, never "floating" (its own
    # box has no chassis bond to make)
    by_link = {int(labels[idx[node]]) for node in linked if _referenced_by_links(ctx, node)}
    out = []
    for label in sorted(members, key=lambda k: min(members[k])):
        comp = sorted(members[label])
        if label in by_link and label not in bonds_of:
            continue
        if set(comp) & ctx.signal_points:
            out.append((comp, {c: sorted(ks) for c, ks in bonds_of.get(label, {}).items()}))
    return out


def _referenced_by_links(ctx: AuditContext, node: str) -> bool:
    """Whether ``node`` belongs to a placed device whose ground is referenced by its links alone:
    class II, or with no mains of its own and plugged into no outlet (a turntable whose motor has
    its own supply, a passive step-up box: no protective earth to bond to)."""
    dev = ctx.plan.index.device_of(node)
    record = ctx.plan.index.devices.get(dev) if dev else None
    if record is None:
        return False
    own = dict(ctx.plan.device_plans).get(dev)
    unpowered = record.plugged is None and (own is None or own.mains is None)
    return record.equipment_class == "II" or unpowered
