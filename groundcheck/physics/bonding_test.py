"""The product bonding test: beside the 0.1 Ω limit, the protective path must carry the product
standard's test current without any of its conductors overheating.

The tests (figures in :data:`SHORT_TEST`, :data:`LONG_TEST` and :func:`bonding_tests`):

* **short**: 25 A for 60 s — IEC 60065 cl. 15.2 and IEC 61010-1 6.5.2.4 (25 A, 1 min); IEC 60335-1
  cl. 27.5 asks for 1.5 × the rated current when that is more than 25 A (from memory).  A plan
  states no rated current, so the rating of the mains statement's fuse or breaker stands in for it:
  a fuse is rated at or above the current the equipment draws, which keeps the test current
  cautious.
* **long**: 200 % of the protective device's rating for 120 s — IEC 60950-1:2005 2.6.3.4; IEC
  62368-1 5.6.6.2 (from memory) — run when the mains statement names a fuse or breaker.

The current flows from the inlet's protective terminal to each touchable part in turn (the supply
cord is not part of the test, as in IEC 60335-1 27.5 and IEC 61010-1 6.5.2.4).  Each conductor
carries its share, from a DC solve of the protective network at the plan's ambient temperature (the
shares are not solved again as the conductors warm).

A conductor warms monotonically from the ambient towards its steady state in still air, and never
above the temperature it would reach with no cooling at all; so by the end of a test it is at most
the smaller of the **adiabatic** temperature (IEC 60949 eq. 1,
:func:`~.heat.adiabatic_temperature`) and the **steady-state** temperature in free air
(:func:`~.heat.steady_temperature`).  That bound is held against the insulation's short-time limit,
the final temperature θf of IEC 60364-5-54 Tables A.54.2–A.54.5: PVC 160 °C, XLPE 250 °C, bare
copper 200 °C (the "normal conditions" column whose k, 159, :mod:`groundcheck.physics.safety`
uses).  A test of one or two minutes is a short overload, not the insulation's continuous duty: the
continuous limit (PVC 70 °C, XLPE 90 °C; IEC 60364-5-52 Table 52.1, from memory) is reported beside
it, not judged.

Fastenings (bolts, screws) have no cross-section: the power their contact dissipates and the
voltage across it are reported without a temperature verdict (there is no model of a joint's heat
path). The voltage across each part's path at the test current is reported too, and for a
protective device above 16 A held to 2.5 V at the long test's current (IEC 60950-1:2005 2.6.3.4,
which sets that limit instead of 0.1 Ω there). IEC 60065 and IEC 60335-1 limit the test source's
open-circuit voltage to 12 V (from memory), a limit on the test set rather than on the equipment,
which is not checked (the path's resistance is GC206's)."""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..model.kinds import KINDS, cross_section, section_checked
from ..model.records import PE_POINT, Plan
from ..network.earthing import ProtectiveRoute
from .heat import INSULATION_THICKNESS, adiabatic_temperature, steady_temperature
from .impedance import MATERIALS, conductor_resistance
from .safety import protective_circuit

__all__ = [
    "BondTest",
    "ConductorHeat",
    "PartDrop",
    "BondingResult",
    "bonding_tests",
    "bonding_figures",
    "conductor_heat",
    "SHORT_TEST",
    "LONG_TEST",
    "SHORT_LIMIT",
    "CONTINUOUS_LIMIT",
    "SECTIONS",
    "DROP_LIMIT",
]

#: the short test: current (A), duration (s), and the rated-current factor of IEC 60335-1 27.5
#: (IEC 60065 15.2 and IEC 61010-1 6.5.2.4 for 25 A, 1 min; the factor from memory)
SHORT_TEST = (25.0, 60.0, 1.5)
#: the long test: multiple of the protective device's rating and duration, s (IEC 60950-1:2005
#: 2.6.3.4; IEC 62368-1 5.6.6.2 from memory)
LONG_TEST = (2.0, 120.0)

#: above this protective-device rating (A), IEC 60950-1:2005 2.6.3.4 limits the path's voltage
#: (V) at the long test's current instead of its resistance
DROP_LIMIT = (16.0, 2.5)

