"""The typed results of an analysis run: its options and everything found and computed.

Nothing here imports a numeric library: renderers and the advisor read results through these types.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import TYPE_CHECKING

from ..model.records import Plan
from ..physics.humsettings import HumOptions
from ..physics.protection import STANDARD_PE_LIMIT
from .catalogue import Finding, severity_rank

if TYPE_CHECKING:  # annotations only
    from ..physics.bonding_test import BondingResult
    from ..physics.circuit import Circuit
    from ..physics.coupling import SharedReturn
    from ..physics.hum import HumResult
    from ..physics.outlets import OutletVoltages
    from ..physics.safety import DeviceEarth, SafetyResult
    from .context import LoopInfo

__all__ = ["Options", "Result"]


@dataclass(frozen=True)
class Options:
    """Settings of an analysis run (each has a command-line option of the same meaning)."""

    pe_limit: float = STANDARD_PE_LIMIT      # Ω
    max_frequency: float = HumOptions.max_frequency            # Hz
    contributor_level: float = HumOptions.contributor_level    # dBV at the output
    crosstalk_limit: float = HumOptions.crosstalk_limit        # dB
    hum: bool = True                         # run the electrical hum budget
    jobs: int = 1                            # processes for the hum budget's frequencies
    select: tuple[str, ...] = ()             # rule codes or names to report (empty: all)
    ignore: tuple[str, ...] = ()             # rule codes or names never to report
    allow_accept_danger: bool = False        # whether '# accept' may accept a danger


@dataclass
class Result:
    """Everything groundcheck found and computed for one plan."""

    plan: Plan
    findings: list[Finding]
    loops: list[LoopInfo]
    loop_total: int
    circuit: Circuit | None = None
    safety: SafetyResult | None = None
    hum: HumResult | None = None
    coupling: list[SharedReturn] = field(default_factory=list)
    options: Options = field(default_factory=Options)
    device_earths: tuple[DeviceEarth, ...] | None = None
    notices: list[str] = field(default_factory=list)      # what was relaxed or skipped: shown in every output
    protective: frozenset = frozenset()                    # conductors protective by topology or role (earthing.py)
    rectifiers: list = field(default_factory=list)         # each rectifier's steady state, with or without stages
    outlets: OutletVoltages | None = None                  # an installation's outlet-pair voltages
    bonding: BondingResult | None = None                   # the product bonding test's figures

    def open_findings(self) -> list[Finding]:
        """The findings not accepted in the plan."""
        return [f for f in self.findings if f.accepted is None]

    def counts(self) -> dict[str, int]:
        """Open findings per severity, and how many were accepted in the plan."""
        out = {"danger": 0, "fault": 0, "warning": 0, "note": 0, "accepted": 0}
        for f in self.findings:
            out["accepted" if f.accepted is not None else f.severity] += 1
        return out

    def worst(self) -> str | None:
        return min((f.severity for f in self.open_findings()), key=severity_rank, default=None)

    def fails(self, fail_on: str) -> bool:
        """Whether an open finding is at least as severe as ``fail_on`` (the command's exit status 1)."""
        threshold = severity_rank(fail_on)
        return any(severity_rank(f.severity) <= threshold for f in self.open_findings())
