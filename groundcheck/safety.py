"""Protective-earth figures: path resistance, touch voltage in a fault, fuse clearing and fault survival.

The protective path is the network of protective conductors and fastenings
(no lift network, switch, signal wire or shield) from the mains inlet's
protective terminal to each touchable metal part; the mains cord is excluded
from the path resistance, as in the bonding tests of IEC 61010-1 6.5.2.4 and
IEC 60335-1 cl. 27.5.

A line-to-chassis fault at a part drives I = U₀ / (Z_supply + R_cord,line +
R_cord,PE + R_path); the touch voltage is that current times R_path + R_cord,PE
(the part against the earthed metal at the socket).  The fuse's clearing time
comes from its time-current limits; the protective conductors must survive
I²t (adiabatic equation, IEC 60364-5-54 543.1.2): S ≥ √(I²t)/k.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace

import numpy as np

from .circuit import build_circuit
from .impedance import resistivity
from .model import PE_POINT, Plan

__all__ = ["SafetyResult", "PartFigures", "protective_figures", "clearing_time", "adiabatic_k",
           "DEFAULT_PE_LIMIT", "FUSE_LIMITS"]

#: protective bonding limit, Ω (IEC 60065 cl. 15.2; IEC 61010-1 6.5.2.4; IEC 60950-1 2.6.3.4)
DEFAULT_PE_LIMIT = 0.1

#: conventional touch-voltage limit for AC in dry conditions, V (IEC 60364-4-41, U_L = 50 V)
TOUCH_LIMIT = 50.0

#: worst-case clearing time (s) at or above a multiple of the rating; below the lowest, no assured clearing.
#: Fuses: IEC 60127-2 standard sheets 1 (F) and 3 (T) maximum pre-arcing times, from memory.
#: Breakers: IEC 60898-1 instantaneous-trip bands B 3–5 In, C 5–10 In, D 10–20 In, within 0.1 s.
FUSE_LIMITS = {
    "fast": ((10.0, 0.02), (4.0, 0.3), (2.75, 2.0)),
    "slow": ((10.0, 0.3), (4.0, 3.0), (2.75, 10.0)),
    "breaker-B": ((5.0, 0.1),),
    "breaker-C": ((10.0, 0.1),),
    "breaker-D": ((20.0, 0.1),),
}

#: k for copper protective conductors (A·√s/mm²): (in a cable, separate), IEC 60364-5-54 Tables A.54.2/A.54.3
ADIABATIC_K = {"pvc": (115.0, 143.0), "xlpe": (143.0, 176.0), "bare": (228.0, 228.0)}


def adiabatic_k(insulation: str, in_cable: bool) -> float:
    """k of a copper protective conductor.  Bare copper: 228 (IEC 60364-5-54 Table A.54.5, from memory)."""
    pair = ADIABATIC_K.get(insulation, ADIABATIC_K["pvc"])
    return pair[0] if in_cable else pair[1]


def clearing_time(kind: str, rating: float, current: float) -> tuple[float, float] | None:
    """Worst-case (clearing time in s, let-through I²t in A²s) of the protective device at ``current``.

    Between the tabulated multiples the time is the table's limit and
    I²t = I²·t.  Above the highest multiple a fuse works adiabatically: its
    I²t is at most the value at that multiple, (m·In)²·t_m, and the time is
    I²t / I².  A breaker's magnetic trip is taken to clear within one half
    cycle, 10 ms (from memory).  None when clearing is not assured.
    """
    multiple = current / rating
    table = FUSE_LIMITS.get(kind, FUSE_LIMITS["slow"])
    top_m, top_t = table[0]
    if kind.startswith("breaker"):
        if multiple >= top_m:
            return 0.01, current * current * 0.01
        return None
    if multiple >= top_m:
        i2t = (top_m * rating) ** 2 * top_t
        return i2t / (current * current), i2t
    for m, t in table[1:]:
        if multiple >= m:
            return t, current * current * t
    return None


@dataclass(frozen=True)
class PartFigures:
    part: str
    path_resistance: float           # Ω, worst fastening of the part
    fault_current: float | None      # A
    touch_voltage: float | None      # V
    clear_time: float | None         # s
    i2t: float | None                # A²s

    def as_dict(self) -> dict:
        r = lambda x, d=6: None if x is None else round(x, d)  # noqa: E731
        return {"part": self.part, "path_resistance_ohm": r(self.path_resistance, 7),
                "fault_current_a": r(self.fault_current, 3), "touch_voltage_v": r(self.touch_voltage, 3),
                "clear_time_s": self.clear_time, "i2t_a2s": r(self.i2t, 3)}


@dataclass(frozen=True)
class SafetyResult:
    limit: float
    parts: tuple[PartFigures, ...]
    cord_line: float                 # Ω
    cord_pe: float                   # Ω
    conductors: tuple[dict, ...] = field(default=())   # adiabatic check per protective conductor

    def as_dict(self) -> dict:
        return {"limit_ohm": self.limit, "cord_line_ohm": round(self.cord_line, 6), "cord_pe_ohm": round(self.cord_pe, 6),
                "parts": [p.as_dict() for p in self.parts], "conductors": list(self.conductors)}


def _protective_plan(plan: Plan) -> Plan:
    keep = tuple(c for c in plan.conductors
                 if c.role in ("protective", "bond") and c.kind not in ("lift", "switch", "shield", "interconnect"))
    return replace(plan, conductors=keep)


def protective_figures(plan: Plan, limit: float = DEFAULT_PE_LIMIT) -> SafetyResult | None:
    """Protective-earth figures of every touchable part bonded to the inlet; None without a mains supply."""
    if plan.mains is None:
        return None
    m = plan.mains
    T = plan.ambient
    cord_area = m.cord_area or m.line_area or 0.75e-6
    rho = resistivity("copper", T)
    cord = rho * m.cord_length / cord_area
    pplan = _protective_plan(plan)
    circ = build_circuit(pplan)
    ncomp, labels = circ.components
    pe = circ.point_node[PE_POINT]
    touch = [x for x in plan.metals if x.touchable]
    cols: list[tuple[str, int]] = []
    for part in touch:
        spots = [i for i, n in enumerate(circ.nodes) if n == part.name or n.startswith(part.name + "@")]
        for s in spots:
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
    parts = []
    worst_i = None
    for part in touch:
        if part.name not in rpart:
            continue
        r = rpart[part.name]
        i_f = m.voltage / (m.loop_impedance + 2 * cord + r)
        u = i_f * (r + cord)
        cleared = clearing_time(m.fuse_kind, m.fuse, i_f) if m.fuse else None
        t = m.clear_time if m.clear_time is not None else (cleared[0] if cleared else None)
        i2t = m.fuse_i2t if m.fuse_i2t is not None else (
            i_f * i_f * m.clear_time if m.clear_time is not None else (cleared[1] if cleared else None))
        parts.append(PartFigures(part.name, r, i_f, u, t, i2t))
        if worst_i is None or i_f > worst_i[0]:
            worst_i = (i_f, i2t)
    conductors = []
    if worst_i is not None and worst_i[1] is not None:
        i2t = worst_i[1]
        checks = [("mains cord (protective core)", cord_area, adiabatic_k("pvc", True))]
        for c in pplan.conductors:
            if c.role == "protective" and c.area is not None and c.kind in ("wire", "strap", "busbar"):
                checks.append((c.name, c.area, adiabatic_k(c.insulation, c.in_cable)))
        for name, area, k in checks:
            need = math.sqrt(i2t) / k * 1e-6
            conductors.append({"conductor": name, "area_mm2": round(area * 1e6, 4), "k": k,
                               "required_mm2": round(need * 1e6, 4), "survives": bool(area >= need)})
    return SafetyResult(limit, tuple(parts), cord, cord, tuple(conductors))