#: short-time temperature limit θf, °C, by insulation: IEC 60364-5-54 Tables A.54.2–A.54.5 (bare:
#: 200 °C, the "normal conditions" column, from memory, as physics.safety's k of 159)
SHORT_LIMIT = {"pvc": 160.0, "xlpe": 250.0, "bare": 200.0}
#: continuous limit, °C: PVC 70, XLPE 90 (IEC 60364-5-52 Table 52.1, from memory); bare: none
CONTINUOUS_LIMIT = {"pvc": 70.0, "xlpe": 90.0, "bare": None}

#: nominal cross-sections, mm² (IEC 60228), for the smallest size that would pass
SECTIONS = (0.5, 0.75, 1.0, 1.5, 2.5, 4.0, 6.0, 10.0, 16.0, 25.0, 35.0, 50.0)


@dataclass(frozen=True)
class BondTest:
    """One bonding test: its name, current (A), duration (s) and where the figures come from."""

    name: str
    current: float
    duration: float
    basis: str

    def as_dict(self) -> dict:
        return {
            "test": self.name,
            "current_a": round(self.current, 4),
            "duration_s": self.duration,
            "basis": self.basis,
        }


@dataclass(frozen=True)
class ConductorHeat:
    """One conductor in one test: its share of the current and the temperatures it may reach, °C.

    ``reached`` is the bound min(adiabatic, steady state); a temperature is infinite at or above
    copper's melting point; a fastening has no area and no temperatures, only its contact's power
    and voltage."""

    conductor: str
    test: str
    current: float  # A through this conductor
    area: float | None  # m²; None for a fastening
    insulation: str | None
    adiabatic: float | None  # None: a material without IEC 60949 constants, or a fastening
    steady: float | None
    reached: float | None
    limit: float | None
    continuous_limit: float | None
    power: float | None = None  # W, a fastening's contact
    drop: float | None = None  # V across a fastening's contact
    thicker: float | None = None  # m², the smallest nominal round wire that would pass

    @property
    def passes(self) -> bool | None:
        """Whether the bound stays within the short-time limit; None when not judged."""
        if self.reached is None or self.limit is None:
            return None
        return self.reached <= self.limit

    def as_dict(self) -> dict:
        def deg(x):
            return None if x is None or math.isinf(x) else round(x, 1)

        def mm2(x):
            return None if x is None else round(x * 1e6, 4)

        return {
            "conductor": self.conductor,
            "test": self.test,
            "current_a": round(self.current, 4),
            "area_mm2": mm2(self.area),
            "insulation": self.insulation,
            "adiabatic_c": deg(self.adiabatic),
            "steady_state_c": deg(self.steady),
            "reached_c": deg(self.reached),
            "melts": self.reached is not None and math.isinf(self.reached),
            "limit_c": self.limit,
            "continuous_limit_c": self.continuous_limit,
            "passes": self.passes,
            "contact_power_w": None if self.power is None else round(self.power, 4),
            "contact_drop_v": None if self.drop is None else round(self.drop, 5),
            "thicker_mm2": mm2(self.thicker),
        }


@dataclass(frozen=True)
class PartDrop:
    """The voltage across a touchable part's protective path (its worst spot) in a test, with the
    limit IEC 60950-1 sets on it for a protective device above 16 A (None otherwise)."""

    part: str
    test: str
    voltage: float
    limit: float | None = None

    def as_dict(self) -> dict:
        return {
            "part": self.part,
            "test": self.test,
            "path_voltage_v": round(self.voltage, 5),
            "limit_v": self.limit,
        }


@dataclass(frozen=True)
class BondingResult:
    """Every bonding test with its conductors' figures and its parts' path voltages."""

    tests: tuple[BondTest, ...]
    conductors: tuple[ConductorHeat, ...]
    parts: tuple[PartDrop, ...]
    ambient: float

    def failures(self) -> list[ConductorHeat]:
        return [c for c in self.conductors if c.passes is False]

    def drops_over(self) -> list[PartDrop]:
        return [p for p in self.parts if p.limit is not None and p.voltage > p.limit]

    def as_dict(self) -> dict:
        return {
            "ambient_c": self.ambient,
            "tests": [t.as_dict() for t in self.tests],
            "conductors": [c.as_dict() for c in self.conductors],
            "parts": [p.as_dict() for p in self.parts],
        }


