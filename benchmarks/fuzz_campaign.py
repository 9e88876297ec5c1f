"""A longer fuzz campaign than the test suite runs: grammar-aware plans, valid and mutated.

    python benchmarks/fuzz_campaign.py --examples 5000          # hypothesis, grammar-aware
    python benchmarks/fuzz_campaign.py --atheris -atheris_runs=100000   # coverage-guided, if atheris installs

Every input must end in a result or in PlanErrors with FILE:LINE:COL messages; anything else is a
crash to record as a regression test in tests/test_robustness.py.
"""

from __future__ import annotations

import argparse
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


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--examples", type=int, default=2000)
    ap.add_argument("--atheris", action="store_true")
    args, rest = ap.parse_known_args()
    if args.atheris:
        import atheris  # type: ignore

        def target(data: bytes) -> None:
            one(data.decode("utf-8", "replace"))
        atheris.Setup([sys.argv[0], *rest], target)
        atheris.Fuzz()
        return
    t = time.perf_counter()
    for name, strategy in (("valid", valid_plans()), ("mutated", mutated_plans())):
        def phase(text: str) -> None:       # a fresh function per phase: Hypothesis settings apply once per function
            one(text)
        given(strategy)(settings(max_examples=args.examples, deadline=None, database=None,
                                 suppress_health_check=list(HealthCheck))(phase))()
        print(f"{name} plans: {args.examples}, no failure, {time.perf_counter() - t:.1f} s so far")


if __name__ == "__main__":
    main()
