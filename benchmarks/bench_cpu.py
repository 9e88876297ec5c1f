"""CPU time of ``groundcheck check`` on every bundled example, this tree against another, each as a
ratio to the numeric-import anchor measured in the same round.

    python benchmarks/bench_cpu.py --before /tmp/base        # an export of the earlier commit
    python benchmarks/bench_cpu.py --rounds 7 --json cpu.json

CPU time (user + system of the process, from ``wait4``) depends much less than wall time on the
other work of a shared machine, and the interleaving puts what load there is on every process of a
round alike.  Each round runs, one after the other, the anchor (``python3 -c "import networkx,
scipy.sparse.linalg, numpy"``), then for each tree ``check PLAN --format json`` twice: with the
advisor given a budget it never reaches (``--advice-budget 600``, so that it tries every candidate
whatever the load, as the fix lines of a quiet machine), and without it (``--advice-budget 0``,
the analysis alone).  Reported: the median CPU seconds over the rounds, and the median of each
round's ratio to its anchor.  The load average is printed before and after.
"""

from __future__ import annotations

import argparse
import json
import os
import statistics
import subprocess
import sys
from pathlib import Path

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))

from bench_startup import ANCHOR  # noqa: E402

ROOT = HERE.parent
PLANS = sorted(str(p.relative_to(ROOT)) for p in (ROOT / "examples").rglob("*.gplan"))
BUDGETS = ("600", "0")


def _env(tree: Path) -> dict:
    env = dict(os.environ)
    env["PYTHONPATH"] = str(tree)
    return env


def timed(argv: list[str], tree: Path) -> float:
    """CPU s (user + system) of one process run in ``tree`` (``python -m`` puts the working
    folder first on the path, before PYTHONPATH: the tree's own package is the one imported)."""
    proc = subprocess.Popen(
        argv, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL, env=_env(tree), cwd=tree
    )
    _, status, usage = os.wait4(proc.pid, 0)
    if os.waitstatus_to_exitcode(status) not in (0, 1):
        raise SystemExit(f"{argv} exited with {os.waitstatus_to_exitcode(status)}")
    return usage.ru_utime + usage.ru_stime


def _check(tree: Path, plan: str, budget: str) -> list[str]:
    return [
        sys.executable,
        "-m",
        "groundcheck",
        "check",
        plan,
        "--format",
        "json",
        "--fail-on",
        "never",
        "--advice-budget",
        budget,
    ]


def measure(trees: dict, rounds: int) -> dict:
    """{plan: {tree label: {budget: (median CPU s, median ratio to the anchor)}}}."""
    for tree in trees.values():  # bytecode written, files in memory
        timed(_check(tree, PLANS[0], "0"), tree)
    out = {}
    for plan in PLANS:
        cpu = {(t, b): [] for t in trees for b in BUDGETS}
        ratio = {(t, b): [] for t in trees for b in BUDGETS}
        for _ in range(rounds):
            anchor = timed(ANCHOR, ROOT)
            for label, tree in trees.items():
                for budget in BUDGETS:
                    used = timed(_check(tree, plan, budget), tree)
                    cpu[label, budget].append(used)
                    ratio[label, budget].append(used / anchor)
        out[plan] = {
            t: {b: (statistics.median(cpu[t, b]), statistics.median(ratio[t, b])) for b in BUDGETS}
            for t in trees
        }
    return out


def table(rows: dict, trees: dict) -> str:
    head = "| example | " + " | ".join(
        f"{t}, advisor {'all' if b != '0' else 'off'}: CPU s (÷ anchor)"
        for t in trees
        for b in BUDGETS
    )
    lines = [head + " |", "|---|" + "---:|" * (len(trees) * len(BUDGETS))]
    for plan, by_tree in rows.items():
        cells = [
            f"{by_tree[t][b][0]:.2f} ({by_tree[t][b][1]:.2f})" for t in trees for b in BUDGETS
        ]
        lines.append(f"| {Path(plan).name} | " + " | ".join(cells) + " |")
    return "\n".join(lines)


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    ap.add_argument("--before", type=Path, help="another source tree to measure beside this one")
    ap.add_argument("--rounds", type=int, default=5)
    ap.add_argument("--json", type=Path, help="also write the figures here")
    args = ap.parse_args()
    trees = {"before": args.before.resolve()} if args.before else {}
    trees["this tree"] = ROOT
    print("load before:", os.getloadavg())
    rows = measure(trees, args.rounds)
    print("load after:", os.getloadavg())
    print(table(rows, trees))
    if args.json:
        args.json.write_text(json.dumps(rows, indent=2))


if __name__ == "__main__":
    main()
