"""Kinds and roles are asked, never spelled: a conductor's kind or role is named as a string only
in the kinds table (groundcheck/model/kinds.py); every other module asks the table what a kind
can do.

The scan reads the source with :mod:`ast` and flags a kind or role name written as a string where
it decides something: compared with a kind or role (in a comparison or a ``match``), given as one
(an argument, an assignment, a default), looked up in the table by its word, or listed with
others of its vocabulary. A second test lists every other string that happens to be such a name
(a keyword of another vocabulary, a JSON key) with the vocabulary it belongs to, so that a word
the scan cannot judge is never new without being read."""

from __future__ import annotations

import ast
from pathlib import Path

from groundcheck.model.kinds import CURRENT_ROLES, KINDS, ROLES
from groundcheck.physics.humsettings import SIGNAL_FREQUENCY, at_signal_frequency

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


#: the kinds table's lookups by a kind's word: ``KINDS["bolt"]``, ``kind("bolt")`` ...
LOOKUPS = {"KINDS", "kind", "default_role", "is_fastening_kind", "kinds_with"}


def _named(target: ast.AST, words: tuple[str, ...]) -> bool:
    """Whether an assignment's target is a kind (or role): ``kind = ...``, ``self.role = ...``."""
    return (isinstance(target, ast.Name) and target.id in words) or (
        isinstance(target, ast.Attribute) and target.attr in words
    )


def _given(node: ast.AST, vocab) -> list[tuple[int, str]]:
    """Kind or role names given as one: assigned to a name ``kind``/``role``, or the default of
    such an argument."""
    out = []
    pairs: list = []
    if isinstance(node, ast.Assign):
        pairs = [(t, node.value) for t in node.targets]
    elif isinstance(node, (ast.FunctionDef, ast.AsyncFunctionDef, ast.Lambda)):
        args = node.args
        positional = [*args.posonlyargs, *args.args]
        pairs = list(zip(positional[len(positional) - len(args.defaults) :], args.defaults))
        pairs += [(a, d) for a, d in zip(args.kwonlyargs, args.kw_defaults) if d is not None]
        pairs = [(ast.Name(id=a.arg), d) for a, d in pairs]
    for target, value in pairs:
        for words, names in vocab:
            if _named(target, words):
                out += [(s.lineno, s.value) for s in _strings(value) if s.value in names]
    return out


def _looked_up(node: ast.AST, kinds: set[str]) -> list[tuple[int, str]]:
    """A kind's word given to the table's lookups: ``KINDS["bolt"]``, ``kind("bolt")``."""
    if isinstance(node, ast.Subscript) and isinstance(node.value, ast.Name):
        if node.value.id in LOOKUPS:
            return [(s.lineno, s.value) for s in _strings(node.slice) if s.value in kinds]
    if isinstance(node, ast.Call) and node.args:
        f = node.func
        name = f.id if isinstance(f, ast.Name) else f.attr if isinstance(f, ast.Attribute) else ""
        if name in LOOKUPS or name == "get" and _mentions(f, ("KINDS",)):
            return [(s.lineno, s.value) for s in _strings(node.args[0]) if s.value in kinds]
    return []


def _matched(node: ast.AST, vocab) -> list[tuple[int, str]]:
    """``match c.kind: case "bolt": ...``."""
    out = []
    if isinstance(node, ast.Match):
        for words, names in vocab:
            if _mentions(node.subject, words):
                for case in node.cases:
                    out += [
                        (v.lineno, v.value)
                        for p in ast.walk(case.pattern)
                        if isinstance(p, ast.MatchValue)
                        for v in [p.value]
                        if isinstance(v, ast.Constant) and v.value in names
                    ]
    return out


def _listed(node: ast.AST, kinds: set[str], roles: set[str]) -> list[tuple[int, str]]:
    """A vocabulary listed again: three of its names in one literal, or two or more and nothing
    else (``("shield", "interconnect")``)."""
    if not isinstance(node, (ast.Tuple, ast.List, ast.Set, ast.Dict)):
        return []
    items = node.keys if isinstance(node, ast.Dict) else node.elts
    strings = [n.value for n in items if isinstance(n, ast.Constant) and isinstance(n.value, str)]
    words = set(strings)
    out = []
    for names in (kinds, roles):
        only = len(strings) == len(items) and len(words) >= 2 and words <= names
        if len(words & names) >= 3 or only:
            out += [(node.lineno, w) for w in sorted(words & names)]
    return out


def scan(source: str, kinds: set[str], roles: set[str]) -> list[tuple[int, str]]:
    """(line, word) of every kind or role name the source spells where it decides something."""
    out = []
    vocab = ((("kind", "kinds"), kinds), (("role", "roles"), roles))
    for node in ast.walk(ast.parse(source)):
        out += _given(node, vocab) + _looked_up(node, kinds) + _matched(node, vocab)
        out += _listed(node, kinds, roles)
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
        elif isinstance(node, ast.AnnAssign) and node.value is not None:
            for words, names in vocab:
                if _named(node.target, words):
                    out += [(s.lineno, s.value) for s in _strings(node.value) if s.value in names]
    return sorted(set(out))


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


def test_the_scan_finds_the_other_ways_of_giving_a_kind():
    """Assigned, a default, looked up in the table by its word, matched, or two names listed
    alone: each found (they were not, before)."""
    kinds, roles = _vocabulary()
    src = """
kind = "strap"
self.role = "return"
def f(c, kind="busbar", *, role="heater"): pass
r = KINDS["switch"].contact
d = default_role("lift")
match c.kind:
    case "core": pass
SHIELDS = ("shield", "interconnect")
LANDINGS = ("chassis", "signal")
"""
    found = scan(src, kinds, roles)
    assert found == [
        (2, "strap"),
        (3, "return"),
        (4, "busbar"),
        (4, "heater"),
        (5, "switch"),
        (6, "lift"),
        (8, "core"),
        (9, "interconnect"),
        (9, "shield"),
    ]


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


