"""The table of conductor kinds: one row per kind, read by every module that asks what a kind can
do.

Adding a kind is one row here (plus, when it is new physics, one impedance function in
:mod:`groundcheck.physics.circuit`).  No other module lists kinds by name for these questions.

Columns:

``default_role``
    the role a conductor of this kind has when the plan does not say.
``needs``
    the geometry the plan must give, as alternatives: each is a tuple of fields of which
    one must be present (a stated ``resistance`` always satisfies them).
``impedance``
    the impedance model: ``round`` (ρL/A, round-wire inductance and skin effect), ``strip``
    (ρL/(w·t), flat-strip inductance), ``contact`` (a contact resistance only), ``lift``
    (resistor ∥ capacitor) or ``switch`` (a contact when closed).
``protective``
    whether it can be part of a protective-earth path (lift networks, switches, shields and
    interconnect shields never are: IEC 60364-5-54 543.3, no switching device in a protective
    conductor; a shield is not rated for fault current — common practice).
``section_checked``
    whether its cross-section is compared with the line conductor (GC204) and checked for
    fault survival (GC207) when it carries protective current.
``fastening``
    whether it fastens a point to a metal part (a bolt, stud or screw).
``bonds_metal``
    whether it puts the point it joins on the metal's side (a fastening or a strap).
``shield_like``
    a cable's screen (a shield, an interconnect's shield): it may be terminated at one end only,
    is never removed to open a loop (it is lifted at one end) and never carries protective
    current.
``joins_devices``
    whether it runs between two pieces of equipment (an interconnect): not part of either
    device's own ground wiring, unplugged to find the outlets' voltages, its length free of the
    drawing.
``carries_load``
    building wiring that can carry a stated load current (its line and neutral induce an EMF in its
    protective core).
``hookup``
    a hook-up wire inside a box: what the advisor lays anew or turns into a lift network.
``lifts``
    a ground-lift network (resistor ∥ capacitor): a deliberate separation, never part of a device's
    own path from its signal ground to its chassis.
``switched``
    whether it can be open (a switch): it joins its ends only when closed.
``contact``
    the contact resistance (Ω) a conductor of this kind has when the plan does not say (None:
    none).
``thickness``
    the copper thickness (m) when the plan does not say (None: the plan must give a width ×
    thickness or an area).
``attributes``
    the attribute words that belong to this kind (and to no kind without them in its row).

The roles (what a conductor is for) and the roles of a stated current live here too: :data:`ROLES`,
:data:`CURRENT_ROLES`, each word once, with a name for each word the code asks about.
"""

from __future__ import annotations

from dataclasses import dataclass

__all__ = [
    "Kind",
    "KINDS",
    "CONDUCTOR_KINDS",
    "PROTECTIVE_ROLES",
    "kind",
    "can_carry_protective",
    "section_checked",
    "is_fastening",
    "bonds_metal",
    "cross_section",
    "default_role",
    "ROLES",
    "CURRENT_ROLES",
    "PROTECTIVE",
    "RETURN",
    "SIGNAL",
    "SHIELD",
    "BOND",
    "HEATER",
    "LOAD",
    "LEAKAGE",
    "DEVICE_BOND_KIND",
    "CORD_KIND",
    "LIFT_KIND",
    "BOLT_CONTACT",
    "TRACE_COPPER",
    "is_fastening_kind",
    "shield_like",
    "joins_devices",
    "carries_load",
    "is_hookup",
    "is_lift",
    "can_open",
    "in_device_ground",
    "kinds_with",
    "owners",
]


@dataclass(frozen=True)
class Kind:
    name: str
    default_role: str
    needs: tuple[tuple[str, ...], ...]
    impedance: str
    protective: bool
    section_checked: bool
    fastening: bool = False
    bonds_metal: bool = False
    shield_like: bool = False
    joins_devices: bool = False
    carries_load: bool = False
    hookup: bool = False
    lifts: bool = False
    switched: bool = False
    contact: float | None = None
    thickness: float | None = None
    attributes: frozenset[str] = frozenset()


#: what a conductor is for (the role words of the language), each named once
PROTECTIVE, RETURN, SIGNAL = "protective", "return", "signal"
SHIELD, BOND, HEATER = "shield", "bond", "heater"
ROLES = (PROTECTIVE, RETURN, SIGNAL, SHIELD, BOND, HEATER)
#: what a stated current is: a supply return, a load, a heater's, a device's leakage or a
#: channel's signal
LOAD, LEAKAGE = "load", "leakage"
CURRENT_ROLES = (RETURN, LOAD, HEATER, LEAKAGE, SIGNAL)

#: a bolt's contact resistance when the plan does not say: 0.5 mΩ (from memory: clean screwed
#: joints are 0.1–1 mΩ)
BOLT_CONTACT = 0.5e-3
#: a trace's copper when the plan does not say: 35 µm, 1 oz/ft² (common practice)
TRACE_COPPER = 35e-6

