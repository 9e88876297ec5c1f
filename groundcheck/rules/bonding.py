"""The product bonding test's verdict (GC223): a conductor of the protective path that would pass
its insulation's short-time temperature limit carrying the test current, and a path whose voltage
at the long test's current is over IEC 60950-1's limit for a protective device above 16 A (figures
from :mod:`groundcheck.physics.bonding_test`).

A danger when a conductor would melt in either test (the protective path opens) or passes its
limit at the short test's 25 A minute, which every class I product must carry; a fault when only
the long test's bound passes it (200 % of the breaker's or fuse's rating for two minutes: the path
stays whole, its insulation may be damaged).  A path over 2.5 V at the long test is a danger."""

from __future__ import annotations

import math

from typing import TYPE_CHECKING

from ..physics.bonding_test import LONG_TEST
from .catalogue import Finding
from .registry import rule

if TYPE_CHECKING:
    from .electrical import Solved

__all__ = ["rule_bonding_test"]

#: what the temperature figure is (see physics.bonding_heat)
_BOUND = (
    " (a bound: the smaller of the rise with no cooling and the steady state in still air; a wire "
    "cooled through its ends or given time by its insulation's warming stays cooler)"
)

INSULATION_WORDS = {
    "pvc": "of its PVC insulation",
    "xlpe": "of its XLPE insulation",
    "bare": "for bare copper",
}


@rule("GC223", needs="solve")
def rule_bonding_test(s: Solved) -> list[Finding]:
    """GC223: a protective conductor that overheats in a product bonding test, or a path whose
    voltage is over its limit.

    Parameters:
        s: the solved network with its context.
    Returns:
        GC223 findings, one per conductor and test.
    References:
        the rule catalogue (rules/catalogue.py), which names each code's sources.
    """
    if s.bonding is None:
        return []
    tests = {t.name: t for t in s.bonding.tests}
    where = {c.name: c.location for c in s.plan.conductors}
    out = []
    for row in s.bonding.failures():
        t = tests[row.test]
        melts = row.reached == float("inf")
        reached = "would melt" if melts else f"may reach up to {row.reached:.0f} °C"
        size = (
            f"use at least {row.thicker * 1e6:g} mm²"
            if row.thicker is not None
            else "use a thicker protective conductor, or several in parallel"
        )
        out.append(
            Finding(
                "GC223",
                "danger" if melts or row.test == "short" else "fault",
                f"{row.conductor} ({row.area * 1e6:.3g} mm²) {reached} in the {t.name} bonding "
                f"test ({row.current:.3g} A for {t.duration:g} s), over the {row.limit:g} °C "
                f"short-time limit {INSULATION_WORDS.get(row.insulation, row.insulation)}"
                + ("" if melts else _BOUND),
                where.get(row.conductor, _plan_location(s)),
                (row.conductor,),
                _heat_figures(row),
                f"{size} for {row.conductor}, so that it carries the test current ({t.basis}) "
                "within its limit",
            )
        )
    out.extend(_drops(s))
    return out


def _heat_figures(row) -> dict:
    """GC223's figures: the conductor's current, size and temperatures in the test (°C; a
    melting conductor's temperatures are left out), the contact's power and drop for a
    fastening."""
    figures = {
        "test": row.test,
        "current_a": row.current,
        "area_mm2": None if row.area is None else row.area * 1e6,
        "insulation": row.insulation,
        "adiabatic_c": row.adiabatic,
        "steady_state_c": row.steady,
        "reached_c": row.reached,
        "melts": row.reached is not None and math.isinf(row.reached),
        "limit_c": row.limit,
        "continuous_limit_c": row.continuous_limit,
        "passes": row.passes,
        "contact_power_w": row.power,
        "contact_drop_v": row.drop,
        "thicker_mm2": None if row.thicker is None else row.thicker * 1e6,
    }
    return {
        k: v
        for k, v in figures.items()
        if v is not None and not (isinstance(v, float) and math.isinf(v))
    }


def _drops(s: Solved) -> list[Finding]:
    """A part whose path drops more than IEC 60950-1's 2.5 V at the long test's current."""
    tests = {t.name: t for t in s.bonding.tests}
    metals = {m.name: m.location for m in s.plan.metals}
    out = []
    for p in s.bonding.drops_over():
        t = tests[p.test]
        amps = p.current if p.current is not None else t.current
        behind = (
            f" (200 % of the {amps / LONG_TEST[0]:g} A fuse that protects it: a fault at it is "
            "behind the fuse)"
            if abs(amps - t.current) > 1e-9 * t.current
            else ""
        )
        out.append(
            Finding(
                "GC223",
                "danger",
                f"the protective path to {p.part} drops {p.voltage:.3g} V at {amps:.3g} A in the "
                f"{t.name} bonding test{behind}, over the {p.limit:g} V IEC 60950-1 allows for a "
                "protective device above 16 A",
                metals.get(p.part, _plan_location(s)),
                (p.part,),
                {
                    "test": p.test,
                    "current_a": amps,
                    "path_voltage_v": p.voltage,
                    "limit_v": p.limit,
                },
                f"lower the path's resistance to {p.limit / amps * 1e3:.3g} mΩ or less: "
                "shorten or thicken the protective conductor, clean and tighten the fastenings "
                "on its path",
            )
        )
    return out


def _plan_location(s: Solved):
    """Where a bonding finding with no statement of its own is reported: the plan's mains, else
    its supply."""
    for stated in (s.plan.mains, s.plan.supply):
        if stated is not None:
            return stated.location
    return s.plan.location
