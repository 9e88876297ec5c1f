"""The typed results of an analysis run: its options and everything found and computed.

Nothing here imports a numeric library: renderers and the advisor read results through these types.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import TYPE_CHECKING

from ..model.records import Plan
from ..physics.humsettings import PLATE_CURRENTS, HumOptions
from ..physics.protection import MAX_PE_LIMIT, STANDARD_PE_LIMIT
from .catalogue import Finding, severity_rank
from .selection import NotChecked, codes_of

if TYPE_CHECKING:  # annotations only
    from ..physics.bonding_test import BondingResult
    from ..physics.circuit import Circuit
    from ..physics.coupling import SharedReturn
    from ..physics.hum import HumResult
    from ..physics.outlets import OutletVoltages
    from ..physics.device_earth import DeviceEarth
    from ..physics.safety import SafetyResult
    from .context import LoopInfo

__all__ = ["Options", "Result", "FAIL_LEVELS"]

#: the levels ``fails`` takes: a severity, or never (exit 0 whatever is found)
FAIL_LEVELS = ("danger", "fault", "warning", "note", "never")


@dataclass(frozen=True)
class Options:
    """Settings of an analysis run (each has a command-line option of the same meaning)."""

    pe_limit: float = STANDARD_PE_LIMIT  # Ω
    max_frequency: float = HumOptions.max_frequency  # Hz
    contributor_level: float = HumOptions.contributor_level  # dBV at the output
    crosstalk_limit: float = HumOptions.crosstalk_limit  # dB
    plate_current: str = HumOptions.plate_current  # resistive or inductive spread in plates
    hum: bool = True  # run the electrical hum budget
    jobs: int = 1  # processes for the hum budget's frequencies
    only_rules: tuple[str, ...] = ()  # rule codes, families or names to check (empty: all)
    leave_out: tuple[str, ...] = ()  # rule codes, families or names not to check
    allow_accept_danger: bool = False  # '# accept' may accept a danger (still counted)
    only_rules_origin: str = "only_rules"  # where only_rules came from, as the outputs name it
    leave_out_origin: str = "leave_out"  # where leave_out came from

    def __post_init__(self):
        if not 0 < self.pe_limit <= MAX_PE_LIMIT:
            raise ValueError(
                f"pe_limit {self.pe_limit:g} Ω: the protective-path limit is more than 0 and at "
                f"most {MAX_PE_LIMIT:g} Ω"
            )
        for words, origin in (
            (self.only_rules, self.only_rules_origin),
            (self.leave_out, self.leave_out_origin),
        ):
            if isinstance(words, str):
                raise TypeError(f"{origin}: a tuple of rule words, not one string")
            codes_of(words, origin)  # a word that names no rule is an error, never nothing
        if self.plate_current not in PLATE_CURRENTS:
            raise ValueError(
                f"plate_current {self.plate_current!r}: one of {', '.join(PLATE_CURRENTS)}"
            )


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
    notices: list[str] = field(
        default_factory=list
    )  # what was relaxed or skipped: shown in every output
    protective: frozenset = frozenset()  # conductors protective by topology or role (earthing.py)
    rectifiers: list = field(
        default_factory=list
    )  # each rectifier's steady state, with or without stages
    outlets: OutletVoltages | None = None  # an installation's outlet-pair voltages
    not_checked: list[NotChecked] = field(default_factory=list)  # left out, accepted: said always
    bonding: BondingResult | None = None  # the product bonding test's figures

    def open_findings(self) -> list[Finding]:
        """The findings not accepted in the plan."""
        return [f for f in self.findings if f.accepted is None]

    def counts(self) -> dict[str, int]:
        """Open findings per severity, and how many were accepted in the plan."""
        out = {"danger": 0, "fault": 0, "warning": 0, "note": 0, "accepted": 0}
        for f in self.findings:
            out["accepted" if f.accepted is not None else f.severity] += 1
        return out

    def accepted_dangers(self) -> list[Finding]:
        """Dangers accepted in the plan: they still count as dangers (``worst``, ``fails``)."""
        return [f for f in self.findings if f.accepted is not None and f.severity == "danger"]

    def _counted(self) -> list[Finding]:
        return self.open_findings() + self.accepted_dangers()

    def worst(self) -> str | None:
        """The worst severity of the open findings and the accepted dangers (still dangers)."""
        return min((f.severity for f in self._counted()), key=severity_rank, default=None)

    def fails(self, fail_on: str) -> bool:
        """Whether an open finding or an accepted danger is at least as severe as ``fail_on`` (the
        command's exit status 1); ``never`` relaxes that explicitly."""
        if fail_on == "never":
            return False
        threshold = severity_rank(fail_on)
        return any(severity_rank(f.severity) <= threshold for f in self._counted())

    def clean(self) -> bool:
        """No finding, and every rule checked with nothing accepted."""
        return self.worst() is None and not self.not_checked

    def verdict(self, label=str) -> str:
        """The verdict line: 'clean' only when nothing is found and nothing was left out or
        accepted; otherwise 'no danger found among the rules checked; not checked: …' or the worst
        finding, with what was left out.  ``label`` shows a severity (the terminal's capitals)."""
        worst = self.worst()
        if not self.not_checked:
            return "clean" if worst is None else f"worst finding: {label(worst)}"
        if worst == "danger":
            accepted = (
                " (accepted in the plan, still counted)"
                if not any(f.severity == "danger" for f in self.open_findings())
                else ""
            )
            head = f"worst finding: {label(worst)}{accepted}"
        else:
            head = "no danger found among the rules checked"
            head += f" (worst finding: {label(worst)})" if worst is not None else ""
        return f"{head}; not checked: {'; '.join(n.short() for n in self.not_checked)}"
