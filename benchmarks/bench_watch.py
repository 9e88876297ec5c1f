"""Save-to-update latency of the live view (``groundcheck watch``), end to end.

For each plan: start ``groundcheck watch`` on a copy, listen to its event stream as the page does,
then save the plan and time until the new state has been announced and fetched (``/state``) — what
the page needs before it redraws.  Two kinds of save: a comment line appended (the statements
unchanged: the view shows its last analysis again) and a figure changed (the first wire's length
lengthened by 0.1 mm a save: the plan is analysed and drawn again).  The
browser's own drawing time is not included.  Reported: the median and the slowest of ``--repeat``
saves, after one save to warm up.

    python benchmarks/bench_watch.py                       # the examples and a 1k-conductor plan
"""

from __future__ import annotations

import argparse
import http.client
import re
import shutil
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))
from generate import chassis  # noqa: E402


def _events(port: int, prefix: str):
    conn = http.client.HTTPConnection("127.0.0.1", port, timeout=60)
    conn.request("GET", prefix + "events")
    return conn.getresponse()


def _next_event(stream) -> int:
    """The next new state's version (an ``analysing`` event, which says an analysis has started,
    is passed over)."""
    event = None
    while True:
        line = stream.readline().decode()
        if not line:
            raise SystemExit("the live view closed its event stream")
        if line.startswith("event: "):
            event = line[7:].strip()
        elif line.startswith("data: ") and event == "state":
            return int(line[6:])


def _fetch_state(port: int, prefix: str) -> int:
    conn = http.client.HTTPConnection("127.0.0.1", port, timeout=60)
    conn.request("GET", prefix + "state")
    return len(conn.getresponse().read())


#: a wire's stated length (the figure the second kind of save changes)
_LENGTH = re.compile(r"^(wire [^\n]*?, )(\d+(?:\.\d+)?)( mm)", re.M)


def _save(plan: Path, i: int, change: str) -> None:
    if change == "comment":
        with plan.open("a") as f:
            f.write(f"# saved {i}\n")
        return
    text = plan.read_text()
    m = _LENGTH.search(text)
    longer = f"{float(m.group(2)) + 0.1:.1f}"
    plan.write_text(text[: m.start(2)] + longer + text[m.end(2) :])


def measure(plan: Path, repeat: int, change: str = "comment") -> tuple[float, float, int]:
    """(median s, slowest s, state size in bytes) of saving ``plan`` while the view runs."""
    proc = subprocess.Popen(
        [sys.executable, "-m", "groundcheck", "watch", str(plan), "--port", "0"],
        stderr=subprocess.PIPE,
        stdout=subprocess.DEVNULL,
        text=True,
    )
    try:
        # the address it prints carries the session's token, which every request needs
        port, prefix = re.search(r":(\d+)(/[^/ ]+/)", proc.stderr.readline()).groups()
        port = int(port)
        stream = _events(port, prefix)
        version = _next_event(stream)
        size = _fetch_state(port, prefix)
        times = []
        for i in range(repeat + 1):
            time.sleep(0.3)
            t0 = time.perf_counter()
            _save(plan, i, change)
            new = _next_event(stream)
            assert new == version + 1, (
                new,
                version,
            )  # the save's own state, not one announced before
            version = new
            size = _fetch_state(port, prefix)
            if i:
                times.append(time.perf_counter() - t0)
        return statistics.median(times), max(times), size
    finally:
        proc.terminate()
        proc.wait(20)


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--repeat", type=int, default=5)
    args = ap.parse_args()
    root = HERE.parent
    with tempfile.TemporaryDirectory() as tmp:
        plans = []
        for p in sorted((root / "examples").glob("*.gplan")):
            plans.append(Path(shutil.copy(p, Path(tmp) / p.name)))
        studio = Path(tmp) / "studio"
        shutil.copytree(root / "examples" / "studio", studio)
        plans.append(studio / "project-studio.gplan")
        big = Path(tmp) / "chassis-1k.gplan"
        big.write_text(chassis(1000))
        plans.append(big)
        print(
            "| plan | comment: median s | slowest s | a figure: median s | slowest s | state kB |"
            "\n|---|---:|---:|---:|---:|---:|"
        )
        for p in plans:
            med, worst, _ = measure(p, args.repeat, "comment")
            fmed, fworst, size = measure(p, args.repeat, "figure")
            print(
                f"| {p.name} | {med:.3f} | {worst:.3f} | {fmed:.3f} | {fworst:.3f} | "
                f"{size / 1e3:.0f} |",
                flush=True,
            )


if __name__ == "__main__":
    main()
