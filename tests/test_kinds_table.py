"""The kinds table is the one place a conductor kind's behaviour is decided.

The acceptance check of issue 30: a new fastening kind, written as one row identical to
``bolt``, and the guitar head's bolts rewritten with it, change no figure, no finding and no
suggestion."""

from __future__ import annotations

import dataclasses
import json
import re

import pytest

from groundcheck import analyze, load_text, render
from groundcheck.advice.repair import suggest
from groundcheck.analysis import Options
from groundcheck.model import kinds as kinds_table
from groundcheck.model.kinds import KINDS, ROLES
from groundcheck.renderers.dotbase import ROLE_STYLE
from helpers import ROOT

HEAD = ROOT / "examples" / "guitar-head.gplan"


def _rewritten(text: str, old: str, new: str) -> str:
    lines = [
        new + line[len(old) :] if line.startswith(old + " ") else line
        for line in text.splitlines()
    ]
    return "\n".join(lines) + "\n"


def _everything(text: str):
    """The JSON document and the ranked suggestions (title, rejection, predicted figures) of a
    plan."""
    plan = load_text(text, str(HEAD))
    result = analyze(plan)
    _, evs = suggest(plan, text, Options(), HEAD.parent, HEAD)
    doc = json.loads(render(result, "json"))
    ranked = [(e.candidate.title, e.rejected, e.rank_key()) for e in evs]
    return doc, ranked


def test_a_new_fastening_kind_is_one_row_and_changes_no_figure(monkeypatch):
    text = HEAD.read_text(encoding="utf-8")
    assert text.count("\nbolt ") == 4  # the example's four fastenings
    before = _everything(text)
    monkeypatch.setitem(KINDS, "rivet", dataclasses.replace(KINDS["bolt"], name="rivet"))
    rewritten = _rewritten(text, "bolt", "rivet")
    assert "\nbolt " not in rewritten and rewritten.count("\nrivet ") == 4
    after = _everything(rewritten)
    assert after[0] == before[0]  # every figure and finding
    assert after[1] == before[1]  # every suggestion, in the same order
    # the chassis's protective path holds the lead pe_lead (25 mm of 1 mm² copper: ρL/A with
    # IEC 60028's annealed copper, 1/58 Ω·mm²/m at 20 °C, by hand 0.431 mΩ) and pe_nut's default
    # contact (0.5 mΩ, the bolt's row): a new kind that did not take the default would leave it
    # out (0.78 mΩ, issue 30)
    lead = (1 / 58) * 0.025 / 1.0  # Ω·mm²/m × m / mm² = Ω
    for doc, _ in (before, after):
        chassis = next(p for p in doc["protective_earth"]["parts"] if p["part"] == "chassis")
        assert chassis["path_resistance_ohm"] >= lead + 0.5e-3


def test_without_its_row_the_new_kind_is_an_unknown_keyword():
    """The row is what makes the keyword: without it the reader refuses the plan with a hint."""
    text = _rewritten(HEAD.read_text(encoding="utf-8"), "bolt", "rivet")
    with pytest.raises(Exception, match="unknown keyword 'rivet'"):
        load_text(text, str(HEAD))


def test_kind_defaults_and_own_attributes_come_from_the_row(monkeypatch):
    """Per-kind defaults (contact, copper thickness) and the attribute words a kind owns are read
    from its row."""
    monkeypatch.setitem(
        KINDS, "clip", dataclasses.replace(KINDS["bolt"], name="clip", contact=2e-3)
    )
    monkeypatch.setitem(
        KINDS, "foil", dataclasses.replace(KINDS["trace"], name="foil", thickness=70e-6)
    )
    plan = load_text(
        "metal m: steel 1 mm, 100 x 100 mm\npoint p: stud, at 10,10 on m\npoint q: star, at "
        "50,10\nclip c: p to m\nfoil f: p to q, 40 mm, width 2 mm\n",
        "t.gplan",
    )
    got = {c.name: c for c in plan.conductors}
    assert got["c"].contact == 2e-3 and got["f"].thickness == 70e-6
    assert kinds_table.owners()["load"] == ("cable",)
    monkeypatch.setitem(KINDS, "feeder", dataclasses.replace(KINDS["cable"], name="feeder"))
    assert kinds_table.owners()["load"] == ("cable", "feeder")


def test_every_role_has_a_drawing_style():
    assert set(ROLE_STYLE) == set(ROLES)


def test_every_kind_has_its_row_in_the_language_reference():
    """Each row of the kinds table is a keyword the reference documents: the first cell of a table
    row names it (the conductor table, or the installation's for a building `cable` and an
    umbilical's `core`)."""
    text = (ROOT / "docs" / "language.md").read_text(encoding="utf-8")
    cells = [re.split(r"(?<!\\)\|", row)[1] for row in text.splitlines() if row.startswith("| `")]
    missing = [
        k for k in KINDS if not any(re.search(rf"`{re.escape(k)}( [^`]*)?`", c) for c in cells)
    ]
    assert not missing, missing
