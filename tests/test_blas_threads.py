"""The solves run with one BLAS thread, and the caller's setting is back afterwards.

The caller here sets two threads first, so that a limit never applied, or never lifted, shows."""

import pytest

from groundcheck import analysis, load
from groundcheck.cli import main
from groundcheck.core.runtime import one_blas_thread

from helpers import EXAMPLES

threadpoolctl = pytest.importorskip("threadpoolctl")


def _blas_threads() -> set[int]:
    return {
        lib["num_threads"] for lib in threadpoolctl.threadpool_info() if lib["user_api"] == "blas"
    }


@pytest.fixture
def two_threads():
    """The caller's BLAS at two threads (skipped where the library will not take two)."""
    with threadpoolctl.threadpool_limits(limits=2, user_api="blas"):
        if _blas_threads() != {2}:
            pytest.skip(f"the BLAS here will not run two threads ({_blas_threads()})")
        yield


@pytest.fixture
def seen(monkeypatch):
    """The BLAS threads in force at each of the analysis's solves (rectifier and network)."""
    seen = []
    solve, simulate = analysis.run_tasks, analysis.simulate

    def run_tasks(*args, **kwargs):
        seen.append(_blas_threads())
        return solve(*args, **kwargs)

    def rectifier(*args, **kwargs):
        seen.append(_blas_threads())
        return simulate(*args, **kwargs)

    monkeypatch.setattr(analysis, "run_tasks", run_tasks)
    monkeypatch.setattr(analysis, "simulate", rectifier)
    return seen


def test_analyze_solves_with_one_blas_thread_and_restores_the_callers(two_threads, seen):
    path = next(e for e in EXAMPLES if e.name.startswith("dual-mono"))
    analysis.analyze(load(path))
    assert seen and all(s == {1} for s in seen), seen
    assert _blas_threads() == {2}


def test_a_command_solves_with_one_blas_thread_and_restores_the_callers(two_threads, seen, capsys):
    path = next(e for e in EXAMPLES if e.name.startswith("guitar"))
    main(["check", str(path), "--advice-budget", "0"])
    assert seen and all(s == {1} for s in seen), seen
    assert _blas_threads() == {2}


def test_the_limit_nests_and_is_lifted_by_the_last_block_to_leave(two_threads):
    with one_blas_thread():
        with one_blas_thread():
            assert _blas_threads() == {1}
        assert _blas_threads() == {1}
    assert _blas_threads() == {2}


def test_the_limit_is_lifted_when_the_block_fails(two_threads):
    with pytest.raises(RuntimeError):
        with one_blas_thread():
            assert _blas_threads() == {1}
            raise RuntimeError("a solve that fails")
    assert _blas_threads() == {2}


def test_the_libraries_are_looked_up_again_only_when_one_was_loaded(two_threads):
    # threadpoolctl's look-up of the loaded libraries costs milliseconds: kept while the process
    # loads no other shared object, made again when it does (a library loaded later is limited)
    from groundcheck.core import runtime

    with one_blas_thread():
        kept = runtime._BLAS["controller"]
    with one_blas_thread():
        assert runtime._BLAS["controller"] is kept
        assert _blas_threads() == {1}
    runtime._BLAS["loaded"] = -1  # as if a library had been loaded since
    with one_blas_thread():
        assert runtime._BLAS["controller"] is not kept
        assert _blas_threads() == {1}
    assert _blas_threads() == {2}
