"""Protective devices and the supply: fuses, breakers and RCDs as they clear, disconnection-time
limits by earthing system, and the standard maximum resistances of cords and fixed wiring.

Every table value carries its source; values marked "from memory" were not checked against the
standard's text and are listed, with the same marks, in ``tests/reference/protection.md``.
"""

from __future__ import annotations

from dataclasses import dataclass

__all__ = [
    "STANDARD_PE_LIMIT",
    "FUSE_PREARC_LIMITS",
    "BREAKER_INSTANT",
    "RCD_TIMES",
    "DISCONNECTION_LIMITS",
    "SYSTEMS",
    "DEFAULT_ZE",
    "TT_SOURCE_LOOP",
    "DEFAULT_LINE_NEUTRAL_LOOP",
    "CABLE_OPERATING_TEMPERATURE",
    "BREAKING_CAPACITY",
    "CORD_CLASS5",
    "FIXED_CLASS2",
    "Clearing",
    "fuse_clearing",
    "breaker_clearing",
    "rcd_clearing",
    "device_clearing",
    "max_disconnection_time",
    "breaking_capacity",
    "fuse_cold_resistance",
    "cable_resistance",
    "DEFAULT_CIRCUIT",
]

from ..model.records import CABLE_OPERATING_TEMPERATURE, SYSTEMS

#: protective bonding limit, Ω, supply cord excluded (IEC 62368-1 5.6.6.2, from memory; IEC 61010-1
#: 6.5.2.4; IEC 60335-1 27.5)
STANDARD_PE_LIMIT = 0.1
#: Ω, the most ``--pe-limit`` may relax the protective-path limit to: five times the product
#: standards' 0.1 Ω (their limits are 0.1–0.2 Ω, from memory); a path above it is a danger
#: whatever the run's limit (IEC 60364-4-41's fault-loop check, GC208, is made beside it)
MAX_PE_LIMIT = 0.5

#: default external earth-fault loop impedance Ze at the origin of the installation, Ω: typical
#: maximum values declared by distributors (TN-S 0.8 Ω, TN-C-S 0.35 Ω, TT 21 Ω including the
#: installation's own earth electrode) — from memory; IT: the loop a second fault closes through
#: the protective conductors, taken as TN-S's
DEFAULT_ZE = {"TN-S": 0.8, "TN-C-S": 0.35, "TT": 21.0, "IT": 0.8}

#: TT: the supply's own part of the fault loop (the line from the source and the source's earth
#: electrode R_B) when the plan states the installation's electrode R_A but not the whole loop, Ω —
#: from memory: distributors keep R_B to a few ohms; the whole loop is then R_A plus this
TT_SOURCE_LOOP = 1.0

#: the external line-to-neutral loop at the origin when the plan states no prospective
#: short-circuit current, Ω: the typical declared value of a TN-C-S supply (0.35 Ω, from memory),
#: or the stated external loop when that is lower; the neutral never runs through an earth
#: electrode, so a TT supply has it too
DEFAULT_LINE_NEUTRAL_LOOP = 0.35

#: the operating temperature of the installation's cables (the final circuit and the mains cord) at
#: which the fault loop is verified: 70 °C, PVC's maximum (IEC 60364-5-52 Table 52.1), common
#: practice for loop verification (from memory); the equipment's own wiring stays at ambient.
#: Defined with the plan's records.

#: the final circuit feeding the socket when the plan does not describe it: 20 m of 1.5 mm² line
#: and protective conductor — common practice for a socket-outlet circuit (from memory)
DEFAULT_CIRCUIT = (20.0, 1.5e-6)

#: worst-case (maximum) pre-arcing time, s, at or above a multiple of the rating, IEC 60127-2
#: standard sheets 1 (F, quick-acting) and 3 (T, time-lag), from memory; below the lowest multiple
#: the fuse is not assured to open
FUSE_PREARC_LIMITS = {
    "fast": ((10.0, 0.02), (4.0, 0.3), (2.75, 2.0)),
    "slow": ((10.0, 0.3), (4.0, 3.0), (2.75, 10.0)),
}

#: miniature circuit breakers, IEC 60898-1 (from memory): the instantaneous band's upper limit as a
#: multiple of In (tripping within 0.1 s at or above it), then the thermal region: at 2.55 In
#: within 60 s (In ≤ 32 A), at 1.45 In within 1 h
BREAKER_INSTANT = {"B": 5.0, "C": 10.0, "D": 20.0}
BREAKER_THERMAL = ((2.55, 60.0), (1.45, 3600.0))
#: a breaker in its instantaneous region is taken to open at the upper end of its band, 0.1 s, and
#: its let-through as I² over that same time — consistent with the clearing time reported, and on
#: the safe side (real breakers of an energy-limiting class let through much less, from memory)
BREAKER_INSTANT_TIME = 0.1
#: well inside the instantaneous region (at least this multiple of the band's upper limit) the
#: magnetic release opens within milliseconds — manufacturers' time-current curves fall below 10 ms
#: there (from memory) — and the let-through is taken as I² over one period of the mains (on the
#: safe side of those curves); the clearing time reported stays the standard's 0.1 s. Over the
#: 0.1 s an ordinary 0.75 mm² cord on a 32 A type B circuit "needed" 0.84 mm² (three outside
#: builders' plans), where one period asks 0.37 mm²
BREAKER_MAGNETIC_MARGIN = 1.5

