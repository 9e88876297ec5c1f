"""Common-impedance coupling: how a current in the ground system reaches a sensitive pair.

By reciprocity (Tellegen's theorem), the voltage a source current I_s puts
across a pair (P, Q) is the sum over branches of Z_b · I_b(s) · I_b(test),
where I_b(test) is the branch current when 1 A is injected at P and taken out
at Q.  Each term is that branch's share, so the conductors that couple a
supply return into a stage are named with their exact contribution.

References: P. Penfield, R. Spence and S. Duinker, *Tellegen's Theorem and Electrical Networks*,
MIT Press, 1970 (reciprocity and the sensitivity of a network to each branch).
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import partial

import numpy as np

from ..model.kinds import SIGNAL
from ..core.errors import Location
from .circuit import Circuit, Factored, Solution
from .ranking import largest
from ..network.graph import plan_ranks

# the sources and their injections live in .sources; named here too, where the analyses import them
from .sources import Source, channel_tests, pair_tests, plan_sources, source_injections

__all__ = [
    "SharedReturn",
    "shared_returns",
    "transfer_tasks",
    "rows_cost",
    "MAX_SHARED_ROWS",
    "Source",
    "plan_sources",
    "pair_tests",
    "channel_tests",
    "source_injections",
    "branch_owner",
    "owner_ranks",
    "pair_path",
    "path_drop",
    "SHARE_THRESHOLD",
    "LISTED_TRANSFER",
]

#: a branch counts as carrying a current when it carries at least this fraction of it
SHARE_THRESHOLD = 0.01


def branch_owner(circuit: Circuit) -> list[str]:
    """The plan element each branch belongs to: its conductor, or the metal part of a plate branch.

    Parameters:
        circuit: the circuit.
    Returns:
        the plan element (conductor or metal part) of each branch, by branch index.
    References:
        none (bookkeeping).
    """
    return [b.owner for b in circuit.branches]


def pair_path(circuit: Circuit, a: str, b: str) -> list[tuple[int, float]]:
    """Branches (index, ±1 orientation from a to b) of the least-resistance path between two
    points.

    Parameters:
        circuit: the circuit.
        a, b: the two points.
    Returns:
        the branches of the least-resistance path with their orientation from a to b.
    References:
        Dijkstra's shortest path on resistances (scipy.sparse.csgraph).
    """
    import scipy.sparse.csgraph as csgraph  # brings scipy's sparse solvers: only when needed

    n1, n2, *_ = circuit._arrays
    best, A = circuit.least_resistance_graph
    ia, ib = circuit.point_node[a], circuit.point_node[b]
    _, pred = csgraph.dijkstra(A, directed=False, indices=ia, return_predecessors=True)
    if ib != ia and pred[ib] < 0:
        return []
    path = []
    v = ib
    while v != ia:
        u = pred[v]
        idx = best[(min(u, v), max(u, v))]
        # orientation: +1 when the branch runs n1 -> n2 in the direction a -> b
        path.append((idx, 1.0 if (n1[idx] == u and n2[idx] == v) else -1.0))
        v = u
    path.reverse()
    return path


def path_drop(fac: Factored, sol: Solution, path) -> np.ndarray:
    """Drop Z·I along a path from its first point to its last, for every source column (V).

    Parameters:
        fac: the factorised circuit.
        sol: a solution at the same frequency.
        path: branches with orientation.
    Returns:
        the drop Z·I along the path for every source column, V.
    References:
        Ohm's law.
    """
    total = np.zeros(sol.I.shape[1], dtype=complex)
    for idx, sgn in path:
        total += sgn * fac.z[idx] * sol.I[idx]
    return total


#: a shared return is listed when its transfer resistance is above this, Ω (1 µΩ: 1 A of supply
#: current leaves 1 µV on the stage's pair)
LISTED_TRANSFER = 1e-6
#: shared-return rows kept at the most (the strongest couplings first)
MAX_SHARED_ROWS = 200


@dataclass(frozen=True)
class SharedReturn:
    """A supply-return current whose path shares conductors with a stage's sensitive pair."""

    source: str
    kind: str  # rectifier | current | heater
    a: str
    b: str
    location: Location
    stage: str
    stage_a: str
    stage_b: str
    stage_gain: float  # dB
    stage_location: Location
    transfer: float  # Ω: the stage's pair voltage per ampere of the source
    shared: tuple[str, ...]  # the conductors (or metal parts) that make up most of it


