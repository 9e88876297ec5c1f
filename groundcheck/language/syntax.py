"""Reading plan text with lark: the grammar, syntax errors with friendly hints, statements out.

The grammar file lives in the top-level ``grammar/`` folder and ships inside
the package as ``groundcheck.grammar``.
"""

from __future__ import annotations

import difflib
import re
from functools import lru_cache
from importlib import resources
from pathlib import Path

from lark import Lark, Token, Transformer
from lark.exceptions import UnexpectedCharacters, UnexpectedEOF, UnexpectedInput, UnexpectedToken

from ..core.errors import Location, PlanError
from .grammar_cache import cached_grammar_file
from .phrases import NOT_ASCII, Statement, split_phrases

__all__ = ["parse_text", "BlockDef", "grammar_text", "HEAD", "head_parts"]

#: the most syntax errors reported for one file before giving up
MAX_SYNTAX_ERRORS = 20

_FRIENDLY = {
    "WORD": "a keyword",
    "REST": "attributes",
    "NUMBER": "a number",
    "COORD": "a position x,y",
    "STRING": "a quoted string",
    "HEAD": "a keyword and a name",
    "_NL": "the end of the line",
    "COMMA": "a comma",
    "LBRACE": "'{'",
    "RBRACE": "'}'",
    "BLOCK": "'block'",
    "$END": "the end of the file",
}


def grammar_text() -> str:
    """The text of ``plan.lark``, from the installed package or, in a source tree, from
    ``grammar/``."""
    try:
        return (
            resources.files("groundcheck.grammar")
            .joinpath("plan.lark")
            .read_text(encoding="utf-8")
        )
    except (
        ModuleNotFoundError,
        FileNotFoundError,
    ):  # pragma: no cover - source tree without install
        return (Path(__file__).resolve().parents[2] / "grammar" / "plan.lark").read_text(
            encoding="utf-8"
        )


class BlockDef:
    """A block definition: its name, location and statements (still unexpanded)."""

    def __init__(self, name: str, loc: Location, body: list[Statement]):
        self.name, self.loc, self.body = name, loc, body


def _terminal(name: str) -> str:
    """The regular expression of one of the grammar's terminals, as written in ``plan.lark``."""
    m = re.search(rf"^{name}(?:\.\d+)?:[ \t]*/(.+)/[ \t]*$", grammar_text(), re.M)
    return m.group(1).replace("\\/", "/")


#: a statement's head, "keyword name:" — the grammar's own HEAD terminal, the one definition of it
HEAD = re.compile(_terminal("HEAD"))


def head_parts(text: str) -> tuple[str, str, int, int]:
    """The keyword, the name, the name's offset and the offset where the attributes start, in a
    text that opens with a :data:`HEAD` (a HEAD or LINE token)."""
    end = HEAD.match(text).end()
    keyword = text.split(None, 1)[0]
    at = len(keyword) + len(text[len(keyword) :]) - len(text[len(keyword) :].lstrip(" \t"))
    name = text[at : end - 1].rstrip(" \t")
    return keyword, name, at, len(text) - len(text[end:].lstrip(" \t"))


class _Build(Transformer):
    """Turns the parse into :class:`Statement` records as the LALR parser reduces (no tree is
    built).

    Rule names match the grammar's: ``statement``, ``attr``, ``block``, ``start``.
    """

    file = "<plan>"
    errors: list = []

    def statement(self, children):
        head: Token = children[0]
        loc = Location(self.file, head.line, head.column)
        if head.type == "WORD":
            st = Statement(str(head), loc)
        else:  # HEAD or LINE: keyword, name and colon (and, for LINE, the rest)
            text = head.value
            keyword, name, at, rest = head_parts(text)
            st = Statement(keyword, loc, name, Location(self.file, head.line, head.column + at))
            if (
                not name.isascii()
            ):  # a look-alike letter would make a second name that looks the same
                bad = next(i for i, c in enumerate(name) if not c.isascii())
                self.errors.append(
                    PlanError(
                        f"unexpected character {name[bad]!r} (U+{ord(name[bad]):04X}) in the name",
                        Location(self.file, head.line, head.column + at + bad),
                        NOT_ASCII,
                    )
                )
                st.broken = True
                return st
            if head.type == "LINE":
                return self._phrases(st, text[rest:], head.line, head.column + rest)
        if len(children) > 1:
            rest = children[1]
            return self._phrases(st, str(rest), rest.line, rest.column)
        return st

    def _phrases(self, st: Statement, text: str, line: int, column: int) -> Statement:
        """The statement's phrases; an error inside them (a bad unit, say) marks it broken, so that
        its builder does not run on what is left and report errors that follow from the first."""
        before = len(self.errors)
        st.phrases = split_phrases(text, line, column, self.file, self.errors)
        st.broken = len(self.errors) > before
        return st

    def block(self, children):
        name_tok = children[0]
        if not str(name_tok).isascii():
            self.errors.append(
                PlanError(
                    f"block name {str(name_tok)!r} is not ASCII",
                    Location(self.file, name_tok.line, name_tok.column),
                    NOT_ASCII,
                )
            )
        return BlockDef(
            str(name_tok), Location(self.file, name_tok.line, name_tok.column), list(children[1:])
        )

    def start(self, children):
        return children


