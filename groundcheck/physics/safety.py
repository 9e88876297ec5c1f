"""Protective-earth figures: path resistance, fault current, touch voltage against earth, disconnection
time against its limit, breaking capacity and fault survival.

The protective path is the network of conductors that are protective by topology or by role
(:mod:`groundcheck.network.earthing`) from the mains inlet's protective terminal to each touchable metal part;
its resistance is measured without the mains cord, as in the bonding tests of IEC 61010-1 6.5.2.4 and
IEC 60335-1 cl. 27.5.

A line-to-part fault drives, with every resistance at its maximum (IEC 60364-4-41 411.4.4's
Zs = Ze + the circuit's line and protective conductors, here extended by the equipment's own parts)::

    I_f = U0 / (Ze + R_fuse + R_circuit,line + R_cord,line + R_path + R_cord,PE + R_circuit,PE)

The touch voltage against earth is I_f times the protective path from the part to the main earthing
terminal (R_path + R_cord,PE + R_circuit,PE); in a TT system the installation's earth electrode R_A is
added (by default the whole external loop impedance, the worst case).  The protective device — fuse
(pre-arcing plus arcing), breaker or RCD, whichever opens first — must disconnect within the maximum
time of IEC 60364-4-41 Table 41.1 for the supply voltage and earthing system; the fuse must be able
to break the prospective current; each protective conductor must survive the let-through I²t
(adiabatic equation, IEC 60364-5-54 543.1.2): S ≥ √(I²t)/k.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from .circuit import build_circuit
from ..network.earthing import ProtectiveRoute
from ..model.installation import separated_devices
from ..model.kinds import PROTECTIVE_ROLES, can_carry_protective, cross_section, section_checked
from ..model.records import PE_POINT, Plan
from .protection import (STANDARD_PE_LIMIT, DEFAULT_CIRCUIT, DEFAULT_ZE, Clearing, breaking_capacity, cable_resistance,
                         device_clearing, fuse_cold_resistance, max_disconnection_time, rcd_clearing)

__all__ = ["SafetyResult", "PartFigures", "ConductorCheck", "Supply", "protective_figures", "adiabatic_k",
           "DEFAULT_PE_LIMIT", "STANDARD_PE_LIMIT", "TOUCH_LIMIT", "supply_figures",
           "DeviceEarth", "installation_earths"]

DEFAULT_PE_LIMIT = STANDARD_PE_LIMIT

#: conventional touch-voltage limit for AC in normal conditions, V (IEC 60364-4-41, U_L = 50 V)
TOUCH_LIMIT = 50.0

#: k for copper protective conductors (A·√s/mm²): (in a cable, separate), IEC 60364-5-54 Tables A.54.2/A.54.3
#: (PVC, XLPE).  Bare copper: 159, the column for bare conductors where there is no risk of damage to
#: neighbouring material at a final temperature of 200 °C (Table A.54.5, "normal conditions", from
#: memory) — the conservative column, chosen because a chassis wire runs beside insulated wiring
ADIABATIC_K = {"pvc": (115.0, 143.0), "xlpe": (143.0, 176.0), "bare": (159.0, 159.0)}


def adiabatic_k(insulation: str, in_cable: bool) -> float:
    """k of a copper protective conductor (IEC 60364-5-54 Annex A).

    Parameters:
        insulation: pvc or rubber or bare.
        in_cable: whether the conductor is a core of a cable.
    Returns:
        k, A·√s/mm².
    References:
        IEC 60364-5-54, Annex A (Tables A.54.2–A.54.4).
    """
    pair = ADIABATIC_K.get(insulation, ADIABATIC_K["pvc"])
    return pair[0] if in_cable else pair[1]


@dataclass(frozen=True)
class Supply:
    """The fault loop outside the protective path, with where each figure came from."""

    system: str
    ze: float                        # Ω, external loop impedance at the origin
    ze_stated: bool
    circuit_line: float              # Ω
    circuit_cpc: float               # Ω
    cord_line: float                 # Ω
    cord_pe: float                   # Ω
    fuse_resistance: float           # Ω
    electrode: float                 # Ω, TT only (0 otherwise)
    max_time: float | None           # s, IEC 60364-4-41 Table 41.1
    breaking_capacity: float | None  # A


@dataclass(frozen=True)
class PartFigures:
    """The figures of a line-to-part fault at one touchable part (SI units)."""

    part: str
    path_resistance: float           # Ω, worst fastening of the part
    fault_current: float | None      # A
    touch_voltage: float | None      # V against earth
    clear_time: float | None         # s, the first device to open
    i2t: float | None                # A²s let through
    device: str | None = None        # which device opens first: fuse, breaker, rcd, or "stated"
    prearc: float | None = None      # s, the fuse's pre-arcing part
    arcing: float | None = None      # s, the fuse's arcing part
    stated: tuple[str, ...] = ()     # figures taken from the plan rather than computed

    def as_dict(self) -> dict:
        r = lambda x, d=6: None if x is None else round(x, d)  # noqa: E731
        return {"part": self.part, "path_resistance_ohm": r(self.path_resistance, 7),
                "fault_current_a": r(self.fault_current, 3), "touch_voltage_v": r(self.touch_voltage, 3),
                "clear_time_s": r(self.clear_time, 6), "i2t_a2s": r(self.i2t, 3), "device": self.device,
                "prearc_s": r(self.prearc, 6), "arcing_s": r(self.arcing, 6), "stated_in_plan": list(self.stated)}


@dataclass(frozen=True)
class ConductorCheck:
    """The adiabatic check of one protective conductor."""

    conductor: str
    area: float                      # m²
    k: float
    required: float                  # m²

    @property
    def survives(self) -> bool:
        return self.area >= self.required

    def as_dict(self) -> dict:
        return {"conductor": self.conductor, "area_mm2": round(self.area * 1e6, 4), "k": self.k,
                "required_mm2": round(self.required * 1e6, 4), "survives": self.survives}


@dataclass(frozen=True)
class SafetyResult:
    limit: float
    parts: tuple[PartFigures, ...]
    supply: Supply
    conductors: tuple[ConductorCheck, ...] = ()

    @property
    def cord_line(self) -> float:
        return self.supply.cord_line

    @property
    def cord_pe(self) -> float:
        return self.supply.cord_pe

    @property
    def relaxed(self) -> bool:
        """Whether the resistance limit in use is above the product-safety limit."""
        return self.limit > STANDARD_PE_LIMIT * (1 + 1e-9)

    def as_dict(self) -> dict:
        s = self.supply
        r = lambda x, d=6: None if x is None else round(x, d)  # noqa: E731
        return {"limit_ohm": self.limit, "standard_limit_ohm": STANDARD_PE_LIMIT, "limit_relaxed": self.relaxed,
                "system": s.system, "external_loop_ohm": r(s.ze), "external_loop_stated": s.ze_stated,
                "circuit_line_ohm": r(s.circuit_line), "circuit_protective_ohm": r(s.circuit_cpc),
                "cord_line_ohm": r(s.cord_line), "cord_pe_ohm": r(s.cord_pe),
                "fuse_resistance_ohm": r(s.fuse_resistance),
                "electrode_ohm": r(s.electrode), "max_disconnection_s": s.max_time,
                "breaking_capacity_a": r(s.breaking_capacity, 3),
                "parts": [p.as_dict() for p in self.parts], "conductors": [c.as_dict() for c in self.conductors]}


def supply_figures(plan: Plan) -> Supply:
    """The fault loop outside the equipment's protective path, from the mains statement and defaults.

    Parameters:
        plan: the plan.
    Returns:
        the SupplyFigures: external loop impedance, final circuit, cord, disconnection limit.
    References:
        IEC 60364-4-41; IEC 60228.
    """
    m = plan.mains
    T = plan.ambient
    cord = cable_resistance(m.cord_length, m.cord_section, True, T)
    c_len = m.circuit_length if m.circuit_length is not None else DEFAULT_CIRCUIT[0]
    c_area = m.circuit_area or DEFAULT_CIRCUIT[1]
    line = cable_resistance(c_len, c_area, False, T)
    cpc = cable_resistance(c_len, m.cpc_area or c_area, False, T)
    ze = m.loop_impedance if m.loop_impedance is not None else DEFAULT_ZE[m.system]
    fuse_r = 0.0
    if m.fuse is not None:
        fuse_r = m.fuse_resistance if m.fuse_resistance is not None else fuse_cold_resistance(m.fuse_kind, m.fuse)
    electrode = (m.electrode if m.electrode is not None else ze) if m.system == "TT" else 0.0
    cap = breaking_capacity(m.fuse_kind, m.fuse, m.breaking, m.breaking_current) if m.fuse is not None else None
    return Supply(m.system, ze, m.loop_impedance is not None, line, cpc, cord, cord, fuse_r, electrode,
                  max_disconnection_time(m.voltage, m.system), cap)


def _first_to_open(plan: Plan, current: float) -> tuple[Clearing | None, str | None]:
    """The device that opens first at a fault current, with its clearing (None when none is assured)."""
    m = plan.mains
    options: list[tuple[Clearing, str]] = []
    if m.fuse is not None:
        cl = device_clearing(m.fuse_kind, m.fuse, current, m.frequency)
        if cl is not None:
            options.append((cl, "breaker" if m.fuse_kind.startswith("breaker") else "fuse"))
    if m.rcd is not None:
        cl = rcd_clearing(m.rcd, current)
        if cl is not None:
            options.append((cl, "rcd"))
    if not options:
        return None, None
    return min(options, key=lambda o: o[0].time)


def protective_circuit(plan: Plan, route: ProtectiveRoute, circuit=None):
    """The protective network: conductors protective by topology or role (of a kind that may carry protective
    current) with every metal part's plate network; from the plan's full circuit when given.

    Parameters:
        plan: the plan.
        route: the protective route.
        circuit: the full circuit.
    Returns:
        the circuit restricted to protective conductors.
    References:
        IEC 60364-5-54 (protective conductors).
    """
    keep = {c.name for c in plan.conductors
            if can_carry_protective(c) and (c.name in route or c.role in PROTECTIVE_ROLES)}
    if circuit is None:
        circuit = build_circuit(plan)
    return circuit.restricted(keep)


def _path_resistances(plan: Plan, circ) -> dict[str, float]:
    """DC resistance from the inlet's protective terminal to each touchable part it reaches (worst spot)."""
    _, labels = circ.components
    if PE_POINT not in circ.point_node:
        return {}
    pe = circ.point_node[PE_POINT]
    cols: list[tuple[str, int]] = []
    for part in plan.metals:
        if not part.touchable:
            continue
        for s in circ.nodes_of_metal(part.name):
            if labels[s] == labels[pe]:
                cols.append((part.name, s))
    rpart: dict[str, float] = {}
    if cols:
        J = np.zeros((len(circ.nodes), len(cols)), dtype=complex)
        for k, (_, s) in enumerate(cols):
            J[s, k] += 1.0
            J[pe, k] -= 1.0
        sol = circ.at(0.0).solve(J)
        for k, (name, s) in enumerate(cols):
            r = float(abs(sol.V[s, k] - sol.V[pe, k]))
            rpart[name] = max(rpart.get(name, 0.0), r)
    return rpart


