"""A protective conductor's temperature in a bonding test, and the smallest wire that would pass.

A conductor warms monotonically from the ambient towards its steady state in still air, and never
above the temperature it would reach with no cooling at all; so by the end of a test it is at most
the smaller of the **adiabatic** temperature (IEC 60949 eq. 1,
:func:`~.heat.adiabatic_temperature`) and the **steady-state** temperature in free air
(:func:`~.heat.steady_temperature`).  That bound is held against the insulation's short-time limit,
the final temperature θf of IEC 60364-5-54 Tables A.54.2–A.54.5: PVC 160 °C, XLPE 250 °C, bare
copper 200 °C (the "normal conditions" column whose k, 159, :mod:`groundcheck.physics.safety`
uses).  A test of one or two minutes is a short overload, not the insulation's continuous duty: the
continuous limit (PVC 70 °C, XLPE 90 °C; IEC 60364-5-52 Table 52.1, from memory) is reported beside
it, not judged.

References: IEC 60949 eq. 1 (adiabatic temperature); IEC 60364-5-54 Annex A (final
temperatures); IEC 60228 (nominal cross-sections); :mod:`groundcheck.physics.heat` (steady state
in free air).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ..model.kinds import KINDS, cross_section
from .heat import INSULATION_THICKNESS, adiabatic_temperature, steady_temperature
from .impedance import MATERIALS

__all__ = [
    "BondTest",
    "ConductorHeat",
    "conductor_heat",
    "SHORT_LIMIT",
    "CONTINUOUS_LIMIT",
    "SECTIONS",
]

#: short-time temperature limit θf, °C, by insulation: IEC 60364-5-54 Tables A.54.2–A.54.5 (bare:
#: 200 °C, the "normal conditions" column, from memory, as physics.safety's k of 159)
SHORT_LIMIT = {"pvc": 160.0, "xlpe": 250.0, "bare": 200.0}
#: continuous limit, °C: PVC 70, XLPE 90 (IEC 60364-5-52 Table 52.1, from memory); bare: none
CONTINUOUS_LIMIT = {"pvc": 70.0, "xlpe": 90.0, "bare": None}

#: nominal cross-sections, mm² (IEC 60228), for the smallest size that would pass
SECTIONS = (0.5, 0.75, 1.0, 1.5, 2.5, 4.0, 6.0, 10.0, 16.0, 25.0, 35.0, 50.0)


@dataclass(frozen=True)
class BondTest:
    """One bonding test: its name, current (A), duration (s) and where the figures come from."""

    name: str
    current: float
    duration: float
    basis: str


@dataclass(frozen=True)
class ConductorHeat:
    """One conductor in one test: its share of the current and the temperatures it may reach, °C.

    ``reached`` is the bound min(adiabatic, steady state); a temperature is infinite at or above
    copper's melting point; a fastening has no area and no temperatures, only its contact's power
    and voltage."""

    conductor: str
    test: str
    current: float  # A through this conductor
    area: float | None  # m²; None for a fastening
    insulation: str | None
    adiabatic: float | None  # None: a material without IEC 60949 constants, or a fastening
    steady: float | None
    reached: float | None
    limit: float | None
    continuous_limit: float | None
    power: float | None = None  # W, a fastening's contact
    drop: float | None = None  # V across a fastening's contact
    thicker: float | None = None  # m², the smallest nominal round wire that would pass

    @property
    def passes(self) -> bool | None:
        """Whether the bound stays within the short-time limit; None when not judged."""
        if self.reached is None or self.limit is None:
            return None
        return self.reached <= self.limit


def _geometry(c, area: float) -> tuple[float, float]:
    """(diameter, insulation wall), m: a round conductor's own diameter with hook-up wire's wall
    when insulated; a flat strip's perimeter-equivalent diameter 2(w + t)/π, with no wall (a
    trace's solder mask or a strap's sleeve is thin)."""
    if KINDS[c.kind].impedance == "strip" and c.width is not None:
        return 2.0 * (c.width + area / c.width) / math.pi, 0.0
    wall = INSULATION_THICKNESS if c.insulation != "bare" else 0.0
    return c.diameter or math.sqrt(4.0 * area / math.pi), wall


def conductor_heat(c, test: BondTest, current: float, ambient: float) -> ConductorHeat:
    """The temperatures a conductor of the protective path may reach in a test, with the smallest
    nominal round wire that would pass when it does not.

    Parameters:
        c: the conductor record (of a kind whose cross-section is checked).
        test: the test.
        current: the conductor's share of the test current, A.
        ambient: the starting and the air's temperature, °C (the plan's ambient).
    Returns:
        the ConductorHeat (°C; infinite at or above copper's melting point).
    References:
        IEC 60949 eq. 1 (adiabatic); physics.heat (steady state in free air); IEC 60364-5-54
        Annex A (final temperatures).
    """
    area = cross_section(c)
    ins = c.insulation if c.insulation in SHORT_LIMIT else "pvc"
    limit = SHORT_LIMIT[ins]
    ad, ss, reached = _bound(c, area, *_geometry(c, area), current, test.duration, ambient)
    thicker = None
    if reached > limit:
        wall = 0.0 if ins == "bare" else INSULATION_THICKNESS
        thicker = next(
            (
                a * 1e-6
                for a in SECTIONS
                if a * 1e-6 > area * (1 + 1e-9)
                and _bound(
                    c,
                    a * 1e-6,
                    math.sqrt(4e-6 * a / math.pi),
                    wall,
                    current,
                    test.duration,
                    ambient,
                )[2]
                <= limit
            ),
            None,
        )
    return ConductorHeat(
        c.name,
        test.name,
        current,
        area,
        ins,
        ad,
        ss,
        reached,
        limit,
        CONTINUOUS_LIMIT[ins],
        thicker=thicker,
    )


def _bound(
    c, area: float, diameter: float, wall: float, current: float, duration: float, ambient: float
) -> tuple[float | None, float, float]:
    """(adiabatic, steady state, the smaller), °C, for ``c`` at ``area``: the adiabatic figure is
    None for a material without IEC 60949 constants; infinite means at or above melting."""
    material = c.material if c.material in MATERIALS else "copper"
    rho20, alpha, _ = MATERIALS[material]
    ad = adiabatic_temperature(material, current, duration, area, ambient)
    ss = steady_temperature(current, area, diameter, wall, c.insulation, rho20, alpha, ambient)
    return ad, ss, min(ss, math.inf if ad is None else ad)
