"""The voltage a building cable's load current induces along its own protective core.

A cable carrying a load current I out on its line core and back on its neutral core sets up a
magnetic vector potential; at a third, parallel core (the protective conductor) it is

    A = (μ0·I / 2π) · ln(d_PN / d_PL)

per the two-wire line (d_PL, d_PN: the protective core's distances from the line and neutral cores'
centres), so the EMF along a length ℓ of the protective core is E = j·2πf·M'·ℓ·I with the mutual
inductance per metre M' = (μ0/2π)·ln(d_PN/d_PL) between the line–neutral circuit and the protective
core (with its return far away).  Far from the cable the potential falls off as the pair's spacing
over the distance, so of a loop through the protective wiring only its length inside the loaded
cable picks up EMF.

Core layouts: a flat cable with the protective core in the middle (``L-PE-N``) or three cores
touching in a round sheath (``round``) put the protective core equally far from line and neutral:
no EMF.  A flat cable with the protective core at the side (``L-N-PE``: d_PN = p, d_PL = 2p) gives
M' = (μ0/2π)·ln 2 = 0.139 µH/m whatever the pitch p.

References: S. Ramo, J. R. Whinnery, T. Van Duzer, *Fields and Waves in Communication Electronics*,
3rd ed., Wiley 1994, §2.4 (vector potential of parallel line currents) and F. W. Grover,
*Inductance Calculations*, 1946, mutual inductance of parallel filaments M = (μ0ℓ/2π)(ln(2ℓ/d) − 1)
for ℓ ≫ d, whose difference over the two filaments of the pair gives the same ln(d_PN/d_PL) (both
from memory).
"""

from __future__ import annotations

import math

from ..model.kinds import carries_load

__all__ = ["MU0_OVER_2PI", "CORE_LOG_RATIO", "mutual_per_metre", "cable_emfs", "induced_currents"]

#: μ0 / 2π, H/m (exact to the SI's 2019 revision within 1e-9)
MU0_OVER_2PI = 2e-7

#: ln(d_PN / d_PL) of each core layout: the protective core's distances from the neutral and line
#: cores
CORE_LOG_RATIO = {"L-N-PE": math.log(2.0), "L-PE-N": 0.0, "round": 0.0}


def mutual_per_metre(cores: str) -> float:
    """The mutual inductance per metre between a cable's line–neutral circuit and its protective
    core, H/m.

    Parameters:
        cores: the core layout (``L-N-PE``, ``L-PE-N`` or ``round``).
    Returns:
        M' = (μ0/2π)·|ln(d_PN/d_PL)|, H/m.
    References:
        Ramo, Whinnery, Van Duzer 1994 §2.4; Grover 1946 (from memory).
    """
    return MU0_OVER_2PI * abs(CORE_LOG_RATIO[cores])


def cable_emfs(c, f0: float) -> dict[float, float]:
    """The rms EMF along a cable's protective core at each load frequency, V.

    Parameters:
        c: the cable (its ``loads``: rms amperes and hertz, 0 Hz meaning the mains frequency; its
        length, m). f0: the mains frequency, Hz.
    Returns:
        frequency (Hz) -> rms EMF (V), E = 2πf·M'·ℓ·I; empty when the layout induces none.
    References:
        Faraday's law with the two-wire line's vector potential (Ramo, Whinnery, Van Duzer 1994,
        from memory).
    """
    m = mutual_per_metre(c.cores)
    out: dict[float, float] = {}
    if m == 0 or not c.length:
        return out
    for amps, hz in c.loads:
        f = hz or f0
        out[f] = out.get(f, 0.0) + 2 * math.pi * f * m * c.length * amps
    return {f: e for f, e in out.items() if e > 0}


def induced_currents(plan, circuit, max_frequency: float) -> list[tuple]:
    """Each loaded cable's induced EMF as the equivalent current source across its protective core.

    An EMF E in series with the core's impedance Z is the same, seen from the rest of the network,
    as a current E/Z in parallel with Z (Norton's theorem), flowing from the core's first end to
    its second; so the hum budget, the outlet voltages and the SPICE export treat it like any
    stated current.

    Parameters:
        plan: the plan.
        circuit: its circuit (the core's impedance at each frequency).
        max_frequency: the highest frequency kept, Hz.
    Returns:
        one (name, from point, to point, {Hz: complex rms A}, location) per loaded cable, injected
        into the core's second end and taken from its first (driving the EMF's current from the
        first end to the second).
    References:
        Norton's theorem (common practice); :func:`cable_emfs`.
    """
    index = {b.conductor: k for k, b in enumerate(circuit.branches) if b.conductor}
    z_at: dict = {}
    out = []
    for c in plan.conductors:
        if not carries_load(c) or c.name not in index:
            continue
        emfs = {
            f: e for f, e in cable_emfs(c, plan.frequency).items() if f <= max_frequency + 1e-9
        }
        parts = {}
        for f, e in emfs.items():
            if f not in z_at:
                z_at[f] = circuit.impedance(f)
            z = z_at[f][index[c.name]]
            parts[f] = complex(e / z)
        if parts:
            out.append((f"{c.name}.induced", c.b, c.a, parts, c.location))
    return out
