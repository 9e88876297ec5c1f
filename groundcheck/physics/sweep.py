"""Independent work at many frequencies, optionally shared among several processes.

Each frequency of a hum budget or a benchmark sweep needs its own
factorisation of the admittance matrix, and nothing passes from one
frequency to the next: the work is a pure function of the frequency.  With
``jobs`` > 1 the frequencies (or any independent tasks, :func:`run_tasks`) go to
forked worker processes, which inherit the circuit and every other input from
the parent (nothing large is pickled); only each task's result travels back.
The results come back in the order of the tasks given, so the outcome does not
depend on the number of processes.

Each worker runs its numerical libraries single-threaded (threadpoolctl): the sparse LU gains
nothing from OpenBLAS threads, and two processes each spinning two BLAS threads on two cores
run several times slower than one process alone.  The workers also pause the cyclic garbage
collector, so that they do not touch (and copy) the parent's objects they inherit.

Forking is used on Linux only; elsewhere, inside a daemonic worker (which may
not start processes of its own), or for a single frequency, the work runs in
this process.
"""

from __future__ import annotations

import gc
import multiprocessing
from concurrent.futures import ProcessPoolExecutor
from concurrent.futures.process import BrokenProcessPool
from functools import partial
from typing import Callable, Sequence, TypeVar

from ..core.errors import GroundcheckError
from ..core.runtime import can_fork, quiet_child, single_threaded_blas

__all__ = ["map_frequencies", "run_tasks", "WorkerError"]

T = TypeVar("T")

#: the tasks of the run in progress, inherited by the forked workers
_TASKS: Sequence[Callable] = ()


class WorkerError(GroundcheckError):
    """A worker process that died before giving its results."""


_LIMIT_THREADS: Callable | None = None


def _start_worker() -> None:
    quiet_child()  # Ctrl-C ignored, SIGTERM at once: the parent answers, its workers follow
    gc.disable()
    if _LIMIT_THREADS is not None:
        _LIMIT_THREADS()


def _run(index: int):
    return _TASKS[index]()


def run_tasks(
    tasks: Sequence[Callable[[], T]], jobs: int = 1, costs: Sequence[float] | None = None
) -> list[T]:
    """``[task() for task in tasks]``, computed by up to ``jobs`` processes.

    Each worker takes the next task as soon as it is free, the costliest first (by ``costs``, an
    estimate in any unit; the given order where equal), which keeps both cores busy when the tasks
    differ in size.  The tasks need not be picklable (the workers inherit them); their results must
    be.

    Parameters:
        tasks: functions of no arguments, independent of each other.
        jobs: processes.
        costs: each task's estimated cost (None: the given order).
    Returns:
        the results in the order of the tasks.
    References:
        longest-processing-time-first scheduling (R. L. Graham, "Bounds on multiprocessing timing
        anomalies", SIAM J. Appl. Math. 17, 1969).
    """
    tasks = list(tasks)
    jobs = min(max(1, int(jobs)), len(tasks))
    if jobs <= 1 or not can_fork():
        return [task() for task in tasks]
    global _TASKS, _LIMIT_THREADS
    _TASKS, _LIMIT_THREADS = tasks, single_threaded_blas()
    order = (
        sorted(range(len(tasks)), key=lambda i: -costs[i])
        if costs is not None
        else range(len(tasks))
    )
    out: list = [None] * len(tasks)
    try:
        # a process pool that notices a worker dying (killed, out of memory) instead of waiting for
        # it for ever
        pool = ProcessPoolExecutor(
            jobs, mp_context=multiprocessing.get_context("fork"), initializer=_start_worker
        )
        try:
            futures = {i: pool.submit(_run, i) for i in order}
            for i, fut in futures.items():
                out[i] = fut.result()
        except BaseException:
            _stop(pool)  # Ctrl-C or an error: the queue is not worked through first
            raise
        pool.shutdown()
    except BrokenProcessPool:
        raise WorkerError(
            "a worker process of --jobs died before it finished (killed, or out of memory); run "
            "with --jobs 1"
        ) from None
    except OSError:  # no process could be started (a process limit): one process does it all
        out = [task() for task in tasks]
    finally:
        _TASKS = ()
    return out


def _stop(pool: ProcessPoolExecutor) -> None:
    """The queued tasks cancelled and the workers ended now, without waiting for the tasks they
    run."""
    workers = list((getattr(pool, "_processes", None) or {}).values())
    pool.shutdown(wait=False, cancel_futures=True)
    for w in workers:
        w.terminate()
    for w in workers:
        w.join(1.0)


def map_frequencies(work: Callable[[float], T], freqs: Sequence[float], jobs: int = 1) -> list[T]:
    """``[work(f) for f in freqs]``, computed by up to ``jobs`` processes (see :func:`run_tasks`).

    ``work`` need not be picklable; its results must be.

    Parameters:
        work: a function of one frequency.
        freqs: the frequencies.
        jobs: processes.
    Returns:
        the results in the order of freqs.
    References:
        none (process pool).
    """
    return run_tasks([partial(work, f) for f in freqs], jobs)
