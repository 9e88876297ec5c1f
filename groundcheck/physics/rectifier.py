"""Capacitor-input rectifier: charging current simulated in time to steady state, and its
harmonics.

Model: a sinusoidal secondary (rms ``secondary``) behind the series
resistance of winding and diodes (``winding``), ideal diodes with a constant
forward drop (one for full-wave centre-tap and half-wave, two for a bridge),
the reservoir capacitor, and a load drawing a constant current or through a
resistor.  The capacitor voltage is integrated with the trapezoidal rule over
one mains period; the periodic steady state is found by Newton's method on
the capacitor voltage at the start of the period (a shooting method), so no
start-up transient has to be waited out.

With ``diode shockley`` or a ``leakage`` inductance the exact model is used
instead: each diode follows the Shockley law with a series resistance, the
conducting (half-)winding has its leakage inductance in series, and the state
(winding current, reservoir voltage) is integrated with the trapezoidal rule,
the diode's equation solved by Newton's method at each step; the steady state
is found by Newton's method on the winding current and the state at the
source's zero crossing (see :mod:`groundcheck.physics.rectifier_exact`).  A choke
input (a choke between the rectifiers and the reservoir) takes the exact model
too, with its critical inductance; a negative rail is the positive one turned
round.

References: O. H. Schade, "Analysis of rectifier operation", Proc. IRE 31(7),
1943; P. Horowitz, W. Hill, *The Art of Electronics*, 3rd ed., §1.6.3A (ripple
ΔV ≈ I/(2fC) for full-wave); T. J. Aprille, T. N. Trick, "Steady-state
analysis of nonlinear circuits with periodic inputs", Proc. IEEE 60(1), 1972
(shooting method).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

import numpy as np

from ..core.errors import PlanError, PlanErrors
from ..model.records import Rectifier
from .regulator import regulated, reservoir_load

__all__ = ["RectifierResult", "simulate", "harmonic_phasors", "STEPS_PER_PERIOD"]


#: integration steps per mains period
STEPS_PER_PERIOD = 4096

#: steady states already found in this process, by the rectifier's figures and the mains frequency:
#: a long-running process (the live view, the advisor trying candidates) re-analyses plans whose
#: rectifiers have not changed
_SOLVED: dict[tuple[Rectifier, float], "RectifierResult"] = {}
_SOLVED_MAX = 64


@dataclass(frozen=True)
class RectifierResult:
    """Steady-state waveforms over one mains period and the figures derived from them."""

    name: str
    frequency: float  # mains, Hz
    t: np.ndarray  # s, STEPS_PER_PERIOD samples
    current: np.ndarray  # charging current in the return, A
    voltage: np.ndarray  # reservoir voltage, V
    dc_voltage: float
    ripple_pp: float
    peak_current: float
    rms_current: float
    dc_current: float
    conduction_angle: float  # degrees per charging pulse
    filter_current: np.ndarray | None = (
        None  # a filter section's capacitor current, out of its negative, A
    )
    output_dc: float | None = None  # the filter section's or the regulator's output, V
    output_ripple_pp: float | None = None
    #: the voltage of the rail the load is fed from over the period (the filter's or the
    #: regulator's output; None: the reservoir itself), V
    rail: np.ndarray | None = None
    #: a regulator's load (and shunt) current, returned through its point, A
    return_current: np.ndarray | None = None
    #: a choke input's critical inductance (continuous conduction above it), H; None: no choke
    critical_inductance: float | None = None
    continuous: bool | None = None  # ... whether its current flows all the period round
    negative: bool = False  # a negative rail: every waveform and mean turned round

    @property
    def filter_rms(self) -> float | None:
        """The filter section's capacitor current, rms, A (None without a filter)."""
        if self.filter_current is None:
            return None
        return float(np.sqrt(np.mean(self.filter_current**2)))

    def rail_voltage(self) -> np.ndarray:
        """The voltage of the rail the load is fed from over the period, V."""
        return self.voltage if self.rail is None else self.rail


def _source(r: Rectifier, t: np.ndarray, f: float) -> np.ndarray:
    v = math.sqrt(2) * r.secondary * np.sin(2 * math.pi * f * t)
    if r.topology == "half-wave":
        return v - r.diode_drop
    drops = 2 if r.topology == "bridge" else 1
    return np.abs(v) - drops * r.diode_drop


