"""Regression cases of hostile and extreme plans (tests/hostile/): each is refused with one located error
line and exit status 2 — no traceback, no hang, no unbounded memory — or, where noted, read correctly."""

import subprocess
import sys
from pathlib import Path

import pytest

HOSTILE = Path(__file__).parent / "hostile"
REFUSED = sorted(p for p in HOSTILE.glob("*.gplan") if p.name != "awg-0000.gplan")


@pytest.mark.parametrize("path", REFUSED, ids=lambda p: p.stem)
def test_refused_with_a_located_error(path):
    # a fresh process with an address-space limit: an unbounded allocation would fail loudly here
    code = ("import resource, sys; resource.setrlimit(resource.RLIMIT_AS, (3 << 30, 3 << 30)); "
            "from groundcheck.cli import main; sys.exit(main(['check', sys.argv[1]]))")
    r = subprocess.run([sys.executable, "-c", code, str(path)], capture_output=True, text=True, timeout=60)
    assert r.returncode == 2, r.stderr[-800:]
    assert "Traceback" not in r.stderr and "internal error" not in r.stderr
    first = r.stderr.splitlines()[0]
    assert first.startswith(f"{path}:") and ": error: " in first


def test_awg_0000_is_four_aught():
    from groundcheck import load
    (w,) = load(HOSTILE / "awg-0000.gplan").conductors
    # ASTM B258: AWG 4/0 (written 0000) is 0.4600 in = 11.684 mm across
    assert w.diameter == pytest.approx(11.684e-3, rel=1e-4)