def bonding_tests(plan: Plan) -> tuple[BondTest, ...]:
    """The bonding tests for a plan's mains statement (none without one, or for class II).

    Parameters:
        plan: the plan.
    Returns:
        the short test (25 A, or 1.5 × the fuse rating when more, 60 s) and, with a fuse or
        breaker, the long test (2 × its rating, 120 s).
    References:
        IEC 60065 15.2 and IEC 61010-1 6.5.2.4 (25 A, 1 min); IEC 60335-1 27.5 (1.5 × rated
        current, from memory); IEC 60950-1:2005 2.6.3.4 (200 % of the protective rating, 2 min);
        IEC 62368-1 5.6.6.2 (from memory).
    """
    m = plan.mains
    if m is None or m.equipment_class == "II":
        return ()
    amps, secs, factor = SHORT_TEST
    basis = "IEC 60065 15.2, IEC 61010-1 6.5.2.4: 25 A for 1 min"
    if m.fuse is not None and factor * m.fuse > amps:
        amps = factor * m.fuse
        basis = (
            f"IEC 60335-1 27.5 (from memory): 1.5 × the rated current, taken as the {m.fuse:g} A "
            "protective device's rating, for 1 min"
        )
    tests = [BondTest("short", amps, secs, basis)]
    if m.fuse is not None:
        mult, dur = LONG_TEST
        tests.append(
            BondTest(
                "long",
                mult * m.fuse,
                dur,
                "IEC 60950-1:2005 2.6.3.4, IEC 62368-1 5.6.6.2 (from memory): 200 % of the "
                f"{m.fuse:g} A rating for 2 min",
            )
        )
    return tuple(tests)


def _shares(plan: Plan, circ) -> tuple[dict[str, float], dict[str, float]]:
    """Per unit of test current: each conductor's largest current over the touchable parts (each
    spot of a part in turn), and each part's path resistance (its worst spot)."""
    _, labels = circ.components
    pe = circ.point_node.get(PE_POINT)
    if pe is None:
        return {}, {}
    cols = [
        (p.name, s)
        for p in plan.metals
        if p.touchable
        for s in circ.nodes_of_metal(p.name)
        if labels[s] == labels[pe]
    ]
    if not cols:
        return {}, {}
    J = np.zeros((len(circ.nodes), len(cols)))
    for k, (_, s) in enumerate(cols):
        J[s, k] += 1.0
        J[pe, k] -= 1.0
    V = np.real(circ.at(0.0).solve(J).V)
    rpart: dict[str, float] = {}
    for k, (name, s) in enumerate(cols):
        rpart[name] = max(rpart.get(name, 0.0), float(abs(V[s, k] - V[pe, k])))
    n1 = np.array([b.n1 for b in circ.branches], dtype=np.int64)
    n2 = np.array([b.n2 for b in circ.branches], dtype=np.int64)
    r = np.maximum(np.array([b.r for b in circ.branches]), 1e-9)
    amps = np.max(np.abs(V[n1] - V[n2]), axis=1) / r if len(n1) else np.zeros(0)
    share: dict[str, float] = {}
    for b, a in zip(circ.branches, amps):
        if b.conductor is not None and a > 1e-9:
            share[b.conductor] = max(share.get(b.conductor, 0.0), float(a))
    return share, rpart


def _geometry(c, area: float) -> tuple[float, float]:
    """(diameter, insulation wall), m: a round conductor's own diameter with hook-up wire's wall
    when insulated; a flat strip's perimeter-equivalent diameter 2(w + t)/π, with no wall (a
    trace's solder mask or a strap's sleeve is thin)."""
    if KINDS[c.kind].impedance == "strip" and c.width is not None:
        return 2.0 * (c.width + area / c.width) / math.pi, 0.0
    wall = INSULATION_THICKNESS if c.insulation != "bare" else 0.0
    return c.diameter or math.sqrt(4.0 * area / math.pi), wall


