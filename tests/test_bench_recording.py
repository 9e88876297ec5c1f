"""Reading a recording: each harmonic's level within 0.1 dB of the stated amplitude and of a
Goertzel filter at
the line, in every sample format; the mains frequency found; the noise floor; calibration by a
tone; bad
recordings refused with a located one-line error, clipping and noise-only recordings reported."""

import math
import tracemalloc
import wave

import numpy as np
import pytest

from benchwav import db, goertzel_rms, tones, write
from groundcheck.measure.audio import RecordingError, blocks, wav_format
from groundcheck.measure.lines import FLAT_TOP, cosine_window, measure, tone_level

RATE = 8000
#: stated lines, rms (full-scale units): a fundamental, a 2nd 10 dB down, a 3rd, a 7th 40 dB down
LINES = {1: 0.05, 2: 0.05 / 10**0.5, 3: 0.01, 7: 0.0005}


def test_the_flat_top_window_is_the_published_one():
    # an implementation independent of ours: scipy's flattop (the same five coefficients)
    from scipy.signal.windows import flattop

    assert np.allclose(cosine_window(FLAT_TOP, 1000), flattop(1000, sym=False), atol=1e-12)


@pytest.mark.parametrize("fmt", ["float32", "int16", "int24", "int32"])
def test_each_line_comes_back_within_0_1_db_of_its_stated_level_and_of_goertzel(tmp_path, fmt):
    f0 = 50.25  # a quarter bin off: 4 s hold 201 periods, so Goertzel is exact
    lines = {k * f0: a for k, a in LINES.items()}
    x = tones(lines, RATE, 4.0, noise=1e-5)
    path = tmp_path / f"hum-{fmt}.wav"
    write(path, x, RATE, fmt)
    m = measure(str(path))
    assert m.detected and abs(m.mains_hz - f0) < 0.02 and m.nominal_hz == 50
    got = {ln.harmonic: ln for ln in m.lines}
    for k, a in LINES.items():
        hand = goertzel_rms(x, k * f0, RATE)  # the hand DFT at the exact line
        level = got[k].level / math.sqrt(2)  # dBFS (full-scale sine) back to sample rms
        assert abs(db(level) - db(a)) < 0.1, (k, db(level), db(a))
        assert abs(db(level) - db(hand)) < 0.1, (k, db(level), db(hand))
        assert got[k].above_noise
    assert not got[5].above_noise  # nothing stated there


@pytest.mark.parametrize("offset", [0.0, 0.25, 0.5])
def test_the_level_is_flat_across_the_bin(tmp_path, offset):
    # the flat-top's scallop loss: a line anywhere between two bins reads within 0.1 dB (1 Hz bins)
    x = tones({60.0 + offset: 0.1, 180.0 + offset: 0.01}, RATE, 3.0)
    write(tmp_path / "t.wav", x, RATE)
    m = measure(str(tmp_path / "t.wav"), stated=60.0)
    assert abs(db(m.lines[0].level / math.sqrt(2)) - db(0.1)) < 0.1
    assert abs(db(m.lines[2].level / math.sqrt(2)) - db(0.01)) < 0.1


@pytest.mark.parametrize(
    "lines,nominal",
    [
        ({50.0: 0.02, 150.0: 0.005, 250.0: 0.002}, 50),  # odd harmonics of 50 Hz: magnetic pickup
        (
            {119.8: 0.02, 239.6: 0.01, 359.4: 0.004},
            60,
        ),  # charging current at 59.9 Hz: no fundamental at all
        ({60.5: 0.02, 121.0: 0.004}, 60),
        ({49.2: 0.01, 98.4: 0.01}, 50),
    ],
)
def test_the_mains_frequency_is_found(tmp_path, lines, nominal):
    write(tmp_path / "m.wav", tones(lines, RATE, 3.0, noise=1e-5), RATE)
    m = measure(str(tmp_path / "m.wav"))
    f1 = min(lines)
    k = round(f1 / nominal)
    assert m.nominal_hz == nominal and abs(m.mains_hz - f1 / k) < 0.05


def test_the_noise_floor_is_the_white_noise_density(tmp_path):
    # white noise of rms σ sampled at fs has a one-sided density √(2/fs)·σ per √Hz (Parseval)
    sigma = 1e-3
    write(tmp_path / "n.wav", tones({50.0: 0.05}, RATE, 8.0, noise=sigma), RATE)
    m = measure(str(tmp_path / "n.wav"))
    expected = (
        sigma * math.sqrt(2 / RATE) * math.sqrt(2)
    )  # ×√2: dBFS counts a full-scale sine as 0 dB
    assert abs(db(m.noise_density) - db(expected)) < 0.5


