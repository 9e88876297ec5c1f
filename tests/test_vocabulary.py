"""Kinds and roles are asked, never spelled: a conductor's kind or role is named as a string only
in the kinds table (groundcheck/model/kinds.py); every other module asks the table what a kind
can do.

The scan reads the source with :mod:`ast` and flags a kind or role name written as a string where
it decides something: compared with a kind or role, given as one, or listed with others of its
vocabulary."""

from __future__ import annotations

import ast
from pathlib import Path

from groundcheck.model.kinds import CURRENT_ROLES, KINDS, ROLES

PACKAGE = Path(__file__).resolve().parent.parent / "groundcheck"
#: the one home of the vocabularies
HOME = PACKAGE / "model" / "kinds.py"


def _mentions(node: ast.AST, words: tuple[str, ...]) -> bool:
    """Whether an expression reads a kind (or a role): ``c.kind``, ``kind``, ``kinds``,
    ``kinds.get(e)``."""
    for n in ast.walk(node):
        if isinstance(n, ast.Attribute) and n.attr in words:
            return True
        if isinstance(n, ast.Name) and n.id in words:
            return True
    return False


def _strings(node: ast.AST) -> list[ast.Constant]:
    """String constants of an operand: itself, or the members of a tuple, list or set literal."""
    items = node.elts if isinstance(node, (ast.Tuple, ast.List, ast.Set)) else [node]
    return [n for n in items if isinstance(n, ast.Constant) and isinstance(n.value, str)]


def scan(source: str, kinds: set[str], roles: set[str]) -> list[tuple[int, str]]:
    """(line, word) of every kind or role name the source spells where it decides something."""
    out = []
    vocab = ((("kind", "kinds"), kinds), (("role", "roles"), roles))
    for node in ast.walk(ast.parse(source)):
        if isinstance(node, ast.Compare):
            operands = [node.left, *node.comparators]
            for i, op in enumerate(operands):
                for words, names in vocab:
                    if any(_mentions(o, words) for j, o in enumerate(operands) if j != i):
                        out += [(s.lineno, s.value) for s in _strings(op) if s.value in names]
        elif isinstance(node, ast.Call):
            for kw in node.keywords:
                for words, names in vocab:
                    if kw.arg in words:
                        out += [
                            (s.lineno, s.value) for s in _strings(kw.value) if s.value in names
                        ]
            # the positional kind of a Conductor, the positional role of a Current
            name = node.func.id if isinstance(node.func, ast.Name) else ""
            where = {"Conductor": (1, kinds), "Current": (4, roles)}.get(name)
            if where and len(node.args) > where[0]:
                at, names = where
                out += [(s.lineno, s.value) for s in _strings(node.args[at]) if s.value in names]
        elif (
            isinstance(node, ast.AnnAssign)
            and isinstance(node.target, ast.Name)
            and node.value is not None
        ):
            for words, names in vocab:
                if node.target.id in words:
                    out += [(s.lineno, s.value) for s in _strings(node.value) if s.value in names]
        elif isinstance(node, (ast.Tuple, ast.List, ast.Set, ast.Dict)):
            items = node.keys if isinstance(node, ast.Dict) else node.elts
            words = {
                n.value for n in items if isinstance(n, ast.Constant) and isinstance(n.value, str)
            }
            for names in (kinds, roles):
                if len(words & names) >= 3:  # a vocabulary listed again
                    out += [(node.lineno, w) for w in sorted(words & names)]
    return out


def _vocabulary() -> tuple[set[str], set[str]]:
    return set(KINDS), set(ROLES) | set(CURRENT_ROLES)


def test_the_scan_finds_what_it_looks_for():
    """The scan is not blind: each way of spelling a kind or role is found in a made-up module."""
    kinds, roles = _vocabulary()
    src = """
if c.kind == "bolt": pass
if c.kind in ("shield", "interconnect"): pass
if kinds.get(e) == "interconnect": pass
if "protective" in roles: pass
if c.role != "signal": pass
x = Conductor("n", "bolt", "a", "b", role="bond")
y = make(Conductor, kind="wire")
WORDS = ("protective", "return", "signal")
BY = {"wire": 1, "trace": 2, "cable": 3}
class C:
    role: str = "signal"
z = Current("n.leakage", "a", "b", ((1e-3, 50.0),), "leakage", None)
"""
    found = scan(src, kinds, roles)
    assert {w for _, w in found} == {
        "bolt",
        "shield",
        "interconnect",
        "protective",
        "signal",
        "bond",
        "wire",
        "return",
        "trace",
        "cable",
        "leakage",
    }
    assert {line for line, _ in found} == set(range(2, 14)) - {11}
    # words of other vocabularies that happen to be compared with a kind are not kinds
    assert scan('if first.kind == "word" and s.kind != "signal": pass', kinds, roles) == []


def test_no_kind_or_role_is_spelled_outside_the_table():
    kinds, roles = _vocabulary()
    found = []
    for path in sorted(PACKAGE.rglob("*.py")):
        if path == HOME:
            continue
        found += [
            f"{path.relative_to(PACKAGE.parent)}:{line}: {word!r}"
            for line, word in scan(path.read_text(encoding="utf-8"), kinds, roles)
        ]
    assert not found, "ask groundcheck.model.kinds instead of spelling:\n" + "\n".join(found)
