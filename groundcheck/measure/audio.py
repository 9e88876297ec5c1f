"""Reading a recording: a WAV file's format, and its samples in blocks of bounded size.

Integer PCM of 8, 16 and 32 bits and IEEE float are read with :func:`scipy.io.wavfile.read`
memory-mapped, only
to learn the format and where the samples lie; the samples themselves are then read block by block
with
:func:`numpy.fromfile` at that offset, so an hour-long file never sits in memory (a memory map's
touched pages
would count against the process). 24-bit PCM, which scipy cannot map, is read in blocks of frames
by the standard
library's :mod:`wave`.  Samples are returned as float64 in digital full-scale units (±1.0).
"""

from __future__ import annotations

import os
import wave
from dataclasses import dataclass
from typing import Iterator

import numpy as np

from ..core.errors import Location, PlanError
from .records import Clipping

__all__ = ["WavFormat", "RecordingError", "wav_format", "blocks", "clipping_of"]


class RecordingError(PlanError):
    """A recording that cannot be used: not a WAV file, truncated, silent, too short, no such
    channel."""


@dataclass(frozen=True)
class WavFormat:
    """Where and how a WAV file holds its samples."""

    path: str
    rate: int  # samples per second
    channels: int
    frames: int  # samples per channel
    bits: int
    floating: bool
    dtype: str  # numpy dtype of one sample as stored ("<i2", "<f4", ...; "24" for 24-bit PCM)
    offset: int  # byte offset of the first sample (0 for 24-bit: read through wave)

    @property
    def seconds(self) -> float:
        return self.frames / self.rate

    @property
    def full_scale(self) -> float:
        """The stored value of digital full scale (1.0 for float)."""
        return 1.0 if self.floating else float(2 ** (self.bits - 1))


def _bad(path: str, message: str, hint: str) -> RecordingError:
    return RecordingError(message, Location(path), hint)


def wav_format(path: str) -> WavFormat:
    """The format of the WAV file at ``path``; a located error for anything that is not a readable
    WAV file.

    Parameters:
        path: the file.
    Returns:
        its :class:`WavFormat`.
    References:
        the RIFF WAVE format as read by scipy.io.wavfile and the standard library's wave module.
    """
    import warnings

    from scipy.io import wavfile

    if not os.path.isfile(path):
        raise _bad(
            path, "no such recording (or not a regular file)", "give the path of a .wav file"
        )
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")  # unknown chunks (markers, text) are passed over
            rate, mm = wavfile.read(path, mmap=True)
    except ValueError as e:
        if "3-byte" in str(e):
            return _wav24(path)
        raise _bad(
            path,
            f"not a readable WAV file ({_reason(e)})",
            "record as WAV, PCM 16/24/32-bit or float, and check the file was copied whole",
        ) from None
    except (OSError, EOFError) as e:
        raise _bad(
            path,
            f"not a readable WAV file ({_reason(e)})",
            "record as WAV, PCM 16/24/32-bit or float, and check the file was copied whole",
        ) from None
    shape, dtype, offset = mm.shape, mm.dtype, int(getattr(mm, "offset", 0))
    del mm
    channels = 1 if len(shape) == 1 else shape[1]
    floating = dtype.kind == "f"
    if dtype.kind == "u":  # 8-bit PCM is unsigned
        bits = 8
    else:
        bits = dtype.itemsize * 8
    return WavFormat(path, int(rate), channels, shape[0], bits, floating, dtype.str, offset)


def _reason(e: Exception) -> str:
    text = str(e).strip() or type(e).__name__
    if "mmap length" in text or "reshape" in text or "Unexpected end" in text:
        return "the file ends before its samples do: truncated"
    return text.rstrip(".")


def _wav24(path: str) -> WavFormat:
    try:
        with wave.open(path, "rb") as w:
            rate, ch, width, frames = (
                w.getframerate(),
                w.getnchannels(),
                w.getsampwidth(),
                w.getnframes(),
            )
    except (wave.Error, EOFError, OSError) as e:
        raise _bad(
            path,
            f"not a readable 24-bit WAV file ({_reason(e)})",
            "record as WAV, PCM 16/24/32-bit or float",
        ) from None
    if width != 3:
        raise _bad(
            path,
            f"a {8 * width}-bit sample container this reader does not take",
            "record 16, 24 or 32-bit",
        )
    if os.path.getsize(path) < 44 + frames * ch * 3:  # 44: the smallest header before the samples
        raise _bad(
            path,
            "the file ends before its samples do: truncated",
            "check the file was copied whole",
        )
    return WavFormat(path, rate, ch, frames, 24, False, "24", 0)


def blocks(fmt: WavFormat, channel: int, size: int) -> Iterator[np.ndarray]:
    """The samples of one channel in blocks of ``size`` (the last one may be shorter), in
    full-scale units.

    Parameters:
        fmt: the file's format.
        channel: 0-based channel.
        size: samples per block.
    Returns:
        an iterator of float64 arrays.
    References:
        none (file reading).
    """
    if fmt.dtype == "24":
        yield from _blocks24(fmt, channel, size)
        return
    dtype = np.dtype(fmt.dtype)
    with open(fmt.path, "rb") as f:
        f.seek(fmt.offset)
        done = 0
        while done < fmt.frames:
            n = min(size, fmt.frames - done)
            raw = np.fromfile(f, dtype=dtype, count=n * fmt.channels)
            if raw.size < n * fmt.channels:
                raise _bad(
                    fmt.path,
                    "the file ends before its samples do: truncated",
                    "check the file was copied whole",
                )
            x = raw.reshape(n, fmt.channels)[:, channel].astype(np.float64)
            if dtype.kind == "u":
                x -= 128.0
            yield x / fmt.full_scale
            done += n
            del raw


def _blocks24(fmt: WavFormat, channel: int, size: int) -> Iterator[np.ndarray]:
    with wave.open(fmt.path, "rb") as w:
        done = 0
        while done < fmt.frames:
            n = min(size, fmt.frames - done)
            raw = np.frombuffer(w.readframes(n), dtype=np.uint8)
            if raw.size < n * fmt.channels * 3:
                raise _bad(
                    fmt.path,
                    "the file ends before its samples do: truncated",
                    "check the file was copied whole",
                )
            b = raw.reshape(n, fmt.channels, 3)[:, channel, :].astype(np.int32)
            x = b[:, 0] | (b[:, 1] << 8) | (b[:, 2] << 16)
            x = np.where(x >= 1 << 23, x - (1 << 24), x)
            yield x.astype(np.float64) / float(1 << 23)
            done += n


def clipping_of(
    x: np.ndarray, fmt: WavFormat, start: int, found: Clipping | None
) -> Clipping | None:
    """Samples at (or beyond) digital full scale in a block, added to what earlier blocks found.

    Parameters:
        x: the block, full-scale units.
        fmt: the file's format (integer codes clip one step below +1.0).
        start: the block's first sample number.
        found: what earlier blocks found, or None.
    Returns:
        the clipping so far, or None.
    References:
        none (a sample at the largest code an integer format can hold is taken as clipped).
    """
    top = 1.0 if fmt.floating else (fmt.full_scale - 1) / fmt.full_scale
    hits = np.flatnonzero((x >= top) | (x <= -1.0))
    if hits.size == 0:
        return found
    if found is None:
        return Clipping(int(hits.size), (start + int(hits[0])) / fmt.rate)
    return Clipping(found.samples + int(hits.size), found.first_s)
