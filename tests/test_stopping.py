"""Ctrl-C and SIGTERM end the ``groundcheck`` command at once, wherever they land (the signals
family of the hostile campaign found a Ctrl-C swallowed with a traceback printed: inside a fork
hook, a weakref callback, a C library's callback, a worker before its start-up)."""

import os
import signal
import subprocess
import sys
import time
from pathlib import Path

from helpers import EXAMPLES
from hostile_families import _alive, _children, _session

ROOT = Path(__file__).resolve().parent.parent
#: a plan whose check takes tens of seconds: it is still running when the signal comes
LONG_PLAN = ROOT / "tests" / "hostile" / "round2" / "09-sigterm-jobs" / "jobsplan.gplan"


def _command_with_a_slow_fork_hook(tmp_path: Path) -> subprocess.Popen:
    """The command checking two plans with two workers, each fork of the parent held up in a hook
    the interpreter only reports from (as logging's lock release is)."""
    code = (
        "import os, sys, time\n"
        "os.register_at_fork(after_in_parent=lambda: time.sleep(2))\n"
        "import groundcheck.__main__ as m\n"
        f"sys.argv = ['groundcheck', 'check', {str(EXAMPLES[0])!r}, {str(EXAMPLES[1])!r}, "
        f"'--jobs', '2', '--format', 'json', '-o', {str(tmp_path / 'out.json')!r}]\n"
        "sys.exit(m.run())\n"
    )
    return subprocess.Popen(
        [sys.executable, "-c", code],
        stderr=subprocess.PIPE,
        text=True,
        start_new_session=True,
        env={**os.environ, "PYTHONPATH": str(ROOT)},
    )


def test_a_ctrl_c_inside_a_fork_hook_ends_the_run_without_a_traceback(tmp_path):
    proc = _command_with_a_slow_fork_hook(tmp_path)
    deadline = time.monotonic() + 60
    while not _children(proc.pid) and time.monotonic() < deadline:
        time.sleep(0.01)
    assert _children(proc.pid), "no worker was started"
    os.killpg(proc.pid, signal.SIGINT)  # as a terminal's Ctrl-C: the run and its workers
    _, err = proc.communicate(timeout=10)
    assert proc.returncode == 130, err
    assert "Traceback" not in err and "Exception ignored" not in err, err
    assert err.strip().endswith("groundcheck: interrupted")
    assert list(tmp_path.iterdir()) == []


def test_sigterm_ends_the_command_with_its_status_and_no_output(tmp_path):
    proc = _command_with_a_slow_fork_hook(tmp_path)
    deadline = time.monotonic() + 60
    while not _children(proc.pid) and time.monotonic() < deadline:
        time.sleep(0.01)
    kids = _children(proc.pid)
    proc.send_signal(signal.SIGTERM)
    _, err = proc.communicate(timeout=10)
    assert proc.returncode == 128 + signal.SIGTERM and err.strip() == "", err
    time.sleep(0.5)
    assert not [k for k in kids if Path(f"/proc/{k}").exists() and _alive(k)]


def test_the_library_and_main_keep_the_callers_signal_handlers(tmp_path):
    from groundcheck.cli import main

    before = signal.getsignal(signal.SIGINT), signal.getsignal(signal.SIGTERM)
    out = str(tmp_path / "out.json")
    assert main(["check", str(EXAMPLES[0]), "--format", "json", "-o", out]) in (0, 1)
    assert (signal.getsignal(signal.SIGINT), signal.getsignal(signal.SIGTERM)) == before


def test_ctrl_c_on_a_terminal_shows_the_cursor_its_progress_line_hid(tmp_path):
    import pty

    main_fd, term = pty.openpty()
    proc = subprocess.Popen(
        [
            sys.executable,
            "-m",
            "groundcheck",
            "check",
            str(LONG_PLAN),
            "-o",
            str(tmp_path / "out.txt"),
        ],
        stdin=subprocess.DEVNULL,
        stdout=subprocess.DEVNULL,
        stderr=term,
        start_new_session=True,
        env={**os.environ, "PYTHONPATH": str(ROOT)},
    )
    os.close(term)
    seen = b""
    deadline = time.monotonic() + 60
    while b"\x1b[?25l" not in seen and time.monotonic() < deadline:  # the spinner hid it
        try:
            seen += os.read(main_fd, 4096)
        except OSError:
            break
    os.killpg(proc.pid, signal.SIGINT)
    proc.wait(timeout=10)
    while True:
        try:
            chunk = os.read(main_fd, 4096)
        except OSError:
            break
        if not chunk:
            break
        seen += chunk
    os.close(main_fd)
    assert proc.returncode == 130
    if b"\x1b[?25l" in seen:
        assert seen.rindex(b"\x1b[?25h") > seen.rindex(b"\x1b[?25l")
    assert seen.rstrip().endswith(b"groundcheck: interrupted")


def test_a_worker_whose_parent_ended_before_its_start_up_ends_too():
    # the signals campaign found a worker left running for ever: its parent ended between the fork
    # and the worker's first step, which then read init as its parent and waited on the work queue
    code = (
        "import os, sys, time\n"
        "from concurrent.futures import ProcessPoolExecutor\n"
        "import multiprocessing\n"
        "from groundcheck.core.runtime import die_with_parent\n"
        "os.register_at_fork(after_in_child=lambda: time.sleep(1.0))\n"
        "pool = ProcessPoolExecutor(1, mp_context=multiprocessing.get_context('fork'), "
        "initializer=die_with_parent)\n"
        "pool.submit(time.sleep, 60)\n"
        "os._exit(0)\n"
    )
    proc = subprocess.Popen(
        [sys.executable, "-c", code],
        start_new_session=True,
        env={**os.environ, "PYTHONPATH": str(ROOT)},
        stderr=subprocess.DEVNULL,
    )
    proc.wait(timeout=30)
    deadline = time.monotonic() + 5
    while _session(proc.pid) and time.monotonic() < deadline:
        time.sleep(0.1)
    left = _session(proc.pid)
    for pid in left:
        os.kill(pid, signal.SIGKILL)
    assert not left, f"workers {left} outlived their parent"
