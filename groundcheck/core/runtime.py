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
    "blas_loaded",
    "note_read",
    "files_read",
    "terminate_as_exit",
    "stop_at_once",
    "TEMPORARY",
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
#: threads back; the controller of the BLAS libraries loaded, and how many shared objects were
#: loaded when it was made
_BLAS_LOCK = threading.Lock()
_BLAS = {"depth": 0, "limiters": [], "controller": None, "loaded": None}


@contextmanager
def one_blas_thread():
    """While the block runs, the BLAS libraries loaded in this process use one thread; afterwards
    each has its caller's number back (threadpoolctl; nothing happens without it).

    The solves are sparse LU factorisations and small dense products, which gain nothing from BLAS
    threads; with OpenBLAS's threads spinning beside them a 5,000-device installation's solves were
    measured 44 times slower.  Blocks may nest and run in several threads at once (the live view):
    the first to enter sets the limit, the last to leave restores it.  A library loaded inside the
    block (scipy's sparse solver, imported for the first plate) is brought under the limit by
    :func:`blas_loaded`, called after such an import.

    Finding the loaded libraries takes threadpoolctl milliseconds (more than a small plan's
    whole solve), so the controller it makes is kept and made again only when the process has
    loaded another shared object since (:func:`_loaded_objects`)."""
    with _BLAS_LOCK:
        if _BLAS["depth"] == 0:
            controller = _blas_controller()
            if controller is not None:
                _BLAS["limiters"] = [controller.limit(limits=1, user_api="blas")]
        _BLAS["depth"] += 1
    try:
        yield
    finally:
        with _BLAS_LOCK:
            _BLAS["depth"] -= 1
            if _BLAS["depth"] == 0:
                for limiter in reversed(_BLAS["limiters"]):
                    limiter.restore_original_limits()
                _BLAS["limiters"] = []


def blas_loaded() -> None:
    """Inside a :func:`one_blas_thread` block, bring BLAS libraries loaded since it began under its
    limit (their own settings are given back with the others' when the block ends); outside one,
    nothing.  Called after a numerical import made inside the analysis.

    Parameters:
        none.
    Returns:
        None.
    References:
        none (bookkeeping).
    """
    with _BLAS_LOCK:
        if _BLAS["depth"] == 0 or not _BLAS["limiters"]:
            return
        before = {lib.filepath for lib in _BLAS["controller"].lib_controllers}
        controller = _blas_controller()
        new = [
            lib.filepath
            for lib in controller.lib_controllers
            if lib.filepath not in before and lib.user_api == "blas"
        ]
        if new:
            _BLAS["limiters"].append(controller.select(filepath=new).limit(limits=1))


def _blas_controller():
    """threadpoolctl's controller of the libraries loaded now (None without threadpoolctl): the
    kept one while no shared object has been loaded since it was made."""
    try:
        from threadpoolctl import ThreadpoolController
    except ImportError:  # pragma: no cover - a dependency; else the BLAS keeps its threads
        return None
    loaded = _loaded_objects()
    if _BLAS["controller"] is None or loaded is None or loaded != _BLAS["loaded"]:
        _BLAS["controller"], _BLAS["loaded"] = ThreadpoolController(), loaded
    return _BLAS["controller"]


def _loaded_objects() -> int | None:
    """How many shared objects the process has loaded (dl_iterate_phdr, as threadpoolctl finds
    them on Linux; a few dozen microseconds), or None where that cannot be asked."""
    if not sys.platform.startswith("linux"):
        return None
    try:
        import ctypes

        counter = _LOADED.get("counter")
        if counter is None:
            libc = ctypes.CDLL(None)
            callback_type = ctypes.CFUNCTYPE(
                ctypes.c_int, ctypes.c_void_p, ctypes.c_size_t, ctypes.c_void_p
            )
            count = [0]

            def seen(info, size, data):
                count[0] += 1
                return 0

            callback = callback_type(seen)

            def counter():
                count[0] = 0
                libc.dl_iterate_phdr(callback, None)
                return count[0]

            _LOADED["counter"] = counter
        return counter()
    except (OSError, AttributeError):  # pragma: no cover - no dl_iterate_phdr in this libc
        return None


