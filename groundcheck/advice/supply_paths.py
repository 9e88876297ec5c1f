"""How much of the supplies' charging and ripple current a plan leaves on its signal wiring: the
advisor's tie-break between changes alike in gain and size (common practice: a supply's return
runs between its own ends on wiring of its own, never along a wire the builder marked as signal
ground; moving the stage that reads it is the lesser repair when the return itself stays
there)."""

from __future__ import annotations

from ..model.kinds import SIGNAL
from ..rules.results import Result

__all__ = ["supply_on_signal"]


def supply_on_signal(r: Result | None) -> float:
    """The rectifiers' currents (charging, filter and regulator returns) at their first frequency
    summed over the conductors of role ``signal`` they cross, A (the hum budget's network rows:
    each source's largest branch currents).

    Parameters:
        r: an analysis result (``None``, or one without a hum budget: 0).
    Returns:
        the sum, A.
    References:
        Kirchhoff's laws (the branch currents of the hum budget's solves).
    """
    if r is None or r.hum is None:
        return 0.0
    rectifiers = {x.name for x in r.plan.rectifiers}
    signal = {c.name for c in r.plan.conductors if c.role == SIGNAL}
    total = 0.0
    for row in r.hum.network:
        base, _, part = row["source"].partition(".")
        if base in rectifiers and part in ("", "filter", "regulator"):
            total += sum(c["current_a"] for c in row["conductors"] if c["branch"] in signal)
    return total