def _period(s: np.ndarray, v0: float, h: float, R: float, C: float, iload: float, gload: float):
    """Trapezoidal integration over one period; returns voltages, currents and dv_end/dv0."""
    n = len(s)
    v = [float(v0)] * (n + 1)
    dvdv0 = 1.0
    a_on = h / (2 * R * C)
    a_load = h * gload / (2 * C)
    b_load = h * iload / C
    vk = float(v0)
    s_ext = np.append(s, s[0])
    s_list = s_ext.tolist()  # plain floats: numpy's cost per element was most of it
    for k in range(n):
        s0, s1 = s_list[k], s_list[k + 1]
        on0 = s0 > vk
        # try conducting through the step
        num = vk * (1 - a_on - a_load) + a_on * (s0 + s1) - b_load
        v1 = num / (1 + a_on + a_load)
        if v1 < s1 or on0:
            if v1 < s1 and on0:
                factor = (1 - a_on - a_load) / (1 + a_on + a_load)
            else:
                # switching inside the step: fall back to the non-conducting update if it stays
                # above the source
                v_off = (vk * (1 - a_load) - b_load) / (1 + a_load)
                if v_off >= s1:
                    v1 = v_off
                    factor = (1 - a_load) / (1 + a_load)
                else:
                    factor = (1 - a_on - a_load) / (1 + a_on + a_load)
        else:
            v1 = (vk * (1 - a_load) - b_load) / (1 + a_load)
            factor = (1 - a_load) / (1 + a_load)
        dvdv0 *= factor
        vk = v1
        v[k + 1] = v1
    v = np.array(v)
    return v, np.maximum(0.0, (s_ext - v) / R), dvdv0


def simulate(r: Rectifier, frequency: float) -> RectifierResult:
    """Periodic steady state of the rectifier at mains ``frequency`` (Hz).

    Parameters:
        r: a rectifier record.
        frequency: mains frequency, Hz.
    Returns:
        the periodic steady state: charging current samples, ripple, DC output.
    References:
        O. H. Schade, 'Analysis of rectifier operation', Proc. IRE 31, 1943 (the circuit model).
    """
    key = (r, float(frequency))  # a record's location does not take part in its equality
    if key not in _SOLVED:
        if len(_SOLVED) >= _SOLVED_MAX:
            _SOLVED.pop(next(iter(_SOLVED)))
        result = _checked(r, _simulate(reservoir_load(r), frequency))
        if r.regulator is not None:
            rail, back = regulated(r, result.voltage)
            result = replace(
                result,
                output_dc=float(rail.mean()),
                output_ripple_pp=float(rail.max() - rail.min()),
                rail=rail,
                return_current=back,
            )
        result = _choke_input(r, result)
        if r.polarity == "negative":
            result = _negative(r, result)
        for a in (
            result.t,
            result.current,
            result.voltage,
            result.filter_current,
            result.rail,
            result.return_current,
        ):
            if a is not None:
                a.flags.writeable = False  # shared between analyses: nobody may change it in place
        _SOLVED[key] = result
    return _SOLVED[key]


def _choke_input(r: Rectifier, result: RectifierResult) -> RectifierResult:
    """A choke input's critical inductance and whether its current is continuous (the simulated
    current never falls to zero).  The critical inductance is the textbook condition for
    full-wave and bridge rectifiers, L_crit = R/(3ω) with ω the mains' angular frequency and R the
    load the choke feeds (the reservoir's mean voltage over its mean current): the rectified
    wave's second-harmonic current, (4/3π)·V_peak/(2ωL), no larger than its mean, (2/π)·V_peak/R
    (J. Millman, C. C. Halkias, *Integrated Electronics*, 1972, the L-section filter; from
    memory)."""
    if r.choke_inductance <= 0:
        return result
    load = result.dc_voltage / result.dc_current if result.dc_current > 0 else math.inf
    on = result.current > 1e-9 * max(result.peak_current, 1e-30)
    return replace(
        result,
        critical_inductance=load / (3 * 2 * math.pi * result.frequency),
        continuous=bool(on.all()),
    )


def _negative(r: Rectifier, result: RectifierResult) -> RectifierResult:
    """A negative rail: the positive rail's waveforms turned round (its charging current flowing
    from b to a, its voltages below the ground end); a half-wave one's charging half a period later
    (on the winding's other half-cycle), full-wave and bridge ones' at the same instants."""
    shift = len(result.t) // 2 if r.topology == "half-wave" else 0

    def turned(a):
        return None if a is None else -np.roll(a, shift)

    return replace(
        result,
        current=turned(result.current),
        voltage=turned(result.voltage),
        filter_current=turned(result.filter_current),
        rail=turned(result.rail),
        return_current=turned(result.return_current),
        dc_voltage=-result.dc_voltage,
        dc_current=-result.dc_current,
        output_dc=None if result.output_dc is None else -result.output_dc,
        negative=True,
    )


