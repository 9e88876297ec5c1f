"""Imports every family of rules, so that each registers its functions (:mod:`groundcheck.rules.registry`)."""

# imported for their registrations
from . import earthing_system, electrical, installation, protective, signal, topology  # noqa: F401

__all__: list[str] = []
