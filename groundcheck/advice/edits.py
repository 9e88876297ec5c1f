"""Edits of a plan's text, placed by the parser's own spans (never a second reading of the text).

:class:`PlanText` parses the main plan file once with the language's parser and finds each
statement, its lines (a statement may continue over several) and the exact column of each item, so
that an edit replaces just the words it means to, wherever the statement is written.  :class:`Edit`
replaces a range of lines; :func:`apply_edits` applies several, and :func:`text_diff` shows them as
a unified diff.
"""

from __future__ import annotations

import dataclasses
import difflib
import os
import re
from dataclasses import dataclass
from pathlib import Path

from ..language.phrases import Item, Statement
from ..language.syntax import parse_text

__all__ = [
    "Edit",
    "squeeze",
    "apply_edits",
    "edited_texts",
    "file_text",
    "shown_path",
    "text_diff",
    "unified_diff",
    "PlanText",
    "PlanTexts",
    "REMOVED_MARK",
]

#: the note a statement commented out by the advisor carries
REMOVED_MARK = "# removed by groundcheck suggest"


@dataclass(frozen=True)
class Edit:
    """Replace lines ``line`` to ``last`` (1-based; ``last`` None: that one line) of a plan file by
    ``new``; ``new`` None comments them out; ``extra`` lines are added after them.  ``file`` None
    is the main plan file; otherwise the path of a device's own plan (its edits are shown and
    written apart, never in place)."""

    line: int
    new: str | None
    extra: tuple[str, ...] = ()
    last: int | None = None
    file: str | None = None


def apply_edits(text: str, edits, file: str | None = None) -> str:
    """The text of the main plan (``file`` None) or of the device plan ``file`` with its edits
    applied."""
    lines = text.split("\n")
    out = list(lines)
    for e in sorted((e for e in edits if e.file == file), key=lambda e: -e.line):
        i, j = e.line - 1, (e.last or e.line)
        old = lines[i:j]
        indent = old[0][: len(old[0]) - len(old[0].lstrip())]
        if e.new is None:
            new = [f"{x[: len(x) - len(x.lstrip())]}# {x.strip()}" for x in old]
            new[-1] += f"   {REMOVED_MARK}"
        else:
            new = [e.new]
        out[i:j] = new + [indent + x for x in e.extra]
    return "\n".join(out)


def text_diff(old: str, new: str, name: str) -> str:
    """A unified diff of a plan file's text (paths a/NAME and b/NAME, one line of context)."""
    return "".join(difflib.unified_diff(_lines(old), _lines(new), f"a/{name}", f"b/{name}", n=1))


def _lines(text: str) -> list[str]:
    """Lines as the parser counts them: split at newlines only (a lone carriage return stays inside
    its line)."""
    parts = text.split("\n")
    out = [x + "\n" for x in parts[:-1]]
    return out + [parts[-1]] if parts[-1] else out


def file_text(file: str) -> str:
    """A plan file's text as the loader reads it (UTF-8, no newline translation, no byte-order
    mark)."""
    return Path(file).read_bytes().decode("utf-8", "replace").lstrip("\ufeff")


def edited_texts(edits) -> dict[str, str]:
    """Each device plan that ``edits`` change -> its text with them applied."""
    files = sorted({e.file for e in edits if e.file is not None})
    return {f: apply_edits(file_text(f), edits, f) for f in files}


def shown_path(file: str, base: str | Path | None = None) -> str:
    """A device plan's path as a diff shows it: relative to ``base`` (the main plan's folder) or to
    the current folder when below it, else as it is."""
    for folder in (base, os.getcwd()):
        if folder is None:
            continue
        try:
            rel = os.path.relpath(file, folder)
        except ValueError:  # another drive
            continue
        if not rel.startswith(".."):
            return rel
    return file


def unified_diff(text: str, edits, name: str, base: str | Path | None = None) -> str:
    """The main plan's diff, then one diff for each device plan the edits change (paths relative to
    ``base``)."""
    out = text_diff(text, apply_edits(text, edits), name)
    for f, new in edited_texts(edits).items():
        out += text_diff(file_text(f), new, shown_path(f, base))
    return out


_QTY_SPAN = re.compile(r"[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?[ \t]*[^\s,#]*")


