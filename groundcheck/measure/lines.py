"""The mains frequency and each of its harmonics' levels in a recording, and the noise floor
between them.

Method (Welch's averaged periodogram with a flat-top window): the recording is cut into 1 s
segments (1 Hz
bins), each windowed and transformed, and the power spectra are averaged over the whole file,
which is read a
segment at a time (bounded memory whatever its length).  A line's level is the largest averaged
bin within two
bins of its harmonic, scaled by the window's coherent gain.

Why a flat-top window rather than a DFT at the exact line frequency: its pass band is flat to
about 0.01 dB over
±½ bin (measured in the tests against a Goertzel filter at the line), so the level is right
without knowing the
frequency closer than a bin — the mains wanders by ±0.1 Hz over an hour, which moves the 40th
harmonic by 4 Hz,
and an exact-frequency DFT would need the frequency tracked segment by segment.  Its wide main
lobe (an
equivalent noise bandwidth of 3.77 bins) costs some noise in the line's bandwidth, which is
reported and
subtracted.  The frequency itself is found on a Hann-windowed spectrum accumulated alongside (its
narrower peak is
interpolated: Gaussian interpolation of the three largest bins).
"""

from __future__ import annotations

import math
from functools import cached_property, lru_cache
from typing import Callable

import numpy as np

from .audio import RecordingError, WavFormat, blocks, clipping_of, wav_format
from .records import LineLevel, Measured

__all__ = [
    "SEGMENT_S",
    "METHOD",
    "FLAT_TOP",
    "measure",
    "tone_level",
    "harmonic_count",
    "cosine_window",
]

#: segment length, s (the bin width is its inverse)
SEGMENT_S = 1.0
#: the method in words (every output says it)
METHOD = (
    "Welch's averaged periodogram, 1 s segments, flat-top window (amplitude flat to 0.01 dB "
    "within half a bin of the line), levels rms"
)
#: the nominal mains frequencies searched, Hz, and the tolerance around them
NOMINALS = (50.0, 60.0)
TOLERANCE = 0.02
#: the flat-top window's cosine coefficients (five terms; the same as MATLAB's and scipy's
#: flattop, from memory)
#: — Heinzel et al. 2002 list this family; its scallop loss is about 0.01 dB, its ENBW 3.77 bins
FLAT_TOP = (0.21557895, 0.41663158, 0.277263158, 0.083578947, 0.006947368)
#: the Hann window's (used only to find the frequency)
HANN = (0.5, 0.5)
#: a line is measured when it stands this much (power ratio) above the noise in its bandwidth: 6 dB
ABOVE_NOISE = 4.0
#: the chance a bin of noise alone is taken for a line
FALSE_LINE = 1e-6


