"""How the devices of an installation are told apart: which device a point or conductor belongs to, a device's own
conductors, its chassis, and where an interconnect's shield lands at each end by default."""

from __future__ import annotations

from collections import deque

from .kinds import in_device_ground
from .records import PE_POINT, Conductor

__all__ = ["device_of", "conductors_by_device", "device_chassis", "shield_ends"]


def device_of(point: str, devices: dict) -> str | None:
    """The placed device a point belongs to (its name's prefix), or None."""
    head = point.split(".", 1)[0]
    return head if "." in point and head in devices else None


def conductors_by_device(conductors, devices: dict) -> dict[str, list[Conductor]]:
    """Each placed device's own conductors (those its name prefixes)."""
    own: dict = {}
    for c in conductors:
        dev = device_of(c.name, devices)
        if dev is not None:
            own.setdefault(dev, []).append(c)
    return own


def device_chassis(dev: str, conductors: list[Conductor], metals: dict, near: str | None = None) -> str | None:
    """A device's chassis: the metal part of the device nearest to ``near`` (fewest conductors, over the device's
    own conductors), else the one its inlet's protective terminal reaches first (a simple device's
    ``NAME.chassis``)."""
    adj: dict = {}
    for c in conductors:
        if c.name.startswith(dev + ".") and in_device_ground(c) and c.connects:
            adj.setdefault(c.a, []).append(c.b)
            adj.setdefault(c.b, []).append(c.a)
    for start in ((near,) if near else ()) + (f"{dev}.{PE_POINT}",):
        seen, todo = {start}, deque([start])
        while todo:
            node = todo.popleft()
            if node in metals and node.startswith(dev + "."):
                return node
            for n in adj.get(node, ()):
                if n not in seen:
                    seen.add(n)
                    todo.append(n)
    return None


def shield_ends(c: Conductor) -> tuple[str, str]:
    """Where each end of an interconnect's shield lands: as stated, else on the chassis at the entry for a
    balanced link (AES48-2005, from memory: a shield terminates on the enclosure where it enters) and on the
    signal ground for an unbalanced one (its shield is the signal return)."""
    if c.shield_ends is not None:
        return c.shield_ends
    return ("chassis", "chassis") if c.balanced else ("signal", "signal")
