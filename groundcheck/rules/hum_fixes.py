"""The fix lines of the hum rules' contributor findings (GC301, GC302): what to change so that a
conductor stops carrying a source's current to a stage, or a loop stops picking up a field."""

from __future__ import annotations

from ..model.kinds import PROTECTIVE, joins_devices
from ..physics.heater_field import source_heater

__all__ = ["contributor_fix", "pickup_fix"]


def contributor_fix(element: str, source: str, cond, loop_driven: set) -> str:
    """What to do about a conductor that carries a hum source's current to a stage (GC301).

    Parameters:
        element: the conductor's name.
        source: the hum source's name.
        cond: the conductor's record (None when it is not one of the plan's).
        loop_driven: the sources whose current reaches a stage only round a loop through the
            installation (leakage currents, cables' induced EMFs).
    Returns:
        the fix line.
    References:
        common practice (one outlet or strip for a loop through the building's earth; a balanced
        link's shield landed on the chassis where it enters); never lift the protective earth.
    """
    if cond is not None and cond.role == PROTECTIVE:
        return (
            f"the drop along protective conductor {element} reaches the stage through a loop: "
            "plug the devices the loop's links join into one outlet or strip, so that it no "
            "longer runs through the building's earth wiring (a balanced link only between "
            "balanced sockets); never lift the protective earth"
        )
    if source in loop_driven and cond is not None and joins_devices(cond):
        if cond.balanced:
            return (
                f"{source} drives current round the loop along the shield of {element}: land the "
                "shield on the chassis where it enters at both ends ('shield-to chassis'), so "
                "that it stays out of the signal grounds; never lift the protective earth"
            )
        return (
            f"{source} drives current round the loop along the shield of {element}, the signal's "
            "return on an unbalanced link, which stays: plug the devices it joins into one outlet "
            "or strip (a balanced link only between balanced sockets, a ground-lift network only "
            "in equipment of your own build, with power diodes across it rated for a fault); "
            "never lift the protective earth"
        )
    if source in loop_driven:
        return (
            f"{source} drives current round a loop through {element}, between an interconnect's "
            "shield and the protective earth: plug the devices it joins into one outlet or strip, "
            "or, on a balanced link, land its shield on the chassis where it enters "
            "('shield-to chassis'); never lift the protective earth"
        )
    return f"move the {source} current off {element}: give it a return path of its own"


def pickup_fix(plan, source: str) -> str:
    """GC302's fix line: an open AC heater pair is twisted first.

    Parameters:
        plan: the plan.
        source: the field source's name.
    Returns:
        the fix line.
    References:
        common practice (a twisted pair's fields cancel; a loop smaller and farther picks up less).
    """
    h = source_heater(plan.heaters, source)
    if h is not None and h.ac and not h.twisted and h.route:
        return (
            f"twist the heater pair {h.name} tightly along its whole run; or open the loop, or "
            "make it smaller and move it away from the pair"
        )
    return "open the loop, or make it smaller and move it away from the field source"
