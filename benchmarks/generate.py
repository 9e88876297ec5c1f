"""Synthetic plans for benchmarks: large single chassis and installations of many devices.

    python benchmarks/generate.py chassis 100000 > big.gplan
    python benchmarks/generate.py installation 200 > rack.gplan

Invented data for measuring speed only.
"""

from __future__ import annotations

import math
import random
import sys


def chassis(n_conductors: int, seed: int = 1) -> str:
    """A plan of about ``n_conductors`` conductors: a grid of ground points on one large deck,
    wired to their neighbours (a local network with many loops), some bolted to the deck, with
    rectifiers, stages and field sources spread over it."""
    rng = random.Random(seed)
    side = max(3, int(math.sqrt(n_conductors / 2.05)))
    pitch = 10.0
    size = side * pitch + 20
    out = [
        'plan "synthetic chassis"',
        "mains 230 V 50 Hz, fuse 2 A slow, line-conductor 0.75 mm2, inlet at 5,5",
        "listening output 2 V, amp-gain 26 dB, speaker 88 dB, distance 3 m",
        f"metal deck: aluminium 2 mm, {size:g} x {size:g} mm, touchable",
        "point pe_stud: stud, at 12,5 on deck",
        "wire pe_lead: mains.pe to pe_stud, 20 mm, 1 mm2, protective",
        "bolt pe_nut: pe_stud to deck",
    ]
    count = 0

    def p(i, j):
        return f"p{i}_{j}"

    for i in range(side):
        for j in range(side):
            out.append(f"point {p(i, j)}: pad, at {10 + i * pitch:g},{10 + j * pitch:g} on deck")
    for i in range(side):
        for j in range(side):
            if i + 1 < side:
                out.append(
                    f"wire h{i}_{j}: {p(i, j)} to {p(i + 1, j)}, {pitch + rng.random() * 5:.1f} "
                    "mm, 0.5 mm2, signal"
                )
                count += 1
            if j + 1 < side:
                out.append(
                    f"wire v{i}_{j}: {p(i, j)} to {p(i, j + 1)}, {pitch + rng.random() * 5:.1f} "
                    "mm, 0.5 mm2, signal"
                )
                count += 1
    bolts = max(1, side // 4)
    for k in range(bolts):
        i, j = rng.randrange(side), rng.randrange(side)
        out.append(f"bolt b{k}: {p(i, j)} to deck, contact 0.5 mohm")
        count += 1
    for k in range(min(8, side)):
        a, b = (
            (rng.randrange(side), rng.randrange(side)),
            (rng.randrange(side), rng.randrange(side)),
        )
        out.append(
            f"rectifier r{k}: {p(*a)} to {p(*b)}, full-wave, secondary 250 V, winding 100 ohm, "
            "reservoir 47 uF, load 30 mA"
        )
    for k in range(min(20, side)):
        a = (rng.randrange(side), rng.randrange(side))
        b = (min(side - 1, a[0] + 1), a[1])
        out.append(f"stage s{k}: {p(*a)} to {p(*b)}, gain 30 dB, channel c{k % 2}")
    out.append(f"field t1: transformer, at {size / 3:g},{size / 3:g}, 40 uT at 5 cm")
    out.append(f"# {count} conductors")
    return "\n".join(out) + "\n"


def installation(n_devices: int, seed: int = 1) -> str:
    """An installation of simple devices on outlets, chained by unbalanced interconnects."""
    rng = random.Random(seed)
    out = [
        'plan "synthetic installation"',
        "listening output 10 V, amp-gain 0 dB, speaker 86 dB, distance 2 m",
        "point met: terminal",
    ]
    outlets = max(1, n_devices // 4)
    for k in range(outlets):
        out.append(f"point o{k}: outlet")
        out.append(f"wire run{k}: o{k} to met, {5 + rng.random() * 20:.1f} m, 2.5 mm2, protective")
    for d in range(n_devices):
        out.append(
            f"device d{d}: simple, plugged o{rng.randrange(outlets)}, cord 2 m 0.75 mm2, "
            "signal-ground chassis"
        )
        if d % 5 == 0:
            out.append(
                f"current leak{d}: d{d}.chassis to met, 0.5 mA 50 Hz, 0.2 mA 150 Hz, leakage"
            )
    for d in range(1, n_devices):
        src = rng.randrange(d)
        out.append(
            f"interconnect ic{d}: d{src}.gnd to d{d}.gnd, {1 + rng.random() * 5:.1f} m, 0.1 mm2, "
            f"terminated both, unbalanced, gain 20 dB, channel ch{d % 4}"
        )
    return "\n".join(out) + "\n"


if __name__ == "__main__":
    if (
        len(sys.argv) != 3
        or sys.argv[1] not in ("chassis", "installation")
        or not sys.argv[2].isdigit()
    ):
        sys.exit("usage: python benchmarks/generate.py chassis|installation SIZE > plan.gplan")
    kind, n = sys.argv[1], int(sys.argv[2])
    sys.stdout.write(chassis(n) if kind == "chassis" else installation(n))
