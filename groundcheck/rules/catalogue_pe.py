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
        "on the inlet's earth terminal: a functional earth.",
        "Class II equipment may have a functional earth (for screening or a signal reference, not "
        "for safety): its protection still rests on its insulation, so the earth conductor must "
        "not be counted on as protective, nor may a touchable part rely on it.",
        "Keep the functional earth separate from the protection: the double or reinforced "
        "insulation must protect on its own. If the metal relies on the earth for safety, the "
        "equipment is class I: give it a three-core cord and a protective earth to every "
        "touchable part.",
        "IEC 61140 (protection classes; functional earthing of class II equipment), from memory",
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
        "GC215",
        "device-earth-path",
        PROTECTIVE_EARTH,
        "danger",
        "In an installation, whether each device's earth pin reaches the main earthing terminal "
        "through its mains cord, power strips and the building's protective wiring, and the "
        "resistance of that path (over 1 Ω, common practice for a broken or corroded path). A "
        "broken path is a danger; a long one too, unless a fault to the device's metal through "
        "it is still cleared within IEC 60364-4-41's time (an RCD, say): then a fault.",
        "A device whose protective path is broken has no protective earth at all, whatever its "
        "own wiring.",
        "Plug the device into an earthed outlet and repair the broken protective connection named "
        "in the finding.",
        "IEC 60364-6 (continuity of protective conductors), from memory",
        variants=("danger", "fault"),
        actions=("earthed-outlet",),
    ),
    entry(
        "GC216",
        "leakage-above-limit",
        PROTECTIVE_EARTH,
        "fault",
        "In an installation, each device's leakage (protective-conductor) current, stated or "
        "computed from its Y capacitance at its supply, against the product-safety limits: 3.5 mA "
        "for a class I device on an ordinary plug, 0.25 mA for a class II device, whose leakage "
        "has no protective conductor to take it.",
        "Above 3.5 mA a class I device needs a permanent connection or an industrial plug and a "
        "warning label, because the current flows through whoever touches the chassis if its "
        "earth is ever lost; a class II device over 0.25 mA gives a touch current above the limit "
        "for parts not earthed. Either figure also tells of a wrong plan figure (a Y capacitance "
        "typed in µF).",
        "Check the figure against the maker's data or a measurement; a device that truly leaks "
        "this much needs the permanent or industrial connection its standard asks for — have it "
        "checked by a qualified person. Never lift its protective earth.",
        "IEC 60950-1:2005, 5.1.7 (equipment with a protective conductor current over 3.5 mA) and "
        "Table 5A (touch current of parts not connected to protective earth, 0.25 mA), as quoted "
        "in IECEE test-report forms; from memory for IEC 62368-1, which keeps both figures.",
    ),
    entry(
        "GC217",
        "supply-voltage",
        PROTECTIVE_EARTH,
        "danger",
        "In an installation, each device whose own plan states its mains voltage against what the "
        "point it is plugged into gives (the installation's supply, or a transformer's "
        "secondary), and each transformer's primary against its outlet: more than 10 % apart is a "
        "device for another supply.",
        "A device fed twice its rated voltage overheats, arcs or bursts its capacitors; one fed "
        "half of it may stall motors and overheat its supply. A transformer's primary on the "
        "wrong voltage gives the wrong voltage to everything behind it.",
        "Plug the device in where the supply suits it (the finding names such outlets), or behind "
        "a transformer from the supply's voltage to the device's, and have it checked before it "
        "is used again.",
        "IEC 60038 (standard voltages; ±10 % supply tolerance), from memory",
    ),
    entry(
        "GC218",
        "isolating-secondary",
        PROTECTIVE_EARTH,
        "danger",
        "In an installation, the devices on an isolating transformer's floating secondary: one "
        "device alone (a note), a device whose chassis reaches the main earthing terminal all the "
        "same through its interconnects (a warning), two or more class I devices sharing the "
        "secondary (a danger).",
        "A floating secondary has no fault loop to earth: a single fault to a device's chassis "
        "drives no current through a person touching it and earth (the danger electrical "
        "separation removes), but nothing trips either. With two devices on one secondary a "
        "second fault, on the other pole in the other device, puts the full secondary voltage "
        "between their chassis, and nothing in the plan clears it; a chassis earthed through a "
        "shield loses the separation.",
        "Give each device its own isolating transformer and keep its chassis off every earth, or "
        "plug the devices into earthed outlets. Never lift a protective earth.",
        "IEC 60364-4-41 clause 413 (electrical separation: one item of equipment per source for "
        "ordinary persons; more only under a skilled person's design, with an unearthed bond), "
        "from memory",
        variants=("danger", "warning", "note"),
    ),
    entry(
        "GC219",
        "transformer-rating",
        PROTECTIVE_EARTH,
        "fault",
        "In an installation, the apparent power the devices behind a transformer state they draw "
        "('draws 60 VA'), added, against the transformer's rating.",
        "A transformer loaded beyond its rating runs beyond its temperature rise: its insulation "
        "ages fast, its thermal cut-out trips, or it burns.",
        "Use a transformer rated for what the devices draw, or plug some of them in elsewhere at "
        "their own voltage.",
        "IEC 61558-1 (rated output of transformers), from memory",
    ),
    entry(
        "GC220",
        "tt-electrode-rcd",
        PROTECTIVE_EARTH,
        "danger",
        "In a TT supply protected by an RCD, whether the installation's earth electrode R_A times "
        "the RCD's rated residual current IΔn stays within 50 V.",
        "A fault current just below IΔn does not trip the RCD, and it leaves R_A × IΔn on every "
        "earthed part; above 50 V that is a dangerous touch voltage that nothing clears.",
        "Improve the earth electrode (a qualified electrician measures and repairs it), or use a "
        "more sensitive RCD.",
        "IEC 60364-4-41 411.5.3 (R_A × IΔn ≤ 50 V), from memory",
        actions=("tt-electrode",),
    ),
    entry(
        "GC221",
        "tt-overcurrent-only",
        PROTECTIVE_EARTH,
        "note",
        "A TT supply whose disconnection rests on a fuse or breaker alone, with no RCD: a danger "
        "when it feeds devices with no plan of their own and the electrode lets through less than "
        "trips even a 6 A breaker at once (30 A).",
        "The fault loop of a TT supply runs through the earth electrodes, whose resistance "
        "changes with soil and season; an overcurrent device alone clears only while that loop "
        "stays low.",
        "Protect the circuit with an RCD, as TT installations usually are.",
        "IEC 60364-4-41 411.5.2 (RCDs preferred in TT systems), from memory; IEC 60898-1 (a type "
        "B breaker trips at once from 5 × In), from memory",
        variants=("note", "danger"),
        actions=("rcd-at-socket",),
    ),
    entry(
        "GC222",
        "signal-only-metal",
        PROTECTIVE_EARTH,
        "note",
        "Metal written signal-only (a footswitch box on a signal lead, a reverb pan): it is not "
        "held to protective bonding, and every output says so.",
        "Metal that holds no mains circuit and cannot become live under a single fault needs no "
        "protective bonding; the plan's word for it is what exempts it, so the exemption is shown "
        "rather than silent.",
        "Check that nothing in the part connects to mains; if anything does, bond it like any "
        "touchable part.",
        "IEC 61140 (protection against electric shock: a part that cannot become live needs no "
        "protective bonding), from memory",
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
        "installation states one, since a fault ahead of the fuse is the breaker's to clear; "
        "else the fuse). The temperature is bounded by the smaller of the adiabatic rise and the "
        "steady state in still air. A fault when only the long test's bound passes the limit (the "
        "path stays whole, its insulation may be damaged); a danger when a conductor would melt "
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
]