KINDS: dict[str, Kind] = {
    k.name: k
    for k in (
        Kind("wire", SIGNAL, (("length",), ("area",)), "round", True, True, hookup=True),
        Kind(
            "trace",
            SIGNAL,
            (("length",), ("width", "area")),
            "strip",
            True,
            True,
            thickness=TRACE_COPPER,
        ),
        Kind("busbar", RETURN, (("length",), ("width", "area")), "strip", True, True),
        Kind(
            "bolt",
            BOND,
            (),
            "contact",
            True,
            False,
            fastening=True,
            bonds_metal=True,
            contact=BOLT_CONTACT,
        ),
        Kind(
            "strap", BOND, (("length",), ("width", "area")), "strip", True, True, bonds_metal=True
        ),
        Kind(
            "cable",
            PROTECTIVE,
            (("length",), ("area",)),
            "round",
            True,
            True,
            carries_load=True,
            attributes=frozenset({"load", "cores", "line-cores"}),
        ),
        Kind(
            "core",
            RETURN,
            (("length",), ("area",)),
            "round",
            True,
            True,
            attributes=frozenset({"in"}),
        ),
        Kind("shield", SHIELD, (("length",), ("area",)), "round", False, False, shield_like=True),
        Kind(
            "interconnect",
            SHIELD,
            (("length",), ("area",)),
            "round",
            False,
            False,
            shield_like=True,
            joins_devices=True,
            attributes=frozenset({"shield-to"}),
        ),
        Kind(
            "lift",
            SIGNAL,
            (("resistance",),),
            "lift",
            False,
            False,
            lifts=True,
            attributes=frozenset({"capacitance", "diodes"}),
        ),
        Kind("switch", SIGNAL, (), "switch", False, False, switched=True),
    )
}

#: every conductor keyword, in the order the language reference lists them
CONDUCTOR_KINDS = tuple(KINDS)

#: roles that mark a conductor as meant to carry protective current (a bond: a fastening or bonding
#: strap)
PROTECTIVE_ROLES = (PROTECTIVE, BOND)

#: the kinds the reader itself writes: a simple device's bonds, a device's mains cord, its lift
#: network
DEVICE_BOND_KIND, CORD_KIND, LIFT_KIND = "bolt", "wire", "lift"


def kind(name: str) -> Kind:
    return KINDS[name]


def default_role(kind_name: str) -> str:
    return KINDS[kind_name].default_role


def can_carry_protective(c) -> bool:
    """Whether conductor ``c``'s kind may be part of a protective path (whatever its role)."""
    return KINDS[c.kind].protective


def section_checked(c) -> bool:
    """Whether ``c``'s cross-section matters for protective current (GC204, GC207)."""
    return KINDS[c.kind].section_checked


def is_fastening(c, metals) -> bool:
    """A fastening: a conductor of a fastening kind with exactly one end on a metal part."""
    return KINDS[c.kind].fastening and (c.a in metals) != (c.b in metals)


def bonds_metal(c) -> bool:
    """Whether ``c`` puts the point it joins on the metal's side (fastening or strap), when it
    connects."""
    return KINDS[c.kind].bonds_metal


def cross_section(c) -> float | None:
    """The conducting cross-section of ``c`` in m²: its area, or width × thickness for a flat
    conductor."""
    if c.area is not None:
        return c.area
    if c.width is not None and c.thickness is not None:
        return c.width * c.thickness
    return None


def is_fastening_kind(kind_name: str) -> bool:
    """Whether conductors of this kind fasten a point to a metal part (wherever their ends are)."""
    return KINDS[kind_name].fastening


def shield_like(c) -> bool:
    """Whether ``c`` is a cable's screen (a shield or an interconnect)."""
    return KINDS[c.kind].shield_like


def joins_devices(c) -> bool:
    """Whether ``c`` runs between two pieces of equipment (an interconnect)."""
    return KINDS[c.kind].joins_devices


def carries_load(c) -> bool:
    """Whether ``c`` is building wiring with a stated load current."""
    return KINDS[c.kind].carries_load and bool(c.loads)


def is_hookup(c) -> bool:
    """Whether ``c`` is a hook-up wire inside a box."""
    return KINDS[c.kind].hookup


def is_lift(c) -> bool:
    """Whether ``c`` is a ground-lift network."""
    return KINDS[c.kind].lifts


def can_open(c) -> bool:
    """Whether ``c`` can be open (a switch)."""
    return KINDS[c.kind].switched


def in_device_ground(c) -> bool:
    """Whether ``c`` can be part of a device's own path from its signal ground to its chassis: not
    an interconnect between devices, not a lift network."""
    k = KINDS[c.kind]
    return not (k.joins_devices or k.lifts)


def kinds_with(attribute: str) -> tuple[str, ...]:
    """The kinds whose row lists ``attribute`` among the attribute words that belong to them."""
    return tuple(k.name for k in KINDS.values() if attribute in k.attributes)


_OWNERS: dict = {}


def owners() -> dict[str, tuple[str, ...]]:
    """Each kind-only attribute word -> the kinds that accept it (kept while the table's rows are
    the same objects: the reader asks once per conductor statement)."""
    key = tuple(map(id, KINDS.values()))
    if key not in _OWNERS:
        words = sorted({w for k in KINDS.values() for w in k.attributes})
        _OWNERS.clear()
        _OWNERS[key] = {w: kinds_with(w) for w in words}
    return _OWNERS[key]
