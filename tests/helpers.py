"""Helpers shared by the tests (imported as ``helpers``)."""

from __future__ import annotations

import functools
import os
import zlib
import shutil
import textwrap
from pathlib import Path

import pytest

from groundcheck import load_text

ROOT = Path(__file__).resolve().parent.parent
EXAMPLES = sorted((ROOT / "examples").glob("*.gplan"))

needs_ngspice = pytest.mark.skipif(
    shutil.which("ngspice") is None,
    reason="ngspice is not installed (Debian package 'ngspice'; .ci/run installs it)",
)

HEADER = """plan "test"
mains 230 V 50 Hz, fuse 2 A slow, breaking high, line-conductor 0.75 mm2
"""


def plan(text: str, header: bool = True, name: str = "t.gplan"):
    """A plan from inline text (with a mains header unless ``header`` is False)."""
    body = textwrap.dedent(text)
    return load_text((HEADER if header else "") + body, name)


#: the tests that read a bundled or field plan's analysis with the default settings and only read
#: it (its report's tables, its drawings) run in one process (``xdist_group(SHARED_ANALYSIS)``),
#: so each plan is analysed once per suite
SHARED_ANALYSIS = "html-tables"


@functools.lru_cache(maxsize=None)
def analysed(path):
    """The analysis of the plan at ``path`` with the default settings, once per test process (the
    result is shared: read it, never change it)."""
    from groundcheck import analyze, load

    return analyze(load(path))


#: the checks that sweep the field corpus (the report's tables, the drawings' overlaps, the
#: advisor's promises) read about an eighth of its folders in the suite, each chosen by its own
#: name (its CRC-32 modulo CORPUS_STEP is CORPUS_SEAT: a folder added never moves the others in or
#: out, as a stride over the sorted names did, onto heavier ones), and every folder with
#: GROUNDCHECK_WHOLE_CORPUS=1 (benchmarks/README.md), which also runs the slower variants of a few
#: checks (every example in a browser, Ctrl-C as well as SIGTERM to a run): each plan costs 1-3 s
#: of analysis and drawing, the corpus grows with every outside build, and each folder's own tests
#: read its plans whatever the sample
WHOLE_CORPUS = os.environ.get("GROUNDCHECK_WHOLE_CORPUS") == "1"
CORPUS_STEP = 8
CORPUS_SEAT = 7


def corpus_sample(paths) -> list[Path]:
    """``paths`` (plans of the field corpus, or any others) with those of the field folders
    outside the sample left out, unless the whole corpus is asked for."""
    folders = sorted(p.name for p in (ROOT / "tests" / "field").iterdir() if p.is_dir())
    kept = {
        f for f in folders if WHOLE_CORPUS or zlib.crc32(f.encode()) % CORPUS_STEP == CORPUS_SEAT
    }
    field = ROOT / "tests" / "field"
    return [p for p in paths if field not in p.parents or p.relative_to(field).parts[0] in kept]


def not_included(paths) -> list[Path]:
    """``paths`` without the include fragments among them: a file another plan of its folder
    names in an ``include`` statement is read as part of that plan, not alone (it names points the
    plan defines)."""
    out = []
    for p in paths:
        others = [q for q in p.parent.glob("*.gplan") if q != p]
        if not any(f'include "{p.name}"' in q.read_text(encoding="utf-8") for q in others):
            out.append(p)
    return out


def field_rooms() -> list[Path]:
    """The field corpus's plans that no other plan of their folder places as a device: each
    folder's rooms and lone plans.  A device's own plan is analysed inside its room (its findings,
    tables and figures are the room's too), so the renderers' checks over the corpus read the
    rooms; the sweep and each folder's own tests read the device plans."""
    out = []
    for folder in sorted((ROOT / "tests" / "field").iterdir()):
        plans = sorted(folder.glob("*.gplan"))
        texts = {p: p.read_text(encoding="utf-8") for p in plans}
        placed = {q.name for q in plans for t in texts.values() if f'"{q.name}"' in t}
        out += [p for p in plans if p.name not in placed]
    return out
