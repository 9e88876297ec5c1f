"""Every package of the source tree is installed: a subpackage missing from pyproject.toml's list
works in a checkout and fails only after `pip install .` (as the bench command's once did)."""

import tomllib
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent


def test_every_subpackage_is_in_the_installed_list():
    listed = set(
        tomllib.loads((ROOT / "pyproject.toml").read_text())["tool"]["setuptools"]["packages"]
    )
    found = {
        ".".join(p.parent.relative_to(ROOT).parts)
        for p in (ROOT / "groundcheck").rglob("__init__.py")
    }
    assert found <= listed, sorted(found - listed)