def conductor_heat(c, test: BondTest, current: float, ambient: float) -> ConductorHeat:
    """The temperatures a conductor of the protective path may reach in a test, with the smallest
    nominal round wire that would pass when it does not.

    Parameters:
        c: the conductor record (of a kind whose cross-section is checked).
        test: the test.
        current: the conductor's share of the test current, A.
        ambient: the starting and the air's temperature, °C (the plan's ambient).
    Returns:
        the ConductorHeat (°C; infinite at or above copper's melting point).
    References:
        IEC 60949 eq. 1 (adiabatic); physics.heat (steady state in free air); IEC 60364-5-54
        Annex A (final temperatures).
    """
    area = cross_section(c)
    ins = c.insulation if c.insulation in SHORT_LIMIT else "pvc"
    limit = SHORT_LIMIT[ins]
    ad, ss, reached = _bound(c, area, *_geometry(c, area), current, test.duration, ambient)
    thicker = None
    if reached > limit:
        wall = 0.0 if ins == "bare" else INSULATION_THICKNESS
        thicker = next(
            (
                a * 1e-6
                for a in SECTIONS
                if a * 1e-6 > area * (1 + 1e-9)
                and _bound(
                    c,
                    a * 1e-6,
                    math.sqrt(4e-6 * a / math.pi),
                    wall,
                    current,
                    test.duration,
                    ambient,
                )[2]
                <= limit
            ),
            None,
        )
    return ConductorHeat(
        c.name,
        test.name,
        current,
        area,
        ins,
        ad,
        ss,
        reached,
        limit,
        CONTINUOUS_LIMIT[ins],
        thicker=thicker,
    )


def _bound(
    c, area: float, diameter: float, wall: float, current: float, duration: float, ambient: float
) -> tuple[float | None, float, float]:
    """(adiabatic, steady state, the smaller), °C, for ``c`` at ``area``: the adiabatic figure is
    None for a material without IEC 60949 constants; infinite means at or above melting."""
    material = c.material if c.material in MATERIALS else "copper"
    rho20, alpha, _ = MATERIALS[material]
    ad = adiabatic_temperature(material, current, duration, area, ambient)
    ss = steady_temperature(current, area, diameter, wall, c.insulation, rho20, alpha, ambient)
    return ad, ss, min(ss, math.inf if ad is None else ad)


def bonding_figures(plan: Plan, route: ProtectiveRoute, circuit=None) -> BondingResult | None:
    """Each protective conductor's temperature and each fastening's contact power in every bonding
    test, and each touchable part's path voltage; None without a mains statement or for class II.

    Parameters:
        plan: the plan.
        route: the protective route.
        circuit: the plan's full circuit (built when not given).
    Returns:
        the BondingResult, or None.
    References:
        IEC 60065 15.2; IEC 61010-1 6.5.2.4; IEC 60335-1 27.5; IEC 60950-1:2005 2.6.3.4;
        IEC 62368-1 5.6.6.2 (see bonding_tests); IEC 60949 (adiabatic); physics.heat.
    """
    tests = bonding_tests(plan)
    if not tests:
        return None
    share, rpart = _shares(plan, protective_circuit(plan, route, circuit))
    by_name = {c.name: c for c in plan.conductors}
    rows: list[ConductorHeat] = []
    for test in tests:
        for name in sorted(share):
            c, amps = by_name[name], share[name] * test.current
            if section_checked(c) and cross_section(c) is not None:
                rows.append(conductor_heat(c, test, amps, plan.ambient))
            elif KINDS[c.kind].fastening:
                r = conductor_resistance(c, plan.ambient)[0]
                rows.append(
                    ConductorHeat(
                        name,
                        test.name,
                        amps,
                        None,
                        None,
                        None,
                        None,
                        None,
                        None,
                        None,
                        power=amps * amps * r,
                        drop=amps * r,
                    )
                )
    rating, volts = DROP_LIMIT
    big = plan.mains.fuse is not None and plan.mains.fuse > rating
    parts = tuple(
        PartDrop(p, t.name, t.current * r, volts if big and t.name == "long" else None)
        for t in tests
        for p, r in sorted(rpart.items())
    )
    return BondingResult(tests, tuple(rows), parts, plan.ambient)
