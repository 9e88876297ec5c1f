"""The one exception root of groundcheck and the plan locations errors point at."""

from __future__ import annotations

from typing import NamedTuple

__all__ = [
    "Location",
    "GroundcheckError",
    "UnknownChoice",
    "PlanError",
    "PlanErrors",
    "LimitError",
    "shown",
    "html_text",
]


class Location(NamedTuple):
    """A place in a plan file: 1-based line and column (an immutable, ordered tuple)."""

    file: str
    line: int = 0
    column: int = 0

    def __str__(self) -> str:
        return f"{self.file}:{self.line}:{self.column}" if self.line else self.file

    def as_dict(self) -> dict:
        return {"file": self.file, "line": self.line, "column": self.column}


class GroundcheckError(Exception):
    """Root of every error groundcheck raises on purpose."""


class UnknownChoice(GroundcheckError):
    """A name given to a command (a channel, a source group) that the plan does not have; the
    message lists the ones it has."""


class PlanError(GroundcheckError):
    """One problem with a plan, at a location, with a hint on how to mend it."""

    def __init__(
        self, message: str, location: Location, hint: str = "", source_line: str | None = None
    ):
        super().__init__(message)
        self.message = message
        self.location = location
        self.hint = hint
        self.source_line = source_line

    def one_line(self) -> str:
        hint = f" ({self.hint})" if self.hint else ""
        return f"{self.location}: error: {self.message}{hint}"

    def render(self) -> str:
        """The one-line message, then the offending line with a caret under the spot; control
        characters of the plan (escape sequences among them) are shown as \\xNN, never sent to the
        terminal."""
        out = [shown(self.one_line())]
        if self.source_line is not None:
            line = shown(self.source_line.rstrip("\n").replace("\t", " "))
            out.append("    " + line)
            out.append("    " + " " * max(0, self.location.column - 1) + "^")
        return "\n".join(out)

    def __str__(self) -> str:
        return self.one_line()


#: control characters (but tab and newline) as they are shown: C0, DEL and C1 as \xNN; the
#: bidirectional overrides, embeddings, isolates and marks, the zero-width characters and the line
#: and paragraph separators as \uNNNN (Unicode's Bidi_Control and Default_Ignorable format
#: characters: they reorder or hide what is shown)
_CONTROL = {c: f"\\x{c:02x}" for c in (*range(0, 9), *range(11, 32), *range(127, 160))}
_CONTROL.update(
    {
        c: f"\\u{c:04x}"
        for c in (
            0x061C,
            0x180E,
            0x200B,
            0x200C,
            0x200D,
            0x200E,
            0x200F,
            *range(0x2028, 0x202F),
            *range(0x2060, 0x2070),
            0xFEFF,
            *range(0xFFF9, 0xFFFC),
        )
    }
)


def shown(text) -> str:
    """Text from a plan as a terminal may show it: control characters (escape sequences, C1
    controls, bidi overrides and zero-width characters among them) written as \\xNN or \\uNNNN, so
    a plan or a file name can never drive the terminal nor hide or reorder what it shows."""
    return str(text).translate(_CONTROL)


def html_text(text, quote: bool = True) -> str:
    """Text for an HTML page: control characters shown as in :func:`shown`, then markup escaped."""
    from html import escape

    return escape(shown(text), quote)


class LimitError(PlanError):
    """A plan over one of groundcheck's size limits (file size, elements, nesting)."""


class PlanErrors(GroundcheckError):
    """Every error found in a plan, in file order."""

    def __init__(self, errors: list[PlanError]):
        # an error inside a block placed twice is the same error at the same place: said once
        unique = {(e.location, e.message): e for e in reversed(errors)}
        errors = sorted(
            unique.values(), key=lambda e: (e.location.file, e.location.line, e.location.column)
        )
        super().__init__("\n".join(e.one_line() for e in errors[:50]))
        self.errors = errors

    def render(self, limit: int = 50) -> str:
        """The first ``limit`` errors in full, then how many more there are."""
        shown_errors = [e.render() for e in self.errors[:limit]]
        if len(self.errors) > limit:
            shown_errors.append(
                f"... and {len(self.errors) - limit:,} more errors (the first {limit} are shown; "
                "mend them and check again)"
            )
        return "\n".join(shown_errors)
