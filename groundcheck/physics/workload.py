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

import numpy as np

from ..core.errors import LimitError, PlanErrors
from ..language.limits import LIMITS
from ..model.records import Plan, Rectifier
from .orient import COARSE_POINTS
from .heater_field import pair_sources
from .rectifier import STEPS_PER_PERIOD

__all__ = [
    "check_devices",
    "check_search",
    "check_work",
    "rectifier_steps",
    "same_figures",
    "solve_limit",
]

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
    "field_search": "quadrature points searched (a sized source's points, once for the loops' "
    "own directions and, merged, once for each channel's)",
    "solve_work": "node-solves",
    "device_work": "node-solves",
}


def _refuse(what: str, total: int, limit: str, loc, hint: str, nodes: int = 0) -> None:
    bound, per_node = LIMITS[limit], ""
    if limit == "solve_work" and solve_limit(nodes) > bound:
        bound = solve_limit(nodes)
        per_node = f", {LIMITS['solve_columns']:,} columns of {nodes:,} nodes"
    raise PlanErrors(
        [
            LimitError(
                f"{what}: about {total:,} {UNITS[limit]}, over the work limit of "
                f"{bound:,}{per_node} (estimated before the work starts)",
                loc,
                hint,
            )
        ]
    )


def solve_limit(nodes: int) -> int:
    """The hum budget's node-solves allowed on a network of ``nodes`` nodes: :data:`LIMITS`
    ``solve_work``, or ``solve_columns`` solves of the whole network when that is more (a large
    plan's work in proportion to its size: its harmonics, channels and listed loops' EMF columns).

    Parameters:
        nodes: the network's nodes.
    Returns:
        node-solves.
    References:
        none (a limit, calibrated by measurement: benchmarks/README.md).
    """
    return max(LIMITS["solve_work"], LIMITS["solve_columns"] * nodes)


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
    """The rectifiers' time steps and the hum budget's solves (frequencies × nodes × columns, the
    loops' EMF columns at each field line among them), each against its limit, at the statement
    that passes it.

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
    nodes = len(circuit.nodes)
    sources = [*plan.fields, *(src for src, _ in pair_sources(plan.heaters))]
    f0 = plan.frequency
    lines = {}  # the loops' EMF columns: one solve each at each line of any source
    for src in sources if plan.stages and listed else ():
        for n in (1, *(h for h, _ in src.harmonics)):
            if n * f0 <= max_frequency + 1e-9:
                lines[n * f0] = listed
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
            if total > solve_limit(nodes):
                _refuse(
                    f"current {c.name}: {_frequencies(freqs)} solved on {nodes:,} nodes",
                    total,
                    "solve_work",
                    c.location,
                    "state the few frequencies that matter (the hum budget solves each one on its "
                    "own)",
                    nodes,
                )
    total += sum(v * nodes for f, v in lines.items())
    if total > solve_limit(nodes):
        first = next(iter(plan.fields or plan.rectifiers or plan.heaters or plan.currents))
        _refuse(
            f"{_frequencies(freqs)} solved on {nodes:,} nodes",
            total,
            "solve_work",
            first.location,
            "lower --max-frequency, or check the plan in parts",
            nodes,
        )


def _frequencies(freqs) -> str:
    return f"{len(freqs):,} frequenc{'y' if len(freqs) == 1 else 'ies'}"


def check_search(src, model, channels: int, searched: int) -> int:
    """A sized field source's worst directions are searched over its quadrature points: once for
    each loop's own direction (the pickup table; a loop of more than COARSE_POINTS points on its
    merged points) and, on the source's merged points, once for each channel's (the flux of a
    direction read at every point, about 200 directions a search).  Counted as each source's
    points are laid, before any search: the source at which the running total passes
    :data:`LIMITS` ``field_search`` is refused (a point dipole's closed form is not counted).

    Parameters:
        src: the field source.
        model: its :class:`groundcheck.physics.orient.LoopFluxes`, as built.
        channels: the channels whose worst direction is searched.
        searched: the total of the sources before it.
    Returns:
        the running total; raises PlanErrors with one LimitError.
    References:
        none (an estimate, calibrated by measurement: benchmarks/README.md, Resource bombs).
    """
    if model.X is None:
        return searched
    own = np.bincount(model.group, minlength=len(model.loops))
    # a loop's own search reads its points, merged above COARSE_POINTS; a channel's reads the
    # source's merged points (orient.LoopFluxes.coarse, kept for the search itself)
    total = searched + int(np.minimum(own, COARSE_POINTS).sum()) + len(model.coarse().X) * channels
    if total > LIMITS["field_search"]:
        _refuse(
            f"field {src.name}: its quadrature points along {len(model.loops):,} loops, searched "
            f"for each loop's own direction and for {channels:,} "
            f"channel{'' if channels == 1 else 's'} (with the sized sources before it)",
            total,
            "field_search",
            src.location,
            "give the far sources no size (the point dipole), or check the plan in parts",
        )
    return total
