"""The table of conductor kinds: one row per kind, read by every module that asks what a kind can do.

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
"""

from __future__ import annotations

from dataclasses import dataclass

__all__ = ["Kind", "KINDS", "CONDUCTOR_KINDS", "PROTECTIVE_ROLES", "kind", "can_carry_protective", "section_checked",
           "is_fastening", "bonds_metal", "cross_section", "default_role"]


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


KINDS: dict[str, Kind] = {k.name: k for k in (
    Kind("wire", "signal", (("length",), ("area",)), "round", True, True),
    Kind("trace", "signal", (("length",), ("width", "area")), "strip", True, True),
    Kind("busbar", "return", (("length",), ("width", "area")), "strip", True, True),
    Kind("bolt", "bond", (), "contact", True, False, fastening=True, bonds_metal=True),
    Kind("strap", "bond", (("length",), ("width", "area")), "strip", True, True, bonds_metal=True),
    Kind("cable", "protective", (("length",), ("area",)), "round", True, True),
    Kind("core", "return", (("length",), ("area",)), "round", True, True),
    Kind("shield", "shield", (("length",), ("area",)), "round", False, False),
    Kind("interconnect", "shield", (("length",), ("area",)), "round", False, False),
    Kind("lift", "signal", (("resistance",),), "lift", False, False),
    Kind("switch", "signal", (), "switch", False, False),
)}

#: every conductor keyword, in the order the language reference lists them
CONDUCTOR_KINDS = tuple(KINDS)

#: roles that mark a conductor as meant to carry protective current (a bond: a fastening or bonding strap)
PROTECTIVE_ROLES = ("protective", "bond")


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
    """Whether ``c`` puts the point it joins on the metal's side (fastening or strap), when it connects."""
    return KINDS[c.kind].bonds_metal


def cross_section(c) -> float | None:
    """The conducting cross-section of ``c`` in m²: its area, or width × thickness for a flat conductor."""
    if c.area is not None:
        return c.area
    if c.width is not None and c.thickness is not None:
        return c.width * c.thickness
    return None
