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
from contextlib import contextmanager
from concurrent.futures import FIRST_COMPLETED, ProcessPoolExecutor, wait
from concurrent.futures.process import BrokenProcessPool
from functools import partial
from typing import Callable, Sequence, TypeVar

from ..core.errors import GroundcheckError
from ..core.runtime import can_fork, quiet_child, single_threaded_blas

__all__ = ["map_frequencies", "run_tasks", "run_while", "WorkerError"]

T = TypeVar("T")

#: the tasks of the run in progress, inherited by the forked workers
_TASKS: Sequence[Callable] = ()


class WorkerError(GroundcheckError):
    """A worker process that died before giving its results."""


_LIMIT_THREADS: Callable | None = None

#: set in a worker: the work it is given runs there, in one process (two processes on two cores
#: already; workers of workers would only compete)
_WORKER = False


def _start_worker() -> None:
    global _WORKER
    _WORKER = True
    quiet_child()  # Ctrl-C ignored, SIGTERM at once: the parent answers, its workers follow
    gc.disable()
    if _LIMIT_THREADS is not None:
        _LIMIT_THREADS()


def _run(index: int):
    return _TASKS[index]()


def _run_and_collect(index: int):
    """A task of :func:`run_while`, then the cycles it left collected: a worker runs with the
    collector paused (so as not to touch what it inherited), and one that runs many tasks (the
    advisor's candidates, a whole analysis each) would otherwise keep every task's garbage.  Its
    new objects are all in the youngest generation, which is collected without reading the
    inherited ones."""
    try:
        return _TASKS[index]()
    finally:
        gc.collect(0)


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
    if jobs <= 1 or _WORKER or not can_fork():
        return [task() for task in tasks]
    order = (
        sorted(range(len(tasks)), key=lambda i: -costs[i])
        if costs is not None
        else range(len(tasks))
    )
    out: list = [None] * len(tasks)
    try:
        with _workers(tasks, jobs) as pool:
            futures = {i: pool.submit(_run, i) for i in order}
            for i, fut in futures.items():
                out[i] = fut.result()
    except OSError:  # no process could be started (a process limit): one process does it all
        out = [task() for task in tasks]
    return out


@contextmanager
def _workers(tasks: list, jobs: int):
    """A pool of ``jobs`` forked workers that inherit ``tasks``, single-threaded: stopped at once
    (the queue not worked through) on any error or Ctrl-C in the caller, shut down in order
    otherwise.  A worker that dies (killed, out of memory) is a :class:`WorkerError`, never a wait;
    an ``OSError`` (no process could be started) is the caller's to answer."""
    global _TASKS, _LIMIT_THREADS
    _TASKS, _LIMIT_THREADS = tasks, single_threaded_blas()
    try:
        pool = ProcessPoolExecutor(
            jobs, mp_context=multiprocessing.get_context("fork"), initializer=_start_worker
        )
        try:
            yield pool
        except BaseException:
            _stop(pool)
            raise
        pool.shutdown()
    except BrokenProcessPool:
        raise WorkerError(
            "a worker process of --jobs died before it finished (killed, or out of memory); run "
            "with --jobs 1"
        ) from None
    finally:
        _TASKS = ()


def run_while(
    tasks: Sequence[Callable[[], T]],
    jobs: int,
    may_start: Callable[[], bool],
    finished: Callable[[int, T], None],
) -> list[int]:
    """The tasks run in their order by up to ``jobs`` processes, each started only while
    ``may_start()`` is true (a deadline); ``finished(index, result)`` is called in this process as
    each one ends.  Once ``may_start()`` is false no further task starts.

    Parameters:
        tasks: functions of no arguments, independent of each other (their results picklable).
        jobs: processes.
        may_start: asked before each task is started.
        finished: told each task's result, in the order they end.
    Returns:
        the indices of the tasks never started.
    References:
        none (process pool).
    """
    tasks = list(tasks)
    jobs = min(max(1, int(jobs)), len(tasks))
    ended: set = set()

    def end(i: int, result) -> None:
        ended.add(i)
        finished(i, result)

    if jobs <= 1 or _WORKER or not can_fork():
        return _in_turn(tasks, ended, may_start, end)
    try:
        with _workers(tasks, jobs) as pool:
            return _share_out(pool, len(tasks), jobs, may_start, end)
    except OSError:  # no process could be started (a process limit): the rest in this one
        return _in_turn(tasks, ended, may_start, end)


def _in_turn(tasks, ended: set, may_start, end) -> list[int]:
    """The tasks not yet ended, one after the other in this process, while new ones may start."""
    todo = [i for i in range(len(tasks)) if i not in ended]
    for k, i in enumerate(todo):
        if not may_start():
            return todo[k:]
        end(i, tasks[i]())
    return []


def _share_out(pool, count: int, jobs: int, may_start, finished) -> list[int]:
    """:func:`run_while`'s loop: keep ``jobs`` tasks running while new ones may start."""
    running: dict = {}
    nxt, stopped = 0, False
    while nxt < count or running:
        while nxt < count and len(running) < jobs and not stopped:
            if not may_start():
                stopped = True
                break
            running[pool.submit(_run_and_collect, nxt)] = nxt
            nxt += 1
        if not running:
            break
        done, _ = wait(running, return_when=FIRST_COMPLETED)
        for fut in sorted(done, key=running.get):
            finished(running.pop(fut), fut.result())
    return list(range(nxt, count))


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
