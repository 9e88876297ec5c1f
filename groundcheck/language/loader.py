"""Loading a plan: files and includes, block expansion, name resolution, validation →
:class:`Plan`.

Public entry points: :func:`load` (a path, or ``-`` for standard input) and
:func:`load_text`.  Every problem is collected and raised together as
:class:`~groundcheck.core.errors.PlanErrors`.
"""

from __future__ import annotations

from pathlib import Path

from .assemble import HEADER_KEYWORDS, assemble
from .devices import device_plans_once, read_once
from .limits import LIMITS
from .placement import Transform, name_placements, place
from ..core.errors import LimitError, Location, PlanError, PlanErrors
from ..model.records import Plan
from .phrases import Reader, Statement
from .statements import KEYWORDS, build, builder_of
from ..core.runtime import can_fork, no_gc
from .syntax import BlockDef, parse_text, suggest_keyword
from .planfile import PLAN_SUFFIX, read_plan_file, read_stdin, substituted

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


class _Loader:
    def __init__(self, root: Path):
        self.root = root
        self.errors: list[PlanError] = []
        self.sources: dict[str, list[str]] = {}
        self.blocks: dict[str, BlockDef] = {}
        self.files: list[str] = []
        self.device_files: list[str] = []
        self.count = 0
        self.placed = 0  # elements made by block placements, counted before expanding
        self.placed_at: dict[
            tuple[str, int], list[str]
        ] = {}  # a block statement's (file, line): its placements
        self.outer_names: set[str] = (
            set()
        )  # names written at the top level (a block's own name may hide one)
        self.shadowed: dict[
            tuple[str, int], set[str]
        ] = {}  # a block statement's (file, line): names it hides
        self._size_cache: dict[str, int] = {}
        self._walk_cache: dict[str, int] = {}
        self.rectifiers = 0
        self.included = 0  # include statements read, nested ones included
        self.stopped = False
        self._place_cache: dict[int, object] = {}
        self.walked = 0  # statements walked inside placements, counted before expanding
        self._said: set = set()  # (location, message) of the errors a placement already gave
        self._local_cache: dict[str, set[str]] = {}
        self.broken: set[str] = (
            set()
        )  # names of statements that failed: no follow-on errors for them

    # ---- files and includes ------------------------------------------------
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

    def read_items(self, text: str, shown: str, stack: tuple[Path, ...]) -> list:
        if len(text) > LIMITS["file_bytes"]:
            self.errors.append(
                LimitError(
                    f"plan text is over the limit of {LIMITS['file_bytes']} bytes",
                    Location(shown, 1, 1),
                    "split it with include",
                )
            )
            return []
        lines = text.split("\n")
        self.sources[shown] = lines
        self.files.append(shown)
        for i, line in enumerate(lines):
            if len(line) > LIMITS["line_chars"]:
                self.errors.append(
                    LimitError(
                        f"line is {len(line)} characters long, over the limit of "
                        f"{LIMITS['line_chars']}",
                        Location(shown, i + 1, LIMITS["line_chars"] + 1),
                        "break it with a trailing comma",
                    )
                )
                return []
        items, blocks = parse_text(text, shown, self.errors)
        for name, bd in blocks.items():
            if name in self.blocks and self.blocks[name] is not bd:
                self.errors.append(
                    PlanError(
                        f"block {name!r} is defined twice",
                        bd.loc,
                        f"first defined at {self.blocks[name].loc}",
                    )
                )
            self.blocks.setdefault(name, bd)
        out = []
        for it in items:
            if isinstance(it, Statement) and it.keyword == "include":
                out.extend(self.include(it, shown, stack))
            else:
                out.append(it)
        return out

    def include(self, st: Statement, shown: str, stack: tuple[Path, ...]) -> list:
        if self.stopped:  # a limit was reached: nothing more is read
            return []
        if len(st.phrases) != 1 or len(st.phrases[0]) != 1 or st.phrases[0][0].kind != "string":
            self.errors.append(
                PlanError("include takes one quoted path", st.loc, 'e.g. include "supply.gplan"')
            )
            return []
        item = st.phrases[0][0]
        if len(stack) >= LIMITS["include_depth"]:
            self.errors.append(
                LimitError(
                    f"includes nested deeper than {LIMITS['include_depth']}",
                    item.loc,
                    "flatten the includes",
                )
            )
            return []
        self.included += 1  # files included inside included files multiply: counted as read
        if self.included > LIMITS["include_reads"]:
            self.errors.append(
                LimitError(
                    f"includes read {self.included:,} files, over the limit of "
                    f"{LIMITS['include_reads']:,}",
                    item.loc,
                    "a file included twice by files included twice multiplies; include each part "
                    "once",
                )
            )
            self.stopped = True
            return []
        here = stack[-1].parent if stack else self.root
        if Path(item.value).is_absolute():
            self.errors.append(
                PlanError(
                    f"include {item.value!r} is an absolute path, outside the plan's folder",
                    item.loc,
                    "write a path relative to the including file, inside the plan's folder",
                )
            )
            return []
        try:
            target = (here / item.value).resolve()
        except (RuntimeError, OSError):  # a link in a loop leads to no file
            self.errors.append(
                PlanError(f"include {item.value!r} is a link in a loop", item.loc, "name the file")
            )
            return []
        try:
            target.relative_to(self.root)
        except ValueError:
            self.errors.append(
                PlanError(
                    f"include {item.value!r} lies outside the plan's folder",
                    item.loc,
                    "includes are confined to the folder of the main plan and below",
                )
            )
            return []
        if target in stack:
            chain = " -> ".join(p.name for p in stack + (target,))
            self.errors.append(
                PlanError(
                    f"include cycle: {chain}",
                    item.loc,
                    "a plan cannot include itself, directly or not",
                )
            )
            return []
        if not target.is_file():
            self.errors.append(
                PlanError(
                    f"included file {item.value!r} not found", item.loc, f"looked for {target}"
                )
            )
            return []
        try:
            text = read_plan_file(target, str(target.relative_to(self.root)))
        except PlanErrors as e:
            self.errors.extend(e.errors)
            return []
        return self.read_items(text, str(target.relative_to(self.root)), stack + (target,))

    # ---- blocks --------------------------------------------------------------
    def block_size(self, block: str, seen: tuple[str, ...] = ()) -> int:
        """How many elements one placement of ``block`` makes, counted without expanding it
        (memoised)."""
        if block in self._size_cache:
            return self._size_cache[block]
        bd = self.blocks.get(block)
        if bd is None or block in seen:
            return 0
        n = 0
        for st in bd.body:
            if isinstance(st, tuple):
                continue
            if st.keyword != "place":
                n += 1
                continue
            try:
                inner, _, _ = self.parse_place(st)
            except PlanError:
                continue
            n += self.block_size(inner, seen + (block,))
        self._size_cache[block] = n
        return n

    def block_walk(self, block: str, seen: tuple[str, ...] = ()) -> int:
        """How many statements one placement of ``block`` walks, those that fail included (a
        placement of an undefined block, or of a block already being placed, is one): bounds the
        work even of a broken plan."""
        if block in self._walk_cache:
            return self._walk_cache[block]
        bd = self.blocks.get(block)
        if bd is None or block in seen:
            return 1
        n = 0
        for st in bd.body:
            n += 1
            if not isinstance(st, tuple) and st.keyword == "place":
                try:
                    inner, _, _ = self.parse_place(st)
                except PlanError:
                    continue
                n += self.block_walk(inner, seen + (block,))
        self._walk_cache[block] = n
        return n

    def local_names(self, block: str, seen: tuple[str, ...] = ()) -> set[str]:
        if block in self._local_cache:
            return self._local_cache[block]
        names: set[str] = set()
        bd = self.blocks.get(block)
        if bd is None or block in seen:
            return names
        for st in bd.body:
            if st.label:
                names.add(st.label)
            elif st.keyword == "place":
                try:
                    inner, prefix, _ = self.parse_place(st)
                except PlanError:
                    continue
                names |= {f"{prefix}.{n}" for n in self.local_names(inner, seen + (block,))}
        if not seen:
            self._local_cache[block] = names
        return names

    def parse_place(self, st: Statement) -> tuple[str, str, Transform]:
        """A place statement read once (its error too): a block placed many times walks it many
        times."""
        got = self._place_cache.get(id(st))
        if got is None:
            try:
                got = self._parse_place(st)
            except PlanError as e:
                got = e
            self._place_cache[id(st)] = got
        if isinstance(got, PlanError):
            raise got.with_traceback(None)
        return got

    def _parse_place(self, st: Statement) -> tuple[str, str, Transform]:
        if not st.phrases:
            raise PlanError(
                "place needs a block and a name", st.loc, "e.g. 'place channel as left at 0,0'"
            )
        r = Reader(st.phrases[0], st)
        block, bloc = r.name("a block name")
        if block not in self.blocks:
            hint = (
                suggest_keyword(block, self.blocks)
                if self.blocks
                else "define it with 'block NAME { ... }'"
            )
            raise PlanError(f"undefined block {block!r}", bloc, hint)
        r.expect("as")
        prefix, _ = r.name("a name for this placement")
        ox = oy = 0.0
        if r.keyword("at"):
            ox, oy = r.coord()
        r.finish()
        sx = sy = 1.0
        for ph in st.phrases[1:]:
            r = Reader(ph, st)
            r.expect("mirror")
            axis = r.word("an axis (x or y)", ("x", "y")) if not r.done else "y"
            if axis == "x":
                sx = -1.0
            else:
                sy = -1.0
            r.finish()
        return block, prefix, Transform(ox, oy, sx, sy)

    # ---- expansion -----------------------------------------------------------
    def count_placement(self, block: str, st: Statement, depth: int) -> None:
        """A top-level placement's elements and statements walked, counted before it is expanded
        (every nested placement included); a LimitError when either total is over its limit."""
        if depth == 0:
            self.placed += self.block_size(block)
            self.walked += self.block_walk(block)
        if self.walked > LIMITS["placed_statements"]:
            raise LimitError(
                f"block placements walk {self.walked:,} statements or more, over the limit of "
                f"{LIMITS['placed_statements']:,} (counted before expanding)",
                st.loc,
                "a block placed inside blocks multiplies, its errors too; place fewer",
            )
        if self.placed > LIMITS["placed_elements"]:
            raise LimitError(
                f"block placements expand to {self.placed:,} elements or more, over the limit of "
                f"{LIMITS['placed_elements']:,} (counted before expanding)",
                st.loc,
                "a block placed inside blocks multiplies; place fewer, or write a large flat plan",
            )

    def expand(
        self,
        items: list,
        prefix: str,
        tf: Transform,
        scopes: tuple,
        depth: int,
        path: tuple[str, ...],
        out: list,
    ) -> None:
        for it in items:
            if self.stopped:  # a limit was reached: nothing more is expanded
                return
            if isinstance(it, tuple):  # a block definition
                if prefix:
                    self.errors.append(
                        PlanError(
                            "blocks are defined at the top level of a file",
                            it[1].loc,
                            "move the block out",
                        )
                    )
                continue
            st: Statement = it
            if prefix:
                self.placed_at.setdefault((st.loc.file, st.loc.line), []).append(
                    prefix.rstrip(".")
                )
            try:
                if st.keyword == "place":
                    block, sub, inner_tf = self.parse_place(st)
                    if block in path:
                        raise PlanError(
                            f"block {block!r} places itself",
                            st.loc,
                            "a block cannot contain itself, directly or not",
                        )
                    if depth + 1 > LIMITS["block_depth"]:
                        raise LimitError(
                            f"blocks placed more than {LIMITS['block_depth']} deep",
                            st.loc,
                            "flatten the blocks",
                        )
                    self.count_placement(block, st, depth)
                    new_prefix = f"{prefix}{sub}."
                    self.expand(
                        self.blocks[block].body,
                        new_prefix,
                        inner_tf.then(tf),
                        ((new_prefix, self.local_names(block)),) + scopes,
                        depth + 1,
                        path + (block,),
                        out,
                    )
                    continue
                if builder_of(st.keyword) is None:
                    raise PlanError(
                        f"unknown keyword {st.keyword!r}",
                        st.loc,
                        suggest_keyword(st.keyword, KEYWORDS),
                    )
                if st.broken:
                    if st.label:
                        self.broken.add(prefix + st.label)
                    continue
                if prefix and st.keyword in HEADER_KEYWORDS:
                    raise PlanError(
                        f"'{st.keyword}' belongs at the top level, not inside a block",
                        st.loc,
                        "move it out of the block",
                    )
                if st.keyword == "rectifier":
                    self.rectifiers += (
                        1  # each is simulated in time: refused before the rest is built
                    )
                    if self.rectifiers > LIMITS["rectifiers"]:
                        raise LimitError(
                            f"the plan has more than {LIMITS['rectifiers']} rectifiers, the limit "
                            "(each is simulated in time)",
                            st.loc,
                            "describe a rack's identical supplies once, or split the installation",
                        )
                record, refs = build(st)
                self.count += 1
                if self.count > LIMITS["elements"]:
                    raise LimitError(
                        f"plan expands to more than {LIMITS['elements']} elements",
                        st.loc,
                        "a block placed inside blocks multiplies; place fewer",
                    )
                out.append(
                    (
                        st,
                        place(record, st, prefix, tf, scopes, self.outer_names, self.shadowed),
                        refs,
                    )
                )
            except PlanError as e:
                if (
                    not prefix or (e.location, e.message) not in self._said
                ):  # once, not once per placement
                    self._said.add((e.location, e.message))
                    self.errors.append(e)
                if st.label:
                    self.broken.add(prefix + st.label)
                if isinstance(e, LimitError):
                    self.stopped = True
                    return


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
