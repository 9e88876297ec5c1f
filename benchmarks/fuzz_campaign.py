"""A longer fuzz campaign than the test suite runs: grammar-aware plans, valid and mutated.

    python benchmarks/fuzz_campaign.py --examples 5000        # hypothesis, grammar-aware
    python benchmarks/fuzz_campaign.py --grid                 # each example's numbers, 17 extremes
    python benchmarks/fuzz_campaign.py --mutants 5000         # token mutants of every example
    python benchmarks/fuzz_campaign.py --atheris -atheris_runs=100000  # coverage-guided
    python benchmarks/fuzz_campaign.py --invariants 10000     # invariant properties, N plans each
    python benchmarks/fuzz_campaign.py --advice 1000          # the advisor's promises, N plans
    python benchmarks/fuzz_campaign.py --hostile 10000        # the hostile families, N cases each
    python benchmarks/fuzz_campaign.py --hostile 200 --family signals  # one family
    python benchmarks/fuzz_campaign.py --hostile 10000 --family signals --streams 2  # two at once

Every input must end in a result or in PlanErrors with FILE:LINE:COL messages; anything else is a
crash to record as a regression test in tests/test_robustness.py.  The invariant properties of
tests/test_invariants.py (mirrored channels equal, names, unconnected elements, resistive networks
renamed and reordered, resistance scaling) and tests/test_rewritings.py (statement order, units, a
wire split in two, fastening kinds, `protective` written or not) run on N generated plans each with
--invariants N; a failure is shrunk and printed by Hypothesis.
The hostile families of tests/hostile_families.py (structural mutants, special files and links,
look-alike and control characters, signals to a --jobs run) run N cases each with --hostile N: no
traceback, no case over 10 s, no raw control character shown, no file changed but a fresh output.
The advisor's promises of tests/test_repair_properties.py (no protective conductor changed but by
the own-stud fix, no wired return removed, predictions equal a fresh check, fix lines agree) run on
N generated chassis plans with --advice N.
"""

from __future__ import annotations

import argparse
import functools
import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent / "tests"))

from hypothesis import HealthCheck, given, settings  # noqa: E402

from groundcheck import PlanErrors, load_text  # noqa: E402
from groundcheck.analysis import analyze  # noqa: E402
from groundcheck.renderers.jsondoc import render_json  # noqa: E402
from planfuzz import mutated_plans, valid_plans  # noqa: E402


def one(text: str) -> None:
    try:
        p = load_text(text, "fuzz.gplan")
    except PlanErrors as e:
        for err in e.errors:
            assert ": error: " in err.one_line()
        return
    out = render_json(analyze(p))
    assert "NaN" not in out and "Infinity" not in out


def examples(grid: bool, mutants: int) -> None:
    """The extreme-value grid and/or token mutants of every example and of the plan that uses every
    statement: cases, crashes (with the first case of each
    kind), the slowest case; a crash or a case over 20 s is a regression to keep in tests/."""
    from planfuzz import extreme_variants, token_mutants

    root = Path(__file__).resolve().parent.parent
    for path in [
        *sorted((root / "examples").glob("*.gplan")),
        root / "tests" / "plans" / "every-statement.gplan",
    ]:
        text = path.read_text()
        runs = ([("grid", d, t) for d, t in extreme_variants(text)] if grid else []) + [
            ("mutant", f"#{i}", t) for i, t in enumerate(token_mutants(text, mutants, seed=7))
        ]
        crashes: dict[str, str] = {}
        slowest = (0.0, "")
        t0 = time.perf_counter()
        for kind, desc, t in runs:
            s = time.perf_counter()
            try:
                one(t)
            except Exception as e:  # noqa: BLE001 - every crash is recorded
                crashes.setdefault(f"{type(e).__name__}: {str(e)[:100]}", f"{kind} {desc}")
            slowest = max(slowest, (time.perf_counter() - s, f"{kind} {desc}"))
        print(
            f"{path.name}: {len(runs)} cases in {time.perf_counter() - t0:.0f} s, {len(crashes)} "
            f"kinds of crash, slowest {slowest[0]:.1f} s ({slowest[1]})",
            flush=True,
        )
        for k, where in crashes.items():
            print(f"  {k}  (first: {where})")


