"""The voltage between the earths of two outlets that an interconnect joins: what drives current
round the loop that the interconnect's shield closes through the building's protective wiring.

For every interconnect whose two ends belong to devices plugged into different points (outlets or
strips), the voltage between those points is solved at every frequency of the installation's
sources — the devices' leakage currents, the EMF that loaded cables induce in their protective
cores, and any stated current — twice: with every interconnect unplugged (what a meter between the
two earth pins reads before the cable is connected: the loop's driving voltage) and with the
installation as planned.  Sources of unknown relative phase add in power, as in the hum budget
(:mod:`groundcheck.physics.hum`); the leakage currents, all driven by the one mains line through
capacitance to earth, are in phase and add as phasors first.

References: nodal analysis and superposition (common practice); the sources are those of
:func:`groundcheck.physics.coupling.plan_sources`.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from ..model.kinds import carries_load, joins_devices
from ..model.installation import device_of, separated_devices
from .coupling import plan_sources, source_injections
from .ranking import largest

__all__ = [
    "OutletPair",
    "OutletVoltages",
    "OutletWork",
    "outlet_voltages",
    "outlet_pairs",
    "MAX_DRIVERS",
]

#: drivers named per outlet pair (the largest first)
MAX_DRIVERS = 5

#: sources solved together (their nodes × sources arrays bound the memory)
CHUNK = 128


@dataclass(frozen=True)
class OutletPair:
    """The voltage between the plug points of an interconnect's two devices, rms V per
    frequency."""

    interconnect: str
    a: str  # the point the A end's device is plugged into
    b: str
    open: dict  # Hz -> rms V, every interconnect unplugged
    planned: dict  # Hz -> rms V, the installation as planned
    drivers: tuple  # (source name, kind, rms V unplugged), the largest first

    @property
    def open_total(self) -> float:
        return math.sqrt(sum(v * v for v in self.open.values()))

    @property
    def planned_total(self) -> float:
        return math.sqrt(sum(v * v for v in self.planned.values()))


@dataclass
class OutletVoltages:
    """Every outlet pair an interconnect spans, and the EMF of every loaded cable (cable, Hz, V,
    H/m)."""

    pairs: list = field(default_factory=list)
    emfs: list = field(default_factory=list)
    notes: list = field(default_factory=list)


def _pair_volts(circuit, sources, pairs, freqs, leakage=frozenset()) -> tuple[dict, dict]:
    """Per (pair, frequency) the power sum over sources (the leakage currents, named in
    ``leakage``, added as phasors first: they are in phase), and per (pair, source) each source's
    rms voltage."""
    _, labels = circuit.components
    idx = [(circuit.point_node[a], circuit.point_node[b]) for a, b in pairs]
    joined = np.array([labels[i] == labels[j] for i, j in idx], dtype=bool)
    ia = np.array([i for i, _ in idx], dtype=int)
    ib = np.array([j for _, j in idx], dtype=int)
    per_f: dict = {}
    per_s = np.zeros((len(pairs), len(sources)))
    for f in freqs:
        active = [k for k, s in enumerate(sources) if s.parts.get(f, 0) != 0]
        if not active:
            continue
        fac = circuit.at(f)
        power = np.zeros(len(pairs))
        together = np.zeros(len(pairs), dtype=complex)  # the leakage currents, in phase
        rows, where = np.unique(np.concatenate([ia, ib]), return_inverse=True)
        wa, wb = where[: len(ia)], where[len(ia) :]
        for lo in range(0, len(active), CHUNK):
            cols = active[lo : lo + CHUNK]
            V = fac.voltages(source_injections(circuit, [sources[k] for k in cols], f), rows)
            dv = V[wa] - V[wb]  # pairs × chunk
            dv[~joined] = 0.0
            v2 = np.abs(dv) ** 2
            leak = np.array([sources[k].name in leakage for k in cols], dtype=bool)
            power += v2[:, ~leak].sum(axis=1)
            together += dv[:, leak].sum(axis=1)
            per_s[:, cols] += v2
        per_f[f] = np.sqrt(power + np.abs(together) ** 2)
    return per_f, np.sqrt(per_s)


def outlet_pairs(plan) -> tuple[list, list]:
    """The plug points of every interconnect's two devices, where they differ (a device on an
    isolating transformer's floating secondary has no earth at its plug point: no pair).

    Parameters:
        plan: the plan (an installation).
    Returns:
        ([(plug point of the A end's device, of the B end's)], [the interconnect of each pair]).
    References:
        none (bookkeeping).
    """
    devices = plan.index.devices
    floating = separated_devices(plan)
    pairs, names = [], []
    for c in plan.conductors:
        if not joins_devices(c):
            continue
        ends = [
            devices[d].plugged if (d := device_of(x, devices)) and d not in floating else None
            for x in (c.a, c.b)
        ]
        if None in ends or ends[0] == ends[1]:
            continue
        pairs.append((ends[0], ends[1]))
        names.append(c.name)
    return pairs, names


def outlet_voltages(
    plan, circuit, rectifier_results: dict, max_frequency: float, planned: dict | None = None
) -> OutletVoltages:
    """The outlet-pair voltages of an installation's interconnects, unplugged and as planned.

    Parameters:
        plan: the plan (an installation: its ``devices`` and interconnects).
        circuit: its circuit.
        rectifier_results: each rectifier's simulation.
        max_frequency: the highest frequency kept, Hz.
        planned: the power sums of :func:`outlet_pairs`' pairs as planned per frequency, when the
        hum budget
            has read them from its own solves (:func:`groundcheck.physics.hum.hum_budget`'s
            ``probes``).
    Returns:
        one pair per interconnect between two plug points, with its drivers, and each loaded
        cable's EMF; empty for a plan without devices.
    References:
        superposition; sources adding in power (see the module's text).
    """
    work = OutletWork(plan, circuit, rectifier_results, max_frequency)
    return work.result(work.unplugged(), planned)


class OutletWork:
    """An installation's outlet pairs and sources, set up once: :meth:`unplugged` solves the pairs
    with every interconnect unplugged (the heavy part, a task of its own in the analysis),
    :meth:`result` adds the planned voltages and assembles the :class:`OutletVoltages`."""

    def __init__(self, plan, circuit, rectifier_results: dict, max_frequency: float):
        from .induction import cable_emfs, mutual_per_metre

        self.plan, self.circuit = plan, circuit
        self.emfs, self.notes = [], []
        self.pairs, self.names, self.sources, self.freqs = [], [], [], []
        devices = plan.index.devices
        if not devices:
            return
        for c in plan.conductors:
            if carries_load(c):
                for f, e in sorted(cable_emfs(c, plan.frequency).items()):
                    self.emfs.append((c.name, f, e, mutual_per_metre(c.cores)))
        self.pairs, self.names = outlet_pairs(plan)
        if not self.pairs:
            return
        if (
            plan.supply is None
            and not plan.device_supplies
            and any(d.source == "simple" for d in devices.values())
        ):
            self.notes.append(
                "no 'supply' stated: the simple devices' default leakage is not computed"
            )
        self.sources = [
            s
            for s in plan_sources(plan, rectifier_results, max_frequency, circuit)
            if s.kind != "signal"
        ]
        self.freqs = sorted(
            {f for s in self.sources for f in s.parts if 0 < f <= max_frequency + 1e-9}
        )
        self.leakage = plan.index.leakage

    def unplugged(self) -> tuple[dict, list]:
        """Every pair's voltage with the interconnects unplugged, per frequency, and its drivers:
        (Hz -> rms V per pair, per pair (source index, rms V) the largest first).

        Returns:
            the unplugged voltages and drivers (small enough to travel back from a worker process).
        References:
            superposition (common practice).
        """
        if not self.pairs:
            return {}, []
        plan = self.plan
        wired = {c.name for c in plan.conductors if not joins_devices(c)}
        unplugged = self.circuit.restricted(wired)
        open_f, open_s = _pair_volts(unplugged, self.sources, self.pairs, self.freqs, self.leakage)
        drivers = []
        for k in range(len(self.pairs)):
            drivers.append(
                [
                    (int(i), float(open_s[k, i]))
                    for i in largest(open_s[k], MAX_DRIVERS)
                    if open_s[k, i] > 1e-6 * max(open_s[k].max(), 1e-300)
                ]
            )
        return open_f, drivers

    def result(self, unplugged: tuple[dict, list], planned: dict | None = None) -> OutletVoltages:
        """The outlet voltages from :meth:`unplugged`'s result and the planned power sums (None:
        solved here)."""
        out = OutletVoltages(emfs=self.emfs, notes=self.notes)
        if not self.pairs:
            return out
        circuit, pairs, sources = self.circuit, self.pairs, self.sources
        open_f, drivers = unplugged
        if planned is not None and all(f in planned for f in self.freqs):
            _, labels = circuit.components
            joined = np.array(
                [labels[circuit.point_node[a]] == labels[circuit.point_node[b]] for a, b in pairs]
            )
            plan_f = {f: np.where(joined, np.sqrt(planned[f]), 0.0) for f in self.freqs}
        else:
            plan_f, _ = _pair_volts(circuit, sources, pairs, self.freqs, self.leakage)
        roles = {c.name: c.role for c in self.plan.currents}
        for k, ((a, b), name) in enumerate(zip(pairs, self.names)):
            named = tuple(
                (sources[i].name, roles.get(sources[i].name, sources[i].kind), v)
                for i, v in drivers[k]
            )
            out.pairs.append(
                OutletPair(
                    name,
                    a,
                    b,
                    {f: float(v[k]) for f, v in open_f.items()},
                    {f: float(v[k]) for f, v in plan_f.items()},
                    named,
                )
            )
        return out
