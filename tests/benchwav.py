"""Synthetic recordings for the bench tests: stated lines (rms volts) and noise, written as WAV
files in each
sample format, and a Goertzel filter worked independently of the code under test."""

from __future__ import annotations

import math
import wave

import numpy as np
from scipy.io import wavfile


def tones(
    lines: dict,
    rate: int,
    seconds: float,
    noise: float = 0.0,
    seed: int = 1,
    start: int = 0,
    count: int | None = None,
) -> np.ndarray:
    """Σ √2·A·sin(2πft + φ) for each (f: A rms) with a fixed phase per line, plus white noise of
    rms ``noise``;
    samples start..start+count of the whole recording (for writing an hour in pieces)."""
    n = int(round(rate * seconds)) if count is None else count
    t = (start + np.arange(n)) / rate
    x = np.zeros(n)
    for f, a in lines.items():
        x += math.sqrt(2) * a * np.sin(2 * np.pi * f * t + 0.37 * f)
    if noise:
        x += np.random.default_rng(seed + start).normal(0.0, noise, n)
    return x


def write(
    path, x: np.ndarray, rate: int, fmt: str = "float32", channels: int = 1, track: int = 0
) -> None:
    """Write samples (full-scale units, ±1.0) as a WAV file of ``fmt``: float32, int16, int32 or
    int24; with
    several channels the samples go to ``track`` and the others hold a quieter copy."""
    data = np.zeros((x.size, channels))
    for c in range(channels):
        data[:, c] = x if c == track else 0.1 * x
    data = data[:, 0] if channels == 1 else data
    if fmt == "float32":
        wavfile.write(path, rate, data.astype(np.float32))
    elif fmt == "int16":
        wavfile.write(path, rate, np.clip(np.round(data * 32768), -32768, 32767).astype(np.int16))
    elif fmt == "int32":
        wavfile.write(
            path, rate, np.clip(np.round(data * 2.0**31), -(2**31), 2**31 - 1).astype(np.int32)
        )
    elif fmt == "int24":
        v = np.clip(np.round(data * 2.0**23), -(2**23), 2**23 - 1).astype(np.int32).reshape(-1)
        b = v.astype("<i4").view(np.uint8).reshape(-1, 4)[:, :3].tobytes()
        with wave.open(str(path), "wb") as w:
            w.setnchannels(channels)
            w.setsampwidth(3)
            w.setframerate(rate)
            w.writeframes(b)
    else:
        raise ValueError(fmt)


def goertzel_rms(x: np.ndarray, f: float, rate: int) -> float:
    """The rms amplitude of the line at f by the Goertzel recurrence (G. Goertzel, Am. Math.
    Monthly 65 (1958)
    34): s[n] = x[n] + 2cos(ω)s[n−1] − s[n−2], |X|² = s1² + s2² − 2cos(ω)s1s2, ω = 2πf/rate; a
    rectangular window
    over a whole number of periods, so the rms is √2·|X|/N."""
    w = 2 * math.pi * f / rate
    c = 2 * math.cos(w)
    s1 = s2 = 0.0
    for v in x.tolist():
        s1, s2 = v + c * s1 - s2, s1
    power = s1 * s1 + s2 * s2 - c * s1 * s2
    return math.sqrt(2 * max(power, 0.0)) / x.size


def db(x: float) -> float:
    return 20 * math.log10(x)
