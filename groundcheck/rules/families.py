"""Imports every family of rules, so that each registers its functions
(:mod:`groundcheck.rules.registry`)."""

from . import (  # noqa: F401 - imported for their registrations
    bench,
    bonding,
    earthing_system,
    electrical,
    installation,
    protective,
    signal,
    topology,
    transformers,
)

__all__: list[str] = []
