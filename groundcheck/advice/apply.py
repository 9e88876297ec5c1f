"""Writing a chosen set of changes: the main plan as a new file and, when a change is inside a
device's own plan or a file the plan includes, a changed copy of that file beside it, which the new
plan's ``device`` or ``include`` statement then names.  Nothing the user wrote is changed: the
originals are only read."""

from __future__ import annotations

import dataclasses
from pathlib import Path

from ..core.errors import GroundcheckError
from ..model.records import Plan
from .edits import PlanTexts, apply_edits, direct_includes, edited_texts

__all__ = [
    "Application",
    "ApplyRefused",
    "application",
    "applied_files",
    "device_copy_path",
    "moved_references",
]


class ApplyRefused(GroundcheckError):
    """A set of changes that cannot be written as asked (no such suggestion, or a file that is
    there already)."""


@dataclasses.dataclass(frozen=True)
class Application:
    """What writing the chosen changes means: the files to write (the new plan first, then the
    changed device plans' copies), the files never to write over, and the references that resolve
    from another folder in the new plan (see :func:`moved_references`)."""

    files: list[tuple[Path, str]]
    protect: list[Path]
    moved: list[str]


def application(
    plan: Plan, text: str, evs, chosen, target: Path, pick: int | None = None, force: bool = False
) -> Application:
    """The changes to write to ``target``: suggestion ``pick`` (1-based among those not rejected)
    or, without it, the combined set ``chosen``.  A device plan's copy that exists already is
    replaced only with ``force``; ApplyRefused says why not."""
    useful = [e for e in evs if not e.rejected]
    if pick is not None:
        if not 1 <= pick <= len(useful):
            raise ApplyRefused(f"--pick takes 1 to {len(useful)}")
        edits = useful[pick - 1].candidate.edits
    else:
        edits = tuple(x for e in chosen for x in e.candidate.edits)
    files = applied_files(text, edits, plan, target)
    for out, _ in files[1:]:
        if out.exists() and not force:
            raise ApplyRefused(
                f"{out} exists; --apply writes a changed copy of a device plan or an included "
                "file there (add --force to replace it)"
            )
    originals = [
        Path(plan.file),
        *(Path(f) for f in plan.files),
        *(Path(e.file) for e in edits if e.file),
    ]
    return Application(files, originals, moved_references(files[0][1], plan.file, target))


def device_copy_path(target: Path, device_file: str) -> Path:
    """Where the changed copy of a device plan goes: beside the new plan, named after both."""
    return target.parent / f"{target.stem}.{Path(device_file).name}"


def applied_files(text: str, edits, plan: Plan, target: Path) -> list[tuple[Path, str]]:
    """(path, text) of every file to write: the new plan first, then each changed device plan's or
    included file's copy.  In the new plan, each ``device`` statement placing a changed plan and
    each ``include`` statement naming a changed file names its copy instead (a comment says so)."""
    new_text = apply_edits(text, edits)
    copies = {f: (device_copy_path(target, f), t) for f, t in edited_texts(edits).items()}
    if not copies:
        return [(target, new_text)]
    # each include statement by the path it names (the edits may have moved its line)
    includes = {
        st.phrases[0][0].value: f
        for f, st in direct_includes(plan, PlanTexts(text, plan.file)).items()
    }
    by_device = {}
    for x in (*plan.conductors, *plan.points, *plan.metals):
        dev = plan.index.device_of(x.name)
        if x.location.file in copies and dev is not None:
            by_device[dev] = x.location.file
    src = PlanTexts(new_text, plan.file)
    repoint = []
    for st in src.main.by_line.values():
        if not st.phrases or st.phrases[0][0].kind != "string":
            continue
        item = st.phrases[0][0]
        if st.keyword == "device" and st.label in by_device:
            copy = copies[by_device[st.label]][0]
        elif st.keyword == "include" and includes.get(item.value) in copies:
            copy = copies[includes[item.value]][0]
        else:
            continue
        edit = src.replace(st, [(item, f'"{copy.name}"')])
        repoint.append(
            dataclasses.replace(
                edit,
                new=f"{edit.new}   # changed copy of {item.value}, written by groundcheck suggest",
            )
        )
    return [(target, apply_edits(new_text, repoint)), *copies.values()]


def moved_references(text: str, file: str, target: Path) -> list[str]:
    """The ``library``, ``include`` and ``device`` statements of a plan (its ``text``, as written
    to ``target``) whose relative paths find nothing from ``target``'s folder (their keywords and
    lines), for a note when the new plan is written in another folder."""
    if target.resolve().parent == Path(file).resolve().parent:
        return []
    src = PlanTexts(text, file)
    out = []
    for line, st in sorted(src.main.by_line.items()):
        strings = [it.value for ph in st.phrases for it in ph if it.kind == "string"]
        moved = [
            v for v in strings if not Path(v).is_absolute() and not (target.parent / v).exists()
        ]
        if st.keyword in ("library", "include", "device") and moved:
            out.append(f"{st.keyword} (line {line})")
    return out
