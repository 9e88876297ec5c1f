"""The fault loop outside the equipment's protective path: the supply's external loop impedance,
the final circuit and the mains cord, the protective device's resistance and breaking capacity,
and the prospective currents (the largest earth fault and short circuit) with the cables cold.

The cables' resistances in the fault loop are at their operating temperature (IEC 60364-5-52 Table
52.1, PVC 70 °C, unless the plan states it); the prospective currents, which the device must be
able to break, are taken with the cables at the lowest temperature (the plan's ambient, at most
20 °C).  In a TT system the fault current returns through the installation's earth electrode R_A
(IEC 60364-4-41 411.5).  In an IT system a first fault lets no current flow that a fuse sees;
the loop checked is the second fault's, on the other line, through the protective conductors
that join the two faulty parts: half the supply's voltage drives it round this circuit's loop
(411.6.4: Zs ≤ U / (2 Ia)).  The equipment's own part of the loop is
:mod:`groundcheck.physics.safety`'s.
"""

from __future__ import annotations

from dataclasses import dataclass

from ..model.records import Plan
from .protection import (
    CABLE_OPERATING_TEMPERATURE,
    DEFAULT_CIRCUIT,
    DEFAULT_LINE_NEUTRAL_LOOP,
    DEFAULT_ZE,
    TT_SOURCE_LOOP,
    breaking_capacity,
    cable_resistance,
    fuse_cold_resistance,
    max_disconnection_time,
)

__all__ = ["Supply", "external_loop", "supply_figures", "fault_emf", "first_fault_touch"]


def first_fault_touch(m) -> float | None:
    """An IT supply's first fault on earthed metal: the touch voltage it leaves.

    Parameters:
        m: the mains record.
    Returns:
        R_A × I_d, V; None outside IT or when the plan does not state both.
    References:
        IEC 60364-4-41 411.6.2.
    """
    if m.system != "IT" or m.electrode is None or m.first_fault is None:
        return None
    return m.electrode * m.first_fault


def fault_emf(m) -> float:
    """The voltage that drives a fault to the equipment's metal round its loop, V: the supply's,
    or half of it in an IT supply — a second fault on the other line closes the loop through both
    faulty parts' protective conductors, each circuit's half of it taken as this one's.

    Parameters:
        m: the mains record (its voltage: between line and neutral, or between the two lines of
            an IT supply without a neutral, as the equipment is connected).
    Returns:
        the driving voltage, V.
    References:
        IEC 60364-4-41 411.6.4 (Zs ≤ U/(2 Ia), neutral not distributed; Z's ≤ U0/(2 Ia) with it).
    """
    return m.voltage / 2.0 if m.system == "IT" else m.voltage


@dataclass(frozen=True)
class Supply:
    """The fault loop outside the protective path, with where each figure came from.  The cables'
    resistances are at their operating temperature (``cable_temperature``); the prospective
    currents, which the breaking capacity must cover, at the lowest temperature
    (``cold_temperature``)."""

    system: str
    ze: float  # Ω, external loop impedance at the origin (TT: through the electrode)
    ze_stated: bool
    circuit_line: float  # Ω
    circuit_cpc: float  # Ω
    cord_line: float  # Ω
    cord_pe: float  # Ω
    fuse_resistance: float  # Ω
    electrode: float  # Ω, TT only (0 otherwise)
    max_time: float | None  # s, IEC 60364-4-41 Table 41.1
    breaking_capacity: float | None  # A
    cable_temperature: float = 20.0  # °C, the cables' temperature in the figures above
    cold_temperature: float = 20.0  # °C, the cables' temperature for the prospective currents
    earth_fault_max: float = (
        0.0  # A, the largest line-to-protective fault (at the inlet, cables cold)
    )
    short_circuit: float = (
        0.0  # A, the largest line-to-neutral fault inside the equipment (cables cold)
    )
    short_circuit_stated: bool = False
    cold_outside: float = 0.0  # Ω, cables cold: external loop, fuse, circuit line and cord line
    cold_return: float = 0.0  # Ω, cables cold: cord and circuit protective conductors
    #: V, an IT supply's first fault on the metal: the stated electrode R_A times the stated
    #: first-fault current I_d (GC231's figure), None elsewhere or when either is not stated
    first_fault_v: float | None = None

    @property
    def prospective(self) -> float:
        """The largest current the fuse or breaker may have to break, A."""
        return max(self.earth_fault_max, self.short_circuit)


