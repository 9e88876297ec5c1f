"""One large flat plan file read by two processes.

A plan file of tens of thousands of lines (a generated installation, a CAD
export) spends most of its load time in work that is the same for every
statement: lexing, reading attributes, building records.  With ``jobs`` > 1
the file is cut at a statement boundary; a forked worker parses and builds
the records of the second part while this process does the first, then sends
them back as plain tuples, marshalled (much cheaper than pickling the records).
Names are resolved and checked afterwards on the whole plan, as always, so
the plan and every error message are the same as a one-process load
(``tests/test_bigfile.py`` compares them).

Only flat files are split: a file with blocks, placements, includes, devices,
transformers or library folders is read whole (those need the whole file's context).
"""

from __future__ import annotations

import dataclasses
import marshal
import multiprocessing
import operator
import os
import re

from ..core.errors import LimitError, Location, PlanError
from ..model.records import (
    Conductor,
    Current,
    FieldSource,
    Heater,
    Listening,
    Mains,
    Metal,
    Point,
    Rectifier,
    Stage,
    from_values,
)
from .phrases import Statement
from .syntax import HEAD
from ..core.runtime import quiet_child

__all__ = ["split_point", "MIN_LINES"]

#: a file with fewer lines is read in one process (forking and packing cost more than they save)
MIN_LINES = 30_000

#: the share of the lines the worker reads: well under half, as it also packs its results (measured
#: best)
WORKER_SHARE = 0.38

#: statements that need the whole file's context: a file holding any of them is read whole
_STRUCTURE = re.compile(r"(?m)^[ \t]*(?:block|place|include|device|library|transformer)\b")


_RECORDS = {
    cls.__name__: cls
    for cls in (
        Conductor,
        Point,
        Metal,
        Rectifier,
        Current,
        Heater,
        Stage,
        FieldSource,
        Mains,
        Listening,
    )
}
_FIELDS = {name: tuple(f.name for f in dataclasses.fields(cls)) for name, cls in _RECORDS.items()}
_GETTERS = {name: operator.attrgetter(*fields) for name, fields in _FIELDS.items()}
_LOCATION_AT = {name: fields.index("location") for name, fields in _FIELDS.items()}


def split_point(text: str, min_lines: int | None = None) -> int | None:
    """The 0-based line where the worker's part starts, or None when the file is best read
    whole."""
    lines = text.count("\n") + 1
    if lines < (MIN_LINES if min_lines is None else min_lines) or _STRUCTURE.search(text):
        return None
    rows = text.split("\n")
    start = max(1, int(len(rows) * (1 - WORKER_SHARE)))
    for i in range(start, min(len(rows), start + 2000)):
        # a statement carries on to the next line only after a trailing comma
        if HEAD.match(rows[i]) and not rows[i - 1].rstrip(" \t\r").endswith(","):
            return i
    return None


# ---- the worker -----------------------------------------------------------------


def _pack(built: list, ld) -> bytes:
    """The built statements as plain tuples (locations as (file, line, column)), marshalled:
    several times cheaper than pickling the records and their locations."""
    rows = []
    getters, where = _GETTERS, _LOCATION_AT
    for st, record, refs in built:
        kind = type(record).__name__
        get = getters.get(kind)
        if get is None:
            values = record
        else:
            values = get(record)
            k = where[kind]
            values = values[:k] + (tuple(values[k]),) + values[k + 1 :]
        lloc = st.label_loc
        rows.append(
            (
                st.keyword,
                tuple(st.loc),
                st.label,
                None if lloc is None else tuple(lloc),
                kind,
                values,
                tuple((k, tuple(v)) for k, v in refs.items()),
            )
        )
    errors = [(type(e) is LimitError, e.message, tuple(e.location), e.hint) for e in ld.errors]
    return marshal.dumps((rows, errors, sorted(ld.broken), ld.count))


def _worker(conn, loader, transform, text: str, file: str, first_line: int) -> None:
    quiet_child()
    try:
        ld = loader
        # blank lines in front keep the line numbers of the whole file
        items = ld.read_items("\n" * first_line + text, file, ())
        built: list = []
        ld.expand(items, "", transform, (), 0, (), built)
        conn.send_bytes(_pack(built, ld))
    except (
        BaseException
    ) as e:  # pragma: no cover - reported by the parent, which then reads the part itself
        conn.send_bytes(marshal.dumps(repr(e)))
    conn.close()
    os._exit(0)  # no interpreter teardown: freeing the inherited heap object by object takes long


# ---- the parent -----------------------------------------------------------------


def _unpack(data: bytes, ld) -> list | None:
    payload = marshal.loads(data)
    if isinstance(payload, str):  # the worker failed: read its part here instead
        return None
    rows, errors, broken, count = payload
    new = tuple.__new__
    built = []
    for keyword, loc, label, label_loc, kind, values, refs in rows:
        st = Statement(
            keyword,
            new(Location, loc),
            label,
            None if label_loc is None else new(Location, label_loc),
        )
        if kind in _FIELDS:
            k = _LOCATION_AT[kind]
            record = from_values(
                _RECORDS[kind],
                _FIELDS[kind],
                values[:k] + (new(Location, values[k]),) + values[k + 1 :],
            )
        else:
            record = values  # a header value (the plan's title or ambient temperature)
        built.append((st, record, {name: new(Location, where) for name, where in refs}))
    for is_limit, message, where, hint in errors:
        ld.errors.append((LimitError if is_limit else PlanError)(message, Location(*where), hint))
    ld.broken.update(broken)
    ld.count += count
    return built


def read_split(ld, text: str, file: str, at: int, fresh_loader, Transform, limit: int) -> list:
    """Parse and build a flat file in two processes: the lines before ``at`` here, the rest in a
    forked worker.  Returns the built ``(statement, record, refs)`` list in file order, as
    ``_Loader.expand`` does for the whole file; errors, broken names and the element count are
    merged into ``ld``. ``Transform`` is the loader's placement class and ``limit`` its element
    limit (passed in, so that this module does not import the loader back)."""

    rows = text.split("\n")
    head, tail = "\n".join(rows[:at]) + "\n", "\n".join(rows[at:])
    ctx = multiprocessing.get_context("fork")
    receive, send = ctx.Pipe(duplex=False)
    proc = ctx.Process(
        target=_worker, args=(send, fresh_loader, Transform(), tail, file, at), daemon=True
    )
    try:
        proc.start()
    except OSError:  # no process could be started (a process limit): the tail is read here
        proc = None
    send.close()
    items = ld.read_items(head, file, ())
    built: list = []
    ld.expand(items, "", Transform(), (), 0, (), built)
    try:
        data = receive.recv_bytes() if proc is not None else marshal.dumps("no worker")
    except EOFError:  # the worker died without a word: the tail is read here
        data = marshal.dumps("no answer")
    if proc is not None:
        proc.join()
    rest = _unpack(data, ld)
    if rest is None:  # pragma: no cover - see _worker
        other = fresh_loader
        items = other.read_items("\n" * at + tail, file, ())
        rest = []
        other.expand(items, "", Transform(), (), 0, (), rest)
        ld.errors.extend(other.errors)
        ld.broken |= other.broken
        ld.count += other.count
    ld.sources[file] = rows
    if ld.count > limit:
        ld.errors.append(
            LimitError(
                f"plan expands to more than {limit} elements",
                Location(file, 1, 1),
                "split the installation into several plans",
            )
        )
    return built + rest
