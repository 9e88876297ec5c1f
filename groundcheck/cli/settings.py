"""The settings file: ``groundcheck.toml`` (top-level keys) or the ``[tool.groundcheck]`` table of
``pyproject.toml``, found in the current folder or the nearest folder above it.  Every value is
checked when the file is read: a setting that cannot be used is an error naming the file, the line,
the key and what the key takes."""

from __future__ import annotations

import json
import re
from pathlib import Path

from ..core.errors import GroundcheckError
from ..core.runtime import note_read
from ..rules.results import FAIL_LEVELS
from ..rules.selection import UnknownRule, codes_of

__all__ = ["SettingsError", "SETTINGS", "load_settings", "shown_value"]


class SettingsError(GroundcheckError):
    """A settings file that cannot be used."""


_RULES = "a list of rule codes, families or names"

#: the settings a file may hold, and what each takes
SETTINGS = {
    "only-rules": f'{_RULES}, e.g. ["GC1", "shared-return"]',
    "leave-out": f'{_RULES}, e.g. ["GC304"]',
    "fail-on": f"one of {', '.join(FAIL_LEVELS)}",
    "allow-accept-danger": "true or false",
}

_VALID = {
    "fail-on": lambda v: v in FAIL_LEVELS,
    "allow-accept-danger": lambda v: isinstance(v, bool),
    "only-rules": lambda v: isinstance(v, list) and all(isinstance(w, str) for w in v),
    "leave-out": lambda v: isinstance(v, list) and all(isinstance(w, str) for w in v),
}


def load_settings(start: Path | None = None) -> tuple[dict, Path | None]:
    """The settings and the file they came from ({}, None without one); command-line options win
    over them (the caller's concern)."""
    import tomllib

    here = (start or Path.cwd()).resolve()
    for folder in (here, *here.parents):
        for name, table in (
            ("groundcheck.toml", None),
            ("pyproject.toml", ("tool", "groundcheck")),
        ):
            f = folder / name
            if not f.is_file():
                continue
            try:
                text = f.read_text(encoding="utf-8")
                note_read(f)  # never an output of this run
                data = tomllib.loads(text)
            except (OSError, UnicodeDecodeError, tomllib.TOMLDecodeError) as e:
                raise SettingsError(f"{f}: cannot read the settings ({e})") from None
            for key in table or ():
                data = data.get(key, {}) if isinstance(data, dict) else {}
            if table is not None and not data:
                continue
            if not isinstance(data, dict):
                raise SettingsError(f"{f}: [tool.groundcheck] must be a table of settings")
            return _checked(data, f, text, table), f
    return {}, None


def _key_line(text: str, key: str, table) -> int:
    """The line a key is set on (after its table's header); 0 when it cannot be told."""
    lines = text.splitlines()
    start = 0
    if table:
        header = re.compile(r"^\s*\[\s*" + r"\s*\.\s*".join(map(re.escape, table)) + r"\s*\]")
        start = next((i for i, ln in enumerate(lines) if header.match(ln)), 0)
    pattern = re.compile(r"^\s*[\"']?" + re.escape(key) + r"[\"']?\s*=")
    return next((i + 1 for i, ln in enumerate(lines) if i >= start and pattern.match(ln)), 0)


def _checked(data: dict, f: Path, text: str, table) -> dict:
    """The settings, each value checked: a wrong one is an error at ``file:line``, never a crash
    later."""

    def where(key: str) -> str:
        line = _key_line(text, key, table)
        return f"{f}:{line}: {key}" if line else f"{f}: {key}"

    for key, value in data.items():
        if key not in SETTINGS:
            raise SettingsError(f"{where(key)}: unknown setting (settings: {', '.join(SETTINGS)})")
        if not _VALID[key](value):
            raise SettingsError(
                f"{where(key)} = {shown_value(value)} cannot be used (it takes {SETTINGS[key]})"
            )
        if key in ("only-rules", "leave-out"):
            try:
                codes_of(value)
            except UnknownRule as e:
                raise SettingsError(f"{where(key)}: {e}") from None
    return dict(data)


def shown_value(value) -> str:
    """A setting's value as it is written in TOML."""
    if isinstance(value, (str, list, bool)):
        return json.dumps(value, ensure_ascii=False)
    return str(value)
