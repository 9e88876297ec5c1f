"""Every figure and finding of an analysis result as one canonical structure, for the invariant
properties (tests/test_invariants.py): two results are alike when the structures have the same
shape and words and their numbers agree to 1e-9 relative (with a floor far below any figure
printed).

Where a statement stands is no figure (its location, a finding's sentence that quotes its line),
and neither is the order of a list: lists are compared as sorted collections. A listed loop named
``loop N`` is replaced by the set of its conductors, since the numbering follows the listing."""

from __future__ import annotations

import dataclasses
import math
import re

import numpy as np

REL, FLOOR = 1e-9, 1e-15

#: fields that say where or how something is written, or what was asked, not what was found
SKIP = {
    "location",
    "stage_location",
    "plan",
    "circuit",
    "options",
    "message",
    "fix",
    "notices",
    "polygon",
    "parent",
    "path",
    "not_checked",
    "accepted",
    "chord",  # a loop's walk: its members are compared as sets
    "lines",
}  # each contributor's raw phasors (a bench fit's input): compared as the contributors
_LOOP = re.compile(r"^loop (\d+)$")


def canonical(obj, loops=(), rename=lambda s: s, skip=frozenset()):
    """``obj`` (a result or any part of one) as nested tuples of words and numbers; fields and
    keys in :data:`SKIP` and in ``skip`` left out."""
    skip = SKIP | set(skip)

    def walk(x):
        if isinstance(x, bool) or x is None:
            return x
        if isinstance(x, (int, float, np.floating, np.integer)):
            return float(x)
        if isinstance(x, (complex, np.complexfloating)):
            return ("complex", float(x.real), float(x.imag))
        if isinstance(x, str):
            m = _LOOP.match(x)
            if m and 0 < int(m[1]) <= len(loops):
                return ("loop", tuple(sorted(rename(e) for e in loops[int(m[1]) - 1])))
            return rename(x)
        if isinstance(x, np.ndarray):
            return tuple(walk(v) for v in x.ravel())
        if dataclasses.is_dataclass(x):
            return tuple(
                (f.name, walk(getattr(x, f.name)))
                for f in dataclasses.fields(x)
                if f.name not in skip
            )
        if isinstance(x, dict):
            items = [
                (walk(k), walk(f"loop {v}" if k == "loop" and isinstance(v, int) else v))
                for k, v in x.items()
                if k not in skip
            ]
            return ("dict", tuple(sorted(items, key=_order)))
        if isinstance(x, (list, tuple, set, frozenset)):
            return ("list", tuple(sorted((walk(v) for v in x), key=_order)))
        return ("object", type(x).__name__)

    return walk(obj)


def _words(x):
    """The words of a canonical structure, numbers left out (what orders a list)."""
    if isinstance(x, tuple):
        return tuple(_words(v) for v in x)
    return "" if isinstance(x, float) else (x if isinstance(x, str) else repr(x))


def _order(x):
    return (repr(_words(x)), repr(_rounded(x)))


def _rounded(x):
    if isinstance(x, tuple):
        return tuple(_rounded(v) for v in x)
    if isinstance(x, float) and math.isfinite(x) and x:
        return round(x, 6 - int(math.floor(math.log10(abs(x)))))
    return x


def close(a: float, b: float) -> bool:
    if not (math.isfinite(a) and math.isfinite(b)):
        return a == b or (math.isnan(a) and math.isnan(b))
    return abs(a - b) <= REL * max(abs(a), abs(b)) + FLOOR


def differences(a, b, where="", out=None, limit=8) -> list[str]:
    """Where two canonical structures differ (at most ``limit`` places)."""
    out = [] if out is None else out
    if len(out) >= limit:
        return out
    if isinstance(a, float) and isinstance(b, float):
        if not close(a, b):
            out.append(f"{where}: {a!r} != {b!r}")
    elif isinstance(a, tuple) and isinstance(b, tuple) and len(a) == len(b):
        for i, (x, y) in enumerate(zip(a, b)):
            label = x[0] if isinstance(x, tuple) and x and isinstance(x[0], str) else i
            differences(x, y, f"{where}/{label}", out, limit)
    elif a != b:
        out.append(f"{where}: {str(a)[:300]} != {str(b)[:300]}")
    return out


def result_figures(result, rename=lambda s: s, skip=frozenset()):
    """Everything an analysis found and computed, canonical (see :func:`canonical`; ``skip``: more
    fields and keys to leave out)."""
    loops = [info.loop.edges for info in result.loops]
    keep = (
        "findings",
        "loops",
        "loop_total",
        "safety",
        "hum",
        "coupling",
        "device_earths",
        "protective",
        "rectifiers",
        "outlets",
        "bonding",
    )
    return tuple((k, canonical(getattr(result, k), loops, rename, skip)) for k in keep)
