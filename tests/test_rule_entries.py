"""Rules declare what follows from them: every Finding construction tied to its catalogue entry.

Each ``Finding(...)`` in the package names its code as a literal and a severity its entry lists
(``Rule.variants``); every variant an entry lists is made somewhere; each entry states its family,
what identifies a finding and its repair actions, and the advisor has a generator for each action.
These are checks of the code against the catalogue (bookkeeping; no published source applies).
"""

from __future__ import annotations

import ast
import dataclasses
import re
import types
from pathlib import Path

import pytest

from groundcheck.advice.candidates import (
    AFTER_FINDINGS,
    BEFORE_FINDINGS,
    FINDING_GENERATORS,
    answer,
)
from groundcheck.advice.fixes import identity
from groundcheck.core.errors import Location
from groundcheck.rules.catalogue import IDENTITIES, RULES, SEVERITIES, Finding
from groundcheck.rules.rule_entry import REFUSALS, entry
from groundcheck.rules.rule_families import FAMILIES, PROTECTIVE_EARTH

PACKAGE = Path(__file__).resolve().parent.parent / "groundcheck"


def _strings(node: ast.AST, scope: ast.AST, slot: int | None = None) -> set[str]:
    """The string values an expression can take: a literal, either branch of a conditional, or
    every value assigned to a name in the enclosing function (a tuple assignment by position)."""
    if isinstance(node, ast.Constant) and isinstance(node.value, str):
        return {node.value}
    if isinstance(node, ast.IfExp):
        return _strings(node.body, scope) | _strings(node.orelse, scope)
    if isinstance(node, ast.Name):
        out: set[str] = set()
        for a in ast.walk(scope):
            if not isinstance(a, ast.Assign):
                continue
            for t in a.targets:
                if isinstance(t, ast.Name) and t.id == node.id:
                    out |= _strings(a.value, scope)
                elif isinstance(t, ast.Tuple) and isinstance(a.value, ast.Tuple):
                    for i, e in enumerate(t.elts):
                        if isinstance(e, ast.Name) and e.id == node.id:
                            out |= _strings(a.value.elts[i], scope)
        return out
    raise AssertionError(
        f"a severity written as {ast.dump(node)[:80]}: name a variant of the entry"
    )


def _constructions():
    """(file:line, code, the severities the call can give) of every Finding(...) in the package
    (one walk of each module, the innermost enclosing function kept as it goes)."""
    out = []
    for path in sorted(PACKAGE.rglob("*.py")):
        text = path.read_text(encoding="utf-8")
        if "Finding(" not in text:  # (a module that constructs none: no walk)
            continue
        tree = ast.parse(text)
        rel = path.relative_to(PACKAGE)
        stack: list = [(tree, tree)]  # (node, its innermost enclosing function or the module)
        while stack:
            node, scope = stack.pop()
            if isinstance(node, (ast.FunctionDef, ast.AsyncFunctionDef)):
                scope = node
            if isinstance(node, ast.Call) and getattr(node.func, "id", "") == "Finding":
                where = f"{rel}:{node.lineno}"
                code, sev = node.args[0], node.args[1]
                assert isinstance(code, ast.Constant), f"{where}: write the code as a literal"
                out.append((where, code.value, _strings(sev, scope)))
            stack.extend((child, scope) for child in ast.iter_child_nodes(node))
    return sorted(out, key=lambda c: (c[0].split(":")[0], int(c[0].split(":")[1])))


CONSTRUCTIONS = _constructions()


def test_the_package_constructs_findings_of_most_rules():
    # the scan sees the calls (a scan that found none would pass every check below)
    assert len(CONSTRUCTIONS) >= 40
    assert len({code for _, code, _ in CONSTRUCTIONS}) >= 40


@pytest.mark.parametrize("where,code,severities", CONSTRUCTIONS, ids=[c[0] for c in CONSTRUCTIONS])
def test_every_finding_construction_names_a_variant_of_its_entry(where, code, severities):
    assert code in RULES, where
    assert severities, f"{where}: no severity found"
    assert severities <= set(RULES[code].variants), (
        f"{where}: {code} made as {sorted(severities)}; its entry lists {RULES[code].variants}"
    )


