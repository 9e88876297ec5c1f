"""Checking plans: each in turn or side by side in worker processes, one that cannot be read never
stopping the others, and the output of a run in which some could not be read."""

from __future__ import annotations

import sys
from dataclasses import replace

from ..core.errors import GroundcheckError, Location, PlanError, PlanErrors
from ..core.runtime import die_with_parent, files_read, note_read
from .advice import advised
from .common import load_plan, options_of

__all__ = ["check_each", "analyze_with_progress", "with_errors"]


def _check_one(path: str, options, budget: float = 0.0):
    """Load and analyse one plan in a worker process: (True, result) or (False, rendered errors),
    and every file the worker read (the parent protects them from its output too)."""
    from ..analysis import analyze

    try:
        return True, advised(analyze(load_plan(path), options), path, budget), files_read()
    except PlanErrors as e:  # plain data: an exception's own pickling loses its fields
        return (
            False,
            [(x.message, tuple(x.location), x.hint, x.source_line) for x in e.errors],
            files_read(),
        )


def analyze_with_progress(analyze, plan, options, label: str):
    """Run the analysis with a transient progress line on an interactive terminal."""
    if not sys.stderr.isatty():
        return analyze(plan, options)
    from rich.console import Console
    from ..renderers.text import escape

    with Console(stderr=True).status(
        f"analysing {escape(label)} ({len(plan.conductors)} conductors)…"
    ):
        return analyze(plan, options)


def _check_side_by_side(args) -> list:
    """Each plan checked in a worker process: (True, result) or (False, rendered errors) per plan,
    in order.  A worker that dies is an error, never a wait; no process to start means one process
    checks them all."""
    from concurrent.futures import ProcessPoolExecutor
    from concurrent.futures.process import BrokenProcessPool

    options = [replace(options_of(args), jobs=1)] * len(args.plans)
    try:
        with ProcessPoolExecutor(max_workers=args.jobs, initializer=die_with_parent) as pool:
            budgets = [args.advice_budget] * len(options)
            return list(pool.map(_check_one, args.plans, options, budgets))
    except BrokenProcessPool:
        raise GroundcheckError(
            "a worker process of --jobs died before it finished (killed, or out of memory); run "
            "with --jobs 1"
        ) from None
    except OSError:
        return [_check_one(p, o, args.advice_budget) for p, o in zip(args.plans, options)]


def check_each(args) -> tuple[list, list]:
    """Every plan checked, one that cannot be read never stopping the others: (results, [(plan, its
    PlanErrors)]).  One plan alone raises its errors, as before."""
    from ..analysis import analyze

    results, failed = [], []
    if args.jobs > 1 and len(args.plans) > 1:
        for path, (ok, value, read) in zip(args.plans, _check_side_by_side(args)):
            for f in read:  # a worker's includes and device plans: never an output
                note_read(f)
            if ok:
                results.append(value)
            else:
                failed.append(
                    (
                        path,
                        PlanErrors(
                            [PlanError(m, Location(*loc), h, line) for m, loc, h, line in value]
                        ),
                    )
                )
        return results, failed
    for path in args.plans:
        try:
            plan = load_plan(path, args.jobs)
        except PlanErrors as e:
            if len(args.plans) == 1:
                raise
            failed.append((path, e))
            continue
        result = analyze_with_progress(analyze, plan, options_of(args), path)
        results.append(advised(result, path, args.advice_budget))
    return results, failed


def with_errors(results: list, errors: list, fmt: str) -> str:
    """JSON or SARIF of several plans, some of which could not be read: JSON ``{"plans": [...],
    "plan_errors": [...]}`` (each an error document), SARIF one run with a plan-error result per
    error."""
    import json

    errs = [err for e in errors for err in e.errors]
    if fmt == "json":
        from ..renderers.jsondoc import errors_document, result_document

        doc = {
            "plans": [result_document(r) for r in results],
            "plan_errors": [errors_document(e.errors) for e in errors],
        }
    else:
        from ..renderers.sarif import sarif_document, sarif_errors

        doc = sarif_document(results)
        run = doc["runs"][0]
        run["results"] += sarif_errors(errs)["runs"][0]["results"]
        run["invocations"][0]["executionSuccessful"] = False
    return json.dumps(doc, indent=2, ensure_ascii=False) + "\n"
