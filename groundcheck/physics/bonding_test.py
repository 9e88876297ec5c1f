"""The product bonding test: beside the 0.1 Ω limit, the protective path must carry the product
standard's test current without any of its conductors overheating.

The tests (figures in :data:`SHORT_TEST`, :data:`LONG_TEST` and :func:`bonding_tests`):

* **short**: 25 A for 60 s — IEC 60065 cl. 15.2 and IEC 61010-1 6.5.2.4 (25 A, 1 min); IEC 60335-1
  cl. 27.5 asks for 1.5 × the rated current when that is more than 25 A (from memory).  A plan
  states no rated current, so the rating of the mains statement's fuse or breaker stands in for it:
  a fuse is rated at or above the current the equipment draws, which keeps the test current
  cautious.
* **long**: 200 % of the protective device's rating for 120 s, longer above 30 A (4 min to 60 A,
  6 to 100 A, 8 to 200 A, else 10) — IEC 60950-1:2005 2.6.3.4 and Table 2E; IEC 62368-1 5.6.6.2
  (from memory) — run when the mains statement names a fuse, breaker or plug fuse.  The rating is
  that of the overcurrent device ahead of the equipment: the plug's fuse when the plan states one
  (``plug-fuse``: IEC 60950-1 2.6.3.3 counts the device in the mains plug, from memory), else the
  supply circuit's breaker, else the equipment's own fuse.

The current flows from the inlet's protective terminal to each touchable part in turn (the supply
cord is not part of the test, as in IEC 60335-1 27.5 and IEC 61010-1 6.5.2.4).  Each conductor
carries its share, from a DC solve of the protective network at the plan's ambient temperature (the
shares are not solved again as the conductors warm).

Each conductor's temperature by the end of a test is bounded as
:mod:`groundcheck.physics.bonding_heat` describes, and held against its insulation's short-time
limit.

Fastenings (bolts, screws) have no cross-section: the power their contact dissipates and the
voltage across it are reported without a temperature verdict (there is no model of a joint's heat
path). The voltage across each part's path at the test current is reported too, and for a part
whose own protective device is above 16 A held to 2.5 V at the long test's current (IEC
60950-1:2005 2.6.3.4, which sets that limit instead of 0.1 Ω there): the breaker at the inlet's
part, the equipment's fuse behind it (a part behind a fuse of 16 A or less keeps the 0.1 Ω). IEC
60065 and IEC 60335-1 limit the test source's open-circuit voltage to 12 V (from memory), a limit
on the test set rather than on the equipment, which is not checked (the path's resistance is
GC206's)."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..model.kinds import KINDS, cross_section, section_checked
from ..model.records import PE_POINT, Plan
from ..network.earthing import ProtectiveRoute
from .bonding_heat import (
    CONTINUOUS_LIMIT,
    SECTIONS,
    SHORT_LIMIT,
    BondTest,
    ConductorHeat,
    conductor_heat,
)
from .bonding_placed import placed_bonding
from .impedance import conductor_resistance
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

#: the long test's duration above 16 A: (rating at most, A; minutes), IEC 60950-1:2005 Table 2E
LONG_DURATIONS = ((30.0, 2.0), (60.0, 4.0), (100.0, 6.0), (200.0, 8.0), (float("inf"), 10.0))

#: above this protective-device rating (A), IEC 60950-1:2005 2.6.3.4 limits the path's voltage
#: (V) at the long test's current instead of its resistance
DROP_LIMIT = (16.0, 2.5)


@dataclass(frozen=True)
class PartDrop:
    """The voltage across a touchable part's protective path (its worst spot) in a test, with the
    limit IEC 60950-1 sets on it for a protective device above 16 A (None otherwise)."""

    part: str
    test: str
    voltage: float
    limit: float | None = None
    #: the test current its path carries, A: the test's own, or in the long test behind the
    #: equipment's fuse 200 % of the fuse's rating
    current: float | None = None


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


def bonding_tests(plan: Plan) -> tuple[BondTest, ...]:
    """The bonding tests for a plan's mains statement (none without one, or for class II).

    Parameters:
        plan: the plan.
    Returns:
        the short test (25 A, or 1.5 × the fuse rating when more, 60 s) and, with a fuse, breaker
        or plug fuse, the long test (2 × the rating ahead of the equipment, 120 s; longer above
        30 A).
    References:
        IEC 60065 15.2 and IEC 61010-1 6.5.2.4 (25 A, 1 min); IEC 60335-1 27.5 (1.5 × rated
        current, from memory); IEC 60950-1:2005 2.6.3.4 and Table 2E (200 % of the protective
        rating, 2 min up to 30 A);
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
    # the long test's rating is the protective device's ahead of the equipment: the plug's fuse
    # when stated and smaller, else the supply circuit's breaker when the plan states it beside
    # the fuse, else the one device stated
    rating = m.protective_rating
    if rating is not None:
        mult, dur = LONG_TEST
        if rating > DROP_LIMIT[0]:
            dur = 60.0 * next(mins for top, mins in LONG_DURATIONS if rating <= top)
        which = "plug fuse's " if rating == m.plug_fuse else ""
        tests.append(
            BondTest(
                "long",
                mult * rating,
                dur,
                "IEC 60950-1:2005 2.6.3.4 and Table 2E, IEC 62368-1 5.6.6.2 (from memory): 200 % "
                f"of the {which}{rating:g} A rating for {dur / 60:g} min",
            )
        )
    return tuple(tests)


