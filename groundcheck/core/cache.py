"""The user's cache folder for groundcheck: what is kept between runs (the compiled plan grammar,
the plates' reductions) lives in ``$XDG_CACHE_HOME/groundcheck`` (or ``~/.cache/groundcheck``),
never in the installed package.  A folder that cannot be made or written, or that another user
could write into, means no cache, silently: everything kept there is only an optimisation.
"""

from __future__ import annotations

import os
from pathlib import Path

__all__ = ["cache_folder", "is_private", "FOLDER"]

#: the folder's name inside the user's cache folder
FOLDER = "groundcheck"


def cache_folder() -> Path | None:
    """The user's cache folder for groundcheck (made, private to the user, on first use), or None
    when there is none that can be used safely."""
    base = os.environ.get("XDG_CACHE_HOME", "")
    try:
        # the XDG specification: a relative XDG_CACHE_HOME is invalid and ignored
        root = Path(base) if os.path.isabs(base) else Path.home() / ".cache"
        folder = root / FOLDER
        folder.mkdir(mode=0o700, parents=True, exist_ok=True)
        st = folder.stat()
    except (
        OSError,
        RuntimeError,
    ):  # no home folder, a read-only or full file system, a file in the way
        return None
    if not is_private(st):
        return None
    return folder


def is_private(st: os.stat_result) -> bool:
    """Owned by this user and writable by no one else (a pickle from elsewhere could run code)."""
    getuid = getattr(os, "getuid", None)
    return (getuid is None or st.st_uid == getuid()) and not st.st_mode & 0o022
