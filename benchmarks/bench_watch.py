"""Save-to-update latency of the live view (``groundcheck watch``), end to end.

For each plan: start ``groundcheck watch`` on a copy, listen to its event stream as the page does,
then save the plan (a comment line appended, so the figures stay the same) and time until the new
state has been announced and fetched (``/state``) — what the page needs before it redraws.  The
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


def _events(port: int):
    conn = http.client.HTTPConnection("127.0.0.1", port, timeout=60)
    conn.request("GET", "/events")
    return conn.getresponse()


def _next_event(stream) -> int:
    while True:
        line = stream.readline().decode()
        if line.startswith("data: "):
            return int(line[6:])


def _fetch_state(port: int) -> int:
    conn = http.client.HTTPConnection("127.0.0.1", port, timeout=60)
    conn.request("GET", "/state")
    return len(conn.getresponse().read())


def measure(plan: Path, repeat: int) -> tuple[float, float, int]:
    """(median s, slowest s, state size in bytes) of saving ``plan`` while the view runs."""
    proc = subprocess.Popen(
        [sys.executable, "-m", "groundcheck", "watch", str(plan), "--port", "0"],
        stderr=subprocess.PIPE,
        stdout=subprocess.DEVNULL,
        text=True,
    )
    try:
        port = int(re.search(r":(\d+)/", proc.stderr.readline()).group(1))
        stream = _events(port)
        version = _next_event(stream)
        size = _fetch_state(port)
        times = []
        for i in range(repeat + 1):
            time.sleep(0.3)
            t0 = time.perf_counter()
            with plan.open("a") as f:
                f.write(f"# saved {i}\n")
            new = _next_event(stream)
            assert new == version + 1, (
                new,
                version,
            )  # the save's own state, not one announced before
            version = new
            size = _fetch_state(port)
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
        print("| plan | median s | slowest s | state kB |\n|---|---:|---:|---:|")
        for p in plans:
            med, worst, size = measure(p, args.repeat)
            print(f"| {p.name} | {med:.3f} | {worst:.3f} | {size / 1e3:.0f} |", flush=True)


if __name__ == "__main__":
    main()