def _behind_fuse(plan: Plan) -> float | None:
    """The long test's current behind the equipment's fuse as a share of its current at the inlet
    (the fuse's rating over the rating ahead of it: the breaker's, or a smaller plug fuse's), or
    None when the plan states not both."""
    m = plan.mains
    ahead = m.protective_rating
    if m.fuse is None or m.breaker is None or not ahead:
        return None
    return min(1.0, m.fuse / ahead)


def _inlet_part(plan: Plan, rpart: dict) -> str | None:
    """The touchable part the inlet sits on: the one whose outline holds the mains statement's
    ``inlet at`` position, else the one nearest the inlet's protective terminal (the least path
    resistance): where a fault ahead of the fuse (the inlet's line pin, the fuse holder) lands."""
    at = plan.mains.inlet
    if at is not None:
        for m in plan.metals:
            if m.name in rpart and m.size is not None and m.contains(at):
                return m.name
    return min(rpart, key=lambda p: (rpart[p], p)) if rpart else None


def _part_solve(plan: Plan, circ):
    """Per unit of test current from the inlet's protective terminal to each spot of each
    touchable part in turn: the spots (part, node), the node voltages (one column per spot), and
    each part's path resistance (its worst spot); None when no part is reached."""
    _, labels = circ.components
    pe = circ.point_node.get(PE_POINT)
    if pe is None:
        return None
    cols = [
        (p.name, s)
        for p in plan.metals
        if p.touchable
        for s in circ.nodes_of_metal(p.name)
        if labels[s] == labels[pe]
    ]
    if not cols:
        return None
    J = np.zeros((len(circ.nodes), len(cols)))
    for k, (_, s) in enumerate(cols):
        J[s, k] += 1.0
        J[pe, k] -= 1.0
    V = np.real(circ.dc().solve(J).V)
    rpart: dict[str, float] = {}
    for k, (name, s) in enumerate(cols):
        rpart[name] = max(rpart.get(name, 0.0), float(abs(V[s, k] - V[pe, k])))
    return cols, V, rpart


def _shares(circ, cols, V, weight=None) -> dict[str, float]:
    """Each conductor's largest current over the spots of :func:`_part_solve`, per unit of test
    current (``weight``: part -> a factor on that part's test current)."""
    if not cols:
        return {}
    n1 = np.array([b.n1 for b in circ.branches], dtype=np.int64)
    n2 = np.array([b.n2 for b in circ.branches], dtype=np.int64)
    r = np.maximum(np.array([b.r for b in circ.branches]), 1e-9)
    w = np.array([1.0 if weight is None else weight(name) for name, _ in cols])
    amps = np.max(np.abs(V[n1] - V[n2]) * w, axis=1) / r if len(n1) else np.zeros(0)
    share: dict[str, float] = {}
    for b, a in zip(circ.branches, amps):
        if b.conductor is not None and a > 1e-9:
            share[b.conductor] = max(share.get(b.conductor, 0.0), float(a))
    return share


def bonding_figures(plan: Plan, route: ProtectiveRoute, circuit=None) -> BondingResult | None:
    """Each protective conductor's temperature and each fastening's contact power in every bonding
    test, and each touchable part's path voltage; for an installation, each placed device's
    (:func:`groundcheck.physics.bonding_placed.placed_bonding`); None for class II, or with
    neither.

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
        # an installation: each placed device's own plan, tested with what the building puts
        # ahead of it
        return placed_bonding(plan, bonding_figures) if plan.mains is None else None
    circ = protective_circuit(plan, route, circuit)
    solved = _part_solve(plan, circ)
    cols, V, rpart = solved if solved is not None else ([], None, {})
    inlet, behind = _inlet_part(plan, rpart), _behind_fuse(plan)
    # a fault ahead of the fuse is the breaker's, at the inlet's part alone: in the long test
    # every other part's path carries 200 % of the fuse's rating
    weight = None
    if inlet is not None and behind is not None:
        weight = lambda p: 1.0 if p == inlet else behind  # noqa: E731
    share = _shares(circ, cols, V)
    long_share = _shares(circ, cols, V, weight) if weight else share
    rows = [
        row
        for test in tests
        for name, sh in sorted((long_share if test.name == "long" else share).items())
        if (row := _row(plan, plan.index.conductors[name], test, sh * test.current)) is not None
    ]
    rating, volts = DROP_LIMIT
    ahead = plan.mains.protective_rating

    def protected_by(p) -> float | None:
        # the device that clears a fault at the part: the breaker at the inlet's part, the
        # equipment's fuse behind it (IEC 60950-1 takes the rating of the part's own device)
        return plan.mains.fuse if weight and p != inlet else ahead

    def limit(t, p) -> float | None:
        device = protected_by(p)
        return volts if t.name == "long" and device is not None and device > rating else None

    def amps(t, p) -> float:
        return t.current * (weight(p) if weight and t.name == "long" else 1.0)

    parts = tuple(
        PartDrop(p, t.name, amps(t, p) * r, limit(t, p), amps(t, p))
        for t in tests
        for p, r in sorted(rpart.items())
    )
    return BondingResult(tests, tuple(rows), parts, plan.ambient)


def _row(plan: Plan, c, test: BondTest, amps: float) -> ConductorHeat | None:
    """One conductor's figures in one test: a wire's temperatures, a fastening's contact power and
    voltage (it has no cross-section), None for anything else."""
    if section_checked(c) and cross_section(c) is not None:
        return conductor_heat(c, test, amps, plan.ambient)
    if not KINDS[c.kind].fastening:
        return None
    r = conductor_resistance(c, plan.ambient)[0]
    return ConductorHeat(
        c.name,
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
