"""Timing and memory of reading a recording (groundcheck bench): a one-minute and an hour-long 48
kHz recording, each measured in a fresh process (its wall-clock time and its peak resident memory).

    python benchmarks/bench_recording.py                   # one minute, 16 and 24-bit
    python benchmarks/bench_recording.py --hour            # and an hour of 16-bit (a 345 MB file)

The files are written to a temporary folder and removed afterwards.
"""

from __future__ import annotations

import argparse
import math
import os
import subprocess
import sys
import tempfile
import wave
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parent.parent
RATE = 48000
#: the hum written: 50 Hz pickup and a charging-current series, rms of full scale
LINES = {50.0: 0.02, 100.0: 0.005, 150.0: 0.003, 200.0: 0.002, 300.0: 0.001, 1000.0: 1e-4}


def _write(path: Path, seconds: int, width: int) -> None:
    """A WAV file of `seconds` written a minute at a time (16 or 24-bit)."""
    with wave.open(str(path), "wb") as w:
        w.setnchannels(1)
        w.setsampwidth(width)
        w.setframerate(RATE)
        for start in range(0, seconds * RATE, 60 * RATE):
            n = min(60 * RATE, seconds * RATE - start)
            t = (start + np.arange(n)) / RATE
            x = sum(math.sqrt(2) * a * np.sin(2 * np.pi * f * t) for f, a in LINES.items())
            x = x + np.random.default_rng(start).normal(0, 1e-5, n)
            v = np.round(x * 2.0 ** (8 * width - 1)).astype("<i4")
            w.writeframes(
                v.astype("<i2").tobytes()
                if width == 2
                else v.view(np.uint8).reshape(-1, 4)[:, :3].tobytes()
            )


CHILD = """
import resource, sys, time
t0 = time.perf_counter()
from groundcheck.measure.lines import measure
t1 = time.perf_counter()
m = measure(sys.argv[1])
t2 = time.perf_counter()
peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024
print(f"{t1 - t0:.2f} {t2 - t1:.2f} {peak:.0f} {m.mains_hz:.3f} {m.segments}")
"""


def _run(path: Path) -> str:
    env = {**os.environ, "PYTHONPATH": str(ROOT)}
    out = subprocess.run(
        [sys.executable, "-c", CHILD, str(path)],
        capture_output=True,
        text=True,
        env=env,
        check=True,
    ).stdout.split()
    return (
        f"import {out[0]} s, measure {out[1]} s, peak resident {out[2]} MiB, mains {out[3]} Hz, "
        f"{out[4]} segments"
    )


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--hour", action="store_true", help="also an hour-long recording")
    args = ap.parse_args()
    cases = [("one minute, 16-bit", 60, 2), ("one minute, 24-bit", 60, 3)]
    if args.hour:
        cases.append(("one hour, 16-bit", 3600, 2))
    with tempfile.TemporaryDirectory() as tmp:
        for label, seconds, width in cases:
            path = Path(tmp) / f"rec{seconds}-{width}.wav"
            _write(path, seconds, width)
            print(f"{label} ({path.stat().st_size / 2**20:.0f} MiB): {_run(path)}", flush=True)
            path.unlink()


if __name__ == "__main__":
    main()
