"""The current sources of a plan's ground system and the injections they make: each rectifier's
harmonics, stated currents, heater returns and the EMF loaded cables induce (as equivalent
currents), and the unit test injections at a stage's pair that reciprocity reads the coupling by
(:mod:`groundcheck.physics.coupling`).

References: P. Penfield, R. Spence and S. Duinker, *Tellegen's Theorem and Electrical Networks*,
MIT Press, 1970 (reciprocity); C.-W. Ho, A. Ruehli and P. Brennan, "The modified nodal approach
to network analysis", IEEE Trans. Circuits and Systems 22(6), 1975 (nodal injections).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..core.units import ratio_of_db
from ..model.kinds import LEAKAGE, SIGNAL
from .circuit import Circuit
from .induction import induced_currents

__all__ = [
    "Source",
    "plan_sources",
    "pair_tests",
    "channel_tests",
    "source_injections",
    "source_group",
    "LEAKAGE_GROUP",
]

#: the hum budget's group of every leakage current: they flow from the one mains line through the
#: equipment's filter capacitors and windings to earth, so in phase with each other, and their
#: drops add as phasors (their sum is what a meter and ngspice on the exported network read); other
#: groups, of unrelated mechanisms, add in power
LEAKAGE_GROUP = LEAKAGE


def source_group(kind: str, name: str, leakage) -> str:
    """The hum budget's group of a source: the rectifiers together, the leakage currents together
    (:data:`LEAKAGE_GROUP`), any other source alone.

    Parameters:
        kind: the source's kind (rectifier, current, heater, signal, induced).
        name: its name.
        leakage: the names of the plan's leakage currents.
    Returns:
        the group's name.
    References:
        none (bookkeeping; the module's description of LEAKAGE_GROUP).
    """
    if kind == "rectifier":
        return "rectifier charging"
    if name in leakage:
        return LEAKAGE_GROUP
    return f"{kind}:{name}"


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
    out = _rectifier_sources(plan, rectifier_results, max_frequency)
    for c in plan.currents:
        parts: dict = {}
        for amp, f in c.parts:
            parts[f] = parts.get(f, 0) + complex(amp)
        what = "signal" if c.role == SIGNAL else "current"
        out.append(Source(c.name, what, c.a, c.b, parts, c.channel, c.location))
    for h in plan.heaters:
        if h.a is not None and h.b is not None:
            parts = {plan.frequency if h.ac else 0.0: complex(h.current)}
            out.append(Source(h.name, "heater", h.a, h.b, parts, None, h.location))
    if circuit is not None:
        out += [
            Source(name, "induced", a, b, parts, None, loc)
            for name, a, b, parts, loc in induced_currents(plan, circuit, max_frequency)
        ]
    return out


def _rectifier_sources(plan, rectifier_results: dict, max_frequency: float) -> list[Source]:
    """Each rectifier's charging current, its filter capacitor's ripple current (no DC) and its
    regulator's returned current, as spectra of their simulated waveforms."""
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
            # the filter capacitor's ripple current leaves its negative and returns to the
            # reservoir's
            ripple = spectrum(res.filter_current, 1)
            out.append(
                Source(
                    f"{r.name}.filter",
                    "rectifier",
                    r.filter_point,
                    r.a,
                    ripple,
                    r.channel,
                    r.location,
                )
            )
        if res.return_current is not None and r.regulator_point is not None:
            # the regulator's load current (a shunt one's whole feed current) leaves its point
            # and returns to the reservoir's negative, its DC with it
            back = spectrum(res.return_current, 0)
            out.append(
                Source(
                    f"{r.name}.regulator",
                    "rectifier",
                    r.regulator_point,
                    r.a,
                    back,
                    r.channel,
                    r.location,
                )
            )
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