#: the shared-object counter, made on first use
_LOADED: dict = {}


def quiet_child() -> None:
    """First steps of a forked worker: standard output and error go to the null device.

    Only the forking thread lives on in a child; had another thread of the parent (the progress
    spinner on a terminal) held the lock of ``sys.stderr`` at the moment of the fork, the child's
    final flush of it would wait forever.  Workers report through their return values instead.
    """
    sys.stdout = sys.stderr = open(os.devnull, "w")  # noqa: SIM115 - lives as long as the worker
    die_with_parent()


#: the process a worker was forked from, set in the parent just before each fork: a worker whose
#: parent ended before the worker asked to be told (its parent is then init, or a subreaper) must
#: see that it is an orphan, which ``os.getppid()`` read in the worker cannot tell it
_FORKED_FROM: list[int] = []
#: the C library's handle, opened in the parent before the first fork: a worker asks for its
#: parent-death signal without importing or loading anything (a module or loader lock held by
#: another of the parent's threads at the fork would never be released in the child)
_LIBC: list = []


def _before_fork() -> None:
    _FORKED_FROM[:] = [os.getpid()]
    if not _LIBC and sys.platform.startswith("linux"):
        try:
            import ctypes

            _LIBC.append(ctypes.CDLL(None, use_errno=True))
        except OSError:  # pragma: no cover - no C library to open
            _LIBC.append(None)


if hasattr(os, "register_at_fork"):
    os.register_at_fork(before=_before_fork)


def die_with_parent() -> None:
    """Linux: this worker gets SIGTERM when the process that started it ends (a SIGTERM or Ctrl-C
    to the run stops its workers within a moment instead of leaving them to finish their queue).
    Ctrl-C, which a terminal sends to the whole process group, is the parent's to answer: the
    worker ignores it; SIGTERM ends it at once, even inside a long numerical call."""
    signal.signal(signal.SIGINT, signal.SIG_IGN)
    signal.signal(signal.SIGTERM, signal.SIG_DFL)
    parent = _FORKED_FROM[0] if _FORKED_FROM else os.getppid()
    try:
        if _LIBC:
            libc = _LIBC[0]
        else:  # a worker started otherwise than by a fork of this process
            import ctypes

            libc = ctypes.CDLL(None, use_errno=True)
        libc.prctl(1, signal.SIGTERM, 0, 0, 0)  # PR_SET_PDEATHSIG
    except (OSError, AttributeError):  # pragma: no cover - not Linux
        return
    if os.getppid() != parent:  # the parent ended before the request was made
        os._exit(128 + signal.SIGTERM)


def _exit_on_signal(signum, frame):
    raise SystemExit(128 + signum)


#: temporary files being written (``renderers.output``): removed by :func:`stop_at_once`'s handler
TEMPORARY: set[str] = set()
#: the process whose command installed :func:`stop_at_once`'s handler
_STOPPING: list[int] = []


def _stop(signum, frame) -> None:
    if os.getpid() not in _STOPPING:  # a worker forked before its own start-up: gone quietly
        os._exit(128 + signum)
    for tmp in list(TEMPORARY):
        try:
            os.unlink(tmp)
        except OSError:
            pass
    try:
        if os.isatty(2):  # a progress line's spinner hides the cursor: clear it, show the cursor
            os.write(2, b"\r\x1b[2K\x1b[?25h")
        if signum == signal.SIGINT:
            os.write(2, b"groundcheck: interrupted\n")
    except OSError:
        pass
    os._exit(128 + signum)


def stop_at_once() -> None:
    """For the ``groundcheck`` command alone (never the library, nor :func:`cli.main`): Ctrl-C and
    SIGTERM end the process at once, with status 130 or 143, after removing a half-written
    output's temporary file; the workers follow (:func:`die_with_parent`).

    An exception raised by a signal can land in a callback the interpreter only reports — a
    weakref's, a fork hook's, a C library's — where it prints a traceback and the run goes on;
    ending the process from the handler leaves nothing half done that anything else would
    finish."""
    _STOPPING[:] = [os.getpid()]
    signal.signal(signal.SIGINT, _stop)
    signal.signal(signal.SIGTERM, _stop)


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