_BUILD = _Build()


@lru_cache(maxsize=1)
def _parser() -> Lark:
    """The plan parser; its LALR tables read from the user's cache folder when an earlier run left
    them there (:mod:`groundcheck.language.grammar_cache`), else compiled (and saved when the
    folder allows)."""
    text = grammar_text()
    options = dict(parser="lalr", transformer=_BUILD, maybe_placeholders=False, **_accelerated())
    cache = cached_grammar_file(text, "lark-cython" if options.get("_plugins") else "")
    if cache is not None:
        try:
            return Lark(text, cache=cache, **options)
        # the cache only saves time: any trouble with it means none
        except Exception:
            pass
    return Lark(text, **options)


def _accelerated() -> dict:
    """lark-cython's compiled lexer and LALR driver when installed (the same grammar and results,
    about
    1.5 times faster on large plans); plain lark otherwise."""
    try:
        import lark_cython
    except ImportError:  # pragma: no cover - optional speed-up
        return {}
    return {"_plugins": lark_cython.plugins}


def _syntax_error(e: UnexpectedInput, file: str, lines: list[str]) -> PlanError:
    line = getattr(e, "line", None) or len(lines) or 1
    col = getattr(e, "column", None) or 1
    if isinstance(e, UnexpectedEOF) or (isinstance(e, UnexpectedToken) and e.token.type == "$END"):
        line = max(1, len(lines))
        col = len(lines[line - 1]) + 1 if lines else 1
        return PlanError(
            "unexpected end of file",
            Location(file, line, col),
            "a block opened with '{' needs its closing '}'",
        )
    if isinstance(e, UnexpectedCharacters):
        ch = (
            lines[line - 1][col - 1]
            if line - 1 < len(lines) and col - 1 < len(lines[line - 1])
            else "?"
        )
        hint = (
            "names start with a letter; positions are x,y with no space; strings use double quotes"
        )
        if ch == ":":
            hint = (
                "only elements take 'NAME:'; header keywords (plan, mains, ambient, listening) "
                "take none"
            )
        return PlanError(f"unexpected character {ch!r}", Location(file, line, col), hint)
    assert isinstance(e, UnexpectedToken)
    tok = e.token
    expected = sorted(
        {_FRIENDLY.get(t, t) for t in e.expected if not t.startswith("__") and t != "LINE"}
    )
    what = {
        "HEAD": repr(str(tok).rstrip(": \t")),
        "LINE": repr(str(tok).split(":", 1)[0].rstrip()),
        "_NL": "end of line",
    }.get(tok.type, repr(str(tok)))
    hint = "expected " + " or ".join(expected[:4]) if expected else ""
    if tok.type in ("HEAD", "LINE"):
        hint = "a statement starts with its keyword, e.g. 'wire NAME: A to B, ...'"
    if tok.type == "RBRACE":
        hint = "'}' closes a block and stands alone on its line"
    return PlanError(f"unexpected {what}", Location(file, tok.line, tok.column), hint)


def parse_text(text: str, file: str, errors: list[PlanError]) -> tuple[list, dict[str, BlockDef]]:
    """Parse a plan's text into top-level statements (and ``("block", BlockDef)`` entries) in
    order.

    Syntax errors are appended to ``errors``; the offending line is blanked
    and parsing starts again, so that several errors of one file are reported.
    """
    lines = text.split("\n")
    items = None
    work = list(lines)
    _BUILD.file = file
    for _ in range(MAX_SYNTAX_ERRORS):
        _BUILD.errors = []
        try:
            items = _parser().parse("\n".join(work) + "\n")
            break
        except UnexpectedInput as e:
            err = _syntax_error(e, file, lines)
            errors.append(err)
            ln = err.location.line - 1
            if isinstance(e, UnexpectedEOF) or (
                isinstance(e, UnexpectedToken) and e.token.type == "$END"
            ):
                return [], {}
            if 0 <= ln < len(work) and work[ln].strip():
                work[ln] = ""
            else:
                return [], {}
    if items is None:
        return [], {}
    item_errors = _BUILD.errors
    errors.extend(item_errors)
    # a statement with an error inside it is marked broken, so that it makes no follow-on errors
    bad_lines = {(e.location.line) for e in item_errors}
    out: list = []
    blocks: dict[str, BlockDef] = {}
    for child in items:
        if isinstance(child, BlockDef):
            for st in child.body:
                _mark(st, bad_lines)
            if child.name in blocks:
                errors.append(
                    PlanError(
                        f"block {child.name!r} is defined twice",
                        child.loc,
                        f"first defined at {blocks[child.name].loc}",
                    )
                )
            blocks[child.name] = child
            out.append(("block", child))
        else:
            _mark(child, bad_lines)
            out.append(child)
    return out, blocks


def _mark(st: Statement, bad_lines: set[int]) -> None:
    if not bad_lines:
        return
    last = max((it.loc.line for ph in st.phrases for it in ph), default=st.loc.line)
    if any(st.loc.line <= ln <= last for ln in bad_lines):
        st.broken = True


def suggest_keyword(word: str, keywords) -> str:
    close = difflib.get_close_matches(word, list(keywords), n=1)
    return f"did you mean {close[0]!r}?" if close else "keywords: " + ", ".join(sorted(keywords))
