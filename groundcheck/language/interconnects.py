"""The receiving inputs of interconnects: each link between devices that states a gain is read by
a stage across its shield, the input's common-mode rejection taken off the gain when the link is
balanced."""

from __future__ import annotations

from math import log10

from ..model.kinds import joins_devices
from ..model.records import Conductor, Stage

__all__ = ["interconnect_inputs", "balanced_rejection", "DEFAULT_CMRR", "MAX_CMRR"]


def interconnect_inputs(conductors: list[Conductor]) -> list[Stage]:
    """The stage of each interconnect that states a gain: its receiving input, reading the voltage
    between its two ends (across its shield), named ``NAME.input``."""
    return [
        Stage(
            f"{c.name}.input",
            c.a,
            c.b,
            c.gain - (balanced_rejection(c) if c.balanced else 0.0),
            c.channel or "main",
            c.location,
            across=c.name,
        )
        for c in conductors
        if joins_devices(c) and c.gain is not None
    ]


#: a balanced input's common-mode rejection when neither it nor the imbalance is stated, dB (an
#: assumption)
DEFAULT_CMRR = 50.0
#: no balanced input rejects better than this, dB (a perfectly matched source still leaves the
#: input's own)
MAX_CMRR = 200.0


def balanced_rejection(c) -> float:
    """The common-mode rejection (dB) of a balanced interconnect's receiving input: from the
    source-impedance imbalance ΔZ against the input's common-mode impedance Zcm per leg when
    stated, CMRR = 20·log10((Zcm + ΔZ)/ΔZ) (the common-mode voltage divides unequally between the
    legs; B. Whitlock, "Balanced lines in audio systems", J. Audio Eng. Soc. 43(6), 1995, from
    memory); the lower of that and the input's own stated CMRR when both are given; else the stated
    CMRR, else :data:`DEFAULT_CMRR`."""
    own = c.cmrr
    if c.imbalance is None:
        return DEFAULT_CMRR if own is None else own
    by_imbalance = (
        MAX_CMRR
        if c.imbalance == 0
        else min(MAX_CMRR, 20 * log10((c.common_mode + c.imbalance) / c.imbalance))
    )
    return by_imbalance if own is None else min(own, by_imbalance)
