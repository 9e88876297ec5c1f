"""Devices in an installation: finding a device's plan, the built-in simple device, and merging a
device's elements into the installation under its name (prefixed, moved to its place, its mains
cord joined to the outlet it is plugged into)."""

from __future__ import annotations

import os
import stat
from contextlib import contextmanager
from contextvars import ContextVar
from dataclasses import replace
from pathlib import Path

from ..core.errors import PlanError, PlanErrors
from ..model.kinds import BOND, CORD_KIND, DEVICE_BOND_KIND, KINDS, LIFT_KIND, PROTECTIVE
from ..model.construct import altered
from ..model.records import (
    DEFAULT_CORD,
    PE_POINT,
    Conductor,
    Current,
    Device,
    FieldSource,
    Heater,
    Metal,
    Plan,
    Point,
    Rectifier,
    Stage,
)
from .placement import Transform

__all__ = [
    "find_device",
    "simple_device",
    "merge_device",
    "prefixed",
    "MAX_DEVICE_DEPTH",
    "device_plans_once",
    "read_once",
]

#: the device plans one top-level load has read, by (path, library folders, nesting depth): sixty
#: devices placing the same plan read it once (a plan is immutable; its errors are kept as well)
_READ: ContextVar[dict | None] = ContextVar("device_plans", default=None)


@contextmanager
def device_plans_once():
    """Within it (one top-level load and the device plans it reads), each device plan is read
    once."""
    token = _READ.set({}) if _READ.get() is None else None
    try:
        yield
    finally:
        if token is not None:
            _READ.reset(token)


def read_once(key: tuple, read) -> Plan:
    """The device plan under ``key``, read by ``read()`` the first time (its PlanErrors raised
    again after)."""
    cache = _READ.get()
    got = cache.get(key) if cache is not None else None
    if got is None:
        try:
            got = read()
        except PlanErrors as e:
            got = e
        if cache is not None:
            cache[key] = got
    if isinstance(got, PlanErrors):
        raise got
    return got


#: devices placed inside devices, at the most
MAX_DEVICE_DEPTH = 8


def find_device(source: str, dev: Device, ld, library_dirs: list[str]) -> Path | None:
    """A device's plan file: beside the plan, then in the library folders (the plan's ``library``
    statements, the caller's, ``GROUNDCHECK_LIBRARY``).  Only a regular ``.gplan`` file inside one
    of those folders (after resolving links) is taken, so a device can never read a system file, a
    device node or a FIFO."""
    here = ld.root
    # the plan's own library folders stay inside its folder (links resolved); the caller's and the
    # environment's are the user's choice
    folders = [
        here,
        *(
            f
            for f in (_resolved(here / lib) for lib in library_dirs)
            if f is not None and (f == here.resolve() or here.resolve() in f.parents)
        ),
    ]
    env = os.environ.get("GROUNDCHECK_LIBRARY", "")
    for lib in [*ld.libraries, *[x for x in env.split(os.pathsep) if x]]:
        folders.append((here / lib) if not Path(lib).is_absolute() else Path(lib))
    for folder in folders:
        c, base = _resolved(folder / source), _resolved(folder)
        if c is None or base is None:
            continue
        if (
            c.suffix == ".gplan"
            and (c == base or base in c.parents)
            and c.is_file()
            and stat.S_ISREG(c.stat().st_mode)
        ):
            return c
    return None


def _resolved(path: Path) -> Path | None:
    """The path with its links resolved; None for a link in a loop (it leads to no file)."""
    try:
        return path.resolve()
    except (RuntimeError, OSError):
        return None


