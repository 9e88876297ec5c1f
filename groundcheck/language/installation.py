"""An installation's own rules, applied when its devices are merged: the stated supply against each
device's, the leakage current every device puts on the protective wiring, and where each
interconnect's shield lands.

Leakage: a device's mains filter has a capacitor from line to its chassis (a Y capacitor), so a
current U0·2πf·C flows from the line into the chassis and back to the supply's neutral–earth bond
through the protective wiring (for class II equipment, through whatever earths its signal ground:
an interconnect).
"""

from __future__ import annotations

import math
from dataclasses import replace

from ..core.errors import PlanError
from ..model.installation import (
    VOLTAGE_TOLERANCE,
    conductors_by_device,
    device_chassis,
    device_of,
    shield_ends,
    supply_at,
)
from ..model.kinds import LEAKAGE, joins_devices
from ..model.records import PE_POINT, Conductor, Current, Device

__all__ = [
    "DEFAULT_Y_CAPACITANCE",
    "VOLTAGE_TOLERANCE",
    "check_supplies",
    "leakage_currents",
    "land_shields",
    "check_bundles",
]

#: a simple device's line-to-chassis capacitance when not stated, F, by protection class: class I
#: equipment's mains filter has Y capacitors of 1–4.7 nF from line to earth (2.2 nF taken); a class
#: II switch-mode supply has about 1 nF from primary to secondary (both common practice, from
#: memory).  At 230 V 50 Hz they leak
#: 0.16 mA and 0.07 mA, well under the 3.5 mA and 0.25 mA the product-safety standards allow (IEC
#: 62368-1, from memory).  A device with a plan of its own leaks only what is stated (a linear
#: supply without a filter leaks tens of µA through its transformer's inter-winding capacitance).
DEFAULT_Y_CAPACITANCE = {"I": 2.2e-9, "II": 1.0e-9}


def check_supplies(supplies: list, mains, supply, errors: list) -> None:
    """Devices of one installation share one supply.  50 and 60 Hz devices cannot be plugged into
    it together (a building has one mains frequency; a device for the other needs a frequency
    converter, which is then the device's own supply), and a stated supply's frequency must be
    every device's own.  A device for another voltage is no error: it may be plugged in behind a
    transformer (a mismatch where it is plugged is GC217)."""
    if mains is not None and supply is not None:
        errors.append(
            PlanError(
                "a plan gives both 'mains' and 'supply'",
                supply.location,
                "'mains' describes one piece of equipment's supply, 'supply' an installation's: "
                "keep the one this plan is",
            )
        )
        return
    if supply is not None:
        for (name, volts, hz), loc in supplies:
            if abs(hz - supply.frequency) > 1e-9:
                errors.append(
                    PlanError(
                        f"device {name} is for a {volts:g} V {hz:g} Hz supply, but the "
                        f"installation's supply is {supply.voltage:g} V {supply.frequency:g} Hz",
                        loc,
                        "a transformer changes the voltage, not the frequency: a device rated for "
                        "both frequencies states the supply's in its plan; one for the other only "
                        "needs a frequency converter, which is then its supply",
                    )
                )
        return
    freqs = {s[2] for s, _ in supplies} | ({mains.frequency} if mains is not None else set())
    if len(freqs) > 1:
        (name, _, f), loc = next(
            (s, loc)
            for s, loc in supplies
            if s[2] != (mains.frequency if mains else supplies[0][0][2])
        )
        errors.append(
            PlanError(
                f"device {name} is for a {f:g} Hz supply, but the installation's other devices "
                f"are on {', '.join(f'{x:g}' for x in sorted(freqs - {f}))} Hz",
                loc,
                "one installation has one mains frequency; place the device in a plan of its own "
                "supply",
            )
        )


