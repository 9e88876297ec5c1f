"""``groundcheck check``: plans checked each in turn or side by side in worker processes, one that
cannot be read never stopping the others, and the output of a run in which some could not be read;
each finding's fix line from the advisor (shared with ``report``)."""

from __future__ import annotations

import sys
from dataclasses import replace
from pathlib import Path

from ..core.errors import GroundcheckError, Location, PlanError, PlanErrors, shown
from ..core.runtime import die_with_parent, files_read, note_read
from ..renderers.formats import CHECK_FORMATS
from .common import (
    FAIL_HELP,
    FAIL_LEVELS,
    add_analysis_options,
    fail_on,
    load_plan,
    options_of,
    plan_paths,
    processes_type,
    write_output,
)
from .exit_status import say_passed_dangers
from .registry import EPILOG, FORMAT, command, opt

__all__ = [
    "cmd_check",
    "check_each",
    "analyze_with_progress",
    "with_errors",
    "advised",
    "ADVICE_BUDGET",
    "errors_output",
]


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
    from ..core.jsontext import dumps as json_text

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
    return json_text(doc) + "\n"


#: --advice-budget: the time the advisor may take to check each finding's fix line (check, report)
ADVICE_BUDGET = opt(
    "--advice-budget",
    type=float,
    default=10.0,
    metavar="SECONDS",
    help="time the advisor may take to try each finding's fix on the plan, so "
    "that a fix line is a change it accepts (default 10 s; 0: the rules' own fix lines)",
)


def advised(result, path: str, budget: float):
    """``result`` with each finding's fix line from the advisor (groundcheck.advice.fixes): its
    best accepted change for the finding, or what it considered and why not.  A plan read from
    standard input, or a budget of 0, keeps the rules' own lines."""
    if not budget or budget <= 0 or path == "-" or not result.findings:
        return result
    from ..advice.fixes import advised_result
    from ..advice.repair import suggest

    p = Path(path)
    text = p.read_bytes().decode("utf-8", "replace").lstrip("\ufeff")
    _, evs = suggest(
        result.plan,
        text,
        result.options,
        p.resolve().parent,
        p.resolve(),
        budget=budget,
        before=result,
    )
    return advised_result(result, evs)


@command(
    "check",
    help="audit plans and print the findings",
    description="Audit plans: loops, shared returns, stars, chassis bonds, protective earth, "
    "hum and buzz.\n\nExample:\n  groundcheck check examples/headphone-amp-100v.gplan "
    "--format json",
    epilog=EPILOG,
    formats=CHECK_FORMATS,
    options=(
        opt(
            "plans",
            nargs="+",
            metavar="PLAN",
            help="plan files or folders (every .gplan below a folder is "
            "checked); '-' reads standard input",
        ),
        FORMAT,
        opt("--fail-on", choices=FAIL_LEVELS, default=None, help=FAIL_HELP),
        opt(
            "-o",
            "--output",
            metavar="FILE",
            help="write the report to FILE instead of standard output",
        ),
        opt(
            "--jobs",
            type=processes_type,
            default=1,
            metavar="N",
            help="use N processes: several plans are checked side by side; for one plan, a large "
            "flat file is read by two, the solves (the hum budget's frequencies, the shared "
            "returns, the outlet voltages) are shared among N and the advisor tries N fixes at "
            "once (Linux; default 1; at most the processors available)",
        ),
        ADVICE_BUDGET,
        add_analysis_options,
    ),
)
def cmd_check(args) -> int:
    args.plans = plan_paths(args.plans)
    results, failed = check_each(args)
    for _path, e in failed:
        sys.stderr.write(e.render() + "\n")
    if failed:
        sys.stderr.write(
            f"groundcheck: {len(failed)} of {len(args.plans)} plans could not be read: "
            f"{', '.join(shown(p) for p, _ in failed)}; the others were checked\n"
        )
    failing = any(r.fails(fail_on(args)) for r in results)
    say_passed_dangers(args, results)
    status = 2 if failed else 1 if failing else 0
    if args.format == "text" and not args.output and sys.stdout.isatty():
        from rich.console import Console
        from ..renderers.text import print_report

        console = Console(highlight=False)
        for i, r in enumerate(results):
            print_report(r, console, caution=i == 0)
        return status
    from ..renderers.formats import render_results

    if failed and args.format in ("json", "sarif"):
        text = with_errors(results, [e for _, e in failed], args.format)
    else:
        text = render_results(results, args.format) if results else ""
    write_output(text, args.output, args.plans)
    return status


def errors_output(e: PlanErrors, args) -> None:
    """A check whose only plan could not be read, in JSON or SARIF: the errors as a document (the
    errors themselves are on standard error already)."""
    if args.command != "check" or getattr(args, "format", None) not in ("sarif", "json"):
        return
    from ..core.jsontext import dumps as json_text
    from ..renderers.jsondoc import errors_document
    from ..renderers.sarif import sarif_errors

    doc = (sarif_errors if args.format == "sarif" else errors_document)(e.errors)
    try:
        write_output(
            json_text(doc) + "\n",
            args.output,
            [p for p in args.plans if p != "-"],
        )
    except GroundcheckError as out:  # the output names a plan the run read: said, not written
        sys.stderr.write(f"groundcheck: error: {shown(out)}\n")
