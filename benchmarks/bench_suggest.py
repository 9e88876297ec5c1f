"""Time `groundcheck suggest` on the examples and on generated chassis plans: candidates made,
evaluated, candidates per second, and the time of one full analysis for comparison.

    python benchmarks/bench_suggest.py                 # examples, 1k and 3k conductors
    python benchmarks/bench_suggest.py --sizes 1000 3000 10000 --budget 25
    python benchmarks/bench_suggest.py --sizes 3000 --jobs 2     # candidates tried two at a time
"""

from __future__ import annotations

import argparse
import subprocess
import sys
import tempfile
import time
from pathlib import Path

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE.parent))

from groundcheck import load  # noqa: E402
from groundcheck.advice.repair import NOT_TRIED, greedy, suggest  # noqa: E402
from groundcheck.analysis import Options, analyze  # noqa: E402


def run(path: Path, budget: float, jobs: int = 1) -> dict:
    plan = load(path)
    text = path.read_text()
    options = Options(jobs=jobs)
    t0 = time.perf_counter()
    before = analyze(plan, options)
    t1 = time.perf_counter()
    _, evs = suggest(
        plan, text, options, path.parent, path.resolve(), budget=budget * 0.7, before=before
    )
    t2 = time.perf_counter()
    chosen, _, _ = greedy(
        plan,
        text,
        options,
        path.parent,
        path.resolve(),
        evs=evs,
        before=before,
        budget=budget * 0.3,
    )
    t3 = time.perf_counter()
    tried = sum(1 for e in evs if e.rejected != NOT_TRIED)
    return {
        "plan": path.name,
        "conductors": len(plan.conductors),
        "analysis_s": t1 - t0,
        "candidates": len(evs),
        "tried": tried,
        "per_second": tried / max(t2 - t1, 1e-9),
        "suggest_s": t2 - t1,
        "combine_s": t3 - t2,
        "kept": len(chosen),
    }


def main() -> None:
    ap = argparse.ArgumentParser(
        description=__doc__, formatter_class=argparse.RawDescriptionHelpFormatter
    )
    ap.add_argument("--sizes", type=int, nargs="*", default=[1000, 3000])
    ap.add_argument("--budget", type=float, default=25.0)
    ap.add_argument("--jobs", type=int, default=1, help="processes trying candidates at once")
    args = ap.parse_args()
    paths = sorted((HERE.parent / "examples").glob("*.gplan"))
    with tempfile.TemporaryDirectory() as tmp:
        for n in args.sizes:
            p = Path(tmp) / f"chassis-{n}.gplan"
            p.write_text(
                subprocess.run(
                    [sys.executable, str(HERE / "generate.py"), "chassis", str(n)],
                    capture_output=True,
                    text=True,
                    check=True,
                ).stdout
            )
            paths.append(p)
        print(
            f"{'plan':28} {'cond':>6} {'analysis':>9} {'cands':>6} {'tried':>6} {'per s':>6} "
            f"{'suggest':>8} {'combine':>8} {'kept':>5}"
        )
        for p in paths:
            r = run(p, args.budget, args.jobs)
            print(
                f"{r['plan']:28} {r['conductors']:6d} {r['analysis_s']:8.2f}s "
                f"{r['candidates']:6d} {r['tried']:6d} {r['per_second']:6.1f} "
                f"{r['suggest_s']:7.1f}s {r['combine_s']:7.1f}s {r['kept']:5d}"
            )


if __name__ == "__main__":
    main()