class PlanText:
    """A plan file's text with its statements, as the parser read them."""

    def __init__(self, text: str, file: str):
        self.text = text
        self.lines = text.split("\n")
        errors: list = []
        top, _ = parse_text(text, file, errors)
        self.by_line: dict[int, Statement] = {}
        self.block_of: dict[int, str] = {}
        for entry in top:
            if isinstance(entry, tuple):
                for st in entry[1].body:
                    self.by_line[st.loc.line] = st
                    self.block_of[st.loc.line] = entry[1].name
            else:
                self.by_line[entry.loc.line] = entry

    def statement(self, line: int) -> Statement | None:
        """The statement that starts on ``line``."""
        return self.by_line.get(line)

    @staticmethod
    def last_line(st: Statement) -> int:
        return max((it.loc.line for ph in st.phrases for it in ph), default=st.loc.line)

    def delete(self, st: Statement) -> Edit:
        """Comment the whole statement out (every line it spans)."""
        return Edit(st.loc.line, None, (), self.last_line(st))

    def span(self, it: Item) -> tuple[int, int, int]:
        """(line, start, end) of an item in the text: 0-based columns, end exclusive."""
        line = self.lines[it.loc.line - 1]
        start = it.loc.column - 1
        if it.kind == "qty":
            m = _QTY_SPAN.match(line, start)
            end = m.end() if m else start + len(it.text)
        elif it.kind == "string" and line[start : start + 1] == '"':
            end = line.index('"', start + 1) + 1  # the quotes belong to the item
        else:
            end = start + len(it.text)
        return it.loc.line, start, end

    def replace(
        self, st: Statement, changes: list[tuple[Item, str]], drop_comment: bool = False
    ) -> Edit:
        """Replace items of a statement by new texts (several on one line are fine); the
        statement's lines are rewritten, and with ``drop_comment`` their trailing comments go (they
        may describe the old)."""
        first, last = st.loc.line, self.last_line(st)
        rows = {n: self.lines[n - 1] for n in range(first, last + 1)}
        for it, new in sorted(changes, key=lambda c: (-c[0].loc.line, -c[0].loc.column)):
            n, a, b = self.span(it)
            rows[n] = rows[n][:a] + new + rows[n][b:]
        if drop_comment:
            rows = {n: _without_comment(r) for n, r in rows.items()}
        return Edit(first, "\n".join(rows[n] for n in range(first, last + 1)), (), last)

    @staticmethod
    def ends(st: Statement) -> tuple[Item, Item] | None:
        """The two end items of a conductor statement's first phrase (``A to B``)."""
        ph = st.phrases[0] if st.phrases else []
        if len(ph) == 3 and ph[1].kind == "word" and ph[1].value == "to":
            return ph[0], ph[2]
        return None

    @staticmethod
    def find(st: Statement, *words: str) -> list[Item] | None:
        """The items of the phrase that starts with the given words (e.g. ``terminated``,
        ``both``)."""
        for ph in st.phrases:
            if len(ph) >= len(words) and all(
                it.kind == "word" and it.value == w for it, w in zip(ph, words)
            ):
                return ph
        return None

    @staticmethod
    def quantity(st: Statement, kind: str) -> Item | None:
        """The first item of a statement that is a quantity of ``kind`` (length, area, ...), or an
        AWG size."""
        for ph in st.phrases[1:]:
            for it in ph:
                if it.kind == "qty" and it.qkind == kind:
                    return it
        return None


class PlanTexts:
    """The main plan file's :class:`PlanText` and, read when first needed, those of device plans:
    each edit is placed in the file its statement was written in."""

    def __init__(self, text: str, file: str):
        self.main = PlanText(text, file)
        self.file = file
        self.lines = self.main.lines
        self.others: dict[str, PlanText] = {}
        self.ends, self.find, self.quantity, self.last_line = (
            PlanText.ends,
            PlanText.find,
            PlanText.quantity,
            PlanText.last_line,
        )

    def statement(self, line: int, file: str | None = None) -> Statement | None:
        """The statement that starts on ``line`` of the main plan, or of the device plan
        ``file``."""
        if file is None or file == self.file:
            return self.main.statement(line)
        if file not in self.others:
            try:
                self.others[file] = PlanText(file_text(file), file)
            except OSError:
                return None
        return self.others[file].statement(line)

    def lines_of(self, file: str) -> list[str]:
        """The lines of the main plan or of a device plan already read."""
        return self._of(file)[0].lines

    def _of(self, file: str) -> tuple[PlanText, str | None]:
        return (self.main, None) if file == self.file else (self.others[file], file)

    def delete(self, st: Statement) -> Edit:
        pt, f = self._of(st.loc.file)
        return dataclasses.replace(pt.delete(st), file=f)

    def replace(
        self, st: Statement, changes: list[tuple[Item, str]], drop_comment: bool = False
    ) -> Edit:
        pt, f = self._of(st.loc.file)
        return dataclasses.replace(pt.replace(st, changes, drop_comment), file=f)

    def span(self, it: Item) -> tuple[int, int, int]:
        return self._of(it.loc.file)[0].span(it)


def _without_comment(row: str) -> str:
    """A line without its trailing comment (a ``#`` outside a quoted string)."""
    quoted = False
    for i, ch in enumerate(row):
        if ch == '"':
            quoted = not quoted
        elif ch == "#" and not quoted:
            return row[:i].rstrip()
    return row


def direct_includes(plan, src: "PlanTexts") -> dict[str, object]:
    """The files the main plan's own ``include`` statements name, as the loader shows them (beside
    the main plan as it was named) -> the statement; none for a plan read as text.

    Parameters:
        plan: the plan.
        src: its texts.
    Returns:
        shown file name -> its include statement in the main plan.
    References:
        none (bookkeeping).
    """
    main = Path(plan.file)
    if not main.is_file():
        return {}
    root, out = main.resolve().parent, {}
    for st in src.main.by_line.values():
        if st.keyword != "include" or not st.phrases or st.phrases[0][0].kind != "string":
            continue
        try:
            rel = (root / st.phrases[0][0].value).resolve().relative_to(root)
        except (ValueError, OSError, RuntimeError):
            continue
        if str(main.parent / rel) in plan.files:
            out[str(main.parent / rel)] = st
    return out


def squeeze(text: str, new: str) -> str:
    """Blanks left by items replaced with nothing after ``new`` are removed (``terminated a`` not
    ``terminated a  ``)."""
    i = text.find(new)
    if i < 0:
        return text
    j = i + len(new)
    k = j
    while k < len(text) and text[k] in " \t":
        k += 1
    if k == len(text) or text[k] in ",#\n":
        return text[:j] + (" " if k < len(text) and text[k] == "#" else "") + text[k:]
    return text
