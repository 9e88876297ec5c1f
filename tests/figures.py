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
    return _Canon(loops, rename, SKIP | set(skip)).walk(obj)[0]


class _Canon:
    """One walk of a result: each node returned with its words (numbers left out), its numbers
    rounded to 7 significant digits, and the two as sort keys (text), built once from its
    children's, which order the lists (a list is compared as a sorted collection, ordered by its
    words first): a parent's key is its children's keys joined, so no level writes out its whole
    subtree again."""

    def __init__(self, loops, rename, skip):
        self.loops, self.rename, self.skip = loops, rename, skip

    def walk(self, x):
        if isinstance(x, bool) or x is None:
            r = repr(x)
            return x, r, x, r, r
        if isinstance(x, (int, float, np.floating, np.integer)):
            r = _rounded(float(x))
            return float(x), "", r, "''", repr(r)
        if isinstance(x, (complex, np.complexfloating)):
            re_, im = float(x.real), float(x.imag)
            rr = ("complex", _rounded(re_), _rounded(im))
            return (("complex", re_, im), ("complex", "", ""), rr, "complex''", repr(rr))
        if isinstance(x, str):
            m = _LOOP.match(x)
            if m and 0 < int(m[1]) <= len(self.loops):
                names = tuple(sorted(self.rename(e) for e in self.loops[int(m[1]) - 1]))
                node = ("loop", names)
                k = repr(node)
                return node, node, node, k, k
            r = self.rename(x)
            k = repr(r)
            return r, r, r, k, k
        if isinstance(x, np.ndarray):
            if x.dtype.kind not in "iuf":
                return self._seq([self.walk(v) for v in x.ravel()], None)
            return _array(x)
        if dataclasses.is_dataclass(x):
            parts = [
                (f.name, self.walk(getattr(x, f.name)))
                for f in dataclasses.fields(x)
                if f.name not in self.skip
            ]
            return (
                tuple((n, p[0]) for n, p in parts),
                tuple((n, p[1]) for n, p in parts),
                tuple((n, p[2]) for n, p in parts),
                "(" + ",".join(f"{n}:{p[3]}" for n, p in parts) + ")",
                "(" + ",".join(f"{n}:{p[4]}" for n, p in parts) + ")",
            )
        if isinstance(x, dict):
            items = []
            for k, v in x.items():
                if k in self.skip:
                    continue
                kk = self.walk(k)
                vv = self.walk(f"loop {v}" if k == "loop" and isinstance(v, int) else v)
                items.append(
                    (
                        (kk[0], vv[0]),
                        (kk[1], vv[1]),
                        (kk[2], vv[2]),
                        f"{kk[3]}={vv[3]}",
                        f"{kk[4]}={vv[4]}",
                    )
                )
            return self._seq(items, "dict")
        if isinstance(x, (list, tuple, set, frozenset)):
            return self._seq([self.walk(v) for v in x], "list")
        name = ("object", type(x).__name__)
        k = repr(name)
        return name, name, name, k, k

    @staticmethod
    def _seq(parts, tag):
        """A sequence of walked nodes: as it stands (``tag`` None), or sorted and tagged."""
        if tag is not None:
            parts = sorted(parts, key=lambda p: (p[3], p[4]))
        nodes = tuple(p[0] for p in parts)
        words = tuple(p[1] for p in parts)
        rounded = tuple(p[2] for p in parts)
        kw = "[" + ",".join(p[3] for p in parts) + "]"
        kr = "[" + ",".join(p[4] for p in parts) + "]"
        if tag is None:
            return nodes, words, rounded, kw, kr
        return (tag, nodes), (tag, words), (tag, rounded), tag + kw, tag + kr


def _array(x):
    """A numeric array's node, words and rounded numbers at once (numpy rounds them as
    :func:`_rounded` does one number: to 7 significant digits)."""
    a = x.ravel().astype(float)
    r = a.copy()
    ok = np.isfinite(a) & (a != 0)
    digits = 6 - np.floor(np.log10(np.abs(a[ok])))
    r[ok] = np.round(a[ok] * 10.0**digits) / 10.0**digits
    rounded = tuple(r.tolist())
    return tuple(a.tolist()), ("",) * len(a), rounded, "''" * len(a), repr(rounded)


def _rounded(x):
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
    if len(out) >= limit or a == b:  # equal as they stand (compared in C): nothing to find
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
