"""The version of groundcheck (one place; the package and every output read it)."""

__version__ = "0.1.0"