#: RCD maximum break times, general type, IEC 61008-1 / 61009-1 (from memory): (multiple of IΔn, s)
RCD_TIMES = ((5.0, 0.04), (2.0, 0.15), (1.0, 0.3))

#: maximum disconnection time, s, final circuits ≤ 32 A, IEC 60364-4-41 Table 41.1 (from memory):
#: (upper bound of U0 in V, TN, TT)
DISCONNECTION_LIMITS = (
    (120.0, 0.8, 0.3),
    (230.0, 0.4, 0.2),
    (400.0, 0.2, 0.07),
    (float("inf"), 0.1, 0.04),
)

#: breaking capacity of miniature fuses, A, IEC 60127-2 (from memory): low-breaking (glass) 35 A or
#: 10 × In, whichever is greater; enhanced-breaking 150 A; high-breaking (sand-filled ceramic) 1500
#: A
BREAKING_CAPACITY = {"low": None, "enhanced": 150.0, "high": 1500.0}
#: rated short-circuit capacity assumed for a breaker when the plan does not say, A (6 kA, the
#: usual rating of breakers for dwellings — common practice)
BREAKER_CAPACITY = 6000.0

#: maximum DC resistance at 20 °C, plain copper, Ω/km, IEC 60228: class 5 (flexible cords) and
#: class 1/2 (fixed wiring).  0.5–2.5 mm² of class 1/2 confirmed, the rest from memory
CORD_CLASS5 = (
    (0.5e-6, 39.0),
    (0.75e-6, 26.0),
    (1.0e-6, 19.5),
    (1.5e-6, 13.3),
    (2.5e-6, 7.98),
    (4.0e-6, 4.95),
)
FIXED_CLASS2 = (
    (0.5e-6, 36.0),
    (0.75e-6, 24.5),
    (1.0e-6, 18.1),
    (1.5e-6, 12.1),
    (2.5e-6, 7.41),
    (4.0e-6, 4.61),
    (6.0e-6, 3.08),
    (10.0e-6, 1.83),
)


@dataclass(frozen=True)
class Clearing:
    """How a protective device clears a current: total time (s), let-through I²t (A²s), and the
    parts."""

    time: float
    i2t: float
    prearc: float = 0.0
    arcing: float = 0.0


def fuse_clearing(kind: str, rating: float, current: float, frequency: float) -> Clearing | None:
    """Worst-case clearing of a miniature fuse: pre-arcing (IEC 60127-2 limits) plus arcing to the
    next current zero (at most half a cycle, 1/(2f)).  Above 10 × In the fuse melts adiabatically:
    its pre-arcing I²t is at most the value at 10 × In, so t = I²t / I².  None below 2.75 × In.

    Parameters:
        kind: slow or fast.
        rating: In, A.
        current: prospective current, A.
        frequency: mains frequency, Hz.
    Returns:
        the worst-case Clearing (time in s, let-through I²t in A²s); None when the fuse may not
        open.
    References:
        IEC 60127-2 (pre-arcing time limits of miniature fuse-links).
    """
    table = FUSE_PREARC_LIMITS.get(kind, FUSE_PREARC_LIMITS["slow"])
    m = current / rating
    arcing = 1.0 / (2.0 * frequency)
    top_m, top_t = table[0]
    if m >= top_m:
        prearc_i2t = (top_m * rating) ** 2 * top_t
        prearc = prearc_i2t / (current * current)
    else:
        prearc = next((t for mm, t in table[1:] if m >= mm), None)
        if prearc is None:
            return None
        prearc_i2t = current * current * prearc
    return Clearing(prearc + arcing, prearc_i2t + current * current * arcing, prearc, arcing)


def breaker_clearing(
    curve: str, rating: float, current: float, frequency: float = 50.0
) -> Clearing | None:
    """Worst-case tripping of a miniature breaker of curve B, C or D (IEC 60898-1, from memory).

    Parameters:
        curve: B, C or D.
        rating: In, A.
        current: prospective current, A.
        frequency: the mains frequency, Hz (one period is the let-through time well inside the
            instantaneous region, :data:`BREAKER_MAGNETIC_MARGIN`).
    Returns:
        the worst-case Clearing (time in s, let-through I²t in A²s); None when it may not trip.
    References:
        IEC 60898-1 (time-current bands of curves B, C, D; from memory).
    """
    m = current / rating
    band = BREAKER_INSTANT.get(curve, 5.0)
    if m >= band:
        t = 1.0 / frequency if m >= BREAKER_MAGNETIC_MARGIN * band else BREAKER_INSTANT_TIME
        return Clearing(BREAKER_INSTANT_TIME, current * current * min(t, BREAKER_INSTANT_TIME))
    for mm, t in BREAKER_THERMAL:
        if m >= mm:
            return Clearing(t, current * current * t)
    return None


