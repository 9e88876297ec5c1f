"""Placement of a block or device: a translation and an optional mirror of the plan frame; errors named by
their placements."""

from __future__ import annotations

from dataclasses import dataclass

__all__ = ["Transform", "name_placements"]


@dataclass(frozen=True)
class Transform:
    """Placement of a block: p' = (ox + sx·x, oy + sy·y); sx, sy are ±1 (mirroring)."""

    ox: float = 0.0
    oy: float = 0.0
    sx: float = 1.0
    sy: float = 1.0

    def __call__(self, p):
        return None if p is None else (self.ox + self.sx * p[0], self.oy + self.sy * p[1])

    def then(self, outer: "Transform") -> "Transform":
        return Transform(outer.ox + outer.sx * self.ox, outer.oy + outer.sy * self.oy, outer.sx * self.sx,
                         outer.sy * self.sy)


def name_placements(e, placed_at: dict) -> None:
    """An error in a block's statement says which placements it is in (said once for all of them).

    ``e``: a PlanError; ``placed_at``: (file, line) of each statement expanded in a placement -> the placements.
    """
    where = list(dict.fromkeys(placed_at.get((e.location.file, e.location.line), ())))
    if where and "(in placement" not in e.message:
        e.message += f" (in placement{'s' if len(where) > 1 else ''} {', '.join(where)})"
