"""Fixtures shared by the tests."""

import os
import shutil
import tempfile

import pytest

from groundcheck.cli import main


#: the commands whose fix lines the advisor writes (``--advice-budget``, default 10 s)
ADVISED = ("check", "report")


@pytest.fixture
def cli(capsys):
    """Run the command; returns (exit status, stdout, stderr). ``check`` and ``report`` run with
    ``--advice-budget 0`` (the rules' own fix lines) unless the test gives a budget: the advisor's
    fix lines are tested where a test asks for them, and running it on every other call took a
    tenth of the suite's time."""

    def run(*argv):
        argv = list(argv)
        if argv and argv[0] in ADVISED and "--advice-budget" not in argv and "--help" not in argv:
            argv += ["--advice-budget", "0"]
        code = main(argv)
        out = capsys.readouterr()
        return code, out.out, out.err

    return run


#: the modules whose tests take longest (`--durations` on a 2-core machine), collected first so
#: that the processes share the long ones out early and finish together (a long test last keeps
#: the other process idle); the rest keep their order
LONG_FIRST = (
    "test_field",
    "test_rewritings",
    "test_invariants",
    "test_html_tables",
    "test_hostile_round2",
    "test_robustness",
    "test_repair_properties",
    "test_rectifier_exact",
    "test_watch",
    "test_drawing_overlaps",
    "test_reports",
    "test_plain_words",
)


def pytest_collection_modifyitems(items):
    def rank(item) -> int:
        name = item.module.__name__ if item.module is not None else ""
        return next((k for k, p in enumerate(LONG_FIRST) if name.startswith(p)), len(LONG_FIRST))

    items.sort(key=rank)  # stable: each module's tests keep their order


#: set (to the folder) in the test run's first process; its worker processes inherit it
RUN_CACHE = "GROUNDCHECK_TEST_RUN_CACHE"


def pytest_configure(config):
    """The run's own cache folder (the compiled grammar, the plates' stored reductions), shared by
    its processes and removed at the end: a test never reads what an earlier run or the user's own
    checks left, and leaves nothing in the user's cache folder."""
    if RUN_CACHE not in os.environ:
        folder = tempfile.mkdtemp(prefix="groundcheck-test-cache-")
        os.environ[RUN_CACHE] = folder
        os.environ["XDG_CACHE_HOME"] = folder
        config.run_cache = folder


def pytest_unconfigure(config):
    folder = getattr(config, "run_cache", None)
    if folder:
        shutil.rmtree(folder, ignore_errors=True)