def external_loop(m) -> tuple[float, float]:
    """The external earth-fault loop Ze at the origin and, in a TT supply, the installation's
    electrode R_A in it.

    TT: the fault current returns through the earth, so the loop holds R_A.  A stated loop includes
    it (the electrode alone, when not stated, is taken as the whole loop: the worst case for the
    touch voltage); a stated electrode without a loop adds the supply's own part
    (:data:`TT_SOURCE_LOOP`).

    Parameters:
        m: the mains record.
    Returns:
        (Ze, R_A) in Ω; R_A is 0 outside TT.
    References:
        IEC 60364-4-41 411.5 (TT systems: the fault loop through R_A).
    """
    if m.system != "TT":
        return (m.loop_impedance if m.loop_impedance is not None else DEFAULT_ZE[m.system]), 0.0
    if m.loop_impedance is not None:
        return m.loop_impedance, (m.electrode if m.electrode is not None else m.loop_impedance)
    if m.electrode is not None:
        return m.electrode + TT_SOURCE_LOOP, m.electrode
    return DEFAULT_ZE["TT"], DEFAULT_ZE["TT"]


def _cables(m, temperature: float, prospective: bool = False) -> tuple[float, float, float]:
    """(circuit line, circuit protective conductor, cord core) resistances at ``temperature``,
    Ω; the circuit is a placed device's route through its installation when it has one.  For the
    prospective currents (``prospective``) a round building cable is taken at class 1/2, the
    lower resistance: the plan cannot say whether it is fixed wiring or a flexible reel, and the
    breaking capacity is checked against the larger current."""
    cord = cable_resistance(m.cord_length, m.cord_section, True, temperature)
    if m.route is not None:  # a placed device: the installation's conductors to the origin
        route = [(ln, a, pe, flex and not prospective) for _, ln, a, pe, flex in m.route]
        # the least-resistance path, scaled to the whole wiring's resistance (a ring's two legs)
        line, pe = m.route_factors
        return (
            line * sum(cable_resistance(ln, a, flex, temperature) for ln, a, _, flex in route),
            pe * sum(cable_resistance(ln, pe, flex, temperature) for ln, _, pe, flex in route),
            cord,
        )
    c_len = m.circuit_length if m.circuit_length is not None else DEFAULT_CIRCUIT[0]
    c_area = m.circuit_area or DEFAULT_CIRCUIT[1]
    return (
        cable_resistance(c_len, c_area, False, temperature),
        cable_resistance(c_len, m.cpc_area or c_area, False, temperature),
        cord,
    )


def _device_resistance(m) -> float:
    """The protective device's resistance in the fault loop, Ω: the supply circuit's breaker's
    when the plan states one beside the equipment's fuse (the fault at the inlet, ahead of the
    fuse), else the one device's (a stated fuse resistance, or the rough default), else 0."""
    rating, kind = m.inlet_device
    if rating is None:
        return 0.0
    if m.breaker is None and m.fuse_resistance is not None:  # the stated one is the fuse's
        return m.fuse_resistance
    return fuse_cold_resistance(kind, rating)


def supply_figures(plan: Plan) -> Supply:
    """The fault loop outside the equipment's protective path, from the mains statement and
    defaults: the installation's cables at their operating temperature, and the prospective
    currents with them cold.

    Parameters:
        plan: the plan.
    Returns:
        the Supply: external loop impedance, final circuit, cord, disconnection limit, prospective
        currents.
    References:
        IEC 60364-4-41; IEC 60228; IEC 60364-5-52 Table 52.1 (PVC 70 °C).
    """
    m = plan.mains
    hot_t = m.cable_temperature if m.cable_temperature is not None else CABLE_OPERATING_TEMPERATURE
    cold_t = min(plan.ambient, 20.0)
    line, cpc, cord = _cables(m, hot_t)
    ze, electrode = external_loop(m)
    fuse_r = _device_resistance(m)
    cap = (
        breaking_capacity(m.fuse_kind, m.fuse, m.breaking, m.breaking_current)
        if m.fuse is not None
        else None
    )
    c_line, c_cpc, c_cord = _cables(m, cold_t, prospective=True)
    linked = ze + c_line + c_cord  # the device replaced by a link (the prospective currents)
    cold_outside, cold_return = linked + fuse_r, c_cord + c_cpc
    zln = ze if m.system != "TT" else min(ze, DEFAULT_LINE_NEUTRAL_LOOP)
    # prospective currents: the device replaced by a link of negligible impedance (IEC 60127-1,
    # IEC 60269-1: what breaking capacities are rated against), its own resistance not in them
    short = m.voltage / (zln + 2 * c_line + 2 * c_cord)
    if m.short_circuit is not None:  # a stated current may only make the check stricter
        short = max(short, m.short_circuit)
    return Supply(
        m.system,
        ze,
        m.loop_impedance is not None,
        line,
        cpc,
        cord,
        cord,
        fuse_r,
        electrode,
        max_disconnection_time(m.voltage, m.system),
        cap,
        hot_t,
        cold_t,
        fault_emf(m) / (linked + cold_return),
        short,
        m.short_circuit is not None,
        cold_outside,
        cold_return,
        first_fault_touch(m),
    )
