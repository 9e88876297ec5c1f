"""The hum budget's sources at one frequency as elements of a netlist: the stated and simulated
currents, each loop's induced EMF in series with the conductor that closes it, and each stage's
reading (the drop along its own wiring), so that a circuit simulator given the netlist reproduces
the figures the budget computes.

A field source's EMF in a loop is −jω·Φ at each of its lines (Φ the flux through the loop for the
direction the budget used for the channel, times the line's ratio), in series with the loop's
closing conductor, as the budget solves it. A stage reads the drop Z·I along its least-resistance
path from its first point to its second: the two points' voltage difference plus the EMFs of the
closing conductors on that path, each with the path's direction.

The budget adds its source groups by power (their phases are unrelated: every rectifier together,
then each stated current and each field source on its own); a netlist of one group reproduces
that group's share, and a netlist of every group their phasor sum.

References: Faraday's law; nodal analysis with series EMFs (Thévenin in each branch).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from .fieldhum import at_line, source_lines
from .sources import LEAKAGE_GROUP

__all__ = ["RECTIFIERS", "Reading", "NetlistSources", "netlist_sources", "source_groups"]

#: the group name that selects every rectifier's charging current together
RECTIFIERS = "rectifiers"


@dataclass(frozen=True)
class Reading:
    """A stage's reading in the netlist: its points, its gain at the frequency and the EMFs on its
    path (index into :attr:`NetlistSources.emfs`, +1 or −1 for the path's direction)."""

    stage: str
    channel: str
    a: str
    b: str
    gain: complex
    emfs: tuple[tuple[int, int], ...]


@dataclass(frozen=True)
class NetlistSources:
    """What a netlist at one frequency holds besides the network.

    ``currents``: (name, point it enters, point it leaves, rms phasor A); ``emfs``: (label, branch
    index, rms phasor V driving current from the branch's first node to its second); ``readings``:
    the stages read; ``groups``: every source group with a line at the frequency; ``group``: the
    one exported (None: all); ``channel``: whose field directions the EMFs take."""

    frequency: float
    currents: tuple
    emfs: tuple
    readings: tuple[Reading, ...]
    groups: tuple[str, ...]
    group: str | None
    channel: str | None


def _group_of(source, leakage=frozenset()) -> str:
    """A source's group in the exported netlists: the rectifiers together, the leakage currents
    together (in phase, as the hum budget adds them), any other source alone."""
    if source.kind == "rectifier":
        return RECTIFIERS
    return LEAKAGE_GROUP if source.name in leakage else source.name


def source_groups(budget, f: float) -> list[str]:
    """The source groups with a line at f: the rectifiers (together), each stated or simulated
    current, each field source and AC heater pair whose lines include f (and that takes an EMF in
    some loop).

    Parameters:
        budget: the hum budget (:class:`groundcheck.physics.hum.HumBudget`).
        f: the frequency, Hz.
    Returns:
        the group names, in the budget's order.
    References:
        none (bookkeeping).
    """
    out, leakage = [], budget.plan.index.leakage
    for s in budget.hum_sources:
        if abs(s.parts.get(f, 0)) > 0 and _group_of(s, leakage) not in out:
            out.append(_group_of(s, leakage))
    for name in budget.models:
        if source_lines(budget.fields[name], budget.f0, [f]):
            out.append(name)
    return out


def netlist_sources(budget, f: float, group: str | None = None, channel: str | None = None):
    """The currents, loop EMFs and stage readings of a netlist at frequency f.

    Parameters:
        budget: the hum budget, its result merged (the field directions chosen).
        f: the frequency, Hz (0: DC, currents only).
        group: one source group (:func:`source_groups`), or None for every one.
        channel: the channel whose field directions the EMFs take and whose stages are read
            (None: the first channel).
    Returns:
        the NetlistSources.
    References:
        the module's description.
    """
    groups = source_groups(budget, f)
    if channel is None and budget.channels:
        channel = budget.channels[0]
    leakage = budget.plan.index.leakage
    currents = tuple(
        (s.name, s.a, s.b, complex(s.parts[f]))
        for s in budget.hum_sources
        if abs(s.parts.get(f, 0)) > 0 and group in (None, _group_of(s, leakage))
    )
    per_branch: dict[int, complex] = {}
    if f > 0:
        for name, model in budget.models.items():
            if group not in (None, name):
                continue
            for _, ratio in source_lines(budget.fields[name], budget.f0, [f]):
                phi = _fluxes(budget, model, name, channel, f)
                if phi is None:
                    continue
                w = 2 * math.pi * f
                for col, bi in enumerate(budget.pick_branch):
                    emf = -1j * w * budget.pick_sign[col] * ratio * complex(phi[col])
                    if emf != 0:
                        per_branch[int(bi)] = per_branch.get(int(bi), 0) + emf
    emfs = tuple((budget.circuit.branches[bi].name, bi, v) for bi, v in sorted(per_branch.items()))
    return NetlistSources(
        f, currents, emfs, _readings(budget, f, emfs, channel), tuple(groups), group, channel
    )


def _fluxes(budget, model, name: str, channel: str | None, f: float):
    """The source's flux through each loop that takes an EMF at its line f, for the channel's
    direction (None when the channel reads no loop and the direction was never chosen)."""
    if not model.oriented:
        return model.fixed
    m = budget.directions.get((channel, name))
    return None if m is None else at_line(model, f, model.fluxes(m)[0])


def _readings(budget, f: float, emfs, channel) -> tuple[Reading, ...]:
    """Each valid stage's reading (the channel's stages when the netlist carries EMFs)."""
    on_branch = {bi: k for k, (_, bi, _) in enumerate(emfs)}
    gains = budget.gains_at(budget.circuit.at(f)) if budget.stages else np.zeros(0)
    out = []
    for k, st in enumerate(budget.stages):
        if not budget.valid_stage[k] or (emfs and st.channel != channel):
            continue
        path = budget.paths[k] if budget.paths else []
        on_path = tuple((on_branch[bi], int(sgn)) for bi, sgn in path if bi in on_branch)
        out.append(Reading(st.name, st.channel, st.a, st.b, complex(gains[k]), on_path))
    return tuple(out)