def _checked(r: Rectifier, result: RectifierResult) -> RectifierResult:
    """The steady state, unless it is not finite or its reservoir holds well over the secondary's
    peak (no passive rectifier can; the margin of a quarter leaves room for the overshoot a leakage
    inductance gives): then a located error, never an absurd figure."""
    peak = math.sqrt(2) * r.secondary * 1.25 + 1.0
    values = (result.dc_voltage, result.ripple_pp, result.peak_current, result.rms_current)
    if (
        not all(math.isfinite(v) for v in values)
        or abs(result.dc_voltage) > peak
        or (
            result.output_dc is not None
            and (not math.isfinite(result.output_dc) or abs(result.output_dc) > peak)
        )
    ):
        raise PlanErrors(
            [
                PlanError(
                    f"rectifier {r.name}: no steady state could be found with these figures (the "
                    f"result would exceed the secondary's {math.sqrt(2) * r.secondary:.4g} V "
                    "peak)",
                    r.location,
                    "check the rectifier's figures and their units",
                )
            ]
        )
    return result


def _simulate(r: Rectifier, frequency: float) -> RectifierResult:
    """The steady state, solved (see :func:`simulate`)."""
    n = STEPS_PER_PERIOD
    T = 1.0 / frequency
    h = T / n
    t = np.arange(n) * h
    if (
        r.diode_law in ("shockley", "valve")
        or r.leakage > 0
        or r.filter_capacitance is not None
        or r.choke_inductance > 0
    ):
        from .rectifier_exact import steady_state

        w = math.sqrt(2) * r.secondary * np.sin(2 * math.pi * frequency * t)
        v, i, out, i_filter = steady_state(r, w if r.topology == "half-wave" else np.abs(w), h)
        return _result(r, frequency, t, v, i, out, i_filter)
    s = _source(r, t, frequency)
    iload = r.load_current or 0.0
    gload = 1.0 / r.load_resistance if r.load_resistance else 0.0
    R = max(r.winding, 1e-3)
    peak = float(s.max())
    v0 = max(peak * 0.95, 0.0)
    for _ in range(60):
        v, i, d = _period(s, v0, h, R, r.capacitance, iload, gload)
        g = v[-1] - v0
        if abs(g) < 1e-9 * max(1.0, peak):
            break
        step = g / (1.0 - d) if abs(1.0 - d) > 1e-12 else g
        v0 = min(max(v0 + step, 0.0), max(peak, 0.0))
    return _result(r, frequency, t, v[:-1], i[:-1])


def _result(
    r: Rectifier,
    frequency: float,
    t: np.ndarray,
    v: np.ndarray,
    i: np.ndarray,
    out: np.ndarray | None = None,
    i_filter: np.ndarray | None = None,
) -> RectifierResult:
    on = i > 1e-9 * max(float(i.max()), 1e-30)
    pulses = 2 if r.topology != "half-wave" else 1
    angle = 360.0 * float(on.sum()) / pulses / len(t)
    return RectifierResult(
        r.name,
        frequency,
        t,
        i,
        v,
        float(v.mean()),
        float(v.max() - v.min()),
        float(i.max()),
        float(np.sqrt(np.mean(i * i))),
        float(i.mean()),
        angle,
        i_filter,
        None if out is None else float(out.mean()),
        None if out is None else float(out.max() - out.min()),
        out,
    )


def harmonic_phasors(samples: np.ndarray, max_harmonic: int) -> np.ndarray:
    """Complex rms phasors of harmonics 0 … max_harmonic of one period of ``samples`` (index =
    harmonic).

    Element 0 is the mean; element k is √2·X_k/N, whose magnitude is the rms
    value of harmonic k.

    Parameters:
        samples: one period, equally spaced.
        max_harmonic: highest harmonic.
    Returns:
        complex rms phasors indexed by harmonic.
    References:
        the discrete Fourier transform (numpy.fft).
    """
    n = len(samples)
    X = np.fft.rfft(samples)
    out = np.zeros(max_harmonic + 1, dtype=complex)
    m = min(max_harmonic, len(X) - 1)
    out[0] = X[0].real / n
    out[1 : m + 1] = math.sqrt(2) * X[1 : m + 1] / n
    return out
