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
so they add up to 100 % and a contribution that cancels others is negative (the currents' shares
are worked out in :mod:`groundcheck.physics.hum_shares`).

References: ISO 226:2003 (threshold of hearing); see :mod:`groundcheck.physics.coupling`
(reciprocity) and :mod:`groundcheck.physics.pickup` (Faraday's law, dipole field).
"""

from __future__ import annotations

from dataclasses import dataclass, field
from functools import partial

import numpy as np

from ..core.units import ratio_of_db
from .feedback import feedback_sources, own_feedback
from .coupling import (
    branch_owner,
    channel_tests,
    owner_ranks,
    pair_path,
    plan_sources,
)
from .humsettings import SIGNAL_FREQUENCY, HumOptions, channel_listenings
from .humtotals import ChannelHum, HumResult, Merged
from .heater_field import pair_closest, pair_sources
from .fieldhum import field_pickup, flux_models, pickup_columns
from .hum_shares import run_columns, source_part
from .loop_columns import loop_pickup
from .pickup import min_distance
from .supplyhum import coverage, supply_shares
from .sweep import run_tasks

__all__ = [
    "HumOptions",
    "HumResult",
    "ChannelHum",
    "HumBudget",
    "hum_budget",
]  # the result types live in humtotals


#: sources of one frequency per task when several processes share the budget (see HumBudget.tasks)
TASK_SOURCES = 512


@dataclass
class _FrequencyPart:
    """What one frequency adds to the budget (merged in frequency order by :func:`hum_budget`)."""

    out: list = field(default_factory=list)  # (channel, source group, phasor at the output)
    contrib: list = field(default_factory=list)  # (channel, contributor label, phasor)
    # the loops' pickup per unit flux: (each stage's drop at the output, stages × loops; each
    # loop's current)
    pickup: tuple | None = None
    network: list = field(default_factory=list)  # rows of the JSON ``network`` section
    in_phase: list = field(default_factory=list)  # (channel, group, Σ|stage drop·gain|)
    #: source group -> each stage's drop from its sources (their phasors added) × |gain|, V:
    #: folded into the worst case once every part of the frequency is in (Merged.fold)
    stage_drops: dict = field(default_factory=dict)
    crosstalk: list = field(default_factory=list)  # (from channel, to channel, phasor)
    feedback: list = field(default_factory=list)  # (source, channel, phasor, input part)
    probes: object = None  # per probe pair: Σ over sources of |V_a − V_b|², V²
    #: per probe pair: Σ over the leakage currents of V_a − V_b (they are in phase: their sum's
    #: power joins the others' once every source is solved)
    probe_leak: object = None
    #: source group -> its sources' branch drops summed, V (ranked into shares once the frequency
    #: is whole: :func:`groundcheck.physics.hum_shares.pooled_shares`)
    pooled: dict = field(default_factory=dict)
    tests: object = None  # the channels' test currents in each branch (branches × channels)


def hum_budget(
    plan,
    circuit,
    loops,
    rectifier_results: dict,
    options: HumOptions = HumOptions(),
    jobs: int = 1,
    probes=(),
    runs: dict | None = None,
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
        runs: conductors in series (each -> its run), ranked as one contributor.
    Returns:
        the HumResult: per channel the spectrum, total, contributors and audibility; loop pickup;
        crosstalk; the probes' power sums.
    References:
        ISO 226:2003 (threshold); reciprocity (Penfield, Spence, Duinker, 1970); Faraday's law.
    """
    b = HumBudget(plan, circuit, loops, rectifier_results, options, probes, runs)
    tasks, costs = b.tasks(jobs)
    return b.result(run_tasks(tasks, jobs, costs))


class HumBudget:
    """What every frequency's solve needs, set up once: sources, stages, tests, loop fluxes,
    frequencies.

    :meth:`tasks` gives the independent pieces of work (a frequency, or part of its sources),
    :meth:`result` merges what they return; :func:`hum_budget` runs them, and the analysis runs
    them among its other solves."""

    def __init__(
        self,
        plan,
        circuit,
        loops,
        rectifier_results: dict,
        options: HumOptions,
        probes=(),
        runs: dict | None = None,
    ):
        self.plan, self.circuit, self.loops = plan, circuit, loops
        self.rectifier_results = rectifier_results
        self.probe_a = np.array([circuit.point_node[x] for x, _ in probes], dtype=int)
        self.probe_b = np.array([circuit.point_node[y] for _, y in probes], dtype=int)
        self.f0 = plan.frequency
        sources = plan_sources(plan, rectifier_results, options.max_frequency, circuit)
        self.hum_sources = [s for s in sources if s.kind != "signal"]
        self.signal_sources = [s for s in sources if s.kind == "signal"]
        self.pairs = {src.name: (src, h) for src, h in pair_sources(plan.heaters)}  # AC heaters
        self.sources = [*plan.fields, *(src for src, _ in self.pairs.values())]
        self.fields = {x.name: x for x in self.sources}
        self.owners = branch_owner(circuit)
        # equal shares are named in the network's name- and order-free order
        self.owner_rank = owner_ranks(plan, self.owners)
        # conductors in series ranked as one contributor (a wire written in two pieces)
        self.runs = run_columns(self.owners, runs or {}, self.owner_rank)
        self.branch_index = {b.conductor: i for i, b in enumerate(circuit.branches) if b.conductor}
        self._listening(plan.listening)
        self._stages(plan.stages)
        self.listenings = channel_listenings(plan, self.stages, self.channels)
        self._frequencies(options.max_frequency)
        self.pick_loops, self.pick_branch, self.pick_sign = pickup_columns(
            circuit, loops, self.branch_index
        )
        self.plate_current = options.plate_current
        self.models = (
            flux_models(self, plan, circuit, loops) if self.pick_loops and self.sources else {}
        )
        if self.models and self.plate_current == "inductive":
            self.notes.append(
                "stray-field pickup with the inductive spread of loop currents in non-magnetic "
                "plates, at each line's frequency (--plate-current inductive)"
            )
        #: (channel, field source) -> the direction used for it, set when the budget's result is
        #: merged (:func:`groundcheck.physics.fieldhum.field_pickup`)
        self.directions: dict = {}

    def listening_of(self, ch: str):
        """Where channel ``ch``'s hum ends up: a placed device's own listening when every stage of
        the channel is inside that device and its plan states one, else the plan's."""
        return self.listenings.get(ch, self.listening)

    def _listening(self, listening) -> None:
        """The rated output the levels are against, and the notes when no verdict can be given."""
        self.listening = listening
        self.rated = listening.rated_output if listening else 1.0
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

    def _stages(self, stages) -> None:
        """The stages and channels: which stages the network joins, their gains, nodes and test
        injections, and their least-resistance paths (read by loop pickup only)."""
        circuit = self.circuit
        stages = self.stages = list(stages)
        channels = self.channels = sorted({s.channel for s in stages})
        _, labels = circuit.components
        self.valid_stage = [
            labels[circuit.point_node[s.a]] == labels[circuit.point_node[s.b]] for s in stages
        ]
        # least-resistance paths of the stages: only loop pickup reads them (one shortest-path
        # search each)
        self.paths = [
            pair_path(circuit, s.a, s.b) if ok and self.loops and self.sources else []
            for s, ok in zip(stages, self.valid_stage)
        ]
        self.gains = np.array([ratio_of_db(s.gain) for s in stages])
        self.valid_idx = np.flatnonzero(self.valid_stage) if stages else np.zeros(0, dtype=int)
        valid = [stages[k] for k in self.valid_idx]
        # per channel, one test injection: every stage's 1 A test, weighted by its gain (stages in
        # phase, see the module doc)
        self.tests = channel_tests(circuit, valid, channels)
        self.stage_a = np.array([circuit.point_node[s.a] for s in valid], dtype=int)
        self.stage_b = np.array([circuit.point_node[s.b] for s in valid], dtype=int)
        self.stage_channel = np.array([channels.index(s.channel) for s in valid], dtype=int)
        self.across = [self.branch_index.get(s.across) if s.across else None for s in stages]

    def _frequencies(self, max_frequency: float) -> None:
        """The frequencies solved: the sources' lines up to ``max_frequency``, the field sources'
        harmonics (with loops), the crosstalk's and the feedback's frequencies."""
        f0 = self.f0
        self.pickup_freqs = {
            n * f0 for src in self.sources for n in [1] + [h for h, _ in src.harmonics]
        }
        freqs = sorted(
            {f for s in self.hum_sources for f in s.parts if f > 0}
            | (self.pickup_freqs if self.loops else set())
        )
        self.freqs = freqs = [f for f in freqs if f <= max_frequency + 1e-9]
        self.xt_freqs = sorted(
            {
                SIGNAL_FREQUENCY,
                min(freqs) if freqs else 2 * f0,
                max(freqs) if freqs else max_frequency,
            }
        )
        self.crosstalk_wanted = (
            bool(self.signal_sources) and len(self.channels) > 1 and bool(self.stages)
        )
        # a channel's own signal currents read by its own stages: at the signal frequency and the
        # hum harmonics
        self.fb_sources = feedback_sources(self.signal_sources, self.stages)
        self.fb_freqs = set(freqs) | {SIGNAL_FREQUENCY} if self.fb_sources else set()
        xt = set(self.xt_freqs) if self.crosstalk_wanted else set()
        self.solve_at = sorted(set(freqs) | xt | self.fb_freqs)

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
        merged.fold()
        axes = field_pickup(self, merged)
        supply_shares(self, merged)
        channels = {ch: merged.channel(ch, axes.get(ch, [])) for ch in self.channels}
        for ch, hum in channels.items():
            hum.covers = coverage(self, ch)
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
            merged.probe_powers(),
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
            source_part(self, f, fac, active, part)
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

    def _pickup(self, f, fac, part) -> None:
        """The drop a unit flux through each loop leaves across each stage (at the output: times
        its gain), and the loop's current; the sources' fluxes and directions are applied when the
        frequencies are merged (:func:`groundcheck.physics.fieldhum.field_pickup`)."""
        if not self.models or not self.pick_loops:
            return
        paths = [p if ok else None for p, ok in zip(self.paths, self.valid_stage)]
        part.pickup = loop_pickup(
            fac, f, self.pick_branch, self.pick_sign, paths, self.gains_at(fac)
        )

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
