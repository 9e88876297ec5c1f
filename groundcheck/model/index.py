"""A plan's elements by name, and the placement each belongs to: built once per plan (its
:attr:`~groundcheck.model.records.Plan.index`), read wherever a record is wanted by its name,
instead of a name -> record dict rebuilt at each place or a name's prefix split off by hand.

A placement is what placed an element: a block placed under a name (``place chan as left``) or a
device an installation places. Its elements' names begin with the placement's name and a dot
(``left.n0``); a point keeps the placement it came from in its ``group`` (``left``, or
``left.inner`` for a block placed inside a placed block), and the placement asked for here is the
outermost one.
"""

from __future__ import annotations

from functools import cached_property

from .kinds import LEAKAGE

__all__ = ["PlanIndex", "outermost", "device_of"]


def outermost(group: str | None) -> str | None:
    """The outermost placement of a point's ``group`` (``left.inner`` -> ``left``), or None.

    Parameters:
        group: a point's group as the plan records it, or None.
    Returns:
        the name of the outermost placement, or None when the point was placed by none.
    References:
        none (bookkeeping).
    """
    return group.split(".", 1)[0] if group else None


def device_of(name: str, devices) -> str | None:
    """The placed device an element belongs to (its name's first part, when that names one of
    ``devices``), or None.

    Parameters:
        name: an element's name.
        devices: the placed devices' names (any container: a dict by name, a set).
    Returns:
        the device's name, or None.
    References:
        none (bookkeeping).
    """
    head, dot, _ = name.partition(".")
    return head if dot and head in devices else None


class PlanIndex:
    """Each kind of element by name, and the placement each element belongs to (see the module's
    description). Every table is built the first time it is asked for."""

    def __init__(self, plan):
        self.plan = plan
        #: what the layers above work out from the plan alone, kept once per plan by the function
        #: that works it out (the network's canonical ranks: network.graph.plan_ranks)
        self.derived: dict = {}

    @cached_property
    def points(self) -> dict:
        """Point name -> point."""
        return {p.name: p for p in self.plan.points}

    @cached_property
    def metals(self) -> dict:
        """Metal part name -> metal part."""
        return {m.name: m for m in self.plan.metals}

    @cached_property
    def conductors(self) -> dict:
        """Conductor name -> conductor."""
        return {c.name: c for c in self.plan.conductors}

    @cached_property
    def devices(self) -> dict:
        """Placed device name -> device (an installation's)."""
        return {d.name: d for d in self.plan.devices}

    @cached_property
    def currents(self) -> dict:
        """Stated current name -> current."""
        return {c.name: c for c in self.plan.currents}

    @cached_property
    def leakage(self) -> frozenset:
        """The names of the leakage currents (role leakage): they are in phase, one source group
        of the hum budget, the outlet voltages and the export."""
        return frozenset(c.name for c in self.plan.currents if c.role == LEAKAGE)

    @cached_property
    def stage_ends(self) -> frozenset:
        """The points every stage reads between (its two ends): a stage's reference, never a
        supply's return to hang on."""
        return frozenset(n for st in self.plan.stages for n in (st.a, st.b))

    @cached_property
    def fields(self) -> dict:
        """Field source name -> field source."""
        return {f.name: f for f in self.plan.fields}

    @cached_property
    def placements(self) -> frozenset:
        """The names of the outermost placements: every point's and every placed device's."""
        return frozenset(outermost(p.group) for p in self.plan.points if p.group) | frozenset(
            self.devices
        )

    def placement_of(self, name: str) -> str | None:
        """The outermost placement (a placed block or device) an element belongs to, or None for
        the plan's own elements (``mains.pe`` among them): a point's by its group, any other
        element's by its name's first part when that names a placement.

        Parameters:
            name: an element's name.
        Returns:
            the placement's name, or None.
        References:
            none (bookkeeping).
        """
        point = self.points.get(name)
        if point is not None:
            return outermost(point.group)
        head, dot, _ = name.partition(".")
        return head if dot and head in self.placements else None

    def device_of(self, name: str) -> str | None:
        """The placed device (of an installation) an element belongs to, or None.

        Parameters:
            name: an element's name.
        Returns:
            the device's name, or None when the element is no placed device's.
        References:
            none (bookkeeping).
        """
        return device_of(name, self.devices)
