"""Findings and the catalogue of rules that make them.

Every rule has a stable code of the project's own (``GC`` + three digits:
1xx topology, 2xx protective earth, 3xx hum and buzz, 4xx electrical model),
a severity, and the text ``groundcheck explain CODE`` prints.
"""

from __future__ import annotations

from dataclasses import dataclass, field

from ..core.errors import Location

__all__ = ["Finding", "Rule", "RULES", "SEVERITIES", "severity_rank"]

#: severities from the most to the least serious
SEVERITIES = ("danger", "fault", "warning", "note")


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
    actions: tuple = ()          # structured repair: (verb, element[, where]), e.g. ("insulate", "jack_nut")
    accepted: str | None = None  # the reason of an inline '# accept' on its plan line

    @property
    def rule(self) -> "Rule":
        return RULES[self.code]

    def sort_key(self):
        return (severity_rank(self.severity), self.location.file, self.location.line, self.location.column,
                self.code, self.elements)

    def as_dict(self) -> dict:
        return {"code": self.code, "rule": self.rule.name, "severity": self.severity, "message": self.message,
                "location": self.location.as_dict(), "elements": list(self.elements),
                "figures": self.figures, "fix": self.fix,
                "actions": [{"action": a[0], "element": a[1],
                             **({"at": a[2]} if len(a) > 2 else {})} for a in self.actions],
                "accepted": self.accepted}


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
       "Open the loop at the conductor named in the finding, keeping one path only; never open it in the protective "
       "earth."),
    _r("GC102", "shared-return", "fault",
       "A conductor that carries a supply-return current (rectifier charging, DC load, heater, leakage) "
       "and also lies between the two points of a sensitive pair. A note instead of a fault when the hum budget "
       "puts that source's worst-case level at the stage's channel output below the contributor level ('--hum-level', "
       "-100 dBV by default).",
       "The current's voltage drop across the shared conductor appears at the stage's input as if it were "
       "signal: rectifier charging current gives hum at twice the mains frequency and a buzz of its harmonics.",
       "Take the supply return straight to the supply star (reservoir negative and centre tap joined by a "
       "short wire of their own), and take the stage's reference to the signal star by its own wire."),
    _r("GC103", "star-chain", "warning",
       "Returns that reach a star through each other: a chain that only looks like a star. Also a channel's star "
       "(a block placement's) that reaches the plan's own star only through another channel's star.",
       "Each return in a chain carries the currents of those behind it, so their drops add into the references further "
       "along; a channel star chained through another puts one channel's returns in the other's wiring.",
       "Run each return (or each channel's star) to the star by a wire of its own."),
    _r("GC104", "star-single-branch", "note",
       "A point declared as a star that has only one conductor.",
       "A star with one branch gathers nothing; the plan probably misses wires or the star is misnamed.",
       "Connect the returns that should gather there, or declare the point as a plain junction."),
    _r("GC105", "signal-ground-bonded-twice", "warning",
       "A signal-ground network bonded to the chassis (directly, through a lift network or through "
       "another chassis-bonded point) at more than one place.",
       "Two bonds make the chassis part of a ground loop: chassis currents and induced current then flow in the signal "
       "ground.",
       "Keep one bond, near the protective-earth bond; isolate the other (insulated jack, insulating washer)."),
    _r("GC106", "signal-ground-floating", "warning",
       "A signal-ground network with no connection to the chassis or the protective earth at all.",
       "A floating signal ground picks up leakage and electrostatic noise and can float to a dangerous voltage.",
       "Bond the signal star to the chassis at one place, near the protective-earth stud, directly or through a lift "
       "network."),
    _r("GC107", "heater-unreferenced", "warning",
       "A valve heater supply with no reference to ground.",
       "A floating heater winding couples mains-frequency hum capacitively into the cathodes.",
       "Reference the heater supply: a centre tap or a pair of resistors (a hum-balance network) to ground, or an "
       "elevated DC reference."),
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
    _r("GC111", "mains-not-described", "note",
       "Touchable metal in a plan with no mains statement and no device that brings one.",
       "Without the supply, the protective earth cannot be checked: a plan like this is not clean, only unchecked.",
       "Describe the supply ('mains 230 V 50 Hz, fuse …') or, for double-insulated equipment, "
       "'mains …, class II'."),
    _r("GC112", "length-implausible", "note",
       "A conductor whose stated length is more than 10 % shorter than the straight distance between its positioned "
       "ends (or its route), or more than three times longer (a cable between two placed devices may be any length "
       "above the distance).",
       "A wrong length gives a wrong resistance and inductance, and so wrong hum and protective-earth figures.",
       "Measure the route again and correct the length (give 'via' points when the wire does not run straight)."),
    _r("GC113", "shield-on-signal-ground", "warning",
       "An interconnect shield joined at both ends whose end lands on a device's signal ground inside the device "
       "rather than on its chassis where the cable enters (a balanced link's default is the chassis; state the "
       "landing with 'shield-to chassis|signal').",
       "Whatever current the shield carries (leakage, loop current from the outlets' earth voltage) then flows "
       "through the device's signal-ground wiring on its way to the chassis, and its drop there is added to every "
       "stage referenced to that wiring, however good the link's own rejection.",
       "Land the shield on the chassis at the entry and keep the signal ground's one bond to the chassis; an "
       "unbalanced link's shield is its signal return: use a balanced link, or a ground-lift network on the signal "
       "side. Never lift the protective earth.",
       "AES48-2005, interconnections and grounding of shields in audio equipment: a shield terminates on the "
       "enclosure at its point of entry (from memory); common-impedance coupling (see GC102)."),
    _r("GC201", "pe-missing", "danger",
       "The mains inlet's protective terminal does not reach any metal part through protective conductors.",
       "Without a protective earth a line-to-chassis fault leaves the chassis live.",
       "Run a green-and-yellow protective conductor from the inlet's earth terminal straight to a chassis stud of its "
       "own.",
       "IEC 60364-5-54; IEC 62368-1 (protective bonding), from memory"),
    _r("GC202", "pe-shared-fastener", "fault",
       "The protective conductor lands on a fastener that also holds something else.",
       "Servicing the other part loosens the protective bond; a shared fastener also invites signal returns onto the "
       "protective path.",
       "Give the protective earth a stud of its own, with a lock washer and a second nut; nothing else under it.",
       "common practice; IEC 60335-1 cl. 28 (protective connections not used to fix other parts), from memory"),
    _r("GC203", "pe-series-element", "danger",
       "Something that is not a protective conductor (lift network, switch, signal wire, shield) lies in series with "
       "the protective earth.",
       "A fault current must not depend on a signal wire, a switch or a lift resistor: they may open or burn open and "
       "leave the chassis live.",
       "Connect the protective conductor directly to the chassis; put any lift network between signal ground and "
       "chassis, never in the protective path.",
       "IEC 60364-5-54 543.3 (no switching device in a protective conductor)"),
    _r("GC204", "pe-undersized", "danger",
       "A conductor on the protective route (a wire, trace, bus bar or strap, whatever its written role) thinner than "
       "the line conductor.",
       "The protective conductor must carry the fault current until the fuse opens.",
       "Use a protective conductor at least as thick as the line conductor.",
       "IEC 60364-5-54 Table 54.2 (S ≤ 16 mm²: protective conductor ≥ S)"),
    _r("GC205", "touchable-unbonded", "danger",
       "A touchable metal part not bonded to the protective earth through protective conductors and fastenings alone.",
       "A fault inside could make it live with nothing to clear the fault.",
       "Bond the part to the protective-earth stud with a protective conductor or a fastening rated for it.",
       "IEC 62368-1 (protective bonding of accessible conductive parts), from memory"),
    _r("GC206", "pe-resistance", "danger",
       "Resistance of the protective path from the inlet's earth terminal to each touchable part, against a limit "
       "(default 0.1 Ω). "
       "A limit relaxed with --pe-limit is reported in every output, and a path over 0.1 Ω is still listed as a note.",
       "A high protective-path resistance raises the touch voltage during a fault and may keep the fuse from opening "
       "quickly.",
       "Shorten or thicken the protective conductor, clean and tighten its fastenings.",
       "IEC 62368-1 5.6.6.2 (from memory); IEC 61010-1 6.5.2.4; IEC 60335-1 27.5 (0.1 Ω, supply cord excluded)"),
    _r("GC207", "pe-fault-survival", "danger",
       "Whether each protective conductor survives the let-through I²t of the device that clears the fault (adiabatic "
       "check S ≥ √(I²t)/k).",
       "An undersized protective conductor can melt open during a fault and leave the chassis live.",
       "Use a thicker protective conductor, or a faster fuse of a rating the equipment allows.",
       "IEC 60364-5-54 543.1.2 (adiabatic equation and k values)"),
    _r("GC208", "disconnection-time", "danger",
       "Whether the fuse, breaker or RCD disconnects a line-to-chassis fault within the maximum time of IEC 60364-4-41 "
       "Table 41.1 for the supply voltage and earthing system (TN 0.4 s at 230 V, 0.8 s at 120 V; TT 0.2 s and 0.3 s). "
       "The fault current includes the external loop, the final circuit, the fuse's cold resistance and the cord at "
       "their standard maximum resistances; a fuse's clearing time is its pre-arcing time plus arcing to the next "
       "current zero.",
       "If the protective device does not open in time, a touchable part stays at a dangerous voltage against earth.",
       "Protect the supply with a 30 mA RCD, or lower the fault loop's resistance or the fuse rating the equipment "
       "allows.",
       "IEC 60364-4-41 Table 41.1; IEC 60127-2, IEC 60898-1 and IEC 61008-1 time-current limits (from memory)"),
    _r("GC209", "pe-role-missing", "warning",
       "A conductor the protective earth relies on (on the route from the inlet's earth terminal to a metal part) "
       "that the plan does not write as protective.",
       "Whatever the plan calls it, it carries fault current: it must be a green-and-yellow protective conductor of "
       "at least the line conductor's size, and nobody may remove it to cure hum. groundcheck treats it as protective.",
       "Write the conductor as 'protective' and size it as one.",
       "IEC 60445 (green-and-yellow for protective conductors); IEC 60364-5-54 Table 54.2"),
    _r("GC210", "pe-terminal-other-use", "fault",
       "A conductor that is not part of the protective route lands on the inlet's protective-earth terminal.",
       "The inlet's earth terminal is for the protective conductor alone; a signal or return wire there makes the "
       "protective earth part of the signal circuit and invites someone to disconnect it.",
       "Take the other conductor to its own place: a signal ground bonds to the chassis near the "
       "protective-earth stud.",
       "common practice"),
    _r("GC211", "breaking-capacity", "danger",
       "Whether the prospective line-to-chassis fault current exceeds the fuse's (or breaker's) breaking capacity: "
       "low-breaking glass fuses 35 A or 10 × In, enhanced 150 A, high-breaking 1500 A, breakers 6 kA unless stated.",
       "A fuse asked to break more than it is rated for may keep arcing or burst instead of clearing the fault.",
       "Use a high-breaking (sand-filled ceramic) fuse of the same rating and characteristic ('breaking high').",
       "IEC 60127-2 breaking-capacity categories (from memory)"),
    _r("GC212", "class-ii-earthed", "fault",
       "A class II plan (double or reinforced insulation, no protective earth) with a conductor on the inlet's earth "
       "terminal.",
       "Class II equipment has no earth terminal; a conductor there means the plan is class I, or that metal is joined "
       "to an earth the supply cord does not provide.",
       "Either make the equipment class I (a three-core cord and a protective earth to every touchable part) or remove "
       "the connection and keep the double insulation.",
       "IEC 61140 (protection classes), from memory"),
    _r("GC213", "class-ii-insulation", "note",
       "A class II plan: its safety rests on double or reinforced insulation, which the plan does not describe.",
       "groundcheck can check a protective earth but not insulation; the protective-earth figures are skipped.",
       "Have the insulation (creepage, clearance, insulation of internal wiring) checked against the product-safety "
       "standard.",
       "IEC 61140; IEC 62368-1 (from memory)"),
    _r("GC214", "stated-figure-contradicts", "warning",
       "A clearing time or I²t stated in the mains statement that the fuse table contradicts by more than a factor of "
       "two.",
       "A stated figure replaces the computed one in every protective-earth verdict; a wrong one can hide a danger.",
       "Check the stated figure against the fuse maker's data sheet, or remove it to use the standard's limits.",
       "IEC 60127-2 time-current limits (from memory)"),
    _r("GC215", "device-earth-path", "danger",
       "In an installation, whether each device's earth pin reaches the main earthing terminal through its mains cord, "
       "power strips and the building's protective wiring, and the resistance of that path.",
       "A device whose protective path is broken has no protective earth at all, whatever its own wiring.",
       "Plug the device into an earthed outlet and repair the broken protective connection named in the finding.",
       "IEC 60364-6 (continuity of protective conductors), from memory"),
    _r("GC216", "leakage-above-limit", "fault",
       "In an installation, each device's leakage (protective-conductor) current, stated or computed from its Y "
       "capacitance at its supply, against the product-safety limits: 3.5 mA for a class I device on an ordinary "
       "plug, 0.25 mA for a class II device, whose leakage has no protective conductor to take it.",
       "Above 3.5 mA a class I device needs a permanent connection or an industrial plug and a warning label, because "
       "the current flows through whoever touches the chassis if its earth is ever lost; a class II device over "
       "0.25 mA gives a touch current above the limit for parts not earthed. Either figure also tells of a wrong "
       "plan figure (a Y capacitance typed in µF).",
       "Check the figure against the maker's data or a measurement; a device that truly leaks this much needs the "
       "permanent or industrial connection its standard asks for — have it checked by a qualified person. Never "
       "lift its protective earth.",
       "IEC 60950-1:2005, 5.1.7 (equipment with a protective conductor current over 3.5 mA) and Table 5A (touch "
       "current of parts not connected to protective earth, 0.25 mA), as quoted in IECEE test-report forms; from "
       "memory for IEC 62368-1, which keeps both figures."),
    _r("GC217", "pe-bonding-test", "danger",
       "Whether every conductor of the protective path carries the product standard's "
       "bonding-test current without passing its insulation's short-time temperature limit: "
       "25 A for 60 s (or 1.5 × the fuse rating when more), and 200 % of the fuse's rating for "
       "120 s. The temperature is bounded by the smaller of the adiabatic rise and the steady "
       "state in still air. With a protective device above 16 A, the path's voltage at the "
       "long test's current is held to 2.5 V.",
       "A protective conductor that overheats in the bonding test can damage its insulation or "
       "open, and would do the same carrying a real fault current until the fuse opens.",
       "Use a thicker protective conductor (the finding names the smallest nominal size that "
       "passes); for a path over 2.5 V, lower its resistance.",
       "IEC 60065 15.2 and IEC 61010-1 6.5.2.4 (25 A, 1 min); IEC 60950-1:2005 2.6.3.4 (200 %, "
       "2 min); IEC 60335-1 27.5 and IEC 62368-1 5.6.6.2 (from memory); IEC 60949 (adiabatic "
       "temperature); IEC 60364-5-54 Annex A (final temperatures)"),
    _r("GC301", "hum-contributor", "warning",
       "A conductor whose shared impedance puts hum or buzz above the set level at a channel's output.",
       "Common-impedance coupling: a supply current's drop appears across a sensitive pair.",
       "Move the supply return off the conductor named, as the fix says."),
    _r("GC302", "loop-pickup", "warning",
       "A ground loop in which a stray magnetic field induces a hum voltage above the set level at a channel's output.",
       "Faraday's law: EMF = 2πfBA drives current round the loop; its drop across a sensitive pair is amplified.",
       "Open the loop, or make it smaller and move it away from the transformer."),
    _r("GC303", "hum-audible", "fault",
       "A channel whose hum or buzz, as sound pressure at the listener's seat, is above the ISO 226 threshold of "
       "hearing at some frequency.",
       "Hum above the threshold of hearing at the listener's seat is likely to be heard in a quiet room.",
       "Fix the main contributors named in the finding.",
       "ISO 226:2003 threshold of hearing"),
    _r("GC304", "crosstalk", "warning",
       "Crosstalk between channels through shared return impedance, worse than −60 dB at 1 kHz.",
       "Shared return impedance lets one channel's signal current appear in the other's reference.",
       "Give each channel its own return to the star; join channels at one point only."),
    _r("GC305", "loop-near-source", "note",
       "A loop that passes closer to a field source's centre than its stated size or, with no size stated, than "
       "the distance its strength was stated at.",
       "Close to a transformer the point-dipole law is an extrapolation: with a size the ring model is used, "
       "without one the figure may be off by a large factor either way.",
       "State the source's size ('size 60 mm') and height, or route the loop's conductors away from it.",
       "J. D. Jackson, Classical Electrodynamics, 3rd ed., §5.4 and §5.6"),
    _r("GC401", "island", "note",
       "A part of the ground network not connected to the rest: it gets its own reference in the solve.",
       "Figures between points of different parts are undefined; usually a wire is missing from the plan.",
       "Connect the island, or confirm it is meant to float."),
])
