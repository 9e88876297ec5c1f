"""The catalogue's protective-earth entries (GC2xx): what each rule checks, why, its fix and its
sources, with what follows from it.

One family's entries, apart from the others so that each module reads in one sitting;
:mod:`groundcheck.rules.catalogue` takes every family's entries in its one table of rules.
"""

from __future__ import annotations

from .rule_entry import Rule, entry
from .rule_families import PROTECTIVE_EARTH

__all__ = ["PROTECTIVE_ENTRIES"]

#: the protective-earth rules, in the catalogue's order
PROTECTIVE_ENTRIES: list[Rule] = [
    entry(
        "GC201",
        "pe-missing",
        PROTECTIVE_EARTH,
        "danger",
        "The mains inlet's protective terminal does not reach any metal part through protective "
        "conductors.",
        "Without a protective earth a line-to-chassis fault leaves the chassis live.",
        "Run a green-and-yellow protective conductor from the inlet's earth terminal straight to "
        "a chassis stud of its own.",
        "IEC 60364-5-54; IEC 62368-1 (protective bonding), from memory",
    ),
    entry(
        "GC202",
        "pe-shared-fastener",
        PROTECTIVE_EARTH,
        "fault",
        "The protective conductor lands on a fastener that also holds something else.",
        "Servicing the other part loosens the protective bond; a shared fastener also invites "
        "signal returns onto the protective path. A danger when the stud also holds a part (a "
        "transformer's foot, a bracket) and is the metal's only protective bond: taking the part "
        "out for service unearths the chassis.",
        "Give the protective earth a stud of its own, with a lock washer and a second nut; "
        "nothing else under it.",
        "common practice; IEC 60335-1 cl. 28 (protective connections not used to fix other "
        "parts), from memory",
        actions=("own-stud",),
        variants=("fault", "danger"),
    ),
    entry(
        "GC203",
        "pe-series-element",
        PROTECTIVE_EARTH,
        "danger",
        "Something that is not a protective conductor (lift network, switch, signal wire, shield) "
        "lies in series with the protective earth.",
        "A fault current must not depend on a signal wire, a switch or a lift resistor: they may "
        "open or burn open and leave the chassis live.",
        "Connect the protective conductor directly to the chassis; put any lift network between "
        "signal ground and chassis, never in the protective path.",
        "IEC 60364-5-54 543.3 (no switching device in a protective conductor)",
    ),
    entry(
        "GC204",
        "pe-undersized",
        PROTECTIVE_EARTH,
        "danger",
        "A conductor on the protective route (a wire, trace, bus bar or strap, whatever its "
        "written role) thinner than the line conductor.",
        "The protective conductor must carry the fault current until the fuse opens.",
        "Use a protective conductor at least as thick as the line conductor.",
        "IEC 60364-5-54 Table 54.2 (S ≤ 16 mm²: protective conductor ≥ S)",
        actions=("thicken",),
    ),
    entry(
        "GC205",
        "touchable-unbonded",
        PROTECTIVE_EARTH,
        "danger",
        "A touchable metal part not bonded to the protective earth through protective conductors "
        "and fastenings alone.",
        "A fault inside could make it live with nothing to clear the fault.",
        "Bond the part to the protective-earth stud with a protective conductor or a fastening "
        "rated for it.",
        "IEC 62368-1 (protective bonding of accessible conductive parts), from memory",
        actions=("bond",),
    ),
    entry(
        "GC206",
        "pe-resistance",
        PROTECTIVE_EARTH,
        "danger",
        "Resistance of the protective path from the inlet's earth terminal to each touchable "
        "part, against a limit (default 0.1 Ω). A limit relaxed with --pe-limit (at most 0.5 Ω) "
        "is reported in every output, and a path over 0.1 Ω is still listed as a warning.",
        "A high protective-path resistance raises the touch voltage during a fault and may keep "
        "the fuse from opening quickly.",
        "Shorten or thicken the protective conductor, clean and tighten its fastenings.",
        "IEC 62368-1 5.6.6.2 (from memory); IEC 61010-1 6.5.2.4; IEC 60335-1 27.5 (0.1 Ω, supply "
        "cord excluded)",
        variants=("danger", "warning"),
        actions=("bond",),
    ),
    entry(
        "GC207",
        "pe-fault-survival",
        PROTECTIVE_EARTH,
        "danger",
        "Whether each protective conductor survives the let-through I²t of the device that clears "
        "the fault (adiabatic check S ≥ √(I²t)/k).",
        "An undersized protective conductor can melt open during a fault and leave the chassis "
        "live.",
        "Use a thicker protective conductor, or a faster fuse of a rating the equipment allows.",
        "IEC 60364-5-54 543.1.2 (adiabatic equation and k values)",
    ),
    entry(
        "GC208",
        "disconnection-time",
        PROTECTIVE_EARTH,
        "danger",
        "Whether the fuse, breaker or RCD disconnects a line-to-chassis fault within the maximum "
        "time of IEC 60364-4-41 Table 41.1 for the supply voltage and earthing system (TN 0.4 s "
        "at 230 V, 0.8 s at 120 V; TT 0.2 s and 0.3 s). The fault current includes the external "
        "loop, the final circuit, the fuse's cold resistance and the cord at their standard "
        "maximum resistances; a fuse's clearing time is its pre-arcing time plus arcing to the "
        "next current zero.",
        "If the protective device does not open in time, a touchable part stays at a dangerous "
        "voltage against earth.",
        "Protect the supply with a 30 mA RCD, or lower the fault loop's resistance or the fuse "
        "rating the equipment allows.",
        "IEC 60364-4-41 Table 41.1; IEC 60127-2, IEC 60898-1 and IEC 61008-1 time-current limits "
        "(from memory)",
        variants=("danger", "note"),
        actions=("rcd-at-socket",),
    ),
    entry(
        "GC209",
        "pe-role-missing",
        PROTECTIVE_EARTH,
        "warning",
        "A conductor the protective earth relies on (on the route from the inlet's earth terminal "
        "to a metal part) that the plan does not write as protective (or, for a bolt or strap, "
        "as a bond: a fastening on the route is judged by GC206 and GC202).",
        "Whatever the plan calls it, it carries fault current: it must be a green-and-yellow "
        "protective conductor of at least the line conductor's size, and nobody may remove it to "
        "cure hum. groundcheck treats it as protective.",
        "Write the conductor as 'protective' and size it as one.",
        "IEC 60445 (green-and-yellow for protective conductors); IEC 60364-5-54 Table 54.2",
    ),
    entry(
        "GC210",
        "pe-terminal-other-use",
        PROTECTIVE_EARTH,
        "fault",
        "A conductor that is not part of the protective route lands on the inlet's "
        "protective-earth terminal.",
        "The inlet's earth terminal is for the protective conductor alone; a signal or return "
        "wire there makes the protective earth part of the signal circuit and invites someone to "
        "disconnect it.",
        "Take the other conductor to its own place: a signal ground bonds to the chassis near the "
        "protective-earth stud.",
        "common practice",
    ),
    entry(
        "GC211",
        "breaking-capacity",
        PROTECTIVE_EARTH,
        "danger",
        "Whether the prospective line-to-chassis fault current exceeds the fuse's (or breaker's) "
        "breaking capacity: low-breaking glass fuses 35 A or 10 × In, enhanced 150 A, "
        "high-breaking 1500 A, breakers 6 kA unless stated.",
        "A fuse asked to break more than it is rated for may keep arcing or burst instead of "
        "clearing the fault.",
        "Use a high-breaking (sand-filled ceramic) fuse of the same rating and characteristic "
        "('breaking high').",
        "IEC 60127-2 breaking-capacity categories (from memory)",
        variants=("danger", "warning"),
        actions=("high-breaking",),
    ),
    entry(
        "GC212",
        "class-ii-earthed",
        PROTECTIVE_EARTH,
        "note",
        "A class II plan (double or reinforced insulation, no protective earth) with a conductor "
        "on the inlet's earth terminal: a functional earth; a warning when it is built as a "
        "protective earth is (written protective, or landing on metal or a stud fastened to it).",
        "Class II equipment may have a functional earth (for screening or a signal reference, not "
        "for safety): its protection still rests on its insulation, so the earth conductor must "
        "not be counted on as protective, nor may a touchable part rely on it.",
        "Keep the functional earth separate from the protection: the double or reinforced "
        "insulation must protect on its own. If the metal relies on the earth for safety, the "
        "equipment is class I: give it a three-core cord and a protective earth to every "
        "touchable part.",
        "IEC 61140 (protection classes; functional earthing of class II equipment), from memory",
        variants=("note", "warning"),
    ),
    entry(
        "GC213",
        "class-ii-insulation",
        PROTECTIVE_EARTH,
        "note",
        "A class II plan: its safety rests on double or reinforced insulation, which the plan "
        "does not describe.",
        "groundcheck can check a protective earth but not insulation; the protective-earth "
        "figures are skipped.",
        "Have the insulation (creepage, clearance, insulation of internal wiring) checked against "
        "the product-safety standard.",
        "IEC 61140; IEC 62368-1 (from memory)",
    ),
    entry(
        "GC214",
        "stated-figure-contradicts",
        PROTECTIVE_EARTH,
        "warning",
        "A clearing time or I²t stated in the mains statement that the fuse table contradicts by "
        "more than a factor of two.",
        "A stated figure can only make a verdict stricter (the larger of the stated and the "
        "computed figure is used); one far from the table still tells of a wrong fuse or a wrong "
        "figure.",
        "Check the stated figure against the fuse maker's data sheet, or remove it to use the "
        "standard's limits.",
        "IEC 60127-2 time-current limits (from memory)",
    ),
    entry(
        "GC223",
        "pe-bonding-test",
        PROTECTIVE_EARTH,
        "fault",
        "Whether every conductor of the protective path carries the product standard's "
        "bonding-test current without passing its insulation's short-time temperature limit: 25 A "
        "for 60 s (or 1.5 × the fuse rating when more), and 200 % of the rating of the protective "
        "device ahead of the equipment for 120 s (the supply's breaker when the plan or its "
        "installation states one, at the part the inlet sits on, since a fault ahead of the fuse "
        "is the breaker's to clear; the fuse's behind it). The temperature is bounded by the "
        "smaller of the adiabatic rise and the steady state in still air. A fault when only the "
        "long test's bound passes the limit (the path stays whole, its insulation may be "
        "damaged); a danger when a conductor would melt "
        "in either test (the path opens) or passes its limit at the 25 A minute every class I "
        "product must carry. With a protective device above 16 A, the path's voltage at the long "
        "test's current is held to 2.5 V (a danger).",
        "A protective conductor that overheats in the bonding test can damage its insulation or "
        "open, and would do the same carrying a real fault current until the fuse opens.",
        "Use a thicker protective conductor (the finding names the smallest nominal size that "
        "passes); for a path over 2.5 V, lower its resistance.",
        "IEC 60065 15.2 and IEC 61010-1 6.5.2.4 (25 A, 1 min); IEC 60950-1:2005 2.6.3.4 (200 %, 2 "
        "min); IEC 60335-1 27.5 and IEC 62368-1 5.6.6.2 (from memory); IEC 60949 (adiabatic "
        "temperature); IEC 60364-5-54 Annex A (final temperatures)",
        variants=("fault", "danger"),
        actions=("thicken",),
    ),
    entry(
        "GC224",
        "pe-working-current",
        PROTECTIVE_EARTH,
        "fault",
        "Whether a conductor of the protective route carries part of a rectifier's return current "
        "or of a stated return, load or heater current (1 % or more of it, by a DC solve of the "
        "ground network): the signal ground bonded to the chassis twice with the protective path "
        "closing a second way between the return's ends (an umbilical's earth core beside its "
        "0 V core), or the return's own wire missing.",
        "A protective conductor carries no current in normal operation: one that carries a "
        "supply's return makes the equipment work on its protective path, so a break in it goes "
        "unnoticed, and the return's current flows through the chassis and the mains cord's "
        "earth.",
        "Give the supply's return a wire of its own and bond the signal ground to the chassis at "
        "one place; never remove or lift the protective conductor.",
        "IEC 60364-5-54 543.5 (protective conductors carry no operating current, a PEN aside), "
        "from memory",
        refusals=("pe-current",),
    ),
    entry(
        "GC226",
        "lift-fault-path",
        PROTECTIVE_EARTH,
        "warning",
        "Whether class I equipment's signal ground reaches its chassis only through ground-lift "
        "networks (a resistor beside a capacitor): then the lift is the signal ground's "
        "protective path.",
        "A fault from a mains or high-voltage winding onto the signal ground drives amperes "
        "through the lift's resistor, which burns open before a slow fuse opens, and leaves the "
        "sockets and screens on the signal ground at the fault's voltage.",
        "Bridge the resistor with anti-parallel power diodes (or a bridge rectifier) rated for "
        "the fault current, unless the transformer separates its windings by reinforced "
        "insulation; the lift then says 'diodes' ('lift NAME: A to B, 10 ohm, 47 nF, diodes').",
        "common practice; IEC 61140 (parts that can become live under a single fault are bonded "
        "to the protective earth), from memory",
    ),
    entry(
        "GC227",
        "internal-part-holds-sockets",
        PROTECTIVE_EARTH,
        "warning",
        "Metal of class I equipment written 'internal' that sockets, jacks or the mains inlet "
        "sit on or are bolted to.",
        "'internal' takes a part out of the protective-earth figures (its path resistance, touch "
        "voltage and disconnection time); a part that holds sockets or the inlet is a wall of "
        "the case, reached by a plug's shell or a hand, so the word would hide the checks it "
        "needs.",
        "Remove 'internal' from the part, so that it is checked as a part a hand can reach; if "
        "it really is out of reach, accept the finding in the plan with the reason.",
        "common practice (sockets and the inlet are mounted through the case's walls); IEC 61140 "
        "(accessible conductive parts are bonded to the protective earth), from memory",
    ),
    entry(
        "GC228",
        "bond-through-serviced-part",
        PROTECTIVE_EARTH,
        "danger",
        "Touchable metal whose only protective path runs through a smaller part bolted to a "
        "larger one (a transformer's frame, a bracket), by a wire that starts on that part.",
        "Taking the smaller part out for service takes the wire with it and leaves the metal "
        "unearthed though nobody touched an earth wire: GC202's trap, one bond further on.",
        "Bond the metal by a protective wire of its own from a stud on the chassis beside the "
        "protective earth's, never from a part that a service takes out.",
        "common practice; IEC 60335-1 cl. 28 and IEC 62368-1 (a protective connection may not "
        "depend on a part's fixings), from memory",
        actions=("bond",),
    ),
    entry(
        "GC229",
        "elv-fed-high-tension",
        PROTECTIVE_EARTH,
        "danger",
        "Touchable metal of a box fed at extra-low voltage (a low-voltage adapter's 'mains' of "
        "50 V or less) that makes a supply above 50 V rms inside: whether each part is bonded to "
        "that supply's return within 0.1 Ω.",
        "The box has no protective earth; a chafed high-tension lead that touches its case makes "
        "the case live unless the case is tied to the high tension's own return, which turns the "
        "fault into a short of that supply. A screw through an anodised or painted finish is no "
        "bond to count on.",
        "Bond every touchable part to the high tension's return by a wire of its own on a stud "
        "with a toothed washer on bare metal.",
        "common practice; IEC 61140 (a part that can become live under a single fault), from "
        "memory; IEC 60065 15.2 (0.1 Ω, REFERENCE.md)",
        actions=("ht-bond",),
    ),
    entry(
        "GC230",
        "live-chassis",
        PROTECTIVE_EARTH,
        "danger",
        "Metal joined to a pole of the mains (a point of kind 'mains-pole': a transformerless "
        "set's chassis on one conductor of its cord), whatever the protection class written; a "
        "warning when the part is out of reach.",
        "With an unpolarised plug the chassis is at line voltage in half the sockets: a hand on "
        "it, or on an input socket or knob joined to it, carries a current that nothing "
        "disconnects. Bonding it to the protective earth would short line to earth, or run the "
        "neutral's current in the protective conductor.",
        "Never bond it to the protective earth: give the set an isolating transformer of its own, "
        "its chassis on the floating secondary, or keep it in its insulated cabinet with nothing "
        "metal reachable and any signal input isolated; work for a qualified person.",
        "common practice; IEC 60479-1 (effects of current through the body), from memory",
        variants=("danger", "warning"),
        actions=("unlive",),
    ),
]
