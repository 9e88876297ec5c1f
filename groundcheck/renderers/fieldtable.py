"""The terminal report's table of field-source directions: per channel and source, the direction
its figures use (stated, or the worst at that channel's output), the hum it gives there, and the
hum with the worst direction and with each axis, so that a stated axis can be weighed against the
worst."""

from __future__ import annotations

import math

from rich.console import Console
from rich.markup import escape as _escape
from rich.table import Table

from ..core.errors import shown
from ..core.plain import readable

__all__ = ["field_axes_table", "direction_words"]


def _uv(x) -> str:
    if x is None or not math.isfinite(x):
        return "–"
    return readable(x * 1e6, ".3g")


def direction_words(axis: list[float]) -> str:
    """'x', 'y', 'z' for an axis, else the unit vector's components."""
    named = {(1.0, 0.0, 0.0): "x", (0.0, 1.0, 0.0): "y", (0.0, 0.0, 1.0): "z"}.get(
        tuple(abs(round(x, 4)) for x in axis)
    )
    return named or "(" + ", ".join(readable(x, ".2g") for x in axis) + ")"


def field_axes_table(channels: dict, console: Console) -> None:
    """Print the table when any channel has a field source with a direction.

    Parameters:
        channels: the hum budget's channels (each with ``field_axes``).
        console: where to print.
    Returns:
        nothing.
    References:
        none (presentation).
    """
    rows = [(ch, r) for ch, h in channels.items() for r in h.field_axes]
    if not rows:
        return
    t = Table(
        title="Field-source directions per channel (hum at the output, µV rms; – : a ring through "
        "the deck)",
        title_justify="left",
    )
    for col in (
        "channel",
        "source",
        "direction",
        "chosen",
        "hum",
        "worst",
        "worst direction",
        "x",
        "y",
        "z",
    ):
        t.add_column(
            col,
            justify="left"
            if col in ("channel", "source", "direction", "chosen", "worst direction")
            else "right",
        )
    for ch, r in rows:
        chosen = "stated" if r.chosen == "stated" else f"worst ({r.measure})"
        t.add_row(
            _escape(shown(ch)),
            _escape(shown(r.source)),
            direction_words(r.axis),
            chosen,
            _uv(r.level),
            _uv(r.worst_level),
            direction_words(r.worst_axis),
            *(_uv(r.axes[a]) for a in "xyz"),
        )
    console.print(t)
    console.print()
