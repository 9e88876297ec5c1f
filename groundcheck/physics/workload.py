"""The work an analysis will do, estimated from the plan before any of it starts.

A small plan can ask for work out of all proportion to its text: thousands of field sources against
hundreds of loops, tens of thousands of stated frequencies (one factorisation each), hundreds of
rectifiers simulated in time, tens of thousands of devices each solved for its earth path.  Each
kind of work has a limit in :data:`groundcheck.language.limits.LIMITS`; the statement at which the
running total first passes its limit is refused with a located error naming the work and the limit,
before any of it is done.

The estimates are upper bounds in the units the limits state (time steps, node-solves, matrix
entries); they were calibrated on the reproducers of tests/hostile/round2/08-resource-bombs so that
a refused plan is refused within a few seconds and an accepted one stays within about 10 s and 500
MB (benchmarks/README.md).
"""

from __future__ import annotations

from dataclasses import replace

from ..core.errors import LimitError, PlanErrors
from ..language.limits import LIMITS
from ..model.records import Plan, Rectifier
from .heater_field import pair_sources
from .rectifier import STEPS_PER_PERIOD

__all__ = ["check_devices", "check_work", "rectifier_steps", "same_figures"]

#: periods integrated in the search for a steady state, an upper bound for the estimate: the
#: constant-drop model converges in a few periods; the exact models (Shockley or valve diodes,
#: leakage, a filter section, a choke input) take about ten times the work (measured: 0.1 s
#: against 1.0 s for one rectifier of the bombs' plan)
PERIODS = {"constant": 4, "exact": 40}

#: a frequency's fixed cost (building and factorising the matrix, merging its part), in
#: node-solves: measured on the 75,000-frequency bomb (13,500 of its frequencies under 5 kHz),
#: about 3 ms a frequency of a 12-node network
FREQUENCY_COST = 30_000


def same_figures(r: Rectifier) -> Rectifier:
    """The rectifier without what does not enter its simulation (its name, its ends, its channel),
    so that identical supplies are simulated once.

    Parameters:
        r: a rectifier record.
    Returns:
        the same figures under neutral names.
    References:
        none (bookkeeping).
    """
    return replace(
        r, name="rectifier", a="", b="", channel=None, filter_point=None, regulator_point=None
    )


def rectifier_steps(r: Rectifier) -> int:
    """Time steps the search for one rectifier's steady state takes at most (the estimate of
    :data:`PERIODS`).

    Parameters:
        r: a rectifier record.
    Returns:
        time steps.
    References:
        none (an estimate, calibrated by measurement).
    """
    exact = (
        r.diode_law != "constant"
        or r.leakage > 0
        or r.filter_capacitance is not None
        or r.choke_inductance > 0
    )
    return STEPS_PER_PERIOD * PERIODS["exact" if exact else "constant"]


#: what each work limit counts
UNITS = {
    "rectifier_steps": "time steps",
    "loop_pickups": "EMF entries (loops × field lines × branches)",
    "solve_work": "node-solves",
    "device_work": "node-solves",
}


def _refuse(what: str, total: int, limit: str, loc, hint: str) -> None:
    raise PlanErrors(
        [
            LimitError(
                f"{what}: about {total:,} {UNITS[limit]}, over the work limit of "
                f"{LIMITS[limit]:,} (estimated before the work starts)",
                loc,
                hint,
            )
        ]
    )


def check_devices(plan: Plan) -> None:
    """Each device's earth path is one solve of the protective network: devices × the network's
    nodes, over :data:`LIMITS` ``device_work`` refused at the device that passes it, before the
    graph is built.

    Parameters:
        plan: the plan.
    Returns:
        None; raises PlanErrors with one LimitError.
    References:
        none (bookkeeping).
    """
    nodes = len(plan.points) + len(plan.metals)
    total = 0
    for k, d in enumerate(plan.devices):
        total = (k + 1) * nodes
        if total > LIMITS["device_work"]:
            _refuse(
                f"device {d.name}: {k + 1:,} devices' earth paths through a network of {nodes:,} "
                "points",
                total,
                "device_work",
                d.location,
                "check the installation in parts (a rack, a room)",
            )


