"""Imports every family of rules, so that each registers its functions (:mod:`groundcheck.rules.registry`)."""

from . import electrical, installation, protective, topology  # noqa: F401 - imported for their registrations

__all__: list[str] = []
