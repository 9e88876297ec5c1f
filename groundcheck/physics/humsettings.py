"""The settings of the hum and buzz budget, with their defaults: the one home of these defaults.

Kept apart from :mod:`groundcheck.physics.hum` so that the analysis options and the command line
can read the defaults without importing the numeric stack.
"""

from __future__ import annotations

from dataclasses import dataclass

__all__ = ["HumOptions"]


@dataclass(frozen=True)
class HumOptions:
    """Settings of the hum budget.

    Parameters:
        max_frequency: highest harmonic analysed, Hz.
        contributor_level: contributors above this level at the output (dBV) become findings.
        crosstalk_limit: crosstalk between channels at 1 kHz worse than this (dB) is a finding.
    """

    max_frequency: float = 5000.0
    contributor_level: float = -100.0
    crosstalk_limit: float = -60.0