def check_work(plan: Plan, loops, circuit, max_frequency: float, hum: bool) -> None:
    """The rectifiers' time steps, the loop pickups (loops × field lines × branches) and the hum
    budget's solves (frequencies × nodes × columns), each against its limit, at the statement that
    passes it.

    Parameters:
        plan: the plan.
        loops: the listed loops (the audit context's).
        circuit: the circuit (its node and branch counts).
        max_frequency: the highest frequency analysed, Hz.
        hum: whether the hum budget runs (without it, no rectifier is simulated and nothing is
        picked up).
    Returns:
        None; raises PlanErrors with one LimitError.
    References:
        none (bookkeeping).
    """
    if not hum:
        return
    seen, steps = set(), 0
    for r in plan.rectifiers:
        key = same_figures(r)
        if key not in seen:
            seen.add(key)
            steps += rectifier_steps(r)
            if steps > LIMITS["rectifier_steps"]:
                _refuse(
                    f"rectifier {r.name}: {len(seen)} rectifiers of different figures simulated "
                    "in time",
                    steps,
                    "rectifier_steps",
                    r.location,
                    "give a rack's identical supplies the same figures (they are simulated once), "
                    "or check the installation in parts",
                )
    listed = sum(1 for info in loops if info.polygon is not None)
    branches, nodes = len(circuit.branches), len(circuit.nodes)
    sources = [*plan.fields, *(src for src, _ in pair_sources(plan.heaters))]
    f0 = plan.frequency
    lines, pickup = {}, 0
    for src in sources if plan.stages and listed else ():
        for n in (1, *(h for h, _ in src.harmonics)):
            if n * f0 <= max_frequency + 1e-9:
                lines[n * f0] = lines.get(n * f0, 0) + listed
                pickup += listed * branches
        if pickup > LIMITS["loop_pickups"]:
            _refuse(
                f"field {src.name}: {len(sources):,} field sources against {listed:,} loops of "
                f"{branches:,} branches",
                pickup,
                "loop_pickups",
                src.location,
                "describe the strongest field sources only, or check the plan in parts",
            )
    _check_solves(plan, lines, nodes, max_frequency)


def _check_solves(plan: Plan, lines: dict, nodes: int, max_frequency: float) -> None:
    """The hum budget's frequencies, each one factorisation and its columns, accumulated in plan
    order."""
    f0 = plan.frequency
    freqs = dict(lines)
    columns = 2 + len({s.channel for s in plan.stages})
    total = 0

    def add(f: float) -> int:
        if f <= 0 or f > max_frequency + 1e-9:
            return 0
        new = f not in freqs
        freqs[f] = freqs.get(f, 0) + 1
        return (FREQUENCY_COST + nodes * columns if new else 0) + nodes

    if plan.rectifiers or plan.heaters or plan.fields:
        for n in range(1, int(max_frequency // f0) + 1):
            total += add(n * f0)
    for c in plan.currents:
        for _, f in c.parts:
            total += add(f)
            if total > LIMITS["solve_work"]:
                _refuse(
                    f"current {c.name}: {len(freqs):,} frequencies solved on {nodes:,} nodes",
                    total,
                    "solve_work",
                    c.location,
                    "state the few frequencies that matter (the hum budget solves each one on its "
                    "own)",
                )
    total += sum(v * nodes for f, v in lines.items())
    if total > LIMITS["solve_work"]:
        first = next(iter(plan.fields or plan.rectifiers or plan.heaters or plan.currents))
        _refuse(
            f"{len(freqs):,} frequencies solved on {nodes:,} nodes",
            total,
            "solve_work",
            first.location,
            "lower --max-frequency, or check the plan in parts",
        )
