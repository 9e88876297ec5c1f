"""The bench rules (GC402-GC405): measurements of the finished build against its plan.

They read :class:`BenchFacts`, made by the bench command (:mod:`groundcheck.measure.bench`) from a
recording
and a measurements file; the plan's own audit never runs them (``needs="bench"``).
"""

from __future__ import annotations

from dataclasses import dataclass

from ..core.errors import Location
from ..core.units import format_si
from .catalogue import Finding
from .registry import rule

__all__ = [
    "MeasuredBond",
    "MeasuredHum",
    "BenchFacts",
    "rule_bonds",
    "rule_hum_above_plan",
    "bond_verdict",
    "FAR_ABOVE",
    "ABOVE",
    "MARGIN_OHM",
    "HUM_MARGIN_DB",
]

#: a measured bond above this multiple of the plan (and MARGIN_OHM over it) is far above the
#: plan (GC402 fault)
FAR_ABOVE = 3.0
#: ... above this multiple, above the plan (GC402 warning)
ABOVE = 1.5
#: the margin a measurement must exceed the plan by, Ω (a four-wire meter's contact uncertainty,
#: common practice)
MARGIN_OHM = 0.005
#: a recorded hum line more than this above the plan is a GC405 finding, dB (common practice)
HUM_MARGIN_DB = 6.0


@dataclass(frozen=True)
class MeasuredBond:
    """A resistance measured between two points, with the plan's figure and, on the protective
    route, the limit."""

    a: str
    b: str
    measured: float  # Ω
    planned: float | None  # Ω; None: the plan does not join them
    limit: float | None  # Ω; None: not a protective bond
    joints: tuple[str, ...]  # the path's fastenings and conductors, joints first
    location: Location
    current: float | None = None  # A, the test current when stated


@dataclass(frozen=True)
class MeasuredHum:
    """A channel's recorded lines above the plan: (frequency Hz, dB above the plan or None when
    the plan predicts
    nothing there), and the fit's first suspect in words."""

    channel: str
    lines: tuple[tuple[float, float | None], ...]
    suspect: str
    location: Location


@dataclass(frozen=True)
class BenchFacts:
    bonds: tuple[MeasuredBond, ...] = ()
    hum: tuple[MeasuredHum, ...] = ()


def bond_verdict(b: MeasuredBond) -> str:
    """The words of a measured bond's verdict: over the limit, not in plan, far above plan, above
    plan, as planned.

    Parameters:
        b: the measured bond.
    Returns:
        the verdict in words.
    References:
        the thresholds above (common practice) and the protective bonding limit (GC403's entry).
    """
    if b.limit is not None and b.measured > b.limit:
        return "over the limit"
    if b.planned is None:
        return "not in plan"
    if b.measured > FAR_ABOVE * b.planned and b.measured > b.planned + MARGIN_OHM:
        return "far above plan"
    if b.measured > ABOVE * b.planned and b.measured > b.planned + MARGIN_OHM:
        return "above plan"
    return "as planned"


def _ohm(x: float) -> str:
    return format_si(x, "Ω")


def _over_fix(b, joints: str) -> str:
    """GC403's fix: re-make the joints when the plan's own path is within the limit; when the plan
    itself is over it (a part bonded only through its fixings, say), no joint re-made will do: a
    protective wire of its own, as `check` proposes."""
    if b.planned is not None and b.limit is not None and b.planned > b.limit:
        return (
            f"the plan's own path is {_ohm(b.planned)}, over the limit as designed: re-making "
            f"its joints{f' ({joints})' if joints else ''} will not bring it within the limit; "
            f"bond {b.b} by a protective wire of its own (groundcheck check PLAN proposes one), "
            "then measure again; have it checked by a qualified person"
        )
    return (
        f"re-make the protective bond{f' ({joints})' if joints else ''} and measure again; have "
        "it checked by a qualified person"
    )


@rule("GC402", "GC403", "GC404", needs="bench")
def rule_bonds(facts: BenchFacts) -> list[Finding]:
    """GC402 a measured bond above its plan, GC403 a protective bond over the limit, GC404
    continuity the plan
    does not have.

    Parameters:
        facts: the bench's measurements.
    Returns:
        one finding per measurement that is not as planned.
    References:
        the rule catalogue (rules/catalogue.py), which names each code's sources.
    """
    out = []
    for b in facts.bonds:
        verdict, pair, joints = bond_verdict(b), (b.a, b.b), ", ".join(b.joints[:3])
        figures = {"measured_ohm": b.measured, "planned_ohm": b.planned, "limit_ohm": b.limit}
        if verdict == "over the limit":
            out.append(
                Finding(
                    "GC403",
                    "danger",
                    f"{b.a} to {b.b} measures {_ohm(b.measured)}, over the protective bonding "
                    f"limit of {_ohm(b.limit)}: do not use the equipment",
                    b.location,
                    pair + b.joints[:3],
                    figures,
                    _over_fix(b, joints),
                )
            )
        elif verdict == "not in plan":
            out.append(
                Finding(
                    "GC404",
                    "warning",
                    f"{b.a} to {b.b} measures {_ohm(b.measured)}, but the plan does not join "
                    "them: the build has a connection the plan does not describe",
                    b.location,
                    pair,
                    figures,
                    "find the connection; remove it or add it to the plan",
                )
            )
        elif verdict in ("far above plan", "above plan"):
            sev = "fault" if verdict == "far above plan" else "warning"
            out.append(
                Finding(
                    "GC402",
                    sev,
                    f"{b.a} to {b.b} measures {_ohm(b.measured)}, {b.measured / b.planned:.1f} "
                    f"times the plan's {_ohm(b.planned)}",
                    b.location,
                    pair + b.joints[:3],
                    figures,
                    f"re-make the joint{'s' if len(b.joints) > 1 else ''}: {joints}",
                )
            )
    return out


@rule("GC405", needs="bench")
def rule_hum_above_plan(facts: BenchFacts) -> list[Finding]:
    """GC405: a channel's recorded hum above the plan at one or more harmonics.

    Parameters:
        facts: the bench's measurements.
    Returns:
        one finding per channel whose recording is above the plan.
    References:
        the rule catalogue (rules/catalogue.py).
    """
    out = []
    for h in facts.hum:
        if not h.lines:
            continue
        said = ", ".join(
            f"{f:g} Hz " + (f"+{d:.1f} dB" if d is not None else "(none planned)")
            for f, d in h.lines[:5]
        )
        out.append(
            Finding(
                "GC405",
                "warning",
                f"{h.channel}: the recorded hum is above the plan at {said}; {h.suspect}",
                h.location,
                (h.channel,),
                {"lines": [list(x) for x in h.lines]},
                "inspect the suspect's conductors and joints first; never lift the protective "
                "earth",
            )
        )
    return out
