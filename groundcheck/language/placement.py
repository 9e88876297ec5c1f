"""Placement of a block or device: a translation and an optional mirror of the plan frame."""

from __future__ import annotations

from dataclasses import dataclass

__all__ = ["Transform"]


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
