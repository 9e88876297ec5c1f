"""Results of pure computations kept between runs: arrays in the user's cache folder.

A plate's reduction to its fastenings (a sparse factorisation of a grid of some 20,000 nodes,
twice, for the error estimate) and the spread of a unit current over it are the costliest part of
checking a usual chassis, and each depends only on the plate's geometry and the figures passed in.
A plan checked again (after an edit elsewhere, in the live view, in a script) finds them here
instead of factorising again.

Correctness: an entry is read only for the same key — the computation's arguments written exactly
(``repr`` of floats round-trips), the text of the modules that compute it, and the versions of
Python, numpy and scipy and the machine's kind — and it holds that key in full, compared on
reading; the arrays are those the computation returned, stored without loss (``.npz``, read
without pickle), so a result read back is the same to the bit as one computed again on this
machine.  Anything unexpected (no usable folder, a file that does not read, another key) means the
computation runs as if nothing were kept; writing goes through a temporary file and a rename, so a
reader never meets half a file.  The store is kept under :data:`BUDGET` bytes, the least recently
written entries removed first.
"""

from __future__ import annotations

import hashlib
import os
import platform
import sys
import tempfile
import time
import zipfile
from functools import lru_cache
from pathlib import Path
from typing import Callable

import numpy as np

from .cache import cache_folder, is_private

__all__ = ["stored", "store_folder", "BUDGET", "SUBFOLDER"]

#: the store's folder inside the user's cache folder
SUBFOLDER = "results"

#: the store's size at most, bytes; beyond it the oldest entries are removed down to 3/4 of it
BUDGET = 256 * 2**20


def store_folder() -> Path | None:
    """The store's folder (made on first use, private to the user), or None: no store."""
    base = cache_folder()
    if base is None:
        return None
    folder = base / SUBFOLDER
    try:
        folder.mkdir(mode=0o700, exist_ok=True)
        st = folder.lstat()
    except OSError:
        return None
    return folder if folder.is_dir() and not folder.is_symlink() and is_private(st) else None


@lru_cache(maxsize=None)
def _code(modules: tuple[str, ...]) -> str | None:
    """A digest of the named modules' source text and of the libraries the arrays come from (None
    when a module's source cannot be read: nothing is then stored)."""
    h = hashlib.sha256()
    for name in modules:
        try:
            h.update(Path(sys.modules[name].__file__).read_bytes())
        except (KeyError, AttributeError, TypeError, OSError):
            return None
    import scipy

    h.update(
        "\0".join((sys.version, np.__version__, scipy.__version__, platform.machine())).encode()
    )
    return h.hexdigest()


def stored(
    kind: str, args: tuple, modules: tuple[str, ...], compute: Callable[[], tuple]
) -> tuple:
    """``compute()`` — a tuple of numpy arrays and floats — read from the store when it holds the
    same computation, else computed and written there.

    Parameters:
        kind: the computation's name (a word: the file's name starts with it).
        args: its arguments (numbers, strings and tuples of them; written by ``repr``).
        modules: the modules whose code computes it (their source text is part of the key).
        compute: the computation.
    Returns:
        what ``compute()`` returns (floats as Python floats, arrays as written).
    References:
        none (bookkeeping).
    """
    folder, code = store_folder(), _code(modules)
    if folder is None or code is None:
        return compute()
    key = f"{kind}\0{args!r}\0{code}"
    path = folder / f"{kind}-{hashlib.sha256(key.encode()).hexdigest()[:40]}.npz"
    got = _read(path, key)
    if got is not None:
        return got
    out = compute()
    _write(folder, path, key, out)
    return out


def _read(path: Path, key: str) -> tuple | None:
    try:
        st = path.lstat()
        if not path.is_file() or path.is_symlink() or not is_private(st):
            return None
        with np.load(path, allow_pickle=False) as z:
            if str(z["key"]) != key:
                return None
            floats = z["floats"]
            return tuple(
                float(floats[i]) if is_float else z[f"a{i}"]
                for i, is_float in enumerate(z["is_float"].tolist())
            )
    except (OSError, KeyError, ValueError, zipfile.BadZipFile, EOFError):
        return None


def _write(folder: Path, path: Path, key: str, out: tuple) -> None:
    arrays = {f"a{i}": x for i, x in enumerate(out) if isinstance(x, np.ndarray)}
    is_float = np.array([not isinstance(x, np.ndarray) for x in out])
    floats = np.array([0.0 if isinstance(x, np.ndarray) else float(x) for x in out])
    try:
        fd, tmp = tempfile.mkstemp(dir=folder, suffix=".part")
        try:
            with os.fdopen(fd, "wb") as f:
                np.savez(f, key=np.array(key), is_float=is_float, floats=floats, **arrays)
            os.replace(tmp, path)
        except BaseException:
            os.unlink(tmp)
            raise
        _trim(folder)
    except (OSError, ValueError):  # a full disk, say: the result is only not kept
        return


def _trim(folder: Path) -> None:
    """The oldest entries removed while the store is over :data:`BUDGET`, and part files an
    interrupted write left more than an hour ago."""
    stale = time.time() - 3600
    for p in folder.glob("*.part"):
        try:
            if p.stat().st_mtime < stale:
                p.unlink()
        except OSError:
            continue
    entries = []
    for p in folder.glob("*.npz"):
        try:
            st = p.stat()
        except OSError:
            continue
        entries.append((st.st_mtime, st.st_size, p))
    total = sum(size for _, size, _ in entries)
    if total <= BUDGET:
        return
    for _, size, p in sorted(entries):
        if total <= BUDGET * 3 // 4:
            break
        try:
            p.unlink()
        except OSError:
            continue
        total -= size