def shared_returns(plan, circuit: Circuit, listed: list | None = None) -> list[SharedReturn]:
    """Supply-return currents whose path shares conductors with a sensitive pair (resistive, DC):
    one row per (source, stage) pair that shares, naming the conductors that make up most of the
    coupling.

    Parameters:
        plan: the plan.
        circuit: the circuit.
        listed: what :func:`transfer_tasks`' tasks returned, when the processes worked out the
            transfers (None: worked out here).
    Returns:
        every supply-return current whose path shares conductors with a sensitive pair, with the
        shared conductors.
    References:
        superposition in a linear resistive network (common practice).
    """
    sources = _unit_sources(plan)
    stages = list(plan.stages)
    if not sources or not stages:
        return []
    if listed is None:
        listed = [task() for task in transfer_tasks(plan, circuit, 1)]
    pairs = np.concatenate([p for p, _ in listed]) if listed else np.zeros((0, 2), dtype=int)
    values = np.concatenate([v for _, v in listed]) if listed else np.zeros(0)
    # the strongest rows (equal ones stage by stage, each stage's sources in order), listed in
    # that order: each slice's strongest hold them all
    key = pairs[:, 0] * len(sources) + pairs[:, 1]
    keep = np.lexsort((key, -values))[:MAX_SHARED_ROWS]
    keep = keep[np.argsort(key[keep])]
    pairs, values = pairs[keep], values[keep]
    return _rows(plan, circuit, circuit.dc(), (sources, stages), values, pairs)


#: unit sources whose transfers one task works out (each process takes slices of the test)
TRANSFER_SLICE = 256


def transfer_tasks(plan, circuit: Circuit, jobs: int) -> list:
    """The shared-return test's transfers as independent tasks: with ``jobs`` > 1, slices of
    TRANSFER_SLICE sources, so that the processes share them; each returns the (stage, source)
    pairs above LISTED_TRANSFER with their transfers.

    Parameters:
        plan: the plan.
        circuit: the circuit.
        jobs: processes.
    Returns:
        functions of no arguments (:func:`groundcheck.physics.sweep.run_tasks`).
    References:
        none (bookkeeping).
    """
    n = len(_unit_sources(plan)) if plan.stages else 0
    step = TRANSFER_SLICE if jobs > 1 else max(n, 1)
    return [partial(_listed, plan, circuit, lo, lo + step) for lo in range(0, n, step)]


def rows_cost(plan, circuit: Circuit) -> float:
    """The cost of the shared-return rows after their transfers (:func:`shared_returns`), in the
    hum budget's unit (sources × nodes): a real solve for each source and each stage of a listed
    row, at most MAX_SHARED_ROWS of each.

    Parameters:
        plan: the plan.
        circuit: the circuit.
    Returns:
        the estimate (for the processes' order of work).
    References:
        none (bookkeeping).
    """
    sources = len(plan.rectifiers) + len(plan.currents) + len(plan.heaters)
    return (min(sources, MAX_SHARED_ROWS) + min(len(plan.stages), MAX_SHARED_ROWS)) * len(
        circuit.nodes
    )


def _listed(plan, circuit: Circuit, lo: int, hi: int) -> tuple[np.ndarray, np.ndarray]:
    """The (stage, source) pairs of sources lo:hi whose transfer is above LISTED_TRANSFER, the
    MAX_SHARED_ROWS strongest (equal ones stage by stage, each stage's sources in order), and
    their transfers (V per A)."""
    transfer = _transfers(circuit, circuit.dc(), _unit_sources(plan)[lo:hi], list(plan.stages))
    pairs = np.argwhere(transfer > LISTED_TRANSFER)  # stage by stage, its sources in order
    values = transfer[pairs[:, 0], pairs[:, 1]]
    keep = largest(values, MAX_SHARED_ROWS)  # equal ones in that order
    pairs, values = pairs[keep], values[keep]
    pairs[:, 1] += lo
    return pairs, values


def owner_ranks(plan, owners: list[str]) -> np.ndarray:
    """Each branch's owner's place in the network's name- and order-free order
    (:func:`groundcheck.network.canonical.canonical_ranks`; an owner outside the network after
    every one in it, by name): equal shares are named in that order, so that neither renaming the
    elements nor writing them in another order changes which are named.

    Parameters:
        plan: the plan.
        owners: each branch's owner (:func:`branch_owner`).
    Returns:
        each branch's place, 0 first (the branches of one owner in branch order).
    References:
        see :mod:`groundcheck.network.canonical`.
    """
    rank = plan_ranks(plan)
    keys = [(rank.get(o, len(rank)), o) for o in owners]
    order = sorted(range(len(owners)), key=keys.__getitem__)
    out = np.empty(len(owners), dtype=int)
    out[order] = np.arange(len(owners))
    return out


