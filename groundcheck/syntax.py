"""Reading plan text with lark: the grammar, syntax errors with friendly hints, statements out.

The grammar file lives in the top-level ``grammar/`` folder and ships inside
the package as ``groundcheck.grammar``.
"""

from __future__ import annotations

import difflib
from functools import lru_cache
from importlib import resources
from pathlib import Path

from lark import Lark, Token, Tree
from lark.exceptions import UnexpectedCharacters, UnexpectedEOF, UnexpectedInput, UnexpectedToken

from .errors import Location, PlanError
from .phrases import Statement, make_items

__all__ = ["parse_text", "BlockDef", "grammar_text"]

#: the most syntax errors reported for one file before giving up
MAX_SYNTAX_ERRORS = 20

_FRIENDLY = {"WORD": "a word", "NUMBER": "a number", "COORD": "a position x,y", "STRING": "a quoted string",
             "LABEL": "a name with a colon", "_NL": "the end of the line", "COMMA": "a comma",
             "LBRACE": "'{'", "RBRACE": "'}'", "BLOCK": "'block'", "$END": "the end of the file"}


def grammar_text() -> str:
    """The text of ``plan.lark``, from the installed package or, in a source tree, from ``grammar/``."""
    try:
        return resources.files("groundcheck.grammar").joinpath("plan.lark").read_text(encoding="utf-8")
    except (ModuleNotFoundError, FileNotFoundError):  # pragma: no cover - source tree without install
        return (Path(__file__).resolve().parent.parent / "grammar" / "plan.lark").read_text(encoding="utf-8")


@lru_cache(maxsize=1)
def _parser() -> Lark:
    return Lark(grammar_text(), parser="lalr", propagate_positions=True, maybe_placeholders=False)


class BlockDef:
    """A block definition: its name, location and statements (still unexpanded)."""

    def __init__(self, name: str, loc: Location, body: list[Statement]):
        self.name, self.loc, self.body = name, loc, body


def _syntax_error(e: UnexpectedInput, file: str, lines: list[str]) -> PlanError:
    line = getattr(e, "line", None) or len(lines) or 1
    col = getattr(e, "column", None) or 1
    if isinstance(e, UnexpectedEOF) or (isinstance(e, UnexpectedToken) and e.token.type == "$END"):
        line = max(1, len(lines))
        col = len(lines[line - 1]) + 1 if lines else 1
        return PlanError("unexpected end of file", Location(file, line, col), "a block opened with '{' needs its closing '}'")
    if isinstance(e, UnexpectedCharacters):
        ch = lines[line - 1][col - 1] if line - 1 < len(lines) and col - 1 < len(lines[line - 1]) else "?"
        hint = "names start with a letter; positions are x,y with no space; strings use double quotes"
        if ch == ":":
            hint = "only elements take 'NAME:'; header keywords (plan, mains, ambient, listening) take none"
        return PlanError(f"unexpected character {ch!r}", Location(file, line, col), hint)
    assert isinstance(e, UnexpectedToken)
    tok = e.token
    expected = sorted({_FRIENDLY.get(t, t) for t in e.expected if not t.startswith("__")})
    what = {"LABEL": f"name {tok.value.rstrip(': ')!r} with a colon", "_NL": "end of line"}.get(tok.type, repr(str(tok)))
    hint = "expected " + " or ".join(expected[:4]) if expected else ""
    if tok.type == "LABEL":
        hint = "a statement starts with its keyword, e.g. 'wire NAME: A to B, ...'"
    if tok.type == "RBRACE":
        hint = "'}' closes a block and stands alone on its line"
    return PlanError(f"unexpected {what}", Location(file, tok.line, tok.column), hint)


def parse_text(text: str, file: str, errors: list[PlanError]) -> tuple[list, dict[str, BlockDef]]:
    """Parse a plan's text into top-level statements (and ``("block", BlockDef)`` entries) in order.

    Syntax errors are appended to ``errors``; the offending line is blanked
    and parsing starts again, so that several errors of one file are reported.
    """
    lines = text.split("\n")
    tree = None
    work = list(lines)
    for _ in range(MAX_SYNTAX_ERRORS):
        try:
            tree = _parser().parse("\n".join(work) + "\n")
            break
        except UnexpectedInput as e:
            err = _syntax_error(e, file, lines)
            errors.append(err)
            ln = err.location.line - 1
            if isinstance(e, UnexpectedEOF) or (isinstance(e, UnexpectedToken) and e.token.type == "$END"):
                return [], {}
            if 0 <= ln < len(work) and work[ln].strip():
                work[ln] = ""
            else:
                return [], {}
    if tree is None:
        return [], {}
    out: list = []
    blocks: dict[str, BlockDef] = {}
    for child in tree.children:
        if isinstance(child, Tree) and child.data == "block":
            name_tok = child.children[0]
            loc = Location(file, name_tok.line, name_tok.column)
            body = [_statement(s, file, errors) for s in child.children[1:]]
            bd = BlockDef(str(name_tok), loc, body)
            if bd.name in blocks:
                errors.append(PlanError(f"block {bd.name!r} is defined twice", loc, f"first defined at {blocks[bd.name].loc}"))
            blocks[bd.name] = bd
            out.append(("block", bd))
        elif isinstance(child, Tree) and child.data == "statement":
            out.append(_statement(child, file, errors))
    return out, blocks


def _statement(tree: Tree, file: str, errors: list[PlanError]) -> Statement:
    kw: Token = tree.children[0]
    st = Statement(str(kw), Location(file, kw.line, kw.column))
    before = len(errors)
    for child in tree.children[1:]:
        if isinstance(child, Token) and child.type == "LABEL":
            st.label = child.value.rstrip(": \t")
            st.label_loc = Location(file, child.line, child.column)
        elif isinstance(child, Tree) and child.data == "attr":
            st.phrases.append(make_items(child.children, file, errors))
    st.phrases = [p for p in st.phrases if p]
    st.broken = len(errors) > before
    return st


def suggest_keyword(word: str, keywords) -> str:
    close = difflib.get_close_matches(word, list(keywords), n=1)
    return f"did you mean {close[0]!r}?" if close else "keywords: " + ", ".join(sorted(keywords))