def test_every_variant_an_entry_lists_is_made_somewhere():
    made: dict[str, set[str]] = {}
    for _, code, sev in CONSTRUCTIONS:
        made.setdefault(code, set()).update(sev)
    for code, rule in RULES.items():
        assert set(rule.variants) <= made.get(code, set()), (code, rule.variants, made.get(code))


def test_the_entries_that_make_more_than_one_severity():
    # the variants the catalogue's own text describes (GC206's warning past the standard's limit,
    # GC218's one device / earthed through an interconnect / shared secondary, ...)
    several = {c: set(r.variants) for c, r in RULES.items() if len(r.variants) > 1}
    assert several == {
        "GC101": {"warning", "note"},
        "GC102": {"fault", "note"},
        "GC105": {"warning", "note"},
        "GC106": {"warning", "fault"},
        "GC202": {"fault", "danger"},
        "GC206": {"danger", "warning"},
        "GC208": {"danger", "note"},
        "GC212": {"note", "warning"},
        "GC211": {"danger", "warning"},
        "GC215": {"danger", "fault", "warning"},
        "GC218": {"danger", "warning", "note"},
        "GC221": {"note", "danger"},
        "GC223": {"fault", "danger"},
        "GC230": {"danger", "warning"},
        "GC231": {"danger", "note"},
        "GC301": {"warning", "note"},
        "GC302": {"warning", "note"},
        "GC306": {"fault", "note"},
        "GC402": {"fault", "warning"},
    }
    for code, rule in RULES.items():
        assert rule.variants[0] == rule.severity and set(rule.variants) <= set(SEVERITIES), code


def test_a_finding_of_a_severity_its_entry_does_not_list_is_refused():
    loc = Location("plan.gplan", 1, 1)
    assert Finding("GC206", "warning", "m", loc).severity == "warning"
    with pytest.raises(ValueError, match="GC101 makes no danger finding"):
        Finding("GC101", "danger", "m", loc)
    with pytest.raises(ValueError):
        Finding("GC206", "note", "m", loc)


def test_each_entry_states_a_family_numbered_as_its_word():
    # the one place a code's digits are compared with anything: the entries' stated families
    # agree with the rule words that select them (DEVELOPERS.md: 1xx topology, 2xx protective
    # earth, 3xx hum, 4xx electrical model)
    assert [f.word for f in FAMILIES] == ["GC1", "GC2", "GC3", "GC4"]
    for code, rule in RULES.items():
        assert rule.family in FAMILIES and code[:3] == rule.family.word, code
    assert RULES["GC218"].family == PROTECTIVE_EARTH and RULES["GC306"].family.name == "hum"


def test_no_module_reads_a_family_from_a_code():
    for path in PACKAGE.rglob("*.py"):
        text = path.read_text(encoding="utf-8")
        for digit in "1234":
            spellings = (f'startswith("GC{digit}', f"startswith('GC{digit}", f'[2] == "{digit}"')
            for spelled in spellings:
                assert spelled not in text, f"{path.relative_to(PACKAGE)}: {spelled}"


def test_every_repair_action_an_entry_names_has_one_generator():
    registered = [*FINDING_GENERATORS, *BEFORE_FINDINGS, *AFTER_FINDINGS]
    assert len(registered) == len(set(registered))
    named = {a for r in RULES.values() for a in r.actions}
    assert named == set(registered)
    assert RULES["GC202"].actions == ("own-stud",) and RULES["GC305"].actions == ()