def simple_device(dev: Device) -> Plan:
    """A built-in device: a touchable chassis, the inlet's protective terminal bonded to it, and a
    signal ground joined to the chassis directly, through a lift network, or not at all.  A class
    II device has no protective terminal (its chassis is not earthed through its cord)."""
    n = dev.name
    loc = dev.location
    class_i = dev.equipment_class == "I"
    metals = (Metal(f"{n}.chassis", "steel", 1e-3, None, (0.0, 0.0), class_i, loc),)
    points = ((Point(f"{n}.{PE_POINT}", "inlet", None, None, n, loc),) if class_i else ()) + (
        Point(f"{n}.gnd", "terminal", None, None, n, loc),
    )
    contact = KINDS[DEVICE_BOND_KIND].contact
    conductors = (
        [
            Conductor(
                f"{n}.pe_bond",
                DEVICE_BOND_KIND,
                f"{n}.{PE_POINT}",
                f"{n}.chassis",
                role=PROTECTIVE,
                contact=contact,
                location=loc,
            )
        ]
        if class_i
        else []
    )
    if dev.signal_ground == "chassis":
        conductors.append(
            Conductor(
                f"{n}.gnd_bond",
                DEVICE_BOND_KIND,
                f"{n}.gnd",
                f"{n}.chassis",
                role=BOND,
                contact=contact,
                location=loc,
            )
        )
    elif dev.signal_ground == "lift":
        conductors.append(
            Conductor(
                f"{n}.gnd_lift",
                LIFT_KIND,
                f"{n}.gnd",
                f"{n}.chassis",
                resistance=10.0,
                capacitance=47e-9,
                location=loc,
            )
        )
    return Plan(
        title=n,
        file=str(loc.file),
        metals=metals,
        points=points,
        conductors=tuple(conductors),
        location=loc,
    )


def _device_plan(dev: Device, ld, library_dirs: list[str]) -> Plan | None:
    """A device's own plan, loaded; None (its error added to ``ld.errors``) when it is missing,
    places itself or nests too deep, or does not load."""
    path = find_device(dev.source, dev, ld, library_dirs)
    if path is None:
        ld.errors.append(
            PlanError(
                f"device plan {dev.source!r} not found",
                dev.location,
                "a device is a .gplan file beside the plan or in a library folder "
                '(library "DIR", GROUNDCHECK_LIBRARY); nothing outside them is read',
            )
        )
        return None
    if path in ld.device_stack or len(ld.device_stack) >= MAX_DEVICE_DEPTH:
        ld.errors.append(
            PlanError(
                f"device {dev.source!r} contains itself, or devices nest too deep",
                dev.location,
                "a device plan cannot place itself, directly or not",
            )
        )
        return None
    try:
        loaded = ld.load_device(path)
    except PlanErrors as e:
        ld.errors.extend(e.errors)
        return None
    if loaded.transformers:
        ld.errors.append(
            PlanError(
                f"device {dev.name}'s plan has a transformer",
                dev.location,
                "a transformer stands between the wall and devices: write it in the installation, "
                "and plug the device into it",
            )
        )
    return loaded


def merge_device(
    dev: Device,
    refs: dict,
    ld,
    library_dirs: list[str],
    groups: dict,
    metals: dict,
    points: dict,
    names: dict,
    classes: dict,
    own_plans: dict | None = None,
) -> tuple | None:
    """Add a device's elements to the installation, prefixed with its name and moved to its place.
    Returns the device's supply (name, volts, hertz) when its plan states one; a device whose own
    plan is class II is entered in ``classes`` (device name -> "II") and gets no protective
    conductor in its cord; a device's own plan, as loaded, goes into ``own_plans`` under its
    name."""
    got = _device_elements(dev, ld, library_dirs, classes)
    if got is None:
        return None
    sub, cord_default, supply, own = got
    if own is not None and own_plans is not None:
        own_plans[dev.name] = own  # its protective earth is checked on the installation's supply
    taken = [
        x.name
        for x in (*sub.metals, *sub.points, *sub.conductors)
        if x.name in names or x.name in points or x.name in metals
    ]
    if taken:
        ld.errors.append(
            PlanError(
                f"device {dev.name}'s element {taken[0]!r} has the name of an element of the plan",
                names.get(taken[0], dev.location),
                f"names starting with '{dev.name}.' belong to the device: rename the plan's "
                "element",
            )
        )
        return supply
    _moved_in(
        sub,
        Transform(dev.at[0], dev.at[1], 1.0, -1.0 if dev.mirror else 1.0),
        groups,
        metals,
        points,
    )
    cord = _cord(dev, points, classes, cord_default)
    if cord is not None:
        groups[Conductor].append((cord, {}))
    return supply


