"""Findings and the catalogue of rules that make them.

Every rule has a stable code of the project's own (``GC`` + three digits:
1xx topology, 2xx protective earth, 3xx hum and buzz, 4xx electrical model),
a severity, and the text ``groundcheck explain CODE`` prints.
"""

from __future__ import annotations

from dataclasses import dataclass, field

from ..core.errors import Location
from .catalogue_pe import PROTECTIVE_ENTRIES
from .rule_families import HUM, MODEL, PROTECTIVE_EARTH, TOPOLOGY, Family

__all__ = [
    "Finding",
    "Rule",
    "RULES",
    "SEVERITIES",
    "severity_rank",
    "IDENTITIES",
    "protective_earth_rule",
]

#: severities from the most to the least serious
SEVERITIES = ("danger", "fault", "warning", "note")


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


#: what identifies a finding before and after a change: its elements in any order, or the first
#: two in order (a source and the stage it reaches, an element and its source)
IDENTITIES = ("elements", "pair")


@dataclass(frozen=True)
class Rule:
    """A catalogue entry: the rule's words, and what follows from it — its family, the severities
    its findings may have (``variants``, the default first), what identifies a finding
    (:data:`IDENTITIES`) and the advisor's repair actions for it (``advice/candidates.py``
    registers a generator under each; ``carried``: the finding's own structured actions)."""

    code: str
    name: str
    family: Family
    severity: str
    checks: str
    why: str
    fix: str
    references: str = "common practice"
    variants: tuple[str, ...] = ()
    identity: str = "elements"
    actions: tuple[str, ...] = ("carried",)


def _r(
    code,
    name,
    family,
    severity,
    checks,
    why,
    fix,
    references="common practice",
    *,
    variants=(),
    identity="elements",
    actions=("carried",),
) -> tuple[str, Rule]:
    variants = variants or (severity,)
    if (
        variants[0] != severity
        or not set(variants) <= set(SEVERITIES)
        or identity not in IDENTITIES
    ):
        raise ValueError(f"{code}: variants {variants} (default {severity}), identity {identity}")
    return code, Rule(
        code, name, family, severity, checks, why, fix, references, variants, identity, actions
    )


