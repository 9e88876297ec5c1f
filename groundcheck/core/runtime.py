"""Process-level helpers shared by every stage: the garbage-collector pause and forking primitives.

Forking is used on Linux only, and never from inside a daemonic worker (which may not start
processes of its own).
"""

from __future__ import annotations

import gc
import os
import sys
from contextlib import contextmanager

__all__ = ["no_gc", "can_fork", "quiet_child", "single_threaded_blas", "note_read", "files_read"]

#: every plan file this process has read (resolved): outputs may never be written over one of them
_READ: set = set()


def note_read(path) -> None:
    """Remember that a plan file was read (the loader calls it for the plan, its includes and device plans)."""
    _READ.add(path.resolve())


def files_read() -> tuple:
    return tuple(sorted(_READ))


@contextmanager
def no_gc():
    """Pause Python's cyclic garbage collector: loading makes millions of small acyclic objects, and
    its repeated full collections would otherwise make a large plan's load grow faster than linearly."""
    was = gc.isenabled()
    gc.disable()
    try:
        yield
    finally:
        if was:
            gc.enable()


def can_fork() -> bool:
    """Whether worker processes can be forked here (Linux, and not already a daemonic worker)."""
    if not sys.platform.startswith("linux"):
        return False
    import multiprocessing
    return not multiprocessing.current_process().daemon


def single_threaded_blas():
    """A function that makes the numerical libraries of this process single-threaded, or None.

    Call it in the parent before forking: the import then happens once, there, and a forked child does not
    need the import machinery."""
    try:
        from threadpoolctl import threadpool_limits
    except ImportError:  # pragma: no cover - a dependency; without it the BLAS keeps its threads
        return None
    return lambda: threadpool_limits(1)


def quiet_child() -> None:
    """First steps of a forked worker: standard output and error go to the null device.

    Only the forking thread lives on in a child; had another thread of the parent (the progress
    spinner on a terminal) held the lock of ``sys.stderr`` at the moment of the fork, the child's
    final flush of it would wait forever.  Workers report through their return values instead.
    """
    sys.stdout = sys.stderr = open(os.devnull, "w")  # noqa: SIM115 - lives as long as the worker
