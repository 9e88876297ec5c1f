"""Imports every family of rules, so that each registers its functions (:mod:`groundcheck.rules.registry`)."""

from . import earthing_system, electrical, installation, protective, topology  # noqa: F401 - registrations

__all__: list[str] = []