def _counted(check, name: str, t: float):
    """``check`` that prints a count every 500 plans."""
    done = [0]

    @functools.wraps(check)
    def counted(*args, **kwargs):
        check(*args, **kwargs)
        done[0] += 1
        if done[0] % 500 == 0:
            print(f"  {name}: {done[0]} plans, {time.perf_counter() - t:.0f} s", flush=True)

    return counted


def invariants(n: int, only: str = "") -> None:
    """Every property of tests/test_invariants.py and tests/test_rewritings.py on ``n`` generated
    plans each (``only``: those whose name holds it); a count every 500 plans."""
    from hypothesis import Phase

    import test_invariants
    import test_rewritings

    t, failed = time.perf_counter(), []
    for name, (check, strategies, _) in {
        **test_invariants.PROPERTIES,
        **test_rewritings.PROPERTIES,
    }.items():
        if only not in name:
            continue
        run = given(*strategies)(_counted(check, name, t))
        try:
            settings(
                max_examples=n,
                deadline=None,
                database=None,
                suppress_health_check=list(HealthCheck),
                phases=[Phase.generate, Phase.shrink],
            )(run)()
        except AssertionError as e:  # said, and the other properties still run
            failed.append(name)
            print(f"{name}: FAILED — {str(e)[:4000]}", flush=True)
            continue
        print(f"{name}: {n} plans, no failure, {time.perf_counter() - t:.0f} s so far", flush=True)
    if failed:
        raise SystemExit(f"failed: {', '.join(failed)}")


def advice(n: int) -> None:
    """The advisor's promises (tests/test_repair_properties.py) on ``n`` generated plans; the
    count of accepted suggestions seen, by action."""
    from collections import Counter

    from test_repair_properties import advisor_promises, chassis_plans

    from groundcheck.advice.repair import suggest
    from groundcheck.analysis import Options

    seen: Counter = Counter()
    t = time.perf_counter()

    def run(text: str) -> None:
        advisor_promises(text)
        _, evs = suggest(load_text(text, "generated.gplan"), text, Options(max_frequency=1000.0))
        seen.update(ev.candidate.action for ev in evs if not ev.rejected)

    settings(
        max_examples=n, deadline=None, database=None, suppress_health_check=list(HealthCheck)
    )(given(chassis_plans())(run))()
    print(
        f"advisor's promises: {n} plans, no failure, {time.perf_counter() - t:.0f} s; accepted "
        f"suggestions by action: {dict(sorted(seen.items()))}",
        flush=True,
    )


