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

import numpy as np

from ..model.kinds import SIGNAL
from ..core.errors import Location
from ..core.units import ratio_of_db
from .circuit import Circuit, Factored, Solution
from .induction import induced_currents
from .ranking import largest

__all__ = [
    "SharedReturn",
    "shared_returns",
    "MAX_SHARED_ROWS",
    "Source",
    "plan_sources",
    "pair_tests",
    "branch_owner",
    "pair_path",
    "path_drop",
    "SHARE_THRESHOLD",
    "LISTED_TRANSFER",
]

#: a branch counts as carrying a current when it carries at least this fraction of it
SHARE_THRESHOLD = 0.01


@dataclass(frozen=True)
class Source:
    """A current in the ground system: from ``a`` to ``b``, complex rms phasors per frequency."""

    name: str
    kind: str  # rectifier | current | heater | signal | induced
    a: str
    b: str
    parts: dict  # frequency (Hz) -> complex rms A
    channel: str | None = None
    location: object = None


def plan_sources(
    plan, rectifier_results: dict, max_frequency: float, circuit: Circuit | None = None
) -> list[Source]:
    """Every current source of a plan with its spectrum (rectifiers from their simulation).

    Parameters:
        plan: the plan.
        rectifier_results: each rectifier's simulation.
        max_frequency: highest harmonic kept, Hz.
        circuit: the circuit, for the EMF that loaded cables induce
        (:mod:`groundcheck.physics.induction`,
            as equivalent currents); without it they are left out.
    Returns:
        every current source (rectifier harmonics, stated currents, heaters, induced EMFs) with its
        spectrum of complex rms phasors.
    References:
        Fourier series of a periodic current (common practice).
    """
    from .rectifier import harmonic_phasors

    f0 = plan.frequency
    nmax = int(max_frequency // f0)

    def spectrum(samples, first: int) -> dict:
        ph = harmonic_phasors(samples, nmax)
        return {
            k * f0: ph[k]
            for k in range(first, nmax + 1)
            if abs(ph[k]) > 1e-9 * max(abs(ph).max(), 1e-30)
        }

    out = []
    for r in plan.rectifiers:
        res = rectifier_results[r.name]
        out.append(
            Source(r.name, "rectifier", r.a, r.b, spectrum(res.current, 0), r.channel, r.location)
        )
        if res.filter_current is not None and r.filter_point is not None:
            # the filter capacitor's ripple current (no DC) leaves its negative and returns to the
            # reservoir's
            out.append(
                Source(
                    f"{r.name}.filter",
                    "rectifier",
                    r.filter_point,
                    r.a,
                    spectrum(res.filter_current, 1),
                    r.channel,
                    r.location,
                )
            )
    for c in plan.currents:
        parts: dict = {}
        for amp, f in c.parts:
            parts[f] = parts.get(f, 0) + complex(amp)
        what = "signal" if c.role == SIGNAL else "current"
        out.append(Source(c.name, what, c.a, c.b, parts, c.channel, c.location))
    for h in plan.heaters:
        if h.a is not None and h.b is not None:
            out.append(
                Source(
                    h.name,
                    "heater",
                    h.a,
                    h.b,
                    {f0 if h.ac else 0.0: complex(h.current)},
                    None,
                    h.location,
                )
            )
    if circuit is not None:
        out += [
            Source(name, "induced", a, b, parts, None, loc)
            for name, a, b, parts, loc in induced_currents(plan, circuit, max_frequency)
        ]
    return out


def pair_tests(circuit: Circuit, pairs) -> np.ndarray:
    """Injection columns: 1 A into the first point of each pair, out of the second.

    Parameters:
        circuit: the circuit.
        pairs: (point a, point b) of each sensitive pair.
    Returns:
        a nodes × pairs matrix of 1 A test injections.
    References:
        Tellegen's theorem / reciprocity (Penfield, Spence, Duinker, 1970).
    """
    J = np.zeros((len(circuit.nodes), len(pairs)), dtype=complex)
    for k, (a, b) in enumerate(pairs):
        J[circuit.point_node[a], k] += 1.0
        J[circuit.point_node[b], k] -= 1.0
    return J


def channel_tests(circuit: Circuit, stages, channels: list[str], weights=None) -> np.ndarray:
    """One injection column per channel: each of its stages' 1 A pair test, weighted by the stage's
    gain.

    By linearity, its branch currents are the gain-weighted sum of the stages' own test currents
    (the stages of a channel taken in phase).  Built directly, in time and memory proportional to
    the nodes and stages, not their product.

    Parameters:
        circuit: the circuit.
        stages: the plan's stages.
        channels: channel names in column order.
        weights: each stage's (complex) weight instead of its gain as a ratio.
    Returns:
        a nodes × channels matrix of gain-weighted test injections.
    References:
        reciprocity (Penfield, Spence, Duinker, 1970).
    """
    J = np.zeros((len(circuit.nodes), len(channels)), dtype=complex)
    col = {ch: k for k, ch in enumerate(channels)}
    for i, s in enumerate(stages):
        g = ratio_of_db(s.gain) if weights is None else weights[i]
        k = col[s.channel]
        J[circuit.point_node[s.a], k] += g
        J[circuit.point_node[s.b], k] -= g
    return J


def source_injections(circuit: Circuit, sources, f: float) -> np.ndarray:
    """The injected currents of every source at one frequency.

    Parameters:
        circuit: the circuit.
        sources: current sources with spectra.
        f: frequency, Hz.
    Returns:
        a nodes × sources matrix of injected currents at f, A.
    References:
        nodal analysis (Ho, Ruehli, Brennan, 1975).
    """
    J = np.zeros((len(circuit.nodes), len(sources)), dtype=complex)
    for k, s in enumerate(sources):
        i = s.parts.get(f, 0)
        J[circuit.point_node[s.a], k] += i
        J[circuit.point_node[s.b], k] -= i
    return J


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

    def as_dict(self) -> dict:
        return {
            "source": self.source,
            "stage": self.stage,
            "transfer_ohm": self.transfer,
            "shared": list(self.shared),
        }


def shared_returns(plan, circuit: Circuit) -> list[SharedReturn]:
    """Supply-return currents whose path shares conductors with a sensitive pair (resistive, DC):
    one row per (source, stage) pair that shares, naming the conductors that make up most of the
    coupling.

    Parameters:
        plan: the plan.
        circuit: the circuit.
    Returns:
        every supply-return current whose path shares conductors with a sensitive pair, with the
        shared conductors.
    References:
        superposition in a linear resistive network (common practice).
    """
    # a unit current between each source's ends shows the sharing: rectifiers need no simulation
    # here
    sources = [
        Source(r.name, "rectifier", r.a, r.b, {0.0: 1.0}, r.channel, r.location)
        for r in plan.rectifiers
    ]
    sources += [
        Source(
            f"{r.name}.filter", "rectifier", r.filter_point, r.a, {0.0: 1.0}, r.channel, r.location
        )
        for r in plan.rectifiers
        if r.filter_point is not None
    ]
    sources += [
        Source(c.name, "current", c.a, c.b, {0.0: 1.0}, c.channel, c.location)
        for c in plan.currents
        if c.role != SIGNAL
    ]
    sources += [
        Source(h.name, "heater", h.a, h.b, {0.0: 1.0}, None, h.location)
        for h in plan.heaters
        if h.a and h.b
    ]
    stages = list(plan.stages)
    if not sources or not stages:
        return []
    _, labels = circuit.components
    fac = circuit.at(0.0)
    transfer = _transfers(circuit, fac, sources, stages)
    pairs = np.argwhere(transfer > LISTED_TRANSFER)
    if len(pairs) > MAX_SHARED_ROWS:  # the strongest rows, kept in their order
        pairs = pairs[np.sort(largest(transfer[pairs[:, 0], pairs[:, 1]], MAX_SHARED_ROWS))]
    # test currents only for the stages that share (not one column for every stage of a large
    # installation)
    need = sorted({int(k) for k, _ in pairs})
    column = {k: i for i, k in enumerate(need)}
    test = fac.solve(pair_tests(circuit, [(stages[k].a, stages[k].b) for k in need]))
    owners = branch_owner(circuit)
    rank = np.argsort(np.argsort(np.array(owners, dtype=object), kind="stable"), kind="stable")
    # branch currents only for the sources that share (not one column for every source of a large
    # installation)
    used = sorted({int(si) for _, si in pairs})
    scol = {si: i for i, si in enumerate(used)}
    W = fac.solve(
        source_injections(circuit, [sources[i] for i in used], 0.0)
    ).dv  # Z·I, branches × sources
    admittance = np.abs(fac.y)
    rows = []
    for k, si in pairs:
        s, st = sources[si], stages[k]
        if labels[circuit.point_node[s.a]] != labels[circuit.point_node[st.a]]:
            continue
        t_k = test.I[:, column[int(k)]]
        shares = W[:, scol[int(si)]] * t_k
        carrying = (np.abs(W[:, scol[int(si)]]) * admittance >= SHARE_THRESHOLD) & (
            np.abs(t_k) >= SHARE_THRESHOLD
        )
        if not carrying.any():
            continue
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
                float(transfer[k, si]),
                _main_sharers(shares, carrying, owners, rank),
            )
        )
    return rows


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
    five); equal shares (to 1e-9 of the largest) in the order of their owners' names (``rank``),
    never in the order the plan writes them, as the hum budget's contributors are."""
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
            if acc >= 0.9 * total or len(shared) >= 5:
                return tuple(shared)
        if k >= len(cand):
            break
    return tuple(shared)
