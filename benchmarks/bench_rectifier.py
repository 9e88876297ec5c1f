"""Benchmark: the rectifier's steady state and a whole `check`, as ratios to an anchor; and the
analysis of a generated installation in one process (BLAS threads).

    python benchmarks/bench_rectifier.py                       # this tree
    python benchmarks/bench_rectifier.py --tree /path/to/other/checkout --label before
    python benchmarks/bench_rectifier.py --rounds 5 --plans examples/guitar-head.gplan
    python benchmarks/bench_rectifier.py --installation 2000 --plans   # the installation alone

The anchor is a fresh process importing the numeric stack,
`python3 -c "import networkx, scipy.sparse.linalg, numpy"`, run interleaved with the measured
commands (anchor, plan, plan, ..., anchor, ...) so that both see the same load; a whole command is
given as a ratio to the anchor of its own round, which survives a shared machine better than
seconds do. Per plan:

- **rectifier CPU s**: the CPU time of `physics.rectifier.simulate` for all the plan's
  rectifiers, in a fresh process with the in-process cache empty (the least of the rounds);
- **check ÷ anchor**: `groundcheck check PLAN --advice-budget 0` as a whole process (start-up
  included), its wall time and its CPU time each over the anchor's (the median of the rounds);

and with `--installation N`, `analyze()` of `generate.py installation N` in one process (the
parent's BLAS threads: OpenBLAS's default against one thread), its wall and CPU time over the
anchor's (the median of the rounds); with the machine's load average before and after.
`--tree` measures another checkout (the commit before a change, say) in the same way, for a
before/after pair.
"""

from __future__ import annotations

import argparse
import json
import os
import resource
import statistics
import subprocess
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
FIELD = Path("/work/shared/field-plans")
PLANS = [
    ROOT / "examples" / name
    for name in ("dual-mono-phono-stage.gplan", "guitar-head.gplan", "headphone-amp-100v.gplan")
] + [
    (FIELD if (FIELD / name).exists() else ROOT / "tests" / "field") / name / "plan.gplan"
    for name in ("headphone-se-valve-rectifier", "se-power-triode")
]
ANCHOR = [sys.executable, "-c", "import networkx, scipy.sparse.linalg, numpy"]

RECTIFIERS = """
import json, sys, time
from groundcheck import load
from groundcheck.physics import rectifier
plan = load(sys.argv[1])
t = time.process_time()
for r in plan.rectifiers:
    rectifier.simulate(r, plan.frequency)
print(json.dumps({"cpu": time.process_time() - t, "count": len(plan.rectifiers)}))
"""

INSTALLATION = """
import sys
sys.path.insert(0, sys.argv[2])
from generate import installation
from groundcheck import load_text
from groundcheck.analysis import analyze
analyze(load_text(installation(int(sys.argv[1])), "installation.gplan"))
"""


def _timed(cmd: list[str], env: dict) -> tuple[float, float, str]:
    """Wall and CPU seconds (user + system of the child) of one process, and its output; run in
    the measured tree (``python -c`` and ``-m`` put the working folder first on the path)."""
    before = resource.getrusage(resource.RUSAGE_CHILDREN)
    t = time.perf_counter()
    out = subprocess.run(
        cmd, env=env, capture_output=True, text=True, check=False, cwd=env["PYTHONPATH"]
    )
    wall = time.perf_counter() - t
    after = resource.getrusage(resource.RUSAGE_CHILDREN)
    cpu = (after.ru_utime - before.ru_utime) + (after.ru_stime - before.ru_stime)
    return wall, cpu, out.stdout


def measure(tree: Path, plans: list[Path], rounds: int) -> list[dict]:
    env = dict(os.environ, PYTHONPATH=str(tree))
    rows = {
        p: {
            "plan": p.parent.name if p.name == "plan.gplan" else p.stem,
            "rect": [],
            "wall": [],
            "cpu": [],
        }
        for p in plans
    }
    for _ in range(rounds):
        anchor_wall, anchor_cpu, _ = _timed(ANCHOR, env)
        for p in plans:
            _, _, out = _timed([sys.executable, "-c", RECTIFIERS, str(p)], env)
            rows[p]["rect"].append(json.loads(out.strip().splitlines()[-1])["cpu"])
            check = [sys.executable, "-m", "groundcheck", "check", str(p), "--advice-budget", "0"]
            wall, cpu, _ = _timed(check, env)
            rows[p]["wall"].append(wall / anchor_wall)
            rows[p]["cpu"].append(cpu / anchor_cpu)
    return [
        {
            "plan": r["plan"],
            "rectifier_cpu_s": min(r["rect"]),
            "check_wall_ratio": statistics.median(r["wall"]),
            "check_cpu_ratio": statistics.median(r["cpu"]),
        }
        for r in rows.values()
    ]


def installation_ratio(tree: Path, devices: int, rounds: int) -> tuple[float, float]:
    """``analyze()`` of a generated installation in a fresh process: wall and CPU over the anchor's
    (the medians; the plan's generation and loading included, the same in both trees)."""
    env = dict(os.environ, PYTHONPATH=str(tree))
    walls, cpus = [], []
    for _ in range(rounds):
        anchor_wall, anchor_cpu, _ = _timed(ANCHOR, env)
        cmd = [sys.executable, "-c", INSTALLATION, str(devices), str(ROOT / "benchmarks")]
        wall, cpu, _ = _timed(cmd, env)
        walls.append(wall / anchor_wall)
        cpus.append(cpu / anchor_cpu)
    return statistics.median(walls), statistics.median(cpus)


def main() -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument(
        "--tree", type=Path, default=ROOT, help="the checkout to measure (default: this)"
    )
    ap.add_argument("--label", default="", help="a word for the table's title (before, after)")
    ap.add_argument("--rounds", type=int, default=3)
    ap.add_argument("--plans", type=Path, nargs="*", default=PLANS)
    ap.add_argument(
        "--installation",
        type=int,
        default=0,
        metavar="DEVICES",
        help="also analyse a generated installation of DEVICES devices in one process",
    )
    args = ap.parse_args()
    load = os.getloadavg()
    rows = measure(args.tree.resolve(), [p.resolve() for p in args.plans], args.rounds)
    print(
        f"### {args.label or args.tree} ({args.rounds} rounds; load average {load[0]:.2f} before, "
        f"{os.getloadavg()[0]:.2f} after, {os.cpu_count()} cores)\n"
    )
    print("| plan | rectifier CPU s | check ÷ anchor, wall | check ÷ anchor, CPU |")
    print("|---|---:|---:|---:|")
    for r in rows:
        print(
            f"| {r['plan']} | {r['rectifier_cpu_s']:.3f} | {r['check_wall_ratio']:.2f} | "
            f"{r['check_cpu_ratio']:.2f} |"
        )
    if args.installation:
        wall, cpu = installation_ratio(args.tree.resolve(), args.installation, args.rounds)
        print(
            f"\ninstallation of {args.installation} devices, analyze() in one process ÷ anchor: "
            f"wall {wall:.1f}, CPU {cpu:.1f}"
        )
    return 0


if __name__ == "__main__":
    sys.exit(main())
