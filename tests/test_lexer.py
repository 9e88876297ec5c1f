"""The plan language's Pygments lexer: registered under 'gplan' and '*.gplan', no error tokens on
any example, keywords, quantities, names and comments told apart."""

from pathlib import Path

import pytest
from pygments.lexers import get_lexer_by_name, get_lexer_for_filename
from pygments.token import Comment, Error, Keyword, Name, Number

from helpers import EXAMPLES

STUDIO = Path(__file__).resolve().parent.parent / "examples" / "studio" / "project-studio.gplan"


def test_the_lexer_is_registered():
    assert get_lexer_by_name("gplan").name == "groundcheck plan"
    assert get_lexer_for_filename("amp.gplan").name == "groundcheck plan"


@pytest.mark.parametrize("path", [*EXAMPLES, STUDIO], ids=lambda p: p.stem)
def test_examples_lex_without_errors(path):
    tokens = list(get_lexer_by_name("gplan").get_tokens(path.read_text(encoding="utf-8")))
    assert not [v for t, v in tokens if t is Error]
    assert "".join(v for _, v in tokens).rstrip("\n") == path.read_text(encoding="utf-8").rstrip(
        "\n"
    )


def test_the_parts_of_a_statement():
    tokens = [
        (t, v)
        for t, v in get_lexer_by_name("gplan").get_tokens(
            "wire pe_lead: mains.pe to pe_stud, 25 mm, 1 mm2, protective   # the earth\n"
        )
        if v.strip()
    ]
    kinds = dict((v, t) for t, v in tokens)
    assert (
        kinds["wire"] in Keyword and kinds["pe_lead"] in Name.Variable and kinds["25 mm"] in Number
    )
    assert kinds["protective"] in Name.Attribute and kinds["# the earth"] in Comment