def _rows(plan, circuit, fac, ends, values, pairs) -> list[SharedReturn]:
    """One row per (stage, source) pair of ``pairs`` that shares a conductor, with the
    conductors that make up most of the coupling (``ends``: the sources and the stages;
    ``values``: each pair's transfer)."""
    sources, stages = ends
    # test currents only for the stages that share (not one column for every stage of a large
    # installation)
    need = sorted({int(k) for k, _ in pairs})
    column = {k: i for i, k in enumerate(need)}
    test = fac.solve(pair_tests(circuit, [(stages[k].a, stages[k].b) for k in need]))
    # branch currents only for the sources that share (not one column for every source of a large
    # installation)
    used = sorted({int(si) for _, si in pairs})
    scol = {si: i for i, si in enumerate(used)}
    W = fac.solve(source_injections(circuit, [sources[i] for i in used], 0.0)).dv  # Z·I
    owners = branch_owner(circuit)
    rank = owner_ranks(plan, owners)
    admittance = np.abs(fac.y)
    rows = []
    for (k, si), value in zip(pairs, values):
        drops, t_k = W[:, scol[int(si)]], test.I[:, column[int(k)]]
        carrying = (np.abs(drops) * admittance >= SHARE_THRESHOLD) & (
            np.abs(t_k) >= SHARE_THRESHOLD
        )
        shared = _main_sharers(drops * t_k, carrying, owners, rank) if carrying.any() else ()
        s, st = sources[si], stages[k]
        if shared and _joined(circuit, s.a, st.a):
            rows.append(
                SharedReturn(
                    s.name,
                    s.kind,
                    s.a,
                    s.b,
                    s.location,
                    st.name,
                    st.a,
                    st.b,
                    st.gain,
                    st.location,
                    float(value),
                    shared,
                )
            )
    return rows


def _unit_sources(plan) -> list[Source]:
    """A unit current between each supply return's ends (rectifiers, their filters, stated
    currents but a signal's, heaters): what shows the sharing, with no simulation."""
    unit = {0.0: 1.0}
    sources = [
        Source(r.name, "rectifier", r.a, r.b, unit, r.channel, r.location) for r in plan.rectifiers
    ]
    sources += [
        Source(f"{r.name}.filter", "rectifier", r.filter_point, r.a, unit, r.channel, r.location)
        for r in plan.rectifiers
        if r.filter_point is not None
    ]
    sources += [
        Source(
            f"{r.name}.regulator", "rectifier", r.regulator_point, r.a, unit, r.channel, r.location
        )
        for r in plan.rectifiers
        if r.regulator_point is not None
    ]
    sources += [
        Source(c.name, "current", c.a, c.b, unit, c.channel, c.location)
        for c in plan.currents
        if c.role != SIGNAL
    ]
    sources += [
        Source(h.name, "heater", h.a, h.b, unit, None, h.location)
        for h in plan.heaters
        if h.a and h.b
    ]
    return sources


def _joined(circuit: Circuit, a: str, b: str) -> bool:
    """Whether two points are in one connected part of the circuit."""
    _, labels = circuit.components
    return labels[circuit.point_node[a]] == labels[circuit.point_node[b]]


def _transfers(circuit: Circuit, fac: Factored, sources: list, stages: list) -> np.ndarray:
    """Stages × sources, V per A: each stage's pair voltage from each source's unit current (only
    the stages' node voltages are kept: the voltages tell who shares), which by reciprocity equals
    Σ Z·I_source·I_test over the branches (the shares of :func:`shared_returns`); 0 for a stage
    across two islands (no defined voltage)."""
    _, labels = circuit.components
    split = np.array(
        [labels[circuit.point_node[st.a]] != labels[circuit.point_node[st.b]] for st in stages]
    )
    ia = np.array([circuit.point_node[st.a] for st in stages])
    ib = np.array([circuit.point_node[st.b] for st in stages])
    rows, where = np.unique(np.concatenate([ia, ib]), return_inverse=True)
    V = np.concatenate(
        [
            fac.voltages(source_injections(circuit, sources[lo : lo + 128], 0.0), rows)
            for lo in range(0, len(sources), 128)
        ],
        axis=1,
    )
    transfer = np.abs(V[where[: len(ia)]] - V[where[len(ia) :]])
    transfer[split] = 0.0
    return transfer


def _main_sharers(
    shares: np.ndarray, carrying: np.ndarray, owners: list[str], rank: np.ndarray
) -> tuple[str, ...]:
    """The conductors that make up most of the coupling (largest shares first, 90 % of it, at most
    five); equal shares (to 1e-9 of the largest) in the order of ``rank``. 90 % is reached to 1e-9
    of the total: shares of equal resistances often make exactly 90 % (0.4² + 0.4² + 0.2² of 0.4²
    + 0.4² + 0.2² + 0.2²), which the last bit of a sum would otherwise decide."""
    mags = np.abs(shares)
    cand = np.flatnonzero(carrying)
    total = mags[cand].sum()
    q = np.round(mags / max(mags[cand].max(initial=0.0), 1e-300), 9)
    # the largest 64 nearly always decide (five owners, or 90 %): the full sort only when they do
    # not
    for k in (64, len(cand)):
        near = cand[largest(mags[cand], k)]
        if k < len(cand):  # and every share equal to the smallest of them, wherever it stands
            near = np.union1d(near, cand[q[cand] >= q[near].min()])
        shared, acc = [], 0.0
        for b in near[np.lexsort((rank[near], -q[near]))]:
            if owners[b] not in shared:
                shared.append(owners[b])
            acc += mags[b]
            if acc >= (0.9 - 1e-9) * total or len(shared) >= 5:
                return tuple(shared)
        if k >= len(cand):
            break
    return tuple(shared)
