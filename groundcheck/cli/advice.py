"""The advice commands: ``suggest`` (candidate changes, re-analysed, with a time budget and a
progress bar) and ``compare`` (before and after)."""

from __future__ import annotations

import sys
import time
from pathlib import Path

from ..renderers.formats import COMPARISON_FORMATS, SUGGESTION_FORMATS
from ..renderers.output import write_atomic
from .common import (
    UsageError,
    add_analysis_options,
    load_plan,
    options_of,
    processes_type,
    seconds_type,
    write_output,
)
from .registry import FORMAT, command, opt

__all__ = ["cmd_suggest", "cmd_compare", "SUGGEST_EPILOG"]

#: the exit status of ``suggest``
SUGGEST_EPILOG = (
    "Exit status: 0 no danger left after the combined set of changes, 1 a danger remains after "
    "it, 2 the plan or the command could not be used."
)
COMPARE_EPILOG = (
    "Exit status: 0 nothing --fail-on asks about, 1 the after-plan introduces a finding "
    "(--fail-on introduced) or one at least as severe as the worst before (--fail-on worse), 2 a "
    "plan or the command could not be used."
)


class _progress:
    """Progress of the advice: a bar on an interactive terminal; elsewhere (a pipe, a log) a plain
    line every PIPE_EVERY seconds. ``with _progress(what) as step: step(done, total[, phase])``,
    ``total`` what the time left allows."""

    PIPE_EVERY = 5.0  # s between plain lines

    def __init__(self, what: str):
        self.what, self.bar, self.task = what, None, None
        self.started = self.said = time.monotonic()

    def __enter__(self):
        if sys.stderr.isatty():
            from rich.console import Console
            from rich.progress import Progress

            self.bar = Progress(console=Console(stderr=True), transient=True)
            self.bar.start()
            self.task = self.bar.add_task(self.what, total=None)
        return self.step

    def step(self, done: int, total: int, phase: str | None = None) -> None:
        what = phase or self.what
        if self.bar is not None:
            self.bar.update(self.task, completed=done, total=total, description=what)
            return
        now = time.monotonic()
        if now - self.said >= self.PIPE_EVERY:
            self.said = now
            sys.stderr.write(
                f"groundcheck: {what}: {done} of about {total} ({now - self.started:.0f} s)\n"
            )
            sys.stderr.flush()

    def __exit__(self, *exc):
        if self.bar is not None:
            self.bar.stop()


@command(
    "suggest",
    help="propose changes that fix the findings, ranked by their predicted gain",
    description="Try candidate changes on the plan (lift a shield end, remove a redundant "
    "bond, re-route a return, join a rectifier's ends, give the protective earth its own stud "
    "...), re-run the analysis for each and rank them. Changes that would weaken the "
    "protective earth are never proposed.\n\nExample:\n  groundcheck suggest "
    "examples/dual-mono-phono-stage.gplan --apply fixed.gplan",
    epilog=SUGGEST_EPILOG,
    formats=SUGGESTION_FORMATS,
    options=(
        opt("plan", metavar="PLAN"),
        opt(
            "--apply",
            metavar="NEW_PLAN",
            help="write the plan with the changes applied to this new file",
        ),
        opt(
            "--pick",
            type=int,
            metavar="N",
            help="with --apply: apply suggestion N instead of the combined set",
        ),
        opt(
            "--force",
            action="store_true",
            help="with --apply: replace NEW_PLAN if it exists (never the plan itself)",
        ),
        opt(
            "--budget",
            type=seconds_type,
            default=25.0,
            metavar="SECONDS",
            help="time for trying candidates and combining them (default 25 s); what is not "
            "tried is listed",
        ),
        opt(
            "--jobs",
            type=processes_type,
            default=1,
            metavar="N",
            help="use N processes: N candidates are tried at once, and each analysis's solves "
            "are shared among N (Linux; default 1; at most the processors available)",
        ),
        FORMAT,
        add_analysis_options,
    ),
)
def cmd_suggest(args) -> int:
    started = time.monotonic()  # the budget counts from here, the first analysis included
    from ..advice.apply import application
    from ..advice.repair import advise

    target = _apply_target(args)
    path = Path(args.plan)
    plan = load_plan(args.plan)
    # as the loader reads it: no newline translation
    text = path.read_bytes().decode("utf-8", "replace").lstrip("\ufeff")
    where = (path.resolve().parent, path.resolve())
    with _progress("trying candidate changes") as progress:
        before, evs, chosen, final = advise(
            plan,
            text,
            options_of(args),
            *where,
            budget=args.budget,
            started=started,
            progress=progress,
        )
    render = SUGGESTION_FORMATS[args.format].render
    # the notices of the plan as written (lengths measured on it), not of the combined set
    sys.stdout.write(render(plan, text, path.name, evs, chosen, final, before))
    if target is not None:
        _write(application(plan, text, evs, chosen, target, args.pick, args.force), path, target)
        if args.pick is not None:
            # the summary above is the combined set's: the plan written holds one change alone
            final = _written(target, options_of(args))
    # a danger left after the best combined set (or in the plan --pick wrote) fails, as check fails
    # on it
    return 1 if final.fails("danger") else 0


