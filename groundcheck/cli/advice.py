"""The advice commands: ``suggest`` (candidate changes, re-analysed, with a time budget and a
progress bar) and ``compare`` (before and after)."""

from __future__ import annotations

import json
import sys
import time
from pathlib import Path

from ..core.caution import CAUTION
from ..core.plain import clean
from ..renderers.output import write_atomic
from .common import UsageError, load_plan, options_of, write_output

__all__ = ["cmd_suggest", "cmd_compare", "add_fix_option", "advised", "SUGGEST_EPILOG"]

#: the exit status of ``suggest``
SUGGEST_EPILOG = (
    "Exit status: 0 no danger left after the combined set of changes, 1 a danger remains after "
    "it, 2 the plan or the command could not be used."
)


class _progress:
    """A progress bar on an interactive terminal (nothing otherwise): ``with _progress(what) as
    step: step(i, n)``."""

    def __init__(self, what: str):
        self.what, self.bar, self.task = what, None, None

    def __enter__(self):
        if sys.stderr.isatty():
            from rich.console import Console
            from rich.progress import Progress

            self.bar = Progress(console=Console(stderr=True), transient=True)
            self.bar.start()
            self.task = self.bar.add_task(self.what, total=None)
        return self.step

    def step(self, done: int, total: int) -> None:
        if self.bar is not None:
            self.bar.update(self.task, completed=done, total=total)

    def __exit__(self, *exc):
        if self.bar is not None:
            self.bar.stop()


def cmd_suggest(args) -> int:
    started = time.monotonic()  # the budget counts from here, the first analysis included
    from ..advice.apply import applied_files, moved_references
    from ..advice.repair import advise
    from ..advice.report import suggestions_document, suggestions_text

    if args.plan == "-":
        raise UsageError(
            "suggest needs a plan file, not standard input (its edits are shown against the file)"
        )
    path = Path(args.plan)
    if args.pick is not None and not args.apply:
        raise UsageError(
            "--pick chooses the suggestion that --apply writes: give --apply NEW_PLAN too"
        )
    target = Path(args.apply) if args.apply else None
    if target is not None and target.exists() and not args.force:
        raise UsageError(
            f"{args.apply} exists; --apply writes a new file (add --force to replace it)"
        )
    plan = load_plan(args.plan)
    text = (
        path.read_bytes().decode("utf-8", "replace").lstrip("\ufeff")
    )  # as the loader reads it: no newline translation
    root, resolved = path.resolve().parent, path.resolve()
    with _progress("trying candidate changes") as progress:
        before, evs, chosen, final = advise(
            plan,
            text,
            options_of(args),
            root,
            resolved,
            budget=args.budget,
            started=started,
            progress=progress,
        )
    name = path.name
    useful = [e for e in evs if not e.rejected]
    if args.format == "json":
        doc = suggestions_document(plan, text, name, evs, chosen, final)
        sys.stdout.write(json.dumps(clean(doc), indent=2, ensure_ascii=False) + "\n")
    else:
        sys.stdout.write(suggestions_text(plan, text, name, evs, chosen, final, CAUTION))
    if args.apply:
        if args.pick is not None:
            if not 1 <= args.pick <= len(useful):
                raise UsageError(f"--pick takes 1 to {len(useful)}")
            edits = useful[args.pick - 1].candidate.edits
        else:
            edits = tuple(x for e in chosen for x in e.candidate.edits)
        files = applied_files(text, edits, plan, target)
        for out, _ in files[1:]:
            if out.exists() and not args.force:
                raise UsageError(
                    f"{out} exists; --apply writes a changed copy of a device plan there (add "
                    "--force to replace it)"
                )
        originals = [
            path,
            *(Path(f) for f in plan.files),
            *(Path(e.file) for e in edits if e.file),
        ]
        for out, new_text in files:
            write_atomic(out, new_text, protect=originals)
        sys.stderr.write(f"groundcheck: wrote the changed plan to {target}\n")
        moved = moved_references(files[0][1], str(path), target)
        if moved:
            sys.stderr.write(
                f"groundcheck: note: {target} is in another folder than {path}; its relative "
                f"paths ({', '.join(moved[:4])}) now resolve from {target.parent}: copy those "
                "files beside it or write the new plan beside the original\n"
            )
        for out, _ in files[1:]:
            sys.stderr.write(
                f"groundcheck: wrote a changed copy of a device plan to {out} (the new plan names "
                "it; the original is unchanged)\n"
            )
    # a danger left after the best combined set fails, as check fails on it
    return 1 if final.fails("danger") else 0


def cmd_compare(args) -> int:
    from ..analysis import analyze
    from ..advice.compare import compare, compare_json, compare_text

    before = analyze(load_plan(args.before), options_of(args))
    after = analyze(load_plan(args.after), options_of(args))
    d = compare(before, after)
    if args.format == "html":
        text = _compare_html(d, before, after)
    else:
        text = {"text": compare_text, "json": compare_json}[args.format](d)
    write_output(text, args.output, [args.before, args.after])
    return 1 if _compare_fails(d, args.fail_on) else 0


def _compare_html(d: dict, before, after) -> str:
    """The comparison page, with both physical drawings when they can be drawn."""
    from ..renderers.compare_page import compare_page
    from ..renderers.dot import physical_dot
    from ..renderers.drawing import DrawingError, render_dot

    try:
        drawings = tuple(render_dot(physical_dot(r), "svg", "neato")[0] for r in (before, after))
    except DrawingError as e:
        sys.stderr.write(f"groundcheck: warning: {e}; the comparison has no drawings\n")
        drawings = None
    return compare_page(d, before, after, drawings)


def _compare_fails(d: dict, fail_on: str) -> bool:
    """Whether the comparison fails a review pipeline: a finding introduced, or one introduced that
    is at least as severe as the worst finding before."""
    from ..rules.catalogue import severity_rank

    new = d["findings"]["introduced"]
    if fail_on == "introduced":
        return bool(new)
    if fail_on == "worse":
        before = [f["severity"] for f in d["findings"]["fixed"] + d["findings"]["kept"]]
        worst = min(
            (severity_rank(s) for s in before), default=len(("danger", "fault", "warning", "note"))
        )
        return any(severity_rank(f["severity"]) <= worst for f in new)
    return False


def add_fix_option(parser) -> None:
    """--advice-budget: the time the advisor may take to check each finding's fix line (check,
    report)."""
    parser.add_argument(
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
