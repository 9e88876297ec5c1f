"""The advisor's time budget: one deadline for the whole command, and the estimates it is spent by.

The budget is counted from the start of the command (the first analysis included).  A candidate is
started only when the slowest analysis seen so far (the first analysis before any candidate has
run) still fits before the deadline, so the last one never runs past it; the number of candidates
the remaining time allows is estimated from the mean time of those actually tried.
"""

from __future__ import annotations

import time

__all__ = ["Clock"]


class Clock:
    """The deadline (``time.monotonic()`` seconds; None: no budget) and the time of each analysis
    run so far."""

    def __init__(self, deadline: float | None = None, first: float | None = None):
        self.deadline = deadline
        self.first = first  # the first analysis, s: the estimate before any candidate has run
        self.spent: list[float] = []

    @classmethod
    def of(cls, budget: float | None, started: float | None = None) -> "Clock":
        """A clock whose deadline is ``budget`` seconds after ``started`` (default: now)."""
        start = time.monotonic() if started is None else started
        return cls(None if budget is None else start + budget)

    def share(self, fraction: float, started: float) -> "Clock":
        """A clock for a phase: the same estimates, its deadline ``fraction`` of the way from
        ``started`` to this clock's deadline."""
        out = Clock(
            None if self.deadline is None else started + fraction * (self.deadline - started)
        )
        out.first, out.spent = self.first, self.spent
        return out

    def estimate(self) -> float:
        """The time an analysis may take: the slowest seen so far (0 when none has run)."""
        return max(self.spent, default=self.first or 0.0)

    def fits(self) -> bool:
        """Whether one more analysis ends before the deadline (by :meth:`estimate`)."""
        return self.deadline is None or time.monotonic() + self.estimate() <= self.deadline

    def timed(self, func, *args):
        """``func(*args)``, its time recorded."""
        t = time.monotonic()
        try:
            return func(*args)
        finally:
            self.spent.append(time.monotonic() - t)

    def reachable(self, left: int) -> int:
        """How many of ``left`` more analyses the remaining time allows, by the mean time of those
        tried (all of them when there is no deadline or nothing has been tried)."""
        if self.deadline is None or not (self.spent or self.first):
            return left
        mean = sum(self.spent) / len(self.spent) if self.spent else self.first
        room = max(0.0, self.deadline - time.monotonic())
        return min(left, int(room / max(mean, 1e-6)))
