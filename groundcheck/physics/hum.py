"""Hum and buzz budget: what each source puts at each channel's output, and whether it is heard.

Sources: rectifier charging currents (simulated, all harmonics up to the set
limit), stated currents, AC heater returns through the ground system, and the
EMF that each field source induces in each listed loop.  For every frequency
the circuit is factorised once and solved for all sources together.

Combining: rectifiers on the same mains have phases computed from the same
mains reference, so they add as phasors; every other source (each stated
current, each heater, each field source) has a phase unknown relative to the
rest and adds in power.  Within one field source the loops add as phasors: each
frequency is solved once with a unit flux through each loop, and the sources'
fluxes — for each channel its stated direction or the one worst at its output —
are applied when the frequencies are merged (:mod:`groundcheck.physics.fieldhum`).
A stage's output share is its pair voltage times its gain.  Whether a stage
inverts is not in the plan, so a channel's level is the worst case: every
stage's share added in magnitude (in phase).  The network's own signed sum,
every stage taken as non-inverting, is given beside it (``signed_v``); the
contributors' shares are signed projections on the channel's signed total,
so they add up to 100 % and a contribution that cancels others is negative.

References: ISO 226:2003 (threshold of hearing); see :mod:`groundcheck.physics.coupling`
(reciprocity) and :mod:`groundcheck.physics.pickup` (Faraday's law, dipole field).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from functools import partial

import numpy as np

from ..core.units import ratio_of_db
from .feedback import FEEDBACK_AT, feedback_sources, own_feedback
from .coupling import (
    branch_owner,
    channel_tests,
    pair_path,
    path_drop,
    plan_sources,
    source_injections,
)
from .humsettings import HumOptions
from .humtotals import ChannelHum, HumResult, Merged
from .heater_field import pair_closest, pair_geometry, pair_path_flux, pair_sources
from .fieldhum import field_pickup
from .orient import fixed_fluxes, source_fluxes
from .pickup import min_distance
from .plate_paths import loop_passages
from .ranking import largest
from .sweep import run_tasks

__all__ = [
    "HumOptions",
    "HumResult",
    "ChannelHum",
    "HumBudget",
    "hum_budget",
]  # the result types live in humtotals


#: conductors named per source and stage as hum contributors (the rest are summed)
TOP_SHARES = 10

#: conductors listed per source in the JSON ``network`` section (the largest currents)
NETWORK_ROWS = 50

#: sources solved together in the hum budget (their branches × sources arrays bound the memory)
SOURCE_CHUNK = 128

#: sources of one frequency per task when several processes share the budget (see HumBudget.tasks)
TASK_SOURCES = 512


def _largest(mags, rank):
    """The TOP_SHARES largest of each row, equal ones (to 1e-9 of the row's largest) taken by owner
    name rather than by the order the plan writes its conductors in."""
    nb, k = mags.shape[1], min(mags.shape[1], TOP_SHARES + 8)
    near = np.argpartition(mags, nb - k, axis=1)[:, nb - k :]
    rows = np.arange(len(mags))[:, None]
    q = np.round(mags[rows, near] / np.maximum(mags.max(axis=1), 1e-300)[:, None], 9)
    order = np.lexsort((rank[near], -q), axis=1)[:, :TOP_SHARES]
    return near[rows, order]


def _pickup_columns(circuit, loops, names) -> tuple[list, np.ndarray, np.ndarray]:
    """The loops that take a series EMF (an outline, and a chord that is a branch): their indices,
    each one's chord branch and the EMF's sign along it (+1 when the branch runs the loop's way).

    ``names``: conductor name -> branch index."""
    cols, branch, sign = [], [], []
    for li, info in enumerate(loops):
        if info.polygon is None:
            continue
        lp = info.loop
        bi = names.get(lp.edges[lp.chord])
        if bi is None:
            continue
        b = circuit.branches[bi]
        start = lp.nodes[lp.chord]
        forward = b.n1 == circuit.point_node.get(start) or b.n1 in circuit.nodes_of_metal(start)
        cols.append(li)
        branch.append(bi)
        sign.append(1.0 if forward else -1.0)
    return cols, np.array(branch, dtype=int), np.array(sign)


@dataclass
class _FrequencyPart:
    """What one frequency adds to the budget (merged in frequency order by :func:`hum_budget`)."""

    out: list = field(default_factory=list)  # (channel, source group, phasor at the output)
    contrib: list = field(default_factory=list)  # (channel, contributor label, phasor)
    # the loops' pickup per unit flux: (each stage's drop at the output, stages × loops; each
    # loop's current)
    pickup: tuple | None = None
    network: list = field(default_factory=list)  # rows of the JSON ``network`` section
    in_phase: list = field(
        default_factory=list
    )  # (channel, source group, Σ|stage drop·gain|): the worst case
    crosstalk: list = field(default_factory=list)  # (from channel, to channel, phasor)
    feedback: list = field(default_factory=list)  # (source, channel, phasor, input part)
    probes: object = None  # per probe pair: Σ over sources of |V_a − V_b|², V²


def hum_budget(
    plan,
    circuit,
    loops,
    rectifier_results: dict,
    options: HumOptions = HumOptions(),
    jobs: int = 1,
    probes=(),
) -> HumResult:
    """Per-channel hum and buzz at the output, contributors, loop pickup and crosstalk.

    Every frequency is solved on its own (one factorisation each); with ``jobs`` > 1 the
    frequencies, a large one cut into slices of its sources, are shared among that many processes
    (:func:`groundcheck.physics.sweep.run_tasks`), with the same result to rounding.

    Parameters:
        plan: the plan.
        circuit: the circuit.
        loops: the independent loops.
        rectifier_results: each rectifier's simulation.
        options: the budget's settings.
        jobs: processes for the frequencies.
        probes: (point, point) pairs whose voltage from the sources is wanted too (an
        installation's outlet
            pairs): read from the same solves, as the power sum over the sources per frequency.
    Returns:
        the HumResult: per channel the spectrum, total, contributors and audibility; loop pickup;
        crosstalk; the probes' power sums.
    References:
        ISO 226:2003 (threshold); reciprocity (Penfield, Spence, Duinker, 1970); Faraday's law.
    """
    b = HumBudget(plan, circuit, loops, rectifier_results, options, probes)
    tasks, costs = b.tasks(jobs)
    return b.result(run_tasks(tasks, jobs, costs))


class HumBudget:
    """What every frequency's solve needs, set up once: sources, stages, tests, loop fluxes,
    frequencies.

    :meth:`tasks` gives the independent pieces of work (a frequency, or part of its sources),
    :meth:`result` merges what they return; :func:`hum_budget` runs them, and the analysis runs
    them among its other solves."""

    def __init__(
        self, plan, circuit, loops, rectifier_results: dict, options: HumOptions, probes=()
    ):
        self.plan, self.circuit, self.loops = plan, circuit, loops
        self.rectifier_results = rectifier_results
        self.probe_a = np.array([circuit.point_node[x] for x, _ in probes], dtype=int)
        self.probe_b = np.array([circuit.point_node[y] for _, y in probes], dtype=int)
        f0 = self.f0 = plan.frequency
        sources = plan_sources(plan, rectifier_results, options.max_frequency, circuit)
        self.hum_sources = [s for s in sources if s.kind != "signal"]
        self.signal_sources = [s for s in sources if s.kind == "signal"]
        stages = self.stages = list(plan.stages)
        channels = self.channels = sorted({s.channel for s in stages})
        self.listening = listening = plan.listening
        self.rated = listening.rated_output if listening else 1.0
        self.owners = branch_owner(circuit)
        self.owner_rank = np.argsort(np.argsort(np.array(self.owners, dtype=object)))
        self.branch_index = {b.conductor: i for i, b in enumerate(circuit.branches) if b.conductor}
        self.pairs = {
            src.name: (src, h) for src, h in pair_sources(plan.heaters)
        }  # AC heater pairs
        self.sources = [*plan.fields, *(src for src, _ in self.pairs.values())]
        self.fields = {x.name: x for x in self.sources}
        self.notes = []
        if listening is None:
            self.notes.append(
                "no listening context: levels are against a rated output of 1 V and no audibility "
                "verdict is given"
            )
        elif not listening.verdict:
            self.notes.append(
                "listening context has no speaker sensitivity: no audibility verdict is given"
            )
        _, labels = circuit.components
        self.valid_stage = [
            labels[circuit.point_node[s.a]] == labels[circuit.point_node[s.b]] for s in stages
        ]
        # least-resistance paths of the stages: only loop pickup reads them (one shortest-path
        # search each)
        self.paths = [
            pair_path(circuit, s.a, s.b) if ok and loops and self.sources else []
            for s, ok in zip(stages, self.valid_stage)
        ]
        freqs = sorted(
            {f for s in self.hum_sources for f in s.parts if f > 0}
            | (
                {n * f0 for src in self.sources for n in [1] + [h for h, _ in src.harmonics]}
                if loops
                else set()
            )
        )
        self.freqs = freqs = [f for f in freqs if f <= options.max_frequency + 1e-9]
        self.xt_freqs = sorted(
            {
                1000.0,
                min(freqs) if freqs else 2 * f0,
                max(freqs) if freqs else options.max_frequency,
            }
        )
        self.crosstalk_wanted = bool(self.signal_sources) and len(channels) > 1 and bool(stages)
        self.gains = np.array([ratio_of_db(s.gain) for s in stages])
        self.valid_idx = np.flatnonzero(self.valid_stage) if stages else np.zeros(0, dtype=int)
        # per channel, one test injection: every stage's 1 A test, weighted by its gain (stages in
        # phase, see the module doc)
        self.tests = channel_tests(circuit, [stages[k] for k in self.valid_idx], channels)
        self.stage_a = np.array(
            [circuit.point_node[stages[k].a] for k in self.valid_idx], dtype=int
        )
        self.stage_b = np.array(
            [circuit.point_node[stages[k].b] for k in self.valid_idx], dtype=int
        )
        self.stage_channel = np.array(
            [channels.index(stages[k].channel) for k in self.valid_idx], dtype=int
        )
        self.across = [self.branch_index.get(s.across) if s.across else None for s in stages]
        self.pick_loops, self.pick_branch, self.pick_sign = _pickup_columns(
            circuit, loops, self.branch_index
        )
        self.models = (
            self._flux_models(plan, circuit, loops) if self.pick_loops and self.sources else {}
        )
        # a channel's own signal currents read by its own stages: at 1 kHz and the hum harmonics
        self.fb_sources = feedback_sources(self.signal_sources, stages)
        self.fb_freqs = set(freqs) | {FEEDBACK_AT} if self.fb_sources else set()
        xt = set(self.xt_freqs) if self.crosstalk_wanted else set()
        self.solve_at = sorted(set(freqs) | xt | self.fb_freqs)
        self.pickup_freqs = {
            n * f0 for src in self.sources for n in [1] + [h for h, _ in src.harmonics]
        }

    def _flux_models(self, plan, circuit, loops) -> dict:
        """Each field source's and AC heater pair's flux through the loops that take an EMF, as a
        function of its direction (:mod:`groundcheck.physics.orient`)."""
        closed = {li: [*loops[li].polygon, loops[li].polygon[0]] for li in self.pick_loops}
        passages = loop_passages(plan, circuit, loops)
        models = {src.name: source_fluxes(src, closed, passages) for src in plan.fields}
        for name, (_, h) in self.pairs.items():
            spacing, height = pair_geometry(h)
            models[name] = fixed_fluxes(
                self.fields[name],
                self.pick_loops,
                [
                    pair_path_flux(h.route, spacing, height, h.current, closed[li])
                    for li in self.pick_loops
                ],
            )
        return models

    def closest(self, name: str, polygon) -> float:
        """A loop's closest approach to a field source's centre, or to an AC heater pair's wires,
        m."""
        if name in self.pairs:
            return pair_closest(self.pairs[name][1], polygon)
        return min_distance(self.fields[name], polygon)

    def tasks(self, jobs: int = 1) -> tuple[list, list]:
        """The budget's work as independent tasks, with an estimate of each one's cost: one per
        frequency, its sources cut into slices of TASK_SOURCES when several processes share the
        work (each slice factorises the matrix again, which costs far less than its solves).

        Parameters:
            jobs: the processes that will run them.
        Returns:
            (functions of no arguments giving (frequency, part), their estimated costs).
        References:
            none (bookkeeping).
        """
        tasks, costs = [], []
        for f in self.solve_at:
            n = len(self._active(f))
            step = TASK_SOURCES if jobs > 1 else max(n, 1)
            for lo in range(0, max(n, 1), step):
                tasks.append(partial(self.at_frequency, f, lo, lo + step))
                costs.append((1 + min(step, n - lo)) * len(self.circuit.nodes))
        return tasks, costs

    def result(self, parts) -> HumResult:
        """The budget's result from what its tasks returned, merged in frequency order."""
        merged = Merged(self)
        for f, part in sorted(parts, key=lambda fp: fp[0]):
            merged.add(f, part)
        axes = field_pickup(self, merged)
        channels = {ch: merged.channel(ch, axes.get(ch, [])) for ch in self.channels}
        if len(self.channels) > 1 and not self.signal_sources:
            self.notes.append(
                "no signal currents ('current NAME: A to B, 2 mA, signal'): crosstalk not computed"
            )
        return HumResult(
            channels,
            list(self.rectifier_results.values()),
            [merged.loop_rows[k] for k in sorted(merged.loop_rows)],
            merged.crosstalk(),
            self.freqs,
            merged.network_rows,
            self.notes,
            merged.probes,
            merged.levels(),
            merged.feedback(),
        )

    def _active(self, f: float) -> list:
        return [s for s in self.hum_sources if s.parts.get(f, 0) != 0] if f in self.freqs else []

    def at_frequency(
        self, f: float, lo: int = 0, hi: int | None = None
    ) -> tuple[float, _FrequencyPart]:
        """The part of frequency f from its active sources lo:hi (the loops' pickup and the
        crosstalk with the first slice)."""
        part = _FrequencyPart()
        fac = self.circuit.at(f)
        active = self._active(f)[lo:hi]
        if active and self.stages and self.valid_idx.size:
            self._sources(f, fac, active, part)
        if lo == 0 and self.loops and f in self.freqs and f in self.pickup_freqs:
            self._pickup(f, fac, part)
        if lo == 0 and self.crosstalk_wanted and f in self.xt_freqs:
            self._crosstalk(fac, part)
        if lo == 0 and f in self.fb_freqs:
            part.feedback = own_feedback(
                self.circuit,
                fac,
                self.fb_sources,
                self.stages,
                self.valid_stage,
                self.gains_at(fac),
            )
        return f, part

    def gains_at(self, fac) -> np.ndarray:
        """Each stage's gain as a (complex) ratio at the factorisation's frequency: an
        interconnect's input reads its shield's drop through the cable's transfer impedance,
        R_s·I_s, not (R_s + jωL_s)·I_s — the centre conductor's mutual inductance with the shield
        equals the shield's own (F. M. Tesche, M. V. Ianoz, T. Karlsson, *EMC Analysis Methods and
        Computational Models*, 1997, §8: a coaxial cable's transfer impedance at low frequency is
        its shield's DC resistance)."""
        g = self.gains.astype(complex)
        for k, b in enumerate(self.across):
            if b is not None and fac.z[b] != 0:
                g[k] *= fac.z[b].real / fac.z[b]
        return g

    def _sources(self, f, fac, active, part) -> None:
        """Each stated or simulated current's voltage at each channel's output, with the
        conductors' shares; the sources are solved SOURCE_CHUNK at a time, so a large
        installation's branches × sources arrays stay small (the channels' test currents are solved
        once)."""
        gains = self.gains_at(fac)
        tests = (
            self.tests
            if not any(b is not None for b in self.across)
            else channel_tests(
                self.circuit,
                [self.stages[k] for k in self.valid_idx],
                self.channels,
                gains[self.valid_idx],
            )
        )
        TC = fac.solve(tests).I  # branches × channels
        for lo in range(0, len(active), SOURCE_CHUNK):
            self._source_chunk(f, fac, active[lo : lo + SOURCE_CHUNK], gains, TC, part)

    def _source_chunk(self, f, fac, active, gains, TC, part) -> None:
        circuit = self.circuit
        both = fac.solve(source_injections(circuit, active, f))
        if self.probe_a.size:
            power = (np.abs(both.V[self.probe_a] - both.V[self.probe_b]) ** 2).sum(axis=1)
            part.probes = power if part.probes is None else part.probes + power
        # each stage's own drop (node voltages of the source solves), for the worst case: every
        # stage in phase
        stage_v = (
            np.abs(both.V[self.stage_a] - both.V[self.stage_b])
            * np.abs(gains[self.valid_idx])[:, None]
        )
        groups = [
            "rectifier charging" if s.kind == "rectifier" else f"{s.kind}:{s.name}" for s in active
        ]
        for ci, ch in enumerate(self.channels):
            worst = stage_v[self.stage_channel == ci].sum(axis=0)
            part.in_phase.extend((ch, g, float(w)) for g, w in zip(groups, worst))
        # by reciprocity a branch's share of a channel is its drop Z_b·I_b(s) (both.dv: no EMF
        # here) times the channel's test current in it; each source's output is their sum (one
        # product for every source and channel)
        drops = np.ascontiguousarray(np.abs(both.dv).T)  # |Z_b·I_b|, sources × branches
        self._network_rows(f, fac, active, both, drops, part)
        v_all = both.dv.T @ TC  # sources × channels
        mags = np.empty_like(drops)
        for ci, ch in enumerate(self.channels):
            np.multiply(drops, np.abs(TC[:, ci])[None, :], out=mags)
            self._shares(ch, mags, both.dv, TC[:, ci], v_all[:, ci], groups, part)

    def _shares(self, ch, mags_all, zi, tc, v_all, groups, part) -> None:
        """Each source's output in one channel and its largest conductor shares (``mags_all``:
        sources × branches, each branch's |share|; the share itself is zi·tc, ``zi`` branches ×
        sources); the rest, each below the tenth largest, summed as other."""
        owners = self.owners
        nb = mags_all.shape[1]
        if nb > TOP_SHARES:
            tops = _largest(mags_all, self.owner_rank)
        else:
            tops = np.broadcast_to(np.arange(nb), (len(groups), nb))
        rows = np.arange(len(groups))[:, None]
        top_mags = mags_all[rows, tops]
        peak = (
            top_mags.max(axis=1) if nb else np.zeros(len(groups))
        )  # the largest share is among the tops
        top_shares = zi[tops, rows] * tc[tops]  # sources × TOP_SHARES
        kept = top_mags > 1e-3 * np.maximum(peak, 1e-300)[:, None]
        rests = (v_all - np.where(kept, top_shares, 0).sum(axis=1)).tolist()
        # plain Python numbers from here: the merge adds tens of thousands of them one by one
        v_list, tops_list, shares_list, kept_list = (
            v_all.tolist(),
            tops.tolist(),
            top_shares.tolist(),
            kept.tolist(),
        )
        many = nb > TOP_SHARES
        for si, group in enumerate(groups):
            v_out = v_list[si]
            if v_out == 0:
                continue
            part.out.append((ch, group, v_out))
            for bi, share, keep in zip(tops_list[si], shares_list[si], kept_list[si]):
                if keep:
                    part.contrib.append((ch, ("conductor", owners[bi], group), share))
            rest = rests[si]
            if many and abs(rest) > 1e-3 * abs(v_out):
                part.contrib.append((ch, ("conductor", "other conductors", group), rest))

    def _network_rows(self, f, fac, active, both, drops, part) -> None:
        """The JSON network section's rows: each source's largest branch currents at its first
        frequency (``drops``: sources × branches, |Z·I|)."""
        circuit = self.circuit
        admittance = np.abs(fac.y)
        for si, s in enumerate(active):
            if (
                s.kind == "rectifier"
                and abs(f - 2 * self.f0) < 1e-9
                or (s.kind != "rectifier" and f == min(s.parts))
            ):
                mags = drops[si] * admittance  # |I|
                sig = np.flatnonzero(mags > 1e-3 * abs(s.parts[f]))
                sig = sig[largest(mags[sig], NETWORK_ROWS)]
                I = both.dv[sig, si] * fac.y[sig]
                part.network.append(
                    {
                        "source": s.name,
                        "frequency_hz": f,
                        "source_current_a": abs(s.parts[f]),
                        "conductors": [
                            {
                                "branch": circuit.branches[b].name,
                                "current_a": float(abs(i)),
                                "drop_v": float(abs(i * fac.z[b])),
                            }
                            for b, i in zip(sig, I)
                        ],
                    }
                )

    def _pickup(self, f, fac, part) -> None:
        """The drop a unit flux through each loop leaves across each stage (at the output: times
        its gain), and the loop's current; the sources' fluxes and directions are applied when the
        frequencies are merged (:func:`groundcheck.physics.fieldhum.field_pickup`)."""
        if not self.models or not self.pick_loops:
            return
        circuit, n = self.circuit, len(self.pick_loops)
        E = np.zeros((len(circuit.branches), n), dtype=complex)
        E[self.pick_branch, np.arange(n)] = -1j * 2 * math.pi * f * self.pick_sign
        sol = fac.solve(np.zeros((len(circuit.nodes), n)), emf=E)
        drops = np.zeros((len(self.stages), n), dtype=complex)
        gains = self.gains_at(fac)
        for k in range(len(self.stages)):
            if self.valid_stage[k]:
                drops[k] = path_drop(fac, sol, self.paths[k]) * gains[k]
        part.pickup = (drops, sol.I[self.pick_branch, np.arange(n)])

    def _crosstalk(self, fac, part) -> None:
        circuit, gains = self.circuit, self.gains_at(fac)
        J = np.zeros((len(circuit.nodes), len(self.signal_sources)), dtype=complex)
        for k, s in enumerate(self.signal_sources):
            amp = sum(abs(v) for v in s.parts.values())
            J[circuit.point_node[s.a], k] += amp
            J[circuit.point_node[s.b], k] -= amp
        sol = fac.solve(J)
        for si, s in enumerate(self.signal_sources):
            for k, st in enumerate(self.stages):
                if self.valid_stage[k] and st.channel != (s.channel or ""):
                    part.crosstalk.append(
                        (s.channel, st.channel, sol.between(st.a, st.b)[si] * gains[k])
                    )
