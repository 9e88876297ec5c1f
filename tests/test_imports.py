"""Loading a plan and importing a renderer need no numeric library (measured in a fresh
interpreter)."""

import subprocess
import sys

import pytest

from helpers import EXAMPLES

HEAVY = ("numpy", "scipy", "networkx")


@pytest.mark.parametrize(
    "statement",
    [
        f"import groundcheck; groundcheck.load({str(EXAMPLES[0])!r})",
        "import groundcheck.renderers.text, groundcheck.renderers.jsondoc, "
        "groundcheck.renderers.sarif",
        "import groundcheck.renderers.dot, groundcheck.renderers.html, groundcheck.rules.results",
    ],
)
def test_no_numeric_library_is_imported(statement):
    code = f"import sys; {statement}; print(','.join(m for m in {HEAVY!r} if m in sys.modules))"
    out = subprocess.run(
        [sys.executable, "-c", code], capture_output=True, text=True, check=True
    ).stdout.strip()
    assert out == ""
