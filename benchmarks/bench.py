"""Benchmark: groundcheck's stages per plan size, and ngspice on the same network.

    python benchmarks/bench.py                 # 1k, 10k, 100k conductors
    python benchmarks/bench.py --sizes 1000000 # one size, when memory allows
    python benchmarks/bench.py --no-ngspice

Each size runs in a fresh process (so peak memory is that size's own). Prints a Markdown table:
parse (text -> model), network (graph + electrical network), audit (topology rules), solve at ten
frequencies (one factorisation each, every source and stage as a column), full check (everything,
hum budget included) where the size allows, peak memory, and ngspice's operating point on the
exported netlist timed as a whole process, with the ratio of groundcheck's one solve to it.
"""

from __future__ import annotations

import argparse
import json
import os
import resource
import shutil
import subprocess
import sys
import tempfile
import time
from pathlib import Path

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))


def one(size: int, kind: str, ngspice: bool, full_limit: int) -> dict:
    import numpy as np

    from generate import chassis, installation
    from groundcheck import load_text
    from groundcheck.analysis import analyze
    from groundcheck.audit import audit
    from groundcheck.circuit import build_circuit
    from groundcheck.coupling import pair_tests
    from groundcheck.network import build_graph
    from groundcheck.spice import to_spice

    text = chassis(size) if kind == "chassis" else installation(size)
    row = {"kind": kind, "size": size}
    t = time.perf_counter()
    plan = load_text(text, "bench.gplan")
    row["parse_s"] = time.perf_counter() - t
    row["conductors"] = len(plan.conductors)
    t = time.perf_counter()
    G = build_graph(plan)
    circuit = build_circuit(plan)
    row["network_s"] = time.perf_counter() - t
    row["nodes"] = len(circuit.nodes)
    t = time.perf_counter()
    from groundcheck.audit import AuditContext
    findings, ctx = audit(plan, AuditContext(plan, G))
    row["audit_s"] = time.perf_counter() - t
    row["loops"] = ctx.loop_total
    pairs = [(s.a, s.b) for s in plan.stages] + [(r.a, r.b) for r in plan.rectifiers]
    J = pair_tests(circuit, pairs) if pairs else np.zeros((len(circuit.nodes), 1))
    t = time.perf_counter()
    for f in [0.0] + [100.0 * k for k in range(1, 10)]:
        circuit.at(f).solve(J)
    row["solve10_s"] = time.perf_counter() - t
    t = time.perf_counter()
    circuit.at(0.0).solve(J[:, :1])
    row["solve1_s"] = time.perf_counter() - t
    if size <= full_limit:
        t = time.perf_counter()
        analyze(plan)
        row["check_s"] = time.perf_counter() - t
    if ngspice and shutil.which("ngspice"):
        net = to_spice(circuit, "bench", [("s", pairs[0][0], pairs[0][1], 1.0)] if pairs else [])
        with tempfile.TemporaryDirectory() as d:
            cir = Path(d) / "b.cir"
            cir.write_text(net)
            t = time.perf_counter()
            subprocess.run(["ngspice", "-b", str(cir)], capture_output=True, timeout=3600)
            row["ngspice_op_s"] = time.perf_counter() - t
    row["peak_mib"] = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024
    return row


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--sizes", type=int, nargs="*", default=[1000, 10000, 100000])
    ap.add_argument("--kind", choices=("chassis", "installation"), default="chassis")
    ap.add_argument("--no-ngspice", action="store_true")
    ap.add_argument("--full-limit", type=int, default=20000, help="largest size for the full check (hum budget)")
    ap.add_argument("--child", type=int, help=argparse.SUPPRESS)
    args = ap.parse_args()
    if args.child is not None:
        print(json.dumps(one(args.child, args.kind, not args.no_ngspice, args.full_limit)))
        return
    rows = []
    for n in args.sizes:
        cmd = [sys.executable, __file__, "--child", str(n), "--kind", args.kind, "--full-limit", str(args.full_limit)]
        if args.no_ngspice:
            cmd.append("--no-ngspice")
        out = subprocess.run(cmd, capture_output=True, text=True, env={**os.environ})
        if out.returncode != 0:
            print(out.stderr, file=sys.stderr)
            continue
        rows.append(json.loads(out.stdout.strip().splitlines()[-1]))
    head = ("| kind | conductors | nodes | loops | parse s | network s | audit s | solve ×10 s | full check s | peak MiB "
            "| ngspice .op s | one solve / ngspice |")
    print(head)
    print("|" + "---|" * head.count("|")[:-1] if False else "|---|---:|---:|---:|---:|---:|---:|---:|---:|---:|---:|---:|")
    for r in rows:
        ratio = (f"{r['solve1_s'] / r['ngspice_op_s']:.3f}" if r.get("ngspice_op_s") else "–")
        print(f"| {r['kind']} | {r['conductors']} | {r['nodes']} | {r['loops']} | {r['parse_s']:.2f} | {r['network_s']:.2f} | "
              f"{r['audit_s']:.2f} | {r['solve10_s']:.2f} | {r.get('check_s', float('nan')):.2f} | {r['peak_mib']:.0f} | "
              f"{r.get('ngspice_op_s', float('nan')):.2f} | {ratio} |")


if __name__ == "__main__":
    main()
