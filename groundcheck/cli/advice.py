"""The advice commands: ``suggest`` (candidate changes, re-analysed, with a time budget and a progress bar)
and ``compare`` (before and after)."""

from __future__ import annotations

import json
import sys
from pathlib import Path

from ..core.caution import CAUTION
from ..core.plain import clean
from ..renderers.output import write_atomic
from .common import UsageError, load_plan, options_of, write_output

__all__ = ["cmd_suggest", "cmd_compare"]


class _progress:
    """A progress bar on an interactive terminal (nothing otherwise): ``with _progress(what) as step: step(i, n)``."""

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
    from ..advice.repair import apply_edits, greedy, suggest
    from ..advice.report import suggestions_document, suggestions_text
    if args.plan == "-":
        raise UsageError("suggest needs a plan file, not standard input (its edits are shown against the file)")
    path = Path(args.plan)
    if args.pick is not None and not args.apply:
        raise UsageError("--pick chooses the suggestion that --apply writes: give --apply NEW_PLAN too")
    target = Path(args.apply) if args.apply else None
    if target is not None and target.exists() and not args.force:
        raise UsageError(f"{args.apply} exists; --apply writes a new file (add --force to replace it)")
    plan = load_plan(args.plan)
    text = path.read_bytes().decode("utf-8",
                                    "replace").lstrip("\ufeff")   # as the loader reads it: no newline translation
    root, resolved = path.resolve().parent, path.resolve()
    with _progress("trying candidate changes") as progress:
        before, evs = suggest(plan, text, options_of(args), root, resolved, budget=args.budget * 0.7, progress=progress)
        chosen, final, final_text = greedy(plan, text, options_of(args), root, resolved, evs=evs, before=before,
                                           budget=args.budget * 0.3)
    name = path.name
    useful = [e for e in evs if not e.rejected]
    if args.format == "json":
        doc = suggestions_document(plan, text, name, evs, chosen, final, final_text)
        sys.stdout.write(json.dumps(clean(doc), indent=2, ensure_ascii=False) + "\n")
    else:
        sys.stdout.write(suggestions_text(plan, text, name, evs, chosen, final, CAUTION))
    if args.apply:
        if args.pick is not None:
            if not 1 <= args.pick <= len(useful):
                raise UsageError(f"--pick takes 1 to {len(useful)}")
            new_text = apply_edits(text, useful[args.pick - 1].candidate.edits)
        else:
            new_text = final_text
        write_atomic(target, new_text, protect=[path])
        sys.stderr.write(f"groundcheck: wrote the changed plan to {target}\n")
    return 0


def cmd_compare(args) -> int:
    from ..analysis import analyze
    from ..advice.compare import compare, compare_html, compare_json, compare_text
    d = compare(analyze(load_plan(args.before), options_of(args)), analyze(load_plan(args.after), options_of(args)))
    text = {"text": compare_text, "json": compare_json, "html": compare_html}[args.format](d)
    write_output(text, args.output, [args.before, args.after])
    return 1 if _compare_fails(d, args.fail_on) else 0


def _compare_fails(d: dict, fail_on: str) -> bool:
    """Whether the comparison fails a review pipeline: a finding introduced, or one introduced that is at least
    as severe as the worst finding before."""
    from ..rules.catalogue import severity_rank
    new = d["findings"]["introduced"]
    if fail_on == "introduced":
        return bool(new)
    if fail_on == "worse":
        before = [f["severity"] for f in d["findings"]["fixed"] + d["findings"]["kept"]]
        worst = min((severity_rank(s) for s in before), default=len(("danger", "fault", "warning", "note")))
        return any(severity_rank(f["severity"]) <= worst for f in new)
    return False