class _Spectra:
    """The averaged flat-top and Hann power spectra of one channel, with the peak and the
    clipping."""

    def __init__(self, fmt: WavFormat, channel: int, progress: Callable | None):
        n = int(round(fmt.rate * SEGMENT_S))
        if fmt.frames < n:
            raise RecordingError(
                f"the recording is {fmt.seconds:.2f} s long; at least {SEGMENT_S:g} s is needed",
                _loc(fmt),
                "record at least a few seconds of the hum",
            )
        self.n, self.rate = n, fmt.rate
        self.flat = cosine_window(FLAT_TOP, n)
        hw = cosine_window(HANN, n)
        sum_flat = np.zeros(n // 2 + 1)
        sum_hann = np.zeros(n // 2 + 1)
        self.segments, self.peak, self.clipping, energy = 0, 0.0, None, 0.0
        start = 0
        for x in blocks(fmt, channel, n):
            self.peak = max(self.peak, float(np.abs(x).max()))
            self.clipping = clipping_of(x, fmt, start, self.clipping)
            energy += float((x * x).sum())  # not np.dot: BLAS threads cost 30 ms a call here
            start += x.size
            if x.size == n:
                for window, total in ((self.flat, sum_flat), (hw, sum_hann)):
                    spectrum = np.fft.rfft(x * window)
                    total += spectrum.real**2
                    total += spectrum.imag**2
                self.segments += 1
            if progress is not None:
                progress(start, fmt.frames)
        if energy == 0.0:
            raise RecordingError(
                "the recording is silent: every sample is zero",
                _loc(fmt),
                "check the connection and the interface's input and gain, and record again",
            )
        self.flat_power = sum_flat / self.segments
        self.hann_power = sum_hann / self.segments
        self.gain = float(self.flat.sum())  # N × coherent gain
        self.enbw_hz = self.rate * float((self.flat**2).sum()) / self.gain**2

    def line(self, f: float) -> tuple[float, float, bool]:
        """(rms level, rms noise in the window's bandwidth, whether it stands above the noise) of
        the line nearest
        f, full-scale units."""
        c = int(round(f * SEGMENT_S))
        lo, hi = max(c - 2, 1), min(c + 2, self.flat_power.size - 1)
        peak = float(self.flat_power[lo : hi + 1].max())
        noise = self.noise_power(c)
        level2 = max(peak - noise, 0.0)
        return (
            math.sqrt(2 * level2) / self.gain,
            math.sqrt(2 * noise) / self.gain,
            peak >= self.threshold * noise,
        )

    @cached_property
    def threshold(self) -> float:
        """The power ratio over the mean noise a line must reach: 6 dB above it (five times the
        mean, the line's
        own power four times the noise's), or more when few segments were averaged: the mean of M
        noise
        periodograms is Gamma-distributed with shape M, and the ratio is set where a noise bin
        passes it once in
        a million (so a hundred lines of five bins each hold a false line once in two thousand
        recordings)."""
        return max(ABOVE_NOISE + 1, gamma_quantile(self.segments, FALSE_LINE) / self.segments)

    def noise_power(self, c: int) -> float:
        """The mean averaged bin power 8 to 20 bins either side of bin c, other mains lines' lobes
        left out."""
        f0 = self.f0
        idx = np.r_[c - 20 : c - 7, c + 8 : c + 21]
        idx = idx[(idx > 0) & (idx < self.flat_power.size)]
        if f0:
            h = idx / SEGMENT_S / f0
            idx = idx[np.abs(h - np.round(h)) * f0 * SEGMENT_S > 7]
        return float(self.flat_power[idx].mean()) if idx.size else 0.0

    f0: float | None = None


def cosine_window(coefficients: tuple[float, ...], n: int) -> np.ndarray:
    """A periodic sum-of-cosines window: w[i] = Σ_k (−1)^k a_k cos(2πki/n).

    Parameters:
        coefficients: a_0, a_1, ...
        n: its length.
    Returns:
        the window, n samples.
    References:
        F. J. Harris, Proc. IEEE 66 (1978) 51 (sum-of-cosines windows).
    """
    phase = 2 * np.pi * np.arange(n) / n
    return sum(((-1) ** k) * a * np.cos(k * phase) for k, a in enumerate(coefficients))


@lru_cache(maxsize=64)
def gamma_quantile(m: int, p: float) -> float:
    """The x at which a Gamma variate of integer shape m (unit scale) exceeds x with probability p.

    Parameters:
        m: the shape (averaged periodograms).
        p: the upper-tail probability.
    Returns:
        x.
    References:
        the Erlang survival function Q(m, x) = e^(−x) Σ_{k<m} x^k / k!, solved by bisection (in
        logarithms, so an hour's 3,600 segments do not overflow).
    """
    k = np.arange(m)
    log_fact = (
        np.concatenate([[0.0], np.cumsum(np.log(np.arange(1, m)))]) if m > 1 else np.zeros(1)
    )
    target = math.log(p)

    def log_q(x: float) -> float:
        terms = k * math.log(x) - x - log_fact
        top = float(terms.max())
        return top + math.log(float(np.exp(terms - top).sum()))

    lo, hi = 1e-9, m + 50.0 + 10 * math.sqrt(m)
    for _ in range(100):
        mid = 0.5 * (lo + hi)
        lo, hi = (mid, hi) if log_q(mid) > target else (lo, mid)
    return 0.5 * (lo + hi)


def _loc(fmt: WavFormat):
    from ..core.errors import Location

    return Location(fmt.path)


def _peak_frequency(power: np.ndarray, lo: float, hi: float) -> tuple[float, float] | None:
    """The interpolated frequency (Hz) and power of the largest Hann bin within [lo, hi] Hz."""
    a, b = int(math.floor(lo * SEGMENT_S)), int(math.ceil(hi * SEGMENT_S))
    a, b = max(a, 1), min(b, power.size - 2)
    if b <= a:
        return None
    j = a + int(np.argmax(power[a : b + 1]))
    p0, p1, p2 = (max(float(power[k]), 1e-300) for k in (j - 1, j, j + 1))
    den = 2 * (2 * math.log(p1) - math.log(p0) - math.log(p2))
    delta = (math.log(p2) - math.log(p0)) / den if den > 0 else 0.0
    return (j + max(-0.5, min(0.5, delta))) / SEGMENT_S, p1


def _mains(sp: _Spectra, stated: float | None, fallback: float) -> tuple[float, float, bool]:
    """(mains frequency, nominal, whether lines were found): the nominal with more power at its
    harmonics (common
    multiples left out), refined by the power-weighted mean of its harmonics' interpolated
    peaks."""
    floor = float(np.median(sp.hann_power[10:])) * 30  # a peak 15 dB over the median bin is a line
    nominals = (stated,) if stated else NOMINALS
    best, best_score, peaks_of = fallback, 0.0, {}
    for nom in nominals:
        peaks = []
        for k in range(1, 11):
            f = k * nom
            if f * (1 + TOLERANCE) >= sp.rate / 2 or (stated is None and f % 300 == 0):
                continue
            got = _peak_frequency(sp.hann_power, f * (1 - TOLERANCE), f * (1 + TOLERANCE))
            if got and got[1] > floor:
                peaks.append((k, *got))
        peaks_of[nom] = peaks
        score = sum(p for _, _, p in peaks)
        if score > best_score:
            best, best_score = nom, score
    peaks = peaks_of.get(best, [])
    if not peaks:
        return (stated or fallback), (stated or fallback), False
    weight = sum(p for _, _, p in peaks)
    return sum(p * f / k for k, f, p in peaks) / weight, best, True


def harmonic_count(f0: float, rate: int, max_frequency: float) -> int:
    """How many harmonics of f0 are measured: up to max_frequency and 45 % of the sample rate.

    Parameters:
        f0: mains frequency, Hz.
        rate: sample rate, Hz.
        max_frequency: the plan's highest harmonic, Hz.
    Returns:
        the count.
    References:
        none (the anti-alias filter of an interface rolls off above about 0.45 of its rate: common
        practice).
    """
    return max(1, int(min(max_frequency, 0.45 * rate) // f0))


def measure(
    path: str,
    channel: int = 0,
    stated: float | None = None,
    fallback: float = 50.0,
    max_frequency: float = 5000.0,
    volts_per_unit: float | None = None,
    calibration: str = "",
    progress: Callable | None = None,
) -> Measured:
    """The mains frequency, each harmonic's level and the noise of one channel of a WAV recording.

    Parameters:
        path: the WAV file.
        channel: 0-based channel.
        stated: the mains frequency, Hz, when stated (it is refined within ±2 %), else 50 or 60 is
        found.
        fallback: the frequency taken when no line stands above the noise (the plan's), Hz.
        max_frequency: the highest harmonic measured, Hz.
        volts_per_unit: volts for 1.0 of digital full scale, or None (relative levels).
        calibration: how the calibration was made, in words.
        progress: called with (samples read, samples in all) after each segment.
    Returns:
        the :class:`Measured` record.
    References:
        P. D. Welch, IEEE Trans. Audio Electroacoust. 15 (1967) 70 (averaged periodograms); G.
        Heinzel, A. Rüdiger, R. Schilling, "Spectrum and spectral density estimation by the DFT",
        2002 (flat-top windows, ENBW, amplitude and density scaling).
    """
    fmt = wav_format(path)
    _check_channel(fmt, channel)
    sp = _Spectra(fmt, channel, progress)
    f0, nominal, found = _mains(sp, stated, fallback)
    sp.f0 = f0
    lines, density = _harmonics(sp, harmonic_count(f0, fmt.rate, max_frequency), volts_per_unit)
    found = found and any(ln.above_noise for ln in lines)
    how = calibration or "none: levels relative to digital full scale"
    return Measured(
        path,
        fmt.rate,
        fmt.channels,
        channel,
        fmt.bits,
        fmt.floating,
        fmt.seconds,
        sp.segments,
        1 / SEGMENT_S,
        f0,
        nominal,
        found,
        tuple(lines),
        density,
        volts_per_unit,
        how,
        sp.clipping,
        sp.peak,
        METHOD,
    )


def _check_channel(fmt: WavFormat, channel: int) -> None:
    """A clear error when the recording has no such channel."""
    if not 0 <= channel < fmt.channels:
        raise RecordingError(
            f"the recording has {fmt.channels} channel(s); channel {channel + 1} was asked for",
            _loc(fmt),
            "name a channel the file holds (--track 1 is the first)",
        )


def _harmonics(
    sp: _Spectra, count: int, volts_per_unit: float | None
) -> tuple[list[LineLevel], float]:
    """The first ``count`` harmonics of the mains frequency (``sp.f0``), their levels and noise,
    and the noise density under them (the median of their noise powers over the window's
    equivalent noise bandwidth), per √Hz: in volts, or without a calibration relative to the rms
    of a full-scale sine (dBFS as AES17 counts it: 1.0 peak is 0 dB)."""
    scale = volts_per_unit if volts_per_unit is not None else math.sqrt(2)
    lines = []
    for k in range(1, count + 1):
        level, noise, above = sp.line(k * sp.f0)
        lines.append(LineLevel(k, k * sp.f0, level * scale, noise * scale, above))
    density = math.sqrt(np.median([ln.noise**2 for ln in lines]) / sp.enbw_hz) if lines else 0.0
    return lines, density


def tone_level(path: str, channel: int = 0) -> float:
    """The rms level (full-scale units) of the strongest tone in a calibration recording.

    Parameters:
        path: the WAV file of the tone.
        channel: 0-based channel.
    Returns:
        the tone's rms level, full-scale units.
    References:
        as :func:`measure` (flat-top amplitude).
    """
    fmt = wav_format(path)
    if not 0 <= channel < fmt.channels:
        channel = 0
    sp = _Spectra(fmt, channel, None)
    j = 10 + int(np.argmax(sp.flat_power[10:]))
    level, _, _ = sp.line(j / SEGMENT_S)
    if sp.clipping is not None:
        raise RecordingError(
            "the calibration tone is clipped", _loc(fmt), "record the tone at a lower level"
        )
    return level