def leakage_currents(
    devices: list[Device],
    supplies: dict,
    supply,
    points: dict,
    landings: dict | None = None,
    feeds: dict | None = None,
) -> list[Current]:
    """The leakage current of every device, from its stated leakage, its stated Y capacitance or
    its class's default (simple devices), as a stated current from the device's chassis side to the
    main earthing terminal.

    ``supplies``: device name -> (V, Hz) of a device's own plan; ``supply``: the installation's.  A
    device whose supply voltage is unknown (no ``supply`` and no plan of its own) gets no default
    leakage.  A class II device leaks from its signal ground (a simple device's ``gnd``; for a
    device with a plan of its own, the first point of it an interconnect lands on, from
    ``landings``).

    ``feeds``: plug point -> the transformer it is behind
    (:func:`~groundcheck.model.installation.transformer_feeds`).  With a stated supply, each
    device leaks at the voltage where it is plugged in (the wall's, or a transformer's
    secondary), whatever its own plan is for; behind an isolating transformer, none of it
    reaches the main earthing terminal (its floating secondary has no connection to earth: the
    Y capacitors' current returns to the secondary winding, first principles)."""
    met = next((p.name for p in points.values() if p.kind == "earthing-terminal"), None)
    if met is None:
        return []
    out = []
    for dev in devices:
        leak = _leakage(dev, supplies.get(dev.name), supply, feeds or {})
        if leak is None:
            continue
        amps, hz = leak
        start = (
            f"{dev.name}.{PE_POINT}"
            if dev.equipment_class == "I"
            else f"{dev.name}.gnd"
            if dev.source == "simple"
            else (landings or {}).get(dev.name, "")
        )
        if amps > 0 and start in points:
            out.append(
                Current(
                    f"{dev.name}.leakage",
                    start,
                    met,
                    ((amps, hz or 0.0),),
                    LEAKAGE,
                    None,
                    dev.location,
                )
            )
    return out


def _leakage(dev: Device, own, supply, feeds: dict) -> tuple | None:
    """A device's leakage current (A) and its frequency (Hz, or None when unknown): stated, else
    from its Y capacitance at the voltage where it is plugged in; None when none of it reaches the
    main earthing terminal (behind an isolating transformer) or its voltage is unknown."""
    volts, hz = own if own else ((supply.voltage, supply.frequency) if supply else (None, None))
    behind = feeds.get(dev.plugged)
    if behind is not None and behind.isolating:
        return None
    if supply is not None:
        volts, hz = supply_at(dev.plugged, feeds, supply)
    if dev.leakage is not None:
        return dev.leakage, hz
    if volts is None:
        return None
    c = dev.y_capacitance
    if c is None and dev.source == "simple":
        c = DEFAULT_Y_CAPACITANCE[dev.equipment_class]
    return (volts * 2 * math.pi * hz * c if c else 0.0), hz


def land_shields(
    conductors: list[Conductor], devices: dict, metals: dict, errors: list
) -> list[Conductor]:
    """Each interconnect with its shield's ends moved to the device chassis where they land on it
    (the receiving input still reads between the two signal grounds it names)."""
    own = conductors_by_device(conductors, devices)
    out = []
    for c in conductors:
        if joins_devices(c):
            ends = []
            for end, landing in zip((c.a, c.b), shield_ends(c)):
                dev = device_of(end, devices)
                chassis = (
                    device_chassis(dev, own.get(dev, []), metals, end)
                    if dev and landing == "chassis"
                    else None
                )
                if landing == "chassis" and chassis is None and c.shield_ends is not None:
                    errors.append(
                        PlanError(
                            f"interconnect {c.name}: the shield cannot land on a chassis at {end}",
                            c.location,
                            "'shield-to chassis' needs a placed device whose inlet's protective "
                            "terminal is bonded to a metal part",
                        )
                    )
                ends.append(chassis or end)
            if (ends[0], ends[1]) != (c.a, c.b):
                c = replace(c, a=ends[0], b=ends[1])
        out.append(c)
    return out


def check_bundles(conductors: list[Conductor], errors: list) -> None:
    """The cores of one umbilical run its whole length: each core states the same length."""
    lengths: dict = {}
    for c in conductors:
        if c.bundle is not None and c.length is not None:
            first = lengths.setdefault(c.bundle, (c.length, c))
            if abs(first[0] - c.length) > 1e-9:
                errors.append(
                    PlanError(
                        f"core {c.name} is {c.length:g} m but {first[1].name}, in the same "
                        f"umbilical {c.bundle}, is {first[0]:g} m",
                        c.location,
                        "the cores of a multi-core cable run its whole length: give each the same",
                    )
                )