def protective_figures(plan: Plan, route: ProtectiveRoute, limit: float = DEFAULT_PE_LIMIT,
                       circuit=None) -> SafetyResult | None:
    """Protective-earth figures of every touchable part bonded to the inlet; None without a mains supply
    or for class II equipment (which has no protective earth).

    Parameters:
        plan: the plan.
        route: the protective route.
        limit: path-resistance limit, Ω.
        circuit: the circuit.
    Returns:
        a SafetyResult per touchable part, or None without a mains statement.
    References:
        IEC 60364-4-41 (disconnection, touch voltage); IEC 60364-5-54 (adiabatic check); IEC 62368-1 / IEC 60065 bonding
            limit.
    """
    m = plan.mains
    if m is None or m.equipment_class == "II":
        return None
    sup = supply_figures(plan)
    rpart = _path_resistances(plan, protective_circuit(plan, route, circuit))
    parts = []
    for part in plan.metals:
        if part.name not in rpart:
            continue
        r = rpart[part.name]
        z = sup.ze + sup.fuse_resistance + sup.circuit_line + sup.cord_line + r + sup.cord_pe + sup.circuit_cpc
        i_f = m.voltage / z
        touch = i_f * (r + sup.cord_pe + sup.circuit_cpc + sup.electrode)
        cl, device = _first_to_open(plan, i_f)
        stated = []
        t = cl.time if cl else None
        i2t = cl.i2t if cl else None
        if m.clear_time is not None:
            t, device = m.clear_time, "stated"
            stated.append("clear_time")
            i2t = i_f * i_f * m.clear_time
        if m.fuse_i2t is not None:
            i2t = m.fuse_i2t
            stated.append("i2t")
        if m.loop_impedance is not None:
            stated.append("external_loop")
        parts.append(PartFigures(part.name, r, i_f, touch, t, i2t, device,
                                 cl.prearc if cl and device == "fuse" else None,
                                 cl.arcing if cl and device == "fuse" else None, tuple(stated)))
    return SafetyResult(limit, tuple(parts), sup, _survival(plan, route, parts, sup))


