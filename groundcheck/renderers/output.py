"""Writing output files safely: atomically, never over an input plan, only where the user said."""

from __future__ import annotations

import os
import tempfile
from pathlib import Path

from ..core.errors import GroundcheckError
from ..core.runtime import TEMPORARY, files_read, terminate_as_exit

__all__ = ["write_atomic", "OutputError"]


class OutputError(GroundcheckError):
    """An output file that may not or cannot be written."""


def write_atomic(path: Path, data: str | bytes, protect: list[Path] = ()) -> None:
    """Write ``data`` to ``path`` through a temporary file in the same folder and a rename.

    Refuses to write over any file in ``protect`` (the input plans), and to
    write into a folder that does not exist.
    """
    path = Path(path)
    try:
        target = path.resolve()
    except (RuntimeError, OSError):
        raise OutputError(f"{path} is a link in a loop (name an output file)") from None
    protect = [*protect, *files_read()]
    for p in protect:
        if os.path.abspath(p) == os.path.abspath(
            path
        ):  # the plan named, even one that could not be read
            raise OutputError(
                f"refusing to write over {p}, a plan this run read (name another output file)"
            )
        try:
            if p.exists() and target.exists() and os.path.samefile(p, target):
                raise OutputError(
                    f"refusing to write over {p}, a plan this run read (name another output file)"
                )
        except OSError:
            continue
    if target.is_dir():
        raise OutputError(f"{path} is a folder (name an output file)")
    if target.exists() and not target.is_file():
        raise OutputError(
            f"{path} is not a regular file (a device, a FIFO or a socket): name an output file, "
            "or write to standard output with -o -"
        )
    folder = target.parent
    if not folder.is_dir():
        raise OutputError(f"folder {path.parent} does not exist")
    with terminate_as_exit():  # SIGTERM while the temporary file exists removes it
        _write_through_temporary(target, folder, data)


def _umask() -> int:
    """The process's file-mode creation mask (read by setting it, and set back at once)."""
    mask = os.umask(0o022)
    os.umask(mask)
    return mask


def _write_through_temporary(target: Path, folder: Path, data: str | bytes) -> None:
    mode = "wb" if isinstance(data, bytes) else "w"
    fd, tmp = tempfile.mkstemp(prefix=".groundcheck-", dir=folder)
    TEMPORARY.add(tmp)
    try:
        with os.fdopen(
            fd, mode, **({} if isinstance(data, bytes) else {"encoding": "utf-8", "newline": "\n"})
        ) as fh:
            fh.write(data)
        os.chmod(tmp, 0o666 & ~_umask())  # as any new file of the user's would be
        os.replace(tmp, target)
    except BaseException:
        try:
            os.unlink(tmp)
        except OSError:
            pass
        raise
    finally:
        TEMPORARY.discard(tmp)
