"""Reading a plan file or standard input: regular files only, never past the size limit, UTF-8
text; and the stand-in texts the repair advisor tries in place of a file."""

from __future__ import annotations

import stat
import sys
from contextlib import contextmanager
from contextvars import ContextVar
from pathlib import Path

from ..core.errors import LimitError, Location, PlanError, PlanErrors
from ..core.runtime import note_read
from .limits import LIMITS

__all__ = ["substituted", "read_plan_file", "read_stdin", "PLAN_SUFFIX"]

#: the file extension of groundcheck plans
PLAN_SUFFIX = ".gplan"

#: texts that stand in for plan files while a changed plan is tried (resolved path -> text): the
#: repair advisor edits a device's own plan this way, never on disk
_SUBSTITUTES: ContextVar[dict[str, str] | None] = ContextVar("substitutes", default=None)


@contextmanager
def substituted(texts: dict[str, str]):
    """While the block runs, reading any of these plan files (by resolved path) gives the text here
    instead."""
    token = _SUBSTITUTES.set({str(Path(k).resolve()): v for k, v in texts.items()})
    try:
        yield
    finally:
        _SUBSTITUTES.reset(token)


def read_plan_file(p: Path, shown: str) -> str:
    loc = Location(shown, 0, 0)
    stand_in = _SUBSTITUTES.get()
    if stand_in and str(p.resolve()) in stand_in:
        return stand_in[str(p.resolve())]
    try:
        st = p.stat()
        if not stat.S_ISREG(st.st_mode):  # a FIFO would hang, a device never end
            raise PlanErrors(
                [
                    PlanError(
                        f"{shown} is not a regular file (a folder, a device, a FIFO or a socket)",
                        loc,
                        f"name a {PLAN_SUFFIX} file",
                    )
                ]
            )
        if st.st_size > LIMITS["file_bytes"]:
            raise PlanErrors(
                [
                    LimitError(
                        f"plan file is {st.st_size} bytes, over the limit of "
                        f"{LIMITS['file_bytes']}",
                        loc,
                        "split it with include",
                    )
                ]
            )
        with open(p, "rb") as fh:  # bounded even if the file grows while it is read
            data = fh.read(LIMITS["file_bytes"] + 1)
        note_read(p)
        if len(data) > LIMITS["file_bytes"]:
            raise PlanErrors(
                [
                    LimitError(
                        f"plan file is over the limit of {LIMITS['file_bytes']} bytes",
                        loc,
                        "split it with include",
                    )
                ]
            )
    except OSError as e:
        raise PlanErrors(
            [
                PlanError(
                    f"cannot read {shown}: {e.strerror}", loc, "check the path and permissions"
                )
            ]
        ) from None
    return _decode(data, shown)


def read_stdin() -> str:
    """Standard input, read no further than the size limit, and UTF-8 like a file."""
    stream = getattr(sys.stdin, "buffer", None)
    if stream is None:  # a text stream put in place by a caller
        data = sys.stdin.read(LIMITS["file_bytes"] + 1).encode("utf-8", "surrogateescape")
    else:
        data = stream.read(LIMITS["file_bytes"] + 1)
    if len(data) > LIMITS["file_bytes"]:
        raise PlanErrors(
            [
                LimitError(
                    f"standard input is over the limit of {LIMITS['file_bytes']} bytes",
                    Location("<stdin>", 0, 0),
                    "split the plan with include",
                )
            ]
        )
    return _decode(data, "<stdin>")


def _decode(data: bytes, shown: str) -> str:
    try:
        text = data.decode("utf-8")
    except UnicodeDecodeError as e:
        before = data[: e.start]
        line = before.count(b"\n") + 1
        col = e.start - (before.rfind(b"\n") + 1) + 1
        raise PlanErrors(
            [
                PlanError(
                    "the file is not UTF-8 text",
                    Location(shown, line, col),
                    "save the plan as UTF-8 text",
                )
            ]
        ) from None
    if "\x00" in text:
        line = text[: text.index("\x00")].count("\n") + 1
        raise PlanErrors(
            [
                PlanError(
                    "the file holds a NUL character: not a text plan",
                    Location(shown, line, 1),
                    "save the plan as UTF-8 text",
                )
            ]
        )
    return text.lstrip("\ufeff")
