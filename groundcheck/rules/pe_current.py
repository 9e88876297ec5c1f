"""GC224: a supply's working current flowing in a protective conductor.

A protective conductor carries no current in normal operation: one that carries a supply's return
makes the equipment work on its protective path (a break in it goes unnoticed, and the return's
current runs through the chassis and the mains cord's earth). It happens when the signal ground
is bonded to the chassis at two places and the protective path closes a second way between a
rectifier's two return points (an umbilical's earth core beside its 0 V core, say), or when a
change takes the return's own wire away.

The share is a DC solve of the ground network with a unit current from the rectifier's reservoir
end to its centre tap (or bridge negative), read in each conductor of the protective route."""

from __future__ import annotations

from typing import TYPE_CHECKING

import numpy as np

from ..model.kinds import HEATER, LOAD, RETURN
from ..model.sources import Rectifier
from .catalogue import Finding
from .registry import rule

if TYPE_CHECKING:
    from .electrical import Solved

__all__ = ["rule_pe_working_current", "PE_CURRENT_SHARE"]

#: the stated currents that are a supply's working current (a leakage current's way home is the
#: protective conductor, and a signal's return is the crosstalk rules')
WORKING = (RETURN, LOAD, HEATER)

#: a protective conductor carrying at least this share of a supply's return is reported: below it,
#: the solve's own rounding and a plate's spread (common practice: any working current is too much,
#: but a thousandth is the model's noise)
PE_CURRENT_SHARE = 0.01


@rule("GC224", needs="solve")
def rule_pe_working_current(s: Solved) -> list[Finding]:
    """GC224: protective conductors that carry part of a rectifier's return current or of a
    stated return, load or heater current (one finding per source).

    Parameters:
        s: the solved network with its context.
    Returns:
        GC224 findings, one per source, naming the protective conductors it runs through.
    References:
        IEC 60364-5-54 543.5 (a protective conductor carries no operating current; PEN aside),
        from memory; the rule catalogue (rules/catalogue.py).
    """
    circ = s.circuit
    sources = [*s.plan.rectifiers, *(c for c in s.plan.currents if c.role in WORKING)]
    if circ is None or not sources:
        return []
    route = s.ctx.route.keep
    branches = [b for b in circ.branches if b.conductor in route]
    if not branches:
        return []
    pairs = [(r, circ.point_node.get(r.a), circ.point_node.get(r.b)) for r in sources]
    pairs = [(r, a, b) for r, a, b in pairs if a is not None and b is not None and a != b]
    if not pairs:
        return []
    J = np.zeros((len(circ.nodes), len(pairs)))
    for k, (_, a, b) in enumerate(pairs):
        J[a, k], J[b, k] = 1.0, -1.0
    V = np.real(circ.dc().solve(J).V)
    dc = {x.name: x.dc_current for x in (s.hum.rectifiers if s.hum is not None else ())}
    dc |= {c.name: sum(a for a, f in c.parts if f == 0) or None for c in s.plan.currents}
    where = s.plan.index.conductors
    out = []
    for k, (r, _, _) in enumerate(pairs):
        share: dict[str, float] = {}
        for br in branches:
            i = abs(V[br.n1, k] - V[br.n2, k]) / max(br.r, 1e-12)
            share[br.conductor] = max(share.get(br.conductor, 0.0), float(i))
        over = sorted(
            (c for c, x in share.items() if x >= PE_CURRENT_SHARE), key=lambda c: (-share[c], c)
        )
        if over:
            out.append(_finding(r, over, share, dc.get(r.name), where[over[0]].location))
    return out


def _finding(r, over: list[str], share: dict, dc: float | None, loc) -> Finding:
    """One source's finding: the protective conductors it runs through, the largest share first."""
    top = share[over[0]]
    amps = f", about {top * dc * 1e3:.3g} mA of its {dc * 1e3:.3g} mA DC" if dc else ""
    what = "return current" if isinstance(r, Rectifier) else f"stated {r.role} current"
    names = ", ".join(over[:6]) + (f" and {len(over) - 6} more" if len(over) > 6 else "")
    return Finding(
        "GC224",
        "fault",
        f"protective conductors carry up to {top:.0%} of the {what} of {r.name} "
        f"({r.a} → {r.b}){amps}: {names}; a protective conductor must carry no working current",
        loc,
        (r.name, *over),
        {"share": top, "conductors": len(over), **({"current_a": top * dc} if dc else {})},
        f"give {r.name}'s return a wire of its own between {r.a} and {r.b} and bond the signal "
        f"ground to the chassis at one place, so that none of it runs through {over[0]}; never "
        "remove or lift a protective conductor",
    )