#: where a string that is also a kind's or a role's name belongs to another vocabulary: (module,
#: word) -> that vocabulary. The statement reader (groundcheck/language/) builds the plan's
#: keywords and is not listed; a word not listed here is read and either asked of the kinds table
#: or added with its vocabulary.
OTHER_VOCABULARIES = {
    ("__init__.py", "load"): "the package's load() function",
    ("advice/candidates.py", "bond"): "repair action names (rules/catalogue_*.py actions)",
    ("advice/changes.py", "bond"): "repair action names",
    ("advice/protective_changes.py", "bond"): "repair action names",
    ("advice/live_changes.py", "bond"): "repair action names",
    ("rules/catalogue_pe.py", "bond"): "repair action names",
    ("advice/compare.py", "interconnect"): "a key of the outlet rows (physics/outlets.py)",
    ("renderers/compare_page.py", "interconnect"): "a key of the outlet rows",
    ("renderers/textearth.py", "interconnect"): "a heading of the outlet table",
    ("renderers/jsondoc.py", "interconnect"): "a key of the JSON document's outlet rows",
    ("renderers/jsondoc.py", "cable"): "a key of the JSON document's cable rows",
    ("renderers/live.py", "protective"): "a section of the live page",
    ("advice/installation_changes.py", "lift"): "a device's signal-ground word",
    ("renderers/lexer.py", "load"): "plan-language keywords of other statements",
    ("renderers/lexer.py", "leakage"): "plan-language keywords of other statements",
    ("renderers/lexer.py", "lift"): "plan-language keywords of other statements",
    ("model/installation.py", "signal"): "where a shield lands (chassis or signal)",
    ("rules/installation.py", "signal"): "where a shield lands (chassis or signal)",
    ("advice/pin_one.py", "signal"): "where a shield lands (chassis or signal)",
    ("measure/bench.py", "heater"): "a hum source's kind (physics/sources.py)",
    ("measure/bench.py", "signal"): "a hum source's kind",
    ("physics/coupling.py", "heater"): "a hum source's kind",
    ("physics/hum.py", "signal"): "a hum source's kind",
    ("physics/outlets.py", "signal"): "a hum source's kind",
    ("physics/sources.py", "heater"): "a hum source's kind",
    ("physics/sources.py", "signal"): "a hum source's kind",
    ("network/canonical.py", "heater"): "what a point has attached (a heater's end)",
    ("physics/impedance.py", "switch"): "a kind's impedance model (the kinds table's column)",
    ("physics/impedance.py", "lift"): "a kind's impedance model",
}


def _loose_strings(source: str, names: set[str]) -> set[str]:
    """The strings of a module that are one of ``names``, docstrings and the text of f-strings
    left out."""
    tree = ast.parse(source)
    skip = set()
    for n in ast.walk(tree):
        body = getattr(n, "body", None)
        if isinstance(body, list) and body and isinstance(body[0], ast.Expr):
            skip.add(id(body[0].value))
        if isinstance(n, ast.JoinedStr):
            skip.update(id(v) for v in n.values)
    return {
        n.value
        for n in ast.walk(tree)
        if isinstance(n, ast.Constant) and isinstance(n.value, str) and id(n) not in skip
        if n.value in names
    }


def test_every_other_string_that_is_a_kind_or_role_name_belongs_to_another_vocabulary():
    kinds, roles = _vocabulary()
    reader = PACKAGE / "language"
    found = set()
    for path in sorted(PACKAGE.rglob("*.py")):
        if path == HOME or reader in path.parents:
            continue
        module = path.relative_to(PACKAGE).as_posix()
        found |= {(module, w) for w in _loose_strings(path.read_text("utf-8"), kinds | roles)}
    assert not found - OTHER_VOCABULARIES.keys(), (
        "a kind or role spelled (ask groundcheck.model.kinds), or a word of another vocabulary "
        f"to list in OTHER_VOCABULARIES: {sorted(found - OTHER_VOCABULARIES.keys())}"
    )
    assert not OTHER_VOCABULARIES.keys() - found, "listed but gone: remove from the list"


def _frequency_equalities(source: str) -> list[int]:
    """Lines where a frequency is compared by float equality: ``row["frequency_hz"] == x`` or
    anything ``== 1000.0``."""
    out = []
    for node in ast.walk(ast.parse(source)):
        if isinstance(node, ast.Compare) and any(
            isinstance(op, (ast.Eq, ast.NotEq)) for op in node.ops
        ):
            for o in [node.left, *node.comparators]:
                key = o.slice if isinstance(o, ast.Subscript) else None
                if (isinstance(key, ast.Constant) and key.value == "frequency_hz") or (
                    isinstance(o, ast.Constant) and o.value == SIGNAL_FREQUENCY
                ):
                    out.append(node.lineno)
    return sorted(set(out))


def test_the_signal_frequency_is_named_once_and_never_compared_exactly():
    """The crosstalk's and the feedback's frequency is physics/humsettings.SIGNAL_FREQUENCY; a
    row at it is found by ``at_signal_frequency``, never by ``== 1000.0`` (it was, in three
    modules)."""
    assert _frequency_equalities('if r["frequency_hz"] == 1000.0: pass\nx = f != 1000') == [1, 2]
    found = [
        f"{path.relative_to(PACKAGE.parent)}:{line}"
        for path in sorted(PACKAGE.rglob("*.py"))
        for line in _frequency_equalities(path.read_text(encoding="utf-8"))
    ]
    assert not found, found
    assert at_signal_frequency(20 * 50.0) and not at_signal_frequency(1000.5)