def _survival(plan: Plan, route: ProtectiveRoute, parts: list[PartFigures], sup: Supply) -> tuple[ConductorCheck, ...]:
    """The adiabatic check of the cord's protective core and every protective conductor whose section matters."""
    worst = max((p.i2t for p in parts if p.i2t is not None), default=None)
    if worst is None:
        return ()
    checks = [("mains cord (protective core)", plan.mains.cord_section, adiabatic_k("pvc", True))]
    for c in plan.conductors:
        area = cross_section(c)
        if c.name in route and section_checked(c) and area is not None:
            checks.append((c.name, area, adiabatic_k(c.insulation, c.in_cable)))
    return tuple(ConductorCheck(name, area, k, math.sqrt(worst) / k * 1e-6) for name, area, k in checks)


@dataclass(frozen=True)
class DeviceEarth:
    """An installation device's protective path from its earth pin to the main earthing terminal."""

    device: str
    inlet: str
    resistance: float | None         # Ω, None when the path is broken

    def as_dict(self) -> dict:
        return {"device": self.device, "inlet": self.inlet,
                "resistance_ohm": None if self.resistance is None else round(self.resistance, 6)}


def installation_earths(plan: Plan, route: ProtectiveRoute, circuit=None) -> tuple[DeviceEarth, ...] | None:
    """Each placed device's earth-pin path to the main earthing terminal; None when the plan has no
    placed device or no point of kind ``earthing-terminal``.

    Parameters:
        plan: the plan.
        route: the protective route.
        circuit: the circuit.
    Returns:
        each placed device's earth path, or None when the plan places no device.
    References:
        IEC 60364-5-54.
    """
    class_ii = {d.name for d in plan.devices if d.equipment_class == "II"}     # no earth pin to check
    class_ii |= separated_devices(plan)   # on a floating secondary: no earth path by design
    inlets = sorted(p.name for p in plan.points if p.kind == "inlet" and p.name != PE_POINT
                    and p.name.split(".", 1)[0] not in class_ii)
    mets = [p.name for p in plan.points if p.kind == "earthing-terminal"]
    if not inlets or not mets:
        return None
    circ = protective_circuit(plan, route, circuit)
    _, labels = circ.components
    met = circ.point_node[mets[0]]
    reach = [n for n in inlets if labels[circ.point_node[n]] == labels[met] and n in route.reached]
    R: dict[str, float] = {}
    if reach:
        J = np.zeros((len(circ.nodes), len(reach)), dtype=complex)
        for k, n in enumerate(reach):
            J[circ.point_node[n], k] += 1.0
            J[met, k] -= 1.0
        sol = circ.at(0.0).solve(J)
        for k, n in enumerate(reach):
            R[n] = float(abs(sol.V[circ.point_node[n], k] - sol.V[met, k]))
    group = {p.name: p.group for p in plan.points}
    return tuple(DeviceEarth(group.get(n) or n, n, R.get(n)) for n in inlets)
