"""The loader's reading of files: a plan file's text checked against the size limits and parsed,
its blocks registered, and its ``include`` statements replaced by the statements of the files they
name (confined to the main plan's folder, never a cycle, within the depth and read limits)."""

from __future__ import annotations

from pathlib import Path

from ..core.errors import LimitError, Location, PlanError, PlanErrors
from .limits import LIMITS
from .phrases import Statement
from .planfile import read_plan_file
from .syntax import parse_text

__all__ = ["FileReader"]


class FileReader:
    """The file part of the loader: needs ``self.root``, ``self.errors``, ``self.sources``,
    ``self.files``, ``self.blocks``, ``self.included`` and ``self.stopped``."""

    def read_items(self, text: str, shown: str, stack: tuple[Path, ...]) -> list:
        """The statements and block definitions of one file's text, its includes read in their
        place; errors go to ``self.errors``."""
        if not self._within_limits(text, shown):
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

    def _within_limits(self, text: str, shown: str) -> bool:
        """Whether the text is within the size limits (else a LimitError); its lines are kept for
        the errors' source lines."""
        if len(text) > LIMITS["file_bytes"]:
            self.errors.append(
                LimitError(
                    f"plan text is over the limit of {LIMITS['file_bytes']} bytes",
                    Location(shown, 1, 1),
                    "split it with include",
                )
            )
            return False
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
                return False
        return True

    def include(self, st: Statement, shown: str, stack: tuple[Path, ...]) -> list:
        """The items of the file an ``include`` statement names, or none (its error said)."""
        if self.stopped:  # a limit was reached: nothing more is read
            return []
        if len(st.phrases) != 1 or len(st.phrases[0]) != 1 or st.phrases[0][0].kind != "string":
            self.errors.append(
                PlanError("include takes one quoted path", st.loc, 'e.g. include "supply.gplan"')
            )
            return []
        item = st.phrases[0][0]
        if not self._may_read(item, stack):
            return []
        target = self._include_target(item, stack)
        if target is None:
            return []
        try:
            text = read_plan_file(target, self._shown(target))
        except PlanErrors as e:
            self.errors.extend(e.errors)
            return []
        return self.read_items(text, self._shown(target), stack + (target,))

    def _shown(self, target: Path) -> str:
        """An included file's name as its findings and errors show it: beside the main plan as the
        user named it (``plan/psu.gplan`` for ``plan/mixer.gplan``), so that the name leads to the
        file from where the command ran; relative to the plan's folder for a plan read as text."""
        rel = target.relative_to(self.root)
        shown_root = getattr(self, "shown_root", None)
        return str(rel) if shown_root is None else str(shown_root / rel)

    def _may_read(self, item, stack: tuple[Path, ...]) -> bool:
        """Whether one more include is within the depth limit and the count of files read."""
        if len(stack) >= LIMITS["include_depth"]:
            self.errors.append(
                LimitError(
                    f"includes nested deeper than {LIMITS['include_depth']}",
                    item.loc,
                    "flatten the includes",
                )
            )
            return False
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
            return False
        return True

    def _include_target(self, item, stack: tuple[Path, ...]) -> Path | None:
        """The file an include names, resolved: a regular file inside the main plan's folder, not
        one of the files including it; else None (the error said)."""
        here = stack[-1].parent if stack else self.root
        value, loc = item.value, item.loc
        if Path(value).is_absolute():
            self.errors.append(
                PlanError(
                    f"include {value!r} is an absolute path, outside the plan's folder",
                    loc,
                    "write a path relative to the including file, inside the plan's folder",
                )
            )
            return None
        try:
            target = (here / value).resolve()
        except (RuntimeError, OSError):  # a link in a loop leads to no file
            self.errors.append(
                PlanError(f"include {value!r} is a link in a loop", loc, "name the file")
            )
            return None
        try:
            target.relative_to(self.root)
        except ValueError:
            self.errors.append(
                PlanError(
                    f"include {value!r} lies outside the plan's folder",
                    loc,
                    "includes are confined to the folder of the main plan and below",
                )
            )
            return None
        if target in stack:
            chain = " -> ".join(p.name for p in stack + (target,))
            self.errors.append(
                PlanError(
                    f"include cycle: {chain}", loc, "a plan cannot include itself, directly or not"
                )
            )
            return None
        if not target.is_file():
            self.errors.append(
                PlanError(f"included file {value!r} not found", loc, f"looked for {target}")
            )
            return None
        return target
