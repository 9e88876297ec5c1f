"""Findings and the catalogue of rules that make them.

Every rule has a stable code of the project's own (``GC`` + three digits:
1xx topology, 2xx protective earth, 3xx hum and buzz, 4xx electrical model),
a severity, and the text ``groundcheck explain CODE`` prints.
"""

from __future__ import annotations

from dataclasses import dataclass, field

from ..core.errors import Location
from .catalogue_hum import HUM_ENTRIES
from .catalogue_installation import INSTALLATION_ENTRIES
from .catalogue_model import MODEL_ENTRIES
from .catalogue_pe import PROTECTIVE_ENTRIES
from .catalogue_topology import TOPOLOGY_ENTRIES
from .rule_entry import IDENTITIES, SEVERITIES, Rule
from .rule_families import PROTECTIVE_EARTH

__all__ = [
    "Finding",
    "Rule",
    "RULES",
    "SEVERITIES",
    "severity_rank",
    "IDENTITIES",
    "protective_earth_rule",
    "SAFETY_RULES",
]


def protective_earth_rule(code: str) -> bool:
    """Whether rule ``code`` judges the protective earth (the GC2 family), whose fixes are mains
    wiring.

    Parameters:
        code: a rule code such as ``GC206``.
    Returns:
        True for a protective-earth rule.
    References:
        none (bookkeeping: the family each catalogue entry declares).
    """
    rule = RULES.get(code)
    return rule is not None and rule.family == PROTECTIVE_EARTH


def severity_rank(sev: str) -> int:
    """0 for danger … 3 for note.

    Parameters:
        sev: danger, fault, warning or note.
    Returns:
        0 for danger … 3 for note.
    References:
        none (bookkeeping).
    """
    return SEVERITIES.index(sev)


@dataclass(frozen=True)
class Finding:
    """One problem found in a plan."""

    code: str
    severity: str
    message: str
    location: Location
    elements: tuple[str, ...] = ()
    figures: dict = field(default_factory=dict)
    fix: str = ""
    # structured repair: (verb, element[, where]), e.g. ("insulate", "jack_nut")
    actions: tuple = ()
    accepted: str | None = None  # the reason of an inline '# accept' on its plan line

    def __post_init__(self):
        if self.severity not in RULES[self.code].variants:
            raise ValueError(
                f"{self.code} makes no {self.severity} finding: its entry lists "
                f"{', '.join(RULES[self.code].variants)}"
            )

    @property
    def rule(self) -> "Rule":
        return RULES[self.code]

    def sort_key(self):
        return (
            severity_rank(self.severity),
            self.location.file,
            self.location.line,
            self.location.column,
            self.code,
            self.elements,
        )

    def as_dict(self) -> dict:
        return {
            "code": self.code,
            "rule": self.rule.name,
            "severity": self.severity,
            "message": self.message,
            "location": self.location.as_dict(),
            "elements": list(self.elements),
            "figures": self.figures,
            "fix": self.fix,
            "actions": [
                {"action": a[0], "element": a[1], **({"at": a[2]} if len(a) > 2 else {})}
                for a in self.actions
            ],
            "accepted": self.accepted,
        }


#: every rule by its code, family after family (topology, protective earth, hum, electrical model)
RULES: dict[str, Rule] = {
    r.code: r
    for r in (
        *TOPOLOGY_ENTRIES,
        # the equipment's and the installation's, in the order of their codes
        *sorted((*PROTECTIVE_ENTRIES, *INSTALLATION_ENTRIES), key=lambda r: r.code),
        *HUM_ENTRIES,
        *MODEL_ENTRIES,
    )
}


#: the rules a danger can come from: every protective-earth rule and any rule whose findings may
#: be dangers (the advice judges every change with them, and leaving them out is said)
SAFETY_RULES: frozenset[str] = frozenset(
    code for code, r in RULES.items() if r.family == PROTECTIVE_EARTH or "danger" in r.variants
)