def hostile(n: int, families: list[str], seed: int = 11, streams: int = 1) -> int:
    """``n`` cases of each hostile family: outcomes, failures (the first case of each kind), the
    slowest case, the longest stop after a signal and the process's peak memory; returns the
    number of failures.  The signals family may run ``streams`` cases at once (each is a process
    of its own; case ``i`` draws from its own seed, so a failure is re-run alone by its number)."""
    import random
    import resource
    from collections import Counter
    from concurrent.futures import ThreadPoolExecutor

    from hostile_families import FAMILIES

    failed = 0
    for name in families:
        seen: Counter = Counter()
        kinds: dict[str, int] = {}
        slowest, stop = (0.0, -1), (0.0, -1)
        t0 = time.perf_counter()
        shared = random.Random(f"{seed}-{name}")

        def case(i: int, name: str = name, shared: random.Random = shared):
            rng = random.Random(f"{seed}-{name}-{i}") if name == "signals" else shared
            s = time.perf_counter()
            try:
                return i, FAMILIES[name](rng), None, time.perf_counter() - s
            except Exception as e:  # noqa: BLE001 - every failure is recorded
                return i, "", f"{type(e).__name__}: {str(e)[:160]}", time.perf_counter() - s

        width = streams if name == "signals" else 1
        with ThreadPoolExecutor(width) as pool:
            for i, outcome, failure, took in pool.map(case, range(n)):
                if failure:
                    kinds.setdefault(failure, i)
                    failed += 1
                    print(f"  {name} case {i} failed: {failure}", flush=True)
                seen[outcome.split(" in ")[0]] += 1
                slowest = max(slowest, (took, i))
                if " stopped in " in outcome:
                    stop = max(stop, (float(outcome.split(" stopped in ")[1].split()[0]), i))
                if (i + 1) % 500 == 0:
                    print(f"  {name}: {i + 1} cases, {failed} failed", flush=True)
        peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024
        print(
            f"{name}: {n} cases in {time.perf_counter() - t0:.0f} s, {len(kinds)} kinds of "
            f"failure, slowest {slowest[0]:.2f} s (case {slowest[1]}), longest stop after a "
            f"signal {stop[0]:.2f} s (case {stop[1]}), peak {peak:.0f} MiB; "
            f"{dict(seen.most_common(8))}",
            flush=True,
        )
        for k, i in kinds.items():
            print(f"  {k}  (first: case {i})", flush=True)
    return failed


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--examples", type=int, default=2000)
    ap.add_argument("--atheris", action="store_true")
    ap.add_argument(
        "--grid", action="store_true", help="the extreme-value grid over every example's numbers"
    )
    ap.add_argument(
        "--mutants", type=int, default=0, metavar="N", help="N token mutants of every example"
    )
    ap.add_argument(
        "--invariants",
        type=int,
        default=0,
        metavar="N",
        help="the invariant properties, N plans each",
    )
    ap.add_argument(
        "--only", default="", help="with --invariants: the properties whose name holds this"
    )
    ap.add_argument(
        "--advice",
        type=int,
        default=0,
        metavar="N",
        help="the advisor's promises on N generated chassis plans",
    )
    ap.add_argument(
        "--hostile", type=int, default=0, metavar="N", help="N cases of each hostile family"
    )
    ap.add_argument(
        "--family",
        action="append",
        choices=["structural", "files", "unicode", "signals"],
        help="only this hostile family (repeatable)",
    )
    ap.add_argument(
        "--seed",
        type=int,
        default=11,
        help="with --hostile: the seed of the cases (another seed, other cases)",
    )
    ap.add_argument(
        "--streams",
        type=int,
        default=1,
        metavar="K",
        help="with --hostile: K signal cases at once (each a process of its own)",
    )
    args, rest = ap.parse_known_args()
    if args.hostile:
        families = args.family or ["structural", "files", "unicode", "signals"]
        sys.exit(1 if hostile(args.hostile, families, seed=args.seed, streams=args.streams) else 0)
    if args.advice:
        advice(args.advice)
        return
    if args.invariants:
        invariants(args.invariants, args.only)
        return
    if args.grid or args.mutants:
        examples(args.grid, args.mutants)
        return
    if args.atheris:
        import atheris  # type: ignore

        def target(data: bytes) -> None:
            one(data.decode("utf-8", "replace"))

        atheris.Setup([sys.argv[0], *rest], target)
        atheris.Fuzz()
        return
    t = time.perf_counter()
    for name, strategy in (("valid", valid_plans()), ("mutated", mutated_plans())):

        def phase(
            text: str,
        ) -> None:  # a fresh function per phase: Hypothesis settings apply once per function
            one(text)

        given(strategy)(
            settings(
                max_examples=args.examples,
                deadline=None,
                database=None,
                suppress_health_check=list(HealthCheck),
            )(phase)
        )()
        print(f"{name} plans: {args.examples}, no failure, {time.perf_counter() - t:.1f} s so far")


if __name__ == "__main__":
    main()
