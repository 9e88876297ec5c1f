"""Independent work at many frequencies, optionally shared among several processes.

Each frequency of a hum budget or a benchmark sweep needs its own
factorisation of the admittance matrix, and nothing passes from one
frequency to the next: the work is a pure function of the frequency.  With
``jobs`` > 1 the frequencies are dealt out to forked worker processes, which
inherit the circuit and every other input from the parent (nothing large is
pickled); only each frequency's result travels back.  The results come back
in the order of the frequencies given, so the outcome does not depend on the
number of processes.

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
from typing import Callable, Sequence, TypeVar

from ..core.errors import GroundcheckError
from ..core.runtime import can_fork, quiet_child, single_threaded_blas

__all__ = ["map_frequencies"]

T = TypeVar("T")

#: the work of the sweep in progress, inherited by the forked workers
_WORK: Callable | None = None
_FREQS: Sequence[float] = ()


class WorkerError(GroundcheckError):
    """A worker process that died before giving its results."""
_LIMIT_THREADS: Callable | None = None


def _start_worker() -> None:
    quiet_child()
    gc.disable()
    if _LIMIT_THREADS is not None:
        _LIMIT_THREADS()


def _run(indices: list[int]) -> list:
    assert _WORK is not None
    return [_WORK(_FREQS[i]) for i in indices]


def map_frequencies(work: Callable[[float], T], freqs: Sequence[float], jobs: int = 1) -> list[T]:
    """``[work(f) for f in freqs]``, computed by up to ``jobs`` processes.

    The frequencies are dealt out in turn (the first to worker 1, the second
    to worker 2, ...), which balances the load when the cost varies smoothly
    with frequency.  ``work`` need not be picklable; its results must be.

    Parameters:
        work: a function of one frequency.
        freqs: the frequencies.
        jobs: processes.
    Returns:
        the results in the order of freqs.
    References:
        none (process pool).
    """
    freqs = list(freqs)
    jobs = min(max(1, int(jobs)), len(freqs))
    if jobs <= 1 or not can_fork():
        return [work(f) for f in freqs]
    global _WORK, _FREQS, _LIMIT_THREADS
    _WORK, _FREQS, _LIMIT_THREADS = work, freqs, single_threaded_blas()
    deals = [list(range(k, len(freqs), jobs)) for k in range(jobs)]
    try:
        # a process pool that notices a worker dying (killed, out of memory) instead of waiting for it for ever
        with ProcessPoolExecutor(jobs, mp_context=multiprocessing.get_context("fork"),
                                 initializer=_start_worker) as pool:
            parts = list(pool.map(_run, deals))
    except BrokenProcessPool:
        raise WorkerError("a worker process of --jobs died before it finished (killed, or out of memory); "
                          "run with --jobs 1") from None
    except OSError:                     # no process could be started (a process limit): one process does it all
        parts = [_run(d) for d in deals]
    finally:
        _WORK, _FREQS = None, ()
    out: list = [None] * len(freqs)
    for deal, part in zip(deals, parts):
        for i, value in zip(deal, part):
            out[i] = value
    return out
