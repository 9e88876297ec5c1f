"""Levels and hearing: dBV, dBu, sound pressure at the listener's seat, the threshold of hearing.

References: ISO 226:2003 *Acoustics — Normal equal-loudness-level contours*,
Table 1, threshold of hearing T_f (free field, binaural, otologically normal
listeners 18–25 years).  (ISO 226:2023 revised the table; this module keeps the 2003 values.)
"""

from __future__ import annotations

import math
from bisect import bisect_right

from ..core.units import db_of_ratio, ratio_of_db

__all__ = [
    "ISO226_FREQ",
    "ISO226_TF",
    "threshold_of_hearing",
    "heard_threshold",
    "MASKING_MARGIN_DB",
    "speakers_gain",
    "headphone_spl",
    "spl_of",
    "dbu_from_dbv",
    "spl_at_listener",
]

#: ISO 226:2003 Table 1 frequencies (Hz) and threshold of hearing T_f (dB SPL)
ISO226_FREQ = (
    20,
    25,
    31.5,
    40,
    50,
    63,
    80,
    100,
    125,
    160,
    200,
    250,
    315,
    400,
    500,
    630,
    800,
    1000,
    1250,
    1600,
    2000,
    2500,
    3150,
    4000,
    5000,
    6300,
    8000,
    10000,
    12500,
)
ISO226_TF = (
    78.5,
    68.7,
    59.5,
    51.1,
    44.0,
    37.5,
    31.5,
    26.5,
    22.1,
    17.9,
    14.4,
    11.4,
    8.6,
    6.2,
    4.4,
    3.0,
    2.2,
    2.4,
    3.5,
    1.7,
    -1.3,
    -4.2,
    -6.0,
    -5.4,
    -1.5,
    6.0,
    12.6,
    13.9,
    12.3,
)

#: 0 dBu in volts (√0.6 V: 1 mW into 600 Ω)
DBU_REF = math.sqrt(0.6)


def threshold_of_hearing(f: float) -> float:
    """T_f (dB SPL) at frequency f: the ISO 226:2003 table, linear in log-frequency between its
    rows.

    Outside 20 Hz – 12.5 kHz the end value is held (the standard gives no value there).

    Parameters:
        f: frequency, Hz.
    Returns:
        the threshold of hearing, dB SPL.
    References:
        ISO 226:2003, Table 1.
    """
    f = min(max(f, ISO226_FREQ[0]), ISO226_FREQ[-1])
    i = min(max(bisect_right(ISO226_FREQ, f) - 1, 0), len(ISO226_FREQ) - 2)
    f0, f1 = ISO226_FREQ[i], ISO226_FREQ[i + 1]
    t = (math.log10(f) - math.log10(f0)) / (math.log10(f1) - math.log10(f0))
    return ISO226_TF[i] + t * (ISO226_TF[i + 1] - ISO226_TF[i])


def dbu_from_dbv(level_dbv: float) -> float:
    """dBu from dBV: +20·log10(1/√0.6) = +2.2185 dB.

    Parameters:
        level_dbv: a level in dBV.
    Returns:
        the level in dBu.
    References:
        dBu reference 0.7746 V (√0.6 V), common practice.
    """
    return level_dbv - db_of_ratio(DBU_REF)


def spl_at_listener(
    v_out: float, amp_gain_db: float, sensitivity_db: float, impedance: float, distance: float
) -> float:
    """Sound pressure level (dB SPL) at the listener of a voltage at the plan's output.

    V at the speaker = v_out·10^(gain/20); electrical power P = V²/Z; SPL =
    sensitivity (dB SPL at 1 W, 1 m) + 10·log10(P / 1 W) − 20·log10(d / 1 m):
    one speaker, free field, inverse-square law (common practice).

    Parameters:
        v_out: voltage at the plan's output, V rms.
        amp_gain_db: gain to the speaker, dB.
        sensitivity_db: dB SPL at 1 W, 1 m.
        impedance: speaker impedance, Ω.
        distance: listening distance, m.
    Returns:
        sound pressure level at the listener, dB SPL (−inf for no voltage).
    References:
        inverse-square law in a free field (L. Beranek, *Acoustics*, 1954).
    """
    if v_out <= 0:
        return -math.inf
    v = v_out * ratio_of_db(amp_gain_db)
    p = v * v / impedance
    return sensitivity_db + 10 * math.log10(p) - 20 * math.log10(distance)


def speakers_gain(n: int) -> float:
    """dB added at the seat by ``n`` speakers playing the same hum in phase (equal distances).

    Parameters:
        n: the number of speakers.
    Returns:
        20·log10(n), dB (6.02 dB for two).
    References:
        L. Beranek, *Acoustics*, 1954 (superposition of coherent sound pressures); at hum
        frequencies the wavelength (3.4 m at 100 Hz) is long against the usual difference of path,
        so the speakers add in phase (common practice).
    """
    return db_of_ratio(n)


def headphone_spl(v: float, sensitivity: float, per: str, impedance: float) -> float:
    """Sound pressure level (dB SPL) in a headphone driven with ``v`` volts rms.

    Parameters:
        v: voltage across the headphone, V rms.
        sensitivity: dB SPL per mW (``per`` "mW") or per V rms (``per`` "V").
        per: "mW" or "V".
        impedance: the headphone's nominal impedance, Ω (used for per mW).
    Returns:
        the level, dB SPL (−inf for no voltage).
    References:
        IEC 60268-7 (headphone sensitivity for 1 mW or 1 V); P = V²/Z (Ohm's law).
    """
    if v <= 0:
        return -math.inf
    if per == "V":
        return sensitivity + db_of_ratio(v)
    return sensitivity + 10 * math.log10(v * v / impedance / 1e-3)


def spl_of(v_out: float, listening) -> float:
    """Sound pressure level (dB SPL) at the listener of a voltage at the plan's output, for the
    plan's listening context: headphones when stated, else its speakers at the distance (with their
    number and the room's gain).

    Parameters:
        v_out: voltage at the plan's output, V rms.
        listening: the plan's Listening record (a sensitivity or headphones stated).
    Returns:
        the level, dB SPL.
    References:
        :func:`spl_at_listener`, :func:`speakers_gain`, :func:`headphone_spl`.
    """
    if listening.phones is not None:
        return headphone_spl(
            v_out * ratio_of_db(listening.amp_gain),
            listening.phones,
            listening.phones_per,
            listening.impedance,
        )
    spl = spl_at_listener(
        v_out, listening.amp_gain, listening.sensitivity, listening.impedance, listening.distance
    )
    return spl + speakers_gain(listening.speakers) + listening.room_gain


#: a tone in broadband noise is just heard about this many dB below the noise's level in the
#: critical band around it (Fletcher's critical ratio; E. Zwicker, H. Fastl, *Psychoacoustics*,
#: 1990, from memory); a third-octave band stands in for the critical band
MASKING_MARGIN_DB = 4.0


def heard_threshold(f: float, background: float | None) -> float:
    """The level (dB SPL) a tone at f must pass to be heard: the ISO 226 threshold, or in a room
    whose noise is ``background`` dB SPL per third-octave band, that level less
    :data:`MASKING_MARGIN_DB` when higher.

    Parameters:
        f: frequency, Hz.
        background: the room's noise per third-octave band, dB SPL, or None for a quiet room.
    Returns:
        the threshold, dB SPL.
    References:
        ISO 226:2003; E. Zwicker, H. Fastl, *Psychoacoustics*, 1990 (masking by noise, from
        memory).
    """
    quiet = threshold_of_hearing(f)
    return quiet if background is None else max(quiet, background - MASKING_MARGIN_DB)