def device_clearing(kind: str, rating: float, current: float, frequency: float) -> Clearing | None:
    """The fuse (``slow``/``fast``) or breaker (``breaker-B``/``-C``/``-D``) of the mains statement
    at a current.

    Parameters:
        kind: slow, fast or breaker-B/C/D.
        rating: A.
        current: A.
        frequency: Hz.
    Returns:
        the worst-case Clearing of that device, or None when it may not open.
    References:
        IEC 60127-2; IEC 60898-1.
    """
    if kind.startswith("breaker"):
        return breaker_clearing(kind.split("-", 1)[1], rating, current, frequency)
    return fuse_clearing(kind, rating, current, frequency)


def rcd_clearing(rated: float, residual: float) -> Clearing | None:
    """Worst-case break time of a general-type RCD at a residual current (None below IΔn).

    Parameters:
        rated: IΔn, A.
        residual: the residual current, A.
    Returns:
        the worst-case break time, s, or None below IΔn.
    References:
        IEC 61008-1, Table 1 (general type).
    """
    for mm, t in RCD_TIMES:
        if residual >= mm * rated:
            return Clearing(t, residual * residual * t)
    return None


def max_disconnection_time(voltage: float, system: str) -> float | None:
    """IEC 60364-4-41 Table 41.1: the longest allowed disconnection time at U0 = ``voltage`` (None
    at or below 50 V, where the table sets none).

    Parameters:
        voltage: U0, V.
        system: TN-S, TN-C-S, TT or IT (an IT supply's second fault takes TN's time, its
            metal being joined by protective conductors: 411.6.4 a); the voltage stated is
            taken as U0, which for an IT supply without a neutral is the line-to-line voltage,
            the stricter row).
    Returns:
        the maximum disconnection time, s (None below 50 V).
    References:
        IEC 60364-4-41, Table 41.1 and 411.6.4.
    """
    if voltage <= 50.0:
        return None
    for top, tn, tt in DISCONNECTION_LIMITS:
        if voltage <= top:
            return tt if system == "TT" else tn
    return None


def breaking_capacity(
    kind: str, rating: float, category: str | None, stated: float | None
) -> float:
    """The current the device can interrupt, A: stated, else by fuse category (default low) or
    breaker.

    Parameters:
        kind: fuse or breaker kind.
        rating: A.
        category: low, enhanced or high.
        stated: a stated capacity, A.
    Returns:
        the breaking capacity, A.
    References:
        IEC 60127-2 (fuses); IEC 60898-1 (breakers).
    """
    if stated is not None:
        return stated
    if kind.startswith("breaker"):
        return BREAKER_CAPACITY
    cap = BREAKING_CAPACITY.get(category or "low")
    return max(35.0, 10.0 * rating) if cap is None else cap


def fuse_cold_resistance(kind: str, rating: float) -> float:
    """Cold resistance of a miniature fuse, Ω: about 0.2 V / In, a rough fit to makers' data for
    5 × 20 mm fuses (0.4 Ω at 500 mA, 2 Ω at 100 mA) — from memory.  Breakers: taken as 0.

    Parameters:
        kind: fuse kind.
        rating: In, A.
    Returns:
        the cold resistance, Ω.
    References:
        makers' data sheets of 5 × 20 mm fuses (about 0.2 V / In, from memory).
    """
    if kind.startswith("breaker"):
        return 0.0
    return 0.2 / rating


def _per_km(table, area: float) -> float:
    """Ω/km for ``area``: the tabulated value, or the next smaller size's scaled by the area
    ratio."""
    below = [(a, r) for a, r in table if a <= area * (1 + 1e-9)]
    a0, r0 = below[-1] if below else table[0]
    return r0 * a0 / area


def cable_resistance(
    length: float, area: float, flexible: bool, temperature: float = 20.0
) -> float:
    """Maximum resistance of one copper core, Ω: IEC 60228 class 5 (``flexible``) or class 1/2 at
    20 °C, corrected to ``temperature`` with IEC 60228 Annex B's factor (230 + t)/250.

    Parameters:
        length: m.
        area: mm²-class cross-section, m².
        flexible: class 5 (True) or class 1/2.
        temperature: °C.
    Returns:
        the maximum core resistance, Ω.
    References:
        IEC 60228 (maximum conductor resistance at 20 °C); IEC 60028 (temperature coefficient).
    """
    per_km = _per_km(CORD_CLASS5 if flexible else FIXED_CLASS2, area)
    return per_km * length / 1000.0 * (230.0 + temperature) / 250.0
