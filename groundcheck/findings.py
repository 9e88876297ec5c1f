"""Findings and the catalogue of rules that make them.

Every rule has a stable code of the project's own (``GC`` + three digits:
1xx topology, 2xx protective earth, 3xx hum and buzz, 4xx electrical model),
a severity, and the text ``groundcheck explain CODE`` prints.
"""

from __future__ import annotations

from dataclasses import dataclass, field

from .errors import Location

__all__ = ["Finding", "Rule", "RULES", "SEVERITIES", "severity_rank"]

#: severities from the most to the least serious
SEVERITIES = ("danger", "fault", "warning", "note")


def severity_rank(sev: str) -> int:
    """0 for danger … 3 for note."""
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

    @property
    def rule(self) -> "Rule":
        return RULES[self.code]

    def sort_key(self):
        return (severity_rank(self.severity), self.location.file, self.location.line, self.location.column,
                self.code, self.elements)

    def as_dict(self) -> dict:
        return {"code": self.code, "rule": self.rule.name, "severity": self.severity, "message": self.message,
                "location": self.location.as_dict(), "elements": list(self.elements),
                "figures": self.figures, "fix": self.fix}


@dataclass(frozen=True)
class Rule:
    code: str
    name: str
    severity: str
    checks: str
    why: str
    fix: str
    references: str = "common practice"


def _r(code, name, severity, checks, why, fix, references="common practice") -> tuple[str, Rule]:
    return code, Rule(code, name, severity, checks, why, fix, references)


