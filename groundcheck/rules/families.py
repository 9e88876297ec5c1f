"""Imports every family of rules, so that each registers its functions
(:mod:`groundcheck.rules.registry`), in the order they are imported."""

from . import (  # noqa: F401 - imported for their registrations
    bench,
    bonding,
    borrowed_earth,
    earthing_system,
    electrical,
    elv_fed_ht,
    hum_rules,
    installation,
    it_supply,
    lift_fault,
    lifts,
    live_chassis,
    protective,
    pe_current,
    pe_figures,
    pe_through_part,
    rcd_outlets,
    signal,
    loops,
    stars,
    signal_bonds,
    stated_words,
    topology,
    transformers,
    umbilical_box,
)

__all__: list[str] = []