RULES: dict[str, Rule] = dict(
    [
        _r(
            "GC101",
            "ground-loop",
            TOPOLOGY,
            "warning",
            "Every independent loop of the ground network (one per conductor outside a spanning "
            "tree; their number is E − V + C), classified by what closes it.",
            "A loop lets a changing magnetic field drive current round it (hum at the mains "
            "frequency) and lets a return current split between two paths, one of which may be a "
            "signal reference.",
            "Open the loop at the conductor named in the finding, keeping one path only; never "
            "open it in the protective earth.",
            variants=("warning", "note"),
            actions=("open-loop", "between-devices"),
        ),
        _r(
            "GC102",
            "shared-return",
            TOPOLOGY,
            "fault",
            "A conductor that carries a supply-return current (rectifier charging, DC load, "
            "heater, leakage) and also lies between the two points of a sensitive pair. A note "
            "instead of a fault when the hum budget puts that source's worst-case level at the "
            "stage's channel output below the contributor level ('--hum-level', -100 dBV by "
            "default).",
            "The current's voltage drop across the shared conductor appears at the stage's input "
            "as if it were signal: rectifier charging current gives hum at twice the mains "
            "frequency and a buzz of its harmonics.",
            "Take the supply return straight to the supply star (reservoir negative and centre "
            "tap joined by a short wire of their own), and take the stage's reference to the "
            "signal star by its own wire.",
            variants=("fault", "note"),
            identity="pair",
            actions=("own-return",),
        ),
        _r(
            "GC103",
            "star-chain",
            TOPOLOGY,
            "warning",
            "Returns that reach a star through each other: a chain that only looks like a star. "
            "Also a channel's star (a block placement's) that reaches the plan's own star only "
            "through another channel's star.",
            "Each return in a chain carries the currents of those behind it, so their drops add "
            "into the references further along; a channel star chained through another puts one "
            "channel's returns in the other's wiring.",
            "Run each return (or each channel's star) to the star by a wire of its own.",
            actions=("star-return",),
        ),
        _r(
            "GC104",
            "star-single-branch",
            TOPOLOGY,
            "note",
            "A point declared as a star that has only one conductor.",
            "A star with one branch gathers nothing; the plan probably misses wires or the star "
            "is misnamed.",
            "Connect the returns that should gather there, or declare the point as a plain "
            "junction.",
        ),
        _r(
            "GC105",
            "signal-ground-bonded-twice",
            TOPOLOGY,
            "warning",
            "A signal-ground network bonded to the chassis (directly, through a lift network or "
            "through another chassis-bonded point) at more than one place.",
            "Two bonds make the chassis part of a ground loop: chassis currents and induced "
            "current then flow in the signal ground.",
            "Keep one bond, near the protective-earth bond; isolate the other (insulated jack, "
            "insulating washer).",
            actions=("second-bond",),
        ),
        _r(
            "GC106",
            "signal-ground-floating",
            TOPOLOGY,
            "warning",
            "A signal-ground network with no connection to the chassis or the protective earth at "
            "all.",
            "A floating signal ground picks up leakage and electrostatic noise and can float to a "
            "dangerous voltage.",
            "Bond the signal star to the chassis at one place, near the protective-earth stud, "
            "directly or through a lift network.",
        ),
        _r(
            "GC107",
            "heater-unreferenced",
            TOPOLOGY,
            "warning",
            "A valve heater supply with no reference to ground.",
            "A floating heater winding couples mains-frequency hum capacitively into the "
            "cathodes.",
            "Reference the heater supply: a centre tap or a pair of resistors (a hum-balance "
            "network) to ground, or an elevated DC reference.",
        ),
        _r(
            "GC108",
            "shield-both-ends",
            TOPOLOGY,
            "warning",
            "A cable shield of internal wiring terminated at both ends.",
            "The shield then forms a loop with the ground wire it runs beside, and carries return "
            "current.",
            "Terminate the shield at one end only: the end named in the finding.",
            actions=("terminate-shield",),
        ),
        _r(
            "GC109",
            "no-ground",
            TOPOLOGY,
            "warning",
            "Points that reach neither a metal part nor the protective earth.",
            "Something is not wired: a point of the plan is left floating.",
            "Connect the point, or remove it from the plan.",
        ),
        _r(
            "GC110",
            "self-loop",
            TOPOLOGY,
            "warning",
            "A conductor whose two ends are the same point.",
            "It carries no current and is almost certainly a typing mistake in the plan.",
            "Name the conductor's real ends.",
        ),
        _r(
            "GC111",
            "mains-not-described",
            TOPOLOGY,
            "note",
            "Touchable metal in a plan with no mains statement and no device that brings one.",
            "Without the supply, the protective earth cannot be checked: a plan like this is not "
            "clean, only unchecked.",
            "Describe the supply ('mains 230 V 50 Hz, fuse …') or, for double-insulated "
            "equipment, 'mains …, class II'.",
        ),
        _r(
            "GC112",
            "length-implausible",
            TOPOLOGY,
            "note",
            "A conductor whose stated length is more than 10 % shorter than the straight distance "
            "between its positioned ends (or its route), or more than three times longer (a cable "
            "between two placed devices may be any length above the distance).",
            "A wrong length gives a wrong resistance and inductance, and so wrong hum and "
            "protective-earth figures.",
            "Measure the route again and correct the length (give 'via' points when the wire does "
            "not run straight).",
        ),
        _r(
            "GC113",
            "shield-on-signal-ground",
            TOPOLOGY,
            "warning",
            "An interconnect shield joined at both ends whose end lands on a device's signal "
            "ground inside the device rather than on its chassis where the cable enters (a "
            "balanced link's default is the chassis; state the landing with 'shield-to "
            "chassis|signal').",
            "Whatever current the shield carries (leakage, loop current from the outlets' earth "
            "voltage) then flows through the device's signal-ground wiring on its way to the "
            "chassis, and its drop there is added to every stage referenced to that wiring, "
            "however good the link's own rejection.",
            "Land the shield on the chassis at the entry and keep the signal ground's one bond to "
            "the chassis; an unbalanced link's shield is its signal return: use a balanced link, "
            "or a ground-lift network on the signal side. Never lift the protective earth.",
            "AES48-2005, interconnections and grounding of shields in audio equipment: a shield "
            "terminates on the enclosure at its point of entry (from memory); common-impedance "
            "coupling (see GC102).",
            actions=("shield-to-chassis",),
        ),
        _r(
            "GC114",
            "signal-return-through-metal",
            TOPOLOGY,
            "warning",
            "A stage whose input reference (its socket's sleeve, or the first point it names) "
            "reaches the stage's ground only through metal parts: a socket grounded only by its "
            "fastening to the chassis, say.",
            "The signal's own return then runs through the chassis, shared with every current the "
            "chassis carries (leakage, loop currents, the protective earth's), and through "
            "contact resistances that change with corrosion and torque; the drop is amplified as "
            "signal.",
            "Wire the socket's ground to the input ground by a wire of its own and insulate the "
            "socket from the chassis (an insulated socket or shoulder washers); the chassis keeps "
            "its one bond to the signal ground.",
        ),
        *(_r(*fields, **declared) for fields, declared in PROTECTIVE_ENTRIES),
        _r(
            "GC301",
            "hum-contributor",
            HUM,
            "warning",
            "A conductor whose shared impedance puts hum or buzz above the set level at a "
            "channel's output.",
            "Common-impedance coupling: a supply current's drop appears across a sensitive pair.",
            "Move the supply return off the conductor named, as the fix says.",
            identity="pair",
        ),
        _r(
            "GC302",
            "loop-pickup",
            HUM,
            "warning",
            "A ground loop in which a stray magnetic field induces a hum voltage above the set "
            "level at a channel's output.",
            "Faraday's law: EMF = 2πfBA drives current round the loop; its drop across a "
            "sensitive pair is amplified.",
            "Open the loop, or make it smaller and move it away from the transformer.",
            identity="pair",
        ),
        _r(
            "GC303",
            "hum-audible",
            HUM,
            "fault",
            "A channel whose hum or buzz, as sound pressure at the listener's seat, is above the "
            "ISO 226 threshold of hearing at some frequency.",
            "Hum above the threshold of hearing at the listener's seat is likely to be heard in a "
            "quiet room.",
            "Fix the main contributors named in the finding.",
            "ISO 226:2003 threshold of hearing",
            identity="pair",
        ),
        _r(
            "GC304",
            "crosstalk",
            HUM,
            "warning",
            "Crosstalk between channels through shared return impedance, worse than −60 dB at 1 "
            "kHz.",
            "Shared return impedance lets one channel's signal current appear in the other's "
            "reference.",
            "Give each channel its own return to the star; join channels at one point only.",
            identity="pair",
            actions=("own-crosstalk-return",),
        ),
        _r(
            "GC305",
            "loop-near-source",
            HUM,
            "note",
            "A loop that passes closer to a field source's centre than its stated size or, with "
            "no size stated, than the distance its strength was stated at.",
            "Close to a transformer the point-dipole law is an extrapolation: with a size the "
            "ring model is used, without one the figure may be off by a large factor either way.",
            "State the source's size ('size 60 mm') and height, or route the loop's conductors "
            "away from it.",
            "J. D. Jackson, Classical Electrodynamics, 3rd ed., §5.4 and §5.6",
            # a note on the model's reach, not on the plan: a change that opens the loop makes the
            # note go away, but is no answer to it (the loop's own findings carry that advice)
            actions=(),
        ),
        _r(
            "GC306",
            "ground-feedback",
            HUM,
            "fault",
            "A channel's own output or load current (a 'signal' current of that channel) flowing "
            "in the ground that one of its stages reads, other than the stages at the current's "
            "own ends. The feedback is the current's drop across each of the channel's stages "
            "times the stage's gain, summed with signs as the crosstalk is, against the rated "
            "output, at 1 kHz and at the hum budget's frequencies. A fault when the part read by "
            "those other stages (the input stages) is above -60 dB (0.1 %) at any of them, a note "
            "from -100 dB to -60 dB.",
            "The output current's drop in the input ground is fed back to the input ahead of the "
            "whole gain: a second, unplanned feedback path through the ground, which changes the "
            "gain, adds the load current's distortion (a class AB stage's half-wave currents, a "
            "speaker's reactive current) to the output and, large enough, makes the amplifier "
            "oscillate. 0.1 % is the distortion a power amplifier is commonly held to (common "
            "practice), so a ground feedback above it is an error of that size at the output.",
            "Take the load or output return straight to the channel's star (the supply's centre) "
            "by a wire of its own, so that it shares nothing with the input ground.",
            "common-impedance coupling (see GC102); 0.1 % as a power amplifier's distortion "
            "figure: common practice",
            variants=("fault", "note"),
        ),
        _r(
            "GC401",
            "island",
            MODEL,
            "note",
            "A part of the ground network not connected to the rest: it gets its own reference in "
            "the solve.",
            "Figures between points of different parts are undefined; usually a wire is missing "
            "from the plan.",
            "Connect the island, or confirm it is meant to float.",
        ),
        _r(
            "GC402",
            "bond-above-plan",
            MODEL,
            "fault",
            "A resistance measured on the bench (the bench command's measurements file) between "
            "two named points, against the plan's figure for the same two points: a fault at more "
            "than three times the plan and 5 mohm over it, a warning at more than 1.5 times and 5 "
            "mohm over.",
            "A joint measuring far above its plan is a joint that was not made as planned: paint "
            "or anodising under a screw, a loose nut, a cold solder joint, a crimp on insulation. "
            "It carries fault current and return current badly and will get worse.",
            "Re-make the joints the finding names on the path between the two points (clean "
            "metal, a star washer, the screw tight), then measure again. Mains work: disconnect "
            "the supply first.",
            "common practice (clean screwed joints measure 0.1-1 mohm, from memory; the 5 mohm "
            "margin covers a four-wire meter's contact uncertainty, common practice)",
            variants=("fault", "warning"),
        ),
        _r(
            "GC403",
            "bond-over-limit",
            MODEL,
            "danger",
            "A resistance measured between the protective-earth terminal (or a point the "
            "protective route reaches from it) and touchable metal, above the protective bonding "
            "limit (0.1 ohm, or --pe-limit).",
            "The protective bond as built would not hold a touchable part near earth potential "
            "during a fault, nor carry the current that opens the fuse in time: the metal can "
            "become live.",
            "Do not use the equipment. Re-make the protective bond (its own stud, clean metal, "
            "the correct conductor) and measure again at the test current, and have it checked by "
            "a qualified person. Never lift or remove the protective earth.",
            "IEC 62368-1 5.6.6.2 (from memory); IEC 61010-1 6.5.2.4; IEC 60335-1 27.5 (0.1 ohm, "
            "supply cord excluded)",
        ),
        _r(
            "GC404",
            "bond-not-in-plan",
            MODEL,
            "warning",
            "Two points measured on the bench with a low resistance between them that the plan "
            "does not join at all.",
            "The build has a connection the plan does not describe: an extra bond or a socket "
            "touching the chassis. It can close a ground loop the plan's hum figures do not "
            "include.",
            "Find the connection (a socket's sleeve touching the panel, a screw through a board's "
            "ground), then either remove it or add it to the plan and check again.",
        ),
        _r(
            "GC405",
            "hum-above-plan",
            MODEL,
            "warning",
            "A channel's recorded hum (the bench command) at a harmonic of the mains more than 6 "
            "dB above the plan's prediction, with the mechanism the fit of the plan's spectra "
            "points at.",
            "The build differs from the plan: a conductor or joint is not as planned, a loop "
            "exists that the plan does not describe, or a field source is closer than planned.",
            "Inspect the conductors the finding names first (the fit's suspect), re-measure their "
            "joints, and compare the wiring with the plan. Never lift the protective earth to "
            "cure hum.",
            "the fit: non-negative least squares (Lawson and Hanson, 1974); 6 dB: common practice",
        ),
    ]
)