RULES: dict[str, Rule] = dict([
    _r("GC101", "ground-loop", "warning",
       "Every independent loop of the ground network (one per conductor outside a spanning tree; "
       "their number is E − V + C), classified by what closes it.",
       "A loop lets a changing magnetic field drive current round it (hum at the mains frequency) and "
       "lets a return current split between two paths, one of which may be a signal reference.",
       "Open the loop at the conductor named in the finding, keeping one path only; never open it in the protective earth."),
    _r("GC102", "shared-return", "fault",
       "A conductor that carries a supply-return current (rectifier charging, DC load, heater, leakage) "
       "and also lies between the two points of a sensitive pair.",
       "The current's voltage drop across the shared conductor appears at the stage's input as if it were "
       "signal: rectifier charging current gives hum at twice the mains frequency and a buzz of its harmonics.",
       "Take the supply return straight to the supply star (reservoir negative and centre tap joined by a "
       "short wire of their own), and take the stage's reference to the signal star by its own wire."),
    _r("GC103", "star-chain", "warning",
       "Returns that reach a star through each other: a chain that only looks like a star.",
       "Each return in a chain carries the currents of those behind it, so their drops add into the references further along.",
       "Run each return to the star by a wire of its own."),
    _r("GC104", "star-single-branch", "note",
       "A point declared as a star that has only one conductor.",
       "A star with one branch gathers nothing; the plan probably misses wires or the star is misnamed.",
       "Connect the returns that should gather there, or declare the point as a plain junction."),
    _r("GC105", "signal-ground-bonded-twice", "warning",
       "A signal-ground network bonded to the chassis (directly, through a lift network or through "
       "another chassis-bonded point) at more than one place.",
       "Two bonds make the chassis part of a ground loop: chassis currents and induced current then flow in the signal ground.",
       "Keep one bond, near the protective-earth bond; isolate the other (insulated jack, insulating washer)."),
    _r("GC106", "signal-ground-floating", "warning",
       "A signal-ground network with no connection to the chassis or the protective earth at all.",
       "A floating signal ground picks up leakage and electrostatic noise and can float to a dangerous voltage.",
       "Bond the signal star to the chassis at one place, near the protective-earth stud, directly or through a lift network."),
    _r("GC107", "heater-unreferenced", "warning",
       "A valve heater supply with no reference to ground.",
       "A floating heater winding couples mains-frequency hum capacitively into the cathodes.",
       "Reference the heater supply: a centre tap or a pair of resistors (a hum-balance network) to ground, or an elevated DC reference."),
    _r("GC108", "shield-both-ends", "warning",
       "A cable shield of internal wiring terminated at both ends.",
       "The shield then forms a loop with the ground wire it runs beside, and carries return current.",
       "Terminate the shield at one end only: the end named in the finding."),
    _r("GC109", "no-ground", "warning",
       "Points that reach neither a metal part nor the protective earth.",
       "Something is not wired: a point of the plan is left floating.",
       "Connect the point, or remove it from the plan."),
    _r("GC110", "self-loop", "warning",
       "A conductor whose two ends are the same point.",
       "It carries no current and is almost certainly a typing mistake in the plan.",
       "Name the conductor's real ends."),
    _r("GC201", "pe-missing", "danger",
       "The mains inlet's protective terminal does not reach any metal part through protective conductors.",
       "Without a protective earth a line-to-chassis fault leaves the chassis live.",
       "Run a green-and-yellow protective conductor from the inlet's earth terminal straight to a chassis stud of its own.",
       "IEC 60364-5-54; IEC 62368-1 / IEC 60065 (protective bonding)"),
    _r("GC202", "pe-shared-fastener", "fault",
       "The protective conductor lands on a fastener that also holds something else.",
       "Servicing the other part loosens the protective bond; a shared fastener also invites signal returns onto the protective path.",
       "Give the protective earth a stud of its own, with a lock washer and a second nut; nothing else under it.",
       "common practice; IEC 60335-1 cl. 28 (protective connections not used to fix other parts), from memory"),
    _r("GC203", "pe-series-element", "danger",
       "Something that is not a protective conductor (lift network, switch, signal wire, shield) lies in series with the protective earth.",
       "A fault current must not depend on a signal wire, a switch or a lift resistor: they may open or burn open and leave the chassis live.",
       "Connect the protective conductor directly to the chassis; put any lift network between signal ground and chassis, never in the protective path.",
       "IEC 60364-5-54 543.3 (no switching device in a protective conductor)"),
    _r("GC204", "pe-undersized", "danger",
       "A protective conductor thinner than the line conductor.",
       "The protective conductor must carry the fault current until the fuse opens.",
       "Use a protective conductor at least as thick as the line conductor.",
       "IEC 60364-5-54 Table 54.2 (S ≤ 16 mm²: protective conductor ≥ S)"),
    _r("GC205", "touchable-unbonded", "danger",
       "A touchable metal part not bonded to the protective earth through protective conductors and fastenings alone.",
       "A fault inside could make it live with nothing to clear the fault.",
       "Bond the part to the protective-earth stud with a protective conductor or a fastening rated for it.",
       "IEC 62368-1 / IEC 60065 (protective bonding of accessible conductive parts)"),
    _r("GC206", "pe-resistance", "danger",
       "Resistance of the protective path from the inlet's earth terminal to each touchable part, against a limit (default 0.1 Ω).",
       "A high protective-path resistance raises the touch voltage during a fault and may keep the fuse from opening quickly.",
       "Shorten or thicken the protective conductor, clean and tighten its fastenings.",
       "IEC 60065 cl. 15.2; IEC 61010-1 6.5.2.4; IEC 60950-1 2.6.3.4 (0.1 Ω)"),
    _r("GC207", "pe-fault-survival", "danger",
       "Whether each protective conductor survives the prospective fault current until the fuse opens (adiabatic check S ≥ √(I²t)/k).",
       "An undersized protective conductor can melt open during a fault and leave the chassis live.",
       "Use a thicker protective conductor, or a faster fuse of a rating the equipment allows.",
       "IEC 60364-5-54 543.1.2 (adiabatic equation and k values)"),
    _r("GC208", "fuse-may-not-clear", "danger",
       "Whether the prospective line-to-chassis fault current is large enough to open the fuse or breaker quickly.",
       "If the fault current is too small to open the protective device, the chassis stays at the touch voltage.",
       "Lower the protective path's resistance, or use a lower fuse rating the equipment allows.",
       "IEC 60127-2 and IEC 60898-1 time-current limits (from memory)"),
    _r("GC301", "hum-contributor", "warning",
       "A conductor whose shared impedance puts hum or buzz above the set level at a channel's output.",
       "Common-impedance coupling: a supply current's drop appears across a sensitive pair.",
       "Move the supply return off the conductor named, as the fix says."),
    _r("GC302", "loop-pickup", "warning",
       "A ground loop in which a stray magnetic field induces a hum voltage above the set level at a channel's output.",
       "Faraday's law: EMF = 2πfBA drives current round the loop; its drop across a sensitive pair is amplified.",
       "Open the loop, or make it smaller and move it away from the transformer."),
    _r("GC303", "hum-audible", "fault",
       "A channel whose hum or buzz at the listening position is above the threshold of hearing at some frequency.",
       "It will be heard from the listening position.",
       "Fix the main contributors named in the finding.",
       "ISO 226:2003 threshold of hearing"),
    _r("GC304", "crosstalk", "warning",
       "Crosstalk between channels through shared return impedance, worse than −60 dB at 1 kHz.",
       "Shared return impedance lets one channel's signal current appear in the other's reference.",
       "Give each channel its own return to the star; join channels at one point only."),
    _r("GC401", "island", "note",
       "A part of the ground network not connected to the rest: it gets its own reference in the solve.",
       "Figures between points of different parts are undefined; usually a wire is missing from the plan.",
       "Connect the island, or confirm it is meant to float."),
])
