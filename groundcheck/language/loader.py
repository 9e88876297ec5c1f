"""Loading a plan: files and includes, block expansion, name resolution, validation →
:class:`Plan`.

Public entry points: :func:`load` (a path, or ``-`` for standard input) and
:func:`load_text`.  Every problem is collected and raised together as
:class:`~groundcheck.core.errors.PlanErrors`.
"""

from __future__ import annotations

from pathlib import Path

from ..core.errors import LimitError, Location, PlanError, PlanErrors
from ..core.runtime import can_fork, no_gc
from ..model.records import Plan
from .assemble import assemble
from .blocks import BlockIndex
from .devices import device_plans_once, read_once
from .expansion import Expander
from .includes import FileReader
from .limits import LIMITS
from .phrases import Statement
from .placement import Transform, name_placements
from .planfile import PLAN_SUFFIX, read_plan_file, read_stdin, substituted
from .syntax import BlockDef

__all__ = ["load", "load_text", "substituted", "LIMITS", "PLAN_SUFFIX"]


def load(
    path: str | Path,
    *,
    stdin_text: str | None = None,
    libraries: tuple[str, ...] = (),
    _devices: tuple[Path, ...] = (),
    jobs: int = 1,
) -> Plan:
    """Load the plan at ``path`` (``"-"`` reads standard input) and return the resolved model.

    ``libraries``: extra folders searched for device plans (after the plan's own ``library``
    statements; the environment variable ``GROUNDCHECK_LIBRARY`` adds more).  ``jobs``: see
    :func:`load_text`.
    """
    if str(path) == "-":
        text = stdin_text if stdin_text is not None else read_stdin()
        return load_text(text, "<stdin>", root=Path.cwd(), libraries=libraries, jobs=jobs)
    p = Path(path)
    loc = Location(str(path), 0, 0)
    if not p.exists():
        raise PlanErrors([PlanError(f"no such plan file: {path}", loc, "check the path")])
    if p.is_dir():
        raise PlanErrors(
            [PlanError(f"{path} is a folder, not a plan file", loc, f"name a {PLAN_SUFFIX} file")]
        )
    text = read_plan_file(p, str(path))
    return load_text(
        text,
        str(path),
        root=p.resolve().parent,
        _resolved=p.resolve(),
        libraries=libraries,
        _devices=_devices,
        jobs=jobs,
    )


class _Loader(FileReader, BlockIndex, Expander):
    """One load's state: the files read, the blocks defined, the counts the limits are checked on,
    the errors; reading files (:class:`~.includes.FileReader`), sizing blocks
    (:class:`~.blocks.BlockIndex`) and expanding statements (:class:`~.expansion.Expander`) are
    its parts."""

    def __init__(self, root: Path):
        self.root = root
        self.errors: list[PlanError] = []
        self.sources: dict[str, list[str]] = {}
        self.blocks: dict[str, BlockDef] = {}
        self.files: list[str] = []
        self.device_files: list[str] = []
        self.count = 0
        self.placed = 0  # elements made by block placements, counted before expanding
        #: a block statement's (file, line): its placements
        self.placed_at: dict[tuple[str, int], list[str]] = {}
        #: names written at the top level (a block's own name may hide one)
        self.outer_names: set[str] = set()
        #: a block statement's (file, line): names it hides
        self.shadowed: dict[tuple[str, int], set[str]] = {}
        self.rectifiers = 0
        self.included = 0  # include statements read, nested ones included
        self.stopped = False
        self.walked = 0  # statements walked inside placements, counted before expanding
        self._said: set = set()  # (location, message) of the errors a placement already gave
        #: names of statements that failed: no follow-on errors for them
        self.broken: set[str] = set()
        self.init_blocks()

    def load_device(self, path: Path) -> Plan:
        """A device's own plan, loaded with this plan's library folders and the devices placing
        it."""
        plan = read_once(
            (path, self.libraries, len(self.device_stack)),
            lambda: load(path, libraries=self.libraries, _devices=self.device_stack),
        )
        self.device_files.extend(
            f for f in (*plan.files, *plan.device_files) if f not in self.device_files
        )
        return plan


def load_text(
    text: str,
    file: str = "<plan>",
    *,
    root: Path | None = None,
    _resolved: Path | None = None,
    libraries: tuple[str, ...] = (),
    _devices: tuple[Path, ...] = (),
    jobs: int = 1,
) -> Plan:
    """Load a plan from its text.  ``file`` is the name shown in messages; includes resolve under
    ``root``.

    ``jobs`` > 1 lets a large flat file be read by two processes
    (:mod:`groundcheck.language.bigfile`), with the same plan and the same errors."""
    with no_gc(), device_plans_once():
        return _load_text(
            text,
            file,
            root=root,
            _resolved=_resolved,
            libraries=libraries,
            _devices=_devices,
            jobs=jobs,
        )


def _load_text(
    text: str, file: str, *, root, _resolved, libraries, _devices, jobs: int = 1
) -> Plan:
    root = (root or Path.cwd()).resolve()
    ld = _Loader(root)
    # a plan read from a file: its includes are named beside it, as the user named it
    ld.shown_root = Path(file).parent if _resolved is not None else None
    ld.libraries = tuple(libraries)
    ld.device_stack = _devices + ((_resolved,) if _resolved is not None else ())
    stack = (_resolved,) if _resolved is not None else ()
    at = None
    if jobs > 1 and can_fork() and len(text) <= LIMITS["file_bytes"]:
        from .bigfile import split_point  # imported only for a two-process read

        at = split_point(text)
    if at is not None:
        # a large flat file: the second part is parsed and built by a forked worker (see
        # bigfile.py)
        fresh = _Loader(root)
        fresh.libraries, fresh.device_stack = ld.libraries, ld.device_stack
        fresh.shown_root = ld.shown_root
        from .bigfile import read_split

        built = read_split(ld, text, file, at, fresh, Transform, LIMITS["elements"])
    else:
        items = ld.read_items(text, file, stack)
        if not ld.errors and not any(isinstance(i, Statement) for i in items) and not ld.blocks:
            ld.errors.append(
                PlanError("the plan is empty", Location(file, 1, 1), 'start with: plan "Title"')
            )
        built = []
        ld.outer_names = {it.label for it in items if isinstance(it, Statement) and it.label}
        ld.expand(items, "", Transform(), (), 0, (), built)
    plan = None
    if not any(isinstance(e, LimitError) for e in ld.errors):
        plan = assemble(built, file, ld)
    if ld.errors:
        worded: dict = {}
        for e in ld.errors:
            name_placements(e, ld.placed_at, ld.shadowed, worded)
            lines = ld.sources.get(e.location.file)
            if e.source_line is None and lines and 1 <= e.location.line <= len(lines):
                e.source_line = lines[e.location.line - 1]
        raise PlanErrors(ld.errors)
    assert plan is not None
    return plan