def test_identity_reads_the_entry():
    loc = Location("plan.gplan", 1, 1)
    pair = [c for c, r in RULES.items() if r.identity == "pair"]
    assert set(pair) == {"GC102", "GC301", "GC302", "GC304"}  # GC304: from, into
    # a channel's audible hum is its channel, whatever contributors it names
    assert [c for c, r in RULES.items() if r.identity == "first"] == ["GC303"]
    assert {r.identity for r in RULES.values()} <= set(IDENTITIES)
    f = Finding("GC102", "fault", "m", loc, ("rect", "v1", "c2", "c1"))
    assert identity(f) == ("GC102", "rect", "v1")
    g = dataclasses.replace(f, code="GC101", severity="warning")
    assert identity(g) == ("GC101", "c1", "c2", "rect", "v1")


#: string literals of groundcheck/advice/ that may name a rule code, with the reason each must
#: remain (none today: the advisor reads every rule's repair actions and refusals from its entry)
ADVICE_CODE_ALLOWED: dict[tuple[str, str], str] = {}

_CODE = re.compile(r"GC\d")


def _docstrings(tree: ast.AST) -> set[int]:
    """The ids of the docstring constants of a module, its classes and functions."""
    out = set()
    for node in ast.walk(tree):
        body = getattr(node, "body", None)
        if isinstance(body, list) and body and isinstance(body[0], ast.Expr):
            value = body[0].value
            if isinstance(value, ast.Constant) and isinstance(value.value, str):
                out.add(id(value))
    return out


def _code_literals(path: Path) -> list[str]:
    """Every string literal of a module (docstrings aside) that names a rule code or a code's
    prefix ('GC1', 'GC208')."""
    tree = ast.parse(path.read_text(encoding="utf-8"))
    docs = _docstrings(tree)
    return [
        node.value
        for node in ast.walk(tree)
        if isinstance(node, ast.Constant)
        and isinstance(node.value, str)
        and id(node) not in docs
        and _CODE.search(node.value)
    ]


def test_the_scan_for_code_literals_finds_what_it_looks_for(tmp_path):
    probe = tmp_path / "probe.py"
    probe.write_text(
        '"""GC101 in a docstring is prose."""\n'
        "def f(x):\n"
        '    """GC202: prose too."""\n'
        '    return x.code in ("GC106", "GC109") or x.code.startswith("GC2")  # GC3 comment\n',
        encoding="utf-8",
    )
    assert sorted(_code_literals(probe)) == ["GC106", "GC109", "GC2"]


def test_the_advisor_names_no_rule_code():
    # the advisor picks generators by the actions a finding's entry names and refuses changes by
    # the refusals an entry names: no list of codes of its own, no test of a code's prefix
    found = {
        (path.name, value)
        for path in sorted((PACKAGE / "advice").glob("*.py"))
        for value in _code_literals(path)
    }
    assert found <= set(ADVICE_CODE_ALLOWED), sorted(found - set(ADVICE_CODE_ALLOWED))


def test_every_refusal_an_entry_names_is_one_the_advisor_raises():
    named = {r for rule in RULES.values() for r in rule.refusals}
    assert named == set(REFUSALS)
    unconnected = {c for c, r in RULES.items() if "unconnected" in r.refusals}
    assert unconnected == {"GC106", "GC109", "GC401"}
    assert [c for c, r in RULES.items() if "through-star" in r.refusals] == ["GC103"]
    with pytest.raises(ValueError, match="refusals"):
        entry("GC999", "x", FAMILIES[0], "note", "c", "w", "f", refusals=("lift-the-earth",))


def test_answer_takes_the_rules_naming_an_action_in_the_catalogues_order():
    loc = Location("plan.gplan", 1, 1)
    note = Finding("GC221", "note", "m", loc, ("mains",))
    danger = Finding("GC208", "danger", "m", loc, ("mains",))
    result = types.SimpleNamespace(findings=[note, danger])
    a = answer(result, "rcd-at-socket")
    assert a.codes == ("GC208", "GC221", "GC225") and a.findings == (note, danger)
    assert a.reason == "GC208"
    assert answer(types.SimpleNamespace(findings=[note]), "rcd-at-socket").reason == "GC221"
    assert answer(types.SimpleNamespace(findings=[]), "open-loop").reason == "GC101"
