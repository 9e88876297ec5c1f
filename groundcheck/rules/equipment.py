"""Which placed devices make one piece of equipment, for the signal ground's bonds (GC105, GC106).

Devices joined by a conductor that carries no signal (an umbilical's ground core between a supply
box and the box it feeds, written as a wire or as an interconnect with no gain, not balanced and
of no channel) are one piece of equipment, whose signal ground wants one bond to the chassis in
all.  Devices joined only by signal links (a preamplifier and its two monoblocks) are separate
pieces of equipment: each class I one keeps a bond (or a lift network) of its own, so that a
fault in its own transformer reaches its own protective earth, never only the shields of its
links (common practice; IEC 61140's single fault, from memory)."""

from __future__ import annotations

from ..model.kinds import joins_devices
from ..model.supplies import ELV_LIMIT
from ..network.graph import part_labels
from .context import AuditContext

__all__ = ["equipment_of", "signal_link", "ELV_LIMIT"]


def signal_link(c) -> bool:
    """Whether a link between devices carries a signal.

    Parameters:
        c: a conductor record (an interconnect).
    Returns:
        True with a gain (its receiving input is a stage), a balanced pair or a channel stated.
    References:
        none (what the plan states).
    """
    return c.gain is not None or c.balanced or c.channel is not None


def equipment_of(ctx: AuditContext) -> dict[str, str]:
    """Each placed device's piece of equipment, named by its first device (by name) of those
    joined to it by conductors that carry no signal.

    Parameters:
        ctx: the audit context.
    Returns:
        device -> the equipment's name ({} for a plan with no devices).
    References:
        common practice (one bond per piece of equipment).
    """
    devices = sorted(ctx.plan.index.devices)
    at = {d: k for k, d in enumerate(devices)}
    device_of = ctx.plan.index.device_of
    rows, cols = [], []
    for c in ctx.plan.conductors:
        if joins_devices(c) and signal_link(c):
            continue
        a, b = device_of(c.a), device_of(c.b)
        if a in at and b in at and a != b:
            rows.append(at[a])
            cols.append(at[b])
    _, labels = part_labels(len(devices), rows, cols)
    first: dict = {}
    for d in devices:  # each part named by its first device by name
        first.setdefault(int(labels[at[d]]), d)
    return {d: first[int(labels[at[d]])] for d in devices}
