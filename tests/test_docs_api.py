"""Every Python code block of docs/api.md runs, in order, in one namespace, from the repository's
root."""

import os
import re
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent


def test_api_guide_examples_run(capsys):
    text = (ROOT / "docs" / "api.md").read_text(encoding="utf-8")
    blocks = re.findall(r"```python\n(.*?)```", text, flags=re.S)
    assert len(blocks) >= 5
    here = os.getcwd()
    os.chdir(ROOT)
    try:
        namespace: dict = {}
        for block in blocks:
            exec(compile(block, "docs/api.md", "exec"), namespace)
    finally:
        os.chdir(here)
    out = capsys.readouterr().out
    assert "Headphone amplifier, 100 V / 60 Hz" in out and "unknown unit" in out and "2.1.0" in out
