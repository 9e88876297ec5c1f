"""A regulator after a rectifier's reservoir: what it draws from the reservoir, the current its
load returns through the ground system, and the ripple left on its output.

Series: the pass element passes the load current whatever the reservoir's voltage, so the
reservoir's load is a constant current (the load current; a resistive load draws the regulated
voltage over its resistance). Shunt: a feed resistor from the reservoir into a shunt element that
holds the output, so the reservoir's load is the resistor to a fixed voltage, (v − V_reg)/R; the
load's and the shunt element's currents, together the whole feed current, return through the
regulator's named point. The output's ripple is the reservoir's reduced by the regulator's ripple
rejection (stated, or the default of its kind).

A series regulator's quiescent current (stated; none by default) is drawn from the reservoir
beside the load's and leaves by its common terminal, so it returns through the named point with
the load's. The reservoir's lowest voltage must stay above the regulated voltage plus the stated
dropout (series), or feed the load and the shunt element's least current through the resistor
(shunt).

References: P. Horowitz, W. Hill, *The Art of Electronics*, 3rd ed., §9.1–9.3 (series pass and
shunt regulators, ripple rejection); a three-terminal series regulator's ripple rejection at 100 Hz
is some 60–80 dB and a zener or glow-tube shunt stabiliser's fed through a few kilohms some 30–40
dB (data sheets, from memory).
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np

from ..core.errors import PlanError, PlanErrors
from ..core.units import ratio_of_db
from ..model.records import Rectifier

__all__ = ["DEFAULT_REJECTION", "rejection_of", "reservoir_load", "load_current", "regulated"]

#: ripple rejection (dB) when none is stated: the low end of each kind's range (from memory, see
#: the module's references)
DEFAULT_REJECTION = {"series": 60.0, "shunt": 30.0}


def rejection_of(r: Rectifier) -> float:
    """The regulator's ripple rejection, dB: stated, or the default of its kind.

    Parameters:
        r: a rectifier with a regulator.
    Returns:
        the rejection in dB.
    References:
        data sheets of series and shunt regulators (from memory; see the module).
    """
    if r.regulator_rejection is not None:
        return r.regulator_rejection
    return DEFAULT_REJECTION[r.regulator]


def load_current(r: Rectifier) -> float:
    """The regulated output's load current, A: stated, or the regulated voltage over the load's
    resistance.

    Parameters:
        r: a rectifier with a regulator.
    Returns:
        the load current, A.
    References:
        Ohm's law.
    """
    if r.load_current is not None:
        return r.load_current
    return r.regulator_voltage / r.load_resistance


def reservoir_load(r: Rectifier) -> Rectifier:
    """The rectifier as its reservoir sees it: the load replaced by what the regulator draws (a
    constant current for a series regulator; the feed resistor to the fixed output for a shunt one,
    a conductance 1/R and a constant current −V_reg/R).

    Parameters:
        r: a rectifier, with or without a regulator.
    Returns:
        the rectifier to simulate (``r`` itself without a regulator).
    References:
        Horowitz and Hill, §9.1–9.3 (see the module).
    """
    if r.regulator is None:
        return r
    plain = replace(r, regulator=None, regulator_point=None, regulator_rejection=None)
    if r.regulator == "series":
        drawn = load_current(r) + r.regulator_quiescent
        return replace(plain, load_current=drawn, load_resistance=None)
    feed = r.regulator_resistance
    return replace(plain, load_current=-r.regulator_voltage / feed, load_resistance=feed)


def regulated(r: Rectifier, v: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """The regulator's output voltage and the current its point returns, over one period, from
    the reservoir's voltage ``v``; a located error when the reservoir cannot keep it regulating.

    Parameters:
        r: a rectifier with a regulator.
        v: the reservoir's voltage over one period, V.
    Returns:
        (output voltage, current returned through the regulator's point) over the period.
    References:
        Horowitz and Hill, §9.1–9.3 (see the module).
    """
    k = 1.0 / ratio_of_db(rejection_of(r))
    out = r.regulator_voltage + k * (v - v.mean())
    i_load = load_current(r)
    if r.regulator == "series":
        back = np.full_like(v, i_load) if r.load_current is not None else out / r.load_resistance
        back = back + r.regulator_quiescent
        short = float(v.min()) <= r.regulator_voltage + r.regulator_dropout
    else:
        back = (v - r.regulator_voltage) / r.regulator_resistance
        short = float(back.min()) < i_load + r.regulator_quiescent
    if short:
        needs = (
            f" and its {r.regulator_dropout:g} V dropout"
            if r.regulator == "series" and r.regulator_dropout
            else ""
        )
        raise PlanErrors(
            [
                PlanError(
                    f"rectifier {r.name}: the reservoir falls to {float(v.min()):.4g} V, too low "
                    f"for its {r.regulator} regulator to hold {r.regulator_voltage:g} V{needs}",
                    r.location,
                    "a series regulator needs the reservoir's trough above its output (and its "
                    "dropout); a shunt one needs the feed resistor to pass the load current at "
                    "the trough: check the secondary, the reservoir and the regulator's figures",
                )
            ]
        )
    return out, back
