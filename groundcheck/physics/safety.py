"""Protective-earth figures: path resistance, fault current, touch voltage against earth,
disconnection time against its limit, breaking capacity and fault survival.

The protective path is the network of conductors that are protective by topology or by role
(:mod:`groundcheck.network.earthing`) from the mains inlet's protective terminal to each touchable
metal part; its resistance is measured without the mains cord, as in the bonding tests of IEC
61010-1 6.5.2.4 and IEC 60335-1 cl. 27.5.

A line-to-part fault drives, with every resistance at its maximum (IEC 60364-4-41 411.4.4's
Zs = Ze + the circuit's line and protective conductors, here extended by the equipment's own
parts)::

    I_f = U0 / (Ze + R_fuse + R_circuit,line + R_cord,line + R_path + R_cord,PE + R_circuit,PE)

The touch voltage against earth is I_f times the protective path from the part to the main earthing
terminal (R_path + R_cord,PE + R_circuit,PE); in a TT system the installation's earth electrode R_A
is added (by default the whole external loop impedance, the worst case).  In an IT system U0 is
replaced by U/2, the second fault's share (411.6.4; the first fault is GC231's, R_A × I_d).  The
protective device —
fuse (pre-arcing plus arcing), breaker or RCD, whichever opens first — must disconnect within the
maximum time of IEC 60364-4-41 Table 41.1 for the supply voltage and earthing system; the fuse must
be able to break the prospective current; each protective conductor must survive the let-through
I²t (adiabatic equation, IEC 60364-5-54 543.1.2): S ≥ √(I²t)/k.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from .circuit import build_circuit
from ..network.earthing import ProtectiveRoute
from ..model.kinds import PROTECTIVE_ROLES, can_carry_protective, cross_section, section_checked
from ..model.records import PE_POINT, Plan
from .fault_loop import Supply, fault_emf, supply_figures
from .protection import STANDARD_PE_LIMIT, Clearing, device_clearing, rcd_clearing

__all__ = [
    "SafetyResult",
    "PartFigures",
    "ConductorCheck",
    "Supply",
    "protective_figures",
    "adiabatic_k",
    "DEFAULT_PE_LIMIT",
    "STANDARD_PE_LIMIT",
    "TOUCH_LIMIT",
    "supply_figures",
    "line_to_part",
]

DEFAULT_PE_LIMIT = STANDARD_PE_LIMIT

#: conventional touch-voltage limit for AC in normal conditions, V (IEC 60364-4-41, U_L = 50 V)
TOUCH_LIMIT = 50.0

#: k for copper protective conductors (A·√s/mm²): (in a cable, separate), IEC 60364-5-54 Tables
#: A.54.2/A.54.3 (PVC, XLPE).  Bare copper: 159, the column for bare conductors where there is no
#: risk of damage to neighbouring material at a final temperature of 200 °C (Table A.54.5, "normal
#: conditions", from memory) — the conservative column, chosen because a chassis wire runs beside
#: insulated wiring
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
class PartFigures:
    """The figures of a line-to-part fault at one touchable part (SI units)."""

    part: str
    path_resistance: float  # Ω, worst fastening of the part
    fault_current: float | None  # A
    touch_voltage: float | None  # V against earth
    clear_time: float | None  # s, the first device to open
    i2t: float | None  # A²s let through
    device: str | None = None  # which device opens first: fuse, breaker, rcd, or "stated"
    prearc: float | None = None  # s, the fuse's pre-arcing part
    arcing: float | None = None  # s, the fuse's arcing part
    stated: tuple[str, ...] = ()  # figures taken from the plan rather than computed


@dataclass(frozen=True)
class ConductorCheck:
    """The adiabatic check of one protective conductor."""

    conductor: str
    area: float  # m²
    k: float
    required: float  # m²

    @property
    def survives(self) -> bool:
        return self.area >= self.required


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
    def standard_limit(self) -> float:
        """The product-safety limit on the protective path, Ω."""
        return STANDARD_PE_LIMIT

    @property
    def relaxed(self) -> bool:
        """Whether the resistance limit in use is above the product-safety limit."""
        return self.limit > STANDARD_PE_LIMIT * (1 + 1e-9)


def _first_to_open(plan: Plan, current: float) -> tuple[Clearing | None, str | None]:
    """The device that opens first at a fault current, with its clearing (None when none is
    assured)."""
    m = plan.mains
    options: list[tuple[Clearing, str]] = []
    # with the supply circuit's breaker stated beside the equipment's fuse, the fault is taken at
    # the inlet, ahead of the fuse: the breaker (or an RCD) clears it alone
    rating, kind = m.inlet_device
    if rating is not None:
        cl = device_clearing(kind, rating, current, m.frequency)
        if cl is not None:
            options.append((cl, "breaker" if kind.startswith("breaker") else "fuse"))
    # an IT supply's second fault leaves on one line and comes back on the other: behind one RCD
    # with the other faulty circuit it leaves no residual current, so only the overcurrent device
    # is counted (IEC 60364-4-41 411.6.4; one RCD per circuit is the installation's own choice)
    if m.rcd is not None and m.system != "IT":
        cl = rcd_clearing(m.rcd, current)
        if cl is not None:
            options.append((cl, "rcd"))
    if not options:
        return None, None
    return min(options, key=lambda o: o[0].time)


def protective_circuit(plan: Plan, route: ProtectiveRoute, circuit=None):
    """The protective network: conductors protective by topology or role (of a kind that may carry
    protective current) with every metal part's plate network; from the plan's full circuit when
    given.

    Parameters:
        plan: the plan.
        route: the protective route.
        circuit: the full circuit.
    Returns:
        the circuit restricted to protective conductors.
    References:
        IEC 60364-5-54 (protective conductors).
    """
    keep = {
        c.name
        for c in plan.conductors
        if can_carry_protective(c) and (c.name in route or c.role in PROTECTIVE_ROLES)
    }
    if circuit is None:
        circuit = build_circuit(plan)
    return circuit.restricted(keep)


def _path_resistances(plan: Plan, circ) -> dict[str, float]:
    """DC resistance from the inlet's protective terminal to each touchable part it reaches (worst
    spot)."""
    _, labels = circ.components
    if PE_POINT not in circ.point_node:
        return {}
    pe = circ.point_node[PE_POINT]
    cols: list[tuple[str, int]] = []
    for part in plan.metals:
        if not part.touchable or part.signal_only:
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
        sol = circ.dc().solve(J)
        for k, (name, s) in enumerate(cols):
            r = float(abs(sol.V[s, k] - sol.V[pe, k]))
            rpart[name] = max(rpart.get(name, 0.0), r)
    return rpart


def protective_figures(
    plan: Plan, route: ProtectiveRoute, limit: float = DEFAULT_PE_LIMIT, circuit=None
) -> SafetyResult | None:
    """Protective-earth figures of every touchable part bonded to the inlet; None without a mains
    supply or for class II equipment (which has no protective earth).

    Parameters:
        plan: the plan.
        route: the protective route.
        limit: path-resistance limit, Ω.
        circuit: the circuit.
    Returns:
        a SafetyResult per touchable part, or None without a mains statement.
    References:
        IEC 60364-4-41 (disconnection, touch voltage); IEC 60364-5-54 (adiabatic check); IEC
        62368-1 / IEC 60065 bonding
            limit.
    """
    m = plan.mains
    if m is None or m.equipment_class == "II":
        return None
    sup = supply_figures(plan)
    rpart = _path_resistances(plan, protective_circuit(plan, route, circuit))
    parts = [
        _part_figures(plan, sup, name, r)
        for name, r in (
            (part.name, rpart[part.name]) for part in plan.metals if part.name in rpart
        )
    ]
    return SafetyResult(limit, tuple(parts), sup, _survival(plan, route, parts, sup))


def _stricter(stated: float | None, computed: float | None, assured: bool) -> float | None:
    """A stated figure may make a verdict stricter, never looser: the larger of the two; when a
    protective device exists but is not assured to open (``computed`` None, ``assured`` False)
    nothing stated replaces that."""
    if computed is None:
        return stated if assured else None
    return computed if stated is None else max(stated, computed)


def line_to_part(plan: Plan, sup: Supply, name: str, r: float) -> PartFigures:
    """A line-to-part fault at a part whose protective path inside the equipment is ``r`` Ω, on
    the plan's mains and the loop ``sup`` outside the equipment (:func:`supply_figures`).

    Parameters:
        plan: the plan (its ``mains`` and ambient temperature are read).
        sup: the fault loop outside the equipment.
        name: the part's name, kept in the figures.
        r: the protective path's resistance inside the equipment, Ω.
    Returns:
        the fault current, touch voltage, clearing time and let-through I²t.
    References:
        IEC 60364-4-41 411.4 and 411.5 (the fault loop and its disconnection).
    """
    return _part_figures(plan, sup, name, r)


def _part_figures(plan: Plan, sup: Supply, name: str, r: float) -> PartFigures:
    """A line-to-part fault at one part whose protective path is ``r``: its current and touch
    voltage with the cables at their operating temperature; the let-through I²t the larger of the
    hot and the cold case."""
    m = plan.mains
    outside = sup.ze + sup.fuse_resistance + sup.circuit_line + sup.cord_line
    emf = fault_emf(m)  # half the voltage at an IT supply's second fault
    i_f = emf / (outside + r + sup.cord_pe + sup.circuit_cpc)
    touch = i_f * (r + sup.cord_pe + sup.circuit_cpc + sup.electrode)
    if m.system == "IT":  # between this part and the other faulty one, its circuit's mirror
        touch *= 2.0
    cl, device = _first_to_open(plan, i_f)
    cl_cold, _ = _first_to_open(plan, emf / (sup.cold_outside + r + sup.cold_return))
    no_device = m.fuse is None and m.rcd is None
    t = _stricter(m.clear_time, cl.time if cl else None, no_device)
    i2t = max(cl.i2t, cl_cold.i2t if cl_cold is not None else 0.0) if cl is not None else None
    longer = t is not None and (
        cl is None or t > cl.time
    )  # a stated clearing time beyond the table's
    if longer:
        i2t = max(i2t or 0.0, i_f * i_f * t)
    i2t = _stricter(m.fuse_i2t, i2t, no_device)
    stated = []
    if m.clear_time is not None:
        stated.append("clear_time")
        device = "stated" if longer else device
    if m.fuse_i2t is not None:
        stated.append("i2t")
    if m.loop_impedance is not None:
        stated.append("external_loop")
    fuse = cl is not None and device == "fuse"
    return PartFigures(
        name,
        r,
        i_f,
        touch,
        t,
        i2t,
        device,
        cl.prearc if fuse else None,
        cl.arcing if fuse else None,
        tuple(stated),
    )


def _survival(
    plan: Plan, route: ProtectiveRoute, parts: list[PartFigures], sup: Supply
) -> tuple[ConductorCheck, ...]:
    """The adiabatic check of the cord's protective core and every protective conductor whose
    section matters."""
    worst = max((p.i2t for p in parts if p.i2t is not None), default=None)
    if worst is None:
        return ()
    checks = [("mains cord (protective core)", plan.mains.cord_section, adiabatic_k("pvc", True))]
    for c in plan.conductors:
        area = cross_section(c)
        if c.name in route and section_checked(c) and area is not None:
            checks.append((c.name, area, adiabatic_k(c.insulation, c.in_cable)))
    return tuple(
        ConductorCheck(name, area, k, math.sqrt(worst) / k * 1e-6) for name, area, k in checks
    )