def _written(target: Path, options):
    """The plan --pick wrote, checked again (the protective-earth and danger rules never left
    out), its verdict said on standard error."""
    from ..advice.repair import judging
    from ..analysis import analyze

    result = analyze(load_plan(str(target)), judging(options))
    counts = ", ".join(
        f"{n} {sev}" for sev in ("danger", "fault") if (n := result.counts().get(sev, 0))
    )
    sys.stderr.write(
        f"groundcheck: {target} as written (this one change alone): {result.verdict()}"
        f"{f' ({counts})' if counts else ''}\n"
    )
    return result


def _apply_target(args) -> Path | None:
    """The new plan --apply names (None without it), once the command line is known to make
    sense."""
    if args.plan == "-":
        raise UsageError(
            "suggest needs a plan file, not standard input (its edits are shown against the file)"
        )
    if args.pick is not None and not args.apply:
        raise UsageError(
            "--pick chooses the suggestion that --apply writes: give --apply NEW_PLAN too"
        )
    if args.apply and Path(args.apply).exists() and not args.force:
        raise UsageError(
            f"{args.apply} exists; --apply writes a new file (add --force to replace it)"
        )
    return Path(args.apply) if args.apply else None


def _write(applied, path: Path, target: Path) -> None:
    """Write the changed plan and the changed device plans' copies, and say what was written."""
    for out, new_text in applied.files:
        write_atomic(out, new_text, protect=applied.protect)
    sys.stderr.write(f"groundcheck: wrote the changed plan to {target}\n")
    if applied.moved:
        sys.stderr.write(
            f"groundcheck: note: {target} is in another folder than {path}; its relative "
            f"paths ({', '.join(applied.moved[:4])}) now resolve from {target.parent}: copy those "
            "files beside it or write the new plan beside the original\n"
        )
    for out, _ in applied.files[1:]:
        sys.stderr.write(
            f"groundcheck: wrote a changed copy of {out.name.removeprefix(target.stem + '.')} to "
            f"{out} (the new plan "
            "names it; the original is unchanged)\n"
        )


@command(
    "compare",
    help="compare two plans: findings, loops, hum per harmonic, protective earth",
    description="Example:\n  groundcheck compare before.gplan after.gplan --format html -o "
    "changes.html",
    epilog=COMPARE_EPILOG,
    formats=COMPARISON_FORMATS,
    options=(
        opt("before", metavar="BEFORE"),
        opt("after", metavar="AFTER"),
        FORMAT,
        opt(
            "-o",
            "--output",
            metavar="FILE",
            help="write the comparison to FILE instead of standard output",
        ),
        opt(
            "--fail-on",
            choices=("never", "introduced", "worse"),
            default="never",
            help="exit 1 when the after-plan introduces a finding (introduced), or introduces "
            "one at least as severe as the worst before or makes a kept one worse (worse); "
            "default never",
        ),
        add_analysis_options,
    ),
)
def cmd_compare(args) -> int:
    from ..analysis import analyze
    from ..advice.compare import compare

    before = analyze(load_plan(args.before), options_of(args))
    after = analyze(load_plan(args.after), options_of(args))
    d = compare(before, after)
    text = COMPARISON_FORMATS[args.format].render(d, before, after, _warn)
    write_output(text, args.output, [args.before, args.after])
    return 1 if _compare_fails(d, args.fail_on) else 0


def _warn(text: str) -> None:
    sys.stderr.write(f"groundcheck: warning: {text}\n")


def _compare_fails(d: dict, fail_on: str) -> bool:
    """Whether the comparison fails a review pipeline: a finding introduced, or one introduced that
    is at least as severe as the worst finding before or a kept one made worse."""
    from ..rules.catalogue import severity_rank

    new = d["findings"]["introduced"]
    if fail_on == "introduced":
        return bool(new)
    if fail_on == "worse":
        before = [f["severity"] for f in d["findings"]["fixed"] + d["findings"]["kept"]]
        worst = min(
            (severity_rank(s) for s in before), default=len(("danger", "fault", "warning", "note"))
        )
        return any(severity_rank(f["severity"]) <= worst for f in new) or bool(
            d["findings"].get("worse")
        )
    return False
