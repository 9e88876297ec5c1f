"""Process-level helpers shared by every stage: the garbage-collector pause, forking primitives and
the SIGTERM handler held only while an output file is written.

Forking is used on Linux only, and never from inside a daemonic worker (which may not start
processes of its own).
"""

from __future__ import annotations

import gc
import os
import signal
import sys
import threading
from contextlib import contextmanager
from pathlib import Path

__all__ = [
    "no_gc",
    "can_fork",
    "quiet_child",
    "die_with_parent",
    "single_threaded_blas",
    "one_blas_thread",
    "note_read",
    "files_read",
    "terminate_as_exit",
]

#: every plan file this process has read (resolved): outputs may never be written over one of them
_READ: set = set()


def note_read(path) -> None:
    """Remember that a plan file was read (the loader calls it for the plan, its includes and
    device plans)."""
    _READ.add(Path(path).resolve())


def files_read() -> tuple:
    return tuple(sorted(_READ))


@contextmanager
def no_gc():
    """Pause Python's cyclic garbage collector: loading makes millions of small acyclic objects,
    and its repeated full collections would otherwise make a large plan's load grow faster than
    linearly."""
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

    Call it in the parent before forking: the import then happens once, there, and a forked child
    does not need the import machinery."""
    try:
        from threadpoolctl import threadpool_limits
    except ImportError:  # pragma: no cover - a dependency; without it the BLAS keeps its threads
        return None
    return lambda: threadpool_limits(1)


#: the one-thread limit of this process: the blocks holding it, and what gives the caller's
#: threads back
_BLAS_LOCK = threading.Lock()
_BLAS = {"depth": 0, "limiter": None}


@contextmanager
def one_blas_thread():
    """While the block runs, the BLAS libraries loaded in this process use one thread; afterwards
    each has its caller's number back (threadpoolctl; nothing happens without it).

    The solves are sparse LU factorisations and small dense products, which gain nothing from BLAS
    threads; with OpenBLAS's threads spinning beside them a 5,000-device installation's solves were
    measured 44 times slower.  Blocks may nest and run in several threads at once (the live view):
    the first to enter sets the limit, the last to leave restores it.  A library loaded inside the
    block keeps its own setting, so enter it after the numerical imports (``analyze`` does)."""
    with _BLAS_LOCK:
        if _BLAS["depth"] == 0:
            try:
                from threadpoolctl import threadpool_limits
            except ImportError:  # pragma: no cover - a dependency; else the BLAS keeps its threads
                _BLAS["limiter"] = None
            else:
                _BLAS["limiter"] = threadpool_limits(limits=1, user_api="blas")
        _BLAS["depth"] += 1
    try:
        yield
    finally:
        with _BLAS_LOCK:
            _BLAS["depth"] -= 1
            if _BLAS["depth"] == 0 and _BLAS["limiter"] is not None:
                _BLAS["limiter"].restore_original_limits()
                _BLAS["limiter"] = None


def quiet_child() -> None:
    """First steps of a forked worker: standard output and error go to the null device.

    Only the forking thread lives on in a child; had another thread of the parent (the progress
    spinner on a terminal) held the lock of ``sys.stderr`` at the moment of the fork, the child's
    final flush of it would wait forever.  Workers report through their return values instead.
    """
    sys.stdout = sys.stderr = open(os.devnull, "w")  # noqa: SIM115 - lives as long as the worker
    die_with_parent()


def die_with_parent() -> None:
    """Linux: this worker gets SIGTERM when the process that started it ends (a SIGTERM or Ctrl-C
    to the run stops its workers within a moment instead of leaving them to finish their queue)."""
    parent = os.getppid()
    try:
        import ctypes

        libc = ctypes.CDLL(None, use_errno=True)
        libc.prctl(1, signal.SIGTERM, 0, 0, 0)  # PR_SET_PDEATHSIG
    except (OSError, AttributeError):  # pragma: no cover - not Linux
        return
    if os.getppid() != parent:  # the parent ended before the request was made
        os._exit(128 + signal.SIGTERM)


def _exit_on_signal(signum, frame):
    raise SystemExit(128 + signum)


@contextmanager
def terminate_as_exit():
    """While the block runs, SIGTERM ends the run as an exception does (status 143), so the block's
    own clean-up (a half-written output's temporary file) runs; the previous handler is back
    afterwards.

    Only in the main thread and only over the default handler: a program that set its own keeps it,
    and nothing is left installed in the process once the block is done."""
    if (
        threading.current_thread() is not threading.main_thread()
        or signal.getsignal(signal.SIGTERM) != signal.SIG_DFL
    ):
        yield
        return
    previous = signal.signal(signal.SIGTERM, _exit_on_signal)
    try:
        yield
    finally:
        signal.signal(signal.SIGTERM, previous)
