"""The catalogue's protective-earth entries of an installation (GC215–GC222, GC225, GC231): each
placed device's earth path, leakage, devices behind transformers, the TT supply's electrode and
RCD, metal written signal-only, the outlets' RCD and an IT supply's first fault — what each rule
checks, why, its fix and its sources.

Kept apart from :mod:`groundcheck.rules.catalogue_pe` (the equipment's own protective earth) so
that each module reads in one sitting; :mod:`groundcheck.rules.catalogue` takes them in its one
table.
"""

from __future__ import annotations

from .rule_entry import Rule, entry
from .rule_families import PROTECTIVE_EARTH

__all__ = ["INSTALLATION_ENTRIES"]

#: the installation's protective-earth rules, in the catalogue's order
INSTALLATION_ENTRIES: list[Rule] = [
    entry(
        "GC215",
        "device-earth-path",
        PROTECTIVE_EARTH,
        "danger",
        "In an installation, whether each device's earth pin reaches the main earthing terminal "
        "through its mains cord, power strips and the building's protective wiring, and the "
        "resistance of that path (over 1 Ω, common practice for a broken or corroded path). A "
        "broken path is a danger; a long one too, unless a fault to the device's metal through "
        "it is still cleared within IEC 60364-4-41's time (an RCD, say): then a fault. A path "
        "that reaches the terminal only through a lift network with diodes at the installation's "
        "level (a galvanic isolator in a shore or supply earth) is a warning: its diodes carry a "
        "fault's current and the fault loop is checked through it, but a low-voltage continuity "
        "test reads it open.",
        "A device whose protective path is broken has no protective earth at all, whatever its "
        "own wiring.",
        "Plug the device into an earthed outlet and repair the broken protective connection named "
        "in the finding.",
        "IEC 60364-6 (continuity of protective conductors), from memory",
        variants=("danger", "fault", "warning"),
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
        "GC225",
        "outlet-rcd-sensitivity",
        PROTECTIVE_EARTH,
        "warning",
        "The RCD stated for the outlets (an installation's supply, or the mains a piece of "
        "equipment is plugged into) against the 30 mA of additional protection.",
        "An RCD of 100 mA or more disconnects a fault to earthed metal, but a current through a "
        "person who touches a live part can stay below its rating; socket outlets used by "
        "ordinary persons are given a 30 mA RCD for that.",
        "Have the outlets protected by a 30 mA RCD: installation work for a qualified "
        "electrician, to the local wiring rules.",
        "IEC 60364-4-41 411.3.3 (additional protection by an RCD of IΔn ≤ 30 mA), from memory",
        actions=("rcd-at-socket",),
    ),
    entry(
        "GC231",
        "it-first-fault",
        PROTECTIVE_EARTH,
        "danger",
        "In an IT supply (no point of it earthed, or earthed through a high impedance), whether "
        "the touch voltage a first fault leaves on earthed metal — the installation's electrode "
        "R_A times the supply's first-fault current I_d — stays within 50 V; a note when the plan "
        "does not state both.",
        "A first fault from a line to the metal is not disconnected: the supply runs on, and the "
        "metal stays at R_A × I_d against earth until an insulation monitor's alarm has the fault "
        "found and mended. Above 50 V that is a dangerous touch voltage that nothing clears.",
        "Improve the installation's earth electrode (a qualified electrician measures and repairs "
        "it) so that R_A × I_d stays within 50 V, and keep the insulation monitor that signals "
        "the first fault.",
        "IEC 60364-4-41 411.6.2 (R_A × I_d ≤ 50 V) and 411.6.3 (insulation monitoring), from "
        "memory",
        variants=("danger", "note"),
        actions=("it-electrode",),
    ),
    entry(
        "GC232",
        "earth-through-other-equipment",
        PROTECTIVE_EARTH,
        "danger",
        "In an installation, whether each class I device's own cord and outlet reach the main "
        "earthing terminal: a device whose outlet does not (its plug's earth cut, an adapter "
        "without one) but whose metal is earthed through a bonding wire to another device's "
        "chassis and that device's cord.",
        "Its protective earth then hangs on equipment that is unplugged, moved or serviced "
        "without a thought for it: unplug the other device, or unbolt the bond, and the metal is "
        "earthed by nothing while its own mains cord still feeds it.",
        "Restore the device's own earth: a plug and outlet whose protective conductor reaches the "
        "main earthing terminal (work for a qualified person); a bond between chassis is never "
        "a device's protective earth.",
        "IEC 60364-5-54 (protective conductors), common practice",
        actions=("earthed-outlet",),
    ),
    entry(
        "GC233",
        "umbilical-box-earth",
        PROTECTIVE_EARTH,
        "danger",
        "In an installation, touchable metal of a placed box with no mains of its own that an "
        "umbilical's cores join to a class I box with one (an amplifier and its outboard "
        "supply): whether each part is bonded within 0.1 Ω to that box's protective earth.",
        "The box takes its high tension and heaters by the umbilical and has no protective earth "
        "of its own: a core chafing against its case, or a failed valve, makes the case live "
        "unless it is bonded to the supply box's protective earth.",
        "Bond the box's case to the supply box's protective earth by a protective core of the "
        "umbilical, landed on a stud of its own with a toothed washer on bare metal at each end.",
        "common practice; IEC 61140 (a part that can become live under a single fault), from "
        "memory; IEC 60065 15.2 (0.1 Ω, REFERENCE.md)",
    ),
]
