"""How the devices of an installation are told apart: which device a point or conductor belongs
to, a device's own conductors, its chassis, and where an interconnect's shield lands at each end by
default; the transformers between the wall and devices, and which supply each plug point is on."""

from __future__ import annotations

from collections import deque
from dataclasses import dataclass, field

from .index import device_of
from .kinds import in_device_ground, is_hookup, kind
from ..core.errors import Location
from .records import PE_POINT, Conductor

__all__ = [
    "device_of",
    "conductors_by_device",
    "device_chassis",
    "shield_ends",
    "Transformer",
    "transformer_feeds",
    "supply_at",
    "rated_voltage",
    "VOLTAGE_TOLERANCE",
    "suits",
    "separated_devices",
]

#: a device's own mains voltage may differ from the supply it is plugged into by this fraction
#: (IEC 60038's supply tolerance is ±10 %, from memory); more is a device for another supply
VOLTAGE_TOLERANCE = 0.10


@dataclass(frozen=True)
class Transformer:
    """A transformer between the wall and devices: its primary plugged into ``plugged``, its
    secondary an outlet under the transformer's own name that devices (or strips) plug into.
    ``isolating``: the secondary floats (a separating transformer); otherwise its outlet's earth
    contact is bonded through the primary cord's protective conductor (an autotransformer or an
    earthed secondary)."""

    name: str
    plugged: str
    primary: float  # rated primary voltage, V rms
    secondary: float  # rated secondary voltage, V rms
    rating: float | None = None  # rated apparent power, VA
    isolating: bool = False
    cord_length: float | None = None  # its primary cord, m (default: the common mains cord)
    cord_area: float | None = None  # m²
    frequency: float | None = None  # a stated secondary frequency, Hz (must be the supply's)
    location: Location = field(default=Location("<plan>"), compare=False)


def transformer_feeds(transformers, conductors, devices) -> dict:
    """Each point on a transformer's secondary side -> that transformer: its outlet, and whatever
    strips and outlets the building wiring (wires and cables outside the devices) joins to it,
    short of another transformer's outlet.  A transformer's own primary cord (``NAME.cord``) is
    not followed: it leads back to the primary side.  Points not in the answer are on the
    installation's supply."""
    if not transformers:
        return {}
    names = {t.name: t for t in transformers}
    cords = {f"{t.name}.cord" for t in transformers}
    adj: dict = {}
    for c in conductors:
        if (
            (is_hookup(c) or kind(c.kind).carries_load)
            and c.name not in cords
            and device_of(c.a, devices) is None
            and device_of(c.b, devices) is None
        ):
            adj.setdefault(c.a, []).append(c.b)
            adj.setdefault(c.b, []).append(c.a)
    out: dict = {}
    for t in transformers:
        out[t.name] = t
        todo = deque([t.name])
        while todo:
            for n in adj.get(todo.popleft(), ()):
                if n not in out and n not in names:
                    out[n] = t
                    todo.append(n)
    return out


def supply_at(point: str | None, feeds: dict, supply) -> tuple[float, float] | None:
    """The (V, Hz) a plug point gives: its transformer's secondary (at the supply's frequency: a
    transformer does not change it), else the installation's ``supply``; None without one."""
    t = feeds.get(point)
    if supply is None:
        return None
    return (t.secondary, supply.frequency) if t is not None else (supply.voltage, supply.frequency)


def rated_voltage(plan, device, feeds: dict) -> float | None:
    """The voltage a device is for: its own plan's ``mains`` voltage, else (a simple device, which
    takes the supply it is plugged into) that of the point the plan plugs it into."""
    own = next((v for n, v, _ in plan.device_supplies if n == device.name), None)
    if own is not None:
        return own
    at = supply_at(device.plugged, feeds, plan.supply)
    return at[0] if at else None


def suits(volts: float | None, supplied: tuple | None) -> bool:
    """Whether a device for ``volts`` may be plugged into a point giving ``supplied`` (V, Hz):
    within IEC 60038's ±10 % (unknown figures suit)."""
    if volts is None or supplied is None:
        return True
    return abs(volts - supplied[0]) <= VOLTAGE_TOLERANCE * supplied[0]


def separated_devices(plan) -> set[str]:
    """The devices plugged in behind an isolating transformer (on its floating secondary)."""
    if not any(t.isolating for t in plan.transformers):
        return set()
    devices = plan.index.devices
    feeds = transformer_feeds(plan.transformers, plan.conductors, devices)
    return {d.name for d in plan.devices if d.plugged in feeds and feeds[d.plugged].isolating}


def conductors_by_device(conductors, devices: dict) -> dict[str, list[Conductor]]:
    """Each placed device's own conductors (those its name prefixes)."""
    own: dict = {}
    for c in conductors:
        dev = device_of(c.name, devices)
        if dev is not None:
            own.setdefault(dev, []).append(c)
    return own


def device_chassis(
    dev: str, conductors: list[Conductor], metals: dict, near: str | None = None
) -> str | None:
    """A device's chassis: the metal part of the device nearest to ``near`` (fewest conductors,
    over the device's own conductors), else the one its inlet's protective terminal reaches first
    (a simple device's ``NAME.chassis``)."""
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
    """Where each end of an interconnect's shield lands: as stated, else on the chassis at the
    entry for a balanced link (AES48-2005, from memory: a shield terminates on the enclosure where
    it enters) and on the signal ground for an unbalanced one (its shield is the signal return)."""
    if c.shield_ends is not None:
        return c.shield_ends
    return ("chassis", "chassis") if c.balanced else ("signal", "signal")
