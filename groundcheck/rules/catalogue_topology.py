"""The catalogue's topology entries (GC1xx): what each rule checks, why, its fix and its
sources, with what follows from it.

One family's entries, apart from the others so that each module reads in one sitting;
:mod:`groundcheck.rules.catalogue` takes every family's entries in its one table of rules.
"""

from __future__ import annotations

from .rule_entry import Rule, entry
from .rule_families import TOPOLOGY

__all__ = ["TOPOLOGY_ENTRIES"]

#: the topology rules, in the catalogue's order
TOPOLOGY_ENTRIES: list[Rule] = [
    entry(
        "GC101",
        "ground-loop",
        TOPOLOGY,
        "warning",
        "Every independent loop of the ground network (one per conductor outside a spanning "
        "tree; their number is E − V + C), classified by what closes it. A loop of metal parts "
        "and their fastenings alone, or of protective conductors alone (a ring circuit's), is "
        "the protective earth's own structure: listed, never reported.",
        "A loop lets a changing magnetic field drive current round it (hum at the mains "
        "frequency) and lets a return current split between two paths, one of which may be a "
        "signal reference.",
        "Open the loop at the conductor named in the finding, keeping one path only; never "
        "open it in the protective earth.",
        variants=("warning", "note"),
        actions=("open-loop", "between-devices"),
    ),
    entry(
        "GC102",
        "shared-return",
        TOPOLOGY,
        "fault",
        "A conductor that carries a supply-return current (rectifier charging, DC load, "
        "heater, leakage) and also lies between the two points of a sensitive pair. A note "
        "instead of a fault when what it puts at the stage's output — the source's AC current "
        "times the transfer resistance to the stage's pair times the stage's gain, at most the "
        "hum budget's worst-case level of the source at the channel — is below the contributor "
        "level ('--hum-level', -100 dBV by default), and for a leakage current when the "
        "channel's hum stays 20 dB or more below hearing at the listener's seat (a device's "
        "leakage going home through the links is the installation's, not a wiring mistake).",
        "The current's voltage drop across the shared conductor appears at the stage's input "
        "as if it were signal: rectifier charging current gives hum at twice the mains "
        "frequency and a buzz of its harmonics.",
        "Take the supply return straight to the supply star (reservoir negative and centre "
        "tap joined by a short wire of their own), and take the stage's reference to the "
        "signal star by its own wire.",
        variants=("fault", "note"),
        identity="pair",
        actions=("own-return",),
        hum_mechanism=True,
    ),
    entry(
        "GC103",
        "star-chain",
        TOPOLOGY,
        "warning",
        "Returns that reach a star through each other (every shortest route of one passes "
        "another; a junction that only joins two pieces of a wire is no step): a chain that "
        "only looks like a star. An input socket wired to the ground of the stage that "
        "amplifies it (the stage's own pair, with gain) is no chain: the trade wires an input's "
        "ground beside its valve's cathode. Nor are the supplies' own return points "
        "(reservoir and filter negatives, centre taps) gathered at one supply's 0 V and taken "
        "to the star by one link: the ± rails' reservoirs meet at their centre tap. "
        "Also a channel's star (a block placement's) that reaches the plan's own star only "
        "through another channel's star.",
        "Each return in a chain carries the currents of those behind it, so their drops add "
        "into the references further along; a channel star chained through another puts one "
        "channel's returns in the other's wiring.",
        "Run each return (or each channel's star) to the star by a wire of its own.",
        actions=("star-return",),
        # its 'join' findings: a supply's two returns meeting only at the star
        refusals=("through-star",),
    ),
    entry(
        "GC104",
        "star-single-branch",
        TOPOLOGY,
        "note",
        "A point declared as a star that has only one conductor.",
        "A star with one branch gathers nothing; the plan probably misses wires or the star "
        "is misnamed.",
        "Connect the returns that should gather there, or declare the point as a plain junction.",
    ),
    entry(
        "GC105",
        "signal-ground-bonded-twice",
        TOPOLOGY,
        "warning",
        "A signal-ground network bonded to the chassis (directly, through a lift network or "
        "through another chassis-bonded point) at more than one place.",
        "Two bonds make the chassis part of a ground loop: chassis currents and induced "
        "current then flow in the signal ground.",
        "Keep one bond, near the protective-earth bond; isolate the other (insulated jack, "
        "insulating washer). A note when the one bond is a pot's body (a bushing that loosens "
        "as the knob turns): bond at a stud of its own instead.",
        variants=("warning", "note"),
        actions=("second-bond",),
    ),
    entry(
        "GC106",
        "signal-ground-floating",
        TOPOLOGY,
        "warning",
        "A signal-ground network with no connection to the chassis or the protective earth at "
        "all.",
        "A floating signal ground picks up leakage and electrostatic noise and can float to a "
        "dangerous voltage. A fault when it holds a mains-fed supply's return in class I "
        "equipment: an insulation fault in the transformer would leave the secondary circuits, "
        "their sockets and speaker terminals live.",
        "Bond the signal star to the chassis at one place, near the protective-earth stud, "
        "directly or through a lift network.",
        variants=("warning", "fault"),
        refusals=("unconnected",),
    ),
    entry(
        "GC107",
        "heater-unreferenced",
        TOPOLOGY,
        "warning",
        "A valve heater supply with no reference to ground.",
        "A floating heater winding couples mains-frequency hum capacitively into the cathodes.",
        "Reference the heater supply: a centre tap or a pair of resistors (a hum-balance "
        "network) to ground, or an elevated DC reference.",
    ),
    entry(
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
    entry(
        "GC109",
        "no-ground",
        TOPOLOGY,
        "warning",
        "Points that reach neither a metal part nor the protective earth.",
        "Something is not wired: a point of the plan is left floating.",
        "Connect the point, or remove it from the plan.",
        refusals=("unconnected",),
    ),
    entry(
        "GC110",
        "self-loop",
        TOPOLOGY,
        "warning",
        "A conductor whose two ends are the same point.",
        "It carries no current and is almost certainly a typing mistake in the plan.",
        "Name the conductor's real ends.",
    ),
    entry(
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
    entry(
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
    entry(
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
        "the chassis; an unbalanced link's shield is its signal return and stays where it is: "
        "plug the devices it joins into one outlet or strip (a balanced link only between "
        "balanced sockets). Never lift the protective earth.",
        "AES48-2005, interconnections and grounding of shields in audio equipment: a shield "
        "terminates on the enclosure at its point of entry (from memory); common-impedance "
        "coupling (see GC102).",
        actions=("shield-to-chassis",),
    ),
    entry(
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
    entry(
        "GC115",
        "lift-bypassed",
        TOPOLOGY,
        "warning",
        "A ground lift — a switch written open, or a lift network — whose two ends are joined "
        "without it inside the same equipment: a socket's fastening to the case, a tag bolted "
        "to the metal, a second wire.",
        "The lift was put there to open a loop or to let one end float; joined around it, it "
        "lifts nothing, and the builder who throws it to cure a hum hears no change and may "
        "reach for the protective earth instead.",
        "Insulate the fastening that bypasses it (an insulated socket, or shoulder washers), or "
        "move the lift to where it alone joins the two (a box's pin 1 to its case); never lift "
        "the protective earth.",
        "common practice",
    ),
]
