"""The one-token statement (LINE) reads exactly as its keyword-and-name and attribute tokens
would."""

import re

import pytest
from hypothesis import HealthCheck, given, settings, strategies as st
from lark import Lark

from groundcheck.language import syntax

from helpers import EXAMPLES, ROOT
from planfuzz import mutated_plans, valid_plans


def _without_line_token() -> Lark:
    text = syntax.grammar_text()
    text = text.replace("statement: LINE | (HEAD | WORD) REST?", "statement: (HEAD | WORD) REST?")
    text = re.sub(r"(?m)^LINE\.\d+:.*$", "", text)
    assert not re.search(r"\bLINE\b", re.sub(r"(?m)//.*$", "", text))
    return Lark(text, parser="lalr", transformer=syntax._BUILD, maybe_placeholders=False)


SLOW = _without_line_token()


def _norm(x):
    if isinstance(x, syntax.BlockDef):
        return ("block", x.name, x.loc, _norm(x.body))
    if isinstance(x, (list, tuple)):
        return [_norm(i) for i in x]
    if isinstance(x, dict):
        return {k: _norm(v) for k, v in x.items()}
    return repr(x)


def _both(text: str, monkeypatch):
    out = []
    for parser in (syntax._parser(), SLOW):
        with monkeypatch.context() as m:
            m.setattr(syntax, "_parser", lambda p=parser: p)
            errors = []
            items = syntax.parse_text(text, "t.gplan", errors)
            out.append((_norm(items), [str(e) for e in errors]))
    return out


CASES = [
    "wire a: b to c,\n  10 mm, 1 mm2\n",
    "wire a:b to c\n",
    'wire   a  :  "x" y\n',
    "wire a: # c\n",
    "block x {\nwire a: b to c, 1 mm\n}\n",
    "block x { wire a: b to c\n}\n",
    "wire a: b to c wire d: e\n",
    'wire a: "unterminated\n',
    "x y: z\n}\n",
    'plan "a: b"\n',
    "w a: 1,2 mm\n\n\n# c\nq b: c # d\n",
    "wire a: b to c,\n",
    "wire 1a: b\n",
    "wire a: b to c}\n",
    "\tpoint p: star\r\n",
]


@pytest.mark.parametrize(
    "text",
    CASES + [p.read_text() for p in EXAMPLES + sorted((ROOT / "examples").glob("*/**/*.gplan"))],
)
def test_same_statements_and_errors_on_chosen_text(text, monkeypatch):
    fast, slow = _both(text, monkeypatch)
    assert fast == slow


@settings(max_examples=100, deadline=None, suppress_health_check=list(HealthCheck))
@given(st.one_of(valid_plans(), mutated_plans()))
def test_same_statements_and_errors_on_generated_plans(text):
    with pytest.MonkeyPatch.context() as mp:
        fast, slow = _both(text, mp)
    assert fast == slow
