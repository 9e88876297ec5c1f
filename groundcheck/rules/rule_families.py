"""The families of rules: what each catalogue entry states it belongs to.

A family has a name and the rule word that selects all of it (``--only-rules GC2``: every
protective-earth rule). Nothing reads a rule's family from its code; the entry states it and
``tests/test_rule_entries.py`` checks that each family's codes begin with its word.
"""

from __future__ import annotations

from dataclasses import dataclass

__all__ = ["Family", "TOPOLOGY", "PROTECTIVE_EARTH", "HUM", "MODEL", "FAMILIES"]


@dataclass(frozen=True)
class Family:
    """A family of rules: its rule word (the codes' first digits) and its name."""

    word: str
    name: str


TOPOLOGY = Family("GC1", "topology")
PROTECTIVE_EARTH = Family("GC2", "protective earth")
HUM = Family("GC3", "hum")
MODEL = Family("GC4", "electrical model")

#: every family, in the catalogue's order
FAMILIES = (TOPOLOGY, PROTECTIVE_EARTH, HUM, MODEL)
