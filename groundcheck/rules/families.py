"""Imports every family of rules, so that each registers its functions (:mod:`groundcheck.rules.registry`)."""

from . import electrical, installation, protective, topology  # noqa: F401 - imported for their registrations
from . import bonding  # noqa: F401 - the product bonding test (GC217)

__all__: list[str] = []
