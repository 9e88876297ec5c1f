"""Impedance of conductors: resistance with temperature, wire and strip inductance, skin effect.

All inputs SI: lengths in m, areas in m², temperatures in °C, frequency in Hz;
results in Ω and H.
"""

from __future__ import annotations

import math

import numpy as np

from ..model.kinds import KINDS
from ..model.materials import MATERIALS
from .special_functions import bessel_skin_ratio

__all__ = [
    "MATERIALS",
    "resistivity",
    "wire_inductance",
    "strip_inductance",
    "skin_depth",
    "skin_ratio",
    "MU0",
    "MIN_IMPEDANCE",
    "DEFAULT_SWITCH_CONTACT",
    "FASTENER_RADIUS",
    "conductor_resistance",
]

MU0 = 4e-7 * math.pi

#: smallest impedance the solver is given, Ω: a zero-ohm link becomes 1 nΩ, far below any real
#: joint
MIN_IMPEDANCE = 1e-9

#: contact resistance of a closed switch when the plan gives none (from memory: a few mΩ for toggle
#: switches)
DEFAULT_SWITCH_CONTACT = 5e-3

#: radius of the area a screw and washer clamp to a plate, m (common practice: M4 hardware, ~9 mm
#: washer)
FASTENER_RADIUS = 4e-3


def resistivity(material: str, temperature: float = 20.0) -> float:
    """ρ(T) = ρ₂₀ · (1 + α₂₀ · (T − 20 °C)), in Ω·m.

    Parameters:
        material: a material name of MATERIALS.
        temperature: °C.
    Returns:
        the resistivity, Ω·m.
    References: IEC 60028 (copper ρ₂₀ and α₂₀); the linear law is the one IEC 60028 states.
    """
    rho20, alpha, _ = MATERIALS[material]
    return rho20 * (1.0 + alpha * (temperature - 20.0))


def wire_inductance(length: float, radius: float) -> float:
    """Low-frequency self-inductance of a straight round non-magnetic wire, in H.

    L = 2·10⁻⁷ · l · [ln(2l/r) − 0.75]   (l ≫ r; the −0.75 includes the internal inductance)

    Parameters:
        length: m.
        radius: m.
    Returns:
        the self-inductance, H.
    References: E. B. Rosa (1908); F. W. Grover, *Inductance Calculations*, 1946.
    """
    if length <= 0 or radius <= 0:
        return 0.0
    x = math.log(2.0 * length / radius) - 0.75
    return max(0.0, 2e-7 * length * x)


def strip_inductance(length: float, width: float, thickness: float) -> float:
    """Self-inductance of a straight flat strip (PCB trace, bus bar, strap), in H.

    L = 2·10⁻⁷ · l · [ln(2l/(w+t)) + 0.5 + 0.2235·(w+t)/l]

    Parameters:
        length: m.
        width: m.
        thickness: m.
    Returns:
        the self-inductance, H.
    References: F. W. Grover, *Inductance Calculations*, 1946 (rectangular bar).
    """
    if length <= 0:
        return 0.0
    s = width + thickness
    return max(0.0, 2e-7 * length * (math.log(2.0 * length / s) + 0.5 + 0.2235 * s / length))


def skin_depth(rho: float, frequency: float, mu_r: float = 1.0) -> float:
    """δ = √(ρ / (π f µ₀ µr)), in m (infinite at DC).

    Parameters:
        rho: resistivity, Ω·m.
        frequency: Hz.
        mu_r: relative permeability.
    Returns:
        the skin depth, m.
    References:
        S. Ramo, J. Whinnery, T. Van Duzer, *Fields and Waves in Communication Electronics*, §5.
    """
    if frequency <= 0:
        return math.inf
    return math.sqrt(rho / (math.pi * frequency * MU0 * mu_r))


def skin_ratio(radius, rho, frequency):
    """R_ac / R_dc of a round wire from the exact Bessel-function solution.

    Z_int / R_dc = (k·r/2) · J₀(k·r) / J₁(k·r) with k = (1 − j)/δ; the real part is returned.  With
    x = r/δ the ratio is a function of x alone, computed by :func:`bessel_skin_ratio` (power series
    below x = 14, Hankel's asymptotic expansion above; both to about 1e-13).  It tends to
    x/2 + 1/4 for r ≫ δ.  Works on numpy arrays of radii.

    Parameters:
        radius: m.
        rho: Ω·m.
        frequency: Hz.
    Returns:
        R_ac / R_dc (1 at DC).
    References: S. Ramo, J. Whinnery, T. Van Duzer, *Fields and Waves in
    Communication Electronics*, §5.6 (internal impedance of a round wire).
    """
    radius = np.asarray(radius, dtype=float)
    if frequency <= 0:
        return np.ones_like(radius)
    delta = (
        skin_depth(rho, frequency)
        if np.isscalar(rho)
        else np.sqrt(np.asarray(rho) / (np.pi * frequency * MU0))
    )
    x = radius / delta
    small = x * math.sqrt(2.0) < 1e-3
    return np.where(small, 1.0, np.real(bessel_skin_ratio(np.where(small, 1.0, x))))


def conductor_resistance(c, temperature: float) -> tuple[float, float, float]:
    """(R_dc in Ω, self-inductance in H, radius in m for the skin effect; 0 when not a round wire)
    of a conductor, by its kind's impedance model (:data:`groundcheck.model.kinds.KINDS`): a
    contact, a switch contact, a lift network's resistor, a flat strip (ρL/(w·t), Grover's strip
    inductance) or a round wire (ρL/A, Rosa's wire inductance).  A stated resistance replaces the
    geometry's.

    Parameters:
        c: a conductor record.
        temperature: °C.
    Returns:
        (R_dc in Ω, self-inductance in H, radius in m or 0).
    References:
        IEC 60028 (resistivity); Grover, *Inductance Calculations*, 1946; ASTM B258 (AWG).
    """
    model = KINDS[c.kind].impedance
    rho = resistivity(c.material if c.material in MATERIALS else "copper", temperature)
    contact = c.contact or 0.0
    if model == "contact":
        return (c.resistance if c.resistance is not None else contact), 0.0, 0.0
    if model == "switch":
        closed = c.contact if c.contact is not None else DEFAULT_SWITCH_CONTACT
        return (c.resistance if c.resistance is not None else closed), 0.0, 0.0
    if model == "lift":
        return c.resistance, 0.0, 0.0
    length = c.length or 0.0
    if model == "strip" and c.width is not None:
        t = c.thickness or (c.area / c.width if c.area else 1e-3)
        r = rho * length / (c.width * t)
        ind = strip_inductance(length, c.width, t)
        if c.resistance is not None:
            r = c.resistance
        return r + contact, ind, 0.0
    area = c.area
    radius = (c.diameter / 2) if c.diameter else (math.sqrt(area / math.pi) if area else 0.0)
    ind = wire_inductance(length, radius) if radius else 0.0
    if c.resistance is not None:
        return c.resistance + contact, ind, 0.0
    r = rho * length / area if area else 0.0
    return r + contact, ind, radius