def test_a_tone_calibrates_the_levels_to_volts(tmp_path):
    # the interface reads v volts as v / 2.5 of full scale: a 0.775 V tone and the hum
    # through the same gain
    gain = 1 / 2.5
    write(tmp_path / "tone.wav", tones({997.0: 0.775 * gain}, RATE, 2.0), RATE, "int24")
    write(
        tmp_path / "hum.wav",
        tones({50.0: 0.003 * gain, 100.0: 0.001 * gain}, RATE, 3.0, noise=1e-6),
        RATE,
        "int24",
    )
    volts_per_unit = 0.775 / tone_level(str(tmp_path / "tone.wav"))
    m = measure(str(tmp_path / "hum.wav"), volts_per_unit=volts_per_unit)
    assert (
        abs(db(m.lines[0].level) - db(0.003)) < 0.1 and abs(db(m.lines[1].level) - db(0.001)) < 0.1
    )


def test_one_channel_of_a_multichannel_file_is_read(tmp_path):
    write(tmp_path / "st.wav", tones({50.0: 0.02}, RATE, 2.0), RATE, "int24", channels=3, track=1)
    assert (
        abs(
            db(measure(str(tmp_path / "st.wav"), channel=1).lines[0].level / math.sqrt(2))
            - db(0.02)
        )
        < 0.1
    )
    assert (
        abs(
            db(measure(str(tmp_path / "st.wav"), channel=0).lines[0].level / math.sqrt(2))
            - db(0.002)
        )
        < 0.1
    )
    with pytest.raises(RecordingError, match="3 channel"):
        measure(str(tmp_path / "st.wav"), channel=3)


def test_clipping_is_found_and_noise_alone_finds_no_line(tmp_path):
    write(tmp_path / "clip.wav", np.clip(tones({50.0: 1.0}, RATE, 2.0), -1, 1), RATE, "int16")
    m = measure(str(tmp_path / "clip.wav"))
    assert m.clipping is not None and m.clipping.samples > 100 and m.clipping.first_s < 0.02
    write(tmp_path / "noise.wav", tones({}, RATE, 3.0, noise=1e-3), RATE)
    m = measure(str(tmp_path / "noise.wav"), fallback=60.0)
    assert not m.detected and m.mains_hz == 60.0 and not any(ln.above_noise for ln in m.lines[:10])


@pytest.mark.parametrize(
    "make,message",
    [
        (lambda p: p.write_text("RIFF this is not a recording"), "not a readable WAV"),
        (lambda p: p.write_bytes(b""), "not a readable WAV"),
        (lambda p: _truncated(p, "int16"), "truncated"),
        (lambda p: _truncated(p, "int24"), "truncated"),
        (lambda p: write(p, np.zeros(RATE * 2), RATE, "int16"), "silent"),
        (lambda p: write(p, tones({50.0: 0.1}, RATE, 0.5), RATE), "at least 1 s"),
    ],
)
def test_bad_recordings_are_refused_with_a_located_error(tmp_path, make, message):
    path = tmp_path / "bad.wav"
    make(path)
    with pytest.raises(RecordingError) as e:
        measure(str(path))
    assert message in e.value.one_line() and e.value.one_line().startswith(f"{path}: error: ")
    assert e.value.hint


def _truncated(path, fmt):
    write(path, tones({50.0: 0.1}, RATE, 2.0), RATE, fmt)
    data = path.read_bytes()
    path.write_bytes(data[: len(data) // 2])


def test_an_hour_is_read_in_bounded_memory(tmp_path):
    # an hour at a low rate (a 16-bit mono file of 7 MB written in pieces): the whole file is
    # streamed and its lines come back; Python's allocations stay far under the file's decoded size
    # (29 MB of float64)
    rate, hour = 1000, 3600
    path = tmp_path / "hour.wav"
    with wave.open(str(path), "wb") as w:
        w.setnchannels(1)
        w.setsampwidth(2)
        w.setframerate(rate)
        for start in range(0, rate * hour, rate * 600):
            x = tones(
                {50.0: 0.05, 100.0: 0.005}, rate, 0, noise=1e-4, start=start, count=rate * 600
            )
            w.writeframes(np.round(x * 32768).astype("<i2").tobytes())
    fmt = wav_format(str(path))
    assert fmt.frames == rate * hour and sum(b.size for b in blocks(fmt, 0, 48000)) == rate * hour
    tracemalloc.start()
    m = measure(str(path))
    peak = tracemalloc.get_traced_memory()[1]
    tracemalloc.stop()
    assert m.segments == hour and peak < 5e6
    assert abs(db(m.lines[0].level / math.sqrt(2)) - db(0.05)) < 0.1
    assert abs(db(m.lines[1].level / math.sqrt(2)) - db(0.005)) < 0.1


@pytest.mark.parametrize("m", [1, 2, 7, 60, 3600])
def test_the_line_threshold_is_the_gamma_quantile(m):
    # an implementation independent of ours: scipy's inverse of the regularised upper incomplete
    # gamma
    from scipy.special import gammainccinv
    from groundcheck.measure.lines import gamma_quantile

    assert gamma_quantile(m, 1e-6) == pytest.approx(float(gammainccinv(m, 1e-6)), rel=1e-9)
