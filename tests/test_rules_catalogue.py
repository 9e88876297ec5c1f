"""The rule catalogue and the code that makes findings cannot drift apart."""

import re
from pathlib import Path

from groundcheck.rules.catalogue import RULES, SEVERITIES

PACKAGE = Path(__file__).resolve().parent.parent / "groundcheck"


def _producers():
    """code -> modules that construct a Finding with that code (read from the source text)."""
    out: dict[str, set[str]] = {}
    for f in PACKAGE.rglob("*.py"):
        for code in re.findall(r'Finding\(\s*"(GC\d{3})"', f.read_text(encoding="utf-8")):
            out.setdefault(code, set()).add(str(f.relative_to(PACKAGE)))
    return out


def test_every_catalogued_rule_is_made_in_exactly_one_module_and_vice_versa():
    made = _producers()
    assert set(made) == set(RULES), set(made) ^ set(RULES)
    assert {c: m for c, m in made.items() if len(m) != 1} == {}


def test_catalogue_entries_are_complete():
    for code, rule in RULES.items():
        assert re.fullmatch(r"GC[1-4]\d\d", code) and rule.code == code
        assert (
            rule.severity in SEVERITIES
            and rule.checks
            and rule.why
            and rule.fix
            and rule.references
        )
    assert len({r.name for r in RULES.values()}) == len(RULES)


def test_every_catalogued_code_has_exactly_one_registered_function():
    from groundcheck.rules import families  # noqa: F401 - registers every rule
    from groundcheck.rules.registry import codes_registered

    got = codes_registered()
    assert set(got) == set(RULES), set(got) ^ set(RULES)
    assert {c: f for c, f in got.items() if len(f) != 1} == {}