def _cord(dev: Device, points: dict, classes: dict, cord_default) -> Conductor | None:
    """The protective conductor of a plugged class I device's cord, from its protective terminal
    to the outlet (None for a class II device or one plugged nowhere)."""
    pe = f"{dev.name}.{PE_POINT}"
    if (
        dev.plugged is None
        or pe not in points
        or classes.get(dev.name, dev.equipment_class) != "I"
    ):
        return None
    return Conductor(
        f"{dev.name}.cord",
        CORD_KIND,
        pe,
        dev.plugged,
        role=PROTECTIVE,
        length=dev.cord_length or cord_default[0],
        area=dev.cord_area or cord_default[1],
        location=dev.location,
    )


def _device_elements(dev: Device, ld, library_dirs: list[str], classes: dict):
    """A device's plan with its names prefixed, the cord its plan gives (length, area), its
    supply (name, volts, hertz) or None, and its own plan as loaded (None for a simple device);
    None when its plan does not load (the error said)."""
    if dev.source == "simple":
        return simple_device(dev), DEFAULT_CORD, None, None
    loaded = _device_plan(dev, ld, library_dirs)
    if loaded is None:
        return None
    m = loaded.mains
    cord_default = (m.cord_length, m.cord_section) if m else DEFAULT_CORD
    supply = (dev.name, m.voltage, m.frequency) if m else None
    if m is not None and m.equipment_class == "II":
        # its cord has no protective conductor, as a class II simple device's
        classes[dev.name] = "II"
    return prefixed(loaded, dev.name + "."), cord_default, supply, loaded


def _moved_in(sub: Plan, tf: Transform, groups: dict, metals: dict, points: dict) -> None:
    """A device plan's elements moved to the device's place and added to the installation's."""
    for x in sub.metals:
        size = None if x.size is None else (x.size[0], x.size[1] * tf.sy)
        metals[x.name] = altered(x, origin=tf(x.origin), size=size)
    for x in sub.points:
        points[x.name] = altered(x, pos=tf(x.pos))
    for x in sub.conductors:
        groups[Conductor].append((altered(x, route=tuple(tf(q) for q in x.route)), {}))
    for x in sub.rectifiers:
        groups[Rectifier].append((x, {}))
    for x in sub.currents:
        groups[Current].append((x, {}))
    for x in sub.heaters:
        groups[Heater].append((altered(x, route=tuple(tf(q) for q in x.route)), {}))
    for x in sub.stages:
        groups[Stage].append((x, {}))
    for x in sub.fields:
        groups[FieldSource].append((altered(x, pos=tf(x.pos)), {}))


def _renamed(record, pre, chan, *names: str):
    """The record with the named fields prefixed and its channel, if it has one, as ``chan``
    gives it."""
    kw = {f: pre(getattr(record, f)) for f in names}
    if hasattr(record, "channel"):
        kw["channel"] = chan(record.channel)
    return altered(record, **kw)


def prefixed(p: Plan, prefix: str) -> Plan:
    """A device plan with every name prefixed (channels too, so each device keeps its own); a
    channel named as the device itself keeps that name, once (a compressor ``comp`` whose own
    plan's channel is ``comp`` has the channel ``comp``, which the installation's links may name,
    never ``comp.comp``)."""
    pre = lambda n: None if n is None else prefix + n  # noqa: E731
    own = prefix.rstrip(".")
    chan = lambda n: n if n is None or n == own else prefix + n  # noqa: E731
    return replace(
        p,
        metals=tuple(replace(m, name=pre(m.name)) for m in p.metals),
        points=tuple(
            replace(
                x,
                name=pre(x.name),
                on=pre(x.on),
                group=pre(x.group) if x.group else prefix.rstrip("."),
            )
            for x in p.points
        ),
        conductors=tuple(
            _renamed(c, pre, chan, "name", "a", "b", "twisted_with") for c in p.conductors
        ),
        rectifiers=tuple(
            _renamed(r, pre, chan, "name", "a", "b", "filter_point", "regulator_point")
            for r in p.rectifiers
        ),
        currents=tuple(_renamed(r, pre, chan, "name", "a", "b") for r in p.currents),
        heaters=tuple(
            _renamed(h, pre, chan, "name", "a", "b", "reference", "rectifier") for h in p.heaters
        ),
        stages=tuple(
            _renamed(s, pre, chan, "name", "a", "b", "reference", "named", "supply")
            for s in p.stages
        ),
        fields=tuple(replace(f, name=pre(f.name)) for f in p.fields),
    )
